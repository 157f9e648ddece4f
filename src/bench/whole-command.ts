/**
 * Timing whole command-line calls for the bench: each call is paired with a
 * bare `node -e 0` start run just before it, so a ratio to bare node is
 * measured under the same machine load; medians and spreads over the pairs;
 * peak resident memory of the call from /usr/bin/time when the system has it,
 * else from the child's own process.resourceUsage() (Node children only).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const GNU_TIME = '/usr/bin/time';
const PEAK_PRELOAD = fileURLToPath(new URL('./peak-memory.js', import.meta.url));

export interface Run {
  seconds: number;
  /** Peak resident set size [MiB], or null when it could not be read. */
  peakMiB: number | null;
}

export interface Stats {
  median: number;
  min: number;
  max: number;
}

export const stats = (xs: number[]): Stats => {
  const s = [...xs].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return { median: s.length % 2 ? s[mid] : 0.5 * (s[mid - 1] + s[mid]), min: s[0], max: s[s.length - 1] };
};

/** Run a command once; throws with its stderr if it fails. */
export function runOnce(command: string, args: string[], opts: { cwd?: string; env?: NodeJS.ProcessEnv } = {}): Run {
  const dir = mkdtempSync(join(tmpdir(), 'gapstack-bench-run-'));
  const rssFile = join(dir, 'rss');
  const useTime = existsSync(GNU_TIME);
  const isNode = command === process.execPath;
  const [cmd, argv] = useTime
    ? [GNU_TIME, ['-f', '%M', '-o', rssFile, command, ...args]]
    : [command, isNode ? ['--import', `file://${PEAK_PRELOAD}`, ...args] : args];
  const env = { ...process.env, ...opts.env, GAPSTACK_BENCH_PEAK_FILE: rssFile };
  const t0 = performance.now();
  const r = spawnSync(cmd, argv, { cwd: opts.cwd, env, encoding: 'utf8', maxBuffer: 1 << 28 });
  const seconds = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`${command} ${args.join(' ')} failed (${r.status}): ${(r.stderr ?? '').slice(0, 500)}`);
  let peakMiB: number | null = null;
  try {
    const text = readFileSync(rssFile, 'utf8').trim().split('\n').pop() ?? '';
    const kib = Number(text);
    if (Number.isFinite(kib) && kib > 0) peakMiB = kib / 1024;
  } catch {
    peakMiB = null;
  }
  rmSync(dir, { recursive: true, force: true });
  return { seconds, peakMiB };
}

export interface PairedResult {
  runs: number;
  seconds: Stats;
  bareNodeSeconds: Stats;
  /** Per pair: call time / bare node time. */
  ratioToNode: Stats;
  peakMiB: number | null;
}

/** `runs` pairs of (bare node start, the call), in that order, after one unpaired warm-up call. */
export function paired(command: string, args: string[], runs: number, opts: { cwd?: string; env?: NodeJS.ProcessEnv; warmUp?: boolean } = {}): PairedResult {
  if (opts.warmUp !== false) runOnce(command, args, opts);
  const bare: number[] = [];
  const call: number[] = [];
  const peaks: number[] = [];
  for (let k = 0; k < runs; k++) {
    bare.push(runOnce(process.execPath, ['-e', '0']).seconds);
    const r = runOnce(command, args, opts);
    call.push(r.seconds);
    if (r.peakMiB !== null) peaks.push(r.peakMiB);
  }
  return {
    runs,
    seconds: stats(call),
    bareNodeSeconds: stats(bare),
    ratioToNode: stats(call.map((c, k) => c / bare[k])),
    peakMiB: peaks.length > 0 ? Math.max(...peaks) : null,
  };
}
