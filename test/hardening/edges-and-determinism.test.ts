import { describe, expect, test } from 'vitest';
import { resolveSpectrum, am15g } from '../../src/light/sources.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack, independentWiring, seriesWiring } from '../../src/stack/model.js';
import { runCli } from '../helpers/cli.js';

describe('physics at the edges stays finite and bounded', () => {
  const suns: (number | 'max')[] = [1, 1000, 'max'];
  test.each(suns)('6 subcells, ERE down to 1e-8, 200–400 K, gaps 0.3–4 eV, %s suns', (x) => {
    const s = resolveSpectrum('am1.5g', { suns: x });
    for (const tempK of [200, 300, 400]) {
      for (const ere of [1, 1e-4, 1e-8]) {
        for (const gaps of [[4, 3.2, 2.4, 1.6, 0.9, 0.3], [2.2, 1.8, 1.45, 1.15, 0.9, 0.65], [0.36, 0.35, 0.34, 0.33, 0.32, 0.3]]) {
          for (const wiring of [seriesWiring(6), independentWiring(6)]) {
            const r = evaluateStack(idealStack(gaps, wiring, { tempK, subcells: gaps.map((g) => ({ gapEv: g, ere, absorptance: { kind: 'step', value: 1 } })) }), s);
            expect(Number.isFinite(r.efficiency)).toBe(true);
            expect(r.efficiency).toBeGreaterThanOrEqual(0);
            expect(r.efficiency).toBeLessThan(1);
            for (const c of r.subcells) for (const v of [c.jphAm2, c.vocV, c.jOpAm2, c.vOpV, c.powerWm2]) expect(Number.isFinite(v)).toBe(true);
          }
        }
      }
    }
  });
});

describe('determinism', () => {
  test('the same inputs give the same numbers, to the bit', () => {
    const a = evaluateStack(idealStack([1.9, 1.37, 0.93], seriesWiring(3)), am15g());
    const b = evaluateStack(idealStack([1.9, 1.37, 0.93], seriesWiring(3)), am15g());
    expect(b).toEqual(a);
  });
  test('optimize gives the same answer on one thread and on several', () => {
    const strip = (t: string) => {
      const j = JSON.parse(t);
      delete j.search; // work counts differ between one thread and several; the answer must not
      return j;
    };
    const one = runCli(['optimize', '--cells', '3', '--json']);
    const two = runCli(['optimize', '--cells', '3', '--json', '--threads', '1']);
    expect(one.code).toBe(0);
    expect(strip(two.stdout)).toEqual(strip(one.stdout));
  });
});

describe('worker threads', () => {
  test('the enumeration shared over two worker threads gives the same answer as one thread', async () => {
    // Workers load compiled JavaScript, so this test drives the build in dist/ (npm test builds it first).
    const dist = '../../dist/';
    const { searchGaps, searchGapsParallel, bandEdgeEnergiesEv } = await import(`${dist}search/optimize.js`);
    const { StepObjective } = await import(`${dist}stack/step-objective.js`);
    const { am15g: load } = await import(`${dist}light/sources.js`);
    const s = load();
    const obj = new StepObjective({ cells: 3, wiring: 'series', ere: [1, 1, 1], topAbsorptance: 1, spectra: [{ spectrum: s, weight: 1, tempK: 300 }] });
    const problem = { cells: 3, spanEv: [0.5, 2.6], ranges: [], fixed: [], loss: 0.01 };
    const edges = bandEdgeEnergiesEv(s, 0.5, 2.6);
    const one = searchGaps(obj, problem, edges);
    const two = await searchGapsParallel(obj, problem, edges, 2, 'force');
    expect(two.best).toEqual(one.best);
    expect(two.basins).toEqual(one.basins);
    expect(two.tolerance).toEqual(one.tolerance);
  });
});
