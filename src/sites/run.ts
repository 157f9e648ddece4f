/**
 * A batch over sites: one question answered at every weather file of this
 * task's shard, one row per site appended to the part files as each site
 * finishes (memory does not grow with the number of sites), resumable after
 * the last complete row.
 */
import { appendFileSync, existsSync, truncateSync, writeFileSync, mkdirSync } from 'node:fs';
import { basename, join } from 'node:path';
import { UserError } from '../errors.js';
import { readLines } from './lines.js';
import { columnsFor, csvHeader, csvRow, CSV_HEADER_LINES, identityMismatch, jsonHeader, jsonRow, parseCsvHeader, parseJsonHeader, rowKey, sitesSha256, type PartIdentity, type SiteResult } from './parts.js';
import { inShard, shardLabel, siteKeyOfFile, type Shard } from './shard.js';

/** The question asked at every site; `evaluate` is the engine's per-site answer. */
export interface SiteQuestion {
  /** SHA-256 (hex) of the design and every option that changes a number. */
  questionSha256: string;
  /** Column prefixes of the wirings compared, in order (e.g. ["2t", "4t"]). */
  wirings: string[];
  /** Answer the question under one weather file. `key` and `file` are filled in by the batch. */
  evaluate: (path: string) => Promise<Omit<SiteResult, 'key' | 'file'>>;
}

export interface WeatherFile {
  path: string;
  /** SHA-256 (hex) of the file's bytes. */
  key: string;
}

export { listWeatherFiles, WEATHER_EXTENSIONS } from '../light/weather/list.js';

/**
 * Identify every weather file by the SHA-256 of its bytes, one file in memory at
 * a time. Files with identical bytes are one site (the one whose name sorts
 * first stays; the others are returned as duplicates).
 */
export function identifySites(paths: readonly string[]): { sites: WeatherFile[]; duplicates: string[] } {
  const byKey = new Map<string, string>();
  const duplicates: string[] = [];
  for (const path of [...paths].sort((a, b) => (basename(a) < basename(b) ? -1 : basename(a) > basename(b) ? 1 : a < b ? -1 : a > b ? 1 : 0))) {
    const key = siteKeyOfFile(path);
    if (byKey.has(key)) duplicates.push(path);
    else byKey.set(key, path);
  }
  const sites = [...byKey].map(([key, path]) => ({ key, path })).sort((a, b) => (a.key < b.key ? -1 : 1));
  return { sites, duplicates };
}

/** File names of a shard's part, in `outDir`. */
export function partPaths(outDir: string, shard: Shard): { csv: string; jsonl: string } {
  const stem = `part-${shard.index + 1}-of-${shard.count}`;
  return { csv: join(outDir, `${stem}.csv`), jsonl: join(outDir, `${stem}.jsonl`) };
}

export interface SitesRunOptions {
  files: readonly string[];
  outDir: string;
  shard: Shard;
  question: SiteQuestion;
  version: string;
  /** Called after every site (done, of the shard's total). */
  onProgress?: (done: number, total: number) => void;
}

export interface SitesRunSummary {
  csvPath: string;
  jsonlPath: string;
  shard: Shard;
  sitesTotal: number;
  shardSites: number;
  /** Rows already present from an earlier run of the same question. */
  resumed: number;
  computed: number;
  duplicates: string[];
}

/** Complete rows already in a part, checked against the identity and this shard's site order. */
function completeRows(path: string, kind: 'csv' | 'jsonl', id: PartIdentity, order: readonly string[]): { rows: number; end: number } | null {
  if (!existsSync(path)) return null;
  const headerCount = kind === 'csv' ? CSV_HEADER_LINES : 1;
  const header: string[] = [];
  let end = 0;
  let rows = 0;
  for (const line of readLines(path)) {
    if (header.length < headerCount) {
      if (!line.complete) return null; // cut short while writing the header: start again
      header.push(line.text);
      end = line.end;
      if (header.length === headerCount) {
        const found = kind === 'csv' ? parseCsvHeader(header, path) : parseJsonHeader(header[0]!, path);
        const why = identityMismatch(found, id) ?? (found.shard.index !== id.shard.index ? `is shard ${shardLabel(found.shard)}, not ${shardLabel(id.shard)}` : null);
        if (why) throw new UserError(`${path} already exists and was written for another run: the parts ${why}; choose another --out folder or remove it`);
      }
      continue;
    }
    if (!line.complete) break;
    const key = rowKey(line.text, kind, `${path}:${headerCount + rows + 1}`);
    if (key !== order[rows]) throw new UserError(`${path}:${headerCount + rows + 1}: row for site ${key.slice(0, 12)}… is out of place for this batch; remove the part to start it again`);
    rows++;
    end = line.end;
  }
  if (header.length < headerCount) return null;
  return { rows, end };
}

/** Keep the first `rows` rows of a part (cutting a half-written line or a row the other format lacks). */
function keepRows(path: string, kind: 'csv' | 'jsonl', rows: number): void {
  const headerCount = kind === 'csv' ? CSV_HEADER_LINES : 1;
  let seen = 0;
  let end = 0;
  for (const line of readLines(path)) {
    if (!line.complete || seen === headerCount + rows) break;
    seen++;
    end = line.end;
  }
  truncateSync(path, end);
}

/**
 * Run this shard of the batch: rows for the sites not yet in the part files,
 * in ascending site-key order, appended one site at a time.
 */
export async function runSites(opts: SitesRunOptions): Promise<SitesRunSummary> {
  const { sites, duplicates } = identifySites(opts.files);
  const mine = sites.filter((s) => inShard(s.key, opts.shard));
  const id: PartIdentity = {
    version: opts.version,
    questionSha256: opts.question.questionSha256,
    sitesSha256: sitesSha256(sites.map((s) => s.key)),
    sitesTotal: sites.length,
    shard: opts.shard,
    shardSites: mine.length,
    columns: columnsFor(opts.question.wirings),
  };
  mkdirSync(opts.outDir, { recursive: true });
  const paths = partPaths(opts.outDir, opts.shard);
  const order = mine.map((s) => s.key);
  const csvDone = completeRows(paths.csv, 'csv', id, order);
  const jsonDone = completeRows(paths.jsonl, 'jsonl', id, order);
  let resumed = 0;
  if (csvDone && jsonDone) {
    resumed = Math.min(csvDone.rows, jsonDone.rows);
    keepRows(paths.csv, 'csv', resumed);
    keepRows(paths.jsonl, 'jsonl', resumed);
  } else {
    writeFileSync(paths.csv, csvHeader(id));
    writeFileSync(paths.jsonl, jsonHeader(id));
  }
  opts.onProgress?.(resumed, mine.length);
  let computed = 0;
  for (const site of mine.slice(resumed)) {
    let answer: Awaited<ReturnType<SiteQuestion['evaluate']>>;
    try {
      answer = await opts.question.evaluate(site.path);
    } catch (err) {
      // Stop at the first site that cannot be answered, naming its file; the rows so far stay, and a rerun resumes.
      if (err instanceof UserError && !err.message.includes(site.path)) throw new UserError(`${site.path}: ${err.message}`);
      throw err;
    }
    const row: SiteResult = { ...answer, key: site.key, file: basename(site.path) };
    // JSON first, then CSV: a cut between the two leaves the CSV one row short, which a rerun trims to match.
    appendFileSync(paths.jsonl, jsonRow(row, id.columns));
    appendFileSync(paths.csv, csvRow(row, id.columns));
    computed++;
    opts.onProgress?.(resumed + computed, mine.length);
  }
  return { csvPath: paths.csv, jsonlPath: paths.jsonl, shard: opts.shard, sitesTotal: sites.length, shardSites: mine.length, resumed, computed, duplicates };
}
