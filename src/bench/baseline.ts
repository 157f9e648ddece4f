/**
 * A deliberately plain detailed-balance evaluator, kept as the yardstick for
 * the benchmark: it integrates the spectrum numerically at every call (no
 * cumulative table), integrates the blackbody numerically (no series), and
 * finds the maximum power with a generic golden-section maximiser. It is
 * correct, and slow on purpose; nothing in the product calls it.
 */
import { BLACKBODY_PREFACTOR_EV, BOLTZMANN_EV_K, ELEMENTARY_CHARGE_C, HC_EV_NM, thermalVoltageV } from '../physics/constants.js';
import type { Spectrum } from '../light/spectrum.js';

/** q·∫ φ_λ dλ up to the gap wavelength by the trapezoid rule on the native grid [A/m²]. */
function plainJscAm2(s: Spectrum, gapEv: number): number {
  const lg = HC_EV_NM / gapEv;
  const w = s.wavelengthNm;
  const f = s.photonFlux;
  let sum = 0;
  for (let i = 1; i < w.length; i++) {
    if (w[i - 1] >= lg) break;
    const hi = Math.min(w[i], lg);
    const fhi = f[i - 1] + ((f[i] - f[i - 1]) * (hi - w[i - 1])) / (w[i] - w[i - 1]);
    sum += 0.5 * (f[i - 1] + fhi) * (hi - w[i - 1]);
  }
  return ELEMENTARY_CHARGE_C * sum;
}

/** q·2π/(h³c²)·∫ E²/(e^{E/kT} − 1) dE from the gap by Simpson's rule over 40 kT [A/m²]. */
function plainJ0Am2(gapEv: number, tempK: number, intervals = 2000): number {
  const kt = BOLTZMANN_EV_K * tempK;
  const h = (40 * kt) / intervals;
  let sum = 0;
  for (let k = 0; k <= intervals; k++) {
    const e = gapEv + k * h;
    const w = k === 0 || k === intervals ? 1 : k % 2 ? 4 : 2;
    sum += (w * e * e) / Math.expm1(e / kt);
  }
  return ELEMENTARY_CHARGE_C * BLACKBODY_PREFACTOR_EV * (sum * h) / 3;
}

/** Generic golden-section maximiser of f on [a, b]. */
export function goldenMax(f: (x: number) => number, a: number, b: number, iterations = 100): number {
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = b - g * (b - a);
  let x2 = a + g * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let k = 0; k < iterations; k++) {
    if (f1 < f2) {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + g * (b - a);
      f2 = f(x2);
    } else {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - g * (b - a);
      f1 = f(x1);
    }
  }
  return Math.max(f1, f2);
}

/** Efficiency of an ideal-step series stack, the plain way [-]. */
export function plainSeriesEfficiency(s: Spectrum, gapsEv: number[], tempK = 300): number {
  const vt = thermalVoltageV(tempK);
  const n = gapsEv.length;
  const jph: number[] = [];
  const j0: number[] = [];
  let above = 0;
  for (let i = 0; i < n; i++) {
    const total = plainJscAm2(s, gapsEv[i]);
    jph.push(total - above);
    above = total;
    j0.push(plainJ0Am2(gapsEv[i], tempK));
  }
  const jMax = Math.min(...jph.map((j, i) => j + j0[i]));
  const power = (j: number) => {
    let v = 0;
    for (let i = 0; i < n; i++) v += vt * Math.log((jph[i] - j) / j0[i] + 1);
    return j * v;
  };
  return goldenMax(power, 0, jMax) / s.pinWm2;
}
