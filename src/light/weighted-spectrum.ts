/** Spectra with weights: what an ensemble hands to yield and to the search. */
import type { Spectrum } from './spectrum.js';

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
