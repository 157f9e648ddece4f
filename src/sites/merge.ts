/**
 * `gapstack sites merge`: the parts of every shard of one batch combined into
 * the part a single unsharded run writes, byte for byte. Parts are streamed (a
 * k-way merge on site key), so memory does not grow with the number of sites.
 */
import { closeSync, existsSync, openSync, renameSync, rmSync, writeSync, mkdirSync } from 'node:fs';
import { basename, dirname, extname, join } from 'node:path';
import { UserError } from '../errors.js';
import { readLines, type Line } from './lines.js';
import { csvHeader, CSV_HEADER_LINES, identityMismatch, jsonHeader, parseCsvHeader, parseJsonHeader, rowKey, type PartIdentity } from './parts.js';
import { shardLabel, WHOLE } from './shard.js';

export type PartKind = 'csv' | 'jsonl';

/** A part's kind from its extension. */
export function partKind(path: string): PartKind {
  const ext = extname(path).toLowerCase();
  if (ext === '.csv') return 'csv';
  if (ext === '.jsonl' || ext === '.json') return 'jsonl';
  throw new UserError(`${path}: a sites part ends in .csv or .jsonl`);
}

interface OpenPart {
  path: string;
  id: PartIdentity;
  lines: Generator<Line>;
  head: string | null;
  headKey: string | null;
  rows: number;
}

function openPart(path: string, kind: PartKind): OpenPart {
  const lines = readLines(path);
  const headerCount = kind === 'csv' ? CSV_HEADER_LINES : 1;
  const header: string[] = [];
  try {
    while (header.length < headerCount) {
      const next = lines.next();
      if (next.done || !next.value.complete) throw new UserError(`${path}: the part's header is incomplete`);
      header.push(next.value.text);
    }
    const id = kind === 'csv' ? parseCsvHeader(header, path) : parseJsonHeader(header[0]!, path);
    return { path, id, lines, head: null, headKey: null, rows: 0 };
  } catch (err) {
    lines.return(undefined);
    throw err;
  }
}

function advance(p: OpenPart, kind: PartKind): void {
  const next = p.lines.next();
  if (next.done) {
    p.head = null;
    p.headKey = null;
    return;
  }
  const line = next.value;
  const where = `${p.path}:${(kind === 'csv' ? CSV_HEADER_LINES : 1) + p.rows + 1}`;
  if (!line.complete) throw new UserError(`${where}: the last row is cut short; rerun shard ${shardLabel(p.id.shard)} to finish it`);
  const key = rowKey(line.text, kind, where);
  if (p.headKey !== null && key <= p.headKey) throw new UserError(`${where}: rows are not in site-key order`);
  p.head = line.text;
  p.headKey = key;
  p.rows++;
}

export interface MergeSummary {
  out: string;
  parts: number;
  sites: number;
}

/**
 * Merge the parts of all shards of one batch into `out`. Refuses parts of
 * different questions, versions or site sets, a missing or repeated shard, and
 * an unfinished part.
 */
export function mergeParts(paths: readonly string[], out: string): MergeSummary {
  if (paths.length === 0) throw new UserError('sites merge needs the part files of every shard');
  const kind = partKind(paths[0]!);
  for (const p of paths) {
    if (partKind(p) !== kind) throw new UserError(`${p}: cannot merge .csv and .jsonl parts together`);
    if (!existsSync(p)) throw new UserError(`${p}: no such part file`);
  }
  const parts: OpenPart[] = [];
  try {
    for (const p of paths) parts.push(openPart(p, kind));
    return mergeOpen(parts, kind, out);
  } finally {
    for (const p of parts) p.lines.return(undefined);
  }
}

function mergeOpen(parts: OpenPart[], kind: PartKind, out: string): MergeSummary {
  const first = parts[0]!;
  for (const p of parts.slice(1)) {
    const why = identityMismatch(first.id, p.id);
    if (why) throw new UserError(`${first.path} and ${p.path} cannot be merged: they ${why}`);
  }
  const n = first.id.shard.count;
  const seen = new Map<number, string>();
  for (const p of parts) {
    const other = seen.get(p.id.shard.index);
    if (other !== undefined) throw new UserError(`${other} and ${p.path} are both shard ${shardLabel(p.id.shard)}`);
    seen.set(p.id.shard.index, p.path);
  }
  const missing = Array.from({ length: n }, (_, i) => i).filter((i) => !seen.has(i));
  if (missing.length > 0) throw new UserError(`shard${missing.length > 1 ? 's' : ''} ${missing.map((i) => `${i + 1}/${n}`).join(', ')} missing: merge needs all ${n} parts`);
  if (parts.reduce((s, p) => s + p.id.shardSites, 0) !== first.id.sitesTotal) throw new UserError(`the parts' site counts do not add up to the batch's ${first.id.sitesTotal} sites`);

  const merged: PartIdentity = { ...first.id, shard: WHOLE, shardSites: first.id.sitesTotal };
  mkdirSync(dirname(out), { recursive: true });
  const tmp = join(dirname(out), `.${basename(out)}.${process.pid}.${Date.now()}.tmp`);
  const fd = openSync(tmp, 'w');
  let written = 0;
  try {
    writeSync(fd, kind === 'csv' ? csvHeader(merged) : jsonHeader(merged));
    for (const p of parts) advance(p, kind);
    for (;;) {
      let best: OpenPart | null = null;
      for (const p of parts) if (p.headKey !== null && (best === null || p.headKey < best.headKey!)) best = p;
      if (best === null) break;
      writeSync(fd, `${best.head}\n`);
      written++;
      advance(best, kind);
    }
    for (const p of parts) {
      if (p.rows !== p.id.shardSites) throw new UserError(`${p.path}: shard ${shardLabel(p.id.shard)} has ${p.rows} of its ${p.id.shardSites} sites; rerun it to finish`);
    }
    closeSync(fd);
    renameSync(tmp, out);
  } catch (err) {
    try {
      closeSync(fd);
    } catch {
      /* already closed */
    }
    rmSync(tmp, { force: true });
    throw err;
  }
  return { out, parts: parts.length, sites: written };
}
