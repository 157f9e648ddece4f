/**
 * Sharding a batch of sites over the tasks of a scheduler. A site belongs to
 * shard `hash(site) mod N`, where the hash is the SHA-256 of the weather file's
 * bytes: the partition does not depend on the order or the names under which
 * the files were listed, so every task of a job array, given the same folder,
 * agrees on who does what without talking to the others.
 */
import { createHash } from 'node:crypto';
import { closeSync, openSync, readSync } from 'node:fs';
import { UserError } from '../errors.js';

/** One share of the work: `index` in 0..count-1. Written for people as `index+1/count`. */
export interface Shard {
  index: number;
  count: number;
}

/** Where a shard came from, for the run's own record. */
export type ShardSource = 'option' | 'slurm' | 'kubernetes' | 'none';

export interface ResolvedShard {
  shard: Shard;
  source: ShardSource;
}

/** The whole batch in one part. */
export const WHOLE: Shard = Object.freeze({ index: 0, count: 1 });

/** Largest shard count accepted (far above any array a scheduler allows by default). */
export const MAX_SHARDS = 1_000_000;

/** "K/N" for people: K counts from 1. */
export function shardLabel(s: Shard): string {
  return `${s.index + 1}/${s.count}`;
}

function wholeNumber(text: string, what: string): number {
  const t = text.trim();
  if (!/^\d+$/.test(t)) throw new UserError(`${what} must be a whole number, got "${text}"`);
  const n = Number(t);
  if (!Number.isSafeInteger(n)) throw new UserError(`${what} is too large: ${text}`);
  return n;
}

function checkedShard(index: number, count: number, what: string): Shard {
  if (count < 1 || count > MAX_SHARDS) throw new UserError(`${what}: the number of shards must be 1–${MAX_SHARDS}, got ${count}`);
  if (index < 0 || index >= count) throw new UserError(`${what}: shard ${index + 1} is outside 1–${count}`);
  return { index, count };
}

/** Parse `--shard K/N` (1 ≤ K ≤ N). */
export function parseShard(text: string): Shard {
  const m = /^\s*([^/]+)\/([^/]+)\s*$/.exec(text);
  if (!m) throw new UserError(`--shard must be K/N (this task's share K of N, counting from 1), got "${text}"`);
  const k = wholeNumber(m[1]!, '--shard K');
  const n = wholeNumber(m[2]!, '--shard N');
  if (k < 1) throw new UserError(`--shard counts from 1: got ${text}, the first share is 1/${n}`);
  return checkedShard(k - 1, n, `--shard ${text}`);
}

type Env = Record<string, string | undefined>;

const present = (env: Env, name: string): boolean => env[name] !== undefined && env[name]!.trim() !== '';

/**
 * The shard of a Slurm job-array task: SLURM_ARRAY_TASK_ID relative to
 * SLURM_ARRAY_TASK_MIN (default 0) in steps of SLURM_ARRAY_TASK_STEP (default 1);
 * the count from SLURM_ARRAY_TASK_COUNT, else from MIN, MAX and STEP. A task list
 * with gaps (e.g. --array=1,4,9) cannot be numbered 0..N-1 and is refused.
 * Null outside a job array.
 */
export function slurmShard(env: Env): Shard | null {
  if (!present(env, 'SLURM_ARRAY_TASK_ID')) return null;
  const id = wholeNumber(env.SLURM_ARRAY_TASK_ID!, 'SLURM_ARRAY_TASK_ID');
  const min = present(env, 'SLURM_ARRAY_TASK_MIN') ? wholeNumber(env.SLURM_ARRAY_TASK_MIN!, 'SLURM_ARRAY_TASK_MIN') : 0;
  const step = present(env, 'SLURM_ARRAY_TASK_STEP') ? wholeNumber(env.SLURM_ARRAY_TASK_STEP!, 'SLURM_ARRAY_TASK_STEP') : 1;
  if (step < 1) throw new UserError(`SLURM_ARRAY_TASK_STEP must be at least 1, got ${step}`);
  if (id < min || (id - min) % step !== 0) throw new UserError(`SLURM_ARRAY_TASK_ID ${id} is not on the array's grid (min ${min}, step ${step})`);
  const index = (id - min) / step;
  let count: number;
  if (present(env, 'SLURM_ARRAY_TASK_COUNT')) count = wholeNumber(env.SLURM_ARRAY_TASK_COUNT!, 'SLURM_ARRAY_TASK_COUNT');
  else if (present(env, 'SLURM_ARRAY_TASK_MAX')) {
    const max = wholeNumber(env.SLURM_ARRAY_TASK_MAX!, 'SLURM_ARRAY_TASK_MAX');
    if (max < min) throw new UserError(`SLURM_ARRAY_TASK_MAX ${max} is below SLURM_ARRAY_TASK_MIN ${min}`);
    count = Math.floor((max - min) / step) + 1;
  } else throw new UserError('SLURM_ARRAY_TASK_ID is set but neither SLURM_ARRAY_TASK_COUNT nor SLURM_ARRAY_TASK_MAX: give --shard K/N');
  if (present(env, 'SLURM_ARRAY_TASK_MAX') && present(env, 'SLURM_ARRAY_TASK_COUNT')) {
    const max = wholeNumber(env.SLURM_ARRAY_TASK_MAX!, 'SLURM_ARRAY_TASK_MAX');
    if (Math.floor((max - min) / step) + 1 !== count) {
      throw new UserError(`this Slurm array's task ids have gaps (${count} tasks between ${min} and ${max}): use a contiguous range such as --array=0-${count - 1}, or give --shard K/N`);
    }
  }
  return checkedShard(index, count, `Slurm array task ${id}`);
}

/**
 * The shard of a Kubernetes indexed-Job pod: JOB_COMPLETION_INDEX (0-based);
 * Kubernetes does not tell a pod the completion count, so the Job passes it,
 * as `--shard-count` or GAPSTACK_SHARD_COUNT. Null outside an indexed Job.
 */
export function kubernetesShard(env: Env, count?: number): Shard | null {
  if (!present(env, 'JOB_COMPLETION_INDEX')) return null;
  const index = wholeNumber(env.JOB_COMPLETION_INDEX!, 'JOB_COMPLETION_INDEX');
  const n = count ?? (present(env, 'GAPSTACK_SHARD_COUNT') ? wholeNumber(env.GAPSTACK_SHARD_COUNT!, 'GAPSTACK_SHARD_COUNT') : undefined);
  if (n === undefined) throw new UserError('JOB_COMPLETION_INDEX is set but the number of completions is not: give --shard-count N (the Job\'s spec.completions) or set GAPSTACK_SHARD_COUNT');
  return checkedShard(index, n, `Kubernetes completion index ${index}`);
}

/**
 * This task's shard: `--shard K/N` when given, else the scheduler's environment
 * (Slurm job array first, then Kubernetes indexed Job), else the whole batch.
 */
export function resolveShard(opts: { option?: string; shardCount?: number; env?: Env }): ResolvedShard {
  const env = opts.env ?? process.env;
  if (opts.option !== undefined) {
    const shard = parseShard(opts.option);
    if (opts.shardCount !== undefined && opts.shardCount !== shard.count) throw new UserError(`--shard ${opts.option} and --shard-count ${opts.shardCount} disagree`);
    return { shard, source: 'option' };
  }
  const slurm = slurmShard(env);
  if (slurm) return { shard: slurm, source: 'slurm' };
  const k8s = kubernetesShard(env, opts.shardCount);
  if (k8s) return { shard: k8s, source: 'kubernetes' };
  if (opts.shardCount !== undefined && opts.shardCount !== 1) throw new UserError('--shard-count needs a shard index: give --shard K/N, or run inside a Slurm job array or a Kubernetes indexed Job');
  return { shard: WHOLE, source: 'none' };
}

/** SHA-256 of a weather file's bytes, hex: the site's identity for sharding, ordering and resuming. */
export function siteKeyOfBytes(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** SHA-256 (hex) of a file's bytes, read in fixed-size chunks (memory does not grow with the file). */
export function siteKeyOfFile(path: string): string {
  const hash = createHash('sha256');
  const buf = Buffer.alloc(1 << 16);
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (err) {
    throw new UserError(`${path}: cannot read the weather file (${(err as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  try {
    for (let n = readSync(fd, buf, 0, buf.length, null); n > 0; n = readSync(fd, buf, 0, buf.length, null)) hash.update(buf.subarray(0, n));
  } finally {
    closeSync(fd);
  }
  return hash.digest('hex');
}

/** The shard (0-based) a site key belongs to among `count`: its first 52 bits modulo count. */
export function shardOfKey(keyHex: string, count: number): number {
  if (!/^[0-9a-f]{13,}$/.test(keyHex)) throw new Error(`site key must be lowercase hex, got ${keyHex}`);
  return Number(BigInt(`0x${keyHex.slice(0, 13)}`) % BigInt(count));
}

/** Whether a site key falls in a shard. */
export function inShard(keyHex: string, shard: Shard): boolean {
  return shardOfKey(keyHex, shard.count) === shard.index;
}
