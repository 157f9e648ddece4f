/** The light a search or yield uses: one spectrum, or a weighted ensemble. */
import type { LabelledSpectrum } from '../light/weighted-spectrum.js';
import { spectrumFromArgs, type LightArgs } from './options.js';
import { UserError } from '../errors.js';
import { parseUnitDeclaration } from '../light/table-file.js';

export interface SpectraArgs extends LightArgs {
  ensemble?: string;
}

export type { LabelledSpectrum };

/** One spectrum at the cell temperature, or every member of --ensemble. */
export async function spectraFromArgs(a: SpectraArgs, tempK: number): Promise<LabelledSpectrum[]> {
  if (a.ensemble !== undefined) {
    if (a.spectrum !== undefined) throw new UserError('give either --spectrum or --ensemble, not both');
    if (a.suns !== undefined || a.irradiance !== undefined) throw new UserError('--suns and --irradiance apply to one spectrum; an ensemble carries its own irradiance');
    const { loadEnsemble } = await import('../light/ensemble.js');
    const { withPowerWeights } = await import('../light/ensemble-weights.js');
    const units = a.units === undefined ? undefined : parseUnitDeclaration(a.units);
    const e = loadEnsemble(a.ensemble, { defaultTempK: tempK, units });
    // The search maximises Σ w·P_max / Σ w·P_in: shares enter as s/P_in (docs/PHYSICS.md §10).
    return withPowerWeights(e.members, e.weightUnit);
  }
  const spectrum = spectrumFromArgs(a);
  return [{ spectrum, weight: 1, tempK, label: spectrum.name }];
}

/** What to do about a spectrum that stops short of the lowest gap's edge, in the command line's words. */
export const CLI_EXTEND_HINT = 'use a spectrum that reaches it, or rerun with --extend-spectrum to continue the table with the AM1.5G shape joined at its last point';
