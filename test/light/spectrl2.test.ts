import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { am15g, resolveSpectrum } from '../../src/light/sources.js';
import { bandIntegralWm2, earthSunFactor, SPECTRL2_RURAL, spectrl2, type Spectrl2Inputs } from '../../src/light/spectrl2.js';
import { runCli, runJson } from '../helpers/cli.js';

// Output of NREL's C implementation of SPECTRL2 for one case (test/fixtures/spectrl2/PROVENANCE.md);
// its columns are W m⁻² µm⁻¹: divide by 1000 for per nm.
const FIXTURE = new URL('../fixtures/spectrl2/spectrl2-reference-horizontal.csv', import.meta.url);
const reference = readFileSync(FIXTURE, 'utf8')
  .trim()
  .split('\n')
  .slice(1)
  .map((l) => l.split(',').map(Number));
const col = (k: number) => reference.map((r) => r[k] / 1000);

const CASE: Spectrl2Inputs = {
  zenithDeg: 47.912086486816406,
  airMass: 1.4899535986910446,
  pressurePa: 101300,
  waterCm: 1.42,
  ozoneAtmCm: 0.344,
  aod500: 0.1,
  dayOfYear: 75,
  albedo: 0.2,
  ...SPECTRL2_RURAL,
};
const TOL = 1e-4; // W m⁻² nm⁻¹, docs/PHYSICS.md §10

describe('SPECTRL2 against NREL C code output (fixture test/fixtures/spectrl2/, pvlib-python test data)', () => {
  const r = spectrl2(CASE);

  test('the 122 wavelengths of the model, 300–4000 nm', () => {
    expect(r.wavelengthNm.length).toBe(122);
    reference.forEach((row, k) => expect(Math.abs(row[1] * 1000 - r.wavelengthNm[k])).toBeLessThan(1e-3));
  });

  for (const [name, k, get] of [
    ['diffuse horizontal', 2, () => r.dhiWm2Nm],
    ['direct normal', 3, () => r.dniWm2Nm],
    ['extraterrestrial at the day\'s distance', 4, () => r.etrWm2Nm],
    ['global horizontal', 5, () => r.ghiWm2Nm],
  ] as const) {
    test(`${name} within 1e-4 W m⁻² nm⁻¹ at every wavelength`, () => {
      const ours = get();
      const ref = col(k);
      let worst = 0;
      ref.forEach((v, i) => (worst = Math.max(worst, Math.abs(v - ours[i]))));
      expect(worst).toBeLessThan(TOL);
      expect(ref.some((v) => v > 0.1)).toBe(true);
    });
  }

  test('on a horizontal plane the plane-of-array column equals global horizontal (Hay–Davies reduces to it at β = 0, θ = Z)', () => {
    r.poaWm2Nm.forEach((v, i) => expect(v).toBeCloseTo(r.ghiWm2Nm[i], 12));
  });

  test('Earth–Sun factor: 1.0335 at perihelion (3 Jan) and 0.9666 at aphelion (4 Jul), ±0.001 (Spencer 1971; (1 ± e)^−2 with e = 0.0167, common practice)', () => {
    expect(Math.abs(earthSunFactor(3) - 1 / (1 - 0.0167) ** 2)).toBeLessThan(1e-3);
    expect(Math.abs(earthSunFactor(185) - 1 / (1 + 0.0167) ** 2)).toBeLessThan(1e-3);
  });
});

describe('SPECTRL2 on a tilted plane (Hay–Davies, isotropic ground)', () => {
  test('the three parts add up and follow their definitions (docs/PHYSICS.md §10)', () => {
    const tilt = 35;
    const aoi = 20;
    const r = spectrl2(CASE, { aoiDeg: aoi, tiltDeg: tilt });
    const cosZ = Math.cos((CASE.zenithDeg * Math.PI) / 180);
    const cosT = Math.cos((aoi * Math.PI) / 180);
    const cosB = Math.cos((tilt * Math.PI) / 180);
    for (let k = 0; k < 122; k += 11) {
      const a = r.dniWm2Nm[k] / r.etrWm2Nm[k];
      expect(r.poaBeamWm2Nm[k]).toBeCloseTo(r.dniWm2Nm[k] * cosT, 12);
      expect(r.poaSkyWm2Nm[k]).toBeCloseTo(r.dhiWm2Nm[k] * (a * (cosT / cosZ) + (1 - a) * (1 + cosB) / 2), 12);
      expect(r.poaGroundWm2Nm[k]).toBeCloseTo((r.dniWm2Nm[k] * cosZ + r.dhiWm2Nm[k]) * CASE.albedo * (1 - cosB) / 2, 12);
      expect(r.poaWm2Nm[k]).toBeCloseTo(r.poaBeamWm2Nm[k] + r.poaSkyWm2Nm[k] + r.poaGroundWm2Nm[k], 12);
    }
    // A plane facing the sun collects more than the horizontal one on a clear day (common practice).
    expect(bandIntegralWm2(r.wavelengthNm, r.poaWm2Nm)).toBeGreaterThan(bandIntegralWm2(r.wavelengthNm, r.ghiWm2Nm));
  });

  test('more water and air mass shift the direct light to the red: less power, lower average photon energy (docs/PHYSICS.md §8)', () => {
    const blue = resolveSpectrum('clearsky:zenith=20,water-cm=0.5,part=dni');
    const red = resolveSpectrum('clearsky:zenith=70,water-cm=4,part=dni');
    expect(red.pinWm2).toBeLessThan(blue.pinWm2);
    const frac = (s: typeof blue) => bandIntegralWm2(s.wavelengthNm, s.irradiance.map((v, i) => (s.wavelengthNm[i] < 600 ? v : 0))) / s.pinWm2;
    expect(frac(red)).toBeLessThan(frac(blue));
  });
});

describe('clearsky: as a light source', () => {
  test('resolves to the model spectrum, with its inputs in the source text', () => {
    const s = resolveSpectrum('clearsky:zenith=47.912086486816406,air-mass=1.4899535986910446,day=75,pressure-hpa=1013,water-cm=1.42,ozone-atm-cm=0.344,aod500=0.1,albedo=0.2,part=ghi');
    expect(s.wavelengthNm.length).toBe(122);
    col(5).forEach((v, i) => expect(Math.abs(v - s.irradiance[i])).toBeLessThan(TOL));
    expect(s.source).toMatch(/SPECTRL2/);
    expect(s.source).toMatch(/W 1\.42 cm/);
    expect(s.pinWm2).toBeLessThan(am15g().pinWm2);
  });

  test('unknown keys and missing zenith are user errors naming the key', () => {
    expect(() => resolveSpectrum('clearsky:zenit=30')).toThrow(/unknown key "zenit"/);
    expect(() => resolveSpectrum('clearsky:water-cm=2')).toThrow(/zenith/);
    expect(() => resolveSpectrum('clearsky:zenith=95')).toThrow(/zenith must be/);
  });

  test('evaluate --spectrum clearsky:… runs the stack under it', () => {
    const j = runJson(['evaluate', '--gaps', '1.34', '--spectrum', 'clearsky:zenith=30,tilt=30,aoi=0']);
    expect(j.pin_w_m2).toBeGreaterThan(800);
    expect(j.efficiency).toBeGreaterThan(0.25);
  }, 60_000);
});

describe('gapstack sky (clear-sky spectrum)', () => {
  test('--json gives four 122-value columns matching the NREL reference, and their band integrals', () => {
    const j = runJson(['sky', '--zenith', '47.912086486816406', '--air-mass', '1.4899535986910446', '--aoi', '47.912086486816406', '--tilt', '0', '--day', '75', '--pressure-hpa', '1013', '--water-cm', '1.42', '--ozone-atm-cm', '0.344', '--aod500', '0.1', '--albedo', '0.2']);
    for (const k of ['wavelength_nm', 'dni_w_m2_nm', 'dhi_w_m2_nm', 'poa_w_m2_nm']) expect(j[k]).toHaveLength(122);
    col(3).forEach((v, i) => expect(Math.abs(v - j.dni_w_m2_nm[i])).toBeLessThan(TOL));
    col(2).forEach((v, i) => expect(Math.abs(v - j.dhi_w_m2_nm[i])).toBeLessThan(TOL));
    col(5).forEach((v, i) => expect(Math.abs(v - j.poa_w_m2_nm[i])).toBeLessThan(TOL));
    const wl = Float64Array.from(j.wavelength_nm as number[]);
    expect(j.integrals_w_m2.dni).toBeCloseTo(bandIntegralWm2(wl, Float64Array.from(j.dni_w_m2_nm as number[])), 4);
    expect(j.caution).toMatch(/no substitute/);
  }, 60_000);

  test('text output: a short table and the integrals', () => {
    const r = runCli(['sky', '--zenith', '40', '--tilt', '30', '--aoi', '15']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Integrals over 300–4000 nm: DNI [\d.]+, DHI [\d.]+, GHI [\d.]+, plane of array [\d.]+ W\/m²/);
    expect(r.stdout).toMatch(/POA \[W\/m²\/nm\]/);
  }, 60_000);
});
