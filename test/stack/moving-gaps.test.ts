import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { buildObjective, GenericObjective } from '../../src/stack/objectives.js';
import { idealStack, independentWiring, seriesWiring, stackAtCellTemperature } from '../../src/stack/model.js';
import { yieldForStack } from '../../src/stack/yield.js';

const HC_J_NM = 6.62607015e-34 * 299792458 * 1e9; // h·c [J·nm], 2019 SI exact
const HC_EV_NM = 1239.8419843320026; // h·c/q [eV·nm], 2019 SI exact
const ELEMENTARY_CHARGE = 1.602176634e-19; // [C], 2019 SI exact

/** Photocurrent of an ideal step absorber [A/m²] by plain trapezoids over the table, the last interval cut at the gap wavelength (independent of the engine's cumulative table). */
function stepJscIndependent(gapEv: number): number {
  const s = am15g();
  const edge = HC_EV_NM / gapEv;
  let n = 0;
  for (let i = 1; i < s.wavelengthNm.length; i++) {
    const x0 = s.wavelengthNm[i - 1];
    let x1 = s.wavelengthNm[i];
    if (x0 >= edge) break;
    const f0 = (s.irradiance[i - 1] * x0) / HC_J_NM;
    let f1 = (s.irradiance[i] * x1) / HC_J_NM;
    if (x1 > edge) {
      const t = (edge - x0) / (x1 - x0);
      f1 = f0 + t * (f1 - f0);
      x1 = edge;
    }
    n += 0.5 * (f0 + f1) * (x1 - x0);
  }
  return ELEMENTARY_CHARGE * n;
}

describe('gaps move with each member\'s cell temperature (docs/PHYSICS.md §10)', () => {
  const slope = -2.5e-4; // eV/K, a silicon-like dE_g/dT (from memory)
  const spec = { ...idealStack([1.12], independentWiring(1)), subcells: [{ gapEv: 1.12, ere: 1, absorptance: { kind: 'step', value: 1 } as const, dEgDtEvPerK: slope }] };

  test('at 330 K a 1.12 eV (300 K) subcell has 1.1125 eV and the photocurrent an independent trapezoid integral gives there', () => {
    const y = yieldForStack(spec, [{ spectrum: am15g(), weight: 1, tempK: 330 }]);
    const c = y.perSpectrum[0].subcells[0];
    expect(c.gapEv).toBeCloseTo(1.1125, 12);
    expect(Math.abs(c.jphAm2 / stepJscIndependent(1.1125) - 1)).toBeLessThan(1e-6);
    // …and not the photocurrent of the unmoved gap.
    expect(Math.abs(c.jphAm2 / stepJscIndependent(1.12) - 1)).toBeGreaterThan(1e-3);
  });

  test('at 300 K nothing moves; subcells without a slope never move', () => {
    expect(stackAtCellTemperature(spec, 300).subcells[0].gapEv).toBe(1.12);
    const plain = idealStack([1.7, 1.12], seriesWiring(2));
    expect(stackAtCellTemperature(plain, 350).subcells.map((c) => c.gapEv)).toEqual([1.7, 1.12]);
  });

  test('the search objective moves gaps too: an ensemble at 340 K with slopes takes the full evaluation and agrees with the yield', () => {
    const t = { ...idealStack([1.7, 1.12], seriesWiring(2)) };
    t.subcells = t.subcells.map((c, i) => ({ ...c, dEgDtEvPerK: i === 0 ? 3e-4 : -2.5e-4 }));
    const spectra = [{ spectrum: am15g(), weight: 2, tempK: 340 }, { spectrum: am15g(), weight: 1, tempK: 300 }];
    const obj = buildObjective(t, spectra);
    expect(obj).toBeInstanceOf(GenericObjective);
    const y = yieldForStack(t, spectra);
    expect(obj.value([1.7, 1.12])).toBeCloseTo(y.yieldEfficiency, 12);
    // 40 K moves the top gap +12 meV and the bottom −10 meV: the 2T current balance shifts (common practice: this is what moves 2T matching outdoors).
    expect(y.perSpectrum[0].subcells.map((c) => c.gapEv)).toEqual([1.7 + 0.012, 1.12 - 0.01].map((g) => expect.closeTo(g, 12)));
  });
});
