/**
 * Your own films' gaps: least-squares fits (ml-matrix) and gap formulas
 * (mathjs, parsed, never evaluated as code). Expected values: the published
 * quadratic 1.57 + 0.39x + 0.33x² eV (Noh et al., Nano Lett. 13 (2013) 1764,
 * from memory) plus 10 meV noise, and numpy.linalg.lstsq on the same points
 * (test/fixtures/fit/runner.py → fit.json).
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse as parseYaml } from 'yaml';
import { describe, expect, test } from 'vitest';
import { fitGapModel, formulaOf } from '../../src/materials/fit.js';
import { polynomialFromFormula } from '../../src/materials/formula.js';
import { materialsFitCommand } from '../../src/cli/materials-fit-command.js';
import { loadDesign } from '../../src/design/index.js';
import { compositionsForGap, gapFromComposition } from '../../src/materials/index.js';

const ref = JSON.parse(readFileSync(new URL('../fixtures/fit/fit.json', import.meta.url), 'utf8'));
const points = ref.points.map((p: { x: number; gap_ev: number }) => ({ x: p.x, gapEv: p.gap_ev }));
const dir = mkdtempSync(join(tmpdir(), 'gapstack-fit-'));

describe('least-squares gap fits (fit.json from numpy.linalg.lstsq)', () => {
  test('a quadratic recovers the published coefficients within one standard error each', () => {
    const fit = fitGapModel(points, { kind: 'polynomial', degree: 2 });
    fit.coefficients.forEach((c, k) => {
      expect(Math.abs(c - ref.polynomial_2.coefficients_ev[k])).toBeLessThan(1e-10); // numpy lstsq
      expect(Math.abs(fit.standardErrors[k] / ref.polynomial_2.standard_errors_ev[k] - 1)).toBeLessThan(1e-8); // numpy s²(AᵀA)⁻¹
      expect(Math.abs(c - ref.true_coefficients_ev[k])).toBeLessThan(fit.standardErrors[k]); // Noh et al. 2013 (from memory)
    });
    fit.residualsEv.forEach((r, k) => expect(Math.abs(r - ref.polynomial_2.residuals_ev[k])).toBeLessThan(1e-10));
  });

  test('the bowing form fits the same points: end members and bowing (E_B = 1.57 + 0.39 + 0.33 = 2.29 eV, b = 0.33 eV)', () => {
    const fit = fitGapModel(points, { kind: 'bowing' });
    expect(fit.names).toEqual(['ea_ev', 'eb_ev', 'bowing_ev']);
    fit.coefficients.forEach((c, k) => expect(Math.abs(c - ref.bowing.coefficients_ev[k])).toBeLessThan(1e-10));
    fit.standardErrors.forEach((s, k) => expect(Math.abs(s / ref.bowing.standard_errors_ev[k] - 1)).toBeLessThan(1e-8));
    expect(Math.abs(fit.coefficients[1] - 2.29)).toBeLessThan(2 * fit.standardErrors[1]);
  });

  test('too few points or compositions are refused', () => {
    expect(() => fitGapModel(points.slice(0, 3), { kind: 'bowing' })).toThrow(/3 points cannot fit 3 parameters/);
    expect(() => fitGapModel([1, 2, 3, 4].map(() => ({ x: 0.5, gapEv: 1.6 })), { kind: 'polynomial', degree: 1 })).toThrow(/1 distinct compositions cannot separate 2/);
  });
});

describe('gap formulas are parsed, never evaluated as code', () => {
  test('a polynomial in x gives its coefficients; the fit writes formulas that read back', () => {
    expect(polynomialFromFormula('1.57 + 0.39*x + 0.33*x^2', 'f')).toEqual([1.57, 0.39, 0.33]);
    expect(polynomialFromFormula('(1 - x)*1.55 + x*1.35 - x*(1 - x)*(0.55 + 0.45*x)', 'f').map((c) => Number(c.toFixed(12)))).toEqual([1.55, -0.75, 0.1, 0.45]);
    expect(polynomialFromFormula(formulaOf([1.5, -0.25, 0.125]), 'f')).toEqual([1.5, -0.25, 0.125]);
  });
  test.each([
    ['a function call', '1.5 + sin(x)', /"sin\(x\)" calls a function/],
    ['another variable', '1.5 + 0.3*y', /"y" is not the composition variable x/],
    ['an assignment', 'x = 2', /"x = 2" assigns/],
    ['division by x', '1.5 + 1/x', /"x" is not a non-zero constant/],
    ['a fractional power', '1.5 + x^0.5', /"0\.5" is not a whole exponent/],
    ['an import attempt', 'import("fs")', /calls a function|is not allowed/],
    ['a syntax error', '1.5 + * x', /cannot read "1\.5 \+ \* x"/],
  ])('refuses %s, naming the token', (_what, text, message) => {
    expect(() => polynomialFromFormula(text, 'materials[0].gap_formula')).toThrow(message);
  });
});

describe('gapstack materials fit FILE', () => {
  test('prints coefficients with standard errors and residuals, and writes a family a design file loads', async () => {
    const csv = join(dir, 'my-films.csv');
    writeFileSync(csv, `# invented film series for a test\ncomposition,gap_eV\n${points.map((p: { x: number; gapEv: number }) => `${p.x},${p.gapEv}`).join('\n')}\n`);
    const fam = join(dir, 'fam.yaml');
    const j = JSON.parse(await materialsFitCommand({ file: csv, model: 'poly:2', write: fam, dedt: '3.9e-4', index: '2.5', json: true }));
    expect(j.coefficients.map((c: { value_ev: number }) => c.value_ev)).toHaveLength(3);
    expect(Math.abs(j.coefficients[2].standard_error_ev - ref.polynomial_2.standard_errors_ev[2])).toBeLessThan(1e-9);
    const written = parseYaml(readFileSync(fam, 'utf8'));
    expect(written[0].gap_formula).toMatch(/^1\.56515 \+ 0\.392124\*x \+ 0\.330741\*x\^2$/);
    const design = join(dir, 'uses-fit.yaml');
    writeFileSync(design, `name: uses the fitted family\nmaterials:\n${readFileSync(fam, 'utf8').replace(/^#.*\n/, '').replace(/^/gm, '  ').trimEnd()}\nsubcells:\n  - material: my-films\n  - gap: 1.12\n`);
    const d = await loadDesign(design);
    const c = d.subcells[0].constraint;
    if (c.kind !== 'material') throw new Error('expected a bound subcell');
    expect(gapFromComposition(c.family, 0.5)).toBeCloseTo(1.56515 + 0.392124 * 0.5 + 0.330741 * 0.25, 5);
    expect(compositionsForGap(c.family, gapFromComposition(c.family, 0.3))[0]).toBeCloseTo(0.3, 8);
  });
  test('a bad row names its line; --write without --dedt/--index is refused', async () => {
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'composition,gap_eV\n0,1.57\n45,1.8\n');
    await expect(materialsFitCommand({ file: bad })).rejects.toThrow(/bad\.csv:3: composition 45 must lie within \[0, 1\]/);
    const ok = join(dir, 'ok.csv');
    writeFileSync(ok, 'composition,gap_eV\n0,1.57\n0.3,1.70\n0.6,1.92\n1,2.29\n');
    await expect(materialsFitCommand({ file: ok, write: join(dir, 'x.yaml') })).rejects.toThrow(/--write needs --dedt .* and --index/);
  });
  test('a design family with a bad formula names the field and its line', async () => {
    const p = join(dir, 'badformula.yaml');
    writeFileSync(p, 'name: bad formula\nmaterials:\n  - id: f1\n    name: F\n    variable: x\n    gap_formula: "1.5 + exp(x)"\n    window_ev: [1.5, 2.0]\n    dEg_dT_ev_per_k: 0.0003\n    refractive_index: 2.5\n    source: invented\nsubcells:\n  - material: f1\n  - gap: 1.1\n');
    await expect(loadDesign(p)).rejects.toThrow(/badformula\.yaml:6: materials\[0\]\.gap_formula: "exp\(x\)" calls a function/);
  });
});
