import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { HC_EV_NM } from '../../src/physics/constants.js';
import { averagePhotonEnergyEv, photonsAboveEv, stepJscAm2, totalPhotonFlux, trapezoid } from '../../src/light/spectrum.js';

describe('built-in AM1.5G (ASTM G173-03 global tilt)', () => {
  const s = am15g();

  test('integral over 280–4000 nm is 1000.37 W/m² (value stated with the ASTM G173-03 tables)', () => {
    expect(s.wavelengthNm[0]).toBe(280);
    expect(s.wavelengthNm[s.wavelengthNm.length - 1]).toBe(4000);
    expect(s.wavelengthNm.length).toBe(2002);
    expect(Math.abs(s.pinWm2 - 1000.37)).toBeLessThan(0.01);
    expect(s.pinWm2).toBeCloseTo(trapezoid(s.wavelengthNm, s.irradiance), 12);
  });

  test('Jsc of a 1.12 eV step absorber is 43.81 mA/cm² (docs/PHYSICS.md §2 table, independent numpy/scipy reference)', () => {
    expect(Math.abs(stepJscAm2(s, 1.12) / 10 - 43.81)).toBeLessThan(0.05);
  });

  test('photons above a gap are continuous and monotone in the gap (no staircase)', () => {
    let prev = Infinity;
    let maxJump = 0;
    let rises = 0;
    for (let g = 0.5; g <= 3.0; g += 0.0001) {
      const n = photonsAboveEv(s, g);
      if (n > prev) rises++;
      if (prev !== Infinity) maxJump = Math.max(maxJump, prev - n);
      prev = n;
    }
    expect(rises).toBe(0);
    // A 0.1 meV step never moves more than 0.05 % of all photons.
    expect(maxJump / totalPhotonFlux(s)).toBeLessThan(5e-4);
  });

  test('at a grid node the exact interpolant equals the cumulative table', () => {
    const i = 700;
    const e = HC_EV_NM / s.wavelengthNm[i];
    expect(photonsAboveEv(s, e) / s.cumulativePhotons[i]).toBeCloseTo(1, 12);
  });

  test('average photon energy lies between the window end energies', () => {
    const ape = averagePhotonEnergyEv(s, 350, 1050);
    expect(ape).toBeGreaterThan(1239.841984 / 1050);
    expect(ape).toBeLessThan(1239.841984 / 350);
    // Common practice: AM1.5G APE over 350–1050 nm is about 1.88 eV (value recalled from memory).
    expect(ape).toBeGreaterThan(1.85);
    expect(ape).toBeLessThan(1.9);
  });
});
