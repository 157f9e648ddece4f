/**
 * A design question answered by search: a template stack, spectra, subcell
 * constraints (free, ranged, fixed, or bound to an absorber family), and what
 * the practitioner takes away: best gaps with compositions, runner-up basins,
 * the tolerance region, and warnings when a window binds.
 */
import { isSeriesString, type StackSpec } from '../stack/model.js';
import { UserError } from '../errors.js';
import { compositionInterval, type CompositionInterval } from './composition-tolerance.js';
import { describeGap, gapAtReference, gapAtTemperature, gapReach, type AbsorberFamily } from '../materials/index.js';
import { buildObjective } from '../stack/objectives.js';
import { searchGaps, searchGapsParallel, type SearchProblem, type SearchResult } from './optimize.js';
import { weightedBandEdgeEnergiesEv } from './axis.js';
import type { WeightedSpectrum } from '../light/weighted-spectrum.js';
import type { GapObjective } from '../stack/gap-objective.js';
import { StepObjective } from '../stack/step-objective.js';

/** How one subcell may vary. */
export type SubcellConstraint =
  | { kind: 'free' }
  | { kind: 'range'; loEv: number; hiEv: number }
  | { kind: 'fixed'; gapEv: number }
  | { kind: 'material'; family: AbsorberFamily; fullRange: boolean };

/** A design question: template stack, spectra, per-subcell constraints, gap span [eV], grid step [eV] and tolerance loss [-]. */
export interface DesignSearchRequest {
  template: StackSpec;
  spectra: WeightedSpectrum[];
  constraints: SubcellConstraint[];
  spanEv: [number, number];
  stepEv?: number;
  loss: number;
  freeTopAbsorptance?: boolean;
  /** Only the optimum is wanted (SearchProblem.optimumOnly): no tolerance region, no runner-up basins. */
  optimumOnly?: boolean;
  progress?: (fraction: number) => void;
}

/** For a subcell bound to an absorber family: the composition(s) giving the chosen gap, and whether they lie in the practical window. */
export interface CompositionNote {
  subcell: number;
  family: string;
  familyName: string;
  /** A fixed compound has no composition to choose. */
  fixedCompound: boolean;
  gapEv: number;
  /** Compositions giving the gap (at 300 K, after the family's dE_g/dT), with window flags. */
  compositions: readonly { readonly x: number; readonly inWindow: boolean }[];
  inWindow: boolean;
  note: string;
}

/** A design question answered: the search result, the objective, compositions, warnings and, when a window bound, the unconstrained optimum. */
export interface DesignSearchResult {
  result: SearchResult;
  objective: GapObjective;
  /** Best constant top absorptance when it was free. */
  topAbsorptance?: number;
  compositions: CompositionNote[];
  warnings: string[];
  /** The unconstrained optimum when a material window bound the search. */
  unconstrained?: SearchResult;
  /** Tolerance intervals of subcells bound to alloy families, in composition units. */
  compositionTolerance: CompositionInterval[];
}

/** Range or fixed gap [eV] at the operating temperature that a constraint allows. */
export function constraintBounds(c: SubcellConstraint, tempK: number): { range?: [number, number]; fixed?: number } {
  const shift = (fam: AbsorberFamily, e: number) => gapAtTemperature(fam, e, tempK);
  switch (c.kind) {
    case 'free':
      return {};
    case 'range':
      return { range: [c.loEv, c.hiEv] };
    case 'fixed':
      return { fixed: c.gapEv };
    case 'material': {
      const f = c.family;
      if (f.kind === 'fixed') return { fixed: shift(f, f.gapSpanEv[0]) };
      // The practical window, never beyond what the gap model can reach.
      const r = gapReach(f);
      const [lo, hi] = c.fullRange ? [r.minEv, r.maxEv] : [Math.max(r.minEv, f.window.gapEv[0]), Math.min(r.maxEv, f.window.gapEv[1])];
      return { range: [shift(f, lo), shift(f, hi)] };
    }
  }
}

function problemFor(req: DesignSearchRequest, constraints: SubcellConstraint[]): SearchProblem {
  const t = req.template.tempK;
  const b = constraints.map((c) => constraintBounds(c, t));
  return {
    cells: req.template.subcells.length,
    spanEv: req.spanEv,
    ranges: b.map((x) => x.range),
    fixed: b.map((x) => x.fixed),
    stepEv: req.stepEv,
    loss: req.loss,
    optimumOnly: req.optimumOnly,
    progress: req.progress,
  };
}

interface PreparedDesign {
  objective: GapObjective;
  edges: number[];
  problem: SearchProblem;
  /** The same question with window-bound alloy subcells set free, if any are bound. */
  looseProblem?: SearchProblem;
  bound: number[];
}

function prepareDesign(req: DesignSearchRequest): PreparedDesign {
  const n = req.template.subcells.length;
  if (req.constraints.length !== n) throw new UserError(`expected ${n} subcell constraints, got ${req.constraints.length}`);
  if (req.freeTopAbsorptance && !(isSeriesString(req.template.wiring) && n >= 2)) {
    throw new UserError('a free top-cell absorptance is offered for series (2T) stacks of 2 or more subcells');
  }
  const objective = buildObjective(req.template, req.spectra, { freeTopAbsorptance: req.freeTopAbsorptance });
  if (req.freeTopAbsorptance && !(objective instanceof StepObjective)) {
    throw new UserError('a free top-cell absorptance needs ideal step subcells without coupling, reflectance or interlayer loss');
  }
  const edges = weightedBandEdgeEnergiesEv(req.spectra, req.spanEv[0], req.spanEv[1]);
  const bound = req.constraints.map((c, i) => (c.kind === 'material' && c.family.kind === 'alloy' && !c.fullRange ? i : -1)).filter((i) => i >= 0);
  const loose = req.constraints.map((c): SubcellConstraint => (c.kind === 'material' && c.family.kind === 'alloy' && !c.fullRange ? { kind: 'free' } : c));
  return { objective, edges, problem: problemFor(req, req.constraints), looseProblem: bound.length > 0 ? problemFor(req, loose) : undefined, bound };
}

function assembleDesign(req: DesignSearchRequest, prep: PreparedDesign, result: SearchResult, unconstrained?: SearchResult): DesignSearchResult {
  const { objective } = prep;
  const warnings: string[] = [];
  const tempK = req.template.tempK;
  const compositions: CompositionNote[] = [];
  req.constraints.forEach((c, i) => {
    if (c.kind !== 'material') return;
    const g = result.best.gapsEv[i];
    const d = describeGap(c.family, gapAtReference(c.family, g, tempK));
    compositions.push({ subcell: i, family: c.family.id, familyName: c.family.name, fixedCompound: c.family.kind === 'fixed', gapEv: g, compositions: d.compositions, inWindow: d.inWindow, note: d.note });
    if (c.fullRange && !d.inWindow) warnings.push(`subcell ${i + 1}: ${g.toFixed(3)} eV lies outside the practical window of ${c.family.name} (${c.family.window.gapEv[0]}–${c.family.window.gapEv[1]} eV): ${c.family.window.reason}`);
  });
  if (unconstrained) {
    for (const i of prep.bound) {
      const c = req.constraints[i] as Extract<SubcellConstraint, { kind: 'material' }>;
      const g = unconstrained.best.gapsEv[i];
      const [lo, hi] = constraintBounds(c, tempK).range as [number, number];
      if (g < lo - 5e-4 || g > hi + 5e-4) {
        warnings.push(
          `subcell ${i + 1}: the unconstrained optimum (${g.toFixed(3)} eV, ${(unconstrained.best.value * 100).toFixed(2)} %) lies outside the practical window of ${c.family.name} ` +
            `(${lo.toFixed(3)}–${hi.toFixed(3)} eV at ${tempK} K); within the window the best is ${(result.best.value * 100).toFixed(2)} % at ${result.best.gapsEv[i].toFixed(3)} eV`,
        );
      }
    }
  }
  let topAbsorptance: number | undefined;
  if (req.freeTopAbsorptance && objective instanceof StepObjective) topAbsorptance = objective.bestTopAbsorptance(result.best.gapsEv).absorptance;
  const compositionTolerance = result.tolerance.intervals.flatMap((t) => {
    const c = req.constraints[t.subcell];
    if (c?.kind !== 'material') return [];
    const ci = compositionInterval(c.family, t.subcell, t.gapEv, t.lowEv, t.highEv, tempK);
    return ci ? [ci] : [];
  });
  return { result, objective, topAbsorptance, compositions, warnings, unconstrained, compositionTolerance };
}

/**
 * Answer a design question in this thread: the global search over the allowed
 * gaps [eV] (docs/PHYSICS.md §6), compositions for subcells bound to an absorber
 * family (§7), and warnings when a practical window binds.
 */
export function runDesignSearch(req: DesignSearchRequest): DesignSearchResult {
  const prep = prepareDesign(req);
  const result = searchGaps(prep.objective, prep.problem, prep.edges);
  const unconstrained = prep.looseProblem ? searchGaps(prep.objective, prep.looseProblem, prep.edges) : undefined;
  return assembleDesign(req, prep, result, unconstrained);
}

/** Answer a design question with the enumeration shared across worker threads. */
export async function runDesignSearchParallel(req: DesignSearchRequest, threads: number): Promise<DesignSearchResult> {
  const prep = prepareDesign(req);
  const result = await searchGapsParallel(prep.objective, prep.problem, prep.edges, threads);
  const unconstrained = prep.looseProblem ? await searchGapsParallel(prep.objective, prep.looseProblem, prep.edges, threads) : undefined;
  return assembleDesign(req, prep, result, unconstrained);
}

/**
 * Under an ensemble, material-bound subcells carry their family's dE_g/dT so
 * every member's cell temperature moves their gaps (stated at 300 K;
 * docs/PHYSICS.md §10). Slopes already given on the template are kept.
 */
export function withFamilySlopes(template: StackSpec, constraints: SubcellConstraint[]): StackSpec {
  return {
    ...template,
    subcells: template.subcells.map((c, i) => {
      const k = constraints[i];
      return k?.kind === 'material' && c.dEgDtEvPerK === undefined ? { ...c, dEgDtEvPerK: k.family.dEgDtEvPerK } : c;
    }),
  };
}
