/**
 * Does a spectrum reach the absorption edge of the lowest gap? A table that
 * stops short (a spectroradiometer ending at 1050 nm) misses photons the
 * lowest subcell would absorb and the infrared part of P_in, so η = P_max/P_in
 * comes out wrong — usually too high (docs/PHYSICS.md §11; refusing or warning
 * is common practice). The table can be extended with a stated reference
 * shape: here the AM1.5G shape beyond the table's last point, scaled so that
 * it joins that point.
 */
import { HC_EV_NM } from '../physics/constants.js';
import { makeSpectrum, scaleSpectrum, sha256OfTable, type Spectrum } from './spectrum.js';

export interface CoverageShortfall {
  /** Absorption edge of the lowest gap, hc/E_g [nm]. */
  edgeNm: number;
  /** Last wavelength of the table [nm]. */
  tableEndNm: number;
  /** The lowest gap [eV]. */
  gapEv: number;
}

/**
 * The shortfall when the spectrum's table ends below the absorption edge
 * hc/E_g [nm] of the lowest gap [eV]; null when it reaches it.
 */
export function coverageShortfall(s: Spectrum, lowestGapEv: number): CoverageShortfall | null {
  const edgeNm = HC_EV_NM / lowestGapEv;
  const tableEndNm = s.wavelengthNm[s.wavelengthNm.length - 1];
  return tableEndNm < edgeNm ? { edgeNm, tableEndNm, gapEv: lowestGapEv } : null;
}

/** One line for people: what is missing and what to do about it. */
export function shortfallText(label: string, f: CoverageShortfall, fix: string): string {
  return (
    `${label} stops at ${f.tableEndNm.toFixed(0)} nm, short of the ${f.gapEv.toFixed(3)} eV gap's absorption edge at ${f.edgeNm.toFixed(0)} nm: ` +
    `the photons and the infrared power it does not list are missing, so the efficiency is not meaningful (usually too high); ${fix}`
  );
}

/**
 * Extend a spectrum beyond its last point with the shape of `reference`
 * (irradiance [W m⁻² nm⁻¹] on its own grid), scaled so the two join at the
 * table's last wavelength; the reference's points past that wavelength are
 * appended. Returns the table unchanged when the reference ends no further.
 */
export function extendWithReferenceShape(s: Spectrum, reference: Spectrum, referenceName: string): Spectrum {
  const n = s.wavelengthNm.length;
  const endNm = s.wavelengthNm[n - 1];
  const refEnd = reference.wavelengthNm[reference.wavelengthNm.length - 1];
  if (refEnd <= endNm) return s;
  const refAtEnd = interpolate(reference.wavelengthNm, reference.irradiance, endNm);
  // A reference that is dark where the table ends cannot be scaled to join it: join with zero scale.
  const scale = refAtEnd > 0 ? s.irradiance[n - 1] / refAtEnd : 0;
  const wl: number[] = Array.from(s.wavelengthNm);
  const irr: number[] = Array.from(s.irradiance).map((v) => v / s.scale);
  for (let i = 0; i < reference.wavelengthNm.length; i++) {
    const w = reference.wavelengthNm[i];
    if (w <= endNm) continue;
    wl.push(w);
    irr.push((reference.irradiance[i] * scale) / s.scale);
  }
  const wavelengthNm = Float64Array.from(wl);
  const irradiance = Float64Array.from(irr);
  const extended = makeSpectrum({
    name: `${s.name}, extended past ${endNm.toFixed(0)} nm with the ${referenceName} shape`,
    sha256: sha256OfTable(wavelengthNm, irradiance),
    source: `${s.source}; beyond ${endNm.toFixed(0)} nm: the ${referenceName} shape scaled by ${scale.toPrecision(4)} to join the table's last point`,
    wavelengthNm,
    irradiance,
  });
  return scaleSpectrum(extended, s.scale);
}

function interpolate(x: Float64Array, y: Float64Array, at: number): number {
  if (at <= x[0]) return y[0];
  if (at >= x[x.length - 1]) return y[y.length - 1];
  let lo = 0;
  let hi = x.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x[mid] <= at) lo = mid;
    else hi = mid;
  }
  const t = (at - x[lo]) / (x[hi] - x[lo]);
  return y[lo] + t * (y[hi] - y[lo]);
}

/** What to do about a short table, in the library's words (the command line names its option). */
export const EXTEND_HINT = 'use a spectrum that reaches it, or extend the table with a stated reference shape (extendWithReferenceShape)';

/** Zero or one warning line: the spectrum against the lowest gap [eV] the result uses. */
export function coverageWarnings(s: Spectrum, lowestGapEv: number, hint = EXTEND_HINT): string[] {
  const f = coverageShortfall(s, lowestGapEv);
  return f ? [shortfallText(`the spectrum "${s.name}"`, f, hint)] : [];
}
