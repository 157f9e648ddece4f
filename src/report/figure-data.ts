/**
 * Figure data: each chart of a report as SVG with the numbers behind it (CSV
 * and JSON with their metadata block), built from the computed outcomes. The
 * page assembly (build.ts) and the standalone figure command both draw
 * through here, so a figure is the same wherever it appears.
 */
import type { Design } from '../design/index.js';
import { HC_EV_NM, toMaCm2 } from '../physics/constants.js';
import { mapToCsvBytes, type GapMap } from '../search/map.js';
import { toolVersion } from './version.js';
import type { MapOutcome, ReportData, WiringOutcome } from './compute.js';
import { mapChartSvg } from './charts/map-chart.js';
import { spectrumChartData, spectrumChartSvg } from './charts/spectrum-chart.js';
import { jvChartSvg } from './charts/jv-chart.js';
import { sensitivityChartSvg } from './charts/sensitivity-chart.js';
import { compareChartSvg } from './charts/compare-chart.js';
import type { ColourDomain } from './charts/map-layers.js';
import { apeChartSvg } from './charts/ape-chart.js';
import type { ComparedMap, EnsembleComparison, WiringComparison } from './ensemble-compare.js';
import { CAUTION, fx, pc, wiringTitle } from './view.js';

/** One chart: its SVG and the data drawn, for the figures folder. */
export interface Chart {
  /** File stem, e.g. "map-series-1-2". */
  name: string;
  svg: string;
  csv: string;
  json: Record<string, unknown>;
  /**
   * What the data files say about themselves (figureFiles puts it first in
   * the CSV and JSON). A section that leaves it out gets the report-wide
   * block (no wiring) from buildReport.
   */
  meta?: FigureMeta;
}

/** The header of every figure data file: tool, wiring, light with its SHA-256, temperature, units, caution. */
export interface FigureMeta {
  tool: string;
  wiring: string | null;
  /** The light; 'sites' is a batch of weather years, its SHA-256 that of the sorted site keys. */
  light: { kind: 'spectrum' | 'ensemble' | 'sites'; name: string; sha256: string; irradiance_w_m2?: number; spectra?: number; sites?: number };
  /** One temperature, the range over an ensemble's spectra, or the model that sets each hour's (sites). */
  temperature_k: number | { min: number; max: number; gaps_held_at: number } | { model: string; gaps_held_at: number };
  units: Record<string, string>;
  caution: string;
}

/** The metadata block of one chart's data files. */
export function figureMeta(data: ReportData, wiring: string | null, units: Record<string, string>): FigureMeta {
  const d = data.design;
  const l = d.light;
  const temps = d.spectra.map((x) => x.tempK);
  return {
    tool: `gapstack ${toolVersion()}`,
    wiring,
    light: l.kind === 'spectrum' ? { kind: 'spectrum', name: l.spectrum.name, sha256: l.spectrum.sha256, irradiance_w_m2: r6(l.spectrum.pinWm2) } : { kind: 'ensemble', name: l.name, sha256: l.sha256, spectra: d.spectra.length },
    temperature_k: l.kind === 'spectrum' ? d.tempK : { min: Math.min(...temps), max: Math.max(...temps), gaps_held_at: d.tempK },
    units: { ...units, note: 'efficiencies named *_percent are in %; any other efficiency field is a fraction (0–1)' },
    caution: CAUTION,
  };
}

export const r6 = (x: number) => Number(x.toFixed(6));
export const r8 = (x: number) => Number(x.toPrecision(8));
/** An efficiency [-] in percent, to 1e-6 pp. */
const p6 = (x: number) => Number((x * 100).toFixed(6));

function subcellLabel(design: Design, i: number): string {
  const s = design.subcells[i];
  return s.labelled ? `subcell ${i + 1} (${s.label})` : `subcell ${i + 1}`;
}

/** Longest map axis title that fits along the shorter (y) axis of a map or compare panel. */
const AXIS_TITLE_CHARS = 40;

/** A map axis title: "gap of subcell i (label) [eV]", or "gap of subcell i [eV]" when the label would run off the axis. */
export function gapAxisTitle(design: Design, i: number): string {
  const full = `gap of ${subcellLabel(design, i)} [eV]`;
  return [...full].length <= AXIS_TITLE_CHARS ? full : `gap of subcell ${i + 1} [eV]`;
}

export function mapChart(data: ReportData, o: WiringOutcome, m: MapOutcome, domain: ColourDomain, size?: { width: number; height: number }): { chart: Chart; grid: string; id: string; gridId: string } {
  const d = data.design;
  const id = `map-${o.wiring.slug}-${m.pair.xCell + 1}-${m.pair.yCell + 1}`;
  const gridId = `${id}-grid`;
  const mm = m.map;
  const svg = mapChartSvg({
    outcome: m,
    id,
    gridId,
    wiringLabel: wiringTitle(o.wiring.key),
    xLabel: gapAxisTitle(d, m.pair.xCell),
    yLabel: gapAxisTitle(d, m.pair.yCell),
    loss: d.loss,
    domain,
    size,
  });
  const nx = mm.x.length;
  const ny = mm.y.length;
  const v = Array.from(mm.values, (x) => (Number.isNaN(x) ? null : Number((x * 100).toFixed(3))));
  const grid = JSON.stringify({ x0: mm.x[0], dx: nx > 1 ? r8((mm.x[nx - 1] - mm.x[0]) / (nx - 1)) : 1, nx, y0: mm.y[0], dy: ny > 1 ? r8((mm.y[ny - 1] - mm.y[0]) / (ny - 1)) : 1, ny, v }).replace(/</g, '\\u003c');
  const json = {
    wiring: o.wiring.key,
    x_subcell: m.pair.xCell + 1,
    y_subcell: m.pair.yCell + 1,
    x_ev: Array.from(mm.x),
    y_ev: Array.from(mm.y),
    efficiency_percent: Array.from({ length: ny }, (_, iy) => Array.from({ length: nx }, (_, ix) => (Number.isNaN(mm.values[iy * nx + ix]) ? null : p6(mm.values[iy * nx + ix])))),
    layout: 'efficiency_percent[iy][ix] is the value at (x_ev[ix], y_ev[iy]); null where the upper gap is not above the lower',
    profile_subcells: m.profiled.map((c) => c + 1),
    optimum: { x_ev: r6(m.optimum.x), y_ev: r6(m.optimum.y), efficiency_percent: p6(m.optimum.value) },
    map_maximum: { x_ev: mm.best.x, y_ev: mm.best.y, efficiency_percent: p6(mm.best.value) },
    tolerance_threshold_percent: p6(m.threshold),
    colour_range_percent: { low: r6(domain.lo), high: r6(domain.hi), below_low: 'drawn in the under-range grey' },
    current_matching_ma_cm2: m.matching ? Array.from({ length: ny }, (_, iy) => Array.from({ length: nx }, (_, ix) => (Number.isNaN((m.matching as Float64Array)[iy * nx + ix]) ? null : r6(toMaCm2((m.matching as Float64Array)[iy * nx + ix]))))) : null,
    current_matching_convention: m.matching ? 'J_gen of the upper mapped subcell minus J_gen of the lower [mA/cm²]; the locus is where it is zero' : null,
    marks: m.marks.map((k) => ({ axis: k.axis, subcell: k.subcell + 1, kind: k.kind, lo_ev: r6(k.loEv), hi_ev: r6(k.hiEv), label: k.label })),
    step_ev: m.stepEv,
    caution: CAUTION,
  };
  const meta = figureMeta(data, o.wiring.key, { gaps: 'eV', efficiency_percent: '%', current_matching_ma_cm2: 'mA/cm²' });
  return { chart: { name: id, svg, csv: Buffer.from(mapToCsvBytes(mm, m.profiled)).toString('utf8'), json, meta }, grid, id, gridId };
}

export function detailCharts(data: ReportData, o: WiringOutcome): { spectrum: Chart; jv: Chart; sensitivity: Chart } {
  const d = data.design;
  const labels = d.subcells.map((s) => s.label);
  const slug = o.wiring.slug;
  const ref = d.reference;
  const gaps = o.search.result.best.gapsEv;
  // The engine's own evaluation at the optimum (reference spectrum, its cell temperature) carries each subcell's J_gen.
  const jgen = o.detail.subcells.map((c) => c.jgenAm2);
  const sd = spectrumChartData({ spectrum: ref.spectrum, gapsEv: gaps });
  const spectrum: Chart = {
    name: `spectrum-${slug}`,
    svg: spectrumChartSvg({ id: `spectrum-${slug}`, spectrum: ref.spectrum, gapsEv: gaps, labels, jgenAm2: jgen }),
    csv: `wavelength_nm,irradiance_w_m2_nm,subcell\n${sd.wavelengthNm.map((w, i) => `${w},${sd.irradiance[i]},${sd.subcell[i]}`).join('\n')}\n`,
    json: {
      wiring: o.wiring.key,
      spectrum: ref.spectrum.name,
      sha256: ref.spectrum.sha256,
      gaps_ev: gaps.map(r6),
      band_edges_nm: gaps.map((g) => r6(HC_EV_NM / g)),
      jgen_ma_cm2: jgen.map((j) => r6(toMaCm2(j))),
      subcell_convention: 'subcell 0 means not absorbed by any subcell (step absorbers)',
      wavelength_nm: sd.wavelengthNm,
      irradiance_w_m2_nm: sd.irradiance,
      subcell: sd.subcell,
      caution: CAUTION,
    },
    meta: figureMeta(data, o.wiring.key, { wavelength_nm: 'nm', irradiance_w_m2_nm: 'W m⁻² nm⁻¹', jgen_ma_cm2: 'mA/cm²' }),
  };
  const jvRows: string[] = ['curve,voltage_v,current_ma_cm2'];
  const curves = o.jv.stack ? [...o.jv.subcells, o.jv.stack] : o.jv.subcells;
  curves.forEach((c, k) => c.voltageV.forEach((v, i) => jvRows.push(`${k < o.jv.subcells.length ? `subcell ${k + 1}` : 'stack'},${r8(v)},${r8(toMaCm2(c.currentAm2[i]))}`)));
  const jv: Chart = {
    name: `jv-${slug}`,
    svg: jvChartSvg({ id: `jv-${slug}`, jv: o.jv, wiringLabel: wiringTitle(o.wiring.key) }),
    csv: `${jvRows.join('\n')}\n`,
    json: {
      wiring: o.wiring.key,
      curves: curves.map((c, k) => ({ curve: k < o.jv.subcells.length ? `subcell ${k + 1}` : 'stack', voltage_v: c.voltageV.map(r8), current_ma_cm2: c.currentAm2.map((j) => r8(toMaCm2(j))) })),
      operating_points: o.jv.operating.map((p, i) => ({ subcell: i + 1, voltage_v: r8(p.vV), current_ma_cm2: r8(toMaCm2(p.jAm2)) })),
      stack_mpp: o.jv.stackMpp ? { voltage_v: r8(o.jv.stackMpp.vV), current_ma_cm2: r8(toMaCm2(o.jv.stackMpp.jAm2)) } : null,
      spectrum: ref.spectrum.name,
      caution: CAUTION,
    },
    meta: figureMeta(data, o.wiring.key, { voltage_v: 'V', current_ma_cm2: 'mA/cm²' }),
  };
  const sensitivity = sensitivityChart(data, o);
  return { spectrum, jv, sensitivity };
}

/** The sensitivity chart of one wiring: one gap moved at a time through the optimum; `width` [px] overrides the report's. */
export function sensitivityChart(data: ReportData, o: WiringOutcome, width?: number, backdrop: 'light' | 'dark' = 'light'): Chart {
  const d = data.design;
  const labels = d.subcells.map((s) => s.label);
  const slug = o.wiring.slug;
  const res = o.search.result;
  const sensRows = ['subcell,delta_ev,gap_ev,efficiency_percent,inside_window'];
  for (const s of o.sensitivity) {
    s.deltaEv.forEach((dl, k) => {
      const g = r6(s.gapEv + dl);
      const inside = s.windowEv ? String(g >= s.windowEv[0] - 1e-9 && g <= s.windowEv[1] + 1e-9) : '';
      sensRows.push(`${s.subcell + 1},${dl},${g},${s.efficiency[k] === null ? '' : p6(s.efficiency[k] as number)},${inside}`);
    });
  }
  return {
    name: `sensitivity-${slug}`,
    svg: sensitivityChartSvg({ id: `sensitivity-${slug}`, slices: o.sensitivity, labels, best: res.best.value, threshold: res.tolerance.threshold, loss: d.loss, objective: o.search.objective.label, width, backdrop }),
    csv: `${sensRows.join('\n')}\n`,
    json: {
      wiring: o.wiring.key,
      objective: o.search.objective.label,
      best_percent: p6(res.best.value),
      threshold_percent: p6(res.tolerance.threshold),
      slices: o.sensitivity.map((s) => ({
        subcell: s.subcell + 1,
        fixed_in_design: s.fixed,
        gap_ev: r6(s.gapEv),
        window_ev: s.windowEv ? s.windowEv.map(r6) : null,
        delta_ev: s.deltaEv,
        efficiency_percent: s.efficiency.map((v) => (v === null ? null : p6(v))),
      })),
      convention: 'one gap moved, the others held at the optimum; null where the gaps would not descend; window_ev is the practical window or allowed range (null when free or fixed)',
      caution: CAUTION,
    },
    meta: figureMeta(data, o.wiring.key, { delta_ev: 'eV', gap_ev: 'eV', efficiency_percent: '%' }),
  };
}

const grid2dPercent = (m: { x: Float64Array; y: Float64Array; values: Float64Array }) =>
  Array.from({ length: m.y.length }, (_, iy) => Array.from({ length: m.x.length }, (_, ix) => (Number.isNaN(m.values[iy * m.x.length + ix]) ? null : p6(m.values[iy * m.x.length + ix]))));

function pointJson(p: WiringComparison['referenceOptimal']) {
  return { gaps_ev: p.gapsEv.map(r8), am15g_efficiency: r8(p.referenceEfficiency), yield_efficiency: r8(p.yieldEfficiency) };
}

/** The comparison of one wiring, machine-readable (summary.json and the compare charts' JSON). */
export function wiringComparisonJson(w: WiringComparison): Record<string, unknown> {
  return {
    wiring: w.outcome.wiring.key,
    am15g_optimum: pointJson(w.referenceOptimal),
    ensemble_optimum: pointJson(w.ensembleOptimal),
    gap_shift_mev: w.shiftEv.map((d) => r6(d * 1000)),
    loss_abs: r8(w.lossAbs),
    loss_rel: r8(w.lossRel),
    loss_convention: 'yield-weighted η of the ensemble optimum minus that of the AM1.5G optimum (absolute), and the same over the ensemble optimum (relative)',
    am15g_design_rating_to_yield_drop: r8(w.referenceOptimal.referenceEfficiency - w.referenceOptimal.yieldEfficiency),
    current_mismatch: w.mismatch
      ? { am15g: r8(w.mismatch.reference), ensemble_min: r8(w.mismatch.min), ensemble_max: r8(w.mismatch.max), ensemble_energy_weighted_mean: r8(w.mismatch.energyWeightedMean), convention: 'largest over smallest subcell J_gen, minus 1, at the AM1.5G-optimal gaps' }
      : null,
  };
}

export function compareChart(data: ReportData, c: EnsembleComparison, w: WiringComparison, cm: ComparedMap, range: ColourDomain): { chart: Chart; caption: string; heading: string } {
  const d = data.design;
  const m = cm.ensemble;
  const { xCell, yCell } = m.pair;
  const id = `compare-${w.outcome.wiring.slug}-${xCell + 1}-${yCell + 1}`;
  const a = w.referenceOptimal;
  const b = w.ensembleOptimal;
  const svg = compareChartSvg({
    id,
    wiringLabel: wiringTitle(w.outcome.wiring.key),
    xLabel: gapAxisTitle(d, xCell),
    yLabel: gapAxisTitle(d, yCell),
    marks: m.marks,
    loss: d.loss,
    domain: range,
    panels: [
      {
        light: 'am1.5g',
        title: 'η under AM1.5G',
        map: cm.reference,
        optimum: cm.referenceOptimum,
        other: { x: b.gapsEv[xCell], y: b.gapsEv[yCell], value: b.referenceEfficiency },
        threshold: cm.referenceThreshold,
        optimumName: 'AM1.5G optimum',
        otherName: 'ensemble optimum',
      },
      {
        light: 'ensemble',
        title: `Yield-weighted η over ${c.name}`,
        map: m.map,
        optimum: m.optimum,
        other: { x: a.gapsEv[xCell], y: a.gapsEv[yCell], value: a.yieldEfficiency },
        threshold: m.threshold,
        optimumName: 'ensemble optimum',
        otherName: 'AM1.5G optimum',
      },
    ],
  });
  const mm = m.map;
  const nx = mm.x.length;
  const profHead = m.profiled.flatMap((k) => [`gap${k + 1}_ev_profile_am15g`, `gap${k + 1}_ev_profile_ensemble`]);
  const rows = [
    '# gapstack comparison map: detailed-balance efficiency under AM1.5G and yield-weighted efficiency over the ensemble [%] on the same gaps [eV]; theoretical limits under the stated assumptions, not device predictions',
    [`gap${xCell + 1}_ev`, `gap${yCell + 1}_ev`, ...profHead, 'efficiency_am15g_percent', 'yield_efficiency_percent'].join(','),
  ];
  for (let iy = 0; iy < mm.y.length; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      const k = iy * nx + ix;
      const u = cm.reference.values[k];
      const v = mm.values[k];
      if (Number.isNaN(u) && Number.isNaN(v)) continue;
      const prof = m.profiled.flatMap((_, j) => [cm.reference.profileGaps[j][k].toFixed(5), mm.profileGaps[j][k].toFixed(5)]);
      rows.push([mm.x[ix].toFixed(5), mm.y[iy].toFixed(5), ...prof, Number.isNaN(u) ? '' : (u * 100).toFixed(6), Number.isNaN(v) ? '' : (v * 100).toFixed(6)].join(','));
    }
  }
  const json = {
    ...wiringComparisonJson(w),
    x_subcell: xCell + 1,
    y_subcell: yCell + 1,
    x_ev: Array.from(mm.x),
    y_ev: Array.from(mm.y),
    efficiency_am15g_percent: grid2dPercent(cm.reference),
    yield_efficiency_percent: grid2dPercent(mm),
    layout: 'value[iy][ix] is at (x_ev[ix], y_ev[iy]); null where the upper gap is not above the lower',
    profile_subcells: m.profiled.map((k) => k + 1),
    colour_range_percent: { low: r6(range.lo), high: r6(range.hi) },
    am15g_tolerance_threshold_percent: p6(cm.referenceThreshold),
    yield_tolerance_threshold_percent: p6(m.threshold),
    ensemble: c.name,
    reference_spectrum: c.referenceSpectrum.name,
    step_ev: m.stepEv,
    caution: CAUTION,
  };
  const shift = w.shiftEv.map((s) => `${(s * 1000).toFixed(1)}`).join(' / ');
  const caption =
    `Left: efficiency under AM1.5G; right: yield-weighted efficiency over ${c.name}; gaps of subcells ${xCell + 1} (x) and ${yCell + 1} (y) on a ${fx(m.stepEv * 1000, 0)} meV grid, ${colourScaleWords(range, c.wirings.length > 1 ? `both panels of every wiring's comparison of this pair (${c.wirings.map((x) => wiringTitle(x.outcome.wiring.key).split(' (')[0].toLowerCase()).join(', ')})` : 'both panels')}. ` +
    `Each panel's filled marker is its own optimum (AM1.5G ${pc(cm.referenceOptimum.value)} at ${fx(cm.referenceOptimum.x, 3)} / ${fx(cm.referenceOptimum.y, 3)} eV; ensemble ${pc(m.optimum.value)} at ${fx(m.optimum.x, 3)} / ${fx(m.optimum.y, 3)} eV), the open ring the other panel's, valued under this panel's light; the optimum moves by ${shift} meV. ` +
    `Dashed white outlines enclose gaps within ${fx(d.loss * 100, 1)} % (relative) of each panel's own best.${m.profiled.length > 0 ? ` Subcells ${m.profiled.map((k) => k + 1).join(', ')} are re-optimised at every point under each light.` : ''}`;
  const meta = figureMeta(data, w.outcome.wiring.key, { gaps: 'eV', efficiency_am15g_percent: '%', yield_efficiency_percent: '%' });
  return { chart: { name: id, svg, csv: `${rows.join('\n')}\n`, json, meta }, caption, heading: `Subcells ${xCell + 1} and ${yCell + 1}` };
}

export function apeChart(data: ReportData, c: EnsembleComparison): Chart {
  const s = c.summary;
  const h = s.ape.histogram;
  const svg = apeChartSvg({
    id: 'ape-histogram',
    edgesEv: h.edgesEv,
    weights: h.weights,
    totalWeight: s.totalWeight,
    windowNm: s.ape.windowNm,
    weightedMeanEv: s.ape.weightedMeanEv,
    referenceApeEv: c.referenceApeEv,
    referenceName: 'AM1.5G',
    ensembleName: c.name,
  });
  const rows = ['ape_low_ev,ape_high_ev,weight,share_of_total_weight'];
  h.weights.forEach((w, k) => rows.push(`${h.edgesEv[k]},${h.edgesEv[k + 1]},${r8(w)},${r8(w / s.totalWeight)}`));
  return {
    name: 'ape-histogram',
    svg,
    csv: `${rows.join('\n')}\n`,
    json: {
      ensemble: c.name,
      window_nm: s.ape.windowNm,
      edges_ev: h.edgesEv,
      weights: h.weights.map(r8),
      weight_unit: s.weightUnit,
      total_weight: r8(s.totalWeight),
      weighted_mean_ape_ev: s.ape.weightedMeanEv === null ? null : r8(s.ape.weightedMeanEv),
      am15g_ape_ev: r8(c.referenceApeEv),
      per_member: s.ape.perMember.map((p) => ({ label: p.label, ape_ev: p.apeEv === null || !Number.isFinite(p.apeEv) ? null : r8(p.apeEv) })),
      irradiance_w_m2: { min: r8(s.irradianceWm2.min), weighted_median: r8(s.irradianceWm2.median), weighted_mean: r8(s.weightedMeanIrradianceWm2), max: r8(s.irradianceWm2.max) },
      cell_temperature_k: { min: s.tempK.min, max: s.tempK.max },
      convention: 'each bin holds the summed weight of the members whose APE over window_nm falls in [low, high); the last bin is closed',
      caution: CAUTION,
    },
    meta: figureMeta(data, null, { ape_ev: 'eV', weight: s.weightUnit, irradiance_w_m2: 'W/m²', cell_temperature_k: 'K' }),
  };
}

/** The caption's words for a colour scale: its range, who shares it, and the under-range colour. */
export function colourScaleWords(d: ColourDomain, sharedBy: string): string {
  return `one colour scale, ${fx(d.lo, 1)}–${fx(d.hi, 1)} %, for ${sharedBy}; mid grey marks efficiencies below ${fx(d.lo, 1)} %`;
}
