import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { runCli, runCliHere, runJsonHere } from '../helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-cli-'));
const write = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

describe('gapstack evaluate', () => {
  test('single junction JSON carries the contract fields (1.34 eV: 33.68 %, Voc 1.0817 V per docs/PHYSICS.md §2)', async () => {
    const j = await runJsonHere(['evaluate', '--gaps', '1.34']);
    expect(Math.abs(j.efficiency - 0.3368)).toBeLessThan(2e-4);
    expect(j.temp_k).toBe(300);
    expect(j.pin_w_m2).toBeCloseTo(1000.37, 2);
    expect(j.pmax_w_m2).toBeCloseTo(j.efficiency * j.pin_w_m2, 4);
    expect(j.spectrum.name).toMatch(/AM1\.5G/);
    expect(j.spectrum.sha256).toMatch(/^[0-9a-f]{64}$/);
    const c = j.subcells[0];
    for (const k of ['gap_ev', 'jsc_ma_cm2', 'voc_v', 'ff', 'vmp_v', 'jmp_ma_cm2']) expect(typeof c[k]).toBe('number');
    expect(Math.abs(c.voc_v - 1.0817)).toBeLessThan(1e-3);
    expect(c.vmp_v * c.jmp_ma_cm2 * 10).toBeCloseTo(j.pmax_w_m2, 3);
    expect(j.caution).toMatch(/detailed-balance limits/);
  });

  test('text output has units, the assumptions and the caution', () => {
    const r = runCli(['evaluate', '--gaps', '1.72,1.12']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/mA\/cm²/);
    expect(r.stdout).toMatch(/\[V\]/);
    expect(r.stdout).toMatch(/300 K \(the detailed-balance convention\)/);
    expect(r.stdout).toMatch(/not predictions of a real device/);
  });

  test('ERE and concentration reach the engine (Voc shift V_t·ln 1e4 ≈ 0.2382 V at 300 K)', async () => {
    const a = (await runJsonHere(['evaluate', '--gaps', '1.34'])).subcells[0].voc_v;
    const b = (await runJsonHere(['evaluate', '--gaps', '1.34', '--ere', '1e-4'])).subcells[0].voc_v;
    expect(a - b).toBeCloseTo(0.025852 * Math.log(1e4), 3);
    const c = await runJsonHere(['evaluate', '--gaps', '1.34', '--suns', '100']);
    expect(c.pin_w_m2).toBeCloseTo(100037.07, 0);
  });

  test('a 6000 K blackbody at full concentration: 39.59 % at 1.34 eV (independent reference: test/fixtures/reference/runner.py, blackbody f = 1)', async () => {
    const j = await runJsonHere(['evaluate', '--gaps', '1.34', '--spectrum', 'blackbody:6000', '--suns', 'max']);
    expect(Math.abs(j.efficiency - 0.3958839789667635)).toBeLessThan(2e-4);
  });

  test('a user spectrum file with a target irradiance', async () => {
    const p = write('flat.csv', 'wavelength_nm,irradiance_W_m2_nm\n300,1\n500,1\n700,1\n900,1\n1100,1\n1300,1\n');
    const j = await runJsonHere(['evaluate', '--gaps', '1.2', '--spectrum', p, '--irradiance', '800']);
    expect(j.pin_w_m2).toBeCloseTo(800, 6);
  });
});

describe('gapstack spectrum', () => {
  test('AM1.5G summary: 1000.37 W/m² (ASTM G173-03), photon flux, APE, range', async () => {
    const j = await runJsonHere(['spectrum', 'am1.5g', '--gaps', '1.12']);
    expect(Math.abs(j.pin_w_m2 - 1000.37)).toBeLessThan(0.01);
    expect(j.range_nm).toEqual([280, 4000]);
    expect(j.photon_flux_m2_s).toBeGreaterThan(4e21);
    expect(j.ape_ev).toBeGreaterThan(1.8);
    expect(Math.abs(j.photon_current_above_gap[0].jsc_ma_cm2 - 43.81)).toBeLessThan(0.05);
  });
});

describe('bad input exits 2 with one clear line', () => {
  const descending = write('desc.csv', 'wavelength_nm,irradiance_W_m2_nm\n300,1\n500,1\n400,1\n900,1\n1100,1\n1300,1\n');
  const duplicate = write('dup.csv', 'wavelength_nm,irradiance_W_m2_nm\n300,1\n500,1\n500,1\n900,1\n1100,1\n1300,1\n');
  const negative = write('neg.csv', 'wavelength_nm,irradiance_W_m2_nm\n300,1\n500,-2\n700,1\n900,1\n1100,1\n1300,1\n');
  const text = write('text.csv', 'wavelength_nm,irradiance_W_m2_nm\n300,1\n500,one\n700,1\n900,1\n1100,1\n1300,1\n');
  const cases: [string, string[], RegExp][] = [
    ['gap of zero', ['evaluate', '--gaps', '0'], /--gaps: every gap must be a positive number of eV, got 0/],
    ['negative gap', ['evaluate', '--gaps', '-1.2'], /positive number of eV/],
    ['non-numeric gap', ['evaluate', '--gaps', 'abc'], /--gaps must be a comma-separated list of numbers|--gaps must be a number/],
    ['ascending gaps', ['evaluate', '--gaps', '1.12,1.72'], /strictly descending/],
    ['ERE above 1', ['evaluate', '--gaps', '1.34', '--ere', '1.5'], /--ere must be within \(0, 1\], got 1.5/],
    ['ERE of zero', ['evaluate', '--gaps', '1.34', '--ere', '0'], /--ere must be within \(0, 1\], got 0/],
    ['unknown wiring', ['evaluate', '--gaps', '1.7,1.1', '--wiring', 'parallel'], /--wiring must be series \(2t\), independent \(4t\), 3t, vm:M:N, groups:1\+2\/3 or vm:M:N:1\+2\/3, got "parallel"/],
    ['unknown option', ['evaluate', '--gaps', '1.34', '--colour', 'red'], /Unknown argument/],
    ['missing file', ['evaluate', '--gaps', '1.34', '--spectrum', join(dir, 'absent.csv')], /absent\.csv: cannot open spectrum file/],
    ['descending wavelengths', ['evaluate', '--gaps', '1.34', '--spectrum', descending], /desc\.csv:4: .*strictly ascending/],
    ['duplicated wavelengths', ['evaluate', '--gaps', '1.34', '--spectrum', duplicate], /dup\.csv:4: duplicated abscissa/],
    ['negative irradiance', ['spectrum', negative], /neg\.csv:3: negative spectral value/],
    ['text in a number', ['spectrum', text], /text\.csv:3: "one" is not a finite number/],
    ['bad suns', ['evaluate', '--gaps', '1.34', '--suns', 'lots'], /--suns must be a positive number or "max"/],
    ['suns beyond full concentration', ['evaluate', '--gaps', '1.34', '--suns', '1e6'], /exceeds full concentration/],
    ['bad temperature', ['evaluate', '--gaps', '1.34', '--temp', '-5'], /--temp must be a cell temperature/],
    ['bad blackbody', ['spectrum', 'blackbody:hot'], /blackbody temperature must be a number of kelvin/],
    ['no command', [], /name a command/],
  ];
  test.each(cases)('%s', async (_name, args, message) => {
    const r = await runCliHere(args);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).not.toMatch(/\bat .*\.js:\d+/);
    expect(r.stdout).toBe('');
  });
});

describe('thinning the top cell from the command line', () => {
  test('--top-absorptance best finds A = 0.8032 and 41.544 % for 1.55/1.12 eV (independent reference: test/fixtures/reference/runner.py, top_absorptance_optimum)', async () => {
    const j = await runJsonHere(['evaluate', '--gaps', '1.55,1.12', '--top-absorptance', 'best']);
    expect(Math.abs(j.top_absorptance - 0.803200662767916)).toBeLessThan(1e-4);
    expect(Math.abs(j.efficiency - 0.4154355323832496)).toBeLessThan(1e-7);
    // It beats the full-thickness top cell: 32.54 % (docs/PHYSICS.md §4 table, isolated).
    expect(Math.abs((await runJsonHere(['evaluate', '--gaps', '1.55,1.12'])).efficiency - 0.3254)).toBeLessThan(2e-4);
  });
  test('a bottom-limited stack keeps its top cell whole', async () => {
    expect((await runJsonHere(['evaluate', '--gaps', '1.8,1.12', '--top-absorptance', 'best'])).top_absorptance).toBe(1);
  });
});
