import { describe, expect, test } from 'vitest';
import { blackbodySpectrum } from '../../src/light/blackbody.js';
import { photonsAboveEv, trapezoid } from '../../src/light/spectrum.js';
import { blackbodyPhotonsAboveEv } from '../../src/junction/radiative.js';
import { DILUTION_ONE_SUN, MAX_CONCENTRATION, STEFAN_BOLTZMANN } from '../../src/physics/constants.js';
import { resolveSpectrum } from '../../src/light/sources.js';

describe('blackbody sun', () => {
  test('dilution at 1 au is 2.1627e-5 and full concentration ≈ 46 240 (IAU 2015 nominal solar radius, IAU 2012 au; docs/PHYSICS.md §1)', () => {
    expect(DILUTION_ONE_SUN).toBeCloseTo(2.1627e-5, 8);
    expect(Math.abs(MAX_CONCENTRATION - 46240)).toBeLessThan(5);
  });

  test('Stefan–Boltzmann constant from the exact SI constants is 5.670374419e-8 W m⁻² K⁻⁴ (CODATA 2018)', () => {
    expect(STEFAN_BOLTZMANN / 5.670374419e-8).toBeCloseTo(1, 9);
  });

  test('P_in is f·σ·T⁴ exactly and the table integrates to it within 1e-4', () => {
    const s = blackbodySpectrum({ tempK: 5778 });
    expect(s.pinWm2).toBe(DILUTION_ONE_SUN * STEFAN_BOLTZMANN * 5778 ** 4);
    expect(Math.abs(trapezoid(s.wavelengthNm, s.irradiance) / s.pinWm2 - 1)).toBeLessThan(1e-4);
  });

  test('photons above a gap from the table match the Bose–Einstein series within 1e-5', () => {
    const f = 2.1646e-5;
    const s = blackbodySpectrum({ tempK: 6000, dilution: f });
    for (const g of [0.5, 1.1, 1.31, 2.0, 3.0]) {
      expect(Math.abs(photonsAboveEv(s, g) / (f * blackbodyPhotonsAboveEv(g, 6000)) - 1)).toBeLessThan(1e-5);
    }
  });

  test('--suns max gives undiluted sunlight (f = 1)', () => {
    const s = resolveSpectrum('blackbody:6000', { suns: 'max' });
    expect(s.pinWm2).toBeCloseTo(STEFAN_BOLTZMANN * 6000 ** 4, 0);
  });
});
