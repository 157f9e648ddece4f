/**
 * The candidate gap values a search enumerates: a uniform grid over the span,
 * plus the spectrum's own absorption-band edges (docs/PHYSICS.md §6: under real
 * spectra the winning basin can be a few meV wide at an O₂ or H₂O band edge,
 * which no coarse grid is sure to land in), plus any fixed gaps.
 */
import { HC_EV_NM } from '../physics/constants.js';
import type { Spectrum } from '../light/spectrum.js';

/**
 * Band-edge energies [eV] of a spectrum: native grid points where the photon
 * flux falls most steeply towards longer wavelength (entering an absorption
 * band from its blue side), strongest first, at least `separationNm` apart.
 */
export function bandEdgeEnergiesEv(s: Spectrum, loEv: number, hiEv: number, count = 40, separationNm = 4): number[] {
  const w = s.wavelengthNm;
  const f = s.photonFlux;
  let fmax = 0;
  for (let i = 0; i < f.length; i++) if (f[i] > fmax) fmax = f[i];
  const scored: { lambda: number; score: number }[] = [];
  for (let i = 1; i + 1 < w.length; i++) {
    const e = HC_EV_NM / w[i];
    if (e < loEv || e > hiEv) continue;
    const drop = (f[i] - f[i + 1]) / fmax;
    // A local maximum of flux followed by a drop marks the band's blue edge.
    if (drop > 0.01 && f[i] >= f[i - 1]) scored.push({ lambda: w[i], score: drop });
  }
  scored.sort((a, b) => b.score - a.score);
  const chosen: number[] = [];
  for (const c of scored) {
    if (chosen.length >= count) break;
    if (chosen.every((l) => Math.abs(l - c.lambda) >= separationNm)) chosen.push(c.lambda);
  }
  return chosen.map((l) => HC_EV_NM / l).sort((a, b) => a - b);
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
