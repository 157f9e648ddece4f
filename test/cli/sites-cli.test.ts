/**
 * `gapstack sites` as a user drives it: shards from --shard and from a Slurm
 * array's environment, the real design search at each site, and `gapstack
 * sites merge` on the command line giving the unsharded run's file byte for
 * byte. Each site's light here is the demo ensemble (the weather-to-light engine
 * is tested with its own module); the sites differ by name and place.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sitesCommand } from '../../src/cli/sites-command.js';
import { loadEnsemble } from '../../src/light/ensemble.js';
import type { SiteLightSource } from '../../src/sites/question.js';
import { ROOT, runCli } from '../helpers/cli.js';

const work = mkdtempSync(join(tmpdir(), 'gapstack-sites-cli-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const MANIFEST = join(ROOT, 'examples/ensemble-demo/manifest.yaml');
const SITES = ['dunmere-flats', 'fenwick-moor', 'kelvara-bay'].map((s) => join(ROOT, 'examples/sites', `${s}.epw`));
const design = join(work, 'design.yaml');
writeFileSync(design, ['name: invented 2T fixed-bottom question', `ensemble: ${JSON.stringify(MANIFEST)}`, 'temperature: 300', 'subcells:', '  - label: top', '    range: [1.5, 1.9]', '  - label: bottom', '    gap: 1.12', 'wirings: [series]', ''].join('\n'));

const members = loadEnsemble(MANIFEST, { defaultTempK: 300 }).members;
const demoLight: SiteLightSource = async (path) => {
  const loc = readFileSync(path, 'utf8').split('\n', 1)[0]!.split(',');
  return { name: loc[1]!, latDeg: Number(loc[6]), lonDeg: Number(loc[7]), spectra: members };
};

async function withEnv<T>(env: Record<string, string>, f: () => Promise<T>): Promise<T> {
  const saved = Object.fromEntries(Object.keys(env).map((k) => [k, process.env[k]]));
  Object.assign(process.env, env);
  try {
    return await f();
  } finally {
    for (const [k, v] of Object.entries(saved)) if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
}

describe('gapstack sites', () => {
  it('Slurm-array shards merged on the command line equal the unsharded run, byte for byte', async () => {
    const whole = join(work, 'whole');
    const text = await sitesCommand({ design, weather: SITES, out: whole }, demoLight);
    expect(text).toMatch(/shard 1\/1 \(the whole batch\): 3 of 3 sites; 0 already done, 3 computed now/);
    expect(text).toMatch(/not predictions of a real device/);
    const sharded = join(work, 'sharded');
    const summaries = [];
    for (const id of ['0', '1']) {
      summaries.push(JSON.parse(await withEnv({ SLURM_ARRAY_TASK_ID: id, SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_MAX: '1' }, () => sitesCommand({ design, weather: SITES, out: sharded, json: true }, demoLight))));
    }
    expect(summaries.map((s) => s.shard_source)).toEqual(['slurm', 'slurm']);
    expect(summaries.reduce((n, s) => n + s.shard_sites, 0)).toBe(3);
    for (const ext of ['csv', 'jsonl']) {
      const out = join(work, `merged.${ext}`);
      const r = runCli(['sites', 'merge', join(sharded, `part-2-of-2.${ext}`), join(sharded, `part-1-of-2.${ext}`), '--out', out]);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toMatch(/merged 2 parts, 3 sites/);
      expect(readFileSync(out).equals(readFileSync(join(whole, `part-1-of-1.${ext}`)))).toBe(true);
    }
    // The rows hold the site's place and a 2T answer inside the design's range.
    const rows = readFileSync(join(whole, 'part-1-of-1.jsonl'), 'utf8').trim().split('\n').slice(1).map((l) => JSON.parse(l));
    expect(rows.map((r) => r.site).sort()).toEqual(['Dunmere Flats', 'Fenwick Moor', 'Kelvara Bay']);
    for (const r of rows) {
      expect(r['2t_gaps_ev'][1]).toBe(1.12);
      expect(r['2t_gaps_ev'][0]).toBeGreaterThanOrEqual(1.5);
      expect(r['2t_gaps_ev'][0]).toBeLessThanOrEqual(1.9);
      expect(r['2t_am15g_loss_pct']).toBeGreaterThanOrEqual(0);
    }
  }, 300_000);

  it('--shard-count without an index, and a bad --shard, are one-line user errors', async () => {
    await expect(sitesCommand({ design, weather: SITES, out: join(work, 'x'), shardCount: '3' }, demoLight)).rejects.toThrow(/--shard-count needs a shard index/);
    await expect(sitesCommand({ design, weather: SITES, out: join(work, 'x'), shard: '4/3' }, demoLight)).rejects.toThrow(/outside 1–3/);
  });

  it('sites merge refuses a missing shard with exit code 2 and one line', () => {
    const r = runCli(['sites', 'merge', join(work, 'sharded', 'part-1-of-2.csv'), '--out', join(work, 'half.csv')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/shard 2\/2 missing/);
  }, 60_000);
});
