/**
 * The files a batch over sites writes: one "part" per shard, as CSV and as JSON
 * Lines, each opening with the same identity (gapstack version, hash of the
 * question, hash of the whole batch's site set, shard) and holding one line per
 * site in ascending site-key order. Because every part is sorted the same way
 * and carries who it belongs to, parts can be checked against each other and
 * merged by streaming, and a merge of all shards is byte-identical to the part
 * an unsharded run writes.
 */
import { createHash } from 'node:crypto';
import { UserError } from '../errors.js';
import { CAUTION } from '../report/assumptions.js';
import { shardLabel, type Shard } from './shard.js';

/** Format tag of part files; bump when their layout changes. */
export const PART_FORMAT = 'gapstack-sites-part/1';

/** Who a part belongs to: every field must agree for parts to merge. */
export interface PartIdentity {
  /** gapstack version that computed the rows. */
  version: string;
  /** SHA-256 (hex) of the question: design and every option that changes a number. */
  questionSha256: string;
  /** SHA-256 (hex) of the batch's sorted site keys, one per line. */
  sitesSha256: string;
  /** Number of sites in the whole batch. */
  sitesTotal: number;
  shard: Shard;
  /** Number of sites in this shard. */
  shardSites: number;
  /** Column names after the fixed site columns, in order. */
  columns: string[];
}

/** One wiring's answer at one site. */
export interface SiteWiringResult {
  /** Column prefix, e.g. "2t", "4t", "3t". */
  wiring: string;
  /** Site-optimal gaps [eV], top first. */
  gapsEv: number[];
  /** Annual energy yield of the site-optimal stack [kWh/m²]. */
  yieldKwhM2: number;
  /** Yield-weighted efficiency Σ w·P_max / Σ w·P_in [-]. */
  yieldEfficiency: number;
  /** Loss of the AM1.5G-optimal design's yield at this site relative to the site optimum [-]. */
  am15gLoss: number;
}

/** One site's row. */
export interface SiteResult {
  /** SHA-256 (hex) of the weather file's bytes. */
  key: string;
  /** Weather file name (no folder). */
  file: string;
  name: string;
  latDeg: number;
  lonDeg: number;
  /** Annual plane-of-array insolation [kWh/m²]. */
  poaKwhM2: number;
  wirings: SiteWiringResult[];
}

/** Columns every row starts with. */
export const SITE_COLUMNS = ['site_key', 'file', 'site', 'lat_deg', 'lon_deg', 'poa_kwh_m2'] as const;

/** The per-wiring columns of one wiring prefix. */
export function wiringColumns(prefix: string): string[] {
  return [`${prefix}_gaps_ev`, `${prefix}_yield_kwh_m2`, `${prefix}_efficiency_pct`, `${prefix}_am15g_loss_pct`];
}

/** Hash of a batch's site set: order-free (keys sorted) so every shard computes the same. */
export function sitesSha256(keys: readonly string[]): string {
  return createHash('sha256').update([...keys].sort().join('\n')).digest('hex');
}

/** Fixed decimals so a number prints the same in every shard and merge; no "-0". */
function num(x: number, digits: number): string {
  if (!Number.isFinite(x)) return '';
  const s = x.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

/** One line of text: names with line breaks or controls would break the one-row-per-line layout. */
function oneLine(text: string): string {
  return text.replace(/[\u0000-\u001f\u007f]+/g, ' ').trim();
}

/** RFC 4180 quoting where needed. */
function csvField(text: string): string {
  return /[",]/.test(text) || /^\s|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** Row values as strings, in column order (shared by CSV and JSON so both say the same). */
function rowValues(r: SiteResult): { name: string; value: string | number | null }[] {
  const out: { name: string; value: string | number | null }[] = [
    { name: 'site_key', value: r.key },
    { name: 'file', value: oneLine(r.file) },
    { name: 'site', value: oneLine(r.name) },
    { name: 'lat_deg', value: num(r.latDeg, 4) },
    { name: 'lon_deg', value: num(r.lonDeg, 4) },
    { name: 'poa_kwh_m2', value: num(r.poaKwhM2, 2) },
  ];
  for (const w of r.wirings) {
    const [g, y, e, l] = wiringColumns(w.wiring);
    out.push({ name: g!, value: w.gapsEv.map((x) => num(x, 4)).join(';') });
    out.push({ name: y!, value: num(w.yieldKwhM2, 3) });
    out.push({ name: e!, value: num(w.yieldEfficiency * 100, 3) });
    out.push({ name: l!, value: num(w.am15gLoss * 100, 3) });
  }
  return out;
}

/** Columns of a question's rows given its wiring prefixes. */
export function columnsFor(wiringPrefixes: readonly string[]): string[] {
  return [...SITE_COLUMNS, ...wiringPrefixes.flatMap(wiringColumns)];
}

function checkColumns(r: SiteResult, columns: readonly string[]): ReturnType<typeof rowValues> {
  const values = rowValues(r);
  const names = values.map((v) => v.name);
  if (names.join(',') !== columns.join(',')) throw new Error(`site row columns ${names.join(',')} differ from the part's ${columns.join(',')}`);
  return values;
}

/** A CSV row line (with its newline). */
export function csvRow(r: SiteResult, columns: readonly string[]): string {
  return `${checkColumns(r, columns).map((v) => csvField(String(v.value ?? ''))).join(',')}\n`;
}

/** A JSON Lines row (with its newline); numbers as JSON numbers, gaps as an array. */
export function jsonRow(r: SiteResult, columns: readonly string[]): string {
  const obj: Record<string, unknown> = {};
  for (const v of checkColumns(r, columns)) {
    if (v.name.endsWith('_gaps_ev')) obj[v.name] = String(v.value).split(';').map(Number);
    else if (v.name === 'site_key' || v.name === 'file' || v.name === 'site') obj[v.name] = v.value;
    else obj[v.name] = v.value === '' ? null : Number(v.value);
  }
  return `${JSON.stringify(obj)}\n`;
}

const CSV_HEADER_KEYS = ['format', 'gapstack_version', 'question_sha256', 'sites_sha256', 'sites_total', 'shard', 'shard_sites', 'caution'] as const;

/** The opening lines of a CSV part: `# key: value` lines, then the column names. */
export function csvHeader(id: PartIdentity): string {
  const values = identityValues(id);
  return `${CSV_HEADER_KEYS.map((k) => `# ${k}: ${values[k]}`).join('\n')}\n${id.columns.join(',')}\n`;
}

/** The first line of a JSON Lines part: the identity as one object. */
export function jsonHeader(id: PartIdentity): string {
  return `${JSON.stringify({ ...identityValues(id), columns: id.columns })}\n`;
}

function identityValues(id: PartIdentity): Record<(typeof CSV_HEADER_KEYS)[number], string | number> {
  return {
    format: PART_FORMAT,
    gapstack_version: id.version,
    question_sha256: id.questionSha256,
    sites_sha256: id.sitesSha256,
    sites_total: id.sitesTotal,
    shard: shardLabel(id.shard),
    shard_sites: id.shardSites,
    caution: CAUTION,
  };
}

function parseShardLabel(text: string, where: string): Shard {
  const m = /^(\d+)\/(\d+)$/.exec(text);
  if (!m) throw new UserError(`${where}: shard "${text}" is not K/N`);
  const k = Number(m[1]), n = Number(m[2]);
  if (k < 1 || k > n) throw new UserError(`${where}: shard ${text} is outside 1–${n}`);
  return { index: k - 1, count: n };
}

function identityFrom(v: Record<string, unknown>, columns: string[], where: string): PartIdentity {
  if (v.format !== PART_FORMAT) throw new UserError(`${where}: not a gapstack sites part (format ${JSON.stringify(v.format ?? null)}, expected ${PART_FORMAT})`);
  const whole = (x: unknown, name: string) => {
    const n = Number(x);
    if (!Number.isSafeInteger(n) || n < 0) throw new UserError(`${where}: ${name} is not a whole number`);
    return n;
  };
  const hex = (x: unknown, name: string) => {
    if (typeof x !== 'string' || !/^[0-9a-f]{64}$/.test(x)) throw new UserError(`${where}: ${name} is not a SHA-256`);
    return x;
  };
  if (typeof v.gapstack_version !== 'string' || v.gapstack_version === '') throw new UserError(`${where}: gapstack_version missing`);
  return {
    version: v.gapstack_version,
    questionSha256: hex(v.question_sha256, 'question_sha256'),
    sitesSha256: hex(v.sites_sha256, 'sites_sha256'),
    sitesTotal: whole(v.sites_total, 'sites_total'),
    shard: parseShardLabel(String(v.shard), where),
    shardSites: whole(v.shard_sites, 'shard_sites'),
    columns,
  };
}

/** Identity from the header lines of a CSV part (the `#` lines and the column line). */
export function parseCsvHeader(lines: readonly string[], where: string): PartIdentity {
  const v: Record<string, unknown> = {};
  for (let i = 0; i < CSV_HEADER_KEYS.length; i++) {
    const m = /^# ([a-z0-9_]+): (.*)$/.exec(lines[i] ?? '');
    if (!m || m[1] !== CSV_HEADER_KEYS[i]) throw new UserError(`${where}:${i + 1}: not a gapstack sites part (expected "# ${CSV_HEADER_KEYS[i]}: …")`);
    v[m[1]!] = m[2];
  }
  const cols = lines[CSV_HEADER_KEYS.length];
  if (cols === undefined) throw new UserError(`${where}: the column line is missing`);
  return identityFrom(v, cols.split(','), where);
}

/** Lines before the first row of a CSV part. */
export const CSV_HEADER_LINES = CSV_HEADER_KEYS.length + 1;

/** Identity from the first line of a JSON Lines part. */
export function parseJsonHeader(line: string, where: string): PartIdentity {
  let v: unknown;
  try {
    v = JSON.parse(line);
  } catch {
    throw new UserError(`${where}:1: not a gapstack sites part (first line is not JSON)`);
  }
  if (typeof v !== 'object' || v === null || Array.isArray(v)) throw new UserError(`${where}:1: not a gapstack sites part`);
  const o = v as Record<string, unknown>;
  if (!Array.isArray(o.columns) || !o.columns.every((c) => typeof c === 'string')) throw new UserError(`${where}:1: columns missing`);
  return identityFrom(o, o.columns as string[], where);
}

/** The site key a row line starts with (CSV: first field; JSON Lines: "site_key"). */
export function rowKey(line: string, kind: 'csv' | 'jsonl', where: string): string {
  const key = kind === 'csv' ? line.slice(0, line.indexOf(',')) : /^\{"site_key":"([0-9a-f]{64})"/.exec(line)?.[1];
  if (key === undefined || !/^[0-9a-f]{64}$/.test(key)) throw new UserError(`${where}: row does not start with a site key`);
  return key;
}

/** Why two parts cannot be merged, or null when they answer the same question over the same sites. */
export function identityMismatch(a: PartIdentity, b: PartIdentity): string | null {
  if (a.version !== b.version) return `computed by different gapstack versions (${a.version} and ${b.version})`;
  if (a.questionSha256 !== b.questionSha256) return `answer different questions (question SHA-256 ${a.questionSha256.slice(0, 12)}… and ${b.questionSha256.slice(0, 12)}…)`;
  if (a.sitesSha256 !== b.sitesSha256 || a.sitesTotal !== b.sitesTotal) return `cover different sets of sites (${a.sitesTotal} and ${b.sitesTotal} sites)`;
  if (a.shard.count !== b.shard.count) return `come from different splits (${a.shard.count} and ${b.shard.count} shards)`;
  if (a.columns.join(',') !== b.columns.join(',')) return 'have different columns';
  return null;
}
