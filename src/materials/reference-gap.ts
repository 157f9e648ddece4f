/** The inverse of `gapAtTemperature`: a gap seen at the operating temperature, referred back to the family's reference. */
import { REFERENCE_TEMPERATURE_K, type AbsorberFamily } from './alloy.js';

/**
 * Gap at the operating temperature → gap at the family's reference temperature (linear dE_g/dT).
 * @param family absorber family (supplies dE_g/dT [eV/K])
 * @param gapEv gap at tempK [eV]
 * @param tempK cell temperature [K]
 * @returns gap at the reference temperature [eV]
 */
export function gapAtReference(family: AbsorberFamily, gapEv: number, tempK: number): number {
  return gapEv - family.dEgDtEvPerK * (tempK - REFERENCE_TEMPERATURE_K);
}
