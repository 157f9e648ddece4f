/**
 * Real scheduler, really run: a single-node Slurm cluster on localhost runs the
 * shipped job-array script (examples/slurm/sites-array.sbatch) over invented
 * sites; the parts its tasks write are merged and compared, byte for byte, with
 * an unsharded run. Skipped, with the reason printed, only where this machine
 * cannot run Slurm (not root, no apt-get, daemons refuse to start).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sitesCommand } from '../../src/cli/sites-command.js';
import { loadEnsemble } from '../../src/light/ensemble.js';
import type { SiteLightSource } from '../../src/sites/question.js';
import { ROOT, runCli } from '../helpers/cli.js';
import { startSlurm } from '../helpers/slurm.js';

const cluster = await startSlurm();
if (typeof cluster === 'string') console.log(`skipping the Slurm integration test: ${cluster}`);
const work = mkdtempSync(join(tmpdir(), 'gapstack-slurm-run-'));
afterAll(() => {
  if (typeof cluster !== 'string') cluster.stop();
  rmSync(work, { recursive: true, force: true });
});

const MANIFEST = join(ROOT, 'examples/ensemble-demo/manifest.yaml');
// The per-site light is the demo ensemble in this test (see test/fixtures/slurm/demo-sites.mjs).
const members = loadEnsemble(MANIFEST, { defaultTempK: 300 }).members;
const demoLight: SiteLightSource = async (path) => {
  const loc = readFileSync(path, 'utf8').split('\n', 1)[0]!.split(',');
  return { name: loc[1]!, latDeg: Number(loc[6]), lonDeg: Number(loc[7]), spectra: members };
};

describe.skipIf(typeof cluster === 'string')('Slurm job array', () => {
  it('the example sbatch array over invented sites, merged, equals the unsharded run byte for byte', async () => {
    if (typeof cluster === 'string') return;
    const sites = join(work, 'sites');
    mkdirSync(sites);
    for (const s of ['saltreach', 'skarholm', 'orvale', 'verdance']) copyFileSync(join(ROOT, 'examples/sites', `${s}.epw`), join(sites, `${s}.epw`));
    const design = join(work, 'design.yaml');
    writeFileSync(design, ['name: invented 2T fixed-bottom question', `ensemble: ${JSON.stringify(MANIFEST)}`, 'temperature: 300', 'subcells:', '  - label: top', '    range: [1.5, 1.9]', '  - label: bottom', '    gap: 1.12', 'wirings: [series]', ''].join('\n'));

    await sitesCommand({ design, weather: [sites], out: join(work, 'whole') }, demoLight);

    const out = join(work, 'array');
    const sb = spawnSync('sbatch', ['--array=0-2', '--wait', `--chdir=${ROOT}`, `--output=${join(work, 'task-%a.log')}`, join(ROOT, 'examples/slurm/sites-array.sbatch')], {
      encoding: 'utf8',
      timeout: 600_000,
      env: { ...cluster.env, DESIGN: design, SITES: sites, OUT: out, GAPSTACK: `${process.execPath} ${join(ROOT, 'test/fixtures/slurm/demo-sites.mjs')}` },
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
