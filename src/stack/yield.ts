/**
 * Yield of one stack over a weighted set of spectra (docs/PHYSICS.md §8): every
 * spectrum is solved in full, so a series stack re-matches its current each time.
 */
import { UserError } from '../errors.js';
import type { WeightedSpectrum } from '../light/weighted-spectrum.js';
import type { WeightUnit } from '../light/ensemble-weights.js';
import { evaluateStack, type StackResult } from './evaluate.js';
import type { StackSpec } from './model.js';

/** One spectrum of a set: the stack's power [W/m²] and efficiency [-] under it. */
export interface SpectrumYield {
  label: string;
  timestamp?: string;
  weight: number;
  tempK: number;
  pinWm2: number;
  pmaxWm2: number;
  efficiency: number;
  /** Terminal Voc [V] where the wiring has one pair of terminals, else null. */
  stackVocV: number | null;
  /** Per subcell, top first: operating current [A/m²], photocurrent [A/m²], operating voltage [V], Voc alone [V], power [W/m²]. */
  subcells: { gapEv: number; jOpAm2: number; jphAm2: number; vOpV: number; vocV: number; powerWm2: number }[];
}

/** A stack over a weighted set of spectra: yield-weighted efficiency Σ w·P_max / Σ w·P_in [-] (docs/PHYSICS.md §8) and the per-spectrum results. */
export interface YieldResult {
  /** Hours: Σ Δt·P_max / Σ Δt·P_in; shares: Σ s·η / Σ s [-]. */
  yieldEfficiency: number;
  weightUnit: WeightUnit;
  totalWeight: number;
  /** Σ w·P_in [Wh/m² when weights are hours; a weighted sum without energy meaning for shares]. */
  weightedPinWm2: number;
  /** Σ w·P_max [Wh/m² when weights are hours: the yield; without energy meaning for shares]. */
  weightedPmaxWm2: number;
  perSpectrum: SpectrumYield[];
}

/**
 * Yield-weighted efficiency of a stack over weighted spectra (docs/PHYSICS.md
 * §8, and §10 Weights): durations Δt give Σ Δt·P_max / Σ Δt·P_in, energy
 * shares s give Σ s·η / Σ s. Each spectrum is solved in full with
 * evaluateStack at its own cell temperature (the spec's tempK replaced; gaps
 * and ERE held as given). A series stack re-matches its current under every
 * spectrum.
 */
export function yieldForStack(spec: StackSpec, members: (WeightedSpectrum & { label?: string; timestamp?: string })[], weightUnit: WeightUnit = 'hours'): YieldResult {
  if (members.length === 0) throw new UserError('the ensemble holds no spectra');
  let pin = 0;
  let pmax = 0;
  let total = 0;
  let shareEta = 0;
  const perSpectrum = members.map((m, k): SpectrumYield => {
    if (!(m.weight > 0) || !Number.isFinite(m.weight)) throw new UserError(`spectrum ${m.label ?? k + 1}: weight must be a positive finite number, got ${m.weight}`);
    const r: StackResult = evaluateStack({ ...spec, tempK: m.tempK }, m.spectrum);
    pin += m.weight * r.pinWm2;
    pmax += m.weight * r.pmaxWm2;
    total += m.weight;
    shareEta += m.weight * r.efficiency;
    return {
      label: m.label ?? `#${k + 1}`,
      ...(m.timestamp !== undefined ? { timestamp: m.timestamp } : {}),
      weight: m.weight,
      tempK: m.tempK,
      pinWm2: r.pinWm2,
      pmaxWm2: r.pmaxWm2,
      efficiency: r.efficiency,
      stackVocV: r.stackVocV,
      subcells: r.subcells.map((c) => ({ gapEv: c.gapEv, jOpAm2: c.jOpAm2, jphAm2: c.jphAm2, vOpV: c.vOpV, vocV: c.vocV, powerWm2: c.powerWm2 })),
    };
  });
  if (!(pin > 0)) throw new UserError('the ensemble carries no incident power');
  const yieldEfficiency = weightUnit === 'hours' ? pmax / pin : shareEta / total;
  return { yieldEfficiency, weightUnit, totalWeight: total, weightedPinWm2: pin, weightedPmaxWm2: pmax, perSpectrum };
}
