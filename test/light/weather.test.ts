import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { precipitableWaterFromDewPointCm, standardPressureHpa } from '../../src/light/atmosphere.js';
import { csvParseRows, csvRows } from '../../src/light/weather/common.js';
import { readEpw, readTmy3, readWeatherFile } from '../../src/light/weather/index.js';
import { UserError } from '../../src/errors.js';

const FIX = new URL('../fixtures/weather/', import.meta.url).pathname;
const EPW = join(FIX, 'pvgis-45.000-8.000.epw');
const TMY3 = join(FIX, 'tmy3-723170.csv');
// Independent sums: test/fixtures/weather/annual-sums.py (Python csv module) wrote annual-sums.json.
const SUMS = JSON.parse(readFileSync(join(FIX, 'annual-sums.json'), 'utf8')).files;
const kwh = (xs: number[]) => xs.reduce((s, x) => s + (Number.isFinite(x) ? x : 0), 0) / 1000;

describe('real weather files', () => {
  test('TMY3 (NSRDB station 723170): 8760 hours, site line, annual GHI/DNI/DHI equal the independent Python sums (annual-sums.py)', () => {
    const w = readTmy3(TMY3);
    expect(w.hours).toHaveLength(SUMS['tmy3-723170.csv'].hours);
    expect(w.site).toMatchObject({ latitudeDeg: 36.1, longitudeDeg: -79.95, utcOffsetHours: -5, elevationM: 273 });
    expect(w.site.name).toMatch(/GREENSBORO/);
    expect(w.sha256).toBe(SUMS['tmy3-723170.csv'].sha256);
    expect(kwh(w.hours.map((h) => h.ghiWm2))).toBeCloseTo(SUMS['tmy3-723170.csv'].ghi_kwh_m2, 6);
    expect(kwh(w.hours.map((h) => h.dniWm2))).toBeCloseTo(SUMS['tmy3-723170.csv'].dni_kwh_m2, 6);
    expect(kwh(w.hours.map((h) => h.dhiWm2))).toBeCloseTo(SUMS['tmy3-723170.csv'].dhi_kwh_m2, 6);
  });

  test('EPW (PVGIS 45° N 8° E): 8760 hours, LOCATION line, annual GHI/DNI/DHI equal the independent Python sums (annual-sums.py)', () => {
    const w = readEpw(EPW);
    expect(w.hours).toHaveLength(SUMS['pvgis-45.000-8.000.epw'].hours);
    expect(w.site).toMatchObject({ latitudeDeg: 45, longitudeDeg: 8, utcOffsetHours: 1, elevationM: 250 });
    expect(kwh(w.hours.map((h) => h.ghiWm2))).toBeCloseTo(SUMS['pvgis-45.000-8.000.epw'].ghi_kwh_m2, 6);
    expect(kwh(w.hours.map((h) => h.dniWm2))).toBeCloseTo(SUMS['pvgis-45.000-8.000.epw'].dni_kwh_m2, 6);
    expect(kwh(w.hours.map((h) => h.dhiWm2))).toBeCloseTo(SUMS['pvgis-45.000-8.000.epw'].dhi_kwh_m2, 6);
  });

  test('hour-ending local standard time: the first TMY3 record (01/01/1988 01:00, UTC−5) ends at 06:00 UTC; the first EPW record (hour 1, UTC+1) at 00:00 UTC', () => {
    expect(new Date(readTmy3(TMY3).hours[0].endUtcMs).toISOString()).toBe('1988-01-01T06:00:00.000Z');
    const e = readEpw(EPW).hours[0];
    expect(new Date(e.endUtcMs).toISOString()).toBe('2018-01-01T00:00:00.000Z');
    expect(e.line).toBe(9);
  });

  test('units and missing-value codes: EPW pressure Pa → hPa, water 999 and AOD .999 missing; TMY3 AOD with source flag "?" missing, Pwat in cm', () => {
    const e = readEpw(EPW).hours[0];
    expect(e.pressureHpa).toBeCloseTo(998.7, 6); // 99870 Pa in the file
    expect(e.waterCm).toBeNaN();
    expect(e.aodBroadband).toBeNaN();
    expect(e.airTempC).toBeCloseTo(2.04, 6);
    const t = readTmy3(TMY3).hours[0];
    expect(t.aodBroadband).toBeNaN();
    expect(t.waterCm).toBeCloseTo(1.5, 6);
    expect(t.pressureHpa).toBe(993);
    expect(t.windMs).toBe(6.2);
  });

  test('the format is told from the first lines', () => {
    expect(readWeatherFile(EPW).format).toBe('epw');
    expect(readWeatherFile(TMY3).format).toBe('tmy3');
  });

  test('the direct split of quote-free rows agrees with csv-parse cell for cell (real TMY3 body)', () => {
    const text = readFileSync(TMY3, 'utf8');
    const fast = csvRows(TMY3, text, 3);
    const slow = csvParseRows(TMY3, text, 3);
    expect(fast.length).toBe(slow.length);
    for (const k of [0, 1, 4000, 8759]) {
      expect(fast[k].line).toBe(slow[k].line);
      expect(fast[k].cells).toEqual(slow[k].cells);
    }
  });
});

describe('weather file mistakes are user errors with file:line', () => {
  const dir = mkdtempSync(join(tmpdir(), 'gapstack-weather-'));
  const broken = (name: string, src: string, line: number, edit: (l: string) => string) => {
    const lines = readFileSync(src, 'utf8').split('\n');
    lines[line - 1] = edit(lines[line - 1]);
    const p = join(dir, name);
    writeFileSync(p, lines.join('\n'));
    return p;
  };
  const message = (f: () => unknown) => {
    try {
      f();
    } catch (err) {
      expect(err).toBeInstanceOf(UserError);
      return (err as Error).message;
    }
    throw new Error('no error');
  };

  test('a non-number in an EPW irradiance field names the file, line and field', () => {
    const p = broken('bad.epw', EPW, 20, (l) => l.split(',').map((c, k) => (k === 14 ? 'abc' : c)).join(','));
    expect(message(() => readEpw(p))).toMatch(/bad\.epw:20: direct normal irradiance .* "abc" is not a number/);
  });

  test('a short EPW row, a bad TMY3 date and a missing TMY3 column', () => {
    expect(message(() => readEpw(broken('short.epw', EPW, 30, (l) => l.split(',').slice(0, 10).join(','))))).toMatch(/short\.epw:30: an EPW data row has 35 fields/);
    expect(message(() => readTmy3(broken('date.csv', TMY3, 50, (l) => l.replace(/^\d\d\/\d\d\/\d{4}/, '1988-01-02'))))).toMatch(/date\.csv:50: date "1988-01-02" must be MM\/DD\/YYYY/);
    expect(message(() => readTmy3(broken('col.csv', TMY3, 2, (l) => l.replace('DNI (W/m^2)', 'Beam'))))).toMatch(/col\.csv:2: column "DNI \(W\/m\^2\)" is missing/);
  });

  test('a file of another kind is refused on line 1', () => {
    const p = join(dir, 'spectrum.csv');
    writeFileSync(p, 'wavelength_nm,irradiance\n300,0.1\n400,1\n');
    expect(message(() => readWeatherFile(p))).toMatch(/spectrum\.csv:1: not a weather file/);
    copyFileSync(EPW, join(dir, 'ok.epw'));
    expect(readWeatherFile(join(dir, 'ok.epw')).hours).toHaveLength(8760);
  });
});

describe('atmosphere helpers', () => {
  test('precipitable water from dew point (Gueymard 1994): ≈ 1–2 cm for a mild day (20 °C, dew point 10 °C), rising with dew point, ≥ 0.1 cm (common practice: mid-latitude values 1–3 cm)', () => {
    const mild = precipitableWaterFromDewPointCm(20, 10);
    expect(mild).toBeGreaterThan(1);
    expect(mild).toBeLessThan(2.5);
    expect(precipitableWaterFromDewPointCm(30, 25)).toBeGreaterThan(precipitableWaterFromDewPointCm(30, 15));
    expect(precipitableWaterFromDewPointCm(-30, -40)).toBeGreaterThanOrEqual(0.1);
  });

  test('standard atmosphere: 1013.25 hPa at sea level, ≈ 898.7 hPa at 1000 m (ISO 2533 table, from memory)', () => {
    expect(standardPressureHpa(0)).toBeCloseTo(1013.25, 6);
    expect(Math.abs(standardPressureHpa(1000) - 898.76)).toBeLessThan(0.5);
  });
});
