import { describe, expect, test } from 'vitest';
import { airMassKastenYoung, angleOfIncidenceDeg, sunPosition } from '../../src/light/sun-position.js';
import { runCli, runJson } from '../helpers/cli.js';

// The worked example published with SPA: Reda & Andreas, Sol. Energy 76 (2004) 577, Table A5.1/A5.2
// (17 Oct 2003 12:30:30 at UTC−7, 39.742476° N, 105.1786° W, 1830.14 m, 820 mbar, 11 °C, ΔT = 67 s).
const GOLDEN = { latitudeDeg: 39.742476, longitudeDeg: -105.1786, elevationM: 1830.14, pressureHpa: 820, airTempC: 11 };
const T = Date.parse('2003-10-17T12:30:30-07:00');

describe('sun position (NREL SPA)', () => {
  const p = sunPosition(T, GOLDEN, 67);

  test('worked example: topocentric zenith 50.11162° (with refraction), azimuth 194.34024° (Reda & Andreas 2004, Table A5.2)', () => {
    expect(Math.abs(p.apparentZenithDeg - 50.11162)).toBeLessThan(0.01);
    expect(Math.abs(p.azimuthDeg - 194.34024)).toBeLessThan(0.01);
    // Much tighter than the 0.01° asked: the algorithm is followed step by step.
    expect(Math.abs(p.apparentZenithDeg - 50.11162)).toBeLessThan(1e-5);
    expect(Math.abs(p.azimuthDeg - 194.34024)).toBeLessThan(1e-5);
  });

  test('worked example intermediates: R = 0.9965422974 AU, δ = −9.31434° (Reda & Andreas 2004, Table A5.2, from memory)', () => {
    expect(Math.abs(p.earthSunAu - 0.9965422974)).toBeLessThan(1e-9);
    expect(Math.abs(p.declinationDeg - -9.31434)).toBeLessThan(1e-5);
  });

  test('worked example: incidence 25.18700° on a 30° slope turned 10° east of south (Reda & Andreas 2004, Table A5.2)', () => {
    expect(Math.abs(angleOfIncidenceDeg(p.apparentZenithDeg, p.azimuthDeg, 30, 170) - 25.187)).toBeLessThan(1e-4);
  });

  // Tromsø, 69.65° N 18.96° E. At the solstices the declination is ±ε ≈ ±23.44° (obliquity, from memory),
  // so the sun's lowest zenith over the day is φ − ε at noon and its highest 180° − φ − ε at midnight
  // (spherical astronomy, common practice).
  const TROMSO = { latitudeDeg: 69.65, longitudeDeg: 18.96, elevationM: 0, pressureHpa: 1013.25, airTempC: 0 };
  const extremes = (startUtc: string) => {
    let lo = Infinity;
    let hi = -Infinity;
    let up = 0;
    const t0 = Date.parse(startUtc);
    for (let minute = 0; minute < 24 * 60; minute += 2) {
      const s = sunPosition(t0 + minute * 60_000, TROMSO);
      lo = Math.min(lo, s.zenithDeg);
      hi = Math.max(hi, s.zenithDeg);
      if (s.apparentZenithDeg < 90) up++;
    }
    return { lo, hi, up, total: (24 * 60) / 2 };
  };

  test('midnight sun: on 21 June at 69.65° N the sun never sets; highest zenith 180 − 69.65 − 23.44 = 86.91° (common practice)', () => {
    const e = extremes('2021-06-21T00:00:00Z');
    expect(e.up).toBe(e.total);
    expect(Math.abs(e.hi - 86.91)).toBeLessThan(0.05);
    expect(Math.abs(e.lo - (69.65 - 23.44))).toBeLessThan(0.05);
  });

  test('polar night: on 21 December at 69.65° N the sun never rises; lowest zenith 69.65 + 23.44 = 93.09° (common practice)', () => {
    const e = extremes('2021-12-21T00:00:00Z');
    expect(e.up).toBe(0);
    expect(Math.abs(e.lo - 93.09)).toBeLessThan(0.05);
    // Below −0.83° of elevation the paper applies no refraction.
    const noon = sunPosition(Date.parse('2021-12-21T10:45:00Z'), TROMSO);
    expect(noon.apparentZenithDeg).toBe(noon.zenithDeg);
  });
});

describe('air mass (Kasten & Young 1989)', () => {
  test('1 at the zenith within 0.03 %, the plane-parallel sec Z within 0.5 % below 60° (common practice), within 0.5 % of 38.09 at the horizon (Kasten & Young, Appl. Opt. 28 (1989) 4735, from memory)', () => {
    expect(Math.abs(airMassKastenYoung(0) - 1)).toBeLessThan(3e-4);
    for (const z of [20, 40, 48.19, 60]) expect(Math.abs(airMassKastenYoung(z) * Math.cos((z * Math.PI) / 180) - 1)).toBeLessThan(5e-3);
    expect(Math.abs(airMassKastenYoung(90) / 38.09 - 1)).toBeLessThan(5e-3); // tabulated 38.09 at the horizon (from memory); the fit is within 0.5 %
    expect(airMassKastenYoung(97)).toBeNaN();
  });
});

describe('gapstack sky (sun position)', () => {
  test('prints zenith, azimuth, apparent zenith and air mass for the SPA worked example', () => {
    const j = runJson(['sky', '--lat', '39.742476', '--lon', '-105.1786', '--time', '2003-10-17T12:30:30-07:00', '--elevation', '1830.14', '--pressure-hpa', '820', '--air-temp', '11', '--delta-t', '67']);
    expect(Math.abs(j.apparent_zenith_deg - 50.11162)).toBeLessThan(0.01);
    expect(Math.abs(j.azimuth_deg - 194.34024)).toBeLessThan(0.01);
    expect(j.zenith_deg).toBeGreaterThan(j.apparent_zenith_deg);
    expect(j.air_mass).toBeCloseTo(airMassKastenYoung(j.apparent_zenith_deg), 8);
    expect(j.time_utc).toBe('2003-10-17T19:30:30.000Z');
  }, 60_000);

  test('a time without its UTC offset is a user error (exit 2, one line)', () => {
    const r = runCli(['sky', '--lat', '40', '--lon', '-105', '--time', '2003-10-17T12:30:30']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/UTC offset/);
  }, 60_000);
});
