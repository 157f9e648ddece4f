/**
 * `npm run bench`: the speed targets of the project as whole command-line
 * calls, each paired with a bare `node -e 0` start in the same run (ratios to
 * bare node with their spread), the vectorised numpy peer for the 2T map when
 * python3 with numpy is present, and peak memory per row. The 8760-spectrum
 * wide table is invented at bench time (src/bench/year-table.ts), never
 * committed. Machines here are shared and noisy: read medians and spreads.
 *
 *   npm run bench             text table
 *   npm run bench -- --json   the rows as JSON
 *   npm run bench -- --runs 3 pairs per row (default 5 for quick rows, 3 for long ones)
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { paired, stats, runOnce, type PairedResult, type Stats } from './whole-command.js';
import { writeInventedYearTable } from './year-table.js';

const argv = process.argv.slice(2);
const json = argv.includes('--json');
const runsArg = argv.indexOf('--runs');
const runsOverride = runsArg >= 0 ? Number(argv[runsArg + 1]) : undefined;
const log = (line = '') => {
  if (!json) process.stdout.write(`${line}\n`);
};

const root = fileURLToPath(new URL('../../', import.meta.url));
const bin = join(root, 'bin', 'gapstack.cjs');
const work = mkdtempSync(join(tmpdir(), 'gapstack-bench-'));
const gapstack = (...args: string[]): [string, string[]] => [process.execPath, [bin, ...args]];

interface Row {
  item: string;
  command: string;
  runs: number;
  seconds: Stats;
  bare_node_seconds: Stats;
  ratio_to_node: Stats;
  peak_mib: number | null;
  target: string;
  met: boolean | null;
  note?: string;
  peer?: { command: string; seconds: Stats; peak_mib: number | null; ratio_peer_over_gapstack: Stats };
}
const rows: Row[] = [];

function row(item: string, [cmd, args]: [string, string[]], runs: number, target: string, met: (r: PairedResult) => boolean | null, extra: Partial<Row> = {}): Row {
  const r = paired(cmd, args, runsOverride ?? runs, { cwd: root });
  const out: Row = {
    item,
    command: cmd === process.execPath ? `gapstack ${args.slice(1).join(' ')}` : `${cmd} ${args.join(' ')}`,
    runs: r.runs,
    seconds: r.seconds,
    bare_node_seconds: r.bareNodeSeconds,
    ratio_to_node: r.ratioToNode,
    peak_mib: r.peakMiB,
    target,
    met: met(r),
    ...extra,
  };
  rows.push(out);
  const f = (s: Stats, d = 3) => `${s.median.toFixed(d)} [${s.min.toFixed(d)}–${s.max.toFixed(d)}]`;
  log(`${item}`);
  log(`  ${out.command}`);
  log(`  median ${f(r.seconds)} s over ${r.runs} pairs; bare node ${f(r.bareNodeSeconds)} s; ratio to node ${f(r.ratioToNode, 2)}; peak ${r.peakMiB === null ? '?' : r.peakMiB.toFixed(0)} MiB`);
  log(`  target ${target}: ${out.met === null ? 'no target' : out.met ? 'met' : 'NOT met'}`);
  return out;
}

log(`gapstack bench — node ${process.version}, ${availableParallelism()} cores, load average ${loadavg().map((x) => x.toFixed(2)).join(' ')}`);
log('Each row: whole command-line calls, each paired with a bare `node -e 0` started just before it; medians [min–max].');
log();

// Start-up.
row('evaluate one 2T stack', gapstack('evaluate', '--gaps', '1.7,1.1'), 7, '≤ 2× bare node (median ratio)', (r) => r.ratioToNode.median <= 2);
const npx = spawnSync('npx', ['--version'], { encoding: 'utf8' });
if (npx.status === 0) {
  row('the same through npx (for comparison: what npx adds to every call)', ['npx', ['--no-install', 'gapstack', 'evaluate', '--gaps', '1.7,1.1']], 3, 'none', () => null);
}

// Maps, with the numpy peer in the same run.
const map5 = join(work, 'map-5meV.csv');
const m5 = row('2T map 0.5–2.5 eV at 5 meV with --out', gapstack('map', '--x', '0.5:2.5', '--y', '0.5:2.5', '--step', '0.005', '--out', map5), 7, '≤ 0.25 s (the time half of this row\'s target; the peer half follows)', (r) => r.seconds.median <= 0.25);
const numpyOk = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' }).status === 0;
if (numpyOk) {
  const peerScript = join(root, 'src', 'bench', 'numpy-map-peer.py');
  const peerArgs = [peerScript, join(root, 'spectra', 'am1.5g.tsv'), join(work, 'peer-5meV.csv'), '0.005'];
  runOnce('python3', peerArgs);
  const peer: number[] = [];
  const ours: number[] = [];
  let peerPeak: number | null = null;
  for (let k = 0; k < (runsOverride ?? 7); k++) {
    const p = runOnce('python3', peerArgs);
    const g = runOnce(process.execPath, [bin, 'map', '--x', '0.5:2.5', '--y', '0.5:2.5', '--step', '0.005', '--out', map5]);
    peer.push(p.seconds);
    ours.push(g.seconds);
    if (p.peakMiB !== null) peerPeak = Math.max(peerPeak ?? 0, p.peakMiB);
  }
  const ratio = stats(peer.map((p, k) => p / ours[k]));
  m5.peer = { command: `python3 src/bench/numpy-map-peer.py spectra/am1.5g.tsv <out.csv> 0.005`, seconds: stats(peer), peak_mib: peerPeak, ratio_peer_over_gapstack: ratio };
  const timeMet = m5.met === true;
  m5.target = '≤ 0.25 s and ≥ 4× faster than the numpy peer';
  m5.met = timeMet && ratio.median >= 4;
  log(`  numpy peer (same run, paired with gapstack): ${stats(peer).median.toFixed(3)} s [${stats(peer).min.toFixed(3)}–${stats(peer).max.toFixed(3)}], peak ${peerPeak?.toFixed(0) ?? '?'} MiB; peer/gapstack ${ratio.median.toFixed(1)}× [${ratio.min.toFixed(1)}–${ratio.max.toFixed(1)}]`);
  log(`  target ≥ 4× faster than the numpy peer (median of paired ratios): ${ratio.median >= 4 ? 'met' : 'NOT met'}`);
  log(`  row target ${m5.target}: ${m5.met ? 'met' : 'NOT met'}`);
} else {
  m5.note = 'python3 with numpy not found: the peer comparison was skipped';
  log(`  ${m5.note}`);
}
row('2T map 0.5–2.5 eV at 1 meV with --out', gapstack('map', '--x', '0.5:2.5', '--y', '0.5:2.5', '--step', '0.001', '--out', join(work, 'map-1meV.csv')), 3, '≤ 1.8 s', (r) => r.seconds.median <= 1.8);

// Searches.
row('4J series optimum', gapstack('optimize', '--cells', '4', '--json'), 3, 'none', () => null);
row('5 independent subcells', gapstack('optimize', '--cells', '5', '--wiring', 'independent', '--json'), 3, 'none', () => null);
row('6 independent subcells', gapstack('optimize', '--cells', '6', '--wiring', 'independent', '--json'), 3, '≤ 5 s, ≤ 400 MiB', (r) => r.seconds.median <= 5 && (r.peakMiB ?? Infinity) <= 400);

// Ensembles: an invented hourly year as one wide table.
const year = join(work, 'invented-year.csv');
const t0 = performance.now();
writeInventedYearTable(year);
log();
log(`(wrote the invented 8760-spectrum table, ${(statSync(year).size / 2 ** 20).toFixed(0)} MiB, in ${((performance.now() - t0) / 1000).toFixed(1)} s; not timed)`);
row('yield over 8760 spectra (wide table)', gapstack('yield', '--gaps', '1.73,1.12', '--ensemble', year, '--json'), 3, '≤ 3 s, ≤ 600 MiB', (r) => r.seconds.median <= 3 && (r.peakMiB ?? Infinity) <= 600);
row('one-gap optimum over 8760 spectra', gapstack('optimize', '--cells', '2', '--fix', '2=1.12', '--ensemble', year, '--json'), 3, '≤ 5 s', (r) => r.seconds.median <= 5);

// Report.
const example = join(root, 'examples', 'perovskite-silicon.yaml');
if (existsSync(example)) {
  row('example report with figures', gapstack('report', example, '-o', join(work, 'report.html'), '--figures', join(work, 'figures')), 5, '≤ 1.0 s', (r) => r.seconds.median <= 1.0);
}

rmSync(work, { recursive: true, force: true });

// Many sites (their own module): per-site cost and peak memory of a streamed batch.
log();
const siteRows = (await import('./sites.js')).benchSites(log) as Record<string, unknown>[];
// Site light (its own module): a weather file's hourly year, whole commands paired with bare node.
log();
const siteLightRows = (await import('./site-light.js')).benchSiteLight(log);

const targeted = [...rows, ...siteRows, ...siteLightRows].filter((r) => r.met === true || r.met === false);
log();
log(`${targeted.filter((r) => r.met).length} of ${targeted.length} targets met (load average now ${loadavg().map((x) => x.toFixed(2)).join(' ')}).`);
if (json) console.log(JSON.stringify({ node: process.version, cores: availableParallelism(), load_average: loadavg(), rows, site_rows: siteRows, site_light_rows: siteLightRows }, null, 2));
