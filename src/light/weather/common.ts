/** Shared pieces of the weather readers: file reading, numbers with missing-value codes, time stamps. */
import { csvParseSync } from '../../io/csv-parse.js';
import { UserError, fileError } from '../../errors.js';
import { sha256Hex } from '../spectrum.js';
import { readUserFile } from '../../io/read-user-file.js';

/** Largest weather file read [bytes] (an hourly year is about 1–2 MB). */
export const MAX_WEATHER_FILE_BYTES = 64 * 2 ** 20;

export function readWeatherBytes(path: string): { text: string; sha256: string } {
  // The project's safe reader: a regular file only, bounded before and while reading, every failure naming the file.
  const bytes = readUserFile(path, { what: 'weather file', maxBytes: MAX_WEATHER_FILE_BYTES });
  if (bytes.includes(0)) throw fileError(path, undefined, 'contains binary data (NUL bytes); expected a text weather file');
  return { text: bytes.toString('utf8').replace(/^\uFEFF/, ''), sha256: sha256Hex(bytes) };
}


/**
 * Rows of CSV text from a 1-based line on, with their line numbers. Quote-free
 * text is split directly (an hourly year holds over half a million cells, and
 * without quotes CSV fields are exactly the text between commas, so this
 * agrees with csv-parse, as test/light/weather.test.ts checks); text with
 * quotes goes through csv-parse. Empty lines are skipped; ragged rows are left
 * for the caller to check.
 */
export function csvRows(path: string, text: string, fromLine: number): { line: number; cells: string[] }[] {
  const lines = text.split('\n');
  const body = lines.slice(fromLine - 1);
  if (!body.some((l) => l.includes('"'))) {
    const rows: { line: number; cells: string[] }[] = [];
    for (let k = 0; k < body.length; k++) {
      const l = body[k].endsWith('\r') ? body[k].slice(0, -1) : body[k];
      if (l.trim() === '') continue;
      rows.push({ line: fromLine + k, cells: l.split(',').map((c) => c.trim()) });
    }
    return rows;
  }
  return csvParseRows(path, text, fromLine);
}

/** The same through csv-parse (quoted fields). */
export function csvParseRows(path: string, text: string, fromLine: number): { line: number; cells: string[] }[] {
  const parse = csvParseSync();
  try {
    const records = parse(text, { from_line: fromLine, relax_column_count: true, skip_empty_lines: true, info: true, trim: true }) as unknown as { record: string[]; info: { lines: number } }[];
    return records.map((r) => ({ line: r.info.lines, cells: r.record }));
  } catch (err) {
    const e = err as { lines?: number; message: string };
    throw fileError(path, e.lines, `not readable as CSV: ${e.message.split('\n')[0]}`);
  }
}

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * A number from a cell, NaN when it equals one of the format's missing-value
 * codes (compared as numbers) or is empty; a file:line error when it is not a number.
 */
export function cellNumber(path: string, line: number, cell: string | undefined, field: string, missing: readonly number[] = []): number {
  const t = (cell ?? '').trim();
  if (t === '') return NaN;
  if (!DECIMAL.test(t)) throw fileError(path, line, `${field} "${t}" is not a number`);
  const x = Number(t);
  return missing.some((m) => Math.abs(x - m) < 1e-9) ? NaN : x;
}

/** UTC instant [ms] of a local-standard-time stamp; hour may be 24 (end of day). */
export function utcMsOf(year: number, month: number, day: number, hour: number, minute: number, utcOffsetHours: number): number {
  return Date.UTC(year, month - 1, day, hour, minute) - utcOffsetHours * 3_600_000;
}
