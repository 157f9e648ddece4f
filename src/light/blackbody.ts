/**
 * A blackbody sun: the spectral irradiance of a blackbody at T_s diluted by
 * f = C·(R_sun/D)² (docs/PHYSICS.md §1; De Vos, J. Phys. D 13 (1980) 839).
 * P_in = f·σ·T_s⁴ exactly; the table exists so that the sun travels through
 * the program in the same form as any measured spectrum.
 */
import { BLACKBODY_PREFACTOR_EV, BOLTZMANN_EV_K, DILUTION_ONE_SUN, ELEMENTARY_CHARGE_C, HC_EV_NM, STEFAN_BOLTZMANN } from '../physics/constants.js';
import { UserError } from '../errors.js';
import { makeSpectrum, sha256OfTable, type Spectrum } from './spectrum.js';

/** A blackbody sun: surface temperature [K], geometric dilution [-] and table step [eV]. */
export interface BlackbodyOptions {
  /** Sun surface temperature [K]. */
  tempK: number;
  /** Geometric dilution factor f [-]; default (R_sun/1 au)² ≈ 2.1627e-5 (one sun). */
  dilution?: number;
  /** Energy step of the generated table [eV]; default 1 meV. */
  stepEv?: number;
}

/** Blackbody sun as a spectrum; P_in = f·σ·T⁴ [W/m²]. */
export function blackbodySpectrum(opts: BlackbodyOptions): Spectrum {
  const { tempK } = opts;
  if (!(tempK >= 100 && tempK <= 100000)) throw new UserError(`blackbody temperature must be within 100–100000 K, got ${tempK}`);
  const f = opts.dilution ?? DILUTION_ONE_SUN;
  if (!(f > 0 && f <= 1)) throw new UserError(`blackbody dilution must be within (0, 1], got ${f}`);
  const kt = BOLTZMANN_EV_K * tempK;
  const step = opts.stepEv ?? 1e-3;
  const eMin = Math.max(0.005, 0.01 * kt);
  const eMax = 40 * kt;
  const count = Math.ceil((eMax - eMin) / step) + 1;
  const wl = new Float64Array(count);
  const irr = new Float64Array(count);
  // Ascending wavelength = descending energy.
  for (let k = 0; k < count; k++) {
    const e = eMax - k * step > eMin ? eMax - k * step : eMin;
    const lambda = HC_EV_NM / e;
    wl[k] = lambda;
    // photons per eV → per nm: |dE/dλ| = E/λ; irradiance = photons·E·q.
    const perEv = (f * BLACKBODY_PREFACTOR_EV * e * e) / Math.expm1(e / kt);
    irr[k] = perEv * (e / lambda) * e * ELEMENTARY_CHARGE_C;
  }
  const dedup = dedupe(wl, irr);
  const suns = f / DILUTION_ONE_SUN;
  return makeSpectrum({
    name: `blackbody ${tempK} K, ${formatSuns(suns)}`,
    sha256: sha256OfTable(dedup.wl, dedup.irr),
    source: `generated: Planck spectrum at ${tempK} K, dilution f = ${f.toPrecision(6)}, ${step * 1000} meV grid`,
    wavelengthNm: dedup.wl,
    irradiance: dedup.irr,
    pinWm2: f * STEFAN_BOLTZMANN * tempK ** 4,
  });
}

function dedupe(wl: Float64Array, irr: Float64Array): { wl: Float64Array; irr: Float64Array } {
  let n = 1;
  for (let i = 1; i < wl.length; i++) if (wl[i] > wl[n - 1]) {
    wl[n] = wl[i];
    irr[n] = irr[i];
    n++;
  }
  return { wl: wl.slice(0, n), irr: irr.slice(0, n) };
}

function formatSuns(suns: number): string {
  return Math.abs(suns - 1) < 1e-9 ? '1 sun' : `${Number(suns.toPrecision(6))} suns`;
}
