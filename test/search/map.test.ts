import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { StepObjective } from '../../src/stack/step-objective.js';
import { GenericObjective, buildObjective, stepObjectiveApplies } from '../../src/stack/objectives.js';
import { computeMap, mapToCsv, uniformAxis } from '../../src/search/map.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack, seriesWiring, independentWiring } from '../../src/stack/model.js';

const s = am15g();
const spectra = [{ spectrum: s, weight: 1, tempK: 300 }];

describe('efficiency maps', () => {
  test('the fast two-cell map equals the general stack evaluation pixel by pixel', () => {
    const obj = new StepObjective({ cells: 2, wiring: 'series', ere: [1, 1], topAbsorptance: 1, spectra });
    const m = computeMap(obj, { x: uniformAxis(1.5, 1.9, 0.05), y: uniformAxis(0.9, 1.2, 0.05), xCell: 0, yCell: 1, fixed: [], bounds: [] });
    for (let iy = 0; iy < m.y.length; iy++) {
      for (let ix = 0; ix < m.x.length; ix++) {
        const v = m.values[iy * m.x.length + ix];
        const ref = evaluateStack(idealStack([m.x[ix], m.y[iy]], seriesWiring(2)), s).efficiency;
        expect(Math.abs(v - ref)).toBeLessThan(1e-10);
      }
    }
  });

  test('pixels with the upper gap not above the lower are empty', () => {
    const obj = new StepObjective({ cells: 2, wiring: 'independent', ere: [1, 1], topAbsorptance: 1, spectra });
    const m = computeMap(obj, { x: uniformAxis(1.0, 1.2, 0.1), y: uniformAxis(1.0, 1.2, 0.1), xCell: 0, yCell: 1, fixed: [], bounds: [] });
    expect(Number.isNaN(m.values[0])).toBe(true);
    expect(Number.isNaN(m.values[1 * 3 + 1])).toBe(true);
    expect(m.values[0 * 3 + 1]).toBeGreaterThan(0);
    const csv = mapToCsv(m);
    const lines = csv.trim().split('\n');
    expect(lines[0]).toMatch(/^# .*not device predictions/);
    expect(lines[1]).toBe('gap1_ev,gap2_ev,efficiency_percent');
    expect(lines).toHaveLength(2 + 3);
  });

  test('a profile map maximises the free subcell at every pixel', () => {
    const obj = new StepObjective({ cells: 3, wiring: 'series', ere: [1, 1, 1], topAbsorptance: 1, spectra });
    const m = computeMap(obj, { x: uniformAxis(1.85, 1.95, 0.05), y: uniformAxis(1.32, 1.42, 0.05), xCell: 0, yCell: 1, fixed: [], bounds: [[0.5, 2.6], [0.5, 2.6], [0.5, 1.3]] });
    expect(m.profile).toBe(true);
    // At 1.90/1.37 the best bottom is near 0.933 eV and the stack near 51.6 % (docs/PHYSICS.md §5 3J row).
    const v = m.values[1 * 3 + 1];
    expect(Math.abs(v - 0.5162)).toBeLessThan(5e-4);
    expect(Math.abs(m.profileGaps[0][1 * 3 + 1] - 0.933)).toBeLessThan(0.01);
  });

  test('stacks outside the closed form fall back to the general objective, with the same numbers where both apply', () => {
    const plain = idealStack([1.7, 1.1], seriesWiring(2));
    expect(stepObjectiveApplies(plain)).toBe(true);
    const coupled = idealStack([1.7, 1.1], seriesWiring(2), { coupling: { model: 'empirical', eta: [0.5] } });
    expect(stepObjectiveApplies(coupled)).toBe(false);
    expect(buildObjective(coupled, spectra)).toBeInstanceOf(GenericObjective);
    const generic = new GenericObjective(idealStack([1.7, 1.1], independentWiring(2)), spectra);
    const fast = buildObjective(idealStack([1.7, 1.1], independentWiring(2)), spectra);
    expect(Math.abs(generic.value([1.73, 0.94]) - fast.value([1.73, 0.94]))).toBeLessThan(1e-9);
  });
});
