/**
 * `gapstack figure <design>`: one chart of a design for a proposal — a map, an
 * AM1.5G-versus-ensemble comparison or a sensitivity chart — as SVG, PNG or
 * PDF at a printed size [mm] and font size [pt], dark ink on white or light
 * ink on a dark slide, without building the whole report. The file is written
 * atomically. PDF goes through a headless Chromium (GAPSTACK_CHROMIUM, or
 * `chromium` on PATH) driven by playwright-core; SVG and PNG need no browser.
 */
import { accessSync, constants, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { delimiter, join } from 'node:path';
import { UserError } from '../errors.js';
import { writeFileAtomic } from '../io/atomic-write.js';
import { CAUTION } from '../report/assumptions.js';
import { parseNumber, parseRange } from './options.js';

export interface FigureArgs {
  design: string;
  chart?: string;
  wiring?: string;
  pair?: string;
  output?: string;
  widthMm?: unknown;
  heightMm?: unknown;
  fontPt?: unknown;
  ink?: string;
  dpi?: unknown;
  colourRange?: string;
  /** Which scenario of a file with `scenarios:` (its name or 1-based number). */
  scenario?: string;
  json?: boolean;
}

const KINDS = ['map', 'compare', 'sensitivity'] as const;
const INKS = ['dark-on-white', 'light-on-dark'] as const;

/** A browser for PDF output: GAPSTACK_CHROMIUM, else chromium on PATH. */
function chromiumPath(): string {
  const explicit = process.env.GAPSTACK_CHROMIUM;
  if (explicit) return explicit;
  for (const dir of (process.env.PATH ?? '').split(delimiter)) {
    for (const name of ['chromium', 'chromium-browser']) {
      const p = join(dir, name);
      try {
        if (statSync(p).isFile()) {
          accessSync(p, constants.X_OK);
          return p;
        }
      } catch {
        // not here
      }
    }
  }
  throw new UserError('PDF output needs Chromium (apt-get install chromium, or set GAPSTACK_CHROMIUM); SVG and PNG need no browser');
}

/** A one-page PDF of an SVG at its printed size, from headless Chromium. */
async function svgToPdf(svg: string, widthMm: number, heightMm: number): Promise<Uint8Array> {
  let pw: typeof import('playwright-core');
  try {
    pw = await import('playwright-core');
  } catch {
    throw new UserError('PDF output needs the playwright-core package (npm ci installs it); SVG and PNG do not');
  }
  const profile = mkdtempSync(join(tmpdir(), 'gapstack-figure-'));
  const ctx = await pw.chromium.launchPersistentContext(profile, { executablePath: chromiumPath(), headless: true, args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking'] });
  try {
    const page = await ctx.newPage();
    const w = `${widthMm.toFixed(2)}mm`;
    const h = `${heightMm.toFixed(2)}mm`;
    await page.setContent(`<!DOCTYPE html><html><head><meta charset="utf-8"><style>@page { size: ${w} ${h}; margin: 0 } html, body { margin: 0; padding: 0 } svg { display: block }</style></head><body>${svg}</body></html>`);
    return await page.pdf({ width: w, height: h, printBackground: true, pageRanges: '1' });
  } finally {
    await ctx.close();
    rmSync(profile, { recursive: true, force: true });
  }
}

export async function figureCommand(a: FigureArgs): Promise<string> {
  if (typeof a.design !== 'string' || a.design === '') throw new UserError('name a design file, e.g. gapstack figure examples/perovskite-silicon.yaml --chart map -o map.svg');
  const kind = (a.chart ?? 'map') as (typeof KINDS)[number];
  if (!KINDS.includes(kind)) throw new UserError(`--chart must be one of ${KINDS.join(', ')}, got "${a.chart}"`);
  const ink = (a.ink ?? 'dark-on-white') as (typeof INKS)[number];
  if (!INKS.includes(ink)) throw new UserError(`--ink must be one of ${INKS.join(', ')}, got "${a.ink}"`);
  const output = a.output ?? `${kind}.svg`;
  const format = /\.(svg|png|pdf)$/i.exec(output)?.[1].toLowerCase();
  if (!format) throw new UserError(`-o/--output must end in .svg, .png or .pdf, got "${output}"`);
  let pair: [number, number] | undefined;
  if (a.pair !== undefined) {
    const m = /^\s*(\d+)\s*,\s*(\d+)\s*$/.exec(a.pair);
    if (!m) throw new UserError(`--pair takes two subcells "i,j" (upper first), got "${a.pair}"`);
    pair = [Number(m[1]), Number(m[2])];
  }
  const widthMm = a.widthMm === undefined ? 120 : parseNumber('width-mm', a.widthMm);
  const heightMm = a.heightMm === undefined ? undefined : parseNumber('height-mm', a.heightMm);
  const fontPt = a.fontPt === undefined ? 8 : parseNumber('font-pt', a.fontPt);
  const dpi = a.dpi === undefined ? 300 : parseNumber('dpi', a.dpi);
  if (!(dpi >= 50 && dpi <= 1200)) throw new UserError(`--dpi must be within 50–1200, got ${String(a.dpi)}`);
  let colourRange: { lo: number; hi: number } | undefined;
  if (a.colourRange !== undefined) {
    const [lo, hi] = parseRange('colour-range', a.colourRange);
    if (!(hi > lo)) throw new UserError(`--colour-range takes low:high in percent with high above low, got "${a.colourRange}"`);
    colourRange = { lo, hi };
  }
  const { loadScenarioSet } = await import('../design/index.js');
  const set = await loadScenarioSet(a.design);
  let design = set.scenarios[0];
  if (set.named) {
    const names = set.scenarios.map((d) => d.name);
    const pick = a.scenario === undefined ? -1 : /^\d+$/.test(a.scenario) ? Number(a.scenario) - 1 : names.indexOf(a.scenario);
    if (!(pick >= 0 && pick < names.length)) throw new UserError(`--scenario: ${a.design} holds ${names.length} scenarios; name one (${names.map((n, k) => `${k + 1}: "${n}"`).join(', ')})`);
    design = set.scenarios[pick];
  } else if (a.scenario !== undefined) throw new UserError(`--scenario: ${a.design} holds a single design, not scenarios`);
  const { standaloneFigure } = await import('../report/standalone-figure.js');
  const fig = standaloneFigure(design, { kind, wiring: a.wiring, pair, widthMm, heightMm, fontPt, ink, colourRange });
  const { standaloneSvg, svgToPngWidth } = await import('../report/figures.js');
  const svg = standaloneSvg(fig.svg);
  let bytes: string | Uint8Array;
  if (format === 'svg') bytes = svg;
  else if (format === 'png') bytes = svgToPngWidth(svg, (fig.widthMm / 25.4) * dpi, ink === 'light-on-dark' ? '#1d232b' : '#ffffff');
  else bytes = await svgToPdf(fig.svg, fig.widthMm, fig.heightMm);
  writeFileAtomic(output, bytes);
  const range = fig.colourRange ? `${fig.colourRange.lo.toFixed(1)}–${fig.colourRange.hi.toFixed(1)} %` : null;
  if (a.json) {
    return JSON.stringify(
      { file: output, chart: fig.chart.name, format, width_mm: Number(fig.widthMm.toFixed(2)), height_mm: Number(fig.heightMm.toFixed(2)), font_pt: Number(fig.fontPt.toFixed(2)), ink, colour_range_percent: fig.colourRange, caution: CAUTION },
      null,
      2,
    );
  }
  return [
    `Wrote ${output}: ${fig.chart.name}, ${fig.widthMm.toFixed(1)} × ${fig.heightMm.toFixed(1)} mm, text ${fig.fontPt.toFixed(1)} pt, ${ink}${format === 'png' ? `, ${dpi} dpi` : ''}.`,
    ...(range
      ? [
          `Colour scale ${range}${
            colourRange
              ? ' (as given)'
              : set.named
                ? " (shared by every wiring's map of this pair in this scenario; the report shares one scale across scenarios: pass its range with --colour-range low:high to match it)"
                : " (the report's scale for this pair, shared by every wiring's map; --colour-range low:high sets another)"
          }.`,
        ]
      : []),
    CAUTION,
  ].join('\n');
}
