/** Spectra with weights: what an ensemble hands to yield and to the search. */
import type { Spectrum } from './spectrum.js';

/** A spectrum with its weight in a set (hours or energy share) and the cell temperature [K] under it. */
export interface WeightedSpectrum {
  spectrum: Spectrum;
  /** Weight (hours or energy share) [-]. */
  weight: number;
  /** Cell temperature under this spectrum [K]. */
  tempK: number;
}

/** A weighted spectrum with the name people see. */
export interface LabelledSpectrum extends WeightedSpectrum {
  label: string;
}
