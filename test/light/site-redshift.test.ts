import { describe, expect, test } from 'vitest';
import { ensembleSummary } from '../../src/light/ensemble.js';
import { loadSiteYear, type SiteLightOptions } from '../../src/light/site-year.js';
import { am15g } from '../../src/light/sources.js';
import { buildObjective } from '../../src/stack/objectives.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';

const TMY3 = new URL('../fixtures/weather/tmy3-723170.csv', import.meta.url).pathname;
const PLANE: SiteLightOptions = { tiltDeg: 36, azimuthDeg: 180, tracking: 'none' };

/** 2T perovskite/Si with the bottom fixed at 1.12 eV: the top gap of the best yield-weighted efficiency, 5 meV scan. */
function bestTopGap(members: Parameters<typeof buildObjective>[1]): number {
  const obj = buildObjective(idealStack([1.7, 1.12], seriesWiring(2)), members);
  let best = { g: 0, v: -1 };
  for (let g = 1.4; g <= 2.2 + 1e-9; g += 0.005) {
    const v = obj.value([g, 1.12]);
    if (v > best.v) best = { g, v };
  }
  return best.g;
}

describe('a red-shifted site moves the 2T top gap down (docs/PHYSICS.md §8; series current matching, common practice)', () => {
  test('same weather, a wet and hazy atmosphere against a dry and clean one: lower APE, lower site-optimal top gap', () => {
    // Every 6th used hour keeps the test quick; the comparison is between two atmospheres over the same hours.
    const pick = (o: Partial<SiteLightOptions>) => {
      const y = loadSiteYear(TMY3, { ...PLANE, ...o });
      return { ...y.ensemble, members: y.ensemble.members.filter((_, k) => k % 6 === 0) };
    };
    const red = pick({ waterCm: 5, aod500: 0.5 });
    const blue = pick({ waterCm: 0.3, aod500: 0.02 });
    const apeRed = ensembleSummary(red).ape.weightedMeanEv!;
    const apeBlue = ensembleSummary(blue).ape.weightedMeanEv!;
    expect(apeRed).toBeLessThan(apeBlue - 0.05);
    const gRed = bestTopGap(red.members);
    const gBlue = bestTopGap(blue.members);
    // Redder light gives the bottom cell relatively more photons; matching moves the top gap down.
    expect(gRed).toBeLessThan(gBlue - 0.05);
    // And the AM1.5G optimum of the same question differs from both site optima (the point of a site check).
    const gRef = bestTopGap([{ spectrum: am15g(), weight: 1, tempK: 300 }]);
    expect(Math.abs(gRef - gBlue)).toBeGreaterThan(0.02);
  }, 180_000);
});
