/**
 * The candidate gap values a search enumerates: a uniform grid over the span,
 * plus the spectrum's own absorption-band edges (docs/PHYSICS.md §6: under real
 * spectra the winning basin can be a few meV wide at an O₂ or H₂O band edge,
 * which no coarse grid is sure to land in), plus any fixed gaps.
 */
import { HC_EV_NM } from '../physics/constants.js';
import { photonFluxAt, type Spectrum } from '../light/spectrum.js';

/**
 * Band-edge energies [eV] of a spectrum: native grid points where the photon
 * flux falls most steeply towards longer wavelength (entering an absorption
 * band from its blue side), strongest first, at least `separationNm` apart.
 */
export function bandEdgeEnergiesEv(s: Pick<Spectrum, 'wavelengthNm' | 'irradiance'>, loEv: number, hiEv: number, count = 40, separationNm = 4): number[] {
  const w = s.wavelengthNm;
  // φ_λ as the spectrum defines it, without making its photon-flux table.
  const e = s.irradiance;
  const flux = (i: number) => photonFluxAt(e, w, i);
  let fmax = 0;
  for (let i = 0; i < w.length; i++) {
    const f = flux(i);
    if (f > fmax) fmax = f;
  }
  const lambdas: number[] = [];
  const scores: number[] = [];
  let fPrev = w.length > 0 ? flux(0) : 0;
  let fHere = w.length > 1 ? flux(1) : 0;
  for (let i = 1; i + 1 < w.length; i++) {
    const fNext = flux(i + 1);
    const x = w[i];
    const en = HC_EV_NM / x;
    const drop = (fHere - fNext) / fmax;
    // A local maximum of flux followed by a drop marks the band's blue edge.
    if (en >= loEv && en <= hiEv && drop > 0.01 && fHere >= fPrev) {
      lambdas.push(x);
      scores.push(drop);
    }
    fPrev = fHere;
    fHere = fNext;
  }
  // Strongest first; equal scores keep grid order (a stable sort, as before).
  const order = Array.from(lambdas.keys()).sort((a, b) => scores[b] - scores[a]);
  const chosen: number[] = [];
  for (const k of order) {
    if (chosen.length >= count) break;
    const l = lambdas[k];
    if (chosen.every((c) => Math.abs(c - l) >= separationNm)) chosen.push(l);
  }
  return chosen.map((l) => HC_EV_NM / l).sort((a, b) => a - b);
}

/**
 * Band edges [eV] for a search over several weighted spectra. Spectra on one
 * wavelength grid (the same array: an hourly year, a wide table) are summed
 * with their weights first, and the edges are those of the sum, the light the
 * yield objective actually weighs; each distinct grid adds its own sum's
 * edges. One spectrum gives exactly bandEdgeEnergiesEv of it.
 */
export function weightedBandEdgeEnergiesEv(spectra: readonly { spectrum: Spectrum; weight: number }[], loEv: number, hiEv: number): number[] {
  if (spectra.length === 1) return bandEdgeEnergiesEv(spectra[0].spectrum, loEv, hiEv);
  const sums = new Map<Float64Array, Float64Array>();
  for (const { spectrum, weight } of spectra) {
    const grid = spectrum.wavelengthNm;
    let sum = sums.get(grid);
    if (!sum) {
      sum = new Float64Array(grid.length);
      sums.set(grid, sum);
    }
    const e = spectrum.irradiance;
    for (let i = 0; i < sum.length; i++) sum[i] += weight * e[i];
  }
  const edges = new Set<number>();
  for (const [wavelengthNm, irradiance] of sums) for (const e of bandEdgeEnergiesEv({ wavelengthNm, irradiance }, loEv, hiEv)) edges.add(e);
  return [...edges];
}

/** Ascending axis [eV]: uniform grid from lo to hi by step, merged with extra values (deduplicated to 0.05 meV). */
export function gapAxis(loEv: number, hiEv: number, stepEv: number, extra: number[] = []): Float64Array {
  const values: number[] = [];
  const count = Math.floor((hiEv - loEv) / stepEv + 1e-9);
  for (let k = 0; k <= count; k++) values.push(Number((loEv + k * stepEv).toFixed(9)));
  for (const e of extra) if (e >= loEv - 1e-12 && e <= hiEv + 1e-12) values.push(e);
  values.sort((a, b) => a - b);
  const out: number[] = [];
  for (const v of values) if (out.length === 0 || v - out[out.length - 1] > 5e-5) out.push(v);
  return Float64Array.from(out);
}
