/** Weather files: EPW or NSRDB TMY3 CSV, told apart by their first line. */
import { closeSync, openSync, readSync } from 'node:fs';
import { UserError } from '../../errors.js';
import { readEpw } from './epw.js';
import { readTmy3 } from './tmy3.js';
import type { WeatherFile } from './types.js';

export type { WeatherFile, WeatherHour, WeatherSite } from './types.js';
export { readEpw } from './epw.js';
export { readTmy3 } from './tmy3.js';

/** Read a weather file, EPW (first line LOCATION,…) or TMY3 CSV (site line, then a Date (MM/DD/YYYY) header). */
export function readWeatherFile(path: string): WeatherFile {
  let start: string;
  try {
    const fd = openSync(path, 'r');
    const buf = Buffer.alloc(4096);
    const n = readSync(fd, buf, 0, buf.length, 0);
    closeSync(fd);
    start = buf.subarray(0, n).toString('utf8');
  } catch (err) {
    throw new UserError(`${path}: cannot open the weather file (${(err as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  const text = start.replace(/^\uFEFF/, '');
  if (/^LOCATION,/i.test(text)) return readEpw(path);
  const second = text.split(/\r?\n/)[1] ?? '';
  if (second.startsWith('Date (MM/DD/YYYY)')) return readTmy3(path);
  throw new UserError(`${path}:1: not a weather file this reader knows: expected EPW (first line "LOCATION,…") or NSRDB TMY3 CSV (second line "Date (MM/DD/YYYY),Time (HH:MM),…")`);
}
