import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { UserError } from '../../src/errors.js';
import { assertNotAnInput, forgetInputs } from '../../src/io/inputs.js';
import { loadEnsemble, MAX_ENSEMBLE_FILE_BYTES, type Ensemble } from '../../src/light/ensemble.js';
import { parseDecimal, readWideColumns } from '../../src/light/wide-table-reader.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-wide-'));
const write = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};
const bytes = (t: string) => new TextEncoder().encode(t);

/** Everything a member carries, as plain data, for comparing the two readers. */
const plain = (e: Ensemble) => ({
  ...e,
  members: e.members.map((m) => ({
    ...m,
    spectrum: { ...m.spectrum, wavelengthNm: Array.from(m.spectrum.wavelengthNm), irradiance: Array.from(m.spectrum.irradiance), photonFlux: Array.from(m.spectrum.photonFlux), cumulativePhotons: Array.from(m.spectrum.cumulativePhotons) },
  })),
});

describe('decimal parsing straight from bytes agrees with Number() (ECMAScript number grammar, the reference)', () => {
  test('on written doubles of every magnitude and on hand-picked text', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: 0 }), fc.integer({ min: 1, max: 17 }), (x, p) => {
        for (const t of [String(x), x.toPrecision(p), x.toExponential(p - 1)]) expect(Object.is(parseDecimal(bytes(t), 0, t.length), Number(t))).toBe(true);
      }),
      { numRuns: 3000 },
    );
    for (const t of ['0', '-0', '+1.5', '1.', '.5', '007', '1e5', '1E-5', '2.7000e-23', '123456789012345678901234567890', '0.1', '9007199254740993', '1e-400', '1e400']) {
      expect(Object.is(parseDecimal(bytes(t), 0, t.length), Number(t))).toBe(true);
    }
  });
  test('text outside the table grammar is refused (NaN), as the row-by-row reader refuses it', () => {
    for (const t of ['', '.', '-', '+', 'e5', '1e', '1e+', '0x10', '1_0', 'Infinity', '1.2.3', ' 1', '1,5', 'nan']) expect(parseDecimal(bytes(t), 0, t.length)).toBeNaN();
  });
});

describe('the streaming wide-table reader gives exactly what the row-by-row reader gives', () => {
  const wl = Array.from({ length: 40 }, (_, i) => 300 + 25 * i);
  const col = (k: number) => wl.map((l, i) => ((1 + k) * Math.sin(i / 7 + k) ** 2 * 1.3).toPrecision(6));
  const cases: [string, string, string][] = [
    ['comma, weights in hours, temperatures, a blank head and tail', 'a.csv', ['# units: nm,W/m2/nm', '# weight_unit: hours', 'wavelength_nm,2024-06-01T12:00,B,C', 'weight_h,2,3.5,1', 'temp_k,310,,305', ...wl.map((l, i) => `${l},${i < 3 ? '' : col(0)[i]},${col(1)[i]},${i > 35 ? 'nan' : col(2)[i]}`)].join('\n')],
    ['tabs and spaces, CRLF line ends', 'b.tsv', ['# units: nm,W/m2/nm', 'wavelength_nm\tA \t B', ...wl.map((l, i) => `${l}\t ${col(0)[i]}  \t${col(1)[i]}`)].join('\r\n')],
    ['micrometres and W/m²/µm (converted)', 'c.csv', ['wavelength_um,A,B', '# units: um,W/m2/um', ...wl.map((l, i) => `${l / 1000},${col(0)[i]},${col(1)[i]}`)].join('\n')],
    ['semicolons, whitespace-separated exponents', 'd.csv', ['# units: nm,W/m2/nm', 'wavelength_nm;A;B', ...wl.map((l, i) => `${l};${Number(col(0)[i]).toExponential(3)};${col(1)[i]}`)].join('\n')],
  ];
  test.each(cases)('%s', (_name, file, text) => {
    const p = write(file, text);
    const streamed = loadEnsemble(p, { defaultTempK: 300 });
    const rowByRow = loadEnsemble(p, { defaultTempK: 300, streaming: false });
    expect(streamed.members.length).toBeGreaterThan(1);
    expect(plain(streamed)).toEqual(plain(rowByRow));
    // The streaming path did read it: its members are views into one value table (or, converted, share their grid source).
    if (!file.startsWith('c')) expect(streamed.members[0].spectrum.irradiance.buffer).toBe(streamed.members[1].spectrum.irradiance.buffer);
    expect(rowByRow.members[0].spectrum.irradiance.buffer).not.toBe(rowByRow.members[1].spectrum.irradiance.buffer);
  });

  test('any written values (fixed, exponent, long, zero) read the same both ways', () => {
    const cell = fc.oneof(
      fc.double({ min: 0, max: 1e4, noNaN: true }).map((v) => String(v)),
      fc.tuple(fc.double({ min: 0, max: 10, noNaN: true }), fc.integer({ min: 0, max: 20 })).map(([v, d]) => v.toFixed(d)),
      fc.tuple(fc.double({ min: 0, max: 10, noNaN: true }), fc.integer({ min: 1, max: 17 })).map(([v, p]) => v.toPrecision(p)),
      fc.double({ min: 0, max: 1, noNaN: true }).map((v) => v.toExponential(3)),
      fc.constantFrom('0', '0.0', '00012', '1.', '.5', '+2'),
    );
    fc.assert(
      fc.property(fc.array(fc.tuple(cell, cell), { minLength: 30, maxLength: 30 }), (pairs) => {
        const p = write('prop.csv', ['# units: nm,W/m2/nm', 'wavelength_nm,A,B', ...pairs.map(([u, v], i) => `${300 + 10 * i},${u},${v}`), ''].join('\n'));
        const a = loadEnsemble(p, { defaultTempK: 300 });
        const b = loadEnsemble(p, { defaultTempK: 300, streaming: false });
        for (const k of [0, 1]) expect(Array.from(a.members[k].spectrum.irradiance)).toEqual(Array.from(b.members[k].spectrum.irradiance));
      }),
      { numRuns: 150 },
    );
  });

  test('members with the same rows share one wavelength array; the values are views into one table', () => {
    const e = loadEnsemble(write('share.csv', cases[1][2]), { defaultTempK: 300 });
    expect(e.members[0].spectrum.wavelengthNm).toBe(e.members[1].spectrum.wavelengthNm);
    expect(e.members[0].spectrum.irradiance.buffer).toBe(e.members[1].spectrum.irradiance.buffer);
  });

  test.each([
    ['a value resumes after a blank', [...wl.map((l, i) => `${l},${i === 5 ? '' : col(0)[i]},${col(1)[i]}`)], /resumes after a blank at line/],
    ['a negative value', [...wl.map((l, i) => `${l},${i === 5 ? '-1' : col(0)[i]},${col(1)[i]}`)], /negative spectral value -1/],
    ['text in a value', [...wl.map((l, i) => `${l},${i === 5 ? 'x1' : col(0)[i]},${col(1)[i]}`)], /"x1" is not a finite number/],
    ['wavelengths out of order', [...wl.map((l, i) => `${i === 5 ? 100 : l},${col(0)[i]},${col(1)[i]}`)], /must be strictly ascending/],
    ['a ragged row', [...wl.map((l, i) => `${l},${col(0)[i]}${i === 5 ? '' : `,${col(1)[i]}`}`)], /expected 3 cells/],
  ] as const)('%s: refused with the row-by-row reader’s file:line message', (_name, body, message) => {
    const p = write('bad.csv', ['# units: nm,W/m2/nm', 'wavelength_nm,A,B', ...body].join('\n'));
    expect(() => loadEnsemble(p, { defaultTempK: 300 })).toThrow(message);
    expect(() => loadEnsemble(p, { defaultTempK: 300 })).toThrow(/bad\.csv:\d+/);
  });
});

describe('the streaming reader reads user files as the safe reader does (regular files only, size before and while reading, errors naming the file)', () => {
  const wl = Array.from({ length: 30 }, (_, i) => 300 + 25 * i);
  const table = ['# units: nm,W/m2/nm', 'wavelength_nm,A,B', ...wl.map((l, i) => `${l},${1 + i / 10},${2 + i / 10}`)].join('\n');
  const meta = () => false;

  test('a file above the limit is refused before reading, naming the file', () => {
    const p = write('big.csv', table);
    expect(() => readWideColumns(p, meta, { what: 'ensemble file', maxBytes: 100 })).toThrow(UserError);
    expect(() => readWideColumns(p, meta, { what: 'ensemble file', maxBytes: 100 })).toThrow(/big\.csv: .*ensemble file above 100 bytes is refused/);
  });

  test.skipIf(!existsSync('/proc/self/status'))('a file that reports size 0 but holds more than the limit is refused while reading', () => {
    expect(() => readWideColumns('/proc/self/status', meta, { what: 'ensemble file', maxBytes: 10 })).toThrow(/\/proc\/self\/status: grew past 10 bytes while being read/);
  });

  test('a folder, a FIFO and a missing file are one-line user errors naming the path', () => {
    const limits = { what: 'ensemble file', maxBytes: MAX_ENSEMBLE_FILE_BYTES };
    const folder = join(dir, 'a-folder.csv');
    mkdirSync(folder, { recursive: true });
    expect(() => readWideColumns(folder, meta, limits)).toThrow(/a-folder\.csv: is a folder/);
    const missing = join(dir, 'missing.csv');
    expect(() => readWideColumns(missing, meta, limits)).toThrow(/missing\.csv: cannot open ensemble file \(ENOENT: no such file\)/);
    const fifo = join(dir, 'pipe.csv');
    if (spawnSync('mkfifo', [fifo]).status === 0) {
      // Opened without waiting for a writer and refused: the test would hang otherwise.
      expect(() => readWideColumns(fifo, meta, limits)).toThrow(/pipe\.csv: is not a regular file/);
      expect(() => loadEnsemble(fifo, { defaultTempK: 300 })).toThrow(/pipe\.csv: is not a regular file/);
    }
  });

  test('permission denied (the test-only injection) is a user error naming the file, from loadEnsemble too', () => {
    const p = write('locked-wide.csv', table);
    const before = process.env.GAPSTACK_FAULT_INJECTION;
    process.env.GAPSTACK_FAULT_INJECTION = 'eacces:locked-wide.csv';
    try {
      expect(() => readWideColumns(p, meta, { what: 'ensemble file', maxBytes: MAX_ENSEMBLE_FILE_BYTES })).toThrow(/locked-wide\.csv: cannot open ensemble file \(EACCES: permission denied\)/);
      expect(() => loadEnsemble(p, { defaultTempK: 300 })).toThrow(UserError);
      expect(() => loadEnsemble(p, { defaultTempK: 300 })).toThrow(/locked-wide\.csv: cannot open ensemble file \(EACCES: permission denied\)/);
    } finally {
      if (before === undefined) delete process.env.GAPSTACK_FAULT_INJECTION;
      else process.env.GAPSTACK_FAULT_INJECTION = before;
    }
  });

  test('a table read by the streaming path is an input of the run: no output may replace it', () => {
    const p = write('input-wide.csv', table);
    forgetInputs();
    const e = loadEnsemble(p, { defaultTempK: 300 });
    // The streaming path read it (members are views into one value table).
    expect(e.members[0].spectrum.irradiance.buffer).toBe(e.members[1].spectrum.irradiance.buffer);
    expect(() => assertNotAnInput(p, '--out')).toThrow(/--out .*input-wide\.csv is an input of this run/);
    forgetInputs();
  });
});
