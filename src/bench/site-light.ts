/**
 * Site-light rows of `npm run bench`: building a typical year's hourly
 * ensemble in process, and whole `yield --weather` and `optimize --weather`
 * calls with their peak memory, each paired with a bare `node` start in the
 * same run (machines here are shared and noisy: read the pairs, not absolutes).
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { loadSiteYear } from '../light/site-year.js';

/** Targets (docs: issue 13): year build ≤ 1 s; yield at fixed gaps ≤ 1.5 s; 2T fixed-bottom optimum ≤ 3 s; peak memory ≤ 400 MiB. */
export const SITE_LIGHT_TARGETS = { buildYearS: 1, yieldS: 1.5, optimizeS: 3, peakMiB: 400 } as const;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** One whole command in a child node: wall time [s] and peak resident memory [MiB]. */
function runChild(bin: string, args: string[]): { seconds: number; peakMiB: number } {
  const code = `process.on('exit', () => process.stderr.write('\\nMAXRSS_KB ' + process.resourceUsage().maxRSS + '\\n')); await import(${JSON.stringify(pathToFileURL(bin).href)});`;
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ['--input-type=module', '-e', code, 'gapstack', ...args], { encoding: 'utf8', maxBuffer: 1 << 30 });
  const seconds = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`gapstack ${args.join(' ')} failed: ${r.stderr}`);
  const m = /MAXRSS_KB (\d+)/.exec(r.stderr);
  return { seconds, peakMiB: m ? Number(m[1]) / 1024 : NaN };
}

export function benchSiteLight(log: (line: string) => void): Record<string, unknown>[] {
  const weather = fileURLToPath(new URL('../../examples/sites/cinder-reach.epw', import.meta.url));
  const bin = fileURLToPath(new URL('../../bin/gapstack.cjs', import.meta.url));
  const plane = ['--weather', weather, '--tilt', '30', '--azimuth', '180'];

  const builds = [0, 1, 2].map(() => {
    const t0 = performance.now();
    const y = loadSiteYear(weather, { tiltDeg: 30, azimuthDeg: 180, tracking: 'none' });
    return { seconds: (performance.now() - t0) / 1000, hours: y.totals.usedHours };
  });
  const build = median(builds.map((b) => b.seconds));

  const bare = median([0, 1, 2].map(() => {
    const t0 = performance.now();
    spawnSync(process.execPath, ['-e', '0']);
    return (performance.now() - t0) / 1000;
  }));
  const three = (args: string[]) => {
    const runs = [0, 1, 2].map(() => runChild(bin, args));
    return { seconds: median(runs.map((r) => r.seconds)), peakMiB: Math.max(...runs.map((r) => r.peakMiB)) };
  };
  const yieldRun = three(['yield', '--gaps', '1.73,1.12', ...plane, '--json']);
  const optRun = three(['optimize', '--cells', '2', '--fix', '2=1.12', ...plane, '--json']);
  const peak = Math.max(yieldRun.peakMiB, optRun.peakMiB);
  const T = SITE_LIGHT_TARGETS;
  log(
    `site light (invented site, ${builds[0].hours} daylight hours): build the year ${build.toFixed(3)} s (target ≤ ${T.buildYearS} s); ` +
      `yield --weather ${yieldRun.seconds.toFixed(2)} s (≤ ${T.yieldS} s), optimize --cells 2 --fix 2=1.12 --weather ${optRun.seconds.toFixed(2)} s (≤ ${T.optimizeS} s), ` +
      `bare node ${bare.toFixed(3)} s in the same run; peak memory ${peak.toFixed(0)} MiB (≤ ${T.peakMiB} MiB)`,
  );
  return [
    { item: 'site-year-build', seconds: build, hours: builds[0].hours, target: `≤ ${T.buildYearS} s`, met: build <= T.buildYearS },
    { item: 'cli-yield-weather', seconds: yieldRun.seconds, bare_node_s: bare, peak_mib: yieldRun.peakMiB, target: `≤ ${T.yieldS} s`, met: yieldRun.seconds <= T.yieldS },
    { item: 'cli-optimize-2T-fixed-bottom-weather', seconds: optRun.seconds, bare_node_s: bare, peak_mib: optRun.peakMiB, target: `≤ ${T.optimizeS} s`, met: optRun.seconds <= T.optimizeS },
    { item: 'site-light-peak-memory', mib: peak, target: `≤ ${T.peakMiB} MiB`, met: peak <= T.peakMiB },
  ];
}
