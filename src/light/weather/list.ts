/**
 * Which weather files a list of paths names: files as given, folders
 * expanded to their weather files (not recursive, in name order). Shared by
 * the batch over sites and design files' `sites:`.
 */
import { readdirSync, statSync } from 'node:fs';
import { extname, join } from 'node:path';
import { UserError } from '../../errors.js';

/** Weather-file extensions picked up from a folder. */
export const WEATHER_EXTENSIONS = ['.epw', '.csv'];

/** Expand folders (their weather files, not recursive) and keep files as given. */
export function listWeatherFiles(inputs: readonly string[]): string[] {
  const out: string[] = [];
  for (const input of inputs) {
    let st;
    try {
      st = statSync(input);
    } catch {
      throw new UserError(`${input}: no such weather file or folder`);
    }
    if (st.isDirectory()) {
      const found = readdirSync(input).filter((f) => WEATHER_EXTENSIONS.includes(extname(f).toLowerCase())).sort();
      if (found.length === 0) throw new UserError(`${input}: no weather files (${WEATHER_EXTENSIONS.join(', ')}) in this folder`);
      out.push(...found.map((f) => join(input, f)));
    } else out.push(input);
  }
  if (out.length === 0) throw new UserError('no weather files given');
  return out;
}
