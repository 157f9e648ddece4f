/**
 * Standalone figure files: each chart as SVG (with an XML declaration) and as
 * PNG rasterised by resvg at twice the SVG's size, with its data as CSV and
 * JSON.
 */
import { existsSync } from 'node:fs';
import { Resvg, type ResvgRenderOptions } from '@resvg/resvg-js';
import type { Chart } from './build.js';

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

/** Rasterise an SVG to PNG bytes at PNG_SCALE. */
export function svgToPng(svg: string): Uint8Array {
  const r = new Resvg(svg, { fitTo: { mode: 'zoom', value: PNG_SCALE }, background: '#ffffff', font: fontOptions(), logLevel: 'off' });
  return r.render().asPng();
}

export interface FigureFile {
  name: string;
  data: string | Uint8Array;
}

/** Every file of a figures folder for these charts, plus the summary. */
export function figureFiles(charts: Chart[], summary: Record<string, unknown>): FigureFile[] {
  const files: FigureFile[] = [];
  for (const c of charts) {
    const svg = standaloneSvg(c.svg);
    files.push({ name: `${c.name}.svg`, data: svg });
    files.push({ name: `${c.name}.png`, data: svgToPng(svg) });
    files.push({ name: `${c.name}.csv`, data: c.csv });
    files.push({ name: `${c.name}.json`, data: `${JSON.stringify(c.json, null, 2)}\n` });
  }
  files.push({ name: 'summary.json', data: `${JSON.stringify(summary, null, 2)}\n` });
  return files;
}
