/**
 * `gapstack figure`: one chart straight from a design file at a printed size
 * and font, SVG / PNG / PDF, dark ink on white or light ink on a dark slide.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { figureCommand } from '../../src/cli/figure-command.js';
import { loadDesign } from '../../src/design/index.js';
import { UserError } from '../../src/errors.js';
import { buildReport } from '../../src/report/build.js';
import { BROWSER_TIMEOUT_MS, findChromium } from '../helpers/chromium.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'gapstack-figure-'));
const SLOW = 120_000;
let design: string;

beforeAll(() => {
  design = join(dir, 'quick.yaml');
  writeFileSync(design, 'name: invented figure check\nspectrum: am1.5g\nsubcells:\n  - label: top\n    range: [1.5, 2.0]\n  - label: bottom\n    gap: 1.12\nwirings: [series, independent]\nmap:\n  step: 0.04\n  pairs:\n    - axes: [1, 2]\n      x: [1.4, 2.1]\n      y: [0.9, 1.3]\n');
});

/** 1 pt = 25.4/72 mm; the charts' base text is 11 user units (src/report/standalone-figure.ts). */
const unitsForWidth = (mm: number, pt: number) => mm / ((pt * 25.4) / 72 / 11);

describe('gapstack figure', () => {
  test('an SVG map at 120 mm and 8 pt: printed size in mm, layout width set by the font', async () => {
    const out = join(dir, 'map.svg');
    const j = JSON.parse(await figureCommand({ design, chart: 'map', wiring: 'independent', output: out, widthMm: '120', fontPt: '8', json: true }));
    expect(j.width_mm).toBeCloseTo(120, 6);
    expect(j.font_pt).toBeCloseTo(8, 6);
    const svg = readFileSync(out, 'utf8');
    expect(svg).toMatch(/^<\?xml/);
    expect(svg).toMatch(/<svg [^>]*width="120\.00mm"/);
    const vb = /viewBox="0 0 ([\d.]+) ([\d.]+)"/.exec(svg);
    expect(Number(vb?.[1])).toBeCloseTo(unitsForWidth(120, 8), 1);
    expect(svg).toContain('id="map-independent-1-2"');
    expect(svg).toContain('data-ink="dark-on-white"');
    expect(j.colour_range_percent.hi).toBeGreaterThan(j.colour_range_percent.lo);
  }, SLOW);

  test("by default a map takes the report's colour scale for its pair (shared by every wiring's map)", async () => {
    const report = buildReport(await loadDesign(design), { date: new Date(0) });
    const inReport = report.charts.find((c) => c.name === 'map-series-1-2')?.svg ?? '';
    const out = join(dir, 'map-default.svg');
    await figureCommand({ design, chart: 'map', wiring: 'series', output: out });
    const svg = readFileSync(out, 'utf8');
    for (const k of ['data-colour-lo', 'data-colour-hi']) {
      const want = new RegExp(`${k}="([\\d.]+)"`).exec(inReport)?.[1];
      expect(want).toBeDefined();
      expect(svg).toContain(`${k}="${want}"`);
    }
  }, SLOW);

  test('a given colour range is used as is, so separate figures share one scale', async () => {
    const out = join(dir, 'map-shared.svg');
    await figureCommand({ design, chart: 'map', wiring: 'series', output: out, colourRange: '30:46' });
    const svg = readFileSync(out, 'utf8');
    expect(svg).toContain('data-colour-lo="30.0000"');
    expect(svg).toContain('data-colour-hi="46.0000"');
  }, SLOW);

  test('a PNG of a light-on-dark sensitivity chart: pixel width = mm / 25.4 × dpi', async () => {
    const out = join(dir, 'sens.png');
    const text = await figureCommand({ design, chart: 'sensitivity', output: out, widthMm: '100', fontPt: '7', ink: 'light-on-dark', dpi: '150' });
    expect(text).toMatch(/light-on-dark, 150 dpi/);
    const png = readFileSync(out);
    expect(png.subarray(12, 16).toString('latin1')).toBe('IHDR');
    expect(png.readUInt32BE(16)).toBe(Math.round((100 / 25.4) * 150));
  }, SLOW);

  test(
    'a one-page PDF at the printed size (Chromium)',
    async () => {
      process.env.GAPSTACK_CHROMIUM ??= (await findChromium()).executablePath;
      const out = join(dir, 'map.pdf');
      await figureCommand({ design, chart: 'map', output: out, widthMm: '90', fontPt: '6' });
      const pdf = readFileSync(out).toString('latin1');
      expect(pdf.startsWith('%PDF-')).toBe(true);
      expect((pdf.match(/\/Type\s*\/Page[^s]/g) ?? []).length).toBe(1);
      // MediaBox in points: 90 mm = 255.1 pt wide.
      const box = /\/MediaBox\s*\[\s*0\s+0\s+([\d.]+)\s+([\d.]+)\s*\]/.exec(pdf);
      expect(Math.abs(Number(box?.[1]) - (90 * 72) / 25.4)).toBeLessThan(1.5);
    },
    BROWSER_TIMEOUT_MS,
  );

  test('mistakes are one-line user errors naming the option', async () => {
    await expect(figureCommand({ design, chart: 'compare', output: join(dir, 'x.svg') })).rejects.toThrow(/--chart compare needs a design whose light is an ensemble/);
    await expect(figureCommand({ design, chart: 'map', wiring: 'vm:1:2', output: join(dir, 'x.svg') })).rejects.toThrow(/--wiring: "vm:1:2" is not among the design's wirings \(series, independent\)/);
    await expect(figureCommand({ design, chart: 'map', output: join(dir, 'x.svg'), widthMm: '40', fontPt: '10' })).rejects.toThrow(/--width-mm: a map at 10 pt needs at least \d+ mm/);
    await expect(figureCommand({ design, chart: 'pie', output: join(dir, 'x.svg') })).rejects.toThrow(UserError);
    await expect(figureCommand({ design, output: join(dir, 'x.gif') })).rejects.toThrow(/must end in \.svg, \.png or \.pdf/);
  }, SLOW);

  test('a file with scenarios needs --scenario, by name or number', async () => {
    const tandems = join(ROOT, 'examples/three-tandems.yaml');
    await expect(figureCommand({ design: tandems, chart: 'sensitivity', output: join(dir, 'x.svg') })).rejects.toThrow(/--scenario: .* holds 3 scenarios; name one \(1: "/);
    const text = await figureCommand({ design: tandems, scenario: 'all-perovskite', chart: 'sensitivity', output: join(dir, 'allpk.svg'), widthMm: '140' });
    expect(text).toMatch(/^Wrote .*allpk\.svg: sensitivity-/);
  }, SLOW);

  test('a comparison straight from the synthetic-year example', async () => {
    const out = join(dir, 'compare.svg');
    const j = JSON.parse(await figureCommand({ design: join(ROOT, 'examples/perovskite-silicon-year.yaml'), chart: 'compare', wiring: 'independent', output: out, widthMm: '170', json: true }));
    expect(j.chart).toBe('compare-independent-1-2');
    expect(j.width_mm).toBeCloseTo(170, 6);
    expect(readFileSync(out, 'utf8')).toContain('class="gs-chart gs-compare"');
  }, SLOW);
});
