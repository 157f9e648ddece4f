import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { spectrumOfArrays } from '../../src/light/spectrum.js';
import { bandEdgeEnergiesEv, weightedBandEdgeEnergiesEv } from '../../src/search/axis.js';
import { searchGaps } from '../../src/search/optimize.js';
import { StepObjective } from '../../src/stack/step-objective.js';

// Internal consistency: the edges of an ensemble are those of its weighted sum (the light
// the yield objective weighs); compared with bandEdgeEnergiesEv of that sum, built by hand.

const ref = am15g();
const grid = Float64Array.from(ref.wavelengthNm);
const shaped = (k: number, g = grid) =>
  spectrumOfArrays({ name: `m${k}`, sha256: `m${k}`, source: 'invented', wavelengthNm: g, irradiance: Float64Array.from(ref.irradiance, (e, i) => e * (1 + 0.4 * Math.sin(k + i / 300))) });

describe('band edges of several weighted spectra', () => {
  test('one spectrum: exactly its own edges', () => {
    expect(weightedBandEdgeEnergiesEv([{ spectrum: ref, weight: 3 }], 0.5, 2.6)).toEqual(bandEdgeEnergiesEv(ref, 0.5, 2.6));
  });

  test('spectra on one grid: the edges of their weighted sum', () => {
    const members = [0, 1, 2].map((k) => ({ spectrum: shaped(k), weight: [1, 2.5, 0.5][k] }));
    const sum = new Float64Array(grid.length);
    for (const m of members) for (let i = 0; i < sum.length; i++) sum[i] += m.weight * m.spectrum.irradiance[i];
    expect(weightedBandEdgeEnergiesEv(members, 0.5, 2.6)).toEqual(bandEdgeEnergiesEv({ wavelengthNm: grid, irradiance: sum }, 0.5, 2.6));
  });

  test('spectra on separate grids: the union of each grid’s sum', () => {
    const a = { spectrum: shaped(0), weight: 1 };
    const b = { spectrum: shaped(1, Float64Array.from(grid)), weight: 1 };
    const got = new Set(weightedBandEdgeEnergiesEv([a, b], 0.5, 2.6));
    const want = new Set([...bandEdgeEnergiesEv(a.spectrum, 0.5, 2.6), ...bandEdgeEnergiesEv(b.spectrum, 0.5, 2.6)]);
    expect(got).toEqual(want);
  });
});

describe('a search that asks for the optimum only', () => {
  test('finds the same optimum with fewer evaluations and leaves the tolerance region and basins empty', () => {
    const obj = () => new StepObjective({ cells: 2, wiring: 'series', ere: [1, 1], topAbsorptance: 1, spectra: [{ spectrum: ref, weight: 1, tempK: 300 }] });
    const problem = { cells: 2, spanEv: [0.5, 2.6] as [number, number], ranges: [], fixed: [undefined, 1.12], loss: 0.01 };
    const edges = bandEdgeEnergiesEv(ref, 0.5, 2.6);
    const full = searchGaps(obj(), problem, edges);
    const bare = searchGaps(obj(), { ...problem, optimumOnly: true }, edges);
    expect(bare.best).toEqual(full.best);
    expect(full.tolerance.intervals.length).toBe(1);
    expect(bare.tolerance.intervals).toEqual([]);
    expect(bare.basins).toEqual([]);
    expect(bare.tolerance.threshold).toBe(full.tolerance.threshold);
    expect(bare.stats.evaluations).toBeLessThan(full.stats.evaluations);
  });
});
