/**
 * Figure data files and printed numbers as people read them: every CSV and
 * JSON figure file opens with its metadata (tool, wiring, light with SHA-256,
 * temperature, units, caution); efficiencies are in percent; concentrated
 * currents in engineering notation; a chosen top absorptance to four digits;
 * `optimize --free-top-absorptance` keeps the per-cell table.
 */
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { evaluateCommand } from '../../src/cli/evaluate-command.js';
import { eng } from '../../src/cli/format.js';
import { optimizeCommand } from '../../src/cli/optimize-command.js';
import { reportCommand } from '../../src/cli/report-command.js';
import { CAUTION } from '../../src/report/assumptions.js';
import { toolVersion } from '../../src/report/version.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-exports-'));
const SLOW = 120_000;

describe('figure data files carry their metadata', () => {
  const figures = join(dir, 'figures');
  let sha: string;

  beforeAll(async () => {
    const p = join(dir, 'quick.yaml');
    writeFileSync(p, 'name: invented export check\nspectrum: am1.5g\ntemperature: 300\nsubcells:\n  - label: top\n    range: [1.5, 2.0]\n  - label: bottom\n    gap: 1.12\nwirings: [series, independent]\nmap:\n  step: 0.04\n  pairs:\n    - axes: [1, 2]\n      x: [1.4, 2.1]\n      y: [0.9, 1.3]\n');
    const summary = JSON.parse(await reportCommand({ design: p, output: join(dir, 'r.html'), figures, json: true }));
    sha = /SHA-256 ([0-9a-f]{64})/.exec(summary.assumptions[0])?.[1] ?? '';
    expect(sha).toHaveLength(64);
  }, SLOW);

  test('every CSV opens with tool, wiring, light and its SHA-256, temperature, units and the caution', () => {
    const csvs = readdirSync(figures).filter((n) => n.endsWith('.csv'));
    expect(csvs.length).toBeGreaterThanOrEqual(8);
    for (const n of csvs) {
      const head = readFileSync(join(figures, n), 'utf8').split('\n').filter((l) => l.startsWith('#')).join('\n');
      expect(head, n).toContain(`# tool: gapstack ${toolVersion()}`);
      expect(head, n).toMatch(/# wiring: (series|independent)/);
      expect(head, n).toContain(`SHA-256 ${sha}`);
      expect(head, n).toContain('# cell temperature: 300 K');
      expect(head, n).toMatch(/# units: .*\[/);
      expect(head, n).toContain(`# caution: ${CAUTION}`);
    }
  });

  test('every JSON opens with the same metadata block', () => {
    for (const n of readdirSync(figures).filter((x) => x.endsWith('.json') && x !== 'summary.json')) {
      const j = JSON.parse(readFileSync(join(figures, n), 'utf8'));
      expect(Object.keys(j)[0], n).toBe('meta');
      expect(j.meta.light.sha256, n).toBe(sha);
      expect(j.meta.temperature_k, n).toBe(300);
      expect(j.meta.caution, n).toBe(CAUTION);
      expect(['series', 'independent'], n).toContain(j.meta.wiring);
    }
  });

  test('efficiencies in the figure files are in percent', () => {
    const map = JSON.parse(readFileSync(join(figures, 'map-series-1-2.json'), 'utf8'));
    expect(map.efficiency).toBeUndefined();
    expect(map.optimum.efficiency_percent).toBeGreaterThan(30);
    expect(map.optimum.efficiency_percent).toBeLessThan(50);
    const rows = readFileSync(join(figures, 'map-series-1-2.csv'), 'utf8').split('\n').filter((l) => l !== '' && !l.startsWith('#'));
    expect(rows[0]).toBe('gap1_ev,gap2_ev,efficiency_percent');
    expect(Math.max(...rows.slice(1).map((r) => Number(r.split(',')[2])))).toBeGreaterThan(30);
    const sens = readFileSync(join(figures, 'sensitivity-series.csv'), 'utf8').split('\n').filter((l) => !l.startsWith('#'));
    expect(sens[0]).toBe('subcell,delta_ev,gap_ev,efficiency_percent,inside_window');
  });
});

describe('numbers rounded to what they mean', () => {
  test('engineering notation above 1e5, fixed decimals below', () => {
    expect(eng(1986932.12, 2)).toBe('1.987e6');
    expect(eng(24604283.46, 2)).toBe('24.60e6');
    expect(eng(632006.99, 2)).toBe('632.0e3');
    expect(eng(43.81, 2)).toBe('43.81');
    expect(eng(-2.5e7, 2)).toBe('-25.00e6');
  });

  test('evaluate at full concentration prints currents and powers in engineering notation', () => {
    const text = evaluateCommand({ gaps: '1.34', spectrum: 'blackbody:5778', suns: 'max' } as never);
    expect(text).toMatch(/\s\d\.\d{3}e6\s/);
    expect(text).toMatch(/P_max \d+\.\d+e6 W\/m² of P_in \d+\.\d+e6 W\/m²/);
    expect(text).not.toMatch(/\d{7}\.\d\d/);
  }, SLOW);

  test('--top-absorptance best prints the chosen value to four digits, not sixteen', () => {
    const text = evaluateCommand({ gaps: '1.55,1.12', topAbsorptance: 'best' } as never);
    const optics = text.split('\n').find((l) => l.includes('optics:')) ?? '';
    const value = /absorptance (\d\.\d+)/.exec(optics)?.[1] ?? '';
    expect(value.length).toBeGreaterThan(2);
    expect(value.length).toBeLessThanOrEqual(6);
  }, SLOW);

  test('optimize --free-top-absorptance keeps the per-cell table', async () => {
    const text = await optimizeCommand({ cells: 2, fix: ['2=1.12'], freeTopAbsorptance: true, step: 0.02 } as never);
    expect(text).toMatch(/top absorptance \d\.\d{3}/);
    expect(text).toMatch(/cell\s+gap \[eV\]\s+Jph \[mA\/cm²\]/);
    const lines = text.split('\n');
    const head = lines.findIndex((l) => /^cell\s+gap \[eV\]\s+Jph/.test(l));
    expect(lines[head + 2]).toMatch(/^1\s+\d\.\d{4}\s+\d+\.\d\d/);
    expect(lines[head + 3]).toMatch(/^2\s+1\.1200\s+\d+\.\d\d/);
  }, SLOW);
});
