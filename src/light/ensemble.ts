/**
 * Spectral ensembles (docs/PHYSICS.md §8): a set of spectra with weights (hours,
 * or energy shares) and cell temperatures that stands for a site or a season,
 * and the yield-weighted efficiency of a stack over it,
 *
 *     η_yield = Σ_k w_k·P_max,k / Σ_k w_k·P_in,k,
 *
 * with the stack re-solved under every spectrum at that spectrum's cell
 * temperature (a series stack re-matches its current each time).
 *
 * Accepted inputs, detected from the path and the header:
 *   - a folder of spectrum files (equal weights, the default temperature);
 *     a folder holding `manifest.yaml`, `manifest.yml` or `manifest.csv`
 *     is read through that manifest instead;
 *   - a manifest, YAML (`.yaml`/`.yml`) or CSV (header with a `file` column),
 *     listing files (relative to the manifest), weights and temperatures;
 *   - one wide table: wavelength in the first column and one spectrum per
 *     further column, or one spectrum per row under a header row of
 *     wavelengths.
 *
 * Ranges: every member keeps its own table and grid. Photons outside a table
 * count as zero: N(E) is constant for wavelengths beyond the table's
 * long-wavelength end and zero above the photon energy of its short end, and
 * P_in is the integral over the member's own table. A member that stops short
 * of a gap's wavelength under-counts that subcell's photons, so the summary
 * warns about it.
 */
import { readdirSync, statSync } from 'node:fs';
import { codeAndWords, readUserText } from '../io/read-user-file.js';
import { basename, dirname, extname, isAbsolute, join, resolve } from 'node:path';
import { isMap, isScalar, isSeq, LineCounter, parseDocument, type Node as YamlNode } from 'yaml';
import { UserError, fileError, withSuffix } from '../errors.js';
import type { LabelledSpectrum } from './weighted-spectrum.js';
import { makeSpectrum, sha256Hex, sha256OfTable, spectrumOfArrays, type Spectrum } from './spectrum.js';
import { readWideColumns } from './wide-table-reader.js';
import {
  abscissaUnitOf,
  MAX_SPECTRUM_FILE_BYTES,
  MIN_SPECTRUM_POINTS,
  ordinateUnitOf,
  readSpectrumFile,
  toCanonical,
  UNIT_HELP,
  splitTableRows,
  type AbscissaUnit,
  type Row,
  type OrdinateUnit,
  type TableUnits,
} from './table-file.js';

export interface EnsembleMember extends LabelledSpectrum {
  /** Label shown in reports: a column header, a row's first cell, a manifest label or the file name. */
  label: string;
  /** Timestamp when the input gives one (ISO 8601 text, kept as written). */
  timestamp?: string;
}

import type { WeightUnit } from './ensemble-weights.js';
export type { WeightUnit } from './ensemble-weights.js';

export type EnsembleLayout = 'folder' | 'csv-manifest' | 'yaml-manifest' | 'wide-columns' | 'wide-rows' | 'weather-year';

export interface Ensemble {
  name: string;
  /** Where the ensemble came from, in words (layout and path). */
  source: string;
  /**
   * SHA-256 (hex): of the file bytes for a wide table; for a manifest, of its
   * bytes followed by every listed file's hash; for a folder, of the sorted
   * file names with their hashes.
   */
  sha256: string;
  members: EnsembleMember[];
  layout: EnsembleLayout;
  /** 'share' also when no weights were given (equal weights of 1). */
  weightUnit: WeightUnit;
  /** Files in a folder that were skipped as clearly not spectra. */
  skipped: string[];
}

export interface LoadEnsembleOptions {
  /** Cell temperature for members that state none [K]. */
  defaultTempK: number;
  /** Units of member files, overriding their headers (as --units does for one spectrum file); for a wide table, its units. */
  units?: TableUnits;
  /** Read a column-wise wide table through the streaming reader (default true; false reads it row by row, for checks). */
  streaming?: boolean;
}

/** Cell temperatures accepted for a member [K]. */
export const ENSEMBLE_TEMP_RANGE_K: readonly [number, number] = [150, 500];
/** Largest wide table or manifest read [bytes]. */
export const MAX_ENSEMBLE_FILE_BYTES = 4 * MAX_SPECTRUM_FILE_BYTES;
/** Largest total size of the member files of one ensemble [bytes], checked before any is read. */
export const MAX_ENSEMBLE_TOTAL_BYTES = 1024 * 1024 * 1024;
/** Most members in one ensemble (an hourly year is 8760). */
export const MAX_ENSEMBLE_MEMBERS = 100_000;
/** Files in a folder that are clearly not spectrum tables (skipped, and listed). */
const NOT_SPECTRUM_EXTENSIONS = new Set([
  '.md', '.markdown', '.rst', '.html', '.htm', '.pdf', '.json', '.yaml', '.yml', '.toml', '.ini', '.xml',
  '.js', '.mjs', '.cjs', '.ts', '.py', '.r', '.m', '.jl', '.sh', '.ipynb',
  '.png', '.jpg', '.jpeg', '.gif', '.svg', '.webp', '.zip', '.gz', '.xz', '.bz2', '.tar', '.xlsx', '.xls', '.ods',
]);
const NOT_SPECTRUM_NAMES = /^(readme|license|licence|notice|changelog|provenance)([._-].*)?$/i;
/** Extensions read as spectrum tables in a folder. */
const SPECTRUM_EXTENSIONS = new Set(['.csv', '.tsv', '.dat', '.txt', '.prn']);
const FOLDER_MANIFESTS = ['manifest.yaml', 'manifest.yml', 'manifest.csv'];

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const MISSING = new Set(['', 'nan', 'na', 'n/a', '-', 'null']);
const ISO_TIME = /^\d{4}-\d{2}-\d{2}([T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?)?$/;

/** File names in natural order (2 before 10); built on first use: an Intl.Collator takes about 7 ms to build, and most imports of this module never sort a folder. */
let collator: Intl.Collator | undefined;

// ---------------------------------------------------------------------------
// Checks shared by every layout

function weightOf(file: string, line: number | undefined, cell: unknown): number {
  const text = String(cell).trim();
  const x = typeof cell === 'number' ? cell : NUMBER.test(text) ? Number(text) : NaN;
  if (!Number.isFinite(x) || !(x > 0)) throw fileError(file, line, `weight "${text}" must be a positive finite number`);
  return x;
}

function tempOf(file: string, line: number | undefined, cell: unknown): number {
  const text = String(cell).trim();
  const t = typeof cell === 'number' ? cell : NUMBER.test(text) ? Number(text) : NaN;
  const [lo, hi] = ENSEMBLE_TEMP_RANGE_K;
  if (!Number.isFinite(t) || t < lo || t > hi) {
    throw fileError(file, line, `cell temperature "${text}" must be a number of kelvin within ${lo}–${hi} K${Number.isFinite(t) && t < 100 ? ' (°C? give kelvin: add 273.15)' : ''}`);
  }
  return t;
}

/** The weight unit named by a column (or row) title, or undefined for a plain "weight". */
function weightUnitOfTitle(title: string): WeightUnit | undefined {
  const t = title.toLowerCase();
  if (t === 'weight_h' || t === 'weight_hours' || t === 'hours' || t === 'weight_hour') return 'hours';
  if (t === 'weight_share' || t === 'share' || t === 'energy_share') return 'share';
  return undefined;
}
const WEIGHT_TITLES = new Set(['weight', 'weight_h', 'weight_hours', 'weight_hour', 'hours', 'weight_share', 'share', 'energy_share']);
const TEMP_TITLES = new Set(['temp_k', 'cell_temp_k']);

/** A weight unit written as a word: hours | share. */
function parseWeightUnit(file: string, line: number | undefined, value: unknown): WeightUnit {
  const t = String(value).trim().toLowerCase();
  if (t === 'hours' || t === 'hour' || t === 'h') return 'hours';
  if (t === 'share' || t === 'energy_share' || t === 'energy share' || t === 'fraction' || t === 'relative') return 'share';
  throw fileError(file, line, `weight_unit "${String(value)}" is not understood: give "hours" (weights are durations, Σ w·P is energy) or "share" (relative energy shares)`);
}

/**
 * Settle the weight unit from a column title and a declaration (comment,
 * column or key). Plain "weight" needs a declaration: a wrong guess is worse
 * than an error.
 */
function settleWeightUnit(file: string, line: number | undefined, title: string | undefined, declared: WeightUnit | undefined): WeightUnit {
  if (title === undefined) {
    if (declared !== undefined) throw fileError(file, line, 'weight_unit is given but no weights are: add a weight column or drop weight_unit');
    return 'share';
  }
  const fromTitle = weightUnitOfTitle(title);
  if (fromTitle && declared && fromTitle !== declared) throw fileError(file, line, `column "${title}" says ${fromTitle} but weight_unit says ${declared}`);
  const unit = fromTitle ?? declared;
  if (!unit) {
    throw fileError(file, line, `say what the weights are: a "# weight_unit: hours" (or share) comment line, a weight_unit column, or a column named weight_h or weight_share`);
  }
  return unit;
}

function checkCount(file: string, n: number): void {
  if (n === 0) throw fileError(file, undefined, 'the ensemble holds no spectra');
  if (n > MAX_ENSEMBLE_MEMBERS) throw fileError(file, undefined, `holds ${n} spectra; at most ${MAX_ENSEMBLE_MEMBERS} are accepted`);
}

function timestampOf(label: string): string | undefined {
  return ISO_TIME.test(label) ? label : undefined;
}

function readTextFile(file: string, what: string): { bytes: Buffer; text: string } {
  return readUserText(file, { what, maxBytes: MAX_ENSEMBLE_FILE_BYTES });
}

// ---------------------------------------------------------------------------
// Delimited text with `# key: value` directives

interface Directive {
  value: string;
  line: number;
}

const DIRECTIVE = /^\s*#\s*(units|weight_unit|name)\s*[:=]\s*(.*?)\s*$/i;

function readDelimited(file: string, text: string): { rows: Row[]; directives: Map<string, Directive> } {
  const lines = text.split(/\r?\n/);
  const directives = new Map<string, Directive>();
  lines.forEach((l, i) => {
    const m = DIRECTIVE.exec(l);
    if (m) {
      const key = m[1].toLowerCase();
      if (directives.has(key)) throw fileError(file, i + 1, `"# ${key}:" is given twice (first at line ${directives.get(key)!.line})`);
      directives.set(key, { value: m[2], line: i + 1 });
    }
  });
  return { rows: splitTableRows(file, text), directives };
}

// ---------------------------------------------------------------------------
// Member files (folder and manifests)

interface FileEntry {
  path: string;
  label: string;
  weight: number;
  tempK: number;
  timestamp?: string;
  /** Where the entry was listed, for messages. */
  listedAt?: string;
}

/** Refuse an ensemble whose distinct member files together exceed MAX_ENSEMBLE_TOTAL_BYTES, before reading any. */
function checkMembersTotalSize(entries: FileEntry[]): void {
  let total = 0;
  const seen = new Set<string>();
  for (const e of entries) {
    if (seen.has(e.path)) continue;
    seen.add(e.path);
    try {
      total += statSync(e.path).size;
    } catch {
      // unreadable: reading the member names the file and the reason
    }
    if (total > MAX_ENSEMBLE_TOTAL_BYTES) {
      throw new UserError(`${e.listedAt ?? e.path}: the ensemble's spectrum files add up to more than ${MAX_ENSEMBLE_TOTAL_BYTES / 2 ** 20} MiB; split the set or thin it`);
    }
  }
}

function readMembers(entries: FileEntry[], units: TableUnits | undefined): { members: EnsembleMember[]; fileShas: string[] } {
  if (entries.length > MAX_ENSEMBLE_MEMBERS) throw new UserError(`the ensemble lists ${entries.length} spectra; at most ${MAX_ENSEMBLE_MEMBERS} are accepted`);
  checkMembersTotalSize(entries);
  const cache = new Map<string, Spectrum>();
  const members: EnsembleMember[] = [];
  const fileShas: string[] = [];
  for (const e of entries) {
    let s = cache.get(e.path);
    if (!s) {
      try {
        s = readSpectrumFile(e.path, units);
      } catch (err) {
        if (err instanceof UserError && e.listedAt) throw withSuffix(err, ` (listed at ${e.listedAt})`);
        throw err;
      }
      cache.set(e.path, s);
    }
    fileShas.push(s.sha256);
    members.push({ spectrum: s, weight: e.weight, tempK: e.tempK, label: e.label, ...(e.timestamp !== undefined ? { timestamp: e.timestamp } : {}) });
  }
  return { members, fileShas };
}

function resolveListed(manifest: string, line: number | undefined, name: string): string {
  if (name.trim() === '') throw fileError(manifest, line, 'file name is empty');
  const p = isAbsolute(name) ? name : resolve(dirname(manifest), name);
  let ok = false;
  try {
    ok = statSync(p).isFile();
  } catch {
    ok = false;
  }
  if (!ok) throw fileError(manifest, line, `spectrum file "${name}" not found (looked for ${p}; paths are relative to the manifest)`);
  return p;
}

const stem = (p: string) => basename(p, extname(p));

function loadFolder(dir: string, opts: LoadEnsembleOptions): Ensemble {
  let listing: string[];
  try {
    listing = readdirSync(dir);
  } catch (err) {
    throw new UserError(`${dir}: cannot list the ensemble folder (${codeAndWords(err)})`);
  }
  const names = listing.sort((collator ??= new Intl.Collator('en', { numeric: true })).compare);
  const manifests = names.filter((n) => FOLDER_MANIFESTS.includes(n.toLowerCase()));
  if (manifests.length > 1) throw fileError(dir, undefined, `holds more than one manifest (${manifests.join(', ')}); name the one to use`);
  if (manifests.length === 1) return loadEnsemble(join(dir, manifests[0]), opts);
  const skipped: string[] = [];
  const entries: FileEntry[] = [];
  for (const n of names) {
    const p = join(dir, n);
    const ext = extname(n).toLowerCase();
    let isFile = false;
    try {
      isFile = statSync(p).isFile();
    } catch {
      isFile = false;
    }
    if (!isFile || n.startsWith('.') || n.endsWith('~') || NOT_SPECTRUM_EXTENSIONS.has(ext) || NOT_SPECTRUM_NAMES.test(n)) {
      skipped.push(n);
      continue;
    }
    if (!SPECTRUM_EXTENSIONS.has(ext)) {
      throw fileError(p, undefined, `is not a recognised spectrum table (${[...SPECTRUM_EXTENSIONS].join(', ')}); move it out of the folder or list the spectra in a manifest`);
    }
    entries.push({ path: p, label: stem(n), weight: 1, tempK: opts.defaultTempK, timestamp: timestampOf(stem(n)) });
  }
  checkCount(dir, entries.length);
  const { members } = readMembers(entries, opts.units);
  const sha = sha256Hex(['gapstack ensemble folder', ...members.map((m, i) => `${basename(entries[i].path)}\t${m.spectrum.sha256}`)].join('\n'));
  return {
    name: basename(resolve(dir)),
    source: `folder ${dir} (${members.length} spectrum files, equal weights, ${opts.defaultTempK} K)`,
    sha256: sha,
    members,
    layout: 'folder',
    weightUnit: 'share',
    skipped,
  };
}

function manifestSha(bytes: Buffer, fileShas: string[]): string {
  return sha256Hex([sha256Hex(bytes), ...fileShas].join('\n'));
}

const CSV_MANIFEST_COLUMNS = ['file', 'weight (or weight_h, weight_share)', 'weight_unit', 'temp_k', 'label', 'timestamp'];

function loadCsvManifest(file: string, bytes: Buffer, rows: Row[], directives: Map<string, Directive>, opts: LoadEnsembleOptions): Ensemble {
  const header = rows[0];
  const titles = header.cells.map((c) => c.trim().toLowerCase());
  let fileCol = -1;
  let weightCol = -1;
  let unitCol = -1;
  let tempCol = -1;
  let labelCol = -1;
  let timeCol = -1;
  titles.forEach((t, k) => {
    const dup = () => fileError(file, header.line, `column "${header.cells[k]}" is given twice`);
    if (t === 'file' || t === 'path') {
      if (fileCol >= 0) throw dup();
      fileCol = k;
    } else if (WEIGHT_TITLES.has(t)) {
      if (weightCol >= 0) throw dup();
      weightCol = k;
    } else if (t === 'weight_unit') {
      if (unitCol >= 0) throw dup();
      unitCol = k;
    } else if (TEMP_TITLES.has(t)) {
      if (tempCol >= 0) throw dup();
      tempCol = k;
    } else if (t === 'label' || t === 'name') {
      if (labelCol >= 0) throw dup();
      labelCol = k;
    } else if (t === 'timestamp' || t === 'time') {
      if (timeCol >= 0) throw dup();
      timeCol = k;
    } else {
      const hint = /temp|celsius|_c$/.test(t) ? ' (cell temperatures go in a temp_k column, in kelvin)' : '';
      throw fileError(file, header.line, `unknown manifest column "${header.cells[k]}"${hint}; columns are ${CSV_MANIFEST_COLUMNS.join(', ')}`);
    }
  });
  const directive = directives.get('weight_unit');
  let declared = directive ? parseWeightUnit(file, directive.line, directive.value) : undefined;
  if (unitCol >= 0) {
    const units = new Set(rows.slice(1).map((r) => parseWeightUnit(file, r.line, r.cells[unitCol] ?? '')));
    if (units.size > 1) throw fileError(file, undefined, 'weight_unit differs between rows; one ensemble has one weight unit');
    const u = [...units][0];
    if (declared && u && u !== declared) throw fileError(file, directive?.line, `the weight_unit comment says ${declared} but the column says ${u}`);
    declared = declared ?? u;
  }
  const weightUnit = settleWeightUnit(file, header.line, weightCol >= 0 ? titles[weightCol] : undefined, declared);
  const entries: FileEntry[] = [];
  for (const r of rows.slice(1)) {
    if (r.cells.length !== titles.length) throw fileError(file, r.line, `expected ${titles.length} cells (${header.cells.join(', ')}), found ${r.cells.length}`);
    const path = resolveListed(file, r.line, r.cells[fileCol]);
    const tempCell = tempCol >= 0 ? r.cells[tempCol] : '';
    const label = labelCol >= 0 && r.cells[labelCol] !== '' ? r.cells[labelCol] : stem(r.cells[fileCol]);
    const timestamp = timeCol >= 0 && r.cells[timeCol] !== '' ? r.cells[timeCol] : timestampOf(label);
    entries.push({
      path,
      label,
      weight: weightCol >= 0 ? weightOf(file, r.line, r.cells[weightCol]) : 1,
      tempK: tempCell === '' ? opts.defaultTempK : tempOf(file, r.line, tempCell),
      timestamp,
      listedAt: `${file}:${r.line}`,
    });
  }
  checkCount(file, entries.length);
  const { members, fileShas } = readMembers(entries, opts.units);
  const name = directives.get('name')?.value || stem(file);
  return {
    name,
    source: `CSV manifest ${file} (${members.length} spectra, weights in ${weightUnit === 'hours' ? 'hours' : 'energy shares'})`,
    sha256: manifestSha(bytes, fileShas),
    members,
    layout: 'csv-manifest',
    weightUnit,
    skipped: [],
  };
}

function loadYamlManifest(file: string, opts: LoadEnsembleOptions): Ensemble {
  const { bytes, text } = readTextFile(file, 'YAML manifest');
  const lc = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lc, prettyErrors: false });
  if (doc.errors.length > 0) {
    const e = doc.errors[0];
    throw fileError(file, lc.linePos(e.pos[0]).line, `YAML: ${e.message.split('\n')[0]}`);
  }
  const lineOf = (n: unknown): number | undefined => {
    const r = (n as YamlNode | undefined)?.range;
    return r ? lc.linePos(r[0]).line : undefined;
  };
  const root = doc.contents;
  const shape = 'expected a mapping with "spectra:" (a list of entries with file, weight, temp_k), plus optional name, weight_unit (hours | share) and default_temp_k';
  if (!isMap(root)) throw fileError(file, lineOf(root) ?? 1, shape);
  let name = stem(file);
  let declared: WeightUnit | undefined;
  let declaredLine: number | undefined;
  let defaultTempK = opts.defaultTempK;
  let list: unknown;
  for (const pair of root.items) {
    const key = isScalar(pair.key) ? String(pair.key.value) : String(pair.key);
    const line = lineOf(pair.key);
    const v = isScalar(pair.value) ? pair.value.value : pair.value;
    if (key === 'name') name = String(v);
    else if (key === 'weight_unit') {
      declared = parseWeightUnit(file, line, v);
      declaredLine = line;
    } else if (key === 'default_temp_k') defaultTempK = tempOf(file, line, v);
    else if (key === 'spectra') list = pair.value;
    else throw fileError(file, line, `unknown key "${key}"; ${shape}`);
  }
  if (list === undefined) throw fileError(file, undefined, `no "spectra:" list; ${shape}`);
  if (!isSeq(list)) throw fileError(file, lineOf(list), `"spectra:" must be a list; ${shape}`);
  const items = list.items;
  const entryKeys = new Set(['file', 'weight', 'temp_k', 'label', 'timestamp']);
  const anyWeight = items.some((it) => isMap(it) && it.has('weight'));
  const weightUnit = settleWeightUnit(file, declaredLine, anyWeight ? 'weight' : undefined, declared);
  const entries: FileEntry[] = [];
  for (const it of items) {
    const line = lineOf(it);
    let fields: Record<string, { value: unknown; line: number | undefined }> = {};
    if (isScalar(it)) fields = { file: { value: it.value, line } };
    else if (isMap(it)) {
      for (const pair of it.items) {
        const key = isScalar(pair.key) ? String(pair.key.value) : String(pair.key);
        if (!entryKeys.has(key)) {
          const hint = /temp/.test(key) ? ' (cell temperatures go in temp_k, in kelvin)' : '';
          throw fileError(file, lineOf(pair.key), `unknown entry key "${key}"${hint}; an entry has file, and optionally weight, temp_k, label, timestamp`);
        }
        fields[key] = { value: isScalar(pair.value) ? pair.value.value : pair.value, line: lineOf(pair.value) ?? lineOf(pair.key) };
      }
    } else throw fileError(file, line, 'each entry of "spectra:" must be a file name or a mapping with file, weight, temp_k');
    if (!fields.file) throw fileError(file, line, 'entry has no "file:"');
    if (anyWeight && !fields.weight) throw fileError(file, line, 'entry has no "weight:" while others do; give every entry a weight or none');
    const fileName = String(fields.file.value ?? '');
    const label = fields.label ? String(fields.label.value) : stem(fileName);
    entries.push({
      path: resolveListed(file, fields.file.line, fileName),
      label,
      weight: fields.weight ? weightOf(file, fields.weight.line, fields.weight.value) : 1,
      tempK: fields.temp_k ? tempOf(file, fields.temp_k.line, fields.temp_k.value) : defaultTempK,
      timestamp: fields.timestamp ? String(fields.timestamp.value) : timestampOf(label),
      listedAt: `${file}:${line ?? '?'}`,
    });
  }
  checkCount(file, entries.length);
  const { members, fileShas } = readMembers(entries, opts.units);
  return {
    name,
    source: `YAML manifest ${file} (${members.length} spectra, weights in ${weightUnit === 'hours' ? 'hours' : 'energy shares'})`,
    sha256: manifestSha(bytes, fileShas),
    members,
    layout: 'yaml-manifest',
    weightUnit,
    skipped: [],
  };
}

// ---------------------------------------------------------------------------
// Wide tables

const WIDE_HELP =
  'a wide table has either one spectrum per column (first column the wavelength, e.g. header "wavelength_nm,2024-06-01T12:00,…", ' +
  'optional "weight"/"temp_k" rows under the header) or one spectrum per row (header "timestamp,300,305,…" of wavelengths, ' +
  'optional "weight"/"temp_k" columns); declare the spectral unit with a "# units: nm,W/m2/nm" comment line';

function tableUnits(file: string, directives: Map<string, Directive>, headerFirst: string, headerLine: number, opts: LoadEnsembleOptions, single?: string): TableUnits {
  if (opts.units) return opts.units;
  let x: AbscissaUnit | undefined;
  let y: OrdinateUnit | undefined;
  const d = directives.get('units');
  if (d) {
    const parts = d.value.split(',');
    const dx = parts.length === 2 ? abscissaUnitOf(parts[0]) : undefined;
    const dy = parts.length === 2 ? ordinateUnitOf(parts[1]) : parts.length === 1 ? ordinateUnitOf(parts[0]) : undefined;
    if (!dy) throw fileError(file, d.line, `"# units: ${d.value}" is not understood: give "<abscissa>,<ordinate>" with ${UNIT_HELP}, e.g. "# units: nm,W/m2/nm"`);
    x = dx;
    y = dy;
  }
  const hx = abscissaUnitOf(headerFirst);
  if (x && hx && x !== hx) throw fileError(file, headerLine, `header "${headerFirst}" says ${hx} but "# units:" says ${x}`);
  x = x ?? hx;
  if (!y && single !== undefined) y = ordinateUnitOf(single);
  if (!x) throw fileError(file, headerLine, `no wavelength unit: name it in the first header cell (e.g. "wavelength_nm") or in a "# units: nm,W/m2/nm" comment line`);
  if (!y) throw fileError(file, headerLine, `no spectral unit: add a comment line such as "# units: ${x},W/m2/${x === 'ev' ? 'eV' : x}" (${UNIT_HELP})`);
  return { x, y };
}

interface WideColumn {
  label: string;
  xs: number[];
  ys: number[];
  /** Line of the last value read and whether a hole (missing after values) was seen. */
  endedAt?: number;
  weight?: number;
  tempK?: number;
}

function addPoint(file: string, line: number, col: WideColumn, x: number, cell: string): void {
  if (MISSING.has(cell.toLowerCase())) {
    if (col.xs.length > 0 && col.endedAt === undefined) col.endedAt = line;
    return;
  }
  if (col.endedAt !== undefined) {
    throw fileError(file, line, `spectrum "${col.label}" resumes after a blank at line ${col.endedAt}; blanks are allowed only before a spectrum's first value or after its last`);
  }
  if (!NUMBER.test(cell)) throw fileError(file, line, `spectrum "${col.label}": "${cell}" is not a finite number (leave blank or write nan where a spectrum has no data)`);
  const y = Number(cell);
  if (!Number.isFinite(y)) throw fileError(file, line, `spectrum "${col.label}": value is not finite`);
  if (y < 0) throw fileError(file, line, `spectrum "${col.label}": negative spectral value ${cell}`);
  col.xs.push(x);
  col.ys.push(y);
}

function wideMember(file: string, col: WideColumn, units: TableUnits, unitText: string, defaultTempK: number, where: string): EnsembleMember {
  if (col.xs.length < MIN_SPECTRUM_POINTS) throw fileError(file, undefined, `spectrum "${col.label}" (${where}) has ${col.xs.length} values; at least ${MIN_SPECTRUM_POINTS} are needed`);
  const { wavelengthNm, irradiance } = toCanonical(Float64Array.from(col.xs), Float64Array.from(col.ys), units);
  const spectrum = makeSpectrum({
    name: col.label,
    sha256: sha256OfTable(wavelengthNm, irradiance),
    source: `${where} of ${file} (${unitText})`,
    wavelengthNm,
    irradiance,
  });
  const ts = timestampOf(col.label);
  return { spectrum, weight: col.weight ?? 1, tempK: col.tempK ?? defaultTempK, label: col.label, ...(ts ? { timestamp: ts } : {}) };
}

function parseAbscissa(file: string, line: number, cell: string, prev: number | undefined, what: string): number {
  if (!NUMBER.test(cell)) throw fileError(file, line, `${what} "${cell}" is not a number`);
  const x = Number(cell);
  if (!(x > 0) || !Number.isFinite(x)) throw fileError(file, line, `${what} ${cell} must be positive`);
  if (prev !== undefined) {
    if (x === prev) throw fileError(file, line, `duplicated ${what} ${cell}`);
    if (x < prev) throw fileError(file, line, `${what} ${cell} is below the previous ${prev}: wavelengths (or energies) must be strictly ascending`);
  }
  return x;
}

function isMetaTitle(t: string): boolean {
  const l = t.trim().toLowerCase();
  return WEIGHT_TITLES.has(l) || TEMP_TITLES.has(l);
}

function loadWideTable(file: string, bytes: Buffer, rows: Row[], directives: Map<string, Directive>, opts: LoadEnsembleOptions): Ensemble {
  const header = rows[0];
  if (header.cells.length < 2) throw fileError(file, header.line, `header has ${header.cells.length} cell; ${WIDE_HELP}`);
  const firstBody = rows.slice(1).find((r) => !isMetaTitle(r.cells[0] ?? ''));
  if (!firstBody) throw fileError(file, undefined, `holds no data rows; ${WIDE_HELP}`);
  const byColumn = NUMBER.test(firstBody.cells[0]);
  const directive = directives.get('weight_unit');
  const declared = directive ? parseWeightUnit(file, directive.line, directive.value) : undefined;
  const members: EnsembleMember[] = [];
  let weightUnit: WeightUnit;
  if (byColumn) {
    const cols: WideColumn[] = header.cells.slice(1).map((label, k) => {
      if (label === '') throw fileError(file, header.line, `column ${k + 2} has an empty header; every spectrum column needs a label or timestamp`);
      return { label, xs: [], ys: [] };
    });
    const single = cols.length === 1 ? cols[0].label : undefined;
    const units = tableUnits(file, directives, header.cells[0], header.line, opts, single);
    let weightTitle: string | undefined;
    let weightLine: number | undefined;
    let tempSeen = false;
    let prev: number | undefined;
    let dataRows = 0;
    for (const r of rows.slice(1)) {
      if (r.cells.length !== header.cells.length) throw fileError(file, r.line, `expected ${header.cells.length} cells (one per header column), found ${r.cells.length}`);
      const first = r.cells[0];
      if (isMetaTitle(first)) {
        if (dataRows > 0) throw fileError(file, r.line, `"${first}" row must come right under the header, before the wavelength rows`);
        const t = first.trim().toLowerCase();
        if (WEIGHT_TITLES.has(t)) {
          if (weightTitle !== undefined) throw fileError(file, r.line, 'a second weight row');
          weightTitle = t;
          weightLine = r.line;
          cols.forEach((c, k) => (c.weight = weightOf(file, r.line, r.cells[k + 1])));
        } else {
          if (tempSeen) throw fileError(file, r.line, 'a second temp_k row');
          tempSeen = true;
          cols.forEach((c, k) => (c.tempK = r.cells[k + 1] === '' ? undefined : tempOf(file, r.line, r.cells[k + 1])));
        }
        continue;
      }
      if (!NUMBER.test(first)) throw fileError(file, r.line, `first column must hold the ${units.x === 'ev' ? 'photon energy' : 'wavelength'} of every row, found "${first}"; ${WIDE_HELP}`);
      const x = parseAbscissa(file, r.line, first, prev, units.x === 'ev' ? 'photon energy' : 'wavelength');
      prev = x;
      dataRows++;
      cols.forEach((c, k) => addPoint(file, r.line, c, x, r.cells[k + 1]));
    }
    weightUnit = settleWeightUnit(file, weightLine ?? header.line, weightTitle, declared);
    const unitText = `${units.x}, ${units.y}`;
    cols.forEach((c, k) => members.push(wideMember(file, c, units, unitText, opts.defaultTempK, `column ${k + 2} "${c.label}"`)));
  } else {
    // One spectrum per row: header = label title, optional weight/temp_k titles, then the abscissae.
    const spectral: { col: number; x: number }[] = [];
    let weightCol = -1;
    let tempCol = -1;
    let prev: number | undefined;
    const units = tableUnits(file, directives, header.cells[0], header.line, opts);
    header.cells.slice(1).forEach((cell, k) => {
      const col = k + 1;
      const t = cell.trim().toLowerCase();
      if (WEIGHT_TITLES.has(t)) {
        if (weightCol >= 0) throw fileError(file, header.line, 'two weight columns');
        weightCol = col;
      } else if (TEMP_TITLES.has(t)) {
        if (tempCol >= 0) throw fileError(file, header.line, 'two temp_k columns');
        tempCol = col;
      } else if (NUMBER.test(t)) {
        const x = parseAbscissa(file, header.line, cell, prev, 'header wavelength');
        prev = x;
        spectral.push({ col, x });
      } else {
        throw fileError(
          file,
          header.line,
          `header cell ${col + 1} "${cell}" is neither a wavelength nor weight/temp_k: with a label in the first column of "${firstBody.cells[0]}" (line ${firstBody.line}) this reads as one spectrum per row, whose header row must list the wavelengths; ${WIDE_HELP}`,
        );
      }
    });
    if (spectral.length < MIN_SPECTRUM_POINTS) throw fileError(file, header.line, `header lists ${spectral.length} wavelengths; at least ${MIN_SPECTRUM_POINTS} are needed; ${WIDE_HELP}`);
    weightUnit = settleWeightUnit(file, header.line, weightCol >= 0 ? header.cells[weightCol].trim().toLowerCase() : undefined, declared);
    const unitText = `${units.x}, ${units.y}`;
    for (const r of rows.slice(1)) {
      if (r.cells.length !== header.cells.length) throw fileError(file, r.line, `expected ${header.cells.length} cells (one per header column), found ${r.cells.length}`);
      const label = r.cells[0];
      if (label === '') throw fileError(file, r.line, 'first cell is empty; every spectrum row starts with a label or timestamp');
      if (NUMBER.test(label) && !ISO_TIME.test(label)) {
        throw fileError(file, r.line, `first cell "${label}" is a number, but line ${firstBody.line} starts with the label "${firstBody.cells[0]}": mixed layouts; ${WIDE_HELP}`);
      }
      const c: WideColumn = { label, xs: [], ys: [] };
      if (weightCol >= 0) c.weight = weightOf(file, r.line, r.cells[weightCol]);
      if (tempCol >= 0 && r.cells[tempCol] !== '') c.tempK = tempOf(file, r.line, r.cells[tempCol]);
      for (const s of spectral) addPoint(file, r.line, c, s.x, r.cells[s.col]);
      if (c.xs.length < MIN_SPECTRUM_POINTS) throw fileError(file, r.line, `spectrum "${label}" has ${c.xs.length} values; at least ${MIN_SPECTRUM_POINTS} are needed`);
      members.push(wideMember(file, c, units, unitText, opts.defaultTempK, `row at line ${r.line}`));
    }
  }
  checkCount(file, members.length);
  const name = directives.get('name')?.value || stem(file);
  return {
    name,
    source: `wide table ${file} (one spectrum per ${byColumn ? 'column' : 'row'}, ${members.length} spectra, weights ${weightUnit === 'hours' ? 'in hours' : 'as energy shares'})`,
    sha256: sha256Hex(bytes),
    members,
    layout: byColumn ? 'wide-columns' : 'wide-rows',
    weightUnit,
    skipped: [],
  };
}

/**
 * The column-wise wide table through the streaming reader (typed arrays, no
 * per-cell objects; see wide-table-reader.ts), or undefined when the file is
 * anything but the plain well-formed case, which loadWideTable then reads
 * (and reports on) row by row. Both give the same members and numbers.
 */
function loadWideStreaming(file: string, opts: LoadEnsembleOptions): Ensemble | undefined {
  const t = readWideColumns(file, isMetaTitle, { what: 'ensemble file', maxBytes: MAX_ENSEMBLE_FILE_BYTES });
  if (!t) return undefined;
  try {
    const directives = new Map<string, Directive>();
    const body: Row[] = [];
    let delimiter: string | null | undefined;
    for (const p of t.preamble) {
      const m = DIRECTIVE.exec(p.text);
      if (m) {
        const key = m[1].toLowerCase();
        if (directives.has(key)) return undefined;
        directives.set(key, { value: m[2], line: p.line });
      } else if (!p.text.startsWith('#')) {
        // The header's delimiter is the table's, as in the row-by-row reader.
        if (delimiter === undefined) delimiter = p.text.includes(',') ? ',' : p.text.includes(';') ? ';' : null;
        body.push({ line: p.line, cells: delimiter ? p.text.split(delimiter).map((c) => c.trim()) : p.text.split(/[ \t]+/) });
      }
    }
    const header = body[0];
    const titles = header.cells.map((c) => c.trim().toLowerCase());
    if (titles.includes('file') || titles.includes('path')) return undefined;
    if (header.cells.length !== t.columns + 1 || header.cells.slice(1).some((l) => l === '')) return undefined;
    const labels = header.cells.slice(1);
    const weights: (number | undefined)[] = new Array(t.columns).fill(undefined);
    const temps: (number | undefined)[] = new Array(t.columns).fill(undefined);
    let weightTitle: string | undefined;
    let weightLine: number | undefined;
    let tempSeen = false;
    for (const r of body.slice(1)) {
      if (r.cells.length !== header.cells.length) return undefined;
      const ti = r.cells[0].trim().toLowerCase();
      if (WEIGHT_TITLES.has(ti)) {
        if (weightTitle !== undefined) return undefined;
        weightTitle = ti;
        weightLine = r.line;
        for (let k = 0; k < t.columns; k++) weights[k] = weightOf(file, r.line, r.cells[k + 1]);
      } else {
        if (tempSeen) return undefined;
        tempSeen = true;
        for (let k = 0; k < t.columns; k++) temps[k] = r.cells[k + 1] === '' ? undefined : tempOf(file, r.line, r.cells[k + 1]);
      }
    }
    const single = t.columns === 1 ? labels[0] : undefined;
    const units = tableUnits(file, directives, header.cells[0], header.line, opts, single);
    const directive = directives.get('weight_unit');
    const declared = directive ? parseWeightUnit(file, directive.line, directive.value) : undefined;
    const weightUnit = settleWeightUnit(file, weightLine ?? header.line, weightTitle, declared);
    const canonical = units.x === 'nm' && units.y === 'W/m2/nm';
    const unitText = `${units.x}, ${units.y}`;
    const grids = new Map<string, Float64Array>();
    const members: EnsembleMember[] = [];
    for (let k = 0; k < t.columns; k++) {
      const a = t.first[k];
      const b = t.last[k];
      if (a < 0 || b - a + 1 < MIN_SPECTRUM_POINTS) return undefined;
      const key = `${a}:${b}`;
      let xs = grids.get(key);
      if (!xs) {
        xs = t.abscissa.subarray(a, b + 1);
        grids.set(key, xs);
      }
      const ys = t.values.subarray(k * t.stride + a, k * t.stride + b + 1);
      const { wavelengthNm, irradiance } = canonical ? { wavelengthNm: xs, irradiance: ys } : toCanonical(xs, ys, units);
      const label = labels[k];
      const spectrum = spectrumOfArrays({
        name: label,
        sha256: () => sha256OfTable(wavelengthNm, irradiance),
        source: `column ${k + 2} "${label}" of ${file} (${unitText})`,
        wavelengthNm,
        irradiance,
      });
      const ts = timestampOf(label);
      members.push({ spectrum, weight: weights[k] ?? 1, tempK: temps[k] ?? opts.defaultTempK, label, ...(ts ? { timestamp: ts } : {}) });
    }
    checkCount(file, members.length);
    return {
      name: directives.get('name')?.value || stem(file),
      source: `wide table ${file} (one spectrum per column, ${members.length} spectra, weights ${weightUnit === 'hours' ? 'in hours' : 'as energy shares'})`,
      sha256: t.sha256,
      members,
      layout: 'wide-columns',
      weightUnit,
      skipped: [],
    };
  } catch (err) {
    // Let the row-by-row reader find and word the problem.
    if (err instanceof UserError) return undefined;
    throw err;
  }
}

// ---------------------------------------------------------------------------

/**
 * Load a spectral ensemble from a folder, a manifest (CSV or YAML) or a wide
 * table; see the module comment for the layouts. Every member's spectrum is
 * built once. Bad input raises a UserError naming the file and line.
 */
export function loadEnsemble(path: string, opts: LoadEnsembleOptions): Ensemble {
  const [tlo, thi] = ENSEMBLE_TEMP_RANGE_K;
  if (!(opts.defaultTempK >= tlo && opts.defaultTempK <= thi)) throw new UserError(`default cell temperature must be within ${tlo}–${thi} K, got ${opts.defaultTempK}`);
  let isDir = false;
  try {
    isDir = statSync(path).isDirectory();
  } catch (err) {
    throw new UserError(`${path}: cannot open the ensemble (${codeAndWords(err)}); give a folder of spectra, a manifest (.csv or .yaml) or a wide table`);
  }
  if (isDir) return loadFolder(path, opts);
  const ext = extname(path).toLowerCase();
  if (ext === '.yaml' || ext === '.yml') return loadYamlManifest(path, opts);
  const streamed = opts.streaming === false ? undefined : loadWideStreaming(path, opts);
  if (streamed) return streamed;
  const { bytes, text } = readTextFile(path, 'ensemble file');
  const { rows, directives } = readDelimited(path, text);
  if (rows.length === 0) throw fileError(path, undefined, `holds no rows; expected a manifest with a "file" column or a wide table (${WIDE_HELP})`);
  const titles = rows[0].cells.map((c) => c.trim().toLowerCase());
  if (titles.includes('file') || titles.includes('path')) return loadCsvManifest(path, bytes, rows, directives, opts);
  return loadWideTable(path, bytes, rows, directives, opts);
}

// ---------------------------------------------------------------------------
// What an ensemble holds (statistics, ranges, warnings): ensemble-summary.ts.

export { ENSEMBLE_APE_WINDOW_NM, ENSEMBLE_LOWEST_GAP_EV, ENSEMBLE_UV_START_NM, OUT_OF_RANGE_POLICY, ensembleSummary, type EnsembleSummary, type MemberRange, type SummaryOptions } from './ensemble-summary.js';
