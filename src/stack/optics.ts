/**
 * Optics down the stack (docs/PHYSICS.md §4): light that the cells above did not
 * absorb, that was not reflected and not lost in interlayers reaches the next
 * cell, φ_i(E) = φ_0(E)·(1 − R)·Π_{j<i}(1 − a_j(E))·T_j(E).
 *
 * Two paths give per-subcell photogeneration J_gen [A/m²] and radiative
 * saturation current J0_rad [A/m²] from the same a(E) (reciprocity):
 * a closed form for step absorbers with constant optics (band look-ups in the
 * cumulative photon table), and an energy-bin path for everything else whose
 * bins are exact integrals of the same cumulative table and of the
 * Bose–Einstein kernel.
 */
import { photonsAboveEv, type Spectrum } from '../light/spectrum.js';
import { BLACKBODY_PREFACTOR_EV, ELEMENTARY_CHARGE_C } from '../physics/constants.js';
import { boseEinsteinTailEv3, j0RadStepAm2 } from '../junction/radiative.js';
import type { AbsorptanceModel, AlphaModel, SpectralValue, StackSpec } from './model.js';
import { lastIndexNotPast } from '../numerics/sorted.js';

export interface StackOptics {
  /** Photogeneration of each subcell before coupling [A/m²]. */
  jgenAm2: Float64Array;
  /** Radiative saturation current of each subcell [A/m²] before ERE: q·2π/(h³c²)·∫ a(E)(1 − R(E)) E²/(e^{E/kT} − 1) dE. */
  j0RadAm2: Float64Array;
}

/**
 * Depth below the gap at which an Urbach tail is cut [eV]. With E_U < kT the
 * tail's share of J0 decays as exp(−ΔE(1/E_U − 1/kT)); the cut keeps each
 * cell's J0 a property of that cell alone (not of the energy grid).
 */
export const URBACH_TAIL_DEPTH_EV = 0.5;

/** True when the closed-form step path applies. */
export function isStepOptics(spec: StackSpec): boolean {
  return (
    spec.subcells.every((c) => c.absorptance.kind === 'step') &&
    typeof spec.frontReflectance === 'number' &&
    spec.interlayerTransmittance.every((t) => typeof t === 'number')
  );
}

/** Evaluate a spectral value at an energy [eV]. */
export function spectralValueAt(v: SpectralValue, energyEv: number): number {
  if (typeof v === 'number') return v;
  return interpolateClamped(v.energyEv, v.value, energyEv);
}

function interpolateClamped(xs: number[], ys: number[], x: number): number {
  const n = xs.length;
  if (x <= xs[0]) return ys[0];
  if (x >= xs[n - 1]) return ys[n - 1];
  const lo = lastIndexNotPast(xs, x, 0, n - 2);
  const hi = lo + 1;
  return ys[lo] + ((ys[hi] - ys[lo]) * (x - xs[lo])) / (xs[hi] - xs[lo]);
}

/**
 * Absorption coefficient [cm⁻¹] at an energy [eV] for a subcell of a gap [eV].
 * Direct edge α0·√(E − E_g) [cm⁻¹] above the join E_g + E_U/2; below it the
 * exponential Urbach tail α0·√(E_U/2)·exp((E − E_g − E_U/2)/E_U) (Urbach,
 * Phys. Rev. 92 (1953) 1324), joined where both value and slope agree, and cut
 * to zero URBACH_TAIL_DEPTH_EV below the gap. A table is interpolated linearly,
 * zero below its first energy, its last value held above its last.
 */
export function alphaPerCm(model: AlphaModel, gapEv: number, energyEv: number): number {
  if (model.kind === 'table') {
    if (energyEv < model.energyEv[0]) return 0;
    return interpolateClamped(model.energyEv, model.alphaPerCm, energyEv);
  }
  const eu = model.urbachEv;
  if (!(eu > 0)) return energyEv > gapEv ? model.alpha0PerCm * Math.sqrt(energyEv - gapEv) : 0;
  if (energyEv < gapEv - URBACH_TAIL_DEPTH_EV) return 0;
  // Square-root edge above E_g + E_U/2, Urbach exponential below; value and slope match at the join.
  const join = gapEv + eu / 2;
  if (energyEv >= join) return model.alpha0PerCm * Math.sqrt(energyEv - gapEv);
  return model.alpha0PerCm * Math.sqrt(eu / 2) * Math.exp((energyEv - join) / eu);
}

/** Absorptance a(E) [-] of a subcell model at an energy [eV]. */
export function absorptanceAt(model: AbsorptanceModel, gapEv: number, energyEv: number): number {
  switch (model.kind) {
    case 'step':
      return energyEv >= gapEv ? model.value : 0;
    case 'beer-lambert': {
      const ad = alphaPerCm(model.alpha, gapEv, energyEv) * model.thicknessNm * 1e-7;
      return -Math.expm1(-model.passes * ad);
    }
    case 'lambertian': {
      const x = 4 * model.refractiveIndex ** 2 * alphaPerCm(model.alpha, gapEv, energyEv) * model.thicknessNm * 1e-7;
      return x / (1 + x);
    }
    case 'absorptance-table':
    case 'eqe-table':
      return measuredAt(model.energyEv, model.value, energyEv);
  }
}

/** A measured curve [-] at an energy [eV]: 0 below its first energy, linear inside, last value held above. */
function measuredAt(energyEv: number[], value: number[], e: number): number {
  if (e < energyEv[0]) return 0;
  return interpolateClamped(energyEv, value, e);
}

/** Lowest photon energy [eV] at which a subcell can absorb (its gap, its Urbach cut, or its table's start). */
export function absorptionOnsetEv(model: AbsorptanceModel, gapEv: number): number {
  switch (model.kind) {
    case 'step':
      return gapEv;
    case 'absorptance-table':
    case 'eqe-table':
      return model.energyEv[0];
    default:
      if (model.alpha.kind === 'table') return model.alpha.energyEv[0];
      return model.alpha.urbachEv > 0 ? gapEv - URBACH_TAIL_DEPTH_EV : gapEv;
  }
}

/**
 * Closed-form optics for step absorbers with constant R and T. In band k,
 * [E_k, E_{k−1}), cells 1…k−1 are transparent and cells k… absorb their
 * constant a_j, so cell i receives B_k·Π_{j=k}^{i−1}(1 − a_j) of it.
 */
export function stepOptics(spec: StackSpec, spectrum: Spectrum): StackOptics {
  const cells = spec.subcells;
  const n = cells.length;
  const jgen = new Float64Array(n);
  const j0 = new Float64Array(n);
  const r = spec.frontReflectance as number;
  const value = (i: number) => (cells[i].absorptance as { value: number }).value;
  const above = cells.map((c) => photonsAboveEv(spectrum, c.gapEv));
  let throughput = 1 - r;
  for (let i = 0; i < n; i++) {
    const a = value(i);
    // Photons reaching cell i: each earlier band attenuated by the cells it has passed.
    let reaching = 0;
    for (let k = 0; k <= i; k++) {
      let band = above[k] - (k > 0 ? above[k - 1] : 0);
      for (let j = k; j < i; j++) band *= 1 - value(j);
      reaching += band;
    }
    jgen[i] = ELEMENTARY_CHARGE_C * throughput * a * reaching;
    // Reciprocity: emission escapes through the same front surface, so R cuts J0 as it cuts
    // absorption; an absorbing interlayer does not (at cell temperature it emits what it takes).
    j0[i] = a * (1 - r) * j0RadStepAm2(cells[i].gapEv, spec.tempK);
    if (i < n - 1) throughput *= spec.interlayerTransmittance[i] as number;
  }
  return { jgenAm2: jgen, j0RadAm2: j0 };
}

/** Energy step of the bin path [eV]. */
export const BIN_STEP_EV = 0.002;

/** The uniform part of a bin grid under one spectrum and temperature, with N(E) and the Bose–Einstein tail at each edge. */
interface UniformGrid {
  spectrum: Spectrum;
  tempK: number;
  lo: number;
  hi: number;
  /** lo, lo + step, … below hi, then hi [eV]. */
  edges: number[];
  /** photonsAboveEv at each edge [m⁻² s⁻¹]. */
  photonsAbove: Float64Array;
  /** boseEinsteinTailEv3 at each edge [eV³]. */
  kernelTail: Float64Array;
}

/** How many uniform grids are kept: a search or a map row moves one gap and keeps the grid; an ensemble brings a new spectrum each time. */
const KEPT_GRIDS = 4;
const recentGrids: UniformGrid[] = [];

/**
 * The uniform edges from lo to hi with their N(E) and tail values, computed
 * once and kept for the next evaluations under the same spectrum,
 * temperature and ends (the edges follow from lo and hi alone), so the values
 * are the ones the functions give, bit for bit.
 */
function uniformGrid(spectrum: Spectrum, tempK: number, lo: number, hi: number): UniformGrid {
  for (const g of recentGrids) if (g.spectrum === spectrum && g.tempK === tempK && g.lo === lo && g.hi === hi) return g;
  const edges: number[] = [];
  for (let e = lo; e < hi; e += BIN_STEP_EV) edges.push(e);
  edges.push(hi);
  const photonsAbove = new Float64Array(edges.length);
  const kernelTail = new Float64Array(edges.length);
  for (let k = 0; k < edges.length; k++) {
    photonsAbove[k] = photonsAboveEv(spectrum, edges[k]);
    kernelTail[k] = boseEinsteinTailEv3(edges[k], tempK);
  }
  const grid: UniformGrid = { spectrum, tempK, lo, hi, edges, photonsAbove, kernelTail };
  recentGrids.unshift(grid);
  if (recentGrids.length > KEPT_GRIDS) recentGrids.pop();
  return grid;
}

/** The bin grid's ends [eV] for a stack: 0.1 eV below its lowest onset (not under 0.05 eV), and at least 0.5 eV above its highest gap (not under 4.6 eV). */
export function binGridEnds(spec: StackSpec): { lo: number; hi: number } {
  const cells = spec.subcells;
  const minOnset = Math.min(...cells.map((c) => Math.min(c.gapEv - URBACH_TAIL_DEPTH_EV, absorptionOnsetEv(c.absorptance, c.gapEv))));
  return { lo: Math.max(0.05, minOnset - 0.1), hi: Math.max(4.6, Math.max(...cells.map((c) => c.gapEv)) + 0.5) };
}

/**
 * The bin path's sums for a stack: `add` takes one bin (its centre [eV], its
 * incident photons [m⁻² s⁻¹] and its Bose–Einstein kernel [eV³]) down the
 * stack; `result` gives J_gen and J0_rad [A/m²].
 */
export function binSums(spec: StackSpec): { add: (eMid: number, photons: number, kernel: number) => void; result: () => StackOptics } {
  const cells = spec.subcells;
  const n = cells.length;
  const jgen = new Float64Array(n);
  const j0 = new Float64Array(n);
  const add = (eMid: number, photons: number, kernel: number) => {
    const front = 1 - spectralValueAt(spec.frontReflectance, eMid);
    // Share of the incident photons of this bin that reach the current cell [-].
    let reach = front;
    for (let i = 0; i < n; i++) {
      const model = cells[i].absorptance;
      let a = absorptanceAt(model, cells[i].gapEv, eMid);
      if (model.kind === 'eqe-table') {
        // Measured in the stack: the EQE already holds (1 − R) and the cells above (§11); reciprocity
        // gives J0 from the same curve. It absorbed EQE/reach of what reached it, and passes the rest.
        jgen[i] += photons * a;
        j0[i] += kernel * a;
        a = reach > 0 ? Math.min(1, a / reach) : 1;
      } else {
        jgen[i] += photons * reach * a;
        // Reciprocity: the cell's own a(E) and the front surface's (1 − R) set its emission.
        j0[i] += kernel * a * front;
      }
      reach *= 1 - a;
      if (i < n - 1) reach *= spectralValueAt(spec.interlayerTransmittance[i], eMid);
    }
  };
  const result = (): StackOptics => {
    for (let i = 0; i < n; i++) {
      jgen[i] *= ELEMENTARY_CHARGE_C;
      j0[i] *= ELEMENTARY_CHARGE_C * BLACKBODY_PREFACTOR_EV;
    }
    return { jgenAm2: jgen, j0RadAm2: j0 };
  };
  return { add, result };
}

/**
 * General optics on energy bins. Bin edges are a uniform grid plus every
 * subcell gap, so step edges are exact; each bin's photons are a difference
 * of the cumulative table and each bin's emission kernel a difference of the
 * Bose–Einstein series. Absorptance is taken at bin centres.
 */
export function binnedOptics(spec: StackSpec, spectrum: Spectrum): StackOptics {
  const { lo, hi } = binGridEnds(spec);
  const { edges, photonsAbove, kernelTail } = uniformGrid(spectrum, spec.tempK, lo, hi);
  // Gap edges inside the grid, ascending; each comes after the uniform edges not above it.
  const gaps = spec.subcells.map((c) => c.gapEv).filter((g) => g > lo && g < hi).sort((a, b) => a - b);
  const sums = binSums(spec);
  // Walk the uniform edges and the gaps in order, one bin between each edge and the one before
  // (a bin narrower than 1e-12 eV is skipped).
  const m = edges.length;
  let ePrev = edges[0];
  let nPrev = photonsAbove[0];
  let bPrev = kernelTail[0];
  let k = 1;
  let gi = 0;
  while (k < m || gi < gaps.length) {
    let e: number;
    let nk: number;
    let bk: number;
    if (gi < gaps.length && gaps[gi] < edges[k]) {
      e = gaps[gi++];
      nk = photonsAboveEv(spectrum, e);
      bk = boseEinsteinTailEv3(e, spec.tempK);
    } else {
      e = edges[k];
      nk = photonsAbove[k];
      bk = kernelTail[k++];
    }
    if (e - ePrev >= 1e-12) {
      sums.add(0.5 * (e + ePrev), nPrev - nk, bPrev - bk);
      nPrev = nk;
      bPrev = bk;
    }
    ePrev = e;
  }
  // Everything above the last edge, at the last absorptance.
  sums.add(hi, nPrev, bPrev);
  return sums.result();
}

/** Optics of a stack under a spectrum, by the fastest exact path that applies. */
export function stackOptics(spec: StackSpec, spectrum: Spectrum): StackOptics {
  return isStepOptics(spec) ? stepOptics(spec, spectrum) : binnedOptics(spec, spectrum);
}
