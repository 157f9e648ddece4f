/**
 * What a spectral ensemble holds (docs/PHYSICS.md §8): irradiance statistics,
 * average photon energy per member with a weighted histogram, temperatures,
 * each member's wavelength range and warnings where a range stops short. The
 * loaders are in ensemble.ts; this module only reads a loaded ensemble.
 */
import { UserError } from '../errors.js';
import { HC_EV_NM } from '../physics/constants.js';
import { DEFAULT_APE_WINDOW_NM, averagePhotonEnergyEv } from './spectrum.js';
import type { WeightUnit } from './ensemble-weights.js';
import type { LabelledSpectrum } from './weighted-spectrum.js';

/** What the summary reads of an ensemble (a loaded Ensemble is one). */
export interface SummarisedEnsemble {
  members: readonly LabelledSpectrum[];
  weightUnit: WeightUnit;
}

/** APE window used by the summary unless told otherwise [nm]; the same as the spectrum command's (common practice: a usual spectroradiometer range). */
export const ENSEMBLE_APE_WINDOW_NM: readonly [number, number] = DEFAULT_APE_WINDOW_NM;
/** Lowest gap the summary checks member ranges against unless told otherwise [eV] (2480 nm). */
export const ENSEMBLE_LOWEST_GAP_EV = 0.5;
/** A member starting above this wavelength [nm] is warned about: its ultraviolet counts as zero. */
export const ENSEMBLE_UV_START_NM = 300;

/** How photons outside a member's table are treated; carried into every summary. */
export const OUT_OF_RANGE_POLICY =
  "photons outside a member's table count as zero: N(E) is constant beyond the table's long-wavelength end and zero above its short end; P_in is the integral over the member's own table";


export interface MemberRange {
  label: string;
  fromNm: number;
  toNm: number;
  points: number;
}

export interface EnsembleSummary {
  count: number;
  totalWeight: number;
  weightUnit: WeightUnit;
  /** Σ w·P_in / Σ w [W/m²]. */
  weightedMeanIrradianceWm2: number;
  /** Member P_in [W/m²]: smallest, weighted median (each member counted by its weight), largest. */
  irradianceWm2: { min: number; median: number; max: number };
  ape: {
    windowNm: [number, number];
    /** APE per member [eV]; null where the member's table does not cover the window. */
    perMember: { label: string; apeEv: number | null }[];
    /** Weighted mean over members with an APE [eV]. */
    weightedMeanEv: number | null;
    /** Histogram of APE: bin edges [eV] (one more than bins) and the summed weight in each bin. */
    histogram: { edgesEv: number[]; weights: number[] };
  };
  tempK: { min: number; max: number };
  ranges: MemberRange[];
  /** Longest wavelength every member should reach [nm], from the lowest gap checked. */
  requiredToNm: number;
  lowestGapEv: number;
  outOfRangePolicy: string;
  warnings: string[];
}

export interface SummaryOptions {
  /** Lowest gap a design or search may use [eV]; members must reach hc/E_g (default 0.5 eV, 2480 nm). */
  lowestGapEv?: number;
}

const BIN_WIDTHS_EV = [0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1];
const MAX_HISTOGRAM_BINS = 24;

function histogram(values: { x: number; w: number }[]): { edgesEv: number[]; weights: number[] } {
  if (values.length === 0) return { edgesEv: [], weights: [] };
  const lo = Math.min(...values.map((v) => v.x));
  const hi = Math.max(...values.map((v) => v.x));
  let width = BIN_WIDTHS_EV[BIN_WIDTHS_EV.length - 1];
  for (const w of BIN_WIDTHS_EV) {
    if (Math.floor(hi / w) - Math.floor(lo / w) + 1 <= MAX_HISTOGRAM_BINS) {
      width = w;
      break;
    }
  }
  const k0 = Math.floor(lo / width);
  const bins = Math.floor(hi / width) - k0 + 1;
  const edgesEv = Array.from({ length: bins + 1 }, (_, i) => Number(((k0 + i) * width).toFixed(6)));
  const weights = new Array<number>(bins).fill(0);
  for (const v of values) weights[Math.min(bins - 1, Math.max(0, Math.floor(v.x / width) - k0))] += v.w;
  return { edgesEv, weights };
}

function weightedMedian(values: { x: number; w: number }[]): number {
  const s = [...values].sort((a, b) => a.x - b.x);
  const half = s.reduce((a, v) => a + v.w, 0) / 2;
  let acc = 0;
  for (let i = 0; i < s.length; i++) {
    acc += s[i].w;
    if (acc > half * (1 + 1e-12)) return s[i].x;
    if (Math.abs(acc - half) <= half * 1e-12) return i + 1 < s.length ? 0.5 * (s[i].x + s[i + 1].x) : s[i].x;
  }
  return s[s.length - 1].x;
}

/**
 * What an ensemble holds: irradiance statistics, average photon energy (APE,
 * Jardine et al., Prog. Photovolt. 2002) per member over a window (default
 * 350–1050 nm) with a weighted histogram, the temperature range, each
 * member's wavelength range and warnings where a range stops short.
 */
export function ensembleSummary(e: SummarisedEnsemble, apeWindowNm: [number, number] = [...ENSEMBLE_APE_WINDOW_NM] as [number, number], opts: SummaryOptions = {}): EnsembleSummary {
  const [wlo, whi] = apeWindowNm;
  if (!(wlo > 0 && whi > wlo)) throw new UserError(`APE window must be low:high in nm with 0 < low < high, got ${wlo}:${whi}`);
  const lowestGapEv = opts.lowestGapEv ?? ENSEMBLE_LOWEST_GAP_EV;
  if (!(lowestGapEv > 0)) throw new UserError(`lowest gap must be a positive number of eV, got ${lowestGapEv}`);
  const requiredToNm = HC_EV_NM / lowestGapEv;
  const m = e.members;
  const totalWeight = m.reduce((a, x) => a + x.weight, 0);
  const pins = m.map((x) => ({ x: x.spectrum.pinWm2, w: x.weight }));
  const warnings: string[] = [];
  const ranges: MemberRange[] = m.map((x) => {
    const w = x.spectrum.wavelengthNm;
    return { label: x.label, fromNm: w[0], toNm: w[w.length - 1], points: w.length };
  });
  const short = ranges.filter((r) => r.toNm < requiredToNm * (1 - 1e-9));
  if (short.length > 0) {
    const worst = short.reduce((a, r) => (r.toNm < a.toNm ? r : a));
    warnings.push(
      `${short.length} of ${m.length} spectra end before ${requiredToNm.toFixed(0)} nm (the wavelength of a ${lowestGapEv} eV gap), shortest "${worst.label}" at ${worst.toNm.toFixed(0)} nm: ` +
        `photons beyond a table count as zero, so subcells with gaps below ${(HC_EV_NM / worst.toNm).toFixed(3)} eV are under-counted there`,
    );
  }
  const lateUv = ranges.filter((r) => r.fromNm > ENSEMBLE_UV_START_NM);
  if (lateUv.length > 0) {
    const worst = lateUv.reduce((a, r) => (r.fromNm > a.fromNm ? r : a));
    warnings.push(
      `${lateUv.length} of ${m.length} spectra start above ${ENSEMBLE_UV_START_NM} nm, latest "${worst.label}" at ${worst.fromNm.toFixed(0)} nm: photons above ${(HC_EV_NM / worst.fromNm).toFixed(2)} eV count as zero there`,
    );
  }
  const perMember = m.map((x, i) => {
    const r = ranges[i];
    const covers = r.fromNm <= wlo && r.toNm >= whi;
    return { label: x.label, apeEv: covers ? averagePhotonEnergyEv(x.spectrum, wlo, whi) : null };
  });
  const missingApe = perMember.filter((p) => p.apeEv === null || !Number.isFinite(p.apeEv)).length;
  if (missingApe > 0) warnings.push(`${missingApe} of ${m.length} spectra do not cover the APE window ${wlo}–${whi} nm (or hold no photons there); their APE is not given`);
  const apeValues = perMember.flatMap((p, i) => (p.apeEv !== null && Number.isFinite(p.apeEv) ? [{ x: p.apeEv, w: m[i].weight }] : []));
  const apeWeight = apeValues.reduce((a, v) => a + v.w, 0);
  const temps = m.map((x) => x.tempK);
  return {
    count: m.length,
    totalWeight,
    weightUnit: e.weightUnit,
    weightedMeanIrradianceWm2: pins.reduce((a, p) => a + p.x * p.w, 0) / totalWeight,
    irradianceWm2: { min: Math.min(...pins.map((p) => p.x)), median: weightedMedian(pins), max: Math.max(...pins.map((p) => p.x)) },
    ape: {
      windowNm: [wlo, whi],
      perMember,
      weightedMeanEv: apeWeight > 0 ? apeValues.reduce((a, v) => a + v.x * v.w, 0) / apeWeight : null,
      histogram: histogram(apeValues),
    },
    tempK: { min: Math.min(...temps), max: Math.max(...temps) },
    ranges,
    requiredToNm,
    lowestGapEv,
    outOfRangePolicy: OUT_OF_RANGE_POLICY,
    warnings,
  };
}
