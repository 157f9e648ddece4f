/**
 * `gapstack sites DESIGN WEATHER…` with each site's light from its own weather
 * file (the site-light engine's hourly year, as `optimize --weather` uses it):
 * a site's row agrees with `optimize --weather --json` for the same question,
 * a two-site batch sharded 1/2 + 2/2 and merged is the unsharded run byte for
 * byte, and an unreadable weather file is exit 2 naming it. The weather files
 * are the real ones kept for tests (see their PROVENANCE files).
 */
import { copyFileSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT, runCli, runJson } from '../helpers/cli.js';

const work = mkdtempSync(join(tmpdir(), 'gapstack-sites-weather-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const DESIGN = join(ROOT, 'examples/sites/two-terminal.yaml');
const TMY3 = join(ROOT, 'test/fixtures/weather/tmy3-723170.csv');
const EPW = join(ROOT, 'test/fixtures/weather/pvgis-45.000-8.000.epw');

function jsonlRows(path: string): Record<string, any>[] {
  return readFileSync(path, 'utf8').trim().split('\n').slice(1).map((l) => JSON.parse(l));
}

describe('gapstack sites over weather files', () => {
  it('one site\'s row equals optimize --weather --json for the same design and plane', () => {
    const out = join(work, 'one');
    // "latitude" / "equator" at Greensboro (36.1° N in the file's site line): tilt 36.1°, facing south (180°).
    const r = runCli(['sites', DESIGN, TMY3, '--tilt', 'latitude', '--azimuth', 'equator', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const [row] = jsonlRows(join(out, 'part-1-of-1.jsonl'));
    // Expected values: the same engine asked one site at a time (optimize --weather and sky --weather), rounded as the row is.
    const opt = runJson(['optimize', '--cells', '2', '--fix', '2=1.12', '--weather', TMY3, '--tilt', '36.1', '--azimuth', '180']);
    const sky = runJson(['sky', '--weather', TMY3, '--tilt', '36.1', '--azimuth', '180']);
    expect(row!.lat_deg).toBeCloseTo(36.1, 6);
    expect(row!.poa_kwh_m2).toBeCloseTo(sky.annual_kwh_m2.poa, 2);
    expect(row!['2t_gaps_ev'][0]).toBeCloseTo(opt.best.gaps_ev[0], 4);
    expect(row!['2t_gaps_ev'][1]).toBe(1.12);
    expect(row!['2t_efficiency_pct']).toBeCloseTo(100 * opt.am15g_comparison.ensemble_best_yield_efficiency, 3);
    expect(row!['2t_yield_kwh_m2']).toBeCloseTo(opt.am15g_comparison.ensemble_best_yield_efficiency * sky.annual_kwh_m2.poa, 2);
    expect(row!['2t_am15g_loss_pct']).toBeCloseTo(100 * opt.am15g_comparison.loss_rel, 3);
  }, 120_000);

  it('a two-site batch sharded 1/2 + 2/2 and merged equals the unsharded run, byte for byte', () => {
    const sites = [TMY3, EPW];
    const flags = ['--tilt', '30', '--azimuth', '180', '--albedo', '0.25'];
    const whole = join(work, 'whole');
    const w = runCli(['sites', DESIGN, ...sites, ...flags, '--out', whole]);
    expect(w.code, w.stderr).toBe(0);
    const sharded = join(work, 'sharded');
    for (const k of ['1/2', '2/2']) {
      const s = runCli(['sites', DESIGN, ...sites, ...flags, '--shard', k, '--out', sharded]);
      expect(s.code, s.stderr).toBe(0);
    }
    for (const ext of ['csv', 'jsonl']) {
      const merged = join(work, `merged.${ext}`);
      const m = runCli(['sites', 'merge', join(sharded, `part-1-of-2.${ext}`), join(sharded, `part-2-of-2.${ext}`), '--out', merged]);
      expect(m.code, m.stderr).toBe(0);
      expect(readFileSync(merged).equals(readFileSync(join(whole, `part-1-of-1.${ext}`)))).toBe(true);
    }
    expect(jsonlRows(join(whole, 'part-1-of-1.jsonl')).map((r) => r.file).sort()).toEqual(['pvgis-45.000-8.000.epw', 'tmy3-723170.csv']);
    // A different albedo is a different question: its parts never merge with these.
    const other = join(work, 'other');
    expect(runCli(['sites', DESIGN, ...sites, '--tilt', '30', '--azimuth', '180', '--shard', '1/2', '--out', other]).code).toBe(0);
    const mixed = runCli(['sites', 'merge', join(other, 'part-1-of-2.csv'), join(sharded, 'part-2-of-2.csv'), '--out', join(work, 'mixed.csv')]);
    expect(mixed.code).toBe(2);
  }, 240_000);

  it('an unreadable weather file is exit 2 naming it', () => {
    const copy = join(work, 'unreadable-site.epw');
    copyFileSync(EPW, copy);
    // Tests run as root here, where file modes do not stop reading: the reader's injected EACCES stands in for chmod 000.
    const saved = process.env.GAPSTACK_FAULT_INJECTION;
    process.env.GAPSTACK_FAULT_INJECTION = 'eacces:unreadable-site';
    try {
      const r = runCli(['sites', DESIGN, TMY3, copy, '--tilt', '30', '--azimuth', '180', '--out', join(work, 'bad')]);
      expect(r.code).toBe(2);
      expect(r.stderr).toContain(copy);
      expect(r.stderr).toMatch(/EACCES/);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
    } finally {
      if (saved === undefined) delete process.env.GAPSTACK_FAULT_INJECTION;
      else process.env.GAPSTACK_FAULT_INJECTION = saved;
    }
    const missing = runCli(['sites', DESIGN, join(work, 'no-such.epw'), '--tilt', '30', '--azimuth', '180', '--out', join(work, 'bad2')]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toContain('no-such.epw');
  }, 60_000);
});
