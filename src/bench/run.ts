/**
 * `npm run bench`: the engine against the plain baseline on the same work in
 * the same run, as ratios and evaluations per second, plus whole-command
 * timings. Machines here are shared and noisy: read ratios, not absolutes.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { am15g } from '../light/sources.js';
import { StepObjective } from '../stack/step-objective.js';
import { computeMap, uniformAxis } from '../search/map.js';
import { bandEdgeEnergiesEv, searchGaps } from '../search/optimize.js';
import { plainSeriesEfficiency } from './baseline.js';

const json = process.argv.includes('--json');
const s = am15g();
const spectra = [{ spectrum: s, weight: 1, tempK: 300 }];
const series = (cells: number) => new StepObjective({ cells, wiring: 'series', ere: Array(cells).fill(1), topAbsorptance: 1, spectra });
const time = <T>(f: () => T): { value: T; seconds: number } => {
  const t0 = performance.now();
  const value = f();
  return { value, seconds: (performance.now() - t0) / 1000 };
};
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const rows: Record<string, unknown>[] = [];
const log = (line: string) => {
  if (!json) console.log(line);
};

// 1. The 2T map, 0.5–2.5 eV at 5 meV (≈ 80 000 ordered pairs).
const axis = uniformAxis(0.5, 2.5, 0.005);
const obj2 = series(2);
computeMap(obj2, { x: axis, y: axis, xCell: 0, yCell: 1, fixed: [], bounds: [] }); // warm-up
const engineMaps = [0, 1, 2].map(() => time(() => computeMap(obj2, { x: axis, y: axis, xCell: 0, yCell: 1, fixed: [], bounds: [] })));
const engineMap = median(engineMaps.map((t) => t.seconds));
const m = engineMaps[0].value;
const pairs = m.values.reduce((a, v) => a + (Number.isNaN(v) ? 0 : 1), 0);
log(`2T map 0.5–2.5 eV at 5 meV: ${pairs} pairs`);
const base = time(() => {
  let worst = 0;
  for (let iy = 0; iy < axis.length; iy++) {
    for (let ix = iy + 1; ix < axis.length; ix++) {
      const v = plainSeriesEfficiency(s, [axis[ix], axis[iy]]);
      worst = Math.max(worst, Math.abs(v - m.values[iy * axis.length + ix]));
    }
  }
  return worst;
});
const mapRatio = base.seconds / engineMap;
log(`  engine ${engineMap.toFixed(4)} s (${(pairs / engineMap).toExponential(3)} stacks/s); baseline ${base.seconds.toFixed(2)} s (${(pairs / base.seconds).toExponential(3)} stacks/s); ratio ${mapRatio.toFixed(0)}×; largest difference ${base.value.toExponential(2)}`);
rows.push({ item: 'map-2T-5meV', pairs, engine_s: engineMap, baseline_s: base.seconds, ratio: mapRatio, max_abs_difference: base.value, target: 'engine ≤ 0.1 s, ratio ≥ 100', met: engineMap <= 0.1 && mapRatio >= 100 });

// 2. Global optima to 1 meV (3J, 4J series).
const edges = bandEdgeEnergiesEv(s, 0.5, 2.6);
for (const cells of [3, 4]) {
  const obj = series(cells);
  const run = time(() => searchGaps(obj, { cells, spanEv: [0.5, 2.6], ranges: [], fixed: [], loss: 0.01 }, edges));
  const r = run.value;
  // The baseline's cost per stack on the same stacks, then scaled to the engine's evaluation count.
  const probe = 300;
  const perEval = time(() => {
    for (let k = 0; k < probe; k++) plainSeriesEfficiency(s, r.best.gapsEv.map((g, i) => g + 0.0001 * ((k % 7) - 3) * (i + 1)));
  }).seconds / probe;
  const enginePerEval = run.seconds / r.stats.evaluations;
  const extrapolated = perEval * r.stats.evaluations;
  log(`${cells}J series optimum ${r.best.gapsEv.map((g) => g.toFixed(4)).join('/')} → ${(r.best.value * 100).toFixed(3)} %: engine ${run.seconds.toFixed(3)} s for ${r.stats.evaluations} stacks (${(1 / enginePerEval).toExponential(3)} stacks/s incl. search overhead); baseline ${(1 / perEval).toExponential(3)} stacks/s → ${extrapolated.toFixed(1)} s extrapolated; ratio ${(extrapolated / run.seconds).toFixed(0)}×`);
  rows.push({ item: `optimum-${cells}J-series`, engine_s: run.seconds, evaluations: r.stats.evaluations, baseline_s_extrapolated: extrapolated, ratio: extrapolated / run.seconds, efficiency: r.best.value, gaps_ev: r.best.gapsEv });
}

// 3. Whole command-line calls (process start, imports, spectrum load, work, output).
const bin = fileURLToPath(new URL('../../bin/gapstack.js', import.meta.url));
const out = join(mkdtempSync(join(tmpdir(), 'gapstack-bench-')), 'map.csv');
const cli = (args: string[]) =>
  median(
    [0, 1, 2].map(() => {
      const t0 = performance.now();
      const r = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8' });
      if (r.status !== 0) throw new Error(`gapstack ${args.join(' ')} failed: ${r.stderr}`);
      return (performance.now() - t0) / 1000;
    }),
  );
const cliMap = cli(['map', '--x', '0.5:2.5', '--y', '0.5:2.5', '--step', '0.005', '--out', out]);
const cli4 = cli(['optimize', '--cells', '4', '--json']);
const cliHelp = cli(['--version']);
const example = fileURLToPath(new URL('../../examples/perovskite-silicon.yaml', import.meta.url));
const cliReport = cli(['report', example, '-o', join(dirname(out), 'report.html')]);
log(`whole CLI: map ${cliMap.toFixed(3)} s (target ≤ 1 s), 4J optimize ${cli4.toFixed(3)} s (target ≤ 1 s), bare start-up (--version) ${cliHelp.toFixed(3)} s, example report ${cliReport.toFixed(2)} s`);
rows.push({ item: 'cli-map-2T-5meV', seconds: cliMap, target: '≤ 1 s', met: cliMap <= 1 });
rows.push({ item: 'cli-optimize-4J', seconds: cli4, target: '≤ 1 s', met: cli4 <= 1 });
rows.push({ item: 'cli-startup', seconds: cliHelp });
rows.push({ item: 'cli-report-example', seconds: cliReport });
// Many sites: per-site cost and peak memory of a streamed batch.
rows.push(...(await import('./sites.js')).benchSites(log));
if (json) console.log(JSON.stringify({ node: process.version, rows }, null, 2));
