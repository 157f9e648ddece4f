/**
 * Radiative recombination in detailed balance (Shockley & Queisser, J. Appl.
 * Phys. 32 (1961) 510): the dark current is the blackbody photon flux the cell
 * emits through its front surface into air (solid angle π) at cell temperature.
 */
import { BLACKBODY_PREFACTOR_EV, BOLTZMANN_EV_K, ELEMENTARY_CHARGE_C } from '../physics/constants.js';

/**
 * Bose–Einstein integral ∫_{E}^{∞} u²/(e^{u/kT} − 1) du [eV³] for a lower
 * energy E [eV] at temperature T [K], by the convergent series
 * (kT)³ Σ_{m≥1} e^{−mx}(x²/m + 2x/m² + 2/m³), x = E/kT.
 * Not the Boltzmann shortcut (m = 1 only), and no quadrature.
 */
export function boseEinsteinTailEv3(energyEv: number, tempK: number): number {
  const kt = BOLTZMANN_EV_K * tempK;
  const x = energyEv / kt;
  if (x <= 0) return 2 * 1.2020569031595942 * kt * kt * kt; // 2ζ(3)(kT)³
  const q = Math.exp(-x);
  let em = q;
  let sum = 0;
  for (let m = 1; m <= 100000; m++) {
    const term = em * (x * x / m + (2 * x) / (m * m) + 2 / (m * m * m));
    sum += term;
    if (term < 1e-17 * sum) break;
    em *= q;
  }
  return kt * kt * kt * sum;
}

/**
 * Photon flux a blackbody at T emits into a hemisphere above an energy E
 * [m⁻² s⁻¹]: 2π/(h³c²) ∫_E^∞ u²/(e^{u/kT} − 1) du.
 */
export function blackbodyPhotonsAboveEv(energyEv: number, tempK: number): number {
  return BLACKBODY_PREFACTOR_EV * boseEinsteinTailEv3(energyEv, tempK);
}

/**
 * Radiative saturation current of an ideal step absorber (a = 1 above the gap),
 * front emission only [A/m²], for a gap [eV] at a cell temperature [K].
 * J0_rad = q·2π/(h³c²)·∫_{E_g}^{∞} E²/(e^{E/kT} − 1) dE.
 */
export function j0RadStepAm2(gapEv: number, tempK: number): number {
  return ELEMENTARY_CHARGE_C * blackbodyPhotonsAboveEv(gapEv, tempK);
}

/**
 * Saturation current with a finite external radiative efficiency [A/m²]
 * (Green, Prog. Photovolt. 20 (2012) 472): J0 = J0_rad / ERE, ERE ∈ (0, 1].
 */
export function j0WithEreAm2(j0RadAm2: number, ere: number): number {
  return j0RadAm2 / ere;
}

/** ERE equivalent to a non-radiative open-circuit voltage loss ΔV [V] at T [K]: ERE = exp(−ΔV/V_t). */
export function ereFromVocLoss(lossV: number, tempK: number): number {
  return Math.exp(-lossV / (BOLTZMANN_EV_K * tempK));
}
