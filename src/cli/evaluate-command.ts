/** `gapstack evaluate`: one stack, one spectrum, every number with its unit. */
import { evaluateStack, stackWarnings, resultWarnings, type StackResult } from '../stack/evaluate.js';
import { bestTopAbsorptanceOfStack, withTopAbsorptance } from '../stack/top-absorptance.js';
import { UserError } from '../errors.js';
import { toMaCm2 } from '../physics/constants.js';
import type { StackSpec } from '../stack/model.js';
import type { Spectrum } from '../light/spectrum.js';
import { assumptionLines, CAUTION, describeCoupling, describeAbsorptance, emissionConvention } from '../report/assumptions.js';
import { eng, fix, pct, round, table } from './format.js';
import { gapsFromArgs, spectrumFromArgs, stackFromArgs, type LightArgs, type StackArgs } from './options.js';
import { finiteJson } from './guards.js';
import { coverageWarnings } from '../light/coverage.js';
import { CLI_EXTEND_HINT } from './spectra-options.js';

export interface EvaluateArgs extends LightArgs, StackArgs {
  gaps?: unknown;
  json?: boolean;
}

const ma = (jAm2: number) => round(toMaCm2(jAm2));

/** JSON form of a stack result (currents in mA/cm², voltages in V, powers in W/m²). */
export function stackResultJson(spec: StackSpec, spectrum: Spectrum, r: StackResult): Record<string, unknown> {
  return {
    efficiency: round(r.efficiency, 12),
    pmax_w_m2: round(r.pmaxWm2),
    pin_w_m2: round(r.pinWm2),
    temp_k: spec.tempK,
    spectrum: { name: spectrum.name, sha256: spectrum.sha256, pin_w_m2: round(spectrum.pinWm2), scale: round(spectrum.scale), source: spectrum.source },
    wiring: spec.wiring.label,
    coupling: { ...spec.coupling, description: describeCoupling(spec.coupling) },
    emission: emissionConvention(spec.coupling),
    voc_v: r.stackVocV === null ? null : round(r.stackVocV),
    jsc_ma_cm2: r.stackJscAm2 === null ? null : ma(r.stackJscAm2),
    subcells: r.subcells.map((c, i) => ({
      gap_ev: c.gapEv,
      jsc_ma_cm2: ma(c.jphAm2),
      voc_v: round(c.vocV),
      ff: round(c.ff),
      vmp_v: round(c.vmpV),
      jmp_ma_cm2: ma(c.jmpAm2),
      jgen_ma_cm2: ma(c.jgenAm2),
      jph_ma_cm2: ma(c.jphAm2),
      lc_in_ma_cm2: ma(c.lcInAm2),
      j_op_ma_cm2: ma(c.jOpAm2),
      v_op_v: round(c.vOpV),
      power_w_m2: round(c.powerWm2),
      ere: spec.subcells[i].ere,
      absorptance: describeAbsorptance(spec.subcells[i].absorptance),
      rs_ohm_cm2: spec.subcells[i].rsOhmCm2 ?? 0,
    })),
    caution: CAUTION,
  };
}

export function evaluateCommand(a: EvaluateArgs): string {
  const gaps = gapsFromArgs(a.gaps);
  const spec = stackFromArgs(gaps, a);
  const spectrum = spectrumFromArgs(a);
  let chosenTop: number | undefined;
  if (a.topAbsorptance === 'best') {
    // Thinning the top cell: the constant absorptance in (0, 1] that maximises this stack.
    if (gaps.length < 2) throw new UserError('--top-absorptance best needs a stack of 2 or more subcells');
    chosenTop = bestTopAbsorptanceOfStack(spec, spectrum).absorptance;
    spec.subcells[0] = withTopAbsorptance(spec, chosenTop).subcells[0];
  }
  const r = evaluateStack(spec, spectrum);
  const warnings = [...stackWarnings(spec), ...resultWarnings(r), ...coverageWarnings(spectrum, Math.min(...gaps), CLI_EXTEND_HINT)];
  if (a.json) return finiteJson({ ...stackResultJson(spec, spectrum, r), ...(chosenTop !== undefined ? { top_absorptance: round(chosenTop, 8) } : {}), warnings }, null, 2);
  const rows = r.subcells.map((c, i) => [
    String(i + 1),
    fix(c.gapEv, 4),
    eng(toMaCm2(c.jphAm2), 2),
    eng(toMaCm2(c.lcInAm2), 2),
    fix(c.vocV, 4),
    fix(c.ff, 4),
    eng(toMaCm2(c.jOpAm2), 2),
    fix(c.vOpV, 4),
    eng(c.powerWm2, 2),
  ]);
  const out = [
    ...(chosenTop !== undefined ? [`Best top-cell absorptance: ${chosenTop.toFixed(4)} (constant above the top gap; the rest of its band passes down)`] : []),
    `Efficiency ${pct(r.efficiency, 3)}  (P_max ${eng(r.pmaxWm2, 2)} W/m² of P_in ${eng(r.pinWm2, 2)} W/m²), wiring: ${spec.wiring.label}`,
  ];
  if (r.stackVocV !== null && r.stackJscAm2 !== null) out.push(`Stack terminals: Voc ${r.stackVocV.toFixed(4)} V, Jsc ${eng(toMaCm2(r.stackJscAm2), 2)} mA/cm²`);
  out.push(
    '',
    table(['cell', 'gap [eV]', 'Jph [mA/cm²]', 'LC in [mA/cm²]', 'Voc [V]', 'FF', 'J op [mA/cm²]', 'V op [V]', 'P [W/m²]'], rows),
    '',
    'Cell 1 is the top (light side). Jph includes coupled-in current; Voc and FF are each subcell alone at its Jph.',
    ...assumptionLines(spec, spectrum).map((l) => `  ${l}`),
    ...warnings.map((w) => `Warning: ${w}`),
    '',
    CAUTION,
  );
  return out.join('\n');
}
