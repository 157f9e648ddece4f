import { mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { runCli, runCliHere, runJsonHere } from '../helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-opt-'));

describe('gapstack optimize', () => {
  test('2T from scratch: 45.727 % at 1.6325/0.9601 with basins and tolerance (docs/PHYSICS.md §5/§6)', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2']);
    expect(Math.abs(j.best.efficiency - 0.45727)).toBeLessThan(1e-4);
    expect(Math.abs(j.best.gaps_ev[0] - 1.6325)).toBeLessThan(0.002);
    expect(Math.abs(j.best.gaps_ev[1] - 0.9601)).toBeLessThan(0.002);
    expect(j.basins.length).toBeGreaterThan(0);
    expect(j.tolerance.loss_rel).toBe(0.01);
    expect(j.tolerance.intervals).toHaveLength(2);
    expect(j.caution).toMatch(/detailed-balance limits/);
  });

  test('4T with a fixed 1.12 eV bottom: 45.24 % near 1.81 eV (docs/PHYSICS.md §5)', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2', '--wiring', 'independent', '--fix', '2=1.12']);
    expect(Math.abs(j.best.efficiency - 0.4524)).toBeLessThan(1e-4);
    expect(Math.abs(j.best.gaps_ev[0] - 1.81)).toBeLessThan(0.005);
  });

  test('a mixed-halide top bound to its practical window on a silicon bottom returns a composition and says the unconstrained optimum lies outside', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2', '--material', '1=perovskite-i-br', '--material', '2=si', '--wiring', 'independent']);
    const c = j.best.compositions.find((x: { subcell: number }) => x.subcell === 1);
    expect(c.family).toBe('perovskite-i-br');
    expect(c.compositions.length).toBeGreaterThan(0);
    expect(c.in_window).toBe(true);
    // 4T on Si wants ≈1.81 eV (docs/PHYSICS.md §5), above the ≈1.8 eV halide-segregation limit (Hoke et al., Chem. Sci. 2015).
    expect(j.unconstrained.gaps_ev[0]).toBeGreaterThan(j.best.gaps_ev[0]);
    expect(j.warnings.join(' ')).toMatch(/outside the practical window/);
  });

  test('text output names units, the tolerance table and the caution', () => {
    const r = runCli(['optimize', '--cells', '2', '--fix', '2=1.12']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Gaps \[eV\], top first: 1\.729\d \/ 1\.1200/);
    expect(r.stdout).toMatch(/Tolerance region/);
    expect(r.stdout).toMatch(/not predictions of a real device/);
    expect(r.stderr).toBe('');
  });

  test.each([
    [['optimize', '--cells', '7'], /--cells must be a whole number 1–6/],
    [['optimize', '--cells', '2', '--fix', '3=1.1'], /subcell 3 does not exist/],
    [['optimize', '--cells', '2', '--fix', 'two=1.1'], /takes "i=value"/],
    [['optimize', '--cells', '2', '--range', '1=1.9:1.7'], /low end must be below high end/],
    [['optimize', '--cells', '2', '--range', '1=0.6:0.7', '--range', '2=1.0:1.2'], /cannot lie below/],
    [['optimize', '--cells', '2', '--fix', '1=1.7', '--range', '1=1.5:1.8'], /both --fix and --range/],
    [['optimize', '--cells', '2', '--material', '1=unobtainium'], /unobtainium/],
    [['optimize', '--cells', '2', '--loss', '2'], /--loss must be a relative loss/],
    [['optimize', '--cells', '2', '--span', '3:2'], /low end must be below high end/],
  ])('bad input %j exits 2 with one line', async (args, message) => {
    const r = await runCliHere(args as string[]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });
});

describe('gapstack map', () => {
  test('writes a CSV map whose best point agrees with evaluate', async () => {
    const out = join(dir, 'map.csv');
    const r = await runCliHere(['map', '--x', '1.5:1.9', '--y', '0.9:1.2', '--step', '0.01', '--out', out, '--json']);
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout);
    const all = readFileSync(out, 'utf8').trim().split('\n');
    expect(all[0]).toMatch(/^# .*theoretical limits/);
    const lines = all.filter((l) => !l.startsWith('#'));
    expect(lines[0]).toBe('gap1_ev,gap2_ev,efficiency_percent');
    expect(lines.length - 1).toBe(summary.points);
    // The header says what the numbers are: tool, wiring, temperature, light with its hash, units.
    const comments = all.filter((l) => l.startsWith('#')).join('\n');
    expect(comments).toMatch(/# tool: gapstack \d+\.\d+\.\d+/);
    expect(comments).toContain('# wiring: series; subcells: 2; cell temperature: 300 K');
    expect(comments).toMatch(/# light: .*SHA-256 [0-9a-f]{64}/);
    expect(comments).toContain('efficiency [%]');
    const e = await runJsonHere(['evaluate', '--gaps', `${summary.best.x_ev},${summary.best.y_ev}`]);
    expect(e.efficiency).toBeCloseTo(summary.best.efficiency, 9);
    // Efficiencies in the file are in percent: the largest row is the best point, ×100.
    const largest = Math.max(...lines.slice(1).map((l) => Number(l.split(',')[2])));
    expect(largest).toBeCloseTo(summary.best.efficiency * 100, 5);
  });

  test('writes JSON rows with nulls below the diagonal', async () => {
    const out = join(dir, 'map.json');
    expect((await runCliHere(['map', '--x', '1.0:1.4', '--y', '1.0:1.4', '--step', '0.1', '--wiring', 'independent', '--out', out])).code).toBe(0);
    const j = JSON.parse(readFileSync(out, 'utf8'));
    expect(j.x_ev).toHaveLength(5);
    expect(j.efficiency[0][0]).toBeNull();
    expect(j.efficiency[0][4]).toBeGreaterThan(0);
  });

  test('a failing map leaves an existing output untouched', async () => {
    const out = join(dir, 'keep.csv');
    writeFileSync(out, 'precious\n');
    const r = await runCliHere(['map', '--x', '1.5:1.9', '--y', '0.9:1.2', '--step', '0.01', '--wiring', 'bogus', '--out', out]);
    expect(r.code).toBe(2);
    expect(readFileSync(out, 'utf8')).toBe('precious\n');
    expect(existsSync(join(dir, 'nothing.csv'))).toBe(false);
  });

  test('refuses an output name that is neither .csv nor .json', async () => {
    const r = await runCliHere(['map', '--x', '1.5:1.9', '--y', '0.9:1.2', '--step', '0.01', '--out', join(dir, 'map.txt')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--out must end in \.csv or \.json/);
  });
});

describe('gapstack optimize over an ensemble', () => {
  test('maximises the yield-weighted efficiency and compares with the AM1.5G optimum', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2', '--fix', '2=1.12', '--ensemble', 'examples/ensemble-demo/manifest.yaml']);
    expect(j.objective).toBe('yield-weighted efficiency');
    expect(j.best.gaps_ev).toHaveLength(2);
    expect(j.spectra.length).toBe(16);
    const c = j.am15g_comparison;
    // AM1.5G optimum on a 1.12 eV bottom: 45.04 % at 1.729 eV (docs/PHYSICS.md §5).
    expect(Math.abs(c.am15g_best.efficiency - 0.4504)).toBeLessThan(1e-4);
    expect(c.am15g_design_yield_efficiency).toBeLessThanOrEqual(j.best.efficiency + 1e-9);
    expect(c.loss_rel).toBeGreaterThanOrEqual(-1e-9);
  });
});

describe('material-bound 2T searches', () => {
  test('mixed-halide top on silicon: 1.729 eV (docs/PHYSICS.md §5) sits inside the window, so a bromide fraction comes back and no warning', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2', '--material', '1=perovskite-i-br', '--material', '2=si']);
    expect(Math.abs(j.best.gaps_ev[0] - 1.729)).toBeLessThan(0.002);
    expect(j.best.gaps_ev[1]).toBe(1.12);
    const top = j.best.compositions[0];
    expect(top.compositions).toHaveLength(1);
    expect(top.compositions[0].x).toBeGreaterThan(0.2);
    expect(top.compositions[0].x).toBeLessThan(0.45);
    expect(top.in_window).toBe(true);
    expect(j.warnings).toEqual([]);
  });
  test('mixed-halide top on germanium: the unconstrained optimum lies below the iodide end and the search says so', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2', '--material', '1=perovskite-i-br', '--material', '2=ge']);
    expect(j.unconstrained.gaps_ev[0]).toBeLessThan(1.57);
    expect(j.best.gaps_ev[0]).toBeGreaterThanOrEqual(1.57 - 1e-6);
    expect(j.warnings[0]).toMatch(/unconstrained optimum .* lies outside the practical window/);
  });
  test('--full-range lets a bound subcell leave its window, with a warning', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2', '--wiring', 'independent', '--material', '1=perovskite-i-br', '--material', '2=si', '--full-range']);
    expect(j.best.gaps_ev[0]).toBeGreaterThan(1.8);
    expect(j.best.compositions[0].in_window).toBe(false);
    expect(j.warnings.join(' ')).toMatch(/outside the practical window/);
  });
});

describe('profile maps', () => {
  test('a 3-subcell map over the top two gaps maximises the bottom gap per point; its best is near the 3J optimum 51.62 % at 1.900/1.367 (docs/PHYSICS.md §5)', async () => {
    const out = join(dir, 'profile.csv');
    const r = await runCliHere(['map', '--cells', '3', '--x', '1.85:1.95', '--y', '1.33:1.40', '--step', '0.01', '--out', out, '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.profile).toBe(true);
    expect(Math.abs(s.best.efficiency - 0.5162)).toBeLessThan(3e-4);
    const [head, first] = readFileSync(out, 'utf8').split('\n').filter((l) => !l.startsWith('#'));
    expect(head).toBe('gap1_ev,gap2_ev,gap3_ev_profile,efficiency_percent');
    const bottom = Number(first.split(',')[2]);
    expect(bottom).toBeGreaterThan(0.5);
    expect(bottom).toBeLessThan(1.33);
  });
});
