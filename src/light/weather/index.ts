/** Weather files: EPW or NSRDB TMY3 CSV, told apart by their first line. */
import { closeSync } from 'node:fs';
import { openUserFile, readUserChunk } from '../../io/read-user-file.js';
import { MAX_WEATHER_FILE_BYTES } from './common.js';
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
  const { fd } = openUserFile(path, { what: 'weather file', maxBytes: MAX_WEATHER_FILE_BYTES });
  try {
    const buf = Buffer.alloc(4096);
    const n = readUserChunk(path, 'weather file', fd, buf, 0, buf.length, 0);
    start = buf.subarray(0, n).toString('utf8');
  } finally {
    closeSync(fd);
  }
  const text = start.replace(/^\uFEFF/, '');
  if (/^LOCATION,/i.test(text)) return readEpw(path);
  const second = text.split(/\r?\n/)[1] ?? '';
  if (second.startsWith('Date (MM/DD/YYYY)')) return readTmy3(path);
  throw new UserError(`${path}:1: not a weather file this reader knows: expected EPW (first line "LOCATION,…") or NSRDB TMY3 CSV (second line "Date (MM/DD/YYYY),Time (HH:MM),…")`);
}
