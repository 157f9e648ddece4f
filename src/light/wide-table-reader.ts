/**
 * A streaming reader for wide tables with one spectrum per column (an hourly
 * year is 8760 columns by a few thousand wavelengths, ≈ 150 MB of text). The
 * file is read in chunks; every value is parsed straight from the bytes into
 * one column-major Float64Array, so each member's table is a view into it and
 * no per-cell string, row object or per-point array is made. Members with the
 * same rows share one wavelength array.
 *
 * It reads the well-formed case only. On anything else (quotes, non-ASCII,
 * a bad or missing value, rows out of order, a ragged row) it returns
 * undefined, and the caller's row-by-row reader reads the file again and
 * reports the problem with its usual file:line message, so both paths accept
 * exactly the same files with the same numbers.
 *
 * The file is opened and read through the safe reader's steps (a regular file
 * only, its size checked before and while reading, failures as one line
 * naming the file), so the fast path refuses what readUserFile refuses.
 */
import { createHash } from 'node:crypto';
import { closeSync } from 'node:fs';
import { checkGrowth, openUserFile, readUserChunk, type ReadUserFileOptions } from '../io/read-user-file.js';

/** Cells that stand for "no value here" (compared lower-case), as in the row-by-row reader. */
const MISSING = new Set(['', 'nan', 'na', 'n/a', '-', 'null']);

const CHUNK_BYTES = 8 * 2 ** 20;

/** The parsed body of a column-wise wide table. */
export interface WideColumns {
  /** Comment lines (anywhere), the header and the meta rows under it, with 1-based line numbers. */
  preamble: { line: number; text: string }[];
  /** Abscissa of each data row, as written (ascending checked by the caller). */
  abscissa: Float64Array;
  /** 1-based line of each data row. */
  lines: Int32Array;
  /** values[c·stride + r]: column c (0-based, after the abscissa column), data row r; a column's rows are contiguous. */
  values: Float64Array;
  stride: number;
  /** SHA-256 (hex) of the file bytes. */
  sha256: string;
  rows: number;
  columns: number;
  /** First and last data row with a value, per column (−1 when none). */
  first: Int32Array;
  last: Int32Array;
}

const CR = 13;
const LF = 10;
const SP = 32;
const TAB = 9;
const HASH = 35;
const QUOTE = 34;

/** Powers of ten exactly representable as doubles (10^0 … 10^22). */
const EXACT_POW10 = Array.from({ length: 23 }, (_, i) => Number(`1e${i}`));

/**
 * Parse the decimal number in bytes [a, b) under the grammar
 * [+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?. Returns NaN when the text does not
 * match. The value equals Number(text): with at most 15 significant digits and
 * a decimal exponent within ±22, digits × 10^e (or ÷ 10^−e) is one correctly
 * rounded operation on exact operands (Clinger's fast path); other text goes
 * through Number itself.
 */
export function parseDecimal(buf: Uint8Array, a: number, b: number): number {
  let i = a;
  let neg = false;
  if (i < b && (buf[i] === 43 || buf[i] === 45)) {
    neg = buf[i] === 45;
    i++;
  }
  let mant = 0;
  let digits = 0;
  let sig = 0;
  let intDigits = 0;
  let fracDigits = 0;
  while (i < b && buf[i] >= 48 && buf[i] <= 57) {
    if (mant !== 0 || buf[i] !== 48) sig++;
    mant = mant * 10 + (buf[i] - 48);
    intDigits++;
    i++;
  }
  if (i < b && buf[i] === 46) {
    i++;
    while (i < b && buf[i] >= 48 && buf[i] <= 57) {
      if (mant !== 0 || buf[i] !== 48) sig++;
      mant = mant * 10 + (buf[i] - 48);
      fracDigits++;
      i++;
    }
  }
  digits = intDigits + fracDigits;
  if (digits === 0) return NaN;
  let exp = 0;
  if (i < b && (buf[i] === 101 || buf[i] === 69)) {
    i++;
    let eneg = false;
    if (i < b && (buf[i] === 43 || buf[i] === 45)) {
      eneg = buf[i] === 45;
      i++;
    }
    const e0 = i;
    while (i < b && buf[i] >= 48 && buf[i] <= 57) {
      exp = exp * 10 + (buf[i] - 48);
      if (exp > 1e6) exp = 1e6;
      i++;
    }
    if (i === e0) return NaN;
    if (eneg) exp = -exp;
  }
  if (i !== b) return NaN;
  const e10 = exp - fracDigits;
  let v: number;
  if (sig <= 15 && e10 >= -22 && e10 <= 22) v = e10 >= 0 ? mant * EXACT_POW10[e10] : mant / EXACT_POW10[-e10];
  else v = Number(String.fromCharCode.apply(null, buf.subarray(a, b) as unknown as number[]));
  return neg ? -v : v;
}

function isMissing(buf: Uint8Array, a: number, b: number): boolean {
  if (b - a > 4) return false;
  let t = '';
  for (let i = a; i < b; i++) t += String.fromCharCode(buf[i] | (buf[i] >= 65 && buf[i] <= 90 ? 32 : 0));
  return MISSING.has(t);
}

/**
 * Read a column-wise wide table, or undefined when the file is not the plain
 * well-formed case (see the module comment). `isMetaTitle` tells the weight
 * and temperature rows that may follow the header. A file that is not a
 * regular file, is larger than `limits.maxBytes` (before or while reading) or
 * cannot be opened or read throws the safe reader's UserError naming it.
 */
export function readWideColumns(file: string, isMetaTitle: (firstCell: string) => boolean, limits: ReadUserFileOptions): WideColumns | undefined {
  const { fd, size } = openUserFile(file, limits);
  try {
    // At least 64 KiB: a file may hold more than its reported size (which is 0 for /proc-like files).
    let chunk = Buffer.allocUnsafe(Math.min(CHUNK_BYTES, Math.max(1 << 16, size + 1)));
    // Pass 1: count lines (so the value matrix is allocated once), reading to the end as the file is now.
    let lineCount = 1;
    for (let pos = 0; ; ) {
      const n = readUserChunk(file, limits.what, fd, chunk, 0, chunk.length, pos);
      if (n <= 0) break;
      pos += n;
      checkGrowth(file, limits, pos);
      const view = chunk.subarray(0, n);
      for (let i = view.indexOf(LF); i >= 0; i = view.indexOf(LF, i + 1)) lineCount++;
    }
    // Pass 2: parse, and hash the same bytes; a file that gained lines in between is left to the row-by-row reader.
    const hash = createHash('sha256');
    const preamble: { line: number; text: string }[] = [];
    let delimiter = -1; // byte, or 0 for runs of spaces and tabs
    let columns = -1;
    let rows = 0;
    let cap = 0;
    let values = new Float64Array(0);
    let abscissa = new Float64Array(0);
    let lines = new Int32Array(0);
    let first = new Int32Array(0);
    let last = new Int32Array(0);
    let ended = new Uint8Array(0);
    let inData = false;
    let lineNo = 0;
    let failed = false;

    const startData = () => {
      cap = lineCount;
      values = new Float64Array(columns * cap);
      abscissa = new Float64Array(cap);
      lines = new Int32Array(cap);
      first = new Int32Array(columns).fill(-1);
      last = new Int32Array(columns).fill(-1);
      ended = new Uint8Array(columns);
      inData = true;
    };

    /** Handle one line [a, b) of buf (no LF). Returns false to give up. */
    const onLine = (buf: Uint8Array, a: number, b: number): boolean => {
      lineNo++;
      while (a < b && (buf[a] === SP || buf[a] === TAB || buf[a] === CR)) a++;
      while (b > a && (buf[b - 1] === SP || buf[b - 1] === TAB || buf[b - 1] === CR)) b--;
      if (a === b) return true;
      if (buf[a] === HASH) {
        // Comments anywhere are kept: directives may stand on any comment line.
        for (let i = a; i < b; i++) if (buf[i] >= 0x80) return false;
        preamble.push({ line: lineNo, text: Buffer.from(buf.buffer, buf.byteOffset + a, b - a).toString('latin1') });
        return true;
      }
      if (columns < 0) {
        // The header: its delimiter decides the table's, as in the row-by-row reader.
        for (let i = a; i < b; i++) if (buf[i] === QUOTE || buf[i] >= 0x80) return false;
        const text = Buffer.from(buf.buffer, buf.byteOffset + a, b - a).toString('latin1');
        delimiter = text.includes(',') ? 44 : text.includes(';') ? 59 : 0;
        const cells = delimiter ? text.split(String.fromCharCode(delimiter)) : text.split(/[ \t]+/);
        columns = cells.length - 1;
        if (columns < 1) return false;
        preamble.push({ line: lineNo, text });
        return true;
      }
      // Split [a, b) into cells; cell k spans [s, e).
      let k = 0;
      let s = a;
      let x = NaN;
      const r = rows;
      for (let i = a; i <= b; i++) {
        if (k >= 1 && delimiter && i === s) {
          // Fast path for a plain value "ddd.ddd" ending at the delimiter or the line end:
          // digits are read once, with the cell; anything else takes the general path below.
          let j = i;
          let mant = 0;
          let sig = 0;
          let frac = -1;
          while (j < b) {
            const c = buf[j];
            if (c >= 48 && c <= 57) {
              if (mant !== 0 || c !== 48) sig++;
              mant = mant * 10 + (c - 48);
              if (frac >= 0) frac++;
            } else if (c === 46 && frac < 0) frac = 0;
            else break;
            j++;
          }
          const digits = j - i - (frac >= 0 ? 1 : 0);
          if (digits > 0 && sig <= 15 && frac <= 22 && (j === b || buf[j] === delimiter)) {
            const col = k - 1;
            if (col >= columns || ended[col]) return false;
            values[col * cap + r] = frac > 0 ? mant / EXACT_POW10[frac] : mant;
            if (first[col] < 0) first[col] = r;
            last[col] = r;
            k++;
            i = j;
            s = j + 1;
            continue;
          }
        }
        const atEnd = i === b;
        const c = atEnd ? -1 : buf[i];
        const isDelim = delimiter ? c === delimiter : c === SP || c === TAB;
        if (!atEnd && !isDelim) continue;
        let cs = s;
        let ce = i;
        if (delimiter) {
          while (cs < ce && (buf[cs] === SP || buf[cs] === TAB)) cs++;
          while (ce > cs && (buf[ce - 1] === SP || buf[ce - 1] === TAB)) ce--;
        }
        if (k === 0) {
          // The first cell: a meta row before the data, else the abscissa.
          const x0 = parseDecimal(buf, cs, ce);
          if (Number.isNaN(x0)) {
            const title = Buffer.from(buf.buffer, buf.byteOffset + cs, ce - cs).toString('latin1');
            if (!inData && isMetaTitle(title)) {
              preamble.push({ line: lineNo, text: Buffer.from(buf.buffer, buf.byteOffset + a, b - a).toString('latin1') });
              return true;
            }
            return false;
          }
          if (!inData) startData();
          if (r >= cap) return false;
          if (!(x0 > 0) || !Number.isFinite(x0) || (r > 0 && !(x0 > abscissa[r - 1]))) return false;
          x = x0;
        } else {
          const col = k - 1;
          if (col >= columns) return false;
          if (isMissing(buf, cs, ce)) {
            values[col * cap + r] = NaN;
            if (first[col] >= 0) ended[col] = 1;
          } else {
            if (ended[col]) return false;
            const y = parseDecimal(buf, cs, ce);
            if (!(y >= 0) || !Number.isFinite(y)) return false;
            values[col * cap + r] = y;
            if (first[col] < 0) first[col] = r;
            last[col] = r;
          }
        }
        k++;
        if (!delimiter) {
          while (i + 1 < b && (buf[i + 1] === SP || buf[i + 1] === TAB)) i++;
        }
        s = i + 1;
      }
      if (k !== columns + 1) return false;
      abscissa[r] = x;
      lines[r] = lineNo;
      rows++;
      return true;
    };

    // Lines are handled where they lie in the buffer; an unfinished line moves to its start.
    let held = 0;
    for (let pos = 0; !failed; ) {
      if (held === chunk.length) {
        const bigger = Buffer.allocUnsafe(2 * chunk.length);
        chunk.copy(bigger, 0, 0, held);
        chunk = bigger;
      }
      const n = readUserChunk(file, limits.what, fd, chunk, held, chunk.length - held, pos);
      if (n <= 0) break;
      pos += n;
      checkGrowth(file, limits, pos);
      hash.update(chunk.subarray(held, held + n));
      const end = held + n;
      let start = 0;
      for (let i = chunk.indexOf(LF, held); i >= 0 && i < end; i = chunk.indexOf(LF, i + 1)) {
        if (!onLine(chunk, start, i)) {
          failed = true;
          break;
        }
        start = i + 1;
      }
      held = end - start;
      if (held > 0 && start > 0) chunk.copy(chunk, 0, start, end);
    }
    if (!failed && held > 0 && !onLine(chunk, 0, held)) failed = true;
    if (failed || !inData || rows === 0) return undefined;
    return { preamble, abscissa: abscissa.subarray(0, rows), lines: lines.subarray(0, rows), values, stride: cap, rows, columns, first, last, sha256: hash.digest('hex') };
  } finally {
    closeSync(fd);
  }
}
