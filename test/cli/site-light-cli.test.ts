import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { writeSiteYear } from '../../src/cli/sky-weather.js';
import { yieldCommand } from '../../src/cli/yield-command.js';
import { loadEnsemble } from '../../src/light/ensemble.js';
import { loadSiteYear } from '../../src/light/site-year.js';
import { yieldForStack } from '../../src/stack/yield.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';
import { runCli, runJson } from '../helpers/cli.js';

const TMY3 = new URL('../fixtures/weather/tmy3-723170.csv', import.meta.url).pathname;
const LONG = 180_000;

describe('the site year written by sky --out reads back as an ordinary ensemble', () => {
  test('same members, weights and temperatures, and the identical yield (bit for bit)', () => {
    const y = loadSiteYear(TMY3, { tiltDeg: 36, azimuthDeg: 180, tracking: 'none' });
    const dir = mkdtempSync(join(tmpdir(), 'gapstack-site-'));
    writeSiteYear(y, dir);
    const back = loadEnsemble(dir, { defaultTempK: 300 });
    expect(back.weightUnit).toBe('hours');
    expect(back.members).toHaveLength(y.ensemble.members.length);
    back.members.forEach((m, k) => {
      expect(m.tempK).toBe(y.ensemble.members[k].tempK);
      expect(m.weight).toBe(1);
    });
    const spec = { ...idealStack([1.7, 1.12], seriesWiring(2)), subcells: idealStack([1.7, 1.12], seriesWiring(2)).subcells.map((c, i) => ({ ...c, dEgDtEvPerK: i === 0 ? 2e-4 : -2.5e-4 })) };
    const direct = yieldForStack(spec, y.ensemble.members);
    const reread = yieldForStack(spec, back.members);
    expect(reread.yieldEfficiency).toBe(direct.yieldEfficiency);
    expect(reread.weightedPmaxWm2).toBe(direct.weightedPmaxWm2);
    const site = JSON.parse(readFileSync(join(dir, 'site.json'), 'utf8'));
    expect(site.annual_kwh_m2.poa).toBeCloseTo(y.totals.poaKwhM2, 6);
    expect(site.caution).toMatch(/no substitute/);
  }, LONG);
});

describe('yield --weather', () => {
  test('JSON carries the site: annual insolation and yield, monthly split, skipped hours, defaults and the hourly-model assumptions', () => {
    const j = JSON.parse(yieldCommand({ gaps: '1.7,1.12', weather: TMY3, tilt: '36', azimuth: '180', json: true }));
    const s = j.site;
    expect(s.name).toMatch(/GREENSBORO/);
    expect(s.annual_poa_insolation_kwh_m2).toBeCloseTo(j.energy_in_wh_m2 / 1000, 6);
    expect(s.annual_yield_kwh_m2).toBeCloseTo(j.energy_out_wh_m2 / 1000, 6);
    expect(s.annual_yield_kwh_m2 / s.annual_poa_insolation_kwh_m2).toBeCloseTo(j.yield_efficiency, 8);
    const monthSum = s.monthly.reduce((a: number, m: { poa_kwh_m2: number }) => a + m.poa_kwh_m2, 0);
    expect(monthSum).toBeCloseTo(s.annual_poa_insolation_kwh_m2, 4);
    expect(s.hours.used + s.skipped.reduce((a: number, k: { hours: number }) => a + k.hours, 0)).toBe(8760);
    expect(s.defaults_used.join(' ')).toMatch(/τ500 default/);
    expect(j.assumptions.join(' ')).toMatch(/all-sky approximation/);
    expect(j.assumptions.join(' ')).toMatch(/Faiman/);
    expect(j.weight_unit).toBe('hours');
  }, LONG);

  test('plane options without --weather, and --weather without a plane, are user errors (exit 2)', () => {
    const a = runCli(['yield', '--gaps', '1.7,1.12', '--ensemble', 'examples/ensemble-demo', '--tilt', '30']);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/--tilt applies only with --weather/);
    const b = runCli(['yield', '--gaps', '1.7,1.12', '--weather', TMY3]);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/--weather needs --tilt/);
    const c = runCli(['yield', '--gaps', '1.7,1.12', '--weather', TMY3, '--tilt', '30', '--azimuth', '180', '--tracking', 'dual']);
    expect(c.code).toBe(2);
    expect(c.stderr).toMatch(/--tracking must be none or single-axis/);
    // The library names its parameter (tiltDeg); the command line shows the flag typed.
    const d = runCli(['yield', '--gaps', '1.7,1.12', '--weather', TMY3, '--tilt', '120', '--azimuth', '180']);
    expect(d.code).toBe(2);
    expect(d.stderr).toMatch(/--tilt must be within 0–90 °, got 120/);
  }, LONG);
});

describe('optimize --weather: the site-optimal gaps and the AM1.5G winner\'s loss at the site', () => {
  test('2T with the bottom fixed at 1.12 eV: the comparison block names both optima, and the AM1.5G design yields less at the site', () => {
    const j = runJson(['optimize', '--cells', '2', '--fix', '2=1.12', '--weather', TMY3, '--tilt', '36', '--azimuth', '180']);
    const c = j.am15g_comparison;
    expect(c.am15g_best.gaps_ev[1]).toBe(1.12);
    expect(c.am15g_design_yield_efficiency).toBeLessThanOrEqual(c.ensemble_best_yield_efficiency + 1e-12);
    expect(c.loss_rel).toBeGreaterThanOrEqual(0);
    expect(c.gap_shift_ev[0]).toBeCloseTo(j.best.gaps_ev[0] - c.am15g_best.gaps_ev[0], 5);
    expect(j.spectra.length).toBeGreaterThan(4000);
  }, 600_000);

  test('sky --weather --json: site, annual sums and the hours accounted for', () => {
    const j = runJson(['sky', '--weather', TMY3, '--tilt', '36', '--azimuth', '180']);
    expect(j.site.latitude_deg).toBe(36.1);
    expect(j.annual_kwh_m2.poa).toBeGreaterThan(j.annual_kwh_m2.ghi);
    expect(j.hours.used + j.skipped.reduce((a: number, k: { hours: number }) => a + k.hours, 0)).toBe(8760);
    expect(j.assumptions.join(' ')).toMatch(/hour-ending/);
  }, LONG);
});

