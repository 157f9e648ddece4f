/**
 * A design under a spectral ensemble: the report's "Your spectra versus
 * AM1.5G" section. Its numbers are checked against direct design searches
 * under AM1.5G and under the ensemble, its charts against the ensemble's
 * summary, and its figures folder for the new charts.
 */
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { reportCommand } from '../../src/cli/report-command.js';
import { loadDesign, loadDesignText, type Design } from '../../src/design/index.js';
import { ensembleSummary, loadEnsemble } from '../../src/light/ensemble.js';
import { am15g } from '../../src/light/sources.js';
import { CAUTION } from '../../src/report/assumptions.js';
import { buildReport } from '../../src/report/build.js';
import { runDesignSearch } from '../../src/search/design-search.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const EXAMPLE = join(ROOT, 'examples/perovskite-silicon-year.yaml');
const dir = mkdtempSync(join(tmpdir(), 'gapstack-ensemble-report-'));

/** Handlebars' entity escapes undone, for reading text. */
const plain = (html: string) => html.replace(/&#x3D;/g, '=').replace(/&quot;/g, '"').replace(/&#x27;/g, "'").replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');

/** The markup of the element starting at the first match of `open` up to its closing tag `close`. */
function slice(html: string, open: RegExp, close: string): string {
  const start = html.search(open);
  expect(start, String(open)).toBeGreaterThanOrEqual(0);
  return html.slice(start, html.indexOf(close, start) + close.length);
}

function searchesOf(design: Design, key: string) {
  const w = design.wirings.find((x) => x.key === key);
  if (!w) throw new Error(`no wiring ${key}`);
  const base = { template: w.template, constraints: design.subcells.map((s) => s.constraint), spanEv: design.spanEv, stepEv: design.searchStepEv, loss: design.loss };
  const reference = runDesignSearch({ ...base, spectra: [{ spectrum: am15g(), weight: 1, tempK: w.template.tempK }] });
  const ensemble = runDesignSearch({ ...base, spectra: design.spectra });
  return { reference, ensemble };
}

describe('the synthetic-year example: your spectra versus AM1.5G', () => {
  const out = join(dir, 'year', 'report.html');
  const figures = join(dir, 'year', 'figures');
  let summary: any;
  let html: string;
  let section: string;
  let design: Design;

  beforeAll(async () => {
    summary = JSON.parse(await reportCommand({ design: EXAMPLE, output: out, figures, json: true }));
    html = readFileSync(out, 'utf8');
    section = slice(html, /<section class="compare" id="versus-am15g">/, '</section>');
    design = await loadDesign(EXAMPLE);
  }, 60_000);


  test('has the section, after the maps and before the per-wiring detail, with the caution', () => {
    expect(section).toContain('<h2>Your spectra versus AM1.5G</h2>');
    expect(html.indexOf('id="versus-am15g"')).toBeGreaterThan(html.indexOf('<section class="maps">'));
    expect(html.indexOf('id="versus-am15g"')).toBeLessThan(html.indexOf('<section class="wiring"'));
    expect(section).toContain(CAUTION);
  });

  test('names the ensemble and its source, and says it is synthetic demo data', () => {
    const text = plain(section);
    expect(text).toContain('Ensemble: <strong>synthetic-demo-year</strong>');
    expect(text).toContain('Source: YAML manifest ensemble-demo/manifest.yaml (16 spectra, weights in hours)');
    expect(text).toMatch(/id="synthetic-note"><strong>SYNTHETIC DEMO DATA\.<\/strong>[^<]*not measurements of any site/);
    expect(summary.am15g_comparison.synthetic).toBe(true);
  });

  test('two maps per wiring, each with contour paths, its own optimum and the other light\'s, on one colour scale', () => {
    for (const slug of ['series', 'independent']) {
      const svg = slice(section, new RegExp(`<svg [^>]*id="compare-${slug}-1-2"`), '</svg>');
      const panels = svg.split('class="gs-compare-panel"').slice(1);
      expect(panels).toHaveLength(2);
      expect(/<g [^>]*class="gs-compare-panel" data-light="am1\.5g"[\s\S]*<g [^>]*class="gs-compare-panel" data-light="ensemble"/.test(svg)).toBe(true);
      for (const p of panels) {
        expect((p.match(/class="gs-band"/g) ?? []).length).toBeGreaterThan(10);
        expect((p.match(/class="gs-isoline"/g) ?? []).length).toBeGreaterThan(2);
        expect(p).toContain('class="gs-tolerance"');
        expect((p.match(/class="gs-optimum"/g) ?? []).length).toBe(1);
        expect((p.match(/class="gs-optimum-other"/g) ?? []).length).toBe(1);
      }
      // One colour scale: the band levels of both panels come from the same list.
      const levels = (p: string) => [...p.matchAll(/class="gs-band" data-level="([\d.]+)" fill="(#[0-9a-f]{6})"/g)].map((m) => `${m[1]}=${m[2]}`);
      const a = new Set(levels(panels[0]));
      const b = levels(panels[1]);
      expect(b.filter((x) => a.has(x)).length).toBeGreaterThan(5);
      for (const l of b) {
        const [lv, colour] = l.split('=');
        for (const k of a) if (k.startsWith(`${lv}=`)) expect(k).toBe(`${lv}=${colour}`);
      }
      // One colour scale across the wirings too: it reaches the highest value of every wiring's two panels of this pair.
      const jsons = ['series', 'independent'].map((w) => JSON.parse(readFileSync(join(figures, `compare-${w}-1-2.json`), 'utf8')));
      const json = jsons[slug === 'series' ? 0 : 1];
      const max = (g: (number | null)[][]) => Math.max(...g.flat().filter((v): v is number => v !== null));
      expect(json.colour_range_percent.high).toBeCloseTo(Math.max(...jsons.flatMap((j) => [max(j.efficiency_am15g_percent), max(j.yield_efficiency_percent)])), 4);
      expect(json.colour_range_percent).toEqual(jsons[0].colour_range_percent);
      expect(Number(/data-colour-hi="([\d.]+)"/.exec(svg)?.[1])).toBeCloseTo(json.colour_range_percent.high, 3);
    }
  });

  test('the shift table equals direct design searches under AM1.5G and under the ensemble (1e-6)', () => {
    for (const key of ['series', 'independent']) {
      const { reference, ensemble } = searchesOf(design, key);
      const c = summary.am15g_comparison.wirings.find((w: any) => w.wiring === key);
      const refGaps = reference.result.best.gapsEv;
      const ensGaps = ensemble.result.best.gapsEv;
      refGaps.forEach((g, i) => expect(Math.abs(c.am15g_optimum.gaps_ev[i] - g)).toBeLessThan(1e-6));
      ensGaps.forEach((g, i) => expect(Math.abs(c.ensemble_optimum.gaps_ev[i] - g)).toBeLessThan(1e-6));
      expect(Math.abs(c.am15g_optimum.am15g_efficiency - reference.result.best.value)).toBeLessThan(1e-6);
      expect(Math.abs(c.am15g_optimum.yield_efficiency - ensemble.objective.value(refGaps))).toBeLessThan(1e-6);
      expect(Math.abs(c.ensemble_optimum.yield_efficiency - ensemble.result.best.value)).toBeLessThan(1e-6);
      expect(Math.abs(c.ensemble_optimum.am15g_efficiency - reference.objective.value(ensGaps))).toBeLessThan(1e-6);
      ensGaps.forEach((g, i) => expect(Math.abs(c.gap_shift_mev[i] - (g - refGaps[i]) * 1000)).toBeLessThan(1e-3));
      const lossAbs = ensemble.result.best.value - ensemble.objective.value(refGaps);
      expect(Math.abs(c.loss_abs - lossAbs)).toBeLessThan(1e-6);
      expect(Math.abs(c.loss_rel - lossAbs / ensemble.result.best.value)).toBeLessThan(1e-6);
      // The page's table shows the same numbers, rounded.
      const table = plain(slice(section, new RegExp(`<table class="detail shift" id="shift-${key}">`), '</table>'));
      const row = (label: string) => [...(new RegExp(`<tr[^>]*><td>${label}</td>(.*?)</tr>`).exec(table)?.[1] ?? '').matchAll(/<td>(.*?)<\/td>/g)].map((m) => m[1]);
      expect(row('AM1.5G optimum')).toEqual([...refGaps.map((g) => g.toFixed(4)), `${(reference.result.best.value * 100).toFixed(3)} %`, `${(ensemble.objective.value(refGaps) * 100).toFixed(3)} %`]);
      expect(row('ensemble optimum')).toEqual([...ensGaps.map((g) => g.toFixed(4)), `${(reference.objective.value(ensGaps) * 100).toFixed(3)} %`, `${(ensemble.result.best.value * 100).toFixed(3)} %`]);
      const shift = row('shift, ensemble − AM1.5G');
      ensGaps.forEach((g, i) => expect(shift[i]).toMatch(new RegExp(`^[+-]?${Math.abs((g - refGaps[i]) * 1000).toFixed(1).replace('.', '\\.')} meV$`)));
    }
  });

  test('says what the AM1.5G design loses, and compares 2T with 4T only as the numbers show', () => {
    const text = plain(section);
    const c = summary.am15g_comparison.wirings;
    const two = c.find((w: any) => w.wiring === 'series');
    const four = c.find((w: any) => w.wiring === 'independent');
    expect(text).toContain('Series (2T) stacks usually lose more than independent (4T) ones');
    expect(text).toContain('match drifts');
    // Differences below 0.01 percentage points are not narrated as differences (issue 14).
    const d = (two.loss_abs - four.loss_abs) * 100;
    const verdict = Math.abs(d) < 0.01 ? 'no difference at this resolution (0.01 percentage points)' : d > 0 ? 'the 2T stack loses more' : 'the 4T stack loses more';
    expect(text).toContain(verdict);
    expect(text).toContain(`${(two.loss_abs * 100).toFixed(3)} percentage points (${(two.loss_rel * 100).toFixed(3)} % relative)`);
    expect(two.current_mismatch.ensemble_max).toBeGreaterThan(two.current_mismatch.am15g);
    expect(four.current_mismatch).toBeNull();
  });

  test('the APE histogram has one bar per bin of the ensemble summary, and the light is summarised', () => {
    const e = loadEnsemble(join(ROOT, 'examples/ensemble-demo/manifest.yaml'), { defaultTempK: 300 });
    const s = ensembleSummary(e, undefined, { lowestGapEv: design.spanEv[0] });
    const svg = slice(section, /<svg [^>]*id="ape-histogram"/, '</svg>');
    const bars = [...svg.matchAll(/class="gs-ape-bar" data-lo="([\d.]+)" data-hi="([\d.]+)" data-weight="([\d.]+)"/g)];
    expect(bars.length).toBe(s.ape.histogram.weights.length);
    expect(bars.length).toBeGreaterThan(3);
    bars.forEach((b, k) => {
      expect(Number(b[1])).toBeCloseTo(s.ape.histogram.edgesEv[k], 6);
      expect(Number(b[3])).toBeCloseTo(s.ape.histogram.weights[k], 4);
    });
    expect(svg).toContain('class="gs-ape-mean"');
    expect(svg).toContain('class="gs-ape-reference"');
    const table = plain(slice(section, /<table class="detail light-summary">/, '</table>'));
    expect(table).toContain(`<td>irradiance, weighted median [W/m²]</td><td>${s.irradianceWm2.median.toFixed(1)}</td>`);
    expect(table).toContain(`<td>irradiance, weighted mean [W/m²]</td><td>${s.weightedMeanIrradianceWm2.toFixed(1)}</td>`);
    expect(table).toContain(`${(s.ape.weightedMeanEv as number).toFixed(4)} weighted mean`);
  });

  test('the figures folder holds the new charts as SVG, PNG, CSV and JSON', () => {
    const names = readdirSync(figures);
    for (const stem of ['compare-series-1-2', 'compare-independent-1-2', 'ape-histogram']) for (const ext of ['svg', 'png', 'csv', 'json']) expect(names).toContain(`${stem}.${ext}`);
    const png = readFileSync(join(figures, 'compare-series-1-2.png'));
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const csv = readFileSync(join(figures, 'compare-series-1-2.csv'), 'utf8').split('\n');
    expect(csv.some((l) => /^# .*not device predictions/.test(l))).toBe(true);
    expect(csv.filter((l) => !l.startsWith('#'))[0]).toBe('gap1_ev,gap2_ev,efficiency_am15g_percent,yield_efficiency_percent');
    const ape = readFileSync(join(figures, 'ape-histogram.csv'), 'utf8').trim().split('\n').filter((l) => !l.startsWith('#'));
    expect(ape[0]).toBe('ape_low_ev,ape_high_ev,weight,share_of_total_weight');
    const apeJson = JSON.parse(readFileSync(join(figures, 'ape-histogram.json'), 'utf8'));
    expect(ape.length - 1).toBe(apeJson.weights.length);
    expect(apeJson.caution).toBe(CAUTION);
    expect(JSON.parse(readFileSync(join(figures, 'compare-series-1-2.json'), 'utf8')).caution).toBe(CAUTION);
    expect(readFileSync(join(figures, 'ape-histogram.svg'), 'utf8')).toMatch(/^<\?xml version="1\.0" encoding="UTF-8"\?>\n<svg /);
  });
});

describe('other ensembles and no ensemble', () => {
  const spectra = join(ROOT, 'examples/ensemble-demo/spectra');
  const quick = (ensemble: string) =>
    `name: quick\nensemble: ${ensemble}\nsubcells:\n  - range: [1.6, 1.9]\n  - gap: 1.12\nwirings: [series]\nsearch:\n  step: 0.02\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 2]\n      x: [1.5, 2.0]\n      y: [0.9, 1.3]\n`;

  test("a user's ensemble without a synthetic name: no demo note, the user's-data note; deterministic apart from the date", async () => {
    const manifest = join(dir, 'rooftop.yaml');
    writeFileSync(
      manifest,
      `name: rooftop-measurements\nweight_unit: hours\nspectra:\n  - file: ${join(spectra, '05-spring-clear-midday.tsv')}\n    weight: 30\n    temp_k: 310\n  - file: ${join(spectra, '04-winter-overcast.tsv')}\n    weight: 20\n    temp_k: 285\n  - file: ${join(spectra, '09-summer-clear-midday.tsv')}\n    weight: 40\n    temp_k: 320\n`,
    );
    const design = await loadDesignText(join(dir, 'rooftop-design.yaml'), quick(manifest));
    const a = buildReport(design, { date: new Date(0) });
    const b = buildReport(design, { date: new Date(86_400_000) });
    const section = slice(a.html, /<section class="compare"/, '</section>');
    expect(plain(section)).toContain('Ensemble: <strong>rooftop-measurements</strong>');
    expect(section).not.toContain('SYNTHETIC DEMO DATA');
    expect(section).toContain('These are your spectra as supplied');
    expect(section).toContain('This design does not compare 2T with 4T.');
    expect((a.summary as any).am15g_comparison.synthetic).toBe(false);
    // Each member is solved at its own cell temperature; the gaps are not shifted per member.
    const text = plain(a.html);
    expect(text).toContain('each spectrum at its own cell temperature (285–320 K) and the gaps held at their 300 K design values');
    expect(text).toMatch(/Cell temperature: each spectrum is solved at its own cell temperature \(285–320 K\);[^<]*no dE_g\/dT shift per spectrum/);
    expect(text).not.toContain('the detailed-balance convention');
    const la = a.html.split('\n');
    const lb = b.html.split('\n');
    expect(la.length).toBe(lb.length);
    const differ = la.filter((l, i) => l !== lb[i]);
    expect(differ).toHaveLength(1);
    expect(differ[0]).toContain('Generated 1970-01-01');
    for (const c of a.charts) expect(c.svg).toBe(b.charts.find((x) => x.name === c.name)?.svg);
  });

  test('a design under one spectrum has no comparison section', async () => {
    const design = await loadDesignText(join(dir, 'single.yaml'), quick('x').replace('ensemble: x\n', ''));
    const r = buildReport(design, { date: new Date(0) });
    expect(r.data.comparison).toBeNull();
    expect(r.html).not.toContain('versus-am15g');
    expect(r.charts.some((c) => c.name.startsWith('compare-') || c.name === 'ape-histogram')).toBe(false);
    expect((r.summary as any).am15g_comparison).toBeUndefined();
  });
});
