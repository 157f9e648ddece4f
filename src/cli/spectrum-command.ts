/** `gapstack spectrum`: what a light source holds, in numbers a designer uses. */
import { DEFAULT_APE_WINDOW_NM, averagePhotonEnergyEv, stepJscAm2, totalPhotonFlux } from '../light/spectrum.js';
import { CAUTION } from '../report/assumptions.js';
import { fix, round, table } from './format.js';
import { parseNumberList, parseRange, spectrumFromArgs, type LightArgs } from './options.js';
import { UserError } from '../errors.js';
import { finiteJson } from './guards.js';
import { toMaCm2 } from '../physics/constants.js';

export interface SpectrumArgs extends LightArgs {
  gaps?: unknown;
  apeWindow?: unknown;
  json?: boolean;
}

/** Default gaps for the photon-current table [eV]. */
export const DEFAULT_REPORT_GAPS = [0.7, 0.94, 1.12, 1.34, 1.42, 1.6, 1.7, 1.8, 2.0, 2.3];

export function spectrumCommand(a: SpectrumArgs): string {
  const s = spectrumFromArgs(a);
  const gaps = a.gaps === undefined ? DEFAULT_REPORT_GAPS : parseNumberList('gaps', a.gaps);
  for (const g of gaps) if (!(g > 0)) throw new UserError(`--gaps: every gap must be a positive number of eV, got ${g}`);
  const window: readonly [number, number] = a.apeWindow === undefined ? DEFAULT_APE_WINDOW_NM : parseRange('ape-window', a.apeWindow);
  const ape = averagePhotonEnergyEv(s, window[0], window[1]);
  const range: [number, number] = [s.wavelengthNm[0], s.wavelengthNm[s.wavelengthNm.length - 1]];
  const above = gaps.map((g) => ({ gap_ev: g, jsc_ma_cm2: round(toMaCm2(stepJscAm2(s, g))) }));
  if (a.json) {
    return finiteJson(
      {
        name: s.name,
        sha256: s.sha256,
        source: s.source,
        scale: round(s.scale),
        points: s.wavelengthNm.length,
        pin_w_m2: round(s.pinWm2),
        photon_flux_m2_s: round(totalPhotonFlux(s)),
        ape_ev: round(ape),
        ape_window_nm: window,
        range_nm: range,
        photon_current_above_gap: above,
      },
      null,
      2,
    );
  }
  return [
    `${s.name}`,
    `  source: ${s.source}`,
    `  SHA-256: ${s.sha256}`,
    `  range: ${fix(range[0], 1)}–${fix(range[1], 1)} nm, ${s.wavelengthNm.length} points`,
    `  P_in: ${s.pinWm2.toFixed(3)} W/m²`,
    `  photon flux: ${totalPhotonFlux(s).toExponential(5)} m⁻² s⁻¹`,
    `  average photon energy (${window[0]}–${window[1]} nm): ${fix(ape, 4)} eV`,
    '',
    'Photon current of an ideal step absorber, q·N(E > gap):',
    table(['gap [eV]', 'J [mA/cm²]'], above.map((r) => [fix(r.gap_ev, 3), fix(r.jsc_ma_cm2, 3)])),
    '',
    CAUTION,
  ].join('\n');
}
