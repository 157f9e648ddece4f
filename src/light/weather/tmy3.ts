/**
 * NSRDB TMY3 CSV (Wilcox & Marion, "Users manual for TMY3 data sets",
 * NREL/TP-581-43156, 2008): a site line (USAF id, name, state, time zone [h],
 * latitude, longitude, elevation [m]), a column-name line, then hourly rows
 * stamped MM/DD/YYYY and HH:MM, hour-ending local standard time (01:00 covers
 * 00:00–01:00). Columns are found by name; a source flag "?" or an empty cell
 * marks a value as missing, as do the codes −9900 and −9999.
 */
import { fileError } from '../../errors.js';
import { cellNumber, csvRows, readWeatherBytes, utcMsOf } from './common.js';
import type { WeatherFile, WeatherHour } from './types.js';

const MISSING = [-9900, -9999] as const;

/** Columns read, by the name the format gives them. */
const COLUMNS = {
  date: 'Date (MM/DD/YYYY)',
  time: 'Time (HH:MM)',
  ghi: 'GHI (W/m^2)',
  dni: 'DNI (W/m^2)',
  dhi: 'DHI (W/m^2)',
  dryBulb: 'Dry-bulb (C)',
  dewPoint: 'Dew-point (C)',
  relHumidity: 'RHum (%)',
  pressure: 'Pressure (mbar)',
  wind: 'Wspd (m/s)',
  water: 'Pwat (cm)',
  aod: 'AOD (unitless)',
  albedo: 'Alb (unitless)',
} as const;
const REQUIRED = ['date', 'time', 'ghi', 'dni', 'dhi'] as const;

/** Read a TMY3 CSV file into hourly records (UserError with file:line on anything malformed). */
export function readTmy3(path: string): WeatherFile {
  const { text, sha256 } = readWeatherBytes(path);
  const head = csvRows(path, text.split(/\r?\n/, 2).join('\n'), 1);
  if (head.length < 2) throw fileError(path, 1, 'a TMY3 file starts with a site line and a column-name line');
  const meta = head[0].cells;
  if (meta.length < 7) throw fileError(path, 1, `the TMY3 site line has 7 fields (id, name, state, time zone, latitude, longitude, elevation), found ${meta.length}`);
  const metaNum = (k: number, what: string, lo: number, hi: number) => {
    const x = cellNumber(path, 1, meta[k], what);
    if (!(x >= lo && x <= hi)) throw fileError(path, 1, `site ${what} "${meta[k]}" must be within ${lo}…${hi}`);
    return x;
  };
  const site = {
    name: [meta[1], meta[2]].filter(Boolean).join(', ') + (meta[0] ? ` (${meta[0]})` : ''),
    utcOffsetHours: metaNum(3, 'time zone [h]', -12, 14),
    latitudeDeg: metaNum(4, 'latitude [°]', -90, 90),
    longitudeDeg: metaNum(5, 'longitude [°]', -180, 180),
    elevationM: metaNum(6, 'elevation [m]', -500, 9000),
  };
  const names = head[1].cells;
  const index = Object.fromEntries(Object.entries(COLUMNS).map(([k, title]) => [k, names.indexOf(title)])) as Record<keyof typeof COLUMNS, number>;
  for (const k of REQUIRED) if (index[k] < 0) throw fileError(path, 2, `column "${COLUMNS[k]}" is missing from the TMY3 header`);

  const rows = csvRows(path, text, 3);
  if (rows.length === 0) throw fileError(path, 3, 'holds no data rows');
  const hours: WeatherHour[] = rows.map(({ line, cells }) => {
    const date = /^(\d{1,2})\/(\d{1,2})\/(\d{4})$/.exec(cells[index.date] ?? '');
    if (!date) throw fileError(path, line, `date "${cells[index.date] ?? ''}" must be MM/DD/YYYY`);
    const time = /^(\d{1,2}):(\d{2})$/.exec(cells[index.time] ?? '');
    if (!time) throw fileError(path, line, `time "${cells[index.time] ?? ''}" must be HH:MM`);
    const [month, day, year] = [Number(date[1]), Number(date[2]), Number(date[3])];
    const [hour, minute] = [Number(time[1]), Number(time[2])];
    if (month < 1 || month > 12 || day < 1 || day > 31 || hour > 24 || minute > 59) throw fileError(path, line, `time stamp ${cells[index.date]} ${cells[index.time]} is out of range`);
    const v = (k: keyof typeof COLUMNS, what: string) => {
      if (index[k] < 0) return NaN;
      // A source flag "?" (the column after the value) marks the value as missing.
      if ((cells[index[k] + 1] ?? '') === '?' && k !== 'date' && k !== 'time') return NaN;
      return cellNumber(path, line, cells[index[k]], what, MISSING);
    };
    const aod = v('aod', 'aerosol optical depth');
    const albedo = v('albedo', 'albedo');
    return {
      line,
      endUtcMs: utcMsOf(year, month, day, hour, minute, site.utcOffsetHours),
      localLabel: `${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}T${String(hour).padStart(2, '0')}:${String(minute).padStart(2, '0')}`,
      month,
      ghiWm2: v('ghi', 'GHI [W/m²]'),
      dniWm2: v('dni', 'DNI [W/m²]'),
      dhiWm2: v('dhi', 'DHI [W/m²]'),
      airTempC: v('dryBulb', 'dry-bulb temperature [°C]'),
      dewPointC: v('dewPoint', 'dew-point temperature [°C]'),
      relHumidityPct: v('relHumidity', 'relative humidity [%]'),
      pressureHpa: v('pressure', 'pressure [mbar]'),
      windMs: v('wind', 'wind speed [m/s]'),
      waterCm: v('water', 'precipitable water [cm]'),
      aodBroadband: aod > 0 ? aod : NaN,
      albedo: albedo > 0 && albedo <= 1 ? albedo : NaN,
    };
  });
  return { format: 'tmy3', path, sha256, site, hours };
}
