import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { yieldCommand } from '../../src/cli/yield-command.js';
import { UserError } from '../../src/errors.js';
import { ROOT, runCli, runJson } from '../helpers/cli.js';

const DEMO = join(ROOT, 'examples', 'ensemble-demo');
const dir = mkdtempSync(join(tmpdir(), 'gapstack-yield-cli-'));
const write = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

describe('yieldCommand (called directly)', () => {
  const j = JSON.parse(yieldCommand({ gaps: '1.73,1.12', ensemble: DEMO, json: true }));

  test('JSON carries the yield, energies in Wh/m² for hour weights, per-spectrum results, summary, ensemble and caution', () => {
    expect(j.yield_efficiency).toBeGreaterThan(0.3);
    expect(j.yield_efficiency).toBeLessThan(j.am15g_efficiency);
    expect(j.weight_unit).toBe('hours');
    expect(j.per_spectrum.length).toBe(16);
    const ein = j.per_spectrum.reduce((a: number, p: any) => a + p.weight * p.pin_w_m2, 0);
    const eout = j.per_spectrum.reduce((a: number, p: any) => a + p.weight * p.pmax_w_m2, 0);
    expect(j.energy_in_wh_m2).toBeCloseTo(ein, 2);
    expect(j.energy_out_wh_m2).toBeCloseTo(eout, 2);
    expect(j.yield_efficiency).toBeCloseTo(eout / ein, 8);
    const p = j.per_spectrum[0];
    for (const k of ['label', 'weight', 'temp_k', 'pin_w_m2', 'pmax_w_m2', 'efficiency', 'voc_v']) expect(p[k]).toBeDefined();
    expect(p.subcells.length).toBe(2);
    // Series string: one current through both subcells under every spectrum.
    for (const q of j.per_spectrum) expect(q.subcells[0].j_op_ma_cm2).toBeCloseTo(q.subcells[1].j_op_ma_cm2, 6);
    expect(j.summary.count).toBe(16);
    expect(j.summary.ape.window_nm).toEqual([350, 1050]);
    expect(j.summary.out_of_range).toMatch(/count as zero/);
    expect(j.ensemble.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(j.ensemble.name).toBe('synthetic-demo-year');
    expect(j.caution).toMatch(/detailed-balance limits/);
    expect(j.assumptions.join('\n')).toMatch(/current re-matched under every spectrum/);
  });

  test('text output: a table with units, energy totals, assumptions and the caution', () => {
    const t = yieldCommand({ gaps: '1.73,1.12', wiring: 'independent', ensemble: DEMO });
    expect(t).toMatch(/Yield-weighted efficiency \d+\.\d{3} % over 16 spectra/);
    expect(t).toMatch(/kWh\/m²/);
    expect(t).toMatch(/P_in \[W\/m²\]/);
    expect(t).toMatch(/J op 2 \[mA\/cm²\]/);
    expect(t).toMatch(/APE \[eV\]/);
    expect(t).toMatch(/summer-clear-midday/);
    expect(t).toMatch(/not predictions of a real device/);
    expect(t).toMatch(/no substitute for certified measurement, engineering sign-off/);
  });

  test('energy shares give no energy totals; --temp is the default for members without one', () => {
    const share = JSON.parse(yieldCommand({ gaps: '1.34', ensemble: join(DEMO, 'spectra'), temp: '320', json: true }));
    expect(share.weight_unit).toBe('share');
    expect(share.energy_in_wh_m2).toBeNull();
    expect(share.per_spectrum.every((p: any) => p.temp_k === 320)).toBe(true);
  });

  test('warns when the lowest gap lies beyond a member table', () => {
    const rows = [300, 500, 700, 900, 1100, 1300, 1500].map((l) => `${l},1`).join('\n');
    const p = write('short.csv', `wavelength_nm,irradiance_W_m2_nm\n${rows}\n`);
    const j2 = JSON.parse(yieldCommand({ gaps: '1.6,0.7', ensemble: p, json: true }));
    expect(j2.summary.warnings.join('\n')).toMatch(/end before 1771 nm/);
  });

  test('missing --ensemble is a user error', () => {
    expect(() => yieldCommand({ gaps: '1.73,1.12' })).toThrow(UserError);
    expect(() => yieldCommand({ gaps: '1.73,1.12' })).toThrow(/--ensemble is required/);
  });
});

describe('gapstack yield (end to end)', () => {
  test('JSON from the command line matches the library call', () => {
    const j = runJson(['yield', '--gaps', '1.73,1.12', '--ensemble', DEMO]);
    const direct = JSON.parse(yieldCommand({ gaps: '1.73,1.12', ensemble: DEMO, json: true }));
    expect(j.yield_efficiency).toBe(direct.yield_efficiency);
    expect(j.ensemble.sha256).toBe(direct.ensemble.sha256);
  });

  test('text output carries the caution', () => {
    const r = runCli(['yield', '--gaps', '1.73,1.12', '--wiring', 'independent', '--ensemble', join(DEMO, 'manifest-as-csv.csv')]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Yield-weighted efficiency/);
    expect(r.stdout).toMatch(/detailed-balance limits/);
  });

  test('a bad manifest exits with code 2 and names file and line', () => {
    const p = write('bad.csv', '# weight_unit: hours\nfile,weight\nnot-there.tsv,3\n');
    const r = runCli(['yield', '--gaps', '1.73,1.12', '--ensemble', p]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.csv:3: spectrum file "not-there\.tsv" not found/);
  });
});
