import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { faimanCellTempC } from '../../src/light/atmosphere.js';
import { loadSiteYear } from '../../src/light/site-year.js';
import { sunPosition } from '../../src/light/sun-position.js';
import { readWeatherFile } from '../../src/light/weather/index.js';

const FIX = new URL('../fixtures/weather/', import.meta.url).pathname;
const EPW = join(FIX, 'pvgis-45.000-8.000.epw');
const TMY3 = join(FIX, 'tmy3-723170.csv');
const LONG = 60_000;

describe('the hourly year of a weather file', () => {
  test('horizontal plane: every hour (sun above 1°) whose spectrum integrates to the file\'s DNI·cos Z + DHI (scaling closes; docs/PHYSICS.md §10)', () => {
    const y = loadSiteYear(TMY3, { tiltDeg: 0, azimuthDeg: 180, tracking: 'none' });
    let worst = 0;
    // Below 1° of sun height Hay–Davies caps R_b (cos Z floored at 0.01745), so the closure holds above it.
    const high = y.hours.filter((h) => h.apparentZenithDeg < 89);
    expect(high.length).toBeGreaterThan(y.hours.length * 0.97);
    for (const h of high) {
      const expected = h.dniWm2 * Math.cos((h.apparentZenithDeg * Math.PI) / 180) + h.dhiWm2;
      worst = Math.max(worst, Math.abs(h.poaWm2 - expected) / Math.max(expected, 1));
    }
    expect(worst).toBeLessThan(1e-9);
    y.ensemble.members.forEach((m, k) => expect(m.spectrum.pinWm2).toBeCloseTo(y.hours[k].poaWm2, 8));
  }, LONG);

  test('south-facing plane at the latitude tilt: annual plane-of-array insolation exceeds annual GHI at both mid-latitude sites (common practice)', () => {
    for (const [file, lat] of [[TMY3, 36.1], [EPW, 45]] as const) {
      const y = loadSiteYear(file, { tiltDeg: lat, azimuthDeg: 180, tracking: 'none' });
      expect(y.totals.poaKwhM2).toBeGreaterThan(y.totals.ghiKwhM2 * 1.05);
      // A single-axis tracker collects more still (common practice).
      const t = loadSiteYear(file, { tiltDeg: 0, azimuthDeg: 180, tracking: 'single-axis' });
      expect(t.totals.poaKwhM2).toBeGreaterThan(y.totals.poaKwhM2);
    }
  }, LONG);

  test('every hour of the file is used or skipped with a reason; weights are one hour; the sun is taken at mid-interval', () => {
    const y = loadSiteYear(EPW, { tiltDeg: 30, azimuthDeg: 180, tracking: 'none' });
    const skipped = y.skipped.reduce((s, k) => s + k.count, 0);
    expect(y.totals.usedHours + skipped).toBe(y.totals.fileHours);
    expect(y.skipped.map((s) => s.reason).join(' ')).toMatch(/night/);
    expect(y.ensemble.weightUnit).toBe('hours');
    expect(y.ensemble.members.every((m) => m.weight === 1)).toBe(true);
    expect(y.totals.usedHours).toBeGreaterThan(3500);
    const w = readWeatherFile(EPW);
    const h = y.hours[100];
    const rec = w.hours.find((r) => r.line === h.line)!;
    const sun = sunPosition(rec.endUtcMs - 1_800_000, { latitudeDeg: 45, longitudeDeg: 8, elevationM: 250, pressureHpa: rec.pressureHpa, airTempC: rec.airTempC });
    expect(h.apparentZenithDeg).toBeCloseTo(sun.apparentZenithDeg, 9);
    expect(y.defaultsUsed.join(' ')).toMatch(/dew point \(Gueymard/);
    expect(y.defaultsUsed.join(' ')).toMatch(/τ500 default 0\.1/);
  }, LONG);

  test('cell temperature is Faiman of the hour (T_air + G_poa/(U0 + U1·v)) with settable coefficients', () => {
    const y = loadSiteYear(TMY3, { tiltDeg: 36, azimuthDeg: 180, tracking: 'none', faiman: { u0: 20, u1: 5 } });
    for (const k of [0, 500, 2000]) {
      const h = y.hours[k];
      expect(y.ensemble.members[k].tempK).toBeCloseTo(faimanCellTempC(h.airTempC, h.poaWm2, h.windMs, { u0: 20, u1: 5 }) + 273.15, 9);
      expect(y.ensemble.members[k].tempK).toBeCloseTo(h.airTempC + 273.15 + h.poaWm2 / (20 + 5 * h.windMs), 9);
    }
  }, LONG);

  test('overrides reach the model and the ensemble hash; bad plane options are user errors', () => {
    const a = loadSiteYear(TMY3, { tiltDeg: 36, azimuthDeg: 180, tracking: 'none' });
    const b = loadSiteYear(TMY3, { tiltDeg: 36, azimuthDeg: 180, tracking: 'none', aod500: 0.3, waterCm: 3 });
    expect(b.hours.every((h) => h.aod500 === 0.3 && h.waterCm === 3)).toBe(true);
    expect(a.ensemble.sha256).not.toBe(b.ensemble.sha256);
    expect(() => loadSiteYear(TMY3, { tiltDeg: 120, azimuthDeg: 180, tracking: 'none' })).toThrow(/tiltDeg must be within 0–90 °/);
    expect(() => loadSiteYear(TMY3, { tiltDeg: 20, azimuthDeg: 180, tracking: 'single-axis' })).toThrow(/give tiltDeg 0/);
  }, LONG);
});
