/**
 * What an ensemble's weights mean (docs/PHYSICS.md §10, Weights). Durations
 * Δt_k [h]: η = Σ Δt_k·P_max,k / Σ Δt_k·P_in,k and yield = Σ Δt_k·P_max,k.
 * Energy shares s_k [-]: η = Σ s_k·η_k / Σ s_k. The two agree only when
 * s_k ∝ Δt_k·P_in,k, so the unit is never guessed and never mixed.
 */
import type { Spectrum } from './spectrum.js';
import type { WeightedSpectrum } from './weighted-spectrum.js';

/** How the weights are meant: hours (so Σ w·P is energy [Wh/m²]) or relative energy shares [-]. */
export type WeightUnit = 'hours' | 'share';

/**
 * The weight [h, or 1/(W/m²) for shares] that makes Σ w·P_max / Σ w·P_in the
 * ensemble efficiency: a duration as given; a share s_k as s_k / P_in,k, so
 * that Σ (s_k/P_in,k)·P_max,k / Σ (s_k/P_in,k)·P_in,k = Σ s_k·η_k / Σ s_k.
 */
export function powerWeight(weight: number, unit: WeightUnit, spectrum: Spectrum): number {
  return unit === 'hours' ? weight : weight / spectrum.pinWm2;
}

/** Members with their weights turned into power weights (see powerWeight), everything else kept. */
export function withPowerWeights<T extends WeightedSpectrum>(members: readonly T[], unit: WeightUnit): T[] {
  return members.map((m) => ({ ...m, weight: powerWeight(m.weight, unit, m.spectrum) }));
}
