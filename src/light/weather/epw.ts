/**
 * EnergyPlus weather files (EPW; public format of the U.S. DOE EnergyPlus
 * "Auxiliary Programs" documentation): 8 header lines (LOCATION first), then
 * hourly rows of 35 fields, hour-ending (hour 1 covers 00:00–01:00 local
 * standard time). Missing-value codes per field as the format defines them.
 */
import { fileError } from '../../errors.js';
import { cellNumber, csvRows, readWeatherBytes, utcMsOf } from './common.js';
import type { WeatherFile, WeatherHour } from './types.js';

const HEADER_LINES = 8;

/** Field positions (0-based) and missing-value codes of the EPW data rows. */
const F = {
  year: 0, month: 1, day: 2, hour: 3, minute: 4,
  dryBulb: [6, 99.9], dewPoint: [7, 99.9], relHumidity: [8, 999], pressurePa: [9, 999999],
  ghi: [13, 9999], dni: [14, 9999], dhi: [15, 9999],
  windSpeed: [21, 999], water: [28, 999], aod: [29, 0.999], albedo: [32, 999],
} as const;

/** Read an EPW file into hourly records (UserError with file:line on anything malformed). */
export function readEpw(path: string): WeatherFile {
  const { text, sha256 } = readWeatherBytes(path);
  const firstLines = text.split(/\r?\n/, HEADER_LINES);
  const loc = firstLines[0]?.split(',').map((s) => s.trim()) ?? [];
  if (loc[0]?.toUpperCase() !== 'LOCATION') throw fileError(path, 1, 'an EPW file starts with a LOCATION line');
  if (loc.length < 10) throw fileError(path, 1, `LOCATION needs 10 fields (city, state, country, source, WMO, latitude, longitude, time zone, elevation), found ${loc.length}`);
  const num = (k: number, what: string, lo: number, hi: number) => {
    const x = cellNumber(path, 1, loc[k], what);
    if (!(x >= lo && x <= hi)) throw fileError(path, 1, `LOCATION ${what} "${loc[k]}" must be within ${lo}…${hi}`);
    return x;
  };
  const site = {
    name: [loc[1], loc[2], loc[3]].filter((s) => s && s !== '-' && s.toLowerCase() !== 'unknown').join(', ') || 'unnamed site',
    latitudeDeg: num(6, 'latitude [°]', -90, 90),
    longitudeDeg: num(7, 'longitude [°]', -180, 180),
    utcOffsetHours: num(8, 'time zone [h]', -12, 14),
    elevationM: num(9, 'elevation [m]', -500, 9000),
  };
  const rows = csvRows(path, text, HEADER_LINES + 1);
  if (rows.length === 0) throw fileError(path, HEADER_LINES + 1, 'holds no data rows');
  const hours: WeatherHour[] = rows.map(({ line, cells }) => {
    if (cells.length < 33) throw fileError(path, line, `an EPW data row has 35 fields, found ${cells.length}`);
    const int = (k: number, what: string, lo: number, hi: number) => {
      const x = cellNumber(path, line, cells[k], what);
      if (!Number.isInteger(x) || x < lo || x > hi) throw fileError(path, line, `${what} "${cells[k]}" must be an integer within ${lo}…${hi}`);
      return x;
    };
    const year = int(F.year, 'year', 1, 9999);
    const month = int(F.month, 'month', 1, 12);
    const day = int(F.day, 'day', 1, 31);
    const hour = int(F.hour, 'hour', 1, 24);
    const minute = cells[F.minute] === '' ? 0 : int(F.minute, 'minute', 0, 60) % 60;
    const v = (f: readonly [number, number], what: string) => cellNumber(path, line, cells[f[0]], what, [f[1]]);
    const pressurePa = v(F.pressurePa, 'pressure [Pa]');
    const waterMm = v(F.water, 'precipitable water [mm]');
    const aod = v(F.aod, 'aerosol optical depth');
    const albedo = v(F.albedo, 'albedo');
    return {
      line,
      endUtcMs: utcMsOf(year, month, day, hour, 0, site.utcOffsetHours),
      localLabel: `${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}T${String(hour).padStart(2, '0')}:${String(minute).padStart(2, '0')}`,
      month,
      ghiWm2: v(F.ghi, 'global horizontal irradiance [W/m²]'),
      dniWm2: v(F.dni, 'direct normal irradiance [W/m²]'),
      dhiWm2: v(F.dhi, 'diffuse horizontal irradiance [W/m²]'),
      airTempC: v(F.dryBulb, 'dry-bulb temperature [°C]'),
      dewPointC: v(F.dewPoint, 'dew-point temperature [°C]'),
      relHumidityPct: v(F.relHumidity, 'relative humidity [%]'),
      pressureHpa: pressurePa / 100,
      windMs: v(F.windSpeed, 'wind speed [m/s]'),
      waterCm: waterMm / 10,
      aodBroadband: aod > 0 && aod < 0.999 ? aod : NaN,
      albedo: albedo >= 0 && albedo <= 1 ? albedo : NaN,
    };
  });
  return { format: 'epw', path, sha256, site, hours };
}
