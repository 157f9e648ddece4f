/**
 * An optimum-only one-gap search (coarse grid and band edges first, then every grid
 * point around the promising ones) finds exactly the optimum of the full scan:
 * the same gaps and value, bit for bit, with fewer evaluations.
 */
import { describe, expect, test } from 'vitest';
import { am0, am15d, am15g } from '../../src/light/sources.js';
import { blackbodySpectrum } from '../../src/light/blackbody.js';
import { loadSiteYear } from '../../src/light/site-year.js';
import type { Spectrum } from '../../src/light/spectrum.js';
import { weightedBandEdgeEnergiesEv } from '../../src/search/axis.js';
import { searchGaps } from '../../src/search/optimize.js';
import { StepObjective } from '../../src/stack/step-objective.js';

type Light = { spectrum: Spectrum; weight: number; tempK: number }[];
const one = (spectrum: Spectrum): Light => [{ spectrum, weight: 1, tempK: 300 }];
// Invented sites (examples/sites, from their committed generator) and one real open weather file
// (test/fixtures/weather, PVGIS TMY, provenance beside it), each as its hourly year on a south-facing plane.
const year = (path: string, tiltDeg: number): Light => loadSiteYear(path, { tiltDeg, azimuthDeg: 180, tracking: 'none' }).ensemble.members.map((m) => ({ spectrum: m.spectrum, weight: m.weight, tempK: m.tempK }));

function both(light: Light, wiring: 'series' | 'independent', bottom: number) {
  const obj = () => new StepObjective({ cells: 2, wiring, ere: [1, 1], topAbsorptance: 1, spectra: light });
  const edges = weightedBandEdgeEnergiesEv(light, 0.5, 2.6);
  const problem = { cells: 2, spanEv: [0.5, 2.6] as [number, number], ranges: [], fixed: [undefined, bottom], loss: 0.01 };
  return { full: searchGaps(obj(), problem, edges), quick: searchGaps(obj(), { ...problem, optimumOnly: true }, edges) };
}

describe('optimum-only one-gap search', () => {
  // Single spectra: both wirings on three bottoms; hourly years (thousands of spectra): the 2T questions.
  const all = { wirings: ['series', 'independent'] as const, bottoms: [0.95, 1.12, 1.42] };
  const yearly = { wirings: ['series'] as const, bottoms: [0.95, 1.12] };
  const cases: [string, () => Light, { wirings: readonly ('series' | 'independent')[]; bottoms: number[] }][] = [
    ['AM1.5G', () => one(am15g()), all],
    ['AM1.5D', () => one(am15d()), all],
    ['AM0', () => one(am0()), all],
    ['5800 K blackbody', () => one(blackbodySpectrum({ tempK: 5800 })), all],
    ['invented clear site (amberlake)', () => year('examples/sites/amberlake.epw', 30), yearly],
    ['invented cloudy site (fenwick-moor)', () => year('examples/sites/fenwick-moor.epw', 50), yearly],
    ['real PVGIS TMY at 45° N', () => year('test/fixtures/weather/pvgis-45.000-8.000.epw', 40), yearly],
  ];
  test.each(cases)('%s: same optimum as the full scan', (_, make, which) => {
    const light = make();
    for (const wiring of which.wirings) {
      for (const bottom of which.bottoms) {
        const { full, quick } = both(light, wiring, bottom);
        expect(quick.best.gapsEv, `${wiring} on ${bottom} eV`).toEqual(full.best.gapsEv);
        expect(quick.best.value, `${wiring} on ${bottom} eV`).toBe(full.best.value);
        expect(quick.stats.evaluations).toBeLessThan(full.stats.evaluations);
      }
    }
  }, 120_000);

  test('a search over two free gaps asked for the optimum only: the same optimum, no tolerance intervals and no runner-up basins', () => {
    const light = one(am15g());
    const obj = () => new StepObjective({ cells: 3, wiring: 'series', ere: [1, 1, 1], topAbsorptance: 1, spectra: light });
    const edges = weightedBandEdgeEnergiesEv(light, 0.5, 2.6);
    const problem = { cells: 3, spanEv: [0.5, 2.6] as [number, number], ranges: [], fixed: [undefined, undefined, 0.95], loss: 0.01 };
    const full = searchGaps(obj(), problem, edges);
    const quick = searchGaps(obj(), { ...problem, optimumOnly: true }, edges);
    expect(quick.best).toEqual(full.best);
    expect(full.tolerance.intervals.length).toBeGreaterThan(0);
    expect(quick.tolerance.intervals).toEqual([]);
    expect(quick.tolerance.threshold).toBe(full.tolerance.threshold);
    expect(quick.basins).toEqual([]);
  });
});
