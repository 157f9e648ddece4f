/**
 * Everything a report shows, as plain numbers: per wiring the design search,
 * the stack at its optimum under the reference spectrum, J–V curves, the
 * sensitivity slices and the maps with the current-matching field. No
 * formatting and no SVG here; the charts and the page are built from this.
 */
import type { Design, DesignMapPair, DesignWiring } from '../design/index.js';
import { constraintRangeEv, MAX_MAP_AXIS_POINTS } from '../design/index.js';
import { UserError } from '../errors.js';
import { thermalVoltageV } from '../physics/constants.js';
import { computeMap, uniformAxis } from '../search/map.js';
import { runDesignSearch, type DesignSearchResult } from '../search/design-search.js';
import { compositionAxis } from '../search/composition-tolerance.js';
import { StepObjective } from '../stack/step-objective.js';
import { evaluateStack, type StackResult } from '../stack/evaluate.js';
import { isSeriesString, stackWithGaps, type StackSpec } from '../stack/model.js';
import { stackOptics } from '../stack/optics.js';
import { currentAtVoltageAm2, voltageAtCurrentV } from '../junction/diode.js';
import { compareWithReference, type EnsembleComparison } from './ensemble-compare.js';
import type { JvCurve, JvOutcome, MapMark, MapOutcome, SensitivitySlice, WiringOutcome } from './outcomes.js';

export type { JvCurve, JvOutcome, MapMark, MapOutcome, SensitivitySlice, WiringOutcome } from './outcomes.js';

/** Sensitivity slices reach this far either side of the optimum [eV]. */
export const SENSITIVITY_HALF_WIDTH_EV = 0.15;
/** Sensitivity sample step [eV]. */
export const SENSITIVITY_STEP_EV = 0.0025;
/** Points per J–V curve. */
export const JV_POINTS = 121;

export interface ReportData {
  design: Design;
  outcomes: WiringOutcome[];
  /** Under an ensemble: every wiring's answer set against the same question under AM1.5G; else null. */
  comparison: EnsembleComparison | null;
}

const round = (x: number, step: number, dir: 'up' | 'down') => (dir === 'up' ? Math.ceil(x / step - 1e-9) * step : Math.floor(x / step + 1e-9) * step);
const clean = (x: number) => Number(x.toFixed(6));

function marksFor(design: Design, cell: number, axis: 'x' | 'y'): MapMark[] {
  const c = design.subcells[cell].constraint;
  const [lo, hi] = constraintRangeEv(c, design.tempK, design.spanEv);
  switch (c.kind) {
    case 'free':
      return [];
    case 'range':
      return [{ axis, subcell: cell, kind: 'range', loEv: lo, hiEv: hi, label: `range ${lo}–${hi} eV` }];
    case 'fixed':
      return [{ axis, subcell: cell, kind: 'fixed', loEv: lo, hiEv: hi, label: `fixed ${lo.toFixed(2)} eV` }];
    case 'material':
      if (c.family.kind === 'fixed') return [{ axis, subcell: cell, kind: 'fixed', loEv: lo, hiEv: hi, label: `${c.family.name} ${lo.toFixed(3)} eV` }];
      return [{ axis, subcell: cell, kind: 'window', loEv: lo, hiEv: hi, label: `${c.family.name}${c.fullRange ? ' (full reach)' : ' window'}` }];
  }
}

/** Axis range [eV] for a mapped subcell: around the optima, widened to show its marks, inside the span. */
function defaultAxis(optima: number[], marks: MapMark[], span: [number, number]): [number, number] {
  let lo = Math.min(...optima) - 0.3;
  let hi = Math.max(...optima) + 0.3;
  for (const m of marks) {
    lo = Math.min(lo, m.loEv - 0.05);
    hi = Math.max(hi, m.hiEv + 0.05);
  }
  return [clean(Math.max(span[0], round(lo, 0.05, 'down'))), clean(Math.min(span[1], round(hi, 0.05, 'up')))];
}

/** Map step [eV] when the file gives none: finer where a pixel is cheap (closed-form step objective, no profile). */
function defaultStep(fast: boolean, profile: boolean, xr: [number, number], yr: [number, number]): number {
  let step = fast && !profile ? 0.01 : fast || !profile ? 0.02 : 0.04;
  const span = Math.max(xr[1] - xr[0], yr[1] - yr[0]);
  while (span / step > 120) step *= 2;
  return step;
}

function mapFor(design: Design, w: DesignWiring, d: DesignSearchResult, pair: DesignMapPair, optimaAll: number[][], progress?: (fraction: number) => void): MapOutcome {
  const { xCell, yCell } = pair;
  const n = design.subcells.length;
  const bounds = d.result.bounds;
  const fixed = bounds.map((b, i) => (i !== xCell && i !== yCell && b[0] === b[1] ? b[0] : undefined));
  const profiled = Array.from({ length: n }, (_, i) => i).filter((i) => i !== xCell && i !== yCell && fixed[i] === undefined);
  const marks = [...marksFor(design, xCell, 'x'), ...marksFor(design, yCell, 'y')];
  const xr = pair.xRangeEv ?? defaultAxis(optimaAll.map((g) => g[xCell]), marks.filter((m) => m.axis === 'x'), design.spanEv);
  let yr = pair.yRangeEv ?? defaultAxis(optimaAll.map((g) => g[yCell]), marks.filter((m) => m.axis === 'y'), design.spanEv);
  if (!pair.yRangeEv && yr[1] > xr[1]) yr = [yr[0], xr[1]];
  const fast = d.objective instanceof StepObjective;
  const step = design.mapStepEv ?? defaultStep(fast, profiled.length > 0, xr, yr);
  const x = uniformAxis(xr[0], xr[1], step);
  const y = uniformAxis(yr[0], yr[1], step);
  // The design check covers axes given in the file; axes chosen here get the same limit.
  for (const [axis, a, given] of [['x', x, pair.xRangeEv], ['y', y, pair.yRangeEv]] as const) {
    if (given === undefined && a.length > MAX_MAP_AXIS_POINTS) {
      throw new UserError(`${design.path}: map.step: ${a.length} points along the default ${axis} axis (${a[0].toFixed(3)}–${a[a.length - 1].toFixed(3)} eV) of pair [${xCell + 1}, ${yCell + 1}]; at most ${MAX_MAP_AXIS_POINTS}: use a coarser step or give the axis range in map.pairs`);
    }
  }
  const map = computeMap(d.objective, { x, y, xCell, yCell, fixed, bounds, progress });
  if (!(map.best.value > 0)) {
    throw new UserError(`${design.path}: map of subcells ${xCell + 1} and ${yCell + 1} (${w.key}): no point with the upper gap above the lower produces power; widen map.pairs x or y`);
  }
  const best = d.result.best;
  const optimum = { x: best.gapsEv[xCell], y: best.gapsEv[yCell], value: best.value };
  const warnings: string[] = [];
  const inside = (v: number, a: Float64Array) => v >= a[0] - 1e-9 && v <= a[a.length - 1] + 1e-9;
  if (!inside(optimum.x, x) || !inside(optimum.y, y)) {
    warnings.push(`the ${w.key} optimum (${optimum.x.toFixed(3)} / ${optimum.y.toFixed(3)} eV) lies outside the map of subcells ${xCell + 1} and ${yCell + 1}; widen map.pairs x or y`);
  }
  let matching: Float64Array | null = null;
  const series = isSeriesString(w.wiring);
  if (series) {
    const ref = design.reference;
    matching = new Float64Array(x.length * y.length).fill(NaN);
    const gaps = best.gapsEv.slice();
    for (let iy = 0; iy < y.length; iy++) {
      for (let ix = 0; ix < x.length; ix++) {
        const k = iy * x.length + ix;
        if (Number.isNaN(map.values[k])) continue;
        gaps[xCell] = x[ix];
        gaps[yCell] = y[iy];
        profiled.forEach((c, m) => (gaps[c] = map.profileGaps[m][k]));
        for (let i = 0; i < n; i++) if (fixed[i] !== undefined) gaps[i] = fixed[i] as number;
        if (!gaps.every((g, i) => i === 0 || g < gaps[i - 1])) continue;
        const o = stackOptics(stackWithGaps(w.template, gaps, ref.tempK), ref.spectrum);
        matching[k] = o.jgenAm2[xCell] - o.jgenAm2[yCell];
      }
    }
  }
  const compositionAxes = mapCompositionAxes(design, xCell, yCell, xr, yr);
  return { pair, map, stepEv: step, optimum, threshold: best.value * (1 - design.loss), matching, marks, profiled, warnings, ...(compositionAxes ? { compositionAxes } : {}) };
}

/** Composition axes for mapped subcells bound to alloy families, or undefined when neither is. */
function mapCompositionAxes(design: Design, xCell: number, yCell: number, xr: [number, number], yr: [number, number]): MapOutcome['compositionAxes'] {
  const axis = (cell: number, r: [number, number]) => {
    const c = design.subcells[cell].constraint;
    return c.kind === 'material' ? compositionAxis(c.family, cell, r[0], r[1], design.tempK) : undefined;
  };
  const x = axis(xCell, xr);
  const y = axis(yCell, yr);
  return x || y ? { ...(x ? { x } : {}), ...(y ? { y } : {}) } : undefined;
}

/** The practical window or allowed range [eV] of subcell i, when its constraint has one (not free, not fixed). */
function sliceWindow(design: Design, i: number): [number, number] | undefined {
  const c = design.subcells[i].constraint;
  if (c.kind === 'range' || (c.kind === 'material' && c.family.kind !== 'fixed')) return constraintRangeEv(c, design.tempK, design.spanEv);
  return undefined;
}

function sensitivity(design: Design, d: DesignSearchResult, bounds: [number, number][]): SensitivitySlice[] {
  const best = d.result.best.gapsEv;
  const count = Math.round((2 * SENSITIVITY_HALF_WIDTH_EV) / SENSITIVITY_STEP_EV);
  return best.map((g0, i) => {
    const deltaEv: number[] = [];
    const efficiency: (number | null)[] = [];
    for (let k = 0; k <= count; k++) {
      const delta = clean(-SENSITIVITY_HALF_WIDTH_EV + k * SENSITIVITY_STEP_EV);
      const g = best.slice();
      g[i] = g0 + delta;
      deltaEv.push(delta);
      const ordered = g[i] > 0.2 && (i === 0 || g[i] < g[i - 1]) && (i === g.length - 1 || g[i] > g[i + 1]);
      efficiency.push(ordered ? d.objective.value(g) : null);
    }
    return { subcell: i, fixed: bounds[i][0] === bounds[i][1], gapEv: g0, deltaEv, efficiency, windowEv: sliceWindow(design, i) };
  });
}

function jvCurves(design: Design, spec: StackSpec, r: StackResult): JvOutcome {
  const vt = thermalVoltageV(spec.tempK);
  const subcells = r.subcells.map((c, i) => {
    const voltageV: number[] = [];
    const currentAm2: number[] = [];
    for (let k = 0; k < JV_POINTS; k++) {
      const v = (c.vocV * k) / (JV_POINTS - 1);
      voltageV.push(v);
      currentAm2.push(Math.max(0, currentAtVoltageAm2(c.jphAm2, c.j0Am2, vt, v)));
    }
    return { label: design.subcells[i].label, voltageV, currentAm2 };
  });
  const operating = r.subcells.map((c) => ({ vV: c.vOpV, jAm2: c.jOpAm2 }));
  const w = spec.wiring;
  let stack: JvCurve | null = null;
  let stackMpp: JvOutcome['stackMpp'] = null;
  if (isSeriesString(w) && r.subcells.length > 1 && r.stackJscAm2 !== null) {
    const jsc = r.stackJscAm2;
    const voltageV: number[] = [];
    const currentAm2: number[] = [];
    for (let k = 0; k < JV_POINTS; k++) {
      // Denser near short circuit, where the limiting subcell's voltage turns over.
      const u = k / (JV_POINTS - 1);
      const j = jsc * (1 - u * u);
      const v = r.subcells.reduce((s, c) => s + voltageAtCurrentV(c.jphAm2, c.j0Am2, vt, j), 0);
      if (!Number.isFinite(v)) continue;
      voltageV.push(Math.max(0, v));
      currentAm2.push(j);
    }
    stack = { label: 'stack (series)', voltageV: voltageV.reverse(), currentAm2: currentAm2.reverse() };
    const j = r.subcells[0].jOpAm2;
    stackMpp = { vV: r.subcells.reduce((s, c) => s + c.vOpV, 0), jAm2: j };
  }
  return { subcells, stack, operating, stackMpp };
}

/** The template with the top absorptance the search chose (absorptance: best), else unchanged. */
function withChosenTop(t: StackSpec, top: number | undefined): StackSpec {
  if (top === undefined) return t;
  return { ...t, subcells: t.subcells.map((c, i) => (i === 0 ? { ...c, absorptance: { kind: 'step', value: top } } : c)) };
}

/** Part of a design to compute, for one figure: some wirings (indices into design.wirings), some map pairs, with or without the AM1.5G comparison. */
export interface ReportSelection {
  wirings: number[];
  /** Indices into design.pairs. */
  pairs: number[];
  comparison: boolean;
}

/**
 * Named stages of the report's work for a progress display: called once per
 * stage with its name, returns that stage's 0–1 progress callback.
 */
export type StageReporter = (name: string) => ((fraction: number) => void) | undefined;

/** How many stages `computeReport` announces: one search per wiring and one map per wiring and pair. */
export function reportStageCount(design: Design): number {
  return design.wirings.length * (1 + design.pairs.length);
}

/**
 * Run every wiring of a design: search, detail at the optimum, curves and
 * maps; under an ensemble, the AM1.5G comparison. With a selection, every
 * wiring is still searched (default map axes span all wirings' optima, so a
 * figure matches the report's) but only the selected wirings get their curves
 * and the selected maps.
 */
export function computeReport(design: Design, stage?: StageReporter, only?: ReportSelection): ReportData {
  const searches = design.wirings.map((w, k) => {
    try {
      return runDesignSearch({
        progress: stage?.(`search ${w.key}`),
        template: w.template,
        spectra: design.spectra,
        constraints: design.subcells.map((s) => s.constraint),
        spanEv: design.spanEv,
        stepEv: design.searchStepEv,
        loss: design.loss,
        freeTopAbsorptance: w.freeTopAbsorptance,
      });
    } catch (err) {
      if (err instanceof UserError) throw new UserError(`${design.path}: wirings[${k}] (${w.key}): ${err.message}`);
      throw err;
    }
  });
  const optimaAll = searches.map((d) => d.result.best.gapsEv);
  const ref = design.reference;
  const chosen = only ? only.wirings : design.wirings.map((_, k) => k);
  const pairs = only ? design.pairs.filter((_, j) => only.pairs.includes(j)) : design.pairs;
  const outcomes = chosen.map((k): WiringOutcome => {
    const w = design.wirings[k];
    const d = searches[k];
    const template = withChosenTop(w.template, d.topAbsorptance);
    const bestSpec = stackWithGaps(template, d.result.best.gapsEv);
    const detail = evaluateStack(stackWithGaps(template, d.result.best.gapsEv, ref.tempK), ref.spectrum);
    const stackFf = detail.stackVocV !== null && detail.stackJscAm2 !== null && detail.stackVocV > 0 ? detail.pmaxWm2 / (detail.stackVocV * detail.stackJscAm2) : null;
    return {
      wiring: w,
      search: d,
      bestSpec,
      detail,
      stackFf,
      sensitivity: sensitivity(design, d, d.result.bounds),
      jv: jvCurves(design, stackWithGaps(template, d.result.best.gapsEv, ref.tempK), detail),
      maps: pairs.map((p) => mapFor(design, w, d, p, optimaAll, stage?.(`map ${w.key} ${p.xCell + 1},${p.yCell + 1}`))),
    };
  });
  return { design, outcomes, comparison: only && !only.comparison ? null : compareWithReference(design, outcomes) };
}

