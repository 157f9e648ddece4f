import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { StepObjective } from '../../src/stack/step-objective.js';
import { bandEdgeEnergiesEv, searchGaps, type SearchProblem } from '../../src/search/optimize.js';
import { compassMax, nelderMeadMax } from '../../src/search/refine.js';
import { gapAxis } from '../../src/search/axis.js';
import { enumerateStep } from '../../src/search/enumerate.js';

const s = am15g();
const edges = bandEdgeEnergiesEv(s, 0.5, 2.6);
const objective = (cells: number, wiring: 'series' | 'independent') =>
  new StepObjective({ cells, wiring, ere: Array(cells).fill(1), topAbsorptance: 1, spectra: [{ spectrum: s, weight: 1, tempK: 300 }] });
const problem = (cells: number, over: Partial<SearchProblem> = {}): SearchProblem => ({ cells, spanEv: [0.5, 2.6], ranges: [], fixed: [], loss: 0.01, ...over });

// Expected optima: docs/PHYSICS.md §5 table and §2 (independent global grid search plus refinement);
// the same values are in test/fixtures/reference/reference.json "optima" (test/fixtures/reference/runner.py).
describe('global optimum from scratch (within 2 meV and 0.01 % abs)', () => {
  test.each([
    ['1 cell', 1, 'series', [1.336], 0.3369],
    ['2T', 2, 'series', [1.6325, 0.9601], 0.45727],
    ['4T', 2, 'independent', [1.73, 0.94], 0.4606],
    ['3J 2T', 3, 'series', [1.9, 1.367, 0.933], 0.5162],
    ['4J 2T', 4, 'series', [2.002, 1.494, 1.114, 0.715], 0.5533],
  ] as const)('%s', (_name, cells, wiring, gaps, eta) => {
    const r = searchGaps(objective(cells, wiring), problem(cells), edges);
    expect(Math.abs(r.best.value - eta)).toBeLessThan(1e-4);
    r.best.gapsEv.forEach((g, i) => expect(Math.abs(g - gaps[i])).toBeLessThan(0.002));
  });

  test('2T on a fixed 1.12 eV bottom: 45.04 % at 1.729 eV (docs/PHYSICS.md §5)', () => {
    const r = searchGaps(objective(2, 'series'), problem(2, { fixed: [undefined, 1.12] }), edges);
    expect(Math.abs(r.best.value - 0.4504)).toBeLessThan(1e-4);
    expect(Math.abs(r.best.gapsEv[0] - 1.729)).toBeLessThan(0.002);
    expect(r.best.gapsEv[1]).toBe(1.12);
  });
});

describe('the narrow 2T basin at the O₂ A-band edge (docs/PHYSICS.md §6 trap)', () => {
  test('a 5 meV grid plus one local refinement from its best point lands in the 45.710 % basin', () => {
    const obj = objective(2, 'series');
    const axis = gapAxis(0.5, 2.6, 0.005);
    const en = enumerateStep(obj, { axis, ranges: [[0, axis.length - 1], [0, axis.length - 1]], margin: 0 });
    const f = (x: number[]) => obj.value(x);
    const box = { lo: [0.5, 0.5], hi: [2.6, 2.6] };
    const local = compassMax(f, nelderMeadMax(f, en.best.gapsEv, 0.0025, box, 1e-6).x, 0.001, box, 1e-5);
    expect(Math.abs(local.value - 0.4571)).toBeLessThan(1e-4);
    expect(Math.abs(local.x[0] - 1.598)).toBeLessThan(0.003);
  });
  test('the global search finds 45.727 % at 1.6325/0.9601 and reports 1.598/0.935 as a runner-up', () => {
    const r = searchGaps(objective(2, 'series'), problem(2), edges);
    expect(r.best.value).toBeGreaterThan(0.45726);
    expect(r.basins.some((b) => Math.abs(b.gapsEv[0] - 1.598) < 0.003 && Math.abs(b.gapsEv[1] - 0.935) < 0.003)).toBe(true);
  });
  test('the band-edge axis holds the O₂ A-band edge near 760 nm (1.63 eV)', () => {
    expect(edges.some((e) => Math.abs(e - 1.631) < 0.004)).toBe(true);
  });
});

describe('tolerance region', () => {
  test('2T top gap on a 1.12 eV bottom keeps η within 1 % relative from 1.7105 to 1.752 eV (docs/PHYSICS.md §6; reference runner gives 1.71009)', () => {
    const r = searchGaps(objective(2, 'series'), problem(2, { fixed: [undefined, 1.12] }), edges);
    const t = r.tolerance.intervals[0];
    expect(Math.abs(t.lowEv - 1.7101)).toBeLessThan(0.001);
    expect(Math.abs(t.highEv - 1.752)).toBeLessThan(0.001);
  });
  test('4T on a 1.12 eV bottom stays within 1 % from 1.686 eV to beyond 1.90 eV, max 45.24 % (docs/PHYSICS.md §6)', () => {
    const r = searchGaps(objective(2, 'independent'), problem(2, { fixed: [undefined, 1.12] }), edges);
    expect(Math.abs(r.best.value - 0.4524)).toBeLessThan(1e-4);
    const t = r.tolerance.intervals[0];
    expect(Math.abs(t.lowEv - 1.686)).toBeLessThan(0.001);
    expect(t.highEv).toBeGreaterThan(1.9);
  });
  test('the region contains the optimum and shrinks as the allowed loss shrinks', () => {
    const widths = [0.02, 0.01, 0.005, 0.001].map((loss) => {
      const r = searchGaps(objective(2, 'series'), problem(2, { loss }), edges);
      for (const t of r.tolerance.intervals) {
        expect(t.lowEv).toBeLessThanOrEqual(t.gapEv);
        expect(t.highEv).toBeGreaterThanOrEqual(t.gapEv);
      }
      return r.tolerance.intervals.map((t) => t.highEv - t.lowEv);
    });
    for (let k = 1; k < widths.length; k++) widths[k].forEach((w, i) => expect(w).toBeLessThan(widths[k - 1][i]));
  });
});

describe('constraints', () => {
  test('a per-subcell range is respected and an impossible one is refused', () => {
    const r = searchGaps(objective(2, 'series'), problem(2, { ranges: [[1.55, 1.6], undefined] }), edges);
    expect(r.best.gapsEv[0]).toBeGreaterThanOrEqual(1.55);
    expect(r.best.gapsEv[0]).toBeLessThanOrEqual(1.6);
    expect(() => searchGaps(objective(2, 'series'), problem(2, { ranges: [[0.6, 0.7], [1.0, 1.2]] }), edges)).toThrow(/cannot lie below/);
    expect(() => searchGaps(objective(2, 'series'), problem(2, { fixed: [1.7, undefined], ranges: [[1.5, 1.8], undefined] }), edges)).toThrow(/both fixed and given a range/);
  });
  test('a free top-cell absorptance never loses to a full one and thins a too-low top gap', () => {
    const free = new StepObjective({ cells: 2, wiring: 'series', ere: [1, 1], topAbsorptance: 'free', spectra: [{ spectrum: s, weight: 1, tempK: 300 }] });
    const best = free.bestTopAbsorptance([1.55, 1.12]);
    expect(best.absorptance).toBeLessThan(1);
    expect(best.efficiency).toBeGreaterThan(objective(2, 'series').value([1.55, 1.12]));
  });
});
