/**
 * Reading a spectrum table from a file: CSV, TSV or whitespace columns, `#`
 * comment lines, an optional header naming the units, or units declared by
 * the caller. A wrong guess is worse than an error, so units must be stated
 * or unambiguous, and every rejected value names its file and line.
 */
import { readUserText } from '../io/read-user-file.js';
import { csvParseSync } from '../io/csv-parse.js';
import { HC_EV_NM, HC_J_NM } from '../physics/constants.js';
import { UserError, fileError, fileParameterError, ParameterError, ref, says } from '../errors.js';
import { makeSpectrum, sha256Hex, type Spectrum } from './spectrum.js';

export type AbscissaUnit = 'nm' | 'um' | 'ev';
export type OrdinateUnit = 'W/m2/nm' | 'W/m2/um' | 'W/m2/eV' | 'photons/m2/s/nm' | 'photons/m2/s/um' | 'photons/m2/s/eV';

/** Units of a spectrum table: abscissa (nm, µm or eV) and ordinate (irradiance or photon flux per nm, µm or eV). */
export interface TableUnits {
  x: AbscissaUnit;
  y: OrdinateUnit;
}

/** Largest spectrum file read [bytes]; reference tables are a few hundred kB. */
export const MAX_SPECTRUM_FILE_BYTES = 64 * 1024 * 1024;
/** Fewest points accepted in a spectrum table. */
export const MIN_SPECTRUM_POINTS = 5;

export const UNIT_HELP =
  'wavelength in nm or um, or photon energy in eV; then W/m2/nm, W/m2/um, W/m2/eV, photons/m2/s/nm, photons/m2/s/um or photons/m2/s/eV (per m², in W: convert cm² or mW first)';

function tokens(text: string): string[] {
  return text
    .toLowerCase()
    .replace(/[µμ]/g, 'u')
    .replace(/⁻/g, '-')
    .replace(/²/g, '2')
    .replace(/¹/g, '1')
    .split(/[^a-z0-9]+/)
    .filter((t) => t.length > 0);
}

function perUnit(tk: string[]): AbscissaUnit | undefined {
  const found = new Set<AbscissaUnit>();
  for (const t of tk) {
    if (t === 'nm' || t === 'nanometer' || t === 'nanometers' || t === 'nanometre' || t === 'nanometres') found.add('nm');
    if (t === 'um' || t === 'micron' || t === 'microns' || t === 'micrometer' || t === 'micrometers' || t === 'micrometre') found.add('um');
    if (t === 'ev') found.add('ev');
  }
  return found.size === 1 ? [...found][0] : undefined;
}

/** Abscissa unit named in a column header or declaration, or undefined. */
export function abscissaUnitOf(text: string): AbscissaUnit | undefined {
  return perUnit(tokens(text));
}

/** Ordinate unit named in a column header or declaration, or undefined when absent or ambiguous. */
/** Area or power units other than m² and W: refused rather than silently read as SI. */
const FOREIGN_UNITS = new Set(['cm', 'cm2', 'mm', 'mm2', 'mw', 'kw', 'uw', 'nw']);

export function ordinateUnitOf(text: string): OrdinateUnit | undefined {
  const tk = tokens(text);
  if (tk.some((t) => FOREIGN_UNITS.has(t))) return undefined;
  const photons = tk.some((t) => t.startsWith('photon'));
  const watts = tk.includes('w') || tk.some((t) => t.startsWith('watt'));
  if (photons === watts) return undefined;
  const per = perUnit(tk);
  if (!per) return undefined;
  const perLabel = per === 'ev' ? 'eV' : per;
  return (photons ? `photons/m2/s/${perLabel}` : `W/m2/${perLabel}`) as OrdinateUnit;
}

const UNITS_ALLOWED = `"<abscissa>,<ordinate>" with ${UNIT_HELP}`;

/** Parse a declaration like "nm,W/m2/nm" (abscissa, ordinate). */
export function parseUnitDeclaration(decl: string): TableUnits {
  const parts = decl.split(',');
  const x = parts.length === 2 ? abscissaUnitOf(parts[0]) : undefined;
  const y = parts.length === 2 ? ordinateUnitOf(parts[1]) : undefined;
  if (!x || !y) throw new ParameterError('units', UNITS_ALLOWED, says`${ref('units')} "${decl}" is not understood: give "<abscissa>,<ordinate>" with ${UNIT_HELP}, e.g. "nm,W/m2/nm"`);
  return { x, y };
}

/** One data row of a table with the 1-based line it stands on. */
export interface Row {
  line: number;
  cells: string[];
}

/**
 * Rows of a table without quoting, split directly (fast path: large ensembles
 * hold millions of cells). Without quotes, CSV fields are exactly the text
 * between delimiters, so this agrees with csv-parse on such files.
 */
function splitPlainRows(text: string): Row[] | null {
  if (text.includes('"')) return null;
  const lines = text.split('\n');
  const first = lines.find((l) => l.trim() !== '' && !l.trim().startsWith('#')) ?? '';
  const delimiter = first.includes(',') ? ',' : first.includes(';') ? ';' : null;
  const rows: Row[] = [];
  for (let i = 0; i < lines.length; i++) {
    const l = lines[i].trim();
    if (l === '' || l.startsWith('#')) continue;
    rows.push({ line: i + 1, cells: delimiter ? l.split(delimiter).map((c) => c.trim()) : l.split(/[ \t]+/) });
  }
  return rows;
}

/** Rows of a CSV, TSV, semicolon or whitespace table, `#` comments skipped, with line numbers. */
export function splitTableRows(file: string, text: string): Row[] {
  const plain = splitPlainRows(text);
  if (plain) return plain;
  const parse = csvParseSync();
  const lines = text.split(/\r?\n/);
  const firstData = lines.find((l) => l.trim() !== '' && !l.trim().startsWith('#')) ?? '';
  const delimiter = firstData.includes(',') ? ',' : firstData.includes(';') ? ';' : '\t';
  const normalised = delimiter === '\t' ? lines.map((l) => l.trim().replace(/[ \t]+/g, '\t')).join('\n') : text;
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(normalised, {
      delimiter,
      comment: '#',
      comment_no_infix: true,
      skip_empty_lines: true,
      relax_column_count: true,
      trim: true,
      info: true,
    }) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (err) {
    const e = err as { lines?: number; message: string };
    throw fileError(file, e.lines, `cannot read the table: ${e.message}`);
  }
  return records.map((r) => ({ line: r.info.lines, cells: r.record }));
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** Read a spectrum file into a Spectrum. `declared` overrides or replaces the header units. */
export function readSpectrumFile(file: string, declared?: TableUnits): Spectrum {
  const { bytes, text } = readUserText(file, { what: 'spectrum file', maxBytes: MAX_SPECTRUM_FILE_BYTES });
  return spectrumFromText(file, text, declared, sha256Hex(bytes));
}

/** Parse table text (file name used in messages). */
export function spectrumFromText(file: string, text: string, declared?: TableUnits, sha?: string): Spectrum {
  const rows = splitTableRows(file, text);
  if (rows.length === 0) throw fileError(file, undefined, 'holds no data rows');
  let units = declared;
  let start = 0;
  const first = rows[0];
  const firstIsNumeric = first.cells.length >= 2 && NUMBER.test(first.cells[0]) && NUMBER.test(first.cells[1]);
  if (!firstIsNumeric) {
    start = 1;
    if (first.cells.length !== 2) throw fileError(file, first.line, `header must name exactly two columns, found ${first.cells.length}`);
    const hx = abscissaUnitOf(first.cells[0]);
    const hy = ordinateUnitOf(first.cells[1]);
    if (declared && hx && hy && (hx !== declared.x || hy !== declared.y)) {
      throw fileParameterError(file, first.line, 'units', 'units that agree with the header', says`header names ${hx}, ${hy} but ${ref('units')} declares ${declared.x}, ${declared.y}; drop ${ref('units')} or fix the header`);
    }
    if (!declared) {
      const x = abscissaUnitOf(first.cells[0]);
      const y = ordinateUnitOf(first.cells[1]);
      if (!x) throw fileParameterError(file, first.line, 'units', UNITS_ALLOWED, says`header column "${first.cells[0]}" names no abscissa unit (nm, um or eV); rename it or declare ${ref('units')}`);
      if (!y) throw fileParameterError(file, first.line, 'units', UNITS_ALLOWED, says`header column "${first.cells[1]}" names no clear unit (${UNIT_HELP}); rename it or declare ${ref('units')}`);
      units = { x, y };
    }
  }
  if (!units) throw fileParameterError(file, first.line, 'units', UNITS_ALLOWED, says`no header names the units; add one (e.g. "wavelength_nm,irradiance_W_m2_nm") or declare ${ref('units')}`);
  const n = rows.length - start;
  if (n < MIN_SPECTRUM_POINTS) throw fileError(file, undefined, `has ${n} data rows; at least ${MIN_SPECTRUM_POINTS} are needed`);
  const xs = new Float64Array(n);
  const ys = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const { line, cells } = rows[start + k];
    if (cells.length !== 2) throw fileError(file, line, `expected 2 columns, found ${cells.length}`);
    for (let c = 0; c < 2; c++) {
      const cell = cells[c];
      if (!NUMBER.test(cell)) throw fileError(file, line, `"${cell}" is not a finite number`);
    }
    const x = Number(cells[0]);
    const y = Number(cells[1]);
    if (!Number.isFinite(x) || !Number.isFinite(y)) throw fileError(file, line, 'value is not finite');
    if (!(x > 0)) throw fileError(file, line, `abscissa ${cells[0]} must be positive`);
    if (y < 0) throw fileError(file, line, `negative spectral value ${cells[1]}`);
    if (k > 0) {
      if (x === xs[k - 1]) throw fileError(file, line, `duplicated abscissa ${cells[0]}`);
      if (x < xs[k - 1]) throw fileError(file, line, `abscissa ${cells[0]} is below the previous row's ${xs[k - 1]}: the table must be strictly ascending`);
    }
    xs[k] = x;
    ys[k] = y;
  }
  const { wavelengthNm, irradiance } = toCanonical(xs, ys, units);
  return makeSpectrum({
    name: file.split(/[\\/]/).pop() ?? file,
    sha256: sha ?? sha256Hex(text),
    source: `file ${file} (${units.x}, ${units.y})`,
    wavelengthNm,
    irradiance,
  });
}

/** Convert a table to ascending wavelength [nm] and irradiance [W m⁻² nm⁻¹]. */
export function toCanonical(xs: Float64Array, ys: Float64Array, units: TableUnits): { wavelengthNm: Float64Array; irradiance: Float64Array } {
  const n = xs.length;
  const wl = new Float64Array(n);
  const irr = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = xs[i];
    const lambda = units.x === 'nm' ? x : units.x === 'um' ? x * 1000 : HC_EV_NM / x;
    let y = ys[i];
    // Spectral density per unit of the ordinate's own variable → per nm.
    if (units.y.endsWith('/um')) y /= 1000;
    else if (units.y.endsWith('/eV')) y *= HC_EV_NM / (lambda * lambda);
    if (units.y.startsWith('photons')) y *= HC_J_NM / lambda;
    wl[i] = lambda;
    irr[i] = y;
  }
  if (units.x === 'ev') {
    wl.reverse();
    irr.reverse();
  }
  return { wavelengthNm: wl, irradiance: irr };
}
