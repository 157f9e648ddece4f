import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { blackbodySpectrum } from '../../src/light/blackbody.js';
import { StepObjective } from '../../src/stack/step-objective.js';
import { bandEdgeEnergiesEv, searchGaps } from '../../src/search/optimize.js';

// Expected optima: test/fixtures/reference/reference.json "optima" with fixed_bottom_ev, from the
// independent numpy/scipy implementation test/fixtures/reference/runner.py.
const reference = JSON.parse(readFileSync('test/fixtures/reference/reference.json', 'utf8')) as {
  optima: { cells: number; wiring: string; gaps_ev: number[]; efficiency: number; fixed_bottom_ev?: number }[];
};
const s = am15g();
const edges = bandEdgeEnergiesEv(s, 0.5, 2.6);

describe('one free gap: bracket every local maximum on the axis, then golden section', () => {
  test.each(reference.optima.filter((o) => o.fixed_bottom_ev === 1.12 && (o.wiring === 'series' || o.wiring === 'independent')).map((o) => [o.wiring, o] as const))(
    '%s on a fixed 1.12 eV bottom matches reference.json to 0.1 meV, with a few hundred evaluations',
    (wiring, o) => {
      const obj = new StepObjective({ cells: 2, wiring: wiring as 'series' | 'independent', ere: [1, 1], topAbsorptance: 1, spectra: [{ spectrum: s, weight: 1, tempK: 300 }] });
      const r = searchGaps(obj, { cells: 2, spanEv: [0.5, 2.6], ranges: [], fixed: [undefined, 1.12], loss: 0.01 }, edges);
      expect(Math.abs(r.best.gapsEv[0] - o.gaps_ev[0])).toBeLessThan(1e-4);
      expect(r.best.value).toBeCloseTo(o.efficiency, 7);
      expect(r.best.gapsEv[1]).toBe(1.12);
      // Not the general enumerator: no pruned tree, and far fewer evaluations than its 700-odd.
      expect(r.stats.pruned).toBe(0);
      expect(r.stats.evaluations).toBeLessThan(500);
    },
  );
});

describe('the step objective’s caches (photons above per spectrum, J0 per temperature) never change a value', () => {
  test('a cached objective agrees exactly with a fresh one along any sequence of gaps, mixed temperatures included', () => {
    const spectra = [
      { spectrum: s, weight: 2, tempK: 300 },
      { spectrum: blackbodySpectrum({ tempK: 5800 }), weight: 1, tempK: 320 },
      { spectrum: s, weight: 0.5, tempK: 300 },
    ];
    const make = () => new StepObjective({ cells: 3, wiring: 'series', ere: [1, 0.5, 1], topAbsorptance: 1, spectra });
    const cached = make();
    const gap = fc.double({ min: 0.6, max: 2.4, noNaN: true });
    fc.assert(
      fc.property(fc.array(fc.tuple(gap, gap, gap, fc.boolean()), { minLength: 1, maxLength: 12 }), (steps) => {
        let last = [2.0, 1.4, 0.9];
        for (const [a, b, c, repeat] of steps) {
          const g = repeat ? [last[0], b, last[2]] : [a, b, c].sort((x, y) => y - x);
          last = g;
          expect(cached.value(g)).toBe(make().value(g));
        }
      }),
      { numRuns: 60 },
    );
  });
});

describe('one free gap over an ensemble with several temperatures', () => {
  test('finds the maximum a dense 0.5 meV scan finds (demo ensemble, invented data)', async () => {
    const { loadEnsemble } = await import('../../src/light/ensemble.js');
    const { withPowerWeights } = await import('../../src/light/ensemble-weights.js');
    const e = loadEnsemble('examples/ensemble-demo/manifest.yaml', { defaultTempK: 300 });
    const obj = new StepObjective({ cells: 2, wiring: 'series', ere: [1, 1], topAbsorptance: 1, spectra: withPowerWeights(e.members, e.weightUnit) });
    const r = searchGaps(obj, { cells: 2, spanEv: [0.5, 2.6], ranges: [], fixed: [undefined, 1.12], loss: 0.01 }, edges);
    let best = { x: 0, v: -Infinity };
    for (let x = 1.1205; x < 2.6; x += 0.0005) {
      const v = obj.value([x, 1.12]);
      if (v > best.v) best = { x, v };
    }
    // The dense scan is a lower bound on the maximum and lands within one scan step of it.
    expect(r.best.value).toBeGreaterThanOrEqual(best.v - 1e-12);
    expect(Math.abs(r.best.gapsEv[0] - best.x)).toBeLessThan(0.001);
  });
});
