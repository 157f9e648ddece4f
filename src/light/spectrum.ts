/**
 * The one representation of light in gapstack: a spectral irradiance table on
 * an ascending wavelength grid with its cumulative photon table, built once.
 *
 * Photons above a gap come from the exact integral of the linear interpolant
 * of the photon flux, so N(E_g) is continuous in E_g and costs one binary
 * search (no staircase artefacts in maps).
 */
import { createHash } from 'node:crypto';
import { ELEMENTARY_CHARGE_C, HC_EV_NM, HC_J_NM } from '../physics/constants.js';
import { UserError } from '../errors.js';
import { lastIndexNotPast } from '../numerics/sorted.js';

/** One light source as the engine uses it: spectral irradiance on an ascending wavelength grid [nm, W m⁻² nm⁻¹], photon flux, its cumulative photon table, P_in [W/m²] and provenance. */
export interface Spectrum {
  /** Human-readable name, e.g. "AM1.5G (ASTM G173-03 global tilt)". */
  readonly name: string;
  /** SHA-256 (hex) of the source data: the file bytes, or the generated table. */
  readonly sha256: string;
  /** Wavelength grid [nm], strictly ascending. */
  readonly wavelengthNm: Float64Array;
  /** Spectral irradiance [W m⁻² nm⁻¹]. */
  readonly irradiance: Float64Array;
  /** Spectral photon flux [m⁻² s⁻¹ nm⁻¹]. */
  readonly photonFlux: Float64Array;
  /** Cumulative photon flux from the shortest wavelength [m⁻² s⁻¹] (trapezoid). */
  readonly cumulativePhotons: Float64Array;
  /** Incident power P_in [W/m²]; analytic for a blackbody, trapezoid otherwise. */
  readonly pinWm2: number;
  /** Scale applied to the source data (concentration or irradiance rescale) [-]. */
  readonly scale: number;
  /** Free-text provenance (file path, standard, generator). */
  readonly source: string;
}

/** What `makeSpectrum` needs: wavelength [nm] ascending and irradiance [W m⁻² nm⁻¹], with a name and source. */
export interface SpectrumInput {
  name: string;
  sha256: string;
  source: string;
  wavelengthNm: ArrayLike<number>;
  irradiance: ArrayLike<number>;
  /** Use this P_in instead of the trapezoid (analytic blackbody) [W/m²]. */
  pinWm2?: number;
}

/** Trapezoid integral of y over x. */
export function trapezoid(x: ArrayLike<number>, y: ArrayLike<number>): number {
  let s = 0;
  for (let i = 1; i < x.length; i++) s += 0.5 * (y[i] + y[i - 1]) * (x[i] - x[i - 1]);
  return s;
}

/** Build a spectrum from validated arrays: photon flux and the cumulative table. */
export function makeSpectrum(input: SpectrumInput): Spectrum {
  const n = input.wavelengthNm.length;
  if (n < 2 || input.irradiance.length !== n) throw new UserError('a spectrum needs at least two points with one irradiance each');
  return spectrumOfArrays({ ...input, wavelengthNm: Float64Array.from(input.wavelengthNm), irradiance: Float64Array.from(input.irradiance) });
}

/** Spectral photon flux φ_λ = E_λ·λ/(hc) [m⁻² s⁻¹ nm⁻¹] at grid point i: the one definition every table and integral uses. */
export function photonFluxAt(irradiance: ArrayLike<number>, wavelengthNm: ArrayLike<number>, i: number): number {
  return (irradiance[i] * wavelengthNm[i]) / HC_J_NM;
}

/**
 * Photons below λ [m⁻² s⁻¹] for λ inside grid interval i (λ_i ≤ λ ≤ λ_i+1): the
 * cumulative table at λ_i plus the exact integral of the linear interpolant of φ_λ from λ_i.
 */
function photonsBelowInInterval(w: ArrayLike<number>, e: ArrayLike<number>, cumulative: ArrayLike<number>, i: number, lambda: number): number {
  const t = lambda - w[i];
  const f0 = photonFluxAt(e, w, i);
  const f1 = photonFluxAt(e, w, i + 1);
  const fx = f0 + ((f1 - f0) * t) / (w[i + 1] - w[i]);
  return cumulative[i] + 0.5 * (f0 + fx) * t;
}

/**
 * makeSpectrum for arrays the spectrum may keep as they are (no copy): a large
 * ensemble's members are views into one table, and members with the same rows
 * share one wavelength array. The arrays must not change afterwards.
 */
export function spectrumOfArrays(input: Omit<SpectrumInput, 'sha256'> & { sha256: string | (() => string); wavelengthNm: Float64Array; irradiance: Float64Array }): Spectrum {
  const n = input.wavelengthNm.length;
  if (n < 2 || input.irradiance.length !== n) throw new UserError('a spectrum needs at least two points with one irradiance each');
  const wavelengthNm = input.wavelengthNm;
  const irradiance = input.irradiance;
  // φ_λ is computed where it is used (photonFluxAt), not stored: see the lazy table below.
  const cumulativePhotons = new Float64Array(n);
  let fPrev = photonFluxAt(irradiance, wavelengthNm, 0);
  for (let i = 1; i < n; i++) {
    const f = photonFluxAt(irradiance, wavelengthNm, i);
    cumulativePhotons[i] = cumulativePhotons[i - 1] + 0.5 * (f + fPrev) * (wavelengthNm[i] - wavelengthNm[i - 1]);
    fPrev = f;
  }
  const pinWm2 = input.pinWm2 ?? trapezoid(wavelengthNm, irradiance);
  if (!Number.isFinite(pinWm2) || !Number.isFinite(cumulativePhotons[n - 1])) {
    throw new UserError(`${input.name}: the spectrum's values are too large to integrate (its irradiance or photon flux overflows); check the units`);
  }
  if (!(pinWm2 > 0)) throw new UserError(`${input.name}: the spectrum carries no power (P_in = ${pinWm2} W/m²)`);
  const spectrum = { name: input.name, source: input.source, wavelengthNm, irradiance, cumulativePhotons, pinWm2, scale: 1 } as Omit<Spectrum, 'photonFlux' | 'sha256'>;
  // An hourly year holds thousands of spectra: the photon-flux table (as large as the
  // irradiance) and a hash given as a function are made on first read, then kept.
  lazyProperty(spectrum, 'photonFlux', () => {
    const photonFlux = new Float64Array(n);
    for (let i = 0; i < n; i++) photonFlux[i] = photonFluxAt(irradiance, wavelengthNm, i);
    return photonFlux;
  });
  const sha = input.sha256;
  if (typeof sha === 'string') (spectrum as { sha256?: string }).sha256 = sha;
  else lazyProperty(spectrum, 'sha256', sha);
  return spectrum as Spectrum;
}

/** An enumerable property computed on first read and then stored as a plain value (spreads and JSON see it). */
function lazyProperty<T>(obj: object, key: string, make: () => T): void {
  Object.defineProperty(obj, key, {
    enumerable: true,
    configurable: true,
    get() {
      const value = make();
      Object.defineProperty(obj, key, { value, enumerable: true, writable: false, configurable: false });
      return value;
    },
  });
}

/** The same spectrum multiplied by a factor (concentration, rescale) [-]. */
export function scaleSpectrum(s: Spectrum, factor: number): Spectrum {
  if (!(factor > 0) || !Number.isFinite(factor)) throw new UserError(`spectrum scale factor must be a positive number, got ${factor}`);
  if (factor === 1) return s;
  const mul = (a: Float64Array) => a.map((v) => v * factor);
  return {
    ...s,
    irradiance: mul(s.irradiance),
    photonFlux: mul(s.photonFlux),
    cumulativePhotons: mul(s.cumulativePhotons),
    pinWm2: s.pinWm2 * factor,
    scale: s.scale * factor,
  };
}

/** Index i of the grid interval holding λ, λ[i] ≤ λ ≤ λ[i+1], for λ inside the grid. */
function bracket(grid: Float64Array, x: number): number {
  return lastIndexNotPast(grid, x, 0, grid.length - 2);
}

/**
 * Photon flux with wavelength ≤ λ [m⁻² s⁻¹]: exact integral of the linear
 * interpolant of φ_λ from the start of the table to λ [nm].
 */
export function photonsBelowWavelength(s: Spectrum, wavelengthNm: number): number {
  const w = s.wavelengthNm;
  const n = w.length;
  if (!(wavelengthNm > w[0])) return 0;
  if (wavelengthNm >= w[n - 1]) return s.cumulativePhotons[n - 1];
  return photonsBelowInInterval(w, s.irradiance, s.cumulativePhotons, bracket(w, wavelengthNm), wavelengthNm);
}

/**
 * The tables of many spectra as parallel arrays, for loops over thousands of
 * spectra: one array look-up per table instead of property look-ups on each
 * spectrum (which differ in shape where lazy fields were or were not read).
 */
export interface SpectraColumns {
  spectra: Spectrum[];
  wavelengthNm: Float64Array[];
  irradiance: Float64Array[];
  cumulativePhotons: Float64Array[];
}

/** The columns of these spectra (the arrays themselves, not copies). */
export function spectraColumns(spectra: readonly { spectrum: Spectrum }[]): SpectraColumns {
  const list = spectra.map((s) => s.spectrum);
  return { spectra: list, wavelengthNm: list.map((s) => s.wavelengthNm), irradiance: list.map((s) => s.irradiance), cumulativePhotons: list.map((s) => s.cumulativePhotons) };
}

/**
 * q·N(E) [A/m²] of many spectra at one energy [eV] into out[offset + k]:
 * photonsAboveEv for each, with the grid interval found once for spectra
 * sharing a wavelength array (an hourly year's members share one), so the
 * same values.
 */
export function stepJscManyAm2(cols: SpectraColumns, energyEv: number, out: Float64Array, offset = 0): void {
  const lambda = HC_EV_NM / energyEv;
  let grid: Float64Array | undefined;
  let i = -1;
  const n = cols.spectra.length;
  for (let k = 0; k < n; k++) {
    const w = cols.wavelengthNm[k];
    const last = w.length - 1;
    if (!(energyEv > 0) || !(lambda > w[0]) || lambda >= w[last]) {
      out[offset + k] = ELEMENTARY_CHARGE_C * photonsAboveEv(cols.spectra[k], energyEv);
      continue;
    }
    if (w !== grid) {
      grid = w;
      i = bracket(w, lambda);
    }
    out[offset + k] = ELEMENTARY_CHARGE_C * photonsBelowInInterval(w, cols.irradiance[k], cols.cumulativePhotons[k], i, lambda);
  }
}

/** Photon flux above a photon energy N(E) [m⁻² s⁻¹] for an energy [eV]. */
export function photonsAboveEv(s: Spectrum, energyEv: number): number {
  if (!(energyEv > 0)) return s.cumulativePhotons[s.cumulativePhotons.length - 1];
  return photonsBelowWavelength(s, HC_EV_NM / energyEv);
}

/** Photocurrent density of an ideal step absorber, q·N(E_g) [A/m²], for a gap [eV]. */
export function stepJscAm2(s: Spectrum, gapEv: number): number {
  return ELEMENTARY_CHARGE_C * photonsAboveEv(s, gapEv);
}

/** Total photon flux of the table [m⁻² s⁻¹]. */
export function totalPhotonFlux(s: Spectrum): number {
  return s.cumulativePhotons[s.cumulativePhotons.length - 1];
}

/** Irradiance between two wavelengths [W/m²] (trapezoid on the linear interpolant). */
export function irradianceBetweenNm(s: Spectrum, loNm: number, hiNm: number): number {
  const w = s.wavelengthNm;
  const e = s.irradiance;
  const interp = (x: number) => {
    const i = bracket(w, x);
    return e[i] + ((e[i + 1] - e[i]) * (x - w[i])) / (w[i + 1] - w[i]);
  };
  const a = Math.max(loNm, w[0]);
  const b = Math.min(hiNm, w[w.length - 1]);
  if (!(b > a)) return 0;
  let sum = 0;
  let x0 = a;
  let y0 = interp(a);
  let i = bracket(w, a) + 1;
  while (i < w.length && w[i] < b) {
    sum += 0.5 * (y0 + e[i]) * (w[i] - x0);
    x0 = w[i];
    y0 = e[i];
    i++;
  }
  sum += 0.5 * (y0 + interp(b)) * (b - x0);
  return sum;
}

/**
 * Average photon energy [eV] over a wavelength window [nm]: P / (q·Φ) in that
 * window (C. N. Jardine et al., 2002; citation recalled from memory, verify).
 */
export function averagePhotonEnergyEv(s: Spectrum, loNm: number, hiNm: number): number {
  const photons = photonsBelowWavelength(s, hiNm) - photonsBelowWavelength(s, loNm);
  if (!(photons > 0)) return NaN;
  return irradianceBetweenNm(s, loNm, hiNm) / (ELEMENTARY_CHARGE_C * photons);
}

/** Default window for the average photon energy [nm]: a common spectroradiometer range (common practice). */
export const DEFAULT_APE_WINDOW_NM: readonly [number, number] = [350, 1050];

/** SHA-256 of bytes, hex. */
export function sha256Hex(data: Uint8Array | string): string {
  return createHash('sha256').update(data).digest('hex');
}

/** SHA-256 of a generated table: the little-endian float64 bytes of λ then E_λ. */
export function sha256OfTable(wavelengthNm: Float64Array, irradiance: Float64Array): string {
  const h = createHash('sha256');
  h.update(new Uint8Array(wavelengthNm.buffer, wavelengthNm.byteOffset, wavelengthNm.byteLength));
  h.update(new Uint8Array(irradiance.buffer, irradiance.byteOffset, irradiance.byteLength));
  return h.digest('hex');
}
