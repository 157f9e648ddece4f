/**
 * `gapstack yield`: one stack re-solved under every spectrum of an ensemble,
 * the yield-weighted efficiency (Σ Δt·P_max / Σ Δt·P_in for hours, Σ s·η / Σ s
 * for energy shares, docs/PHYSICS.md §10), and what the ensemble
 * holds (docs/PHYSICS.md §8).
 */
import { UserError } from '../errors.js';
import { am15g } from '../light/sources.js';
import { ensembleSummary, loadEnsemble, type Ensemble, type EnsembleSummary } from '../light/ensemble.js';
import { yieldForStack, type YieldResult } from '../stack/yield.js';
import { parseUnitDeclaration } from '../light/table-file.js';
import { evaluateStack } from '../stack/evaluate.js';
import { isSeriesString, type StackSpec } from '../stack/model.js';
import { CAUTION, describeAbsorptance, describeCoupling, EMISSION_CONVENTION } from '../report/assumptions.js';
import { fix, pct, round, table } from './format.js';
import { gapsFromArgs, parseRange, stackFromArgs, type StackArgs } from './options.js';
import { finiteJson } from './guards.js';
import { toMaCm2 } from '../physics/constants.js';

export interface YieldArgs extends StackArgs {
  gaps?: unknown;
  /** Folder of spectra, manifest (.csv/.yaml) or wide table. */
  ensemble?: unknown;
  /** Units of member files (overriding their headers) or of a wide table, "<abscissa>,<ordinate>". */
  units?: string;
  /** APE window [nm], "low:high" (default 350:1050). */
  apeWindow?: unknown;
  json?: boolean;
}

/** Rows of the per-spectrum table printed before eliding (JSON always holds all). */
export const TEXT_ROWS_SHOWN = 40;

const ma = (jAm2: number) => round(toMaCm2(jAm2));

/** Assumption lines of a yield run. */
export function yieldAssumptions(spec: StackSpec, e: Ensemble, s: EnsembleSummary): string[] {
  const eres = spec.subcells.map((c) => c.ere);
  return [
    `ensemble: ${e.name}, ${e.source}, SHA-256 ${e.sha256.slice(0, 16)}…`,
    `spectra are taken as the irradiance reaching the cell's front surface; each is solved on its own table`,
    `outside a table: ${s.outOfRangePolicy}`,
    `cell temperature per spectrum: ${s.tempK.min === s.tempK.max ? `${s.tempK.min} K` : `${s.tempK.min}–${s.tempK.max} K`} (members without one: --temp, default 300 K); gaps and ERE held fixed across temperatures`,
    `emission: ${EMISSION_CONVENTION}`,
    `ERE: ${eres.every((x) => x === 1) ? '1 (fully radiative)' : eres.join(', ')}`,
    `optics: ${spec.subcells.map((c, i) => `${i + 1}: ${describeAbsorptance(c.absorptance)}`).join('; ')}; front reflectance ${typeof spec.frontReflectance === 'number' ? spec.frontReflectance : 'tabulated'}`,
    `coupling: ${describeCoupling(spec.coupling)}; wiring ${spec.wiring.label}${isSeriesString(spec.wiring) && spec.subcells.length > 1 ? ' (current re-matched under every spectrum)' : ''}`,
  ];
}

function summaryJson(s: EnsembleSummary): Record<string, unknown> {
  return {
    count: s.count,
    total_weight: round(s.totalWeight),
    weight_unit: s.weightUnit,
    weighted_mean_irradiance_w_m2: round(s.weightedMeanIrradianceWm2),
    irradiance_w_m2: { min: round(s.irradianceWm2.min), median: round(s.irradianceWm2.median), max: round(s.irradianceWm2.max) },
    ape: {
      window_nm: s.ape.windowNm,
      weighted_mean_ev: s.ape.weightedMeanEv === null ? null : round(s.ape.weightedMeanEv),
      per_member: s.ape.perMember.map((p) => ({ label: p.label, ape_ev: p.apeEv === null ? null : round(p.apeEv) })),
      histogram: { edges_ev: s.ape.histogram.edgesEv, weights: s.ape.histogram.weights.map((w) => round(w)) },
    },
    temp_k: s.tempK,
    ranges_nm: s.ranges.map((r) => ({ label: r.label, from_nm: round(r.fromNm), to_nm: round(r.toNm), points: r.points })),
    required_to_nm: round(s.requiredToNm),
    lowest_gap_ev: s.lowestGapEv,
    out_of_range: s.outOfRangePolicy,
    warnings: s.warnings,
  };
}

/** JSON form of a yield run (currents in mA/cm², powers in W/m², energies in Wh/m²). */
export function yieldJson(spec: StackSpec, e: Ensemble, s: EnsembleSummary, y: YieldResult, am15gEfficiency: number): Record<string, unknown> {
  const hours = e.weightUnit === 'hours';
  return {
    yield_efficiency: round(y.yieldEfficiency, 12),
    weight_unit: e.weightUnit,
    total_weight: round(y.totalWeight),
    energy_in_wh_m2: hours ? round(y.weightedPinWm2) : null,
    energy_out_wh_m2: hours ? round(y.weightedPmaxWm2) : null,
    am15g_efficiency: round(am15gEfficiency, 12),
    stack: {
      gaps_ev: spec.subcells.map((c) => c.gapEv),
      wiring: spec.wiring.label,
      coupling: { ...spec.coupling, description: describeCoupling(spec.coupling) },
      ere: spec.subcells.map((c) => c.ere),
      absorptance: spec.subcells.map((c) => describeAbsorptance(c.absorptance)),
      emission: EMISSION_CONVENTION,
    },
    per_spectrum: y.perSpectrum.map((p) => ({
      label: p.label,
      ...(p.timestamp !== undefined ? { timestamp: p.timestamp } : {}),
      weight: p.weight,
      temp_k: p.tempK,
      pin_w_m2: round(p.pinWm2),
      pmax_w_m2: round(p.pmaxWm2),
      efficiency: round(p.efficiency, 12),
      voc_v: p.stackVocV === null ? null : round(p.stackVocV),
      subcells: p.subcells.map((c) => ({
        gap_ev: c.gapEv,
        j_op_ma_cm2: ma(c.jOpAm2),
        jph_ma_cm2: ma(c.jphAm2),
        v_op_v: round(c.vOpV),
        voc_v: round(c.vocV),
        power_w_m2: round(c.powerWm2),
      })),
    })),
    summary: summaryJson(s),
    ensemble: { name: e.name, sha256: e.sha256, source: e.source, layout: e.layout, skipped: e.skipped },
    assumptions: yieldAssumptions(spec, e, s),
    caution: CAUTION,
  };
}

export function yieldCommand(a: YieldArgs): string {
  const gaps = gapsFromArgs(a.gaps);
  const spec = stackFromArgs(gaps, a);
  if (a.ensemble === undefined || String(a.ensemble).trim() === '') {
    throw new UserError('--ensemble is required: a folder of spectrum files, a manifest (.csv with file,weight,temp_k or .yaml) or a wide table');
  }
  const e = loadEnsemble(String(a.ensemble), { defaultTempK: spec.tempK, units: a.units === undefined ? undefined : parseUnitDeclaration(a.units) });
  const window = a.apeWindow === undefined ? undefined : parseRange('ape-window', a.apeWindow);
  const lowestGapEv = Math.min(...gaps);
  const s = ensembleSummary(e, window, { lowestGapEv });
  const y = yieldForStack(spec, e.members, e.weightUnit);
  const ref = evaluateStack(spec, am15g()).efficiency;
  if (a.json) return finiteJson(yieldJson(spec, e, s, y, ref), null, 2);

  const hours = e.weightUnit === 'hours';
  const wUnit = hours ? 'h' : 'share';
  const cellHeads = spec.subcells.map((_, i) => `J op ${i + 1} [mA/cm²]`);
  const rows = y.perSpectrum.slice(0, TEXT_ROWS_SHOWN).map((p, k) => [
    p.label,
    fix(p.weight, hours ? 1 : 4),
    fix(p.tempK, 1),
    fix(p.pinWm2, 1),
    fix(p.pmaxWm2, 1),
    fix(p.efficiency * 100, 2),
    fix(s.ape.perMember[k].apeEv, 3),
    ...p.subcells.map((c) => fix(toMaCm2(c.jOpAm2), 2)),
  ]);
  const out = [
    `Yield-weighted efficiency ${pct(y.yieldEfficiency, 3)} over ${e.members.length} spectra (${hours ? 'Σ Δt·P_max / Σ Δt·P_in' : 'Σ s·η / Σ s'}), wiring: ${spec.wiring.label}, gaps ${gaps.join(' / ')} eV`,
    `Same stack under AM1.5G at ${spec.tempK} K: ${pct(ref, 3)}`,
  ];
  if (hours) {
    out.push(`Energy over ${fix(y.totalWeight, 1)} h: in ${(y.weightedPinWm2 / 1000).toFixed(2)} kWh/m², out ${(y.weightedPmaxWm2 / 1000).toFixed(2)} kWh/m² (at the maximum power point of every spectrum)`);
  } else {
    const equal = e.members.every((m) => m.weight === e.members[0].weight);
    out.push(`Weights are ${equal ? 'equal' : 'relative energy shares'} (total ${fix(y.totalWeight, 4)}); no energy totals without hours.`);
  }
  const ape = s.ape;
  out.push(
    '',
    `Ensemble ${e.name}: ${e.source}`,
    `  irradiance: weighted mean ${s.weightedMeanIrradianceWm2.toFixed(1)} W/m², min ${s.irradianceWm2.min.toFixed(1)}, weighted median ${s.irradianceWm2.median.toFixed(1)}, max ${s.irradianceWm2.max.toFixed(1)} W/m²`,
    `  cell temperature: ${s.tempK.min === s.tempK.max ? s.tempK.min : `${s.tempK.min}–${s.tempK.max}`} K`,
    `  average photon energy (${ape.windowNm[0]}–${ape.windowNm[1]} nm): weighted mean ${fix(ape.weightedMeanEv, 4)} eV`,
  );
  if (ape.histogram.weights.length > 0) {
    const hrows = ape.histogram.weights.map((w, i) => [`${ape.histogram.edgesEv[i].toFixed(3)}–${ape.histogram.edgesEv[i + 1].toFixed(3)}`, fix(w, hours ? 1 : 4)]);
    out.push('', table(['APE [eV]', `weight [${wUnit}]`], hrows));
  }
  out.push('', table(['spectrum', `weight [${wUnit}]`, 'T [K]', 'P_in [W/m²]', 'P_max [W/m²]', 'η [%]', 'APE [eV]', ...cellHeads], rows));
  if (y.perSpectrum.length > TEXT_ROWS_SHOWN) out.push(`… ${y.perSpectrum.length - TEXT_ROWS_SHOWN} more spectra (all of them with --json)`);
  if (e.skipped.length > 0) out.push('', `Skipped in the folder (not spectra): ${e.skipped.join(', ')}`);
  if (s.warnings.length > 0) out.push('', 'Warnings:', ...s.warnings.map((w) => `  ! ${w}`));
  out.push('', 'Cell 1 is the top (light side). Assumptions:', ...yieldAssumptions(spec, e, s).map((l) => `  ${l}`), '', CAUTION);
  return out.join('\n');
}
