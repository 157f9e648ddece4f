/**
 * Real scheduler, really run: a single-node Slurm cluster on localhost runs the
 * shipped job-array script (examples/slurm/sites-array.sbatch) over invented
 * sites; the parts its tasks write are merged and compared, byte for byte, with
 * an unsharded run. Skipped, with the reason printed, only where this machine
 * cannot run Slurm (not root, no apt-get, daemons refuse to start).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT, runCli } from '../helpers/cli.js';
import { startSlurm } from '../helpers/slurm.js';

const cluster = await startSlurm();
if (typeof cluster === 'string') console.log(`skipping the Slurm integration test: ${cluster}`);
const work = mkdtempSync(join(tmpdir(), 'gapstack-slurm-run-'));
afterAll(() => {
  if (typeof cluster !== 'string') cluster.stop();
  rmSync(work, { recursive: true, force: true });
});

// The shipped example question; each site's light is its weather file's hourly year on the plane the job script names.
const DESIGN = join(ROOT, 'examples/sites/two-terminal.yaml');
const PLANE = ['--tilt', 'latitude', '--azimuth', 'equator'];

describe.skipIf(typeof cluster === 'string')('Slurm job array', () => {
  it('the example sbatch array of `gapstack sites` over invented weather files, merged, equals the unsharded run byte for byte', () => {
    if (typeof cluster === 'string') return;
    const sites = join(work, 'sites');
    mkdirSync(sites);
    for (const s of ['saltreach', 'skarholm', 'orvale', 'verdance']) copyFileSync(join(ROOT, 'examples/sites', `${s}.epw`), join(sites, `${s}.epw`));
    const whole = runCli(['sites', DESIGN, sites, ...PLANE, '--out', join(work, 'whole')]);
    expect(whole.code, whole.stderr).toBe(0);

    const out = join(work, 'array');
    const sb = spawnSync('sbatch', ['--array=0-2', '--wait', `--chdir=${ROOT}`, `--output=${join(work, 'task-%a.log')}`, join(ROOT, 'examples/slurm/sites-array.sbatch')], {
      encoding: 'utf8',
      timeout: 600_000,
      env: { ...cluster.env, DESIGN, SITES: sites, OUT: out, TILT: 'latitude', AZIMUTH: 'equator', GAPSTACK: `${process.execPath} ${join(ROOT, 'bin/gapstack.cjs')}` },
    });
    const logs = readdirSync(work).filter((f) => f.startsWith('task-')).map((f) => readFileSync(join(work, f), 'utf8')).join('\n');
    expect(sb.status, `${sb.stdout}${sb.stderr}\n${logs}`).toBe(0);
    expect(sb.stdout).toMatch(/Submitted batch job \d+/);
    // Each task found its share in the Slurm environment.
    expect(logs).toMatch(/shard 1\/3 \(from the Slurm job array\)/);
    expect(logs).toMatch(/shard 3\/3 \(from the Slurm job array\)/);
    expect(readdirSync(out).filter((f) => f.endsWith('.csv')).sort()).toEqual(['part-1-of-3.csv', 'part-2-of-3.csv', 'part-3-of-3.csv']);

    for (const ext of ['csv', 'jsonl']) {
      const merged = join(work, `merged.${ext}`);
      const r = runCli(['sites', 'merge', ...[1, 2, 3].map((k) => join(out, `part-${k}-of-3.${ext}`)), '--out', merged]);
      expect(r.code, r.stderr).toBe(0);
      expect(readFileSync(merged).equals(readFileSync(join(work, 'whole', `part-1-of-1.${ext}`)))).toBe(true);
    }
  }, 900_000);
});
