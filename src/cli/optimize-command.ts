/** `gapstack optimize`: the global optimum, runner-up basins and tolerance region. */
import type { Spectrum } from '../light/spectrum.js';
import { UserError } from '../errors.js';
import { availableParallelism } from 'node:os';
import { runDesignSearchParallel, withFamilySlopes, type DesignSearchRequest, type DesignSearchResult } from '../search/design-search.js';
import { stackWithGaps, type StackSpec } from '../stack/model.js';
import { evaluateStack } from '../stack/evaluate.js';
import { compareAnswers, questionUnderReference } from '../report/ensemble-compare.js';
import { assumptionLines, CAUTION, describeCoupling, emissionConvention } from '../report/assumptions.js';
import { eng, fix, pct, round, table } from './format.js';
import { stackFromArgs, type LightArgs, type StackArgs } from './options.js';
import { cellsFromArgs, constraintsFromArgs, familyIndices, requireMeasuredFixed, lossFromArgs, spanFromArgs, stepFromArgs, type ConstraintArgs } from './search-options.js';
import { spectraFromArgs, type SpectraArgs, CLI_EXTEND_HINT } from './spectra-options.js';
import { startStagedProgress } from './progress.js';
import { checkWorkSize, searchStacks } from './work-size.js';
import { defaultStepEv } from '../search/optimize.js';
import { finiteJson } from './guards.js';
import { coverageWarnings } from '../light/coverage.js';
import { toMaCm2 } from '../physics/constants.js';

/** --threads: most worker threads the enumeration may use (default: the machine's cores, at most 8); the size of the work decides how many it does use. */
export function threadsFromArgs(value: unknown): number {
  if (value === undefined) return Math.min(8, availableParallelism());
  const t = Number(value);
  if (!(Number.isInteger(t) && t >= 1 && t <= 64)) throw new UserError(`--threads must be a whole number 1–64, got ${String(value)}`);
  return t;
}

export interface OptimizeArgs extends LightArgs, StackArgs, ConstraintArgs, SpectraArgs {
  /** Run even when the size check estimates hours of work. */
  acceptLarge?: boolean;
  threads?: unknown;
  cells?: unknown;
  span?: unknown;
  step?: unknown;
  loss?: unknown;
  freeTopAbsorptance?: boolean;
  json?: boolean;
}

/** For an ensemble, the single-spectrum lines give way to the ensemble's own. */
function ensembleAware(lines: string[], members: { label: string; tempK: number; spectrum: Spectrum }[]): string[] {
  if (members.length === 1) return lines;
  const temps = members.map((m) => m.tempK);
  return [
    `ensemble of ${members.length} spectra (${members[0].label} … ${members[members.length - 1].label}); yield-weighted efficiency = Σ Δt·P_max / Σ Δt·P_in for hours, Σ s·η / Σ s for energy shares, each spectrum solved on its own`,
    `cell temperatures ${Math.min(...temps)}–${Math.max(...temps)} K as the ensemble gives them`,
    ...lines.filter((l) => !l.startsWith('spectrum:') && !l.startsWith('cell temperature:')),
  ];
}

const gapsText = (g: number[]) => g.map((x) => x.toFixed(4)).join(' / ');

export function optimizeJson(spec: StackSpec, spectra: { label: string; spectrum: Spectrum }[], d: DesignSearchResult): Record<string, unknown> {
  const r = d.result;
  const basin = (b: { gapsEv: number[]; value: number }) => ({ gaps_ev: b.gapsEv.map((g) => round(g, 7)), efficiency: round(b.value, 10) });
  return {
    objective: d.objective.label,
    cells: spec.subcells.length,
    wiring: spec.wiring.label,
    temp_k: spec.tempK,
    coupling: { ...spec.coupling, description: describeCoupling(spec.coupling) },
    emission: emissionConvention(spec.coupling),
    best: {
      ...basin(r.best),
      ...(d.topAbsorptance !== undefined ? { top_absorptance: round(d.topAbsorptance, 6) } : {}),
      compositions: d.compositions.map((c) => ({
        subcell: c.subcell + 1,
        family: c.family,
        gap_ev: round(c.gapEv, 7),
        compositions: c.compositions.map((x) => ({ x: round(x.x, 6), in_window: x.inWindow })),
        in_window: c.inWindow,
        note: c.note,
      })),
    },
    basins: r.basins.map(basin),
    tolerance: {
      loss_rel: r.tolerance.loss,
      threshold_efficiency: round(r.tolerance.threshold, 10),
      intervals: r.tolerance.intervals.map((t) => ({
        subcell: t.subcell + 1,
        gap_ev: round(t.gapEv, 7),
        low_ev: round(t.lowEv, 6),
        high_ev: round(t.highEv, 6),
        open_low: t.openLow,
        open_high: t.openHigh,
      })),
      composition_intervals: d.compositionTolerance.map((c) => ({ subcell: c.subcell + 1, family: c.family, variable: c.variable, x: round(c.x, 6), low_x: round(c.lowX, 6), high_x: round(c.highX, 6), clipped: c.clipped })),
      convention: 'each interval moves one gap with the others held at the optimum; open_* means the interval reaches the allowed range there; composition_intervals read bound subcells\' gap intervals in composition on the optimum\'s branch',
    },
    unconstrained: d.unconstrained ? basin(d.unconstrained.best) : null,
    warnings: d.warnings,
    bounds_ev: r.bounds,
    search: {
      step_ev: r.stats.stepEv,
      axis_points: r.stats.axisPoints,
      band_edge_points: r.stats.edgePoints,
      combinations: r.stats.leaves,
      pruned: r.stats.pruned,
      seeds_refined: r.stats.seeds,
      evaluations: r.stats.evaluations,
      seconds: round(r.stats.seconds, 4),
    },
    spectra: spectra.map((s) => ({ label: s.label, name: s.spectrum.name, sha256: s.spectrum.sha256, pin_w_m2: round(s.spectrum.pinWm2) })),
    caution: CAUTION,
  };
}

export async function optimizeCommand(a: OptimizeArgs): Promise<string> {
  const cells = cellsFromArgs(a.cells);
  const placeholder = Array.from({ length: cells }, (_, i) => 2.5 - i * 0.3);
  const constraints = constraintsFromArgs(a, cells, spanFromArgs(a.span));
  const spec = stackFromArgs(placeholder, a, familyIndices(constraints));
  requireMeasuredFixed(spec, constraints);
  const members = await spectraFromArgs(a, spec.tempK);
  const ensembleLight = a.ensemble !== undefined || a.weather !== undefined;
  // The spectra are counted now: refuse an hours-long run over an ensemble unless asked for
  // (one spectrum: the search's own grid limit speaks).
  const openCells = constraints.filter((c) => c.kind !== 'fixed').length;
  if (members.length > 1) checkWorkSize('search', searchStacks(constraints, spanFromArgs(a.span), stepFromArgs(a.step) ?? defaultStepEv(openCells)), members.length + (ensembleLight ? 1 : 0), Boolean(a.acceptLarge));
  const question: DesignSearchRequest = {
    template: ensembleLight ? withFamilySlopes(spec, constraints) : spec,
    spectra: members,
    constraints,
    spanEv: spanFromArgs(a.span),
    stepEv: stepFromArgs(a.step),
    loss: lossFromArgs(a.loss),
    freeTopAbsorptance: Boolean(a.freeTopAbsorptance),
  };
  const threads = threadsFromArgs(a.threads);
  const bar = a.json ? null : await startStagedProgress('optimize', a.ensemble !== undefined ? 2 : 1);
  let d: DesignSearchResult;
  try {
    d = await runDesignSearchParallel({ ...question, progress: bar?.stage(a.ensemble !== undefined ? `search over ${members.length} spectra` : 'search') }, threads);
  } catch (err) {
    bar?.stop();
    throw err;
  }
  if (a.ensemble === undefined) bar?.stop();
  // One spectrum that stops short of the lowest gap's edge makes η meaningless (docs/PHYSICS.md §11); ensembles say so in their summary.
  if (a.ensemble === undefined) d = { ...d, warnings: [...d.warnings, ...coverageWarnings(members[0].spectrum, Math.min(...d.result.best.gapsEv), CLI_EXTEND_HINT)] };
  // Under an ensemble, also answer: does the AM1.5G winner still win here?
  let comparison: Record<string, unknown> | null = null;
  if (ensembleLight) {
    let c: ReturnType<typeof compareAnswers>;
    try {
      c = compareAnswers(d, await runDesignSearchParallel({ ...questionUnderReference(question), progress: bar?.stage('AM1.5G comparison') }, threads));
    } finally {
      bar?.stop();
    }
    comparison = {
      am15g_best: { gaps_ev: c.referenceOptimal.gapsEv.map((g) => round(g, 7)), efficiency: round(c.referenceOptimal.referenceEfficiency, 10) },
      am15g_design_yield_efficiency: round(c.referenceOptimal.yieldEfficiency, 10),
      ensemble_best_yield_efficiency: round(c.ensembleOptimal.yieldEfficiency, 10),
      loss_rel: round(c.lossRel, 8),
      gap_shift_ev: c.shiftEv.map((x) => round(x, 6)),
    };
  }
  if (a.json) return finiteJson({ ...optimizeJson(spec, members, d), ...(comparison ? { am15g_comparison: comparison } : {}) }, null, 2);
  const r = d.result;
  const first = members[0].spectrum;
  // The optimum as a stack, the free top absorptance included, so its per-cell table is printed too.
  const top = d.topAbsorptance;
  const withGaps = stackWithGaps(spec, r.best.gapsEv);
  const bestSpec = top === undefined ? withGaps : { ...withGaps, subcells: withGaps.subcells.map((c, i) => (i === 0 ? { ...c, absorptance: { kind: 'step' as const, value: top } } : c)) };
  const detail = members.length === 1 ? evaluateStack(bestSpec, first) : null;
  const lines = [
    `Best ${d.objective.label}: ${pct(r.best.value, 3)}  wiring ${spec.wiring.label}, ${cells} subcell(s)`,
    `Gaps [eV], top first: ${gapsText(r.best.gapsEv)}${d.topAbsorptance !== undefined ? `   top absorptance ${d.topAbsorptance.toFixed(3)}` : ''}`,
  ];
  const fixedCells = r.bounds.map((b, i) => (b[0] === b[1] ? `subcell ${i + 1} at ${b[0].toFixed(4)} eV` : '')).filter((t) => t !== '');
  if (fixedCells.length > 0) lines.push(`Fixed by the question: ${fixedCells.join(', ')} (1 = top).`);
  if (detail) {
    lines.push(
      '',
      table(
        ['cell', 'gap [eV]', 'Jph [mA/cm²]', 'Voc [V]', 'FF', 'J op [mA/cm²]', 'V op [V]'],
        detail.subcells.map((c, i) => [String(i + 1), fix(c.gapEv, 4), eng(toMaCm2(c.jphAm2), 2), fix(c.vocV, 4), fix(c.ff, 4), eng(toMaCm2(c.jOpAm2), 2), fix(c.vOpV, 4)]),
      ),
    );
  }
  for (const c of d.compositions) {
    const xs = c.compositions.map((x) => `x = ${x.x.toFixed(3)}${x.inWindow ? '' : ' (outside practical window)'}`).join(', ');
    lines.push(`Subcell ${c.subcell + 1} as ${c.familyName}: ${c.fixedCompound ? `fixed compound, ${c.gapEv.toFixed(3)} eV at ${spec.tempK} K` : xs || c.note}`);
  }
  lines.push('', `Tolerance region: gaps keeping ${d.objective.label} ≥ ${pct(r.tolerance.threshold, 3)} (${(r.tolerance.loss * 100).toFixed(2)} % relative loss), one gap moved at a time:`);
  lines.push(
    table(
      ['cell', 'optimum [eV]', 'low [eV]', 'high [eV]'],
      r.tolerance.intervals.map((t) => [String(t.subcell + 1), fix(t.gapEv, 4), `${t.openLow ? '≤' : ''}${fix(t.lowEv, 4)}`, `${t.openHigh ? '≥' : ''}${fix(t.highEv, 4)}`]),
    ),
  );
  for (const c of d.compositionTolerance) {
    lines.push(`  subcell ${c.subcell + 1} in composition (${c.variable}): x = ${c.lowX.toFixed(3)}–${c.highX.toFixed(3)} around ${c.x.toFixed(3)}${c.clipped ? ' (an end reaches the family’s composition range)' : ''}`);
  }
  if (r.basins.length > 0) {
    lines.push('', 'Runner-up basins:');
    lines.push(table(['gaps [eV]', d.objective.label], r.basins.slice(0, 5).map((b) => [gapsText(b.gapsEv), pct(b.value, 3)])));
  }
  if (comparison) {
    const c = comparison as { am15g_best: { gaps_ev: number[]; efficiency: number }; am15g_design_yield_efficiency: number; loss_rel: number; gap_shift_ev: number[] };
    lines.push(
      '',
      `AM1.5G optimum for the same question: ${gapsText(c.am15g_best.gaps_ev)} eV, ${pct(c.am15g_best.efficiency, 3)} under AM1.5G;`,
      `under this ensemble that design yields ${pct(c.am15g_design_yield_efficiency, 3)}, ${(c.loss_rel * 100).toFixed(2)} % (relative) below the ensemble optimum; gap shift ${c.gap_shift_ev.map((x) => `${x >= 0 ? '+' : ''}${(x * 1000).toFixed(1)}`).join(' / ')} meV.`,
    );
  }
  for (const w of d.warnings) lines.push('', `Warning: ${w}`);
  lines.push(
    '',
    `Search: ${r.stats.leaves} gap combination${r.stats.leaves === 1 ? '' : 's'} on a ${r.stats.stepEv * 1000} meV grid plus ${r.stats.edgePoints} band-edge gaps, ${r.stats.seeds} seed${r.stats.seeds === 1 ? '' : 's'} refined, ${r.stats.seconds.toFixed(2)} s.`,
    ...ensembleAware(assumptionLines(bestSpec, first), members).map((l) => `  ${l}`),
    '',
    CAUTION,
  );
  return lines.filter((l, i, all) => !(l === '' && all[i - 1] === '')).join('\n');
}
