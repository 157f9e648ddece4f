/**
 * Scenarios side by side: one design file, several named scenarios; the
 * report opens with one comparison table and keeps each scenario's sections.
 * Expected values: each scenario's limit equals the same question asked alone
 * (self-consistency), and the 2T 1.12 eV silicon-bottom optimum of 45.04 %
 * with its top near 1.73 eV (docs/PHYSICS.md §5).
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadDesignText, loadScenarioSet } from '../../src/design/index.js';
import { reportCommand } from '../../src/cli/report-command.js';
import { runDesignSearch } from '../../src/search/design-search.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-scenarios-'));
const file = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

// Invented scenarios for a test: shared light and map, each with its own stack.
const TWO = `name: two invented questions
map: { step: 0.05 }
wirings: [series]
scenarios:
  - name: on silicon
    subcells:
      - range: [1.5, 2.0]
      - gap: 1.12
  - name: thin top with resistance
    subcells:
      - range: [1.5, 2.0]
        thickness_nm: 400
        rs_ohm_cm2: 1.0
      - gap: 1.12
    wirings: [series, independent]
`;

describe('scenarios in one design file', () => {
  test('each scenario is its own design: shared keys apply, its own keys replace them', async () => {
    const set = await loadScenarioSet(file('two.yaml', TWO));
    expect(set.named).toBe(true);
    expect(set.scenarios.map((d) => d.name)).toEqual(['on silicon', 'thin top with resistance']);
    expect(set.scenarios[0].wirings.map((w) => w.key)).toEqual(['series']);
    expect(set.scenarios[1].wirings.map((w) => w.key)).toEqual(['series', 'independent']);
    expect(set.scenarios[1].mapStepEv).toBe(0.05);
    expect(set.scenarios[1].wirings[0].template.subcells[0].rsOhmCm2).toBe(1.0);
  });

  test('a plain design file is one unnamed scenario, and loadDesign refuses a file of scenarios with a pointer', async () => {
    const set = await loadScenarioSet(file('plain.yaml', 'name: plain\nsubcells:\n  - free: true\n  - gap: 1.12\n'));
    expect(set.named).toBe(false);
    expect(set.scenarios).toHaveLength(1);
    await expect(loadDesignText('two.yaml', TWO)).rejects.toThrow(/holds 2 scenarios/);
  });

  test('errors inside a scenario name it and point at its line', async () => {
    const bad = TWO.replace('        thickness_nm: 400\n', '        thickness_nm: 400\n        optics: lambertian\n');
    await expect(loadScenarioSet(file('bad.yaml', bad))).rejects.toThrow(/bad\.yaml:13: scenarios\[1\] \(thin top with resistance\): subcells\[0\]\.optics: Lambertian trapping/);
    const none = 'name: neither\nwirings: [series]\n';
    await expect(loadScenarioSet(file('none.yaml', none))).rejects.toThrow(/missing required key "subcells"/);
    const twice = TWO.replace('name: thin top with resistance', 'name: on silicon');
    await expect(loadScenarioSet(file('twice.yaml', twice))).rejects.toThrow(/"on silicon" is used twice/);
  });

  test(
    'the report opens with one table of every scenario’s best design, then each scenario’s own sections with unique ids',
    async () => {
      const path = file('report.yaml', TWO);
      const out = join(dir, 'two.html');
      const summary = JSON.parse(await reportCommand({ design: path, output: out, json: true }));
      const html = readFileSync(out, 'utf8');
      const tableAt = html.indexOf('id="scenarios"');
      expect(tableAt).toBeGreaterThan(0);
      expect(tableAt).toBeLessThan(html.indexOf('id="s1-scenario"'));
      expect(html.indexOf('id="s1-scenario"')).toBeLessThan(html.indexOf('id="s2-scenario"'));
      const ids = [...html.matchAll(/\bid="([^"]+)"/g)].map((m) => m[1]);
      expect(new Set(ids).size).toBe(ids.length);
      expect(html).toContain('These are detailed-balance limits');
      // one row per scenario and wiring, in file order
      expect(summary.comparison.map((r: { scenario: string; wiring: string }) => `${r.scenario}|${r.wiring}`)).toEqual(['on silicon|series', 'thin top with resistance|series', 'thin top with resistance|independent']);
      // 2T on a 1.12 eV bottom: 45.04 % near 1.73 eV (docs/PHYSICS.md §5)
      expect(Math.abs(summary.comparison[0].efficiency - 0.4504)).toBeLessThan(2e-4);
      expect(Math.abs(summary.comparison[0].gaps_ev[0] - 1.729)).toBeLessThan(0.003);
      // the table equals the scenario asked alone (same search, self-consistency)
      const set = await loadScenarioSet(path);
      const d = set.scenarios[1];
      const alone = runDesignSearch({ template: d.wirings[0].template, spectra: d.spectra, constraints: d.subcells.map((s) => s.constraint), spanEv: d.spanEv, loss: d.loss });
      expect(Math.abs(summary.comparison[1].efficiency - alone.result.best.value)).toBeLessThan(1e-8);
      // a thin, resistive top costs efficiency against the ideal one (common practice)
      expect(summary.comparison[1].efficiency).toBeLessThan(summary.comparison[0].efficiency);
    },
    180_000,
  );
});
