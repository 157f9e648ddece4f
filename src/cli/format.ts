/** Plain-text tables for the terminal. */
import { engineering } from '../report/numbers.js';

export function table(headers: string[], rows: (string | number)[][]): string {
  const cells = [headers, ...rows.map((r) => r.map((c) => String(c)))];
  const widths = headers.map((_, k) => Math.max(...cells.map((r) => (r[k] ?? '').length)));
  const line = (r: string[]) => r.map((c, k) => (k === 0 ? c.padEnd(widths[k]) : c.padStart(widths[k]))).join('  ');
  return [line(cells[0]), widths.map((w) => '-'.repeat(w)).join('  '), ...cells.slice(1).map(line)].join('\n');
}

export const pct = (fraction: number, digits = 2) => `${(fraction * 100).toFixed(digits)} %`;
export const fix = (x: number | null | undefined, digits: number) => {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  const s = x.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
};

/** Fixed decimals below 1e5, engineering notation above (see report/numbers.ts). */
export const eng = engineering;

/** Round for JSON output without losing meaningful digits. */
export function round(x: number, sig = 10): number {
  return Number.isFinite(x) ? Number(x.toPrecision(sig)) : x;
}
