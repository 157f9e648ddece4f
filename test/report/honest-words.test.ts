/**
 * Each misleading sentence of the old report, and the wording that replaces it
 * (issue 14). The designs are the invented examples, or small invented ones
 * written here; the numbers come from the engine, the tests check the words.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { loadDesign } from '../../src/design/index.js';
import { buildReport, type BuiltReport } from '../../src/report/build.js';
import { edgeNotes, lossText, RESOLUTION_PP, verdict, wiringPatternText } from '../../src/report/view.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'gapstack-words-'));
const DATE = new Date('2026-01-01T00:00:00Z');
/** Seconds-long report builds on a loaded machine. */
const SLOW = 120_000;

/** The page's text with tags dropped and entities undone. */
const plain = (html: string) =>
  html
    .replace(/<[^>]+>/g, ' ')
    .replace(/&#x3D;/g, '=')
    .replace(/&quot;/g, '"')
    .replace(/&#x27;/g, "'")
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&amp;/g, '&')
    .replace(/\s+/g, ' ');

describe('3T with independent loads is the 4T limit, said once', () => {
  let built: BuiltReport;

  beforeAll(async () => {
    const p = join(dir, 'three-four.yaml');
    writeFileSync(p, 'name: invented 3T check\nspectrum: am1.5g\nsubcells:\n  - label: top\n    range: [1.55, 2.0]\n  - label: bottom\n    gap: 1.12\nwirings: [independent, 3t]\nmap:\n  step: 0.04\n  pairs:\n    - axes: [1, 2]\n      x: [1.5, 2.1]\n      y: [0.9, 1.3]\n');
    built = buildReport(await loadDesign(p), { date: DATE });
  }, SLOW);

  test('was "Three-terminal … gives up 0.00 percentage points"; now one sentence that it equals the 4T limit', () => {
    const v = verdict(built.data);
    expect(v).not.toMatch(/gives up 0\.00/);
    expect(v).toContain('equals the four-terminal limit');
    expect(plain(built.html).match(/equals the four-terminal limit/g)).toHaveLength(1);
  });

  test('its maps and detail are not repeated; the answer column says why', () => {
    expect(built.html).not.toMatch(/id="map-3t-/);
    expect(built.html).not.toMatch(/id="wiring-3t"/);
    expect(built.html).toMatch(/id="wiring-independent"/);
    expect(plain(built.html)).toContain('= the 4T limit (independent loads)');
    // The machine-readable summary still answers for both wirings.
    expect((built.summary.wirings as { wiring: string }[]).map((w) => w.wiring)).toEqual(['independent', '3t']);
  });
});

describe('the synthetic-year example: optima on a window edge, differences below the resolution', () => {
  let built: BuiltReport;

  beforeAll(async () => {
    built = buildReport(await loadDesign(join(ROOT, 'examples/perovskite-silicon-year.yaml')), { date: DATE });
  }, SLOW);

  test('was "the AM1.5G-optimised design loses nothing" with both optima on the window edge; now the edge is named, with the unconstrained optima', () => {
    const c = built.data.comparison;
    expect(c).not.toBeNull();
    const four = c?.wirings.find((w) => w.outcome.wiring.key === 'independent');
    expect(four).toBeDefined();
    const text = lossText(built.data.design, four as NonNullable<typeof four>);
    expect(text).not.toContain('loses nothing');
    expect(text).toContain('because both sit on a window edge');
    expect(text).toContain('high edge of its Mixed-halide lead perovskite (I/Br) practical window');
    expect(text).toContain('Without the windows the optima differ');
  });

  test(`was a 0.002 pp difference narrated as "the 2T stack loses more"; now "no difference at this resolution (${RESOLUTION_PP} percentage points)"`, () => {
    const c = built.data.comparison;
    const text = wiringPatternText(c as NonNullable<typeof c>);
    const two = c?.wirings.find((w) => w.outcome.wiring.key === 'series');
    const four = c?.wirings.find((w) => w.outcome.wiring.key === 'independent');
    // The premise: the example's two losses differ by less than the resolution.
    expect(Math.abs(((two?.lossAbs ?? 0) - (four?.lossAbs ?? 0)) * 100)).toBeLessThan(RESOLUTION_PP);
    expect(text).not.toContain('loses more:');
    expect(text).toContain(`no difference at this resolution (${RESOLUTION_PP} percentage points)`);
    // The series design's own loss is below the resolution too.
    expect(lossText(built.data.design, two as NonNullable<typeof two>)).toContain('no difference at this resolution');
  });

  test('an optimum on a window edge is named under the answer, with the unconstrained optimum beside it', () => {
    const notes = edgeNotes(built.data);
    expect(notes.length).toBe(1);
    expect(notes[0]).toMatch(/^Independent: the optimum is on a window edge — subcell 1 \(1\.800 eV\) sits on the high edge/);
    expect(notes[0]).toMatch(/Without the windows the best is \d+\.\d\d % at \d\.\d{3} \/ \d\.\d{3} eV\./);
    const page = plain(built.html);
    expect(page.indexOf(notes[0])).toBeGreaterThan(page.indexOf('The answer'));
    expect(page.indexOf(notes[0])).toBeLessThan(page.indexOf('Efficiency maps'));
  });

  test('sensitivity charts shade the offsets outside each windowed subcell and fade the curve there', () => {
    const chart = built.charts.find((c) => c.name === 'sensitivity-independent');
    expect(chart).toBeDefined();
    const svg = chart?.svg ?? '';
    // Subcell 1 sits on its window's high edge: everything above +0 meV is outside.
    expect(svg).toMatch(/class="gs-outside-window" data-subcell="1"/);
    expect(svg).toMatch(/class="gs-slice-outside" data-subcell="1"/);
    expect(svg).toContain("outside the subcell's window");
  });
});

describe('ties below the resolution in the verdict', () => {
  let built: BuiltReport;

  beforeAll(async () => {
    built = buildReport(await loadDesign(join(ROOT, 'examples/perovskite-cigs-wirings.yaml')), { date: DATE });
  }, SLOW);

  test('differences at or above the resolution are given in percentage points; 3T is not ranked beside 4T', () => {
    const v = verdict(built.data);
    expect(v).toMatch(/^Highest: Independent \(4T\)/);
    expect(v).toMatch(/Series gives up \d+\.\d\d percentage points/);
    expect(v).not.toMatch(/Three-terminal gives up/);
  });
});
