/**
 * The invented example sites (examples/sites/*.epw) parse exactly like a real
 * EPW file: same header, same 35 fields per hourly row, same field positions and
 * units; their irradiance is physically consistent; the generator is
 * deterministic.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers/cli.js';

const SITES_DIR = join(ROOT, 'examples/sites');
const REAL_EPW = join(ROOT, 'test/fixtures/weather/pvgis-45.000-8.000.epw');

// 0-based field positions of the EnergyPlus weather format (public EnergyPlus
// "Auxiliary Programs" documentation, weather data format; common practice).
const F = { year: 0, month: 1, day: 2, hour: 3, dryBulbC: 6, dewPointC: 7, rhPct: 8, pressurePa: 9, etrHorizWh: 10, etrNormalWh: 11, ghiWh: 13, dniWh: 14, dhiWh: 15, windDirDeg: 20, windMs: 21 };

interface Epw {
  header: string[];
  location: { name: string; lat: number; lon: number; tz: number; elevationM: number };
  rows: number[][];
}

/** A deliberately small reader for this test: header keywords, LOCATION, numeric rows. */
function readEpw(path: string): Epw {
  const lines = readFileSync(path, 'utf8').split(/\r?\n/).filter((l) => l.length > 0);
  const header = lines.slice(0, 8);
  const loc = header[0]!.split(',');
  return {
    header,
    location: { name: loc[1]!, lat: Number(loc[6]), lon: Number(loc[7]), tz: Number(loc[8]), elevationM: Number(loc[9]) },
    rows: lines.slice(8).map((l) => l.split(',').map((f, i) => (i === 5 ? NaN : Number(f)))),
  };
}

const HEADER_KEYWORDS = ['LOCATION', 'DESIGN CONDITIONS', 'TYPICAL/EXTREME PERIODS', 'GROUND TEMPERATURES', 'HOLIDAYS/DAYLIGHT SAVING', 'COMMENTS 1', 'COMMENTS 2', 'DATA PERIODS'];

function checkLayout(epw: Epw): void {
  expect(epw.header.map((h) => h.split(',')[0])).toEqual(HEADER_KEYWORDS);
  expect(epw.header[0]!.split(',')).toHaveLength(10);
  expect(epw.rows).toHaveLength(8760);
  for (const r of epw.rows) expect(r).toHaveLength(35);
  const months = epw.rows.map((r) => r[F.month]!);
  expect(months[0]).toBe(1);
  expect(months[8759]).toBe(12);
  expect(new Set(epw.rows.map((r) => r[F.hour])).size).toBe(24);
  expect(Math.min(...epw.rows.map((r) => r[F.hour]!))).toBe(1); // hour-ending, 1..24
  expect(Math.max(...epw.rows.map((r) => r[F.hour]!))).toBe(24);
}

function annualKwhM2(epw: Epw, field: number): number {
  return epw.rows.reduce((s, r) => s + r[field]!, 0) / 1000;
}

const invented = readdirSync(SITES_DIR).filter((f) => f.endsWith('.epw')).sort();

describe('invented example sites', () => {
  it('a dozen invented sites ship', () => {
    expect(invented.length).toBe(12);
  });

  it('the real EPW used as the layout check parses with the same reader', () => {
    const real = readEpw(REAL_EPW);
    checkLayout(real);
    // LOCATION line of the real file: 45° N 8° E, 250 m (the file's own header).
    expect(real.location.lat).toBe(45);
    expect(real.location.lon).toBe(8);
    expect(real.location.elevationM).toBe(250);
    // Annual sums over the real file's GHI/DNI/DHI fields, computed independently with
    //   awk -F, 'NR>8{g+=$14;b+=$15;d+=$16} END{print g/1000,b/1000,d/1000}' pvgis-45.000-8.000.epw
    // (1-based awk fields 14–16 = 0-based 13–15): 1435.86 / 1591.57 / 570.95 kWh/m².
    expect(annualKwhM2(real, F.ghiWh)).toBeCloseTo(1435.86, 1);
    expect(annualKwhM2(real, F.dniWh)).toBeCloseTo(1591.57, 1);
    expect(annualKwhM2(real, F.dhiWh)).toBeCloseTo(570.95, 1);
  });

  for (const file of invented) {
    it(`${file}: same layout and field positions as the real EPW, plausible values`, () => {
      const epw = readEpw(join(SITES_DIR, file));
      checkLayout(epw);
      const { lat, lon, tz, elevationM } = epw.location;
      expect(Math.abs(lat)).toBeLessThanOrEqual(66);
      expect(Math.abs(lon)).toBeLessThanOrEqual(180);
      expect(tz === Math.round(lon / 15)).toBe(true); // invented sites keep solar-ish zone time
      expect(elevationM).toBeGreaterThanOrEqual(0);
      expect(epw.header[5]).toMatch(/Invented site/);
      for (const r of epw.rows) {
        const ghi = r[F.ghiWh]!, dni = r[F.dniWh]!, dhi = r[F.dhiWh]!, etrH = r[F.etrHorizWh]!, etrN = r[F.etrNormalWh]!;
        expect(ghi).toBeGreaterThanOrEqual(0);
        expect(dni).toBeGreaterThanOrEqual(0);
        expect(dhi).toBeGreaterThanOrEqual(0);
        // Never more than the top of the atmosphere delivers (physical bound; common practice).
        expect(ghi).toBeLessThanOrEqual(etrH + 1);
        // Closure GHI = DNI·cos z + DHI, with cos z = ETR horizontal / ETR normal from the
        // same row (definition of the components; common practice). ±2 Wh/m² covers the rounding.
        const cosz = etrN > 0 ? etrH / etrN : 0;
        expect(Math.abs(dni * cosz + dhi - ghi)).toBeLessThanOrEqual(2 + dni * 0.5 / Math.max(etrN, 1));
        expect(r[F.dewPointC]!).toBeLessThanOrEqual(r[F.dryBulbC]!);
        expect(r[F.rhPct]!).toBeGreaterThan(0);
        expect(r[F.rhPct]!).toBeLessThanOrEqual(100);
        expect(r[F.windMs]!).toBeGreaterThanOrEqual(0);
        expect(r[F.windDirDeg]!).toBeLessThan(360);
      }
      // Station pressure near the standard atmosphere at the site's elevation (barometric formula; common practice).
      const meanPa = epw.rows.reduce((s, r) => s + r[F.pressurePa]!, 0) / epw.rows.length;
      expect(Math.abs(meanPa - 101325 * (1 - 2.25577e-5 * elevationM) ** 5.25588)).toBeLessThan(1500);
      // Annual global horizontal between the cloudiest and sunniest inhabited climates,
      // roughly 700–2600 kWh/m² (common practice).
      const ghiYear = annualKwhM2(epw, F.ghiWh);
      expect(ghiYear).toBeGreaterThan(700);
      expect(ghiYear).toBeLessThan(2600);
    });
  }

  it('climates differ the way their labels say: desert sunnier than the cloudy high latitude', () => {
    const desert = annualKwhM2(readEpw(join(SITES_DIR, 'dunmere-flats.epw')), F.ghiWh);
    const north = annualKwhM2(readEpw(join(SITES_DIR, 'fenwick-moor.epw')), F.ghiWh);
    const humid = readEpw(join(SITES_DIR, 'kelvara-bay.epw'));
    // Cloudy, humid air: diffuse share of the year's global light well above a clear desert's (common practice).
    const diffuseShare = (e: Epw) => annualKwhM2(e, F.dhiWh) / annualKwhM2(e, F.ghiWh);
    expect(desert).toBeGreaterThan(2 * north);
    expect(diffuseShare(humid)).toBeGreaterThan(diffuseShare(readEpw(join(SITES_DIR, 'dunmere-flats.epw'))) + 0.2);
  });

  const python = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' });
  it.skipIf(python.status !== 0)('the generator is deterministic: a fresh run writes byte-identical files', () => {
    const out = mkdtempSync(join(tmpdir(), 'gapstack-sites-'));
    try {
      const r = spawnSync('python3', [join(SITES_DIR, 'generate.py'), out], { encoding: 'utf8' });
      expect(r.status, r.stderr).toBe(0);
      expect(readdirSync(out).sort()).toEqual(invented);
      for (const f of invented) expect(readFileSync(join(out, f)).equals(readFileSync(join(SITES_DIR, f)))).toBe(true);
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  }, 120_000);
  if (python.status !== 0) console.log('skipping the generator determinism check: python3 with numpy is not available here');
});
