/**
 * One top-absorptance optimiser: the command line's general-stack path and the
 * search's closed-form path both use stack/top-absorptance.ts, with one lower
 * bound, and agree with the independent reference.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';
import { StepObjective } from '../../src/stack/step-objective.js';
import { bestTopAbsorptance, bestTopAbsorptanceOfStack, MIN_TOP_ABSORPTANCE, withTopAbsorptance } from '../../src/stack/top-absorptance.js';
import { evaluateStack } from '../../src/stack/evaluate.js';

const ref = JSON.parse(readFileSync(new URL('../fixtures/reference/reference.json', import.meta.url), 'utf8')) as {
  top_absorptance_optimum: { gaps_ev: number[]; best_top_absorptance: number; efficiency: number }[];
};

describe('the best top absorptance (independent reference: test/fixtures/reference/runner.py, top_absorptance_optimum)', () => {
  const sun = am15g();
  test.each(ref.top_absorptance_optimum.map((r) => [r.gaps_ev.join('/'), r] as const))('%s eV: full evaluation and closed form agree with the reference', (_n, r) => {
    const full = bestTopAbsorptanceOfStack(idealStack(r.gaps_ev, seriesWiring(2)), sun);
    const fast = new StepObjective({ cells: 2, wiring: 'series', ere: [1, 1], topAbsorptance: 'free', spectra: [{ spectrum: sun, weight: 1, tempK: 300 }] }).bestTopAbsorptance(r.gaps_ev);
    // η is flat at its maximum, so A is known to ~1e-4 while η agrees to the fixture's precision.
    expect(Math.abs(full.absorptance - r.best_top_absorptance)).toBeLessThan(2e-4);
    expect(Math.abs(fast.absorptance - r.best_top_absorptance)).toBeLessThan(2e-4);
    expect(full.efficiency).toBeCloseTo(r.efficiency, 9);
    expect(fast.efficiency).toBeCloseTo(r.efficiency, 9);
  });

  test('a stack already limited by its top cell keeps A = 1 (ties go to the full cell)', () => {
    // Common practice: a 1.8 eV top on 1.12 eV under-produces, so thinning cannot help.
    const c = bestTopAbsorptanceOfStack(idealStack([1.8, 1.12], seriesWiring(2)), sun);
    expect(c.absorptance).toBe(1);
    expect(c.efficiency).toBe(evaluateStack(idealStack([1.8, 1.12], seriesWiring(2)), sun).efficiency);
  });

  test('the search stays inside one bound [MIN_TOP_ABSORPTANCE, 1]', () => {
    const tried: number[] = [];
    bestTopAbsorptance((a) => {
      tried.push(a);
      return -a; // best at the lower bound
    });
    expect(Math.min(...tried)).toBeGreaterThanOrEqual(MIN_TOP_ABSORPTANCE);
    expect(Math.max(...tried)).toBeLessThanOrEqual(1);
    expect(withTopAbsorptance(idealStack([1.7, 1.1], seriesWiring(2)), 0.5).subcells[0].absorptance).toEqual({ kind: 'step', value: 0.5 });
  });
});
