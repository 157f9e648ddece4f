/**
 * The report command end to end (without a browser): the example report and
 * its figures, escaping of user text, atomic outputs, PNG export and
 * determinism apart from the date line.
 */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeAll, describe, expect, test } from 'vitest';
import { reportCommand, reportDate } from '../../src/cli/report-command.js';
import { UserError } from '../../src/errors.js';
import { CAUTION } from '../../src/report/assumptions.js';
import { PNG_SCALE } from '../../src/report/figures.js';
import { runCli } from '../helpers/cli.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const EXAMPLE = join(ROOT, 'examples/perovskite-silicon.yaml');
const dir = mkdtempSync(join(tmpdir(), 'gapstack-report-'));
const savedEpoch = process.env.SOURCE_DATE_EPOCH;

afterEach(() => {
  if (savedEpoch === undefined) delete process.env.SOURCE_DATE_EPOCH;
  else process.env.SOURCE_DATE_EPOCH = savedEpoch;
});

/** A small, quick design (one fixed gap, coarse map) with the given header lines. */
function quickDesign(name: string, header: string): string {
  const p = join(dir, name);
  writeFileSync(p, `${header}\nsubcells:\n  - label: top\n    range: [1.5, 2.0]\n  - label: bottom\n    gap: 1.12\nwirings: [series]\nmap:\n  step: 0.02\n  pairs:\n    - axes: [1, 2]\n      x: [1.4, 2.1]\n      y: [0.9, 1.3]\n`);
  return p;
}

describe('the example report', () => {
  const out = join(dir, 'example', 'report.html');
  const figures = join(dir, 'example', 'figures');
  let summary: any;
  let html: string;

  beforeAll(async () => {
    summary = JSON.parse(await reportCommand({ design: EXAMPLE, output: out, figures, json: true }));
    html = readFileSync(out, 'utf8');
  });

  /** The page with handlebars' entity escapes undone, for reading text. */
  const plain = () => html.replace(/&#x3D;/g, '=').replace(/&quot;/g, '"').replace(/&#x27;/g, "'").replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');


  test('answers up front: 2T matches silicon at ≈1.73 eV (docs/PHYSICS.md §5: 45.04 %), 4T runs to the perovskite window edge', () => {
    const series = summary.wirings.find((w: any) => w.wiring === 'series');
    const four = summary.wirings.find((w: any) => w.wiring === 'independent');
    expect(series.efficiency).toBeCloseTo(0.4504, 3);
    expect(series.gaps_ev[0]).toBeCloseTo(1.729, 2);
    expect(series.gaps_ev[1]).toBeCloseTo(1.12, 6);
    expect(four.gaps_ev[0]).toBeCloseTo(1.8, 3);
    expect(series.compositions[0].family).toBe('perovskite-i-br');
    expect(series.tolerance[0].low_ev).toBeCloseTo(1.7101, 2);
    expect(series.tolerance[0].high_ev).toBeCloseTo(1.752, 2);
    const page = plain();
    const answer = page.slice(page.indexOf('<section class="answer-section">'), page.indexOf('<section class="maps">'));
    for (const text of ['Series (2T, current-matched)', 'Independent (4T)', '45.04 %', '1.729 eV', 'x = 0.3', 'Jsc', 'Voc', 'FF', '1.710–1.752 eV']) expect(answer).toContain(text);
  });

  test('is one self-contained file: inline CSS and SVG, no external resource, print rules for A4', () => {
    expect(html).toMatch(/<style>[\s\S]*@page \{ size: A4;/);
    expect(html).toMatch(/@media print/);
    expect(html).toMatch(/page-break-inside: avoid/);
    expect(html).not.toMatch(/<link\b|\ssrc=|@import|url\((?!#)/i);
    expect(html).not.toMatch(/https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
    expect((html.match(/<svg\b/g) ?? []).length).toBe(2 + 3 * 2);
  });

  test('the map has filled contours, isolines, the tolerance outline, the matching locus, windows, the fixed absorber and the optimum marker', () => {
    const start = html.search(/<svg [^>]*id="map-series-1-2"/);
    expect(start).toBeGreaterThan(0);
    const map = html.slice(start, html.indexOf('</svg>', start));
    expect((map.match(/class="gs-band"/g) ?? []).length).toBeGreaterThan(10);
    expect((map.match(/class="gs-isoline"/g) ?? []).length).toBeGreaterThan(3);
    expect((map.match(/class="gs-isolabel/g) ?? []).length).toBeGreaterThan(3);
    expect(map).toContain('class="gs-tolerance"');
    expect(map).toContain('class="gs-matching"');
    expect(map).toContain('class="gs-window"');
    expect(map).toMatch(/class="gs-fixed" data-gap="1\.1200"/);
    const marker = /<g class="gs-optimum" id="optimum-map-series-1-2" data-gap-x="([\d.]+)" data-gap-y="([\d.]+)" data-efficiency="([\d.]+)"/.exec(map);
    expect(marker).not.toBeNull();
    const best = summary.wirings[0];
    expect(Number(marker?.[1])).toBeCloseTo(best.gaps_ev[0], 5);
    expect(Number(marker?.[2])).toBeCloseTo(best.gaps_ev[1], 5);
    expect(Number(marker?.[3])).toBeCloseTo(best.efficiency, 7);
  });

  test('states its assumptions, provenance and the caution', () => {
    const version = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')).version;
    const page = plain();
    expect(page).toContain(`Tool: gapstack ${version}.`);
    expect(page).toMatch(/Spectrum: AM1\.5G \(ASTM G173-03 global tilt\); integral P_in = 1000\.37 W\/m²/);
    expect(page).toMatch(/SHA-256 [0-9a-f]{64}/);
    expect(page).toContain('Cell temperature: 300 K');
    expect(page).toContain('Emission: radiative emission through the front surface only');
    expect(page).toContain('ERE: 1 for every subcell');
    expect(page).toContain('Coupling: isolated subcells');
    expect(page).toMatch(/Map of subcells 1 and 2: 10\.0 meV grid/);
    expect(page).toMatch(/Generated \d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z/);
    expect(html.split(CAUTION).length - 1).toBe(2);
    expect(summary.caution).toBe(CAUTION);
  });

  test('figures: SVG, PNG, CSV and JSON of every chart, plus a summary', () => {
    const names = readdirSync(figures).sort();
    const stems = ['map-series-1-2', 'map-independent-1-2', 'spectrum-series', 'jv-series', 'sensitivity-series', 'spectrum-independent', 'jv-independent', 'sensitivity-independent'];
    for (const s of stems) for (const ext of ['svg', 'png', 'csv', 'json']) expect(names).toContain(`${s}.${ext}`);
    expect(names).toContain('summary.json');
    expect(names.some((n) => n.endsWith('.tmp'))).toBe(false);
    const csv = readFileSync(join(figures, 'map-series-1-2.csv'), 'utf8').split('\n').filter((l) => !l.startsWith('#'));
    expect(csv[0]).toBe('gap1_ev,gap2_ev,efficiency_percent');
    const json = JSON.parse(readFileSync(join(figures, 'map-series-1-2.json'), 'utf8'));
    expect(json.optimum.x_ev).toBeCloseTo(summary.wirings[0].gaps_ev[0], 5);
    expect(json.caution).toBe(CAUTION);
    expect(readFileSync(join(figures, 'map-series-1-2.svg'), 'utf8')).toMatch(/^<\?xml version="1\.0" encoding="UTF-8"\?>\n<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
  });

  test('PNG export opens: PNG signature, IHDR width and height = SVG size × PNG_SCALE', () => {
    for (const stem of ['map-series-1-2', 'spectrum-series', 'jv-independent']) {
      const png = readFileSync(join(figures, `${stem}.png`));
      expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
      expect(png.subarray(12, 16).toString('latin1')).toBe('IHDR');
      const svg = readFileSync(join(figures, `${stem}.svg`), 'utf8');
      const w = Number(/<svg[^>]* width="(\d+)"/.exec(svg)?.[1]);
      const h = Number(/<svg[^>]* height="(\d+)"/.exec(svg)?.[1]);
      expect(w).toBeGreaterThan(100);
      expect(png.readUInt32BE(16)).toBe(w * PNG_SCALE);
      expect(png.readUInt32BE(20)).toBe(h * PNG_SCALE);
    }
  });
});

describe('more subcells, other light', () => {
  test('3 subcells: a profile map over a chosen pair maximises the free subcell at every point', async () => {
    const p = join(dir, 'three.yaml');
    writeFileSync(
      p,
      `name: three\nsubcells:\n  - label: top\n    range: [1.8, 2.1]\n  - label: middle\n    range: [1.2, 1.5]\n  - label: bottom\n    material: ge\nwirings: [series]\nsearch:\n  step: 0.02\nmap:\n  step: 0.05\n  pairs:\n    - axes: [2, 3]\n      x: [1.2, 1.5]\n      y: [0.55, 0.8]\n`,
    );
    const figures = join(dir, 'three', 'figures');
    const s = JSON.parse(await reportCommand({ design: p, output: join(dir, 'three', 'report.html'), figures, json: true }));
    expect(s.wirings[0].gaps_ev).toHaveLength(3);
    const map = JSON.parse(readFileSync(join(figures, 'map-series-2-3.json'), 'utf8'));
    expect(map.profile_subcells).toEqual([1]);
    expect(map.optimum.x_ev).toBeCloseTo(s.wirings[0].gaps_ev[1], 5);
    // A profile is the maximum over the free gap: at the optimum's pixel it is at least the optimum.
    const ix = map.x_ev.findIndex((x: number) => Math.abs(x - 1.35) < 1e-9);
    const iy = map.y_ev.findIndex((y: number) => Math.abs(y - 0.65) < 1e-9);
    expect(map.efficiency_percent[iy][ix]).toBeGreaterThan(40);
    const csv = readFileSync(join(figures, 'map-series-2-3.csv'), 'utf8');
    expect(csv.split('\n').filter((l) => !l.startsWith('#'))[0]).toBe('gap2_ev,gap3_ev,gap1_ev_profile,efficiency_percent');
    const html = readFileSync(join(dir, 'three', 'report.html'), 'utf8');
    expect(html).toContain('re-optimised at every point (a profile map)');
  });

  test('an ensemble: the yield-weighted efficiency, the ensemble in the provenance', async () => {
    // Text in memory, anchored in examples/ so the manifest path resolves; no file is written there.
    const p = join(ROOT, 'examples', 'in-memory-ensemble-check.yaml');
    const text = `name: ensemble\nensemble: ensemble-demo/manifest.yaml\nsubcells:\n  - range: [1.6, 1.9]\n  - gap: 1.12\nwirings: [series]\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 2]\n      x: [1.5, 2.0]\n      y: [0.9, 1.3]\n`;
    const { loadDesignText } = await import('../../src/design/index.js');
    const { buildReport } = await import('../../src/report/build.js');
    const built = buildReport(await loadDesignText(p, text), { date: new Date(0) });
    const html = built.html.replace(/&#x3D;/g, '=');
    expect(html).toContain('yield-weighted η');
    expect(html).toMatch(/Spectral ensemble: synthetic-demo-year; SHA-256 [0-9a-f]{64}; source: YAML manifest ensemble-demo\/manifest\.yaml/);
    expect(html).toContain('Σ w·P_max / Σ w·P_in');
    expect((built.summary as any).objective).toBe('yield-weighted efficiency');
  });
});

describe('user text is escaped everywhere', () => {
  test('a design name, description and labels holding markup appear literally', async () => {
    const p = join(dir, 'evil.yaml');
    const evil = '<script>alert("gotcha")</script> & co';
    writeFileSync(
      p,
      `name: '${evil}'\ndescription: '<img src=x onerror=alert(1)>'\nsubcells:\n  - label: '<b>top</b>'\n    range: [1.5, 2.0]\n  - label: "bottom \\u00a0 \\u0001 </text>"\n    gap: 1.12\nwirings: [series]\nmap:\n  step: 0.02\n  pairs:\n    - axes: [1, 2]\n      x: [1.4, 2.1]\n      y: [0.9, 1.3]\n`,
    );
    const out = join(dir, 'evil', 'report.html');
    const figures = join(dir, 'evil', 'figures');
    await reportCommand({ design: p, output: out, figures });
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('&lt;script&gt;alert(&quot;gotcha&quot;)&lt;/script&gt; &amp; co');
    expect(html).toContain('&lt;img src&#x3D;x onerror&#x3D;alert(1)&gt;');
    expect(html).not.toContain('<script>alert');
    expect(html).not.toContain('<img');
    expect(html).not.toContain('<b>top</b>');
    expect(html).toContain('&lt;b&gt;top&lt;/b&gt;');
    // The only scripts: the hover readout and one JSON grid per map.
    expect((html.match(/<script\b/g) ?? []).length).toBe(2);
    const svg = readFileSync(join(figures, 'spectrum-series.svg'), 'utf8');
    expect(svg).toContain('&lt;b&gt;top&lt;/b&gt;');
    expect(svg).toContain('&lt;/text&gt;');
    expect(svg).not.toContain('&nbsp;');
    expect(svg).not.toContain('\u0001');
  });
});

describe('a failing report leaves existing outputs untouched', () => {
  const setup = (tag: string) => {
    const d = join(dir, `keep-${tag}`);
    mkdirSync(join(d, 'figures'), { recursive: true });
    const out = join(d, 'report.html');
    const fig = join(d, 'figures', 'map-series-1-2.svg');
    writeFileSync(out, 'previous report, byte for byte\n');
    writeFileSync(fig, 'previous figure\n');
    return { d, out, fig };
  };
  const unchanged = (p: { d: string; out: string; fig: string }) => {
    expect(readFileSync(p.out, 'utf8')).toBe('previous report, byte for byte\n');
    expect(readFileSync(p.fig, 'utf8')).toBe('previous figure\n');
    expect(readdirSync(p.d).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  };

  test('an invalid design', async () => {
    const p = setup('invalid');
    const bad = join(dir, 'bad.yaml');
    writeFileSync(bad, 'name: bad\nsubcells:\n  - gap: 1.12\n  - gap: 1.5\n');
    await expect(reportCommand({ design: bad, output: p.out, figures: join(p.d, 'figures') })).rejects.toThrow(UserError);
    unchanged(p);
  });

  test('a design file that does not exist', async () => {
    const p = setup('missing');
    await expect(reportCommand({ design: join(dir, 'nope.yaml'), output: p.out, figures: join(p.d, 'figures') })).rejects.toThrow(/cannot (read|open) (the )?design file/);
    unchanged(p);
  });

  test('a figures path that is a file, not a folder: nothing is written, not even the page', async () => {
    const p = setup('figfile');
    const notDir = join(p.d, 'not-a-folder');
    writeFileSync(notDir, 'x');
    await expect(reportCommand({ design: quickDesign('quick-a.yaml', 'name: quick'), output: p.out, figures: notDir })).rejects.toThrow(/--figures/);
    unchanged(p);
  });
});

describe('determinism', () => {
  test('the same design twice: byte-identical apart from the one "Generated" line', async () => {
    const design = quickDesign('twice.yaml', 'name: twice');
    process.env.SOURCE_DATE_EPOCH = '1700000000';
    await reportCommand({ design, output: join(dir, 'twice', 'a.html'), figures: join(dir, 'twice', 'fa') });
    process.env.SOURCE_DATE_EPOCH = '1800000000';
    await reportCommand({ design, output: join(dir, 'twice', 'b.html'), figures: join(dir, 'twice', 'fb') });
    const a = readFileSync(join(dir, 'twice', 'a.html'), 'utf8').split('\n');
    const b = readFileSync(join(dir, 'twice', 'b.html'), 'utf8').split('\n');
    expect(a.length).toBe(b.length);
    const differ = a.map((l, i) => (l === b[i] ? -1 : i)).filter((i) => i >= 0);
    expect(differ.length).toBe(1);
    expect(a[differ[0]]).toContain('Generated 2023-11-14T22:13:20.000Z');
    expect(b[differ[0]]).toContain('Generated 2027-01-15T08:00:00.000Z');
    for (const f of readdirSync(join(dir, 'twice', 'fa'))) {
      if (f === 'summary.json') continue;
      expect(readFileSync(join(dir, 'twice', 'fb', f)).equals(readFileSync(join(dir, 'twice', 'fa', f))), f).toBe(true);
    }
  });

  test('SOURCE_DATE_EPOCH sets the date; garbage is an error', () => {
    expect(reportDate({ SOURCE_DATE_EPOCH: '0' }).toISOString()).toBe('1970-01-01T00:00:00.000Z');
    expect(() => reportDate({ SOURCE_DATE_EPOCH: 'soon' })).toThrow(UserError);
  });

  test('the output must be an .html file', async () => {
    await expect(reportCommand({ design: EXAMPLE, output: join(dir, 'x.pdf') })).rejects.toThrow(/must end in \.html/);
    expect(existsSync(join(dir, 'x.pdf'))).toBe(false);
  });
});


describe('gapstack report on the command line', () => {
  test('writes the page and figures, exit 0', () => {
    const out = join(dir, 'cli', 'report.html');
    const r = runCli(['report', quickDesign('cli.yaml', 'name: cli'), '-o', out, '--figures', join(dir, 'cli', 'figures')]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Wrote .*report\.html/);
    expect(readFileSync(out, 'utf8')).toContain('<h1>cli</h1>');
    expect(existsSync(join(dir, 'cli', 'figures', 'map-series-1-2.png'))).toBe(true);
  });

  test('an invalid design exits 2 with the field and line, leaving the old page', () => {
    const out = join(dir, 'cli-bad', 'report.html');
    mkdirSync(join(dir, 'cli-bad'), { recursive: true });
    writeFileSync(out, 'old');
    const bad = join(dir, 'cli-bad', 'bad.yaml');
    writeFileSync(bad, 'name: bad\nsubcells:\n  - gap: 1.12\n    tint: blue\n');
    const r = runCli(['report', bad, '-o', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.yaml:4: subcells\[0\]\.tint: unknown key "tint"/);
    expect(readFileSync(out, 'utf8')).toBe('old');
  });
});
