/**
 * Design files say what the command line says: films on any subcell, measured
 * data, series resistance, absorptance: best, per-wiring contacts, coupling and
 * resistance. Expected values: test/fixtures/films/films.json (independent
 * reference, runner.py beside it) and test/fixtures/reference/reference.json
 * (top_absorptance_optimum); rules: docs/PHYSICS.md §11.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadDesign } from '../../src/design/index.js';
import { runDesignSearch } from '../../src/search/design-search.js';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { couplingIndexBelow, type StackSpec } from '../../src/stack/model.js';

const films = JSON.parse(readFileSync(new URL('../fixtures/films/films.json', import.meta.url), 'utf8'));
const reference = JSON.parse(readFileSync(new URL('../fixtures/reference/reference.json', import.meta.url), 'utf8'));
const dir = mkdtempSync(join(tmpdir(), 'gapstack-films-design-'));
const file = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};
const spectrum = am15g();
const at = (t: StackSpec, gaps: number[]): StackSpec => ({ ...t, subcells: t.subcells.map((c, i) => ({ ...c, gapEv: gaps[i] })) });

// Invented EQE data (the reference's smooth test curve) in percent over wavelength.
const q = films.eqe;
file('bottom-eqe.csv', `# invented EQE for a test\nwavelength_nm,eqe_percent\n${q.energy_ev.map((e: number, k: number) => `${(1239.841984 / e).toPrecision(15)},${(q.eqe[k] * 100).toPrecision(15)}`).reverse().join('\n')}\n`);

describe('per-subcell films, measured data and resistance in a design file', () => {
  test('a top film with resistance over a fixed step bottom reproduces the reference (films.json film.series_rs, η to 1e-5)', async () => {
    const d = await loadDesign(
      file('film.yaml', 'name: film test\nsubcells:\n  - label: top film\n    range: [1.5, 1.8]\n    thickness_nm: 300\n    alpha0_per_cm: 1.5e5\n    urbach_ev: 0.015\n    rs_ohm_cm2: 0.8\n  - gap: 1.12\n    rs_ohm_cm2: 0.3\nwirings: [series]\n'),
    );
    const t = d.wirings[0].template;
    expect(t.subcells[0].absorptance).toEqual({ kind: 'beer-lambert', passes: 1, thicknessNm: 300, alpha: { kind: 'direct', alpha0PerCm: 1.5e5, urbachEv: 0.015 } });
    expect(t.subcells.map((c) => c.rsOhmCm2)).toEqual([0.8, 0.3]);
    expect(Math.abs(evaluateStack(at(t, [1.6, 1.12]), spectrum).efficiency - films.film.series_rs.efficiency)).toBeLessThan(1e-5);
  });

  test('an EQE file measured in the stack (relative path) reproduces the reference (films.json eqe.series)', async () => {
    const d = await loadDesign(file('eqe.yaml', 'name: eqe test\nsubcells:\n  - gap: 1.7\n  - gap: 1.12\n    eqe_file: bottom-eqe.csv\nwirings: [series]\n'));
    const t = d.wirings[0].template;
    expect(t.subcells[1].absorptance.kind).toBe('eqe-table');
    expect(Math.abs(evaluateStack(at(t, [1.7, 1.12]), spectrum).efficiency - q.series.efficiency)).toBeLessThan(1e-5);
  });

  test('per-wiring overrides: 4T transparent contacts, its own coupling and resistance; 2T keeps the shared optics', async () => {
    const d = await loadDesign(
      file(
        'wirings.yaml',
        'name: wirings\nsubcells:\n  - material: perovskite-i-br\n  - gap: 1.12\n    rs_ohm_cm2: 0.5\noptics:\n  interlayer_transmittance: 0.98\n  lc: radiative\nwirings:\n  - series\n  - wiring: independent\n    contact_transmittance: 0.9\n    lc: none\n    rs_ohm_cm2: [1.0, 0.7]\n',
      ),
    );
    const [two, four] = d.wirings.map((w) => w.template);
    expect(two.interlayerTransmittance).toEqual([0.98]);
    expect(four.interlayerTransmittance[0]).toBeCloseTo(0.98 * 0.9, 12);
    expect(two.coupling).toEqual({ model: 'radiative' });
    // radiative coupling below the bound top uses its family's index (src/materials/families.ts: n = 2.5)
    expect(couplingIndexBelow(two, 0)).toBe(2.5);
    expect(four.coupling).toEqual({ model: 'none' });
    expect(two.subcells.map((c) => c.rsOhmCm2 ?? 0)).toEqual([0, 0.5]);
    expect(four.subcells.map((c) => c.rsOhmCm2 ?? 0)).toEqual([1.0, 0.7]);
    // and the report's assumptions say so, per wiring
    const { filmAssumptionLines } = await import('../../src/report/film-assumptions.js');
    const lines = filmAssumptionLines(d).join('\n');
    expect(lines).toContain('Series resistance, series: 1: 0 Ω·cm²; 2: 0.5 Ω·cm²');
    expect(lines).toContain('Series resistance, independent: 1: 1 Ω·cm²; 2: 0.7 Ω·cm²');
    expect(lines).toContain('Optics between subcells, independent: transmittance 0.8820');
    expect(lines).toContain('Coupling, independent: isolated subcells');
  });

  test('absorptance: best lets a series search thin the top cell (reference.json top_absorptance_optimum: A = 0.8032 at 1.55/1.12 eV)', async () => {
    const d = await loadDesign(file('best.yaml', 'name: best\nsubcells:\n  - gap: 1.55\n    absorptance: best\n  - gap: 1.12\nwirings: [series, independent]\n'));
    expect(d.wirings.map((w) => w.freeTopAbsorptance)).toEqual([true, false]);
    const w = d.wirings[0];
    const r = runDesignSearch({ template: w.template, spectra: d.spectra, constraints: d.subcells.map((s) => s.constraint), spanEv: d.spanEv, loss: d.loss, freeTopAbsorptance: true });
    const ref = reference.top_absorptance_optimum.find((x: { gaps_ev: number[] }) => x.gaps_ev[0] === 1.55);
    expect(Math.abs((r.topAbsorptance as number) - ref.best_top_absorptance)).toBeLessThan(2e-4);
    expect(Math.abs(r.result.best.value - ref.efficiency)).toBeLessThan(1e-7);
  });
});

describe('absorptance: best reaches the report', () => {
  test(
    'the report evaluates its detail at the top absorptance the search chose, and its η is the search optimum',
    async () => {
      const d = await loadDesign(file('best-report.yaml', 'name: best in a report\nsubcells:\n  - range: [1.5, 1.56]\n    absorptance: best\n  - gap: 1.12\nwirings: [series]\nmap: { step: 0.05 }\n'));
      const { computeReport } = await import('../../src/report/compute.js');
      const o = computeReport(d).outcomes[0];
      const top = o.bestSpec.subcells[0].absorptance;
      expect(top.kind).toBe('step');
      // a thinned top (A < 0.9; at 1.55/1.12 eV the reference optimum is A = 0.803)
      expect(o.search.topAbsorptance as number).toBeLessThan(0.9);
      expect(top.kind === 'step' && top.value).toBe(o.search.topAbsorptance);
      expect(Math.abs(o.detail.efficiency - o.search.result.best.value)).toBeLessThan(1e-7);
    },
    120_000,
  );
});

describe('mistakes name the field and its line', () => {
  test('a rear mirror on an upper film (docs/PHYSICS.md §11)', async () => {
    const p = file('mirror.yaml', 'name: mirror\nsubcells:\n  - gap: 1.7\n    thickness_nm: 300\n    optics: double\n  - gap: 1.12\n');
    await expect(loadDesign(p)).rejects.toThrow(/mirror\.yaml:5: subcells\[0\]\.optics: a rear mirror \(double\) puts a reflector behind the film.*only the bottom subcell/);
  });
  test('a measured curve without its gap, and a film key without thickness', async () => {
    await expect(loadDesign(file('nogap.yaml', 'name: nogap\nsubcells:\n  - free: true\n  - eqe_file: bottom-eqe.csv\n    range: [1.0, 1.2]\n'))).rejects.toThrow(/nogap\.yaml:4: subcells\[1\]\.eqe_file: a measured curve does not move with a gap/);
    await expect(loadDesign(file('nothick.yaml', 'name: nothick\nsubcells:\n  - gap: 1.7\n    urbach_ev: 0.02\n  - gap: 1.12\n'))).rejects.toThrow(/nothick\.yaml:4: subcells\[0\]\.urbach_ev: urbach_ev describes a film and needs thickness_nm/);
  });
  test('the schema refuses a negative thickness and an unknown optics word', async () => {
    await expect(loadDesign(file('neg.yaml', 'name: neg\nsubcells:\n  - gap: 1.7\n    thickness_nm: -5\n  - gap: 1.12\n'))).rejects.toThrow(/neg\.yaml:4: subcells\[0\]\.thickness_nm: must be > 0/);
    await expect(loadDesign(file('word.yaml', 'name: word\nsubcells:\n  - gap: 1.7\n  - gap: 1.12\n    thickness_nm: 5000\n    optics: mirror\n'))).rejects.toThrow(/word\.yaml:6: subcells\[1\]\.optics/);
  });
  test('a bad data file names the design field and the data file line', async () => {
    file('bad-eqe.csv', 'wavelength_nm,eqe\n900,0.5\n950,85\n');
    await expect(loadDesign(file('baddata.yaml', 'name: bad data\nsubcells:\n  - gap: 1.7\n  - gap: 1.12\n    eqe_file: bad-eqe.csv\n'))).rejects.toThrow(/baddata\.yaml:5: subcells\[1\]\.eqe_file: .*bad-eqe\.csv:3: value 85 is above 1/);
  });
});
