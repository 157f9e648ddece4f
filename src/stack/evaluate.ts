/**
 * Evaluate a stack under a spectrum: optics, then coupling, then wiring.
 * This is the general (cold) path used by `evaluate`, reports and yields;
 * the search has its own allocation-free step path over the same equations.
 */
import { UserError } from '../errors.js';
import { BOLTZMANN_EV_K, thermalVoltageV } from '../physics/constants.js';
import { j0WithEreAm2 } from '../junction/radiative.js';
import type { Spectrum } from '../light/spectrum.js';
import { maxPowerPoint, vocV } from '../junction/diode.js';
import { couplingIndexBelow, isSeriesString, type StackSpec } from './model.js';
import { stackOptics } from './optics.js';
import { maxPowerPointWithRs, operateGroups, operateVoltageMatched, seriesTerminals, type StackElectrical } from './electrical.js';

/** One subcell in the evaluated stack: photocurrents [A/m²], J0 [A/m²], operating point [V, A/m²], power [W/m²], and the subcell alone (Voc [V], FF [-]). */
export interface SubcellResult {
  gapEv: number;
  /** Photogeneration before coupling [A/m²]. */
  jgenAm2: number;
  /** Photocurrent at the operating point, coupling included [A/m²]. */
  jphAm2: number;
  /** Coupled-in photocurrent from the cell above [A/m²]. */
  lcInAm2: number;
  /** Saturation current used (ERE and coupling included) [A/m²]. */
  j0Am2: number;
  /** Operating point in the stack. */
  jOpAm2: number;
  vOpV: number;
  powerWm2: number;
  /** The subcell alone at its photocurrent: Voc [V], FF [-], Vmp [V], Jmp [A/m²]. */
  vocV: number;
  ff: number;
  vmpV: number;
  jmpAm2: number;
}

/** A stack under one spectrum: efficiency [-], P_max and P_in [W/m²], every subcell, and the terminals of a series string. */
export interface StackResult {
  efficiency: number;
  pmaxWm2: number;
  pinWm2: number;
  subcells: SubcellResult[];
  /** Terminal Voc [V] and Jsc [A/m²] where the wiring has one pair of terminals (one series group). */
  stackVocV: number | null;
  stackJscAm2: number | null;
}

/** A measured curve: at least two points, energies strictly ascending, values within [0, 1]. */
function validateMeasured(what: string, energyEv: number[], value: number[]): void {
  if (energyEv.length < 2 || energyEv.length !== value.length) throw new UserError(`${what} needs at least two (energy, value) points`);
  for (let k = 0; k < energyEv.length; k++) {
    if (!Number.isFinite(energyEv[k]) || (k > 0 && !(energyEv[k] > energyEv[k - 1]))) throw new UserError(`${what}: energies must be finite and strictly ascending (point ${k + 1})`);
    if (!(value[k] >= 0 && value[k] <= 1)) throw new UserError(`${what}: values must be within [0, 1] (fractions, not percent), got ${value[k]} at point ${k + 1}`);
  }
}

/** Reject stacks that the physics cannot describe, naming the faulty part. */
export function validateStack(spec: StackSpec): void {
  const n = spec.subcells.length;
  if (n < 1 || n > 6) throw new UserError(`a stack holds 1 to 6 subcells, got ${n}`);
  if (!(spec.tempK > 0 && spec.tempK <= 1000)) throw new UserError(`cell temperature must be within (0, 1000] K, got ${spec.tempK}`);
  spec.subcells.forEach((c, i) => {
    const name = `subcell ${i + 1}`;
    if (!(c.gapEv > 0) || !Number.isFinite(c.gapEv)) throw new UserError(`${name}: gap must be a positive number of eV, got ${c.gapEv}`);
    if (c.gapEv < 0.1 || c.gapEv > 6) throw new UserError(`${name}: gap ${c.gapEv} eV is outside 0.1–6 eV`);
    if (!(c.ere > 0 && c.ere <= 1)) throw new UserError(`${name}: ERE must be within (0, 1], got ${c.ere}`);
    const a = c.absorptance;
    if (a.kind === 'step' && !(a.value > 0 && a.value <= 1)) throw new UserError(`${name}: absorptance must be within (0, 1], got ${a.value}`);
    const rs = c.rsOhmCm2 ?? 0;
    if (!(rs >= 0 && rs <= 1000)) throw new UserError(`${name}: series resistance must be within 0–1000 Ω·cm², got ${rs}`);
    if (c.refractiveIndex !== undefined && !(c.refractiveIndex >= 1 && c.refractiveIndex <= 10)) throw new UserError(`${name}: refractive index must be within 1–10, got ${c.refractiveIndex}`);
    if (a.kind === 'absorptance-table' || a.kind === 'eqe-table') {
      validateMeasured(`${name}: measured ${a.kind === 'eqe-table' ? 'EQE' : 'absorptance'}${a.source ? ` (${a.source})` : ''}`, a.energyEv, a.value);
      return;
    }
    if (a.kind !== 'step' && !(a.thicknessNm > 0)) throw new UserError(`${name}: thickness must be positive nm, got ${a.thicknessNm}`);
    if (i < n - 1 && ((a.kind === 'beer-lambert' && a.passes === 2) || a.kind === 'lambertian')) {
      // docs/PHYSICS.md §11: a rear mirror or Lambertian trapping puts a reflector behind the film,
      // so nothing it fails to absorb could reach the cells below.
      const what = a.kind === 'lambertian' ? 'Lambertian trapping' : 'a rear mirror (double pass)';
      throw new UserError(`${name}: ${what} puts a reflector behind the film, so no light would reach the cells below; only the bottom subcell (${n}) may have it, upper films are single pass`);
    }
    if (a.kind !== 'step' && a.alpha.kind === 'direct' && !(a.alpha.urbachEv < BOLTZMANN_EV_K * spec.tempK)) {
      throw new UserError(`${name}: Urbach energy ${a.alpha.urbachEv} eV is not below kT (${(BOLTZMANN_EV_K * spec.tempK).toFixed(4)} eV at ${spec.tempK} K); the radiative J0 of such a tail has no detailed-balance limit`);
    }
  });
  const steps = spec.subcells.every((c) => c.absorptance.kind === 'step');
  if (steps) {
    for (let i = 1; i < n; i++) {
      if (!(spec.subcells[i].gapEv < spec.subcells[i - 1].gapEv)) {
        throw new UserError(`gaps must be strictly descending from the top for step absorbers: subcell ${i + 1} (${spec.subcells[i].gapEv} eV) is not below subcell ${i} (${spec.subcells[i - 1].gapEv} eV)`);
      }
    }
  }
  if (spec.interlayerTransmittance.length !== n - 1) throw new UserError(`expected ${n - 1} interlayer transmittances, got ${spec.interlayerTransmittance.length}`);
  const c = spec.coupling;
  if (c.model === 'empirical') {
    if (c.eta.length !== n - 1) throw new UserError(`luminescent coupling needs ${n - 1} value(s), one per interface, got ${c.eta.length}`);
    c.eta.forEach((e) => {
      if (!(e >= 0 && e <= 1)) throw new UserError(`luminescent coupling efficiency must be within [0, 1], got ${e}`);
    });
  }
  if (c.model === 'radiative' && c.refractiveIndex !== undefined && !(c.refractiveIndex >= 1 && c.refractiveIndex <= 10)) {
    throw new UserError(`refractive index for radiative coupling must be within 1–10, got ${c.refractiveIndex}`);
  }
  const seen = new Set<number>();
  for (const g of spec.wiring.groups) {
    if (g.length === 0) throw new UserError('a wiring group is empty');
    for (const i of g) {
      if (!(Number.isInteger(i) && i >= 0 && i < n)) throw new UserError(`wiring names subcell ${i + 1}, but the stack has ${n}`);
      if (seen.has(i)) throw new UserError(`wiring names subcell ${i + 1} twice`);
      seen.add(i);
    }
  }
  if (seen.size !== n) throw new UserError(`wiring must place every subcell in one group (${seen.size} of ${n} placed)`);
  if (spec.wiring.kind === 'voltage-matched') {
    const { m, n: k } = spec.wiring;
    if (!(Number.isInteger(m) && Number.isInteger(k) && m >= 1 && k >= 1 && m <= 100 && k <= 100)) {
      throw new UserError(`voltage-matched ratio must be whole numbers 1–100, got ${m}:${k}`);
    }
  }
}

/**
 * Warnings about a stack that the physics allows but a practitioner should
 * question: empirical coupling above the radiative fraction recycles
 * non-radiative recombination, which no real interface does.
 */
export function stackWarnings(spec: StackSpec): string[] {
  const out: string[] = [];
  const c = spec.coupling;
  if (c.model === 'empirical') {
    c.eta.forEach((e, i) => {
      const ere = spec.subcells[i].ere;
      if (e > ere) out.push(`coupling η = ${e} below subcell ${i + 1} exceeds its ERE (${ere}): more of its recombination is recycled than is radiative, so the empirical model overstates the gain`);
    });
  }
  return out;
}

/**
 * Warnings about a computed result: a subcell whose Voc [V] reaches its gap
 * [eV] (small gaps at high concentration). There the ideal-diode form, with
 * Voc rising by kT/q·ln(C) without bound, has left its range: carriers become
 * degenerate and the emission is no longer the gap-edge blackbody the model
 * assumes (common practice; qV must stay below E_g for the Bose–Einstein
 * emission term to remain finite).
 */
export function resultWarnings(result: StackResult): string[] {
  const out: string[] = [];
  result.subcells.forEach((c, i) => {
    if (c.vocV >= c.gapEv) {
      out.push(
        `subcell ${i + 1}: Voc ${c.vocV.toFixed(3)} V reaches its ${c.gapEv.toFixed(3)} eV gap; the diode form breaks down there (degenerate carriers), so this subcell's numbers are outside the model's range`,
      );
    }
  });
  return out;
}

/** Saturation currents with ERE and the coupling model applied, plus per-interface η. */
function electricalInputs(spec: StackSpec, jgen: Float64Array, j0Rad: Float64Array): StackElectrical {
  const n = spec.subcells.length;
  const j0 = new Float64Array(n);
  const eta = new Float64Array(Math.max(0, n - 1));
  const c = spec.coupling;
  for (let i = 0; i < n; i++) {
    const ere = spec.subcells[i].ere;
    let factor = 1;
    // Radiative limit (Brown & Green, Prog. Photovolt. 10 (2002) 299, from memory): an upper cell also
    // emits into the cell below (index n), raising its J0 by 1 + n²; n²/(1+n²) of its
    // radiative recombination (ERE of the total) goes down.
    if (c.model === 'radiative' && i < n - 1) {
      const n2 = couplingIndexBelow(spec, i) ** 2;
      factor = 1 + n2;
      eta[i] = (ere * n2) / (1 + n2);
    }
    if (c.model === 'empirical' && i < n - 1) eta[i] = c.eta[i];
    j0[i] = j0WithEreAm2(j0Rad[i] * factor, ere);
  }
  // Ω·cm² → Ω·m² (engine currents are A/m²).
  const rs = Float64Array.from(spec.subcells, (c) => (c.rsOhmCm2 ?? 0) * 1e-4);
  return { jgenAm2: jgen, j0Am2: j0, eta, vt: thermalVoltageV(spec.tempK), ...(rs.some((r) => r > 0) ? { rsOhmM2: rs } : {}) };
}

/**
 * A stack under one spectrum in the detailed-balance limit (Shockley & Queisser,
 * J. Appl. Phys. 32 (1961) 510; docs/PHYSICS.md §2–§5): optics down the stack,
 * then coupling, then the wiring solver. Efficiency [-], powers [W/m²],
 * currents [A/m²], voltages [V], at the stack's cell temperature [K].
 * @throws UserError naming the part of the stack the physics cannot describe
 */
export function evaluateStack(spec: StackSpec, spectrum: Spectrum): StackResult {
  validateStack(spec);
  const optics = stackOptics(spec, spectrum);
  const el = electricalInputs(spec, optics.jgenAm2, optics.j0RadAm2);
  const w = spec.wiring;
  const op = w.kind === 'voltage-matched' ? operateVoltageMatched(el, w.groups[0], w.groups[1], w.m, w.n) : operateGroups(el, w.groups);
  const subcells: SubcellResult[] = spec.subcells.map((c, i) => {
    const jph = op.jphAm2[i];
    const rs = el.rsOhmM2?.[i] ?? 0;
    const mpp = rs > 0 ? maxPowerPointWithRs(jph, el.j0Am2[i], el.vt, rs) : maxPowerPoint(jph, el.j0Am2[i], el.vt);
    const voc = vocV(jph, el.j0Am2[i], el.vt);
    return {
      gapEv: c.gapEv,
      jgenAm2: el.jgenAm2[i],
      jphAm2: jph,
      lcInAm2: jph - el.jgenAm2[i],
      j0Am2: el.j0Am2[i],
      jOpAm2: op.currentsAm2[i],
      vOpV: op.voltagesV[i],
      powerWm2: op.currentsAm2[i] * op.voltagesV[i],
      vocV: voc,
      ff: jph > 0 && voc > 0 ? mpp.pmaxWm2 / (jph * voc) : 0,
      vmpV: mpp.vmpV,
      jmpAm2: mpp.jmpAm2,
    };
  });
  const oneGroup = isSeriesString(w);
  const terminals = oneGroup ? seriesTerminals(el, w.groups[0]) : null;
  return {
    efficiency: op.powerWm2 / spectrum.pinWm2,
    pmaxWm2: op.powerWm2,
    pinWm2: spectrum.pinWm2,
    subcells,
    stackVocV: terminals ? terminals.vocV : null,
    stackJscAm2: terminals ? terminals.jscAm2 : null,
  };
}

