/**
 * binnedOptics keeps the uniform part of its bin grid (edges, N(E) and the
 * Bose–Einstein tail at each) for later evaluations under the same spectrum,
 * temperature and grid ends. Its results must be the straightforward
 * computation's, bit for bit: that computation is written out below as the
 * reference (every edge's values computed afresh, gaps sorted into the
 * edges), and both run over stacks whose grid is kept, moved, evicted and
 * brought back, with gaps that fall exactly on a uniform edge and gaps shared
 * by two cells.
 */
import { describe, expect, test } from 'vitest';
import { blackbodySpectrum } from '../../src/light/blackbody.js';
import { am15g } from '../../src/light/sources.js';
import { photonsAboveEv, type Spectrum } from '../../src/light/spectrum.js';
import { boseEinsteinTailEv3 } from '../../src/junction/radiative.js';
import { BIN_STEP_EV, binGridEnds, binnedOptics, binSums, URBACH_TAIL_DEPTH_EV, type StackOptics } from '../../src/stack/optics.js';
import { idealStack, seriesWiring, type AbsorptanceModel, type StackSpec } from '../../src/stack/model.js';

/**
 * The bin path computed straight through: every edge's N(E) and tail afresh,
 * the gaps sorted into the edges. It shares the grid's ends and the sums down
 * the stack (binGridEnds, binSums) with binnedOptics; what it writes out is
 * the part binnedOptics does differently, the edges and their values.
 */
function reference(spec: StackSpec, spectrum: Spectrum): StackOptics {
  const { lo, hi } = binGridEnds(spec);
  const edges: number[] = [];
  for (let e = lo; e < hi; e += BIN_STEP_EV) edges.push(e);
  edges.push(hi);
  for (const c of spec.subcells) if (c.gapEv > lo && c.gapEv < hi) edges.push(c.gapEv);
  edges.sort((a, b) => a - b);
  const sums = binSums(spec);
  let nPrev = photonsAboveEv(spectrum, edges[0]);
  let bPrev = boseEinsteinTailEv3(edges[0], spec.tempK);
  for (let k = 1; k < edges.length; k++) {
    if (edges[k] - edges[k - 1] < 1e-12) continue;
    const nk = photonsAboveEv(spectrum, edges[k]);
    const bk = boseEinsteinTailEv3(edges[k], spec.tempK);
    sums.add(0.5 * (edges[k] + edges[k - 1]), nPrev - nk, bPrev - bk);
    nPrev = nk;
    bPrev = bk;
  }
  sums.add(hi, nPrev, bPrev);
  return sums.result();
}

const urbachFilm = (thicknessNm: number): AbsorptanceModel => ({ kind: 'beer-lambert', passes: 1, thicknessNm, alpha: { kind: 'direct', alpha0PerCm: 1e5, urbachEv: 0.016 } });
const measured: AbsorptanceModel = { kind: 'absorptance-table', energyEv: [0.95, 1.1, 1.3, 2, 4], value: [0, 0.4, 0.8, 0.9, 0.92] };
const eqe: AbsorptanceModel = { kind: 'eqe-table', energyEv: [1.05, 1.2, 1.6, 3], value: [0, 0.3, 0.55, 0.6] };

/** A stack of films with these gaps; the last cell measured (the bottom wafer) unless `last` is given. */
function stack(gaps: number[], tempK: number, last: AbsorptanceModel = measured): StackSpec {
  const s = idealStack(gaps, seriesWiring(gaps.length), { tempK });
  s.subcells.forEach((c, i) => (c.absorptance = i === gaps.length - 1 ? last : urbachFilm(300 + 150 * i)));
  s.frontReflectance = { energyEv: [0.5, 2, 4.5], value: [0.06, 0.03, 0.08] };
  s.interlayerTransmittance = s.interlayerTransmittance.map(() => ({ energyEv: [0.5, 1.5, 4.5], value: [0.97, 0.93, 0.9] }));
  return s;
}

/** The uniform edge nearest a value, built as binnedOptics builds its grid for this stack's low end. */
function uniformEdgeNear(lo: number, target: number): number {
  let e = lo;
  while (e + BIN_STEP_EV / 2 < target) e += BIN_STEP_EV;
  return e;
}

const same = (a: StackOptics, b: StackOptics, label: string) => {
  expect(Array.from(a.jgenAm2), label).toEqual(Array.from(b.jgenAm2));
  expect(Array.from(a.j0RadAm2), label).toEqual(Array.from(b.j0RadAm2));
};

describe('the bin path with its uniform grid kept', () => {
  const sun = am15g();
  const others: Spectrum[] = [5200, 5500, 5800, 6100, 6400].map((t) => blackbodySpectrum({ tempK: t }));

  test('a search moving the top gap over a fixed bottom: the grid is kept, the answers are the reference bits', () => {
    for (let g = 1.55; g <= 1.85; g += 0.0137) same(binnedOptics(stack([g, 1.12], 300), sun), reference(stack([g, 1.12], 300), sun), `top ${g}`);
  });

  test('gaps exactly on a uniform edge, just off it, and shared by two cells', () => {
    // The bottom's onset sets the grid's low end: 1.12 − 0.5 − 0.1 eV.
    const lo = Math.max(0.05, 1.12 - URBACH_TAIL_DEPTH_EV - 0.1);
    const onEdge = uniformEdgeNear(lo, 1.7);
    for (const top of [onEdge, onEdge + 1e-13, onEdge - 1e-13, onEdge + 5e-13, 1.12]) {
      same(binnedOptics(stack([top, 1.12], 300), sun), reference(stack([top, 1.12], 300), sun), `top ${top}`);
    }
    same(binnedOptics(stack([1.8, 1.8, 1.12], 300), sun), reference(stack([1.8, 1.8, 1.12], 300), sun), 'two cells at 1.8 eV');
  });

  test('spectra, temperatures and grid ends that change every call, more of them than are kept, then the first again', () => {
    const cases: [StackSpec, Spectrum][] = [];
    for (const [k, s] of [sun, ...others].entries()) cases.push([stack([1.7 + 0.01 * k, 1.0 + 0.02 * k], 290 + 5 * k, k % 2 ? eqe : measured), s]);
    cases.push([stack([4.3, 1.12], 300), sun]); // the top gap moves the high end above 4.6 eV
    cases.push([stack([1.7, 0.6], 300, urbachFilm(2000)), sun]); // an Urbach bottom at 0.6 eV: the low end is 0.05 eV
    for (const [spec, s] of [...cases, ...cases.slice(0, 3)]) same(binnedOptics(spec, s), reference(spec, s), `${s.name} ${spec.tempK} K ${spec.subcells.map((c) => c.gapEv).join('/')}`);
  });
});
