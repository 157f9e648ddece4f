/**
 * Standalone figure files: each chart as SVG (with an XML declaration) and as
 * PNG rasterised by resvg at twice the SVG's size, with its data as CSV and
 * JSON.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { Resvg, type ResvgRenderOptions } from '@resvg/resvg-js';
import { chartFontFiles } from './chart-fonts.js';
import type { Chart, FigureMeta } from './figure-data.js';

/** PNG pixels per SVG user unit. */
export const PNG_SCALE = 2;

function fontOptions(): ResvgRenderOptions['font'] {
  const files = chartFontFiles();
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
 * The PNG worker thread, started with the first chart. Its module is the compiled
 * one in dist/report, found the same way from src/, dist/report/ and dist/bundle/.
 */
let worker: { thread: Worker; jobs: Map<number, { resolve: (png: Uint8Array) => void; reject: (e: Error) => void }>; next: number } | null | undefined;

function pngWorker(): NonNullable<typeof worker> | null {
  if (worker !== undefined) return worker;
  const file = fileURLToPath(new URL('../../dist/report/png-worker.js', import.meta.url));
  if (!existsSync(file)) return (worker = null);
  const thread = new Worker(file);
  const w = { thread, jobs: new Map<number, { resolve: (png: Uint8Array) => void; reject: (e: Error) => void }>(), next: 0 };
  thread.on('message', (m: { id: number; png?: Uint8Array; error?: string }) => {
    const job = w.jobs.get(m.id);
    w.jobs.delete(m.id);
    if (w.jobs.size === 0) thread.unref();
    if (m.png) job?.resolve(m.png);
    else job?.reject(new Error(m.error ?? 'the PNG worker gave no image'));
  });
  thread.on('error', (e) => {
    for (const job of w.jobs.values()) job.reject(e);
    w.jobs.clear();
    thread.unref();
  });
  // The worker keeps the process alive only while it has work (startPng refs it).
  thread.unref();
  return (worker = w);
}

/** Start the PNG worker thread now, so its start-up overlaps the report's computing. */
export function preparePngWorker(): void {
  pngWorker();
}

/**
 * Start rasterising a chart's SVG (standalone, at PNG_SCALE) on the PNG worker
 * thread while the main thread goes on drawing the next chart; figureFilesAsync
 * collects it. Without the compiled worker it is rendered when collected.
 */
export function startPng(svg: string): void {
  if (pending.has(svg)) return;
  const w = pngWorker();
  if (!w) return;
  const id = w.next++;
  const job = new Promise<Uint8Array>((resolve, reject) => w.jobs.set(id, { resolve, reject }));
  // A render that fails is reported where it is awaited, not as an unhandled rejection.
  job.catch(() => undefined);
  pending.set(svg, job);
  w.thread.ref();
  w.thread.postMessage({ id, svg: standaloneSvg(svg) });
}

/** The PNG of a chart's SVG: the worker's when it was started, else rendered here. */
async function takePng(svg: string): Promise<Uint8Array> {
  const job = pending.get(svg);
  pending.delete(svg);
  return job ? new Uint8Array(await job) : svgToPng(standaloneSvg(svg));
}

/** resvg's options for a figure's PNG: PNG_SCALE, white background, the chart font. */
export function pngRenderOptions(): ResvgRenderOptions {
  return { fitTo: { mode: 'zoom', value: PNG_SCALE }, background: '#ffffff', font: fontOptions(), logLevel: 'off' };
}

/** Rasterise an SVG to PNG bytes at PNG_SCALE. */
export function svgToPng(svg: string): Uint8Array {
  const r = new Resvg(svg, pngRenderOptions());
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
 * each), plus the summary. The PNGs render on the worker thread, those that
 * startPng began while the charts were drawn already under way.
 */
export async function figureFilesAsync(charts: Chart[], summary: Record<string, unknown>): Promise<FigureFile[]> {
  for (const c of charts) startPng(c.svg);
  const pngs: Uint8Array[] = [];
  for (const c of charts) pngs.push(await takePng(c.svg));
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
