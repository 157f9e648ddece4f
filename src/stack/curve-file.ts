/**
 * Measured curves of one subcell from a table file: absorptance of the
 * isolated film, EQE measured in the stack (both fractions or percent), or an
 * absorption coefficient α [cm⁻¹]. The same table formats as spectra (CSV,
 * TSV, whitespace, `#` comments), a header naming the abscissa unit (nm, um or
 * eV) and the quantity, and errors that name the file and line.
 */
import { statSync } from 'node:fs';
import { readUserFile } from '../io/read-user-file.js';
import { HC_EV_NM } from '../physics/constants.js';
import { UserError, fileError } from '../errors.js';
import { abscissaUnitOf, splitTableRows, type AbscissaUnit } from '../light/table-file.js';

export type CurveQuantity = 'absorptance' | 'eqe' | 'alpha';

/** A curve on ascending photon energy [eV]; values are fractions [-] or α [cm⁻¹]. */
export interface MeasuredCurve {
  energyEv: number[];
  value: number[];
  /** The file's base name, for reports. */
  source: string;
}

/** Largest curve file read [bytes]. */
const MAX_CURVE_FILE_BYTES = 8 * 1024 * 1024;
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

const HEADER_HELP: Record<CurveQuantity, string> = {
  absorptance: 'e.g. "wavelength_nm,absorptance" (fraction 0–1) or "energy_eV,absorptance_percent"',
  eqe: 'e.g. "wavelength_nm,eqe" (fraction 0–1) or "wavelength_nm,eqe_percent"',
  alpha: 'e.g. "energy_eV,alpha_cm-1" (absorption coefficient per cm)',
};

/** Scale of the value column from its header: 1 for fractions, 0.01 for percent, 1 for α in cm⁻¹; undefined if unclear. */
function valueScale(quantity: CurveQuantity, header: string): number | undefined {
  const h = header.toLowerCase().replace(/⁻/g, '-').replace(/¹/g, '1');
  if (quantity === 'alpha') {
    if (!/alpha|α|absorption[_ ]?coeff/.test(h)) return undefined;
    return /cm-1|\/cm|per[_ ]?cm|cm\^-1|1_cm|_cm$/.test(h) && !/\bm-1|\/m\b/.test(h.replace(/cm/g, '')) ? 1 : undefined;
  }
  const named = quantity === 'eqe' ? /eqe|quantum/.test(h) : /absorptance|absorption/.test(h);
  if (!named) return undefined;
  return /%|percent|pct/.test(h) ? 0.01 : 1;
}

/**
 * Parse a measured curve from table text (file name used in messages). The
 * header row is required: it states the abscissa unit and the quantity.
 */
export function curveFromText(file: string, text: string, quantity: CurveQuantity): MeasuredCurve {
  const rows = splitTableRows(file, text);
  if (rows.length === 0) throw fileError(file, undefined, 'holds no data rows');
  const head = rows[0];
  if (head.cells.length !== 2 || NUMBER.test(head.cells[0])) {
    throw fileError(file, head.line, `needs a header naming two columns, ${HEADER_HELP[quantity]}`);
  }
  const x: AbscissaUnit | undefined = abscissaUnitOf(head.cells[0]);
  if (!x) throw fileError(file, head.line, `header column "${head.cells[0]}" names no abscissa unit (nm, um or eV)`);
  const scale = valueScale(quantity, head.cells[1]);
  if (scale === undefined) throw fileError(file, head.line, `header column "${head.cells[1]}" does not name ${quantity === 'alpha' ? 'an absorption coefficient in cm⁻¹' : `the ${quantity === 'eqe' ? 'EQE' : 'absorptance'}`}; ${HEADER_HELP[quantity]}`);
  const points: { e: number; v: number; line: number }[] = [];
  let prev = -Infinity;
  for (const { line, cells } of rows.slice(1)) {
    if (cells.length !== 2) throw fileError(file, line, `expected 2 columns, found ${cells.length}`);
    for (const cell of cells) if (!NUMBER.test(cell)) throw fileError(file, line, `"${cell}" is not a finite number`);
    const a = Number(cells[0]);
    const v = Number(cells[1]) * scale;
    if (!(a > 0) || !Number.isFinite(a)) throw fileError(file, line, `abscissa ${cells[0]} must be positive`);
    if (a === prev) throw fileError(file, line, `duplicated abscissa ${cells[0]}`);
    if (a < prev) throw fileError(file, line, `abscissa ${cells[0]} is below the previous row's ${prev}: the table must be strictly ascending`);
    prev = a;
    if (!Number.isFinite(v) || v < 0) throw fileError(file, line, `value ${cells[1]} must be zero or positive`);
    if (quantity !== 'alpha' && v > 1 + 1e-12) {
      throw fileError(file, line, `value ${cells[1]} is above ${scale === 1 ? '1: the column holds fractions (name it "…_percent" for percent)' : '100 %'}`);
    }
    const e = x === 'ev' ? a : HC_EV_NM / (x === 'um' ? a * 1000 : a);
    points.push({ e, v: Math.min(v, quantity === 'alpha' ? Infinity : 1), line });
  }
  if (points.length < 2) throw fileError(file, undefined, `has ${points.length} data rows; at least 2 are needed`);
  points.sort((p, q) => p.e - q.e);
  return { energyEv: points.map((p) => p.e), value: points.map((p) => p.v), source: file.split(/[\\/]/).pop() ?? file };
}

/** Read a measured curve from a file (see `curveFromText`). */
export function readCurveFile(file: string, quantity: CurveQuantity): MeasuredCurve {
  let size: number;
  try {
    const st = statSync(file);
    if (!st.isFile()) throw fileError(file, undefined, 'is not a regular file');
    size = st.size;
  } catch (err) {
    if (err instanceof UserError) throw err;
    throw new UserError(`${file}: cannot open ${quantity} file (${(err as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  if (size > MAX_CURVE_FILE_BYTES) throw fileError(file, undefined, `is above ${MAX_CURVE_FILE_BYTES / 2 ** 20} MiB; a measured curve is a few kB`);
  // Opened through the safe reader: a read failure (EACCES, EIO) names the file, and the file counts as an input.
  const bytes = readUserFile(file, { what: `${quantity} file`, maxBytes: MAX_CURVE_FILE_BYTES });
  if (bytes.includes(0)) throw fileError(file, undefined, 'contains binary data (NUL bytes); expected a text table');
  return curveFromText(file, bytes.toString('utf8'), quantity);
}
