/**
 * Films, measured data and series resistance against an independent reference
 * (test/fixtures/films/runner.py → films.json: numpy/scipy, its own energy-grid
 * integration and Brent maximum-power solver; docs/PHYSICS.md §3–5, §11).
 *
 * Tolerances: step absorbers share the exact photon integrals, so η agrees to
 * 1e-7 absolute. Films and measured curves are integrated here on 2 meV energy
 * bins with the absorptance at bin centres, in the reference by trapezoid on a
 * 0.02 meV grid: J_gen agrees to 3e-5 relative, J0 to 1.5e-3 (the Urbach tail
 * and the EQE edge are steep on a 2 meV bin), η to 1e-5 absolute.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack, independentWiring, seriesWiring, type AbsorptanceModel, type StackSpec } from '../../src/stack/model.js';

interface Case {
  name: string;
  wiring: 'series' | 'independent';
  rs_ohm_cm2: number[];
  jgen_ma_cm2: number[];
  j0_a_m2: number[];
  efficiency: number;
  operation: { j_ma_cm2: number; v_v?: number }[];
}
const ref = JSON.parse(readFileSync(new URL('../fixtures/films/films.json', import.meta.url), 'utf8')) as {
  rs_single_134: Case[];
  rs_two: Case[];
  film: { top: { gap_ev: number; thickness_nm: number; alpha0_per_cm: number; urbach_ev: number }; bottom_gap_ev: number; series: Case; series_rs: Case };
  measured_absorptance: { top_gap_ev: number; bottom_gap_ev: number; energy_ev: number[]; absorptance: number[]; series: Case };
  eqe: { top_gap_ev: number; bottom_gap_ev: number; energy_ev: number[]; eqe: number[]; series: Case; independent_rs: Case };
};
const spectrum = am15g();

function stackOf(gaps: number[], c: Case, absorptance: (AbsorptanceModel | null)[] = []): StackSpec {
  const s = idealStack(gaps, c.wiring === 'series' ? seriesWiring(gaps.length) : independentWiring(gaps.length));
  s.subcells.forEach((cell, i) => {
    cell.rsOhmCm2 = c.rs_ohm_cm2[i];
    if (absorptance[i]) cell.absorptance = absorptance[i] as AbsorptanceModel;
  });
  return s;
}

function expectCase(spec: StackSpec, c: Case, tol: { eta: number; jgen: number; j0: number }) {
  const r = evaluateStack(spec, spectrum);
  r.subcells.forEach((s, i) => {
    expect(Math.abs(s.jgenAm2 / 10 / c.jgen_ma_cm2[i] - 1)).toBeLessThan(tol.jgen);
    expect(Math.abs(s.j0Am2 / c.j0_a_m2[i] - 1)).toBeLessThan(tol.j0);
  });
  expect(Math.abs(r.efficiency - c.efficiency)).toBeLessThan(tol.eta);
  if (c.wiring === 'series') expect(Math.abs(r.subcells[0].jOpAm2 / 10 - c.operation[0].j_ma_cm2) / c.operation[0].j_ma_cm2).toBeLessThan(tol.jgen + 1e-6);
  return r;
}

const STEP = { eta: 1e-7, jgen: 1e-7, j0: 1e-6 };
const BINS = { eta: 1e-5, jgen: 3e-5, j0: 1.5e-3 };

describe('series resistance: V = V_diode(J) − J·R_s (docs/PHYSICS.md §11)', () => {
  test.each(ref.rs_single_134.map((c) => [c.rs_ohm_cm2[0], c] as const))('1.34 eV single junction, R_s = %s Ω·cm² (films.json rs_single_134)', (_r, c) => {
    expectCase(stackOf([1.34], c), c, STEP);
  });

  test('a single 1.34 eV junction loses efficiency as R_s grows (§11 check; films.json rs_single_134: 33.68 % at 0, 29.06 % at 4 Ω·cm²)', () => {
    const etas = ref.rs_single_134.map((c) => evaluateStack(stackOf([1.34], c), spectrum).efficiency);
    for (let k = 1; k < etas.length; k++) expect(etas[k]).toBeLessThan(etas[k - 1]);
  });

  test.each(ref.rs_two.map((c) => [c.name, c] as const))('%s, R_s 1.0/0.5 Ω·cm² (films.json rs_two)', (_n, c) => {
    const r = expectCase(stackOf([1.73, 1.12], c), c, STEP);
    // Each subcell's terminal voltage is its diode voltage less J·R_s.
    if (c.wiring === 'independent') c.operation.forEach((o, i) => expect(Math.abs(r.subcells[i].vOpV - (o.v_v as number))).toBeLessThan(1e-8));
  });

  test('the voltage-matched solver carries R_s too: 1:1 voltage matching of one cell each equals the series optimum only at equal currents, never exceeds independent', () => {
    const c = ref.rs_two[1];
    const vm = stackOf([1.73, 1.12], c);
    vm.wiring = { kind: 'voltage-matched', label: 'vm 1:1', m: 1, n: 1, groups: [[0], [1]] };
    const eta = evaluateStack(vm, spectrum).efficiency;
    expect(eta).toBeLessThanOrEqual(c.efficiency + 1e-9);
    // and R_s costs the voltage-matched string as it costs the others (common practice)
    const lossless = stackOf([1.73, 1.12], { ...c, rs_ohm_cm2: [0, 0] });
    lossless.wiring = vm.wiring;
    expect(eta).toBeLessThan(evaluateStack(lossless, spectrum).efficiency);
  });
});

describe('a film of any subcell: direct edge with an Urbach tail, single pass above a lower cell (films.json film)', () => {
  const t = ref.film.top;
  const film: AbsorptanceModel = { kind: 'beer-lambert', passes: 1, thicknessNm: t.thickness_nm, alpha: { kind: 'direct', alpha0PerCm: t.alpha0_per_cm, urbachEv: t.urbach_ev } };
  test('300 nm 1.60 eV film on a 1.12 eV step, 2T', () => {
    expectCase(stackOf([t.gap_ev, ref.film.bottom_gap_ev], ref.film.series, [film]), ref.film.series, BINS);
  });
  test('the same with R_s 0.8/0.3 Ω·cm²', () => {
    expectCase(stackOf([t.gap_ev, ref.film.bottom_gap_ev], ref.film.series_rs, [film]), ref.film.series_rs, BINS);
  });
});

describe('measured data per subcell (docs/PHYSICS.md §11; Rau, Phys. Rev. B 76 (2007) 085303)', () => {
  const m = ref.measured_absorptance;
  test('absorptance of the isolated bottom film under a 1.70 eV step top (films.json measured_absorptance)', () => {
    const a: AbsorptanceModel = { kind: 'absorptance-table', energyEv: m.energy_ev, value: m.absorptance };
    expectCase(stackOf([m.top_gap_ev, m.bottom_gap_ev], m.series, [null, a]), m.series, BINS);
  });
  const q = ref.eqe;
  const eqe: AbsorptanceModel = { kind: 'eqe-table', energyEv: q.energy_ev, value: q.eqe };
  test('EQE of the bottom cell measured in the stack: J_gen = q∫φ·EQE, J0 = q∫EQE·φ_bb (films.json eqe)', () => {
    expectCase(stackOf([q.top_gap_ev, q.bottom_gap_ev], q.series, [null, eqe]), q.series, BINS);
  });
  test('EQE with R_s 0.5/0.5 Ω·cm², independent wiring (films.json eqe.independent_rs)', () => {
    expectCase(stackOf([q.top_gap_ev, q.bottom_gap_ev], q.independent_rs, [null, eqe]), q.independent_rs, BINS);
  });
  test('measured values outside [0, 1] are refused with the point named', () => {
    const bad: AbsorptanceModel = { kind: 'eqe-table', energyEv: [1.1, 1.2, 1.3], value: [0, 85, 90], source: 'eqe.csv' };
    expect(() => evaluateStack(stackOf([1.7, 1.12], q.series, [null, bad]), spectrum)).toThrow(/subcell 2: measured EQE \(eqe\.csv\): values must be within \[0, 1\].*got 85 at point 2/);
  });
});
