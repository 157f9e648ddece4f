/**
 * Standalone figure files: each chart as SVG (with an XML declaration) and as
 * PNG rasterised by resvg at twice the SVG's size, with its data as CSV and
 * JSON.
 */
import { existsSync } from 'node:fs';
import { Resvg, renderAsync, type ResvgRenderOptions } from '@resvg/resvg-js';
import type { Chart, FigureMeta } from './figure-data.js';

/** PNG pixels per SVG user unit. */
export const PNG_SCALE = 2;

/** DejaVu Sans where Debian installs it (fonts-dejavu-core); otherwise every system font. */
const DEJAVU = ['/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf', '/usr/share/fonts/truetype/dejavu/DejaVuSans-Bold.ttf'];

function fontOptions(): ResvgRenderOptions['font'] {
  const files = DEJAVU.filter((f) => existsSync(f));
  if (files.length > 0) return { loadSystemFonts: false, fontFiles: files, defaultFontFamily: 'DejaVu Sans', sansSerifFamily: 'DejaVu Sans' };
  return { loadSystemFonts: true };
}

/** A standalone SVG file's text. */
export function standaloneSvg(svg: string): string {
  return `<?xml version="1.0" encoding="UTF-8"?>\n${svg}\n`;
}

/** PNG renders started ahead of need, by SVG text (figureFilesAsync takes them). */
const pending = new Map<string, Promise<Uint8Array>>();

/**
 * Start rasterising a chart's SVG at PNG_SCALE on libuv's thread pool, while
 * the main thread goes on drawing the next chart; figureFilesAsync collects it.
 */
export function startPng(svg: string): void {
  if (pending.has(svg)) return;
  const job = renderAsync(standaloneSvg(svg), { fitTo: { mode: 'zoom', value: PNG_SCALE }, background: '#ffffff', font: fontOptions(), logLevel: 'off' }).then((r) => r.asPng());
  // A render that fails is reported where it is awaited, not as an unhandled rejection.
  job.catch(() => undefined);
  pending.set(svg, job);
}

/** Rasterise an SVG to PNG bytes at PNG_SCALE. */
export function svgToPng(svg: string): Uint8Array {
  const r = new Resvg(svg, { fitTo: { mode: 'zoom', value: PNG_SCALE }, background: '#ffffff', font: fontOptions(), logLevel: 'off' });
  return r.render().asPng();
}

/** Rasterise an SVG to PNG bytes `widthPx` wide on `background`. */
export function svgToPngWidth(svg: string, widthPx: number, background = '#ffffff'): Uint8Array {
  const r = new Resvg(svg, { fitTo: { mode: 'width', value: Math.round(widthPx) }, background, font: fontOptions(), logLevel: 'off' });
  return r.render().asPng();
}

export interface FigureFile {
  name: string;
  data: string | Uint8Array;
}

/** A figure's metadata as CSV comment lines: tool, wiring, light with SHA-256, temperature, units, caution. */
export function csvMetaLines(m: FigureMeta): string[] {
  const l = m.light;
  const light =
    l.kind === 'spectrum' ? `${l.name}, P_in ${l.irradiance_w_m2} W/m², SHA-256 ${l.sha256}` : l.kind === 'sites' ? `${l.name} (${l.sites} sites), site set SHA-256 ${l.sha256}` : `ensemble ${l.name} (${l.spectra} spectra), SHA-256 ${l.sha256}`;
  const t = m.temperature_k;
  const temp = typeof t === 'number' ? `${t} K` : 'model' in t ? `${t.model}, gaps held at their ${t.gaps_held_at} K values` : `${t.min}–${t.max} K per spectrum, gaps held at their ${t.gaps_held_at} K values`;
  return [
    `# tool: ${m.tool}`,
    `# wiring: ${m.wiring ?? 'all (this figure does not depend on the wiring)'}`,
    `# light: ${light}`,
    `# cell temperature: ${temp}`,
    `# units: ${Object.entries(m.units)
      .map(([k, v]) => `${k} [${v}]`)
      .join('; ')}`,
    `# caution: ${m.caution}`,
  ];
}

/** A chart's CSV with its metadata block first (buildReport fills in every chart's block). */
export function figureCsv(c: Chart): string {
  return c.meta ? `${csvMetaLines(c.meta).join('\n')}\n${c.csv}` : c.csv;
}

/** A chart's JSON with its metadata block first. */
export function figureJson(c: Chart): string {
  return `${JSON.stringify(c.meta ? { meta: c.meta, ...c.json } : c.json, null, 2)}\n`;
}

/**
 * Every file of a figures folder for these charts (SVG, PNG, CSV and JSON of
 * each), plus the summary. The PNGs render on the thread pool, in parallel,
 * and those startPng began while the charts were drawn are taken as they are.
 */
export async function figureFilesAsync(charts: Chart[], summary: Record<string, unknown>): Promise<FigureFile[]> {
  for (const c of charts) startPng(c.svg);
  const pngs = await Promise.all(charts.map((c) => pending.get(c.svg) as Promise<Uint8Array>));
  for (const c of charts) pending.delete(c.svg);
  const files: FigureFile[] = [];
  charts.forEach((c, k) => {
    files.push({ name: `${c.name}.svg`, data: standaloneSvg(c.svg) });
    files.push({ name: `${c.name}.png`, data: pngs[k] });
    files.push({ name: `${c.name}.csv`, data: figureCsv(c) });
    files.push({ name: `${c.name}.json`, data: figureJson(c) });
  });
  files.push({ name: 'summary.json', data: `${JSON.stringify(summary, null, 2)}\n` });
  return files;
}
