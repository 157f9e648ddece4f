/**
 * The ideal detailed-balance diode of one junction (Shockley & Queisser 1961):
 * J(V) = J_ph − J0·(exp(V/V_t) − 1), with J0 the radiative saturation current
 * divided by the ERE. Current densities [A/m²], voltages [V].
 */
import { lambertW0OfExp } from './lambert-w.js';

/** Terminal current [A/m²] at a voltage [V]. */
export function currentAtVoltageAm2(jphAm2: number, j0Am2: number, vt: number, voltageV: number): number {
  return jphAm2 - j0Am2 * Math.expm1(voltageV / vt);
}

/** Terminal voltage [V] at a current [A/m²]: V_t·ln((J_ph − J)/J0 + 1); −∞ past J_ph + J0. */
export function voltageAtCurrentV(jphAm2: number, j0Am2: number, vt: number, currentAm2: number): number {
  const u = (jphAm2 - currentAm2) / j0Am2;
  return u > -1 ? vt * Math.log1p(u) : -Infinity;
}

/** Open-circuit voltage [V]. */
export function vocV(jphAm2: number, j0Am2: number, vt: number): number {
  return vt * Math.log1p(jphAm2 / j0Am2);
}

export interface MaxPowerPoint {
  /** Voltage at maximum power [V]. */
  vmpV: number;
  /** Current at maximum power [A/m²]. */
  jmpAm2: number;
  /** Maximum power density [W/m²]. */
  pmaxWm2: number;
}

/**
 * Maximum power point in closed form: V_mp = V_t·(W(e·(1 + J_ph/J0)) − 1),
 * W the Lambert W function (e.g. Khanna et al., IEEE J. Photovolt. 3 (2013) 1357
 * for this form). Evaluated as W(exp(1 + ln(1 + J_ph/J0))) so that the huge
 * ratios of wide gaps do not overflow.
 */
export function maxPowerPoint(jphAm2: number, j0Am2: number, vt: number): MaxPowerPoint {
  if (!(jphAm2 > 0)) return { vmpV: 0, jmpAm2: 0, pmaxWm2: 0 };
  const w = lambertW0OfExp(1 + Math.log1p(jphAm2 / j0Am2));
  const vmpV = vt * (w - 1);
  const jmpAm2 = currentAtVoltageAm2(jphAm2, j0Am2, vt, vmpV);
  return { vmpV, jmpAm2, pmaxWm2: vmpV * jmpAm2 };
}
