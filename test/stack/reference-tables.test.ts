/**
 * The stack engine against values computed outside the project:
 *  - the check tables of docs/PHYSICS.md §4 and §5 (independent numpy/scipy
 *    implementation, global grid search plus refinement), and
 *  - every case of test/fixtures/reference/reference.json that the engine can
 *    express (independent reference: test/fixtures/reference/runner.py).
 *
 * Tolerances. The tables are printed to 0.01 % (or 0.001 % for the 2T optima),
 * and issue 3 asks for 0.02 % absolute. The fixture carries the full float
 * values of the same model (same spectrum table, same constants, same
 * conventions, see its meta.conventions), so only the numerical methods differ:
 * closed forms on both sides for J_gen and J0, and root finders to ~1e-12 for
 * the operating point. Agreement is therefore required much more tightly:
 *  - J0: 1e-9 relative (Bose–Einstein series here, quad to 1e-13 in the runner);
 *  - J_gen: 5e-9 relative. The runner uses hc = 1239.841984 eV·nm (10
 *    digits), the engine derives hc from the exact h, c, e (…984332 eV·nm):
 *    2.7e-10 relative in λ_g, times d ln N / d ln λ ≈ 4 at 2.3 eV ≈ 1.1e-9;
 *  - efficiency: 1e-7 absolute (1e-5 %), far below any printed digit;
 *  - operating currents and voltages: at a maximum P is flat, so an argmax
 *    found to a relative power precision ε is only fixed to ~√ε. Series
 *    strings are root-solved on both sides (dP/dJ = 0), but the 4T-with-LC
 *    and vm cases are scans + Brent in the runner (bounded-Brent xtol ~1e-8
 *    relative on a flat top): 1e-6 relative in J, V and J_ph.
 *  - finite absorptance: the engine bins energy at 2 meV with absorptance at
 *    bin centres, while the runner integrates the √ edge exactly; see the
 *    estimate in that block.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack, type StackResult } from '../../src/stack/evaluate.js';
import { idealStack, independentWiring, seriesWiring, type Coupling, type StackSpec, type Wiring } from '../../src/stack/model.js';

const spectrum = am15g();
/** A/m² → mA/cm². */
const ma = (jAm2: number): number => jAm2 / 10;

interface RefStack {
  gaps_ev: number[];
  wiring: string;
  lc: { model: 'none' | 'empirical' | 'radiative'; eta: number; n: number | null };
  top_absorptance: number;
  temp_k: number;
  efficiency: number;
  pmax_w_m2: number;
  j_op_ma_cm2: number[];
  v_op_v: number[];
  jph_ma_cm2: number[];
  jgen_ma_cm2: number[];
  j0_ma_cm2: number[];
}
interface RefSingle {
  gap_ev: number;
  temp_k: number;
  ere: number;
  jsc_ma_cm2: number;
  j0_ma_cm2: number;
  voc_v: number;
  ff: number;
  vmp_v: number;
  jmp_ma_cm2: number;
  pmax_w_m2: number;
  efficiency: number;
}
interface RefTopA {
  gaps_ev: number[];
  wiring: string;
  best_top_absorptance: number;
  efficiency: number;
  jgen_ma_cm2: number[];
}
interface RefFinite {
  gap_ev: number;
  thickness_nm: number;
  alpha0_per_m: number;
  path_factor: 1 | 2;
  temp_k: number;
  jsc_ma_cm2: number;
  j0_ma_cm2: number;
  voc_v: number;
  ff: number;
  vmp_v: number;
  jmp_ma_cm2: number;
  efficiency: number;
}
const ref = JSON.parse(readFileSync(new URL('../fixtures/reference/reference.json', import.meta.url), 'utf8')) as {
  meta: { spectrum_pin_w_m2: number };
  single: RefSingle[];
  stacks: RefStack[];
  top_absorptance_optimum: RefTopA[];
  finite_absorptance: RefFinite[];
};

function wiringOf(name: string, n: number): Wiring {
  if (name === 'series') return seriesWiring(n);
  if (name === 'independent') return independentWiring(n);
  const vm = /^vm:(\d+):(\d+)$/.exec(name);
  if (vm && n === 2) return { kind: 'voltage-matched', label: name, m: Number(vm[1]), n: Number(vm[2]), groups: [[0], [1]] };
  throw new Error(`fixture wiring ${name} not expressible`);
}

function couplingOf(lc: RefStack['lc'], n: number): Coupling {
  if (lc.model === 'none') return { model: 'none' };
  if (lc.model === 'empirical') return { model: 'empirical', eta: Array.from({ length: n - 1 }, () => lc.eta) };
  return { model: 'radiative', refractiveIndex: lc.n as number };
}

function specOf(r: RefStack): StackSpec {
  const n = r.gaps_ev.length;
  const s = idealStack(r.gaps_ev, wiringOf(r.wiring, n), { tempK: r.temp_k, coupling: couplingOf(r.lc, n) });
  s.subcells[0].absorptance = { kind: 'step', value: r.top_absorptance };
  return s;
}

const rel = (got: number, want: number): number => Math.abs(got / want - 1);

/** 2T/4T/3T/vm helpers for the printed tables. */
const ideal = (gaps: number[], wiring: Wiring, over: Partial<StackSpec> = {}): StackResult => evaluateStack(idealStack(gaps, wiring, over), spectrum);
const vm = (m: number, n: number): Wiring => ({ kind: 'voltage-matched', label: `vm:${m}:${n}`, m, n, groups: [[0], [1]] });

describe('docs/PHYSICS.md §5 check table (independent reference: global grid search + refinement), within 0.02 % abs', () => {
  const TOL = 2e-4;
  test.each<[string, number[], Wiring, number]>([
    ['2T global optimum', [1.6325, 0.9601], seriesWiring(2), 0.45727],
    ['2T runner-up basin', [1.598, 0.935], seriesWiring(2), 0.4571],
    ['4T optimum', [1.73, 0.94], independentWiring(2), 0.4606],
    ['2T on 1.12 eV', [1.729, 1.12], seriesWiring(2), 0.4504],
    ['4T on 1.12 eV', [1.81, 1.12], independentWiring(2), 0.4524],
    ['3J 2T', [1.9, 1.367, 0.933], seriesWiring(3), 0.5162],
    ['4J 2T', [2.002, 1.494, 1.114, 0.715], seriesWiring(4), 0.5533],
    ['vm 1:2 on 1.12 eV at 1.934', [1.934, 1.12], vm(1, 2), 0.4501],
  ])('%s: %j → η = %f', (_name, gaps, wiring, eta) => {
    expect(Math.abs(ideal(gaps, wiring).efficiency - eta)).toBeLessThan(TOL);
  });

  test('vm 1:2 at 1.80/1.12 eV → 44.19 % (issue 3 table; independent reference: runner.py gives 0.441876)', () => {
    expect(Math.abs(ideal([1.8, 1.12], vm(1, 2)).efficiency - 0.4419)).toBeLessThan(TOL);
  });

  test('3T with ideal independent loads at 1.73/0.94 eV equals 4T, 46.06 % (docs/PHYSICS.md §5: "ideal independent loads reach the 4T limit")', () => {
    const threeT: Wiring = { kind: 'groups', label: '3T', groups: [[0], [1]] };
    const r3 = ideal([1.73, 0.94], threeT);
    const r4 = ideal([1.73, 0.94], independentWiring(2));
    expect(Math.abs(r3.efficiency - r4.efficiency)).toBeLessThan(1e-12);
    expect(Math.abs(r3.efficiency - 0.4606)).toBeLessThan(TOL);
  });

  test('the 2T global optimum beats the runner-up basin (docs/PHYSICS.md §6: 45.727 % vs 45.710 %)', () => {
    const a = ideal([1.6325, 0.9601], seriesWiring(2)).efficiency;
    const b = ideal([1.598, 0.935], seriesWiring(2)).efficiency;
    expect(a - b).toBeGreaterThan(1e-4);
    expect(a - b).toBeLessThan(3e-4);
  });
});

describe('docs/PHYSICS.md §4 luminescent-coupling check table (independent reference), within 0.02 % abs', () => {
  const TOL = 2e-4;
  const rows: [number[], number, number, number, number, number][] = [
    // gaps, isolated, η_LC 0.5, η_LC 0.9, radiative n = 3.5, 4T no coupling
    [[1.6, 1.12], 0.3682, 0.4166, 0.437, 0.4237, 0.441],
    [[1.55, 1.12], 0.3254, 0.3968, 0.4269, 0.4141, 0.4364],
    [[1.729, 1.12], 0.4504, 0.4516, 0.4525, 0.4383, 0.4505],
  ];
  test.each(rows)('%j: isolated %f, LC 0.5 %f, LC 0.9 %f, radiative %f, 4T %f', (gaps, iso, lc5, lc9, rad, fourT) => {
    const s2 = seriesWiring(2);
    expect(Math.abs(ideal(gaps, s2).efficiency - iso)).toBeLessThan(TOL);
    expect(Math.abs(ideal(gaps, s2, { coupling: { model: 'empirical', eta: [0.5] } }).efficiency - lc5)).toBeLessThan(TOL);
    expect(Math.abs(ideal(gaps, s2, { coupling: { model: 'empirical', eta: [0.9] } }).efficiency - lc9)).toBeLessThan(TOL);
    expect(Math.abs(ideal(gaps, s2, { coupling: { model: 'radiative', refractiveIndex: 3.5 } }).efficiency - rad)).toBeLessThan(TOL);
    expect(Math.abs(ideal(gaps, independentWiring(2)).efficiency - fourT)).toBeLessThan(TOL);
  });
});

describe('reference.json "single" (independent reference: test/fixtures/reference/runner.py)', () => {
  test('the engine uses the same AM1.5G table: P_in agrees to 1e-9 relative', () => {
    expect(rel(spectrum.pinWm2, ref.meta.spectrum_pin_w_m2)).toBeLessThan(1e-9);
  });
  test.each(ref.single.map((r) => [`${r.gap_ev} eV, ${r.temp_k} K, ERE ${r.ere}`, r] as const))('%s', (_n, r) => {
    const spec = idealStack([r.gap_ev], seriesWiring(1), { tempK: r.temp_k });
    spec.subcells[0].ere = r.ere;
    const res = evaluateStack(spec, spectrum);
    const c = res.subcells[0];
    expect(rel(ma(c.jgenAm2), r.jsc_ma_cm2)).toBeLessThan(5e-9);
    expect(rel(ma(c.j0Am2), r.j0_ma_cm2)).toBeLessThan(1e-9);
    expect(Math.abs(c.vocV - r.voc_v)).toBeLessThan(1e-9);
    expect(Math.abs(c.vmpV - r.vmp_v)).toBeLessThan(1e-9);
    expect(rel(ma(c.jmpAm2), r.jmp_ma_cm2)).toBeLessThan(5e-9);
    expect(Math.abs(c.ff - r.ff)).toBeLessThan(1e-9);
    expect(rel(res.pmaxWm2, r.pmax_w_m2)).toBeLessThan(5e-9);
    expect(Math.abs(res.efficiency - r.efficiency)).toBeLessThan(1e-9);
  });
});

describe('reference.json "stacks" (independent reference: test/fixtures/reference/runner.py)', () => {
  const label = (r: RefStack) =>
    `${r.gaps_ev.join('/')} ${r.wiring} lc=${r.lc.model}${r.lc.model === 'empirical' ? `:${r.lc.eta}` : r.lc.model === 'radiative' ? `:n=${r.lc.n}` : ''} A_top=${r.top_absorptance}`;
  test.each(ref.stacks.map((r) => [label(r), r] as const))('%s', (_n, r) => {
    const res = evaluateStack(specOf(r), spectrum);
    // Optics and dark currents: closed forms on both sides.
    r.gaps_ev.forEach((_g, i) => {
      expect(rel(ma(res.subcells[i].jgenAm2), r.jgen_ma_cm2[i])).toBeLessThan(5e-9);
      expect(rel(ma(res.subcells[i].j0Am2), r.j0_ma_cm2[i])).toBeLessThan(1e-9);
    });
    // Efficiency: 1e-7 absolute.
    expect(Math.abs(res.efficiency - r.efficiency)).toBeLessThan(1e-7);
    expect(rel(res.pmaxWm2, r.pmax_w_m2)).toBeLessThan(3e-7);
    // Operating point (argmax of a flat maximum): 1e-6 relative.
    r.gaps_ev.forEach((_g, i) => {
      expect(rel(ma(res.subcells[i].jOpAm2), r.j_op_ma_cm2[i])).toBeLessThan(1e-6);
      expect(rel(res.subcells[i].vOpV, r.v_op_v[i])).toBeLessThan(1e-6);
      expect(rel(ma(res.subcells[i].jphAm2), r.jph_ma_cm2[i])).toBeLessThan(1e-6);
    });
  });
});

describe('reference.json "top_absorptance_optimum" (independent reference: test/fixtures/reference/runner.py)', () => {
  test.each(ref.top_absorptance_optimum.map((r) => [r.gaps_ev.join('/'), r] as const))('2T %s with the fixture best top absorptance', (_n, r) => {
    const spec = idealStack(r.gaps_ev, seriesWiring(2));
    spec.subcells[0].absorptance = { kind: 'step', value: r.best_top_absorptance };
    const res = evaluateStack(spec, spectrum);
    expect(Math.abs(res.efficiency - r.efficiency)).toBeLessThan(1e-7);
    r.gaps_ev.forEach((_g, i) => expect(rel(ma(res.subcells[i].jgenAm2), r.jgen_ma_cm2[i])).toBeLessThan(5e-9));
  });
});

describe('reference.json "finite_absorptance": Beer–Lambert double pass, α = α0·√(E − E_g) (independent reference: test/fixtures/reference/runner.py)', () => {
  // The runner integrates the √ edge exactly (Gauss–Legendre with the edge
  // substituted away, checked against a 0.01 meV grid). The engine uses 2 meV
  // bins with a(E) at bin centres. a(E) = 1 − exp(−2α0·d·√(E − E_g)) is concave
  // at the edge, so the midpoint rule overestimates the first bin: for 1000 nm
  // (2α0·d = 20 eV^-½) the bin mean of a is 0.437 against 0.469 at its centre,
  // +7 % on a bin that carries ~4–5 % of the emission (width 2 meV of kT ≈ 26 meV)
  // → ~+0.3 % in J0; Jsc is spread over the whole spectrum and is hit ~30× less.
  // Allowed: Jsc 5e-4 and J0 5e-3 relative, hence Voc 0.15 mV (V_t·5e-3 ≈ 0.13 mV)
  // and η 2e-5 absolute. These are numerical-method tolerances, not physics.
  test.each(ref.finite_absorptance.map((r) => [r.thickness_nm, r] as const))('%f nm film', (_d, r) => {
    const spec = idealStack([r.gap_ev], seriesWiring(1), { tempK: r.temp_k });
    spec.subcells[0].absorptance = {
      kind: 'beer-lambert',
      passes: r.path_factor,
      thicknessNm: r.thickness_nm,
      alpha: { kind: 'direct', alpha0PerCm: r.alpha0_per_m / 100, urbachEv: 0 },
    };
    const res = evaluateStack(spec, spectrum);
    const c = res.subcells[0];
    expect(rel(ma(c.jgenAm2), r.jsc_ma_cm2)).toBeLessThan(5e-4);
    expect(rel(ma(c.j0Am2), r.j0_ma_cm2)).toBeLessThan(5e-3);
    expect(Math.abs(c.vocV - r.voc_v)).toBeLessThan(1.5e-4);
    expect(Math.abs(c.ff - r.ff)).toBeLessThan(1e-5);
    expect(Math.abs(res.efficiency - r.efficiency)).toBeLessThan(2e-5);
  });
});
