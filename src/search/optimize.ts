/**
 * Global search for the gaps of a stack (docs/PHYSICS.md §6): enumerate ordered
 * combinations on a coarse axis that also holds the spectrum's band edges,
 * keep every combination within a margin of the best, refine many distinct
 * seeds locally to sub-meV, and report the best, the runner-up basins and the
 * tolerance region.
 */
import { availableParallelism } from 'node:os';
import { ParameterError, ref, says } from '../errors.js';
import { enumerationThreads } from './thread-plan.js';
import { bandEdgeEnergiesEv, gapAxis } from './axis.js';
import { enumerateGeneric, enumerateStep, type Candidate, type EnumerationResult } from './enumerate.js';
import { compassMax, nelderMeadMax, type Box } from './refine.js';
import { goldenSectionMax } from '../numerics/golden.js';
import type { GapObjective } from '../stack/gap-objective.js';
import { StepObjective } from '../stack/step-objective.js';
import { clockSeconds } from '../io/clock.js';

/** What the global search may vary: number of subcells, gap span [eV], per-subcell ranges or fixed gaps [eV], grid step [eV] and the tolerance loss [-]. */
export interface SearchProblem {
  cells: number;
  /** Global gap span [eV], default 0.5–2.6. */
  spanEv: [number, number];
  /** Per-subcell gap range [eV] (undefined: the span). */
  ranges: ([number, number] | undefined)[];
  /** Per-subcell fixed gap [eV]. */
  fixed: (number | undefined)[];
  /** Coarse grid step [eV]; default by number of free subcells. */
  stepEv?: number;
  /** Relative loss that defines the tolerance region [-], default 0.01. */
  loss: number;
  /** Candidate margin (relative) kept from the coarse pass [-]. */
  margin?: number;
  /** Seeds refined locally. */
  seeds?: number;
  /**
   * Only the optimum is wanted (a batch over sites): no tolerance region (left
   * empty), no runner-up basins, and a one-gap scan that looks at every fourth
   * grid point and every band edge first, then at every grid point around the
   * promising ones (the same optimum, tested against the full scan).
   */
  optimumOnly?: boolean;
  progress?: (fraction: number) => void;
}

/** A local optimum: gaps [eV], top first, and the objective there [-]. */
export interface Basin {
  gapsEv: number[];
  value: number;
}

/** How far one gap may move alone, the others at the optimum, within the allowed loss [eV]. */
export interface ToleranceInterval {
  /** 0-based subcell index. */
  subcell: number;
  gapEv: number;
  lowEv: number;
  highEv: number;
  /** The interval reaches the edge of the allowed range there: the true edge lies beyond. */
  openLow: boolean;
  openHigh: boolean;
}

/** The tolerance region: threshold (1 − loss)·best [-] and one interval per free subcell. */
export interface ToleranceRegion {
  loss: number;
  threshold: number;
  /** Slices through the optimum, other gaps held at their optimum. */
  intervals: ToleranceInterval[];
}

/** The global search's answer: best stack, runner-up basins, tolerance region, the bounds used [eV] and statistics. */
export interface SearchResult {
  best: Basin;
  basins: Basin[];
  tolerance: ToleranceRegion;
  stats: { stepEv: number; axisPoints: number; edgePoints: number; leaves: number; pruned: number; seeds: number; evaluations: number; seconds: number };
  /** Bounds actually used per subcell [eV]. */
  bounds: [number, number][];
}

/** Default coarse step [eV] by number of free subcells. */
export function defaultStepEv(free: number): number {
  return [0.005, 0.005, 0.005, 0.01, 0.02, 0.03, 0.04][Math.min(free, 6)];
}

/** Per-subcell bounds [eV] after span, ranges and fixed gaps, checked for feasibility. */
export function subcellBounds(p: SearchProblem): [number, number][] {
  const [s0, s1] = p.spanEv;
  if (!(s0 > 0 && s1 > s0)) throw new ParameterError('spanEv', 'a positive range [low, high] with low < high [eV]', says`${ref('spanEv')} must be a positive range low:high in eV, got ${s0}:${s1}`);
  const bounds: [number, number][] = [];
  for (let i = 0; i < p.cells; i++) {
    const f = p.fixed[i];
    const r = p.ranges[i];
    if (f !== undefined && r !== undefined) throw new ParameterError(`fixedEv[${i}]`, 'a gap or a range per subcell, not both', says`subcell ${i + 1} is both fixed and given a range; choose one`);
    if (f !== undefined) {
      if (!(f > 0)) throw new ParameterError(`fixedEv[${i}]`, 'a positive gap [eV]', says`${ref(`fixedEv[${i}]`)}=${f}: gap must be positive eV`);
      bounds.push([f, f]);
    } else if (r) {
      const lo = Math.max(r[0], s0);
      const hi = Math.min(r[1], s1);
      if (!(hi >= lo)) throw new ParameterError(`rangesEv[${i}]`, `a range overlapping the span ${s0}–${s1} eV`, says`${ref(`rangesEv[${i}]`)}=${r[0]}:${r[1]} lies outside the span ${s0}:${s1} eV`);
      bounds.push([lo, hi]);
    } else bounds.push([s0, s1]);
  }
  // Ordering: each subcell must be able to sit below the one above.
  for (let i = 1; i < p.cells; i++) {
    if (!(bounds[i][0] < bounds[i - 1][1])) {
      throw new ParameterError(
        `rangesEv[${i}]`,
        `gaps below those of subcell ${i} (≤ ${bounds[i - 1][1]} eV)`,
        says`subcell ${i + 1} (≥ ${bounds[i][0]} eV) cannot lie below subcell ${i} (≤ ${bounds[i - 1][1]} eV): gaps must descend from the top`,
      );
    }
  }
  return bounds;
}

function distinctSeeds(cands: Candidate[], count: number, radius: number): Candidate[] {
  const seeds: Candidate[] = [];
  for (const c of cands) {
    if (seeds.length >= count) break;
    if (seeds.every((s) => s.gapsEv.some((g, i) => Math.abs(g - c.gapsEv[i]) > radius))) seeds.push(c);
  }
  return seeds;
}

/** Everything a search needs before enumeration. */
interface PreparedSearch {
  n: number;
  bounds: [number, number][];
  freeIdx: number[];
  fast: boolean;
  step: number;
  axis: Float64Array;
  ranges: [number, number][];
  margin: number;
  edgeCount: number;
  /** Ordered combinations on the coarse axis (an estimate of the leaves). */
  combinations: number;
  t0: number;
}

function prepareSearch(obj: GapObjective, p: SearchProblem, edgeEnergiesEv: number[]): PreparedSearch {
  const t0 = clockSeconds();
  const n = p.cells;
  if (!(n >= 1 && n <= 6)) throw new ParameterError('cells', '1 to 6', says`${ref('cells')} must be 1 to 6, got ${n}`);
  if (obj.cells !== n) throw new Error('objective and problem disagree on the number of subcells');
  if (!(p.loss > 0 && p.loss < 0.5)) throw new ParameterError('loss', 'a relative loss within (0, 0.5)', says`${ref('loss')} must be a relative loss within (0, 0.5), got ${p.loss}`);
  const bounds = subcellBounds(p);
  const freeIdx = bounds.map((b, i) => (b[0] === b[1] ? -1 : i)).filter((i) => i >= 0);
  const fast = obj instanceof StepObjective;
  const step = p.stepEv ?? (fast ? defaultStepEv(freeIdx.length) : Math.max(0.02, defaultStepEv(freeIdx.length) * 2));
  if (!(step >= 1e-4 && step <= 0.2)) throw new ParameterError('stepEv', '0.0001–0.2 [eV]', says`${ref('stepEv')} must be within 0.0001–0.2 eV, got ${step}`);
  const fixedValues = bounds.filter((b) => b[0] === b[1]).map((b) => b[0]);
  const rangeEnds = bounds.flat();
  const lo = Math.min(...bounds.map((b) => b[0]));
  const hi = Math.max(...bounds.map((b) => b[1]));
  const edges = edgeEnergiesEv.filter((e) => e > lo && e < hi);
  const axis = gapAxis(lo, hi, step, [...edges, ...fixedValues, ...rangeEnds]);
  const ranges: [number, number][] = bounds.map(([a, b]) => {
    let i0 = 0;
    while (i0 < axis.length && axis[i0] < a - 1e-12) i0++;
    let i1 = axis.length - 1;
    while (i1 >= 0 && axis[i1] > b + 1e-12) i1--;
    return [i0, i1];
  });
  const width = Math.max(...ranges.map(([a, b]) => b - a + 1));
  const combinations = width ** freeIdx.length / factorial(freeIdx.length);
  const limit = fast ? 5e10 : 2e7;
  if (combinations > limit) {
    throw new ParameterError(
      'stepEv',
      `a step that leaves at most ${limit.toExponential(0)} combinations`,
      says`about ${combinations.toExponential(1)} gap combinations at a ${step * 1000} meV grid step; use a coarser ${ref('stepEv')} (refinement goes below 1 meV anyway) or narrower ranges`,
    );
  }
  return { n, bounds, freeIdx, fast, step, axis, ranges, margin: p.margin ?? 0.01, edgeCount: edges.length, combinations, t0 };
}

/**
 * The global search in this thread (docs/PHYSICS.md §6): enumerate ordered gaps
 * [eV] on a coarse axis holding the spectrum's band edges, refine distinct seeds
 * below 1 meV, report the best, runner-up basins and the tolerance region.
 * @throws ParameterError naming the parameter of `p` at fault
 */
export function searchGaps(obj: GapObjective, p: SearchProblem, edgeEnergiesEv: number[] = []): SearchResult {
  return searchPrepared(obj, p, prepareSearch(obj, p, edgeEnergiesEv));
}

function searchPrepared(obj: GapObjective, p: SearchProblem, prep: PreparedSearch, incumbent?: number): SearchResult {
  if (prep.freeIdx.length === 1) return searchOneGap(obj, p, prep);
  let evaluations = 0;
  const value = (gaps: number[]) => {
    evaluations++;
    return obj.value(gaps);
  };
  const { axis, ranges, margin } = prep;
  const en = prep.fast
    ? enumerateStep(obj as StepObjective, { axis, ranges, margin, progress: p.progress, initialBest: incumbent ?? coarseIncumbent(obj as StepObjective, axis, ranges) })
    : enumerateGeneric(value, prep.n, axis, ranges, margin, p.progress);
  return finishSearch(obj, p, prep, en, evaluations);
}

/**
 * A question with one free gap, as a one-dimensional maximisation: bracket
 * every local maximum on the axis (which holds the spectrum's band edges, so
 * narrow basins at an edge are seen), then refine each bracket within the
 * margin of the best by golden section to 1 µeV. No enumeration tree, no
 * simplex: a few hundred evaluations in all.
 */
function searchOneGap(obj: GapObjective, p: SearchProblem, prep: PreparedSearch): SearchResult {
  const { bounds, freeIdx, step, axis, ranges, margin, t0 } = prep;
  const cell = freeIdx[0];
  let evaluations = 0;
  const gaps = bounds.map((b) => b[0]);
  const at = (e: number): number => {
    evaluations++;
    gaps[cell] = e;
    return obj.value(gaps);
  };
  const value = (g: number[]) => {
    evaluations++;
    return obj.value(g);
  };
  // Bracket: the value at every axis point in the cell's range strictly between its fixed neighbours.
  const above = cell > 0 ? bounds[cell - 1][0] : Infinity;
  const below = cell < bounds.length - 1 ? bounds[cell + 1][0] : -Infinity;
  let [lo, hi] = ranges[cell];
  while (lo <= hi && !(axis[lo] > below)) lo++;
  while (hi >= lo && !(axis[hi] < above)) hi--;
  if (hi < lo) throw new ParameterError('spanEv', 'gaps at which some stack produces power', says`no stack in the allowed ranges produces power; check ${ref('spanEv')}, ${ref('rangesEv')} and ${ref('fixedEv')}`);
  const xs = axis.subarray(lo, hi + 1);
  // NaN marks a point not evaluated (optimum-only scans skip the unpromising ones).
  const vs = new Float64Array(xs.length).fill(NaN);
  const scan = (k: number) => {
    if (Number.isNaN(vs[k])) vs[k] = at(xs[k]);
  };
  if (p.optimumOnly) {
    // Every fourth grid point, every band edge and range end, and both ends; then every point
    // between the coarse neighbours of each coarse local maximum within the margin.
    const coarse: number[] = [];
    for (let k = 0; k < xs.length; k++) {
      const q = (xs[k] - axis[0]) / step;
      const onGrid = Math.abs(q - Math.round(q)) < 1e-6;
      if (!onGrid || Math.round(q) % 4 === 0 || k === 0 || k === xs.length - 1) coarse.push(k);
    }
    coarse.forEach((k, c) => {
      scan(k);
      if (p.progress && c % 16 === 0) p.progress((0.4 * c) / coarse.length);
    });
    let coarseBest = 0;
    for (const k of coarse) if (vs[k] > coarseBest) coarseBest = vs[k];
    coarse.forEach((k, c) => {
      const left = c === 0 ? -Infinity : vs[coarse[c - 1]];
      const right = c === coarse.length - 1 ? -Infinity : vs[coarse[c + 1]];
      if (!(vs[k] >= left && vs[k] >= right && vs[k] >= coarseBest * (1 - margin))) return;
      const from = c === 0 ? k : coarse[c - 1];
      const to = c === coarse.length - 1 ? k : coarse[c + 1];
      for (let j = from; j <= to; j++) scan(j);
    });
  } else {
    for (let k = 0; k < xs.length; k++) {
      scan(k);
      if (p.progress && k % 16 === 0) p.progress((0.8 * k) / xs.length);
    }
  }
  let bestScan = 0;
  for (let k = 0; k < vs.length; k++) if (vs[k] > bestScan) bestScan = vs[k];
  if (!(bestScan > 0)) throw new ParameterError('spanEv', 'gaps at which some stack produces power', says`no stack in the allowed ranges produces power; check ${ref('spanEv')}, ${ref('rangesEv')} and ${ref('fixedEv')}`);
  // Local maxima among evaluated points whose evaluated neighbours are both lower (a point beside an
  // unevaluated one is not a peak: in an optimum-only scan that side was found unpromising).
  const peaks: number[] = [];
  for (let k = 0; k < vs.length; k++) {
    if (Number.isNaN(vs[k])) continue;
    const left = k === 0 ? -Infinity : vs[k - 1];
    const right = k === vs.length - 1 ? -Infinity : vs[k + 1];
    if (vs[k] >= left && vs[k] >= right && vs[k] >= bestScan * (1 - margin)) peaks.push(k);
  }
  peaks.sort((a, b) => vs[b] - vs[a]);
  const seeds = peaks.slice(0, p.seeds ?? 40);
  // Refine: golden section inside the neighbouring axis points, never worse than the scan.
  const [blo, bhi] = bounds[cell];
  const refined: Basin[] = seeds.map((k) => {
    const a = Math.max(blo, xs[Math.max(0, k - 1)]);
    const b = Math.min(bhi, xs[Math.min(xs.length - 1, k + 1)]);
    const x = b > a ? goldenSectionMax(at, a, b, 1e-6) : xs[k];
    const v = at(x);
    const g = bounds.map((bb) => bb[0]);
    g[cell] = v >= vs[k] ? x : xs[k];
    return { gapsEv: g, value: Math.max(v, vs[k]) };
  });
  refined.sort((a, b) => b.value - a.value);
  const basins: Basin[] = [];
  for (const r of refined) if (basins.every((b) => Math.abs(b.gapsEv[cell] - r.gapsEv[cell]) > 0.003)) basins.push(r);
  const best = basins[0];
  p.progress?.(0.9);
  return {
    best,
    ...regionAndRunnersUp(p, value, best, basins, bounds),
    bounds,
    stats: { stepEv: step, axisPoints: axis.length, edgePoints: prep.edgeCount, leaves: vs.reduce((c, v) => (Number.isNaN(v) ? c : c + 1), 0), pruned: 0, seeds: seeds.length, evaluations, seconds: clockSeconds() - t0 },
  };
}

/**
 * The global search with the enumeration shared across worker threads (a
 * piscina pool) when the work is large enough for the machine's cores
 * (`enumerationThreads`; `'force'` uses `maxThreads` whatever the size).
 * Each worker takes interleaved values of the top gap and starts from the
 * best of the coarser pass, so pruning bites at once. The answer does not
 * depend on the threads.
 */
export async function searchGapsParallel(
  obj: GapObjective,
  p: SearchProblem,
  edgeEnergiesEv: number[] = [],
  maxThreads = 2,
  plan: 'auto' | 'force' = 'auto',
  cores = availableParallelism(),
): Promise<SearchResult> {
  const prep = prepareSearch(obj, p, edgeEnergiesEv);
  if (!prep.fast) return searchPrepared(obj, p, prep);
  const so = obj as StepObjective;
  const threads = plan === 'force' ? maxThreads : enumerationThreads({ combinations: prep.combinations, spectra: so.spectra.length, cores, maxThreads });
  if (threads < 2) return searchPrepared(obj, p, prep);
  const incumbent = coarseIncumbent(so, prep.axis, prep.ranges);
  const [lo0, hi0] = prep.ranges[0];
  const tops: number[][] = Array.from({ length: threads }, () => []);
  for (let g = hi0, k = 0; g >= lo0; g--, k++) tops[k % threads].push(g);
  const { runEnumerationTasks } = await import('./pool.js');
  const parts = await runEnumerationTasks(
    tops.map((firstIndices) => ({ objective: so.options, axis: prep.axis, ranges: prep.ranges, margin: prep.margin, firstIndices, initialBest: incumbent })),
    threads,
    p.progress,
  );
  const best = parts.reduce((a, b) => (b.best.value > a.best.value ? b : a)).best;
  const cut = best.value * (1 - prep.margin);
  const en: EnumerationResult = {
    best,
    candidates: parts.flatMap((r) => r.candidates).filter((c) => c.value >= cut).sort((a, b) => b.value - a.value),
    leaves: parts.reduce((a, r) => a + r.leaves, 0),
    pruned: parts.reduce((a, r) => a + r.pruned, 0),
    solved: parts.reduce((a, r) => a + r.solved, 0),
  };
  if (!(best.gapsEv.length > 0)) return searchGaps(obj, p, edgeEnergiesEv);
  return finishSearch(obj, p, prep, en, 0);
}

/**
 * An achievable value to prune against from the start: the best of the same
 * enumeration on every other axis point, itself seeded the same way. Its
 * points lie on the finer axis, so the finer pass always meets or beats it.
 */
function coarseIncumbent(obj: StepObjective, axis: Float64Array, ranges: [number, number][]): number {
  if (axis.length < 48) return 0;
  const coarseAxis = Float64Array.from({ length: Math.ceil(axis.length / 2) }, (_, k) => axis[2 * k]);
  const coarseRanges = ranges.map(([a, b]): [number, number] => [Math.ceil(a / 2), Math.floor(b / 2)]);
  if (!coarseRanges.every(([a, b]) => b >= a)) return 0;
  const seed = coarseIncumbent(obj, coarseAxis, coarseRanges);
  const r = enumerateStep(obj, { axis: coarseAxis, ranges: coarseRanges, margin: 0, initialBest: seed });
  return r.best.gapsEv.length > 0 ? r.best.value * (1 - 1e-12) : seed;
}

function factorial(k: number): number {
  return k <= 1 ? 1 : k * factorial(k - 1);
}

function finishSearch(obj: GapObjective, p: SearchProblem, prep: PreparedSearch, en: EnumerationResult, evaluationsSoFar: number): SearchResult {
  const { n, bounds, freeIdx, fast, step, axis, t0 } = prep;
  let evaluations = evaluationsSoFar;
  const value = (gaps: number[]) => {
    evaluations++;
    return obj.value(gaps);
  };
  if (!(en.best.value > 0)) throw new ParameterError('spanEv', 'gaps at which some stack produces power', says`no stack in the allowed ranges produces power; check ${ref('spanEv')}, ${ref('rangesEv')} and ${ref('fixedEv')}`);
  evaluations += fast ? en.solved : 0;

  // Refine distinct seeds over the free gaps only.
  const seeds = distinctSeeds(en.candidates, p.seeds ?? (n <= 2 ? 40 : 24), 1.5 * step);
  const box: Box = { lo: freeIdx.map((i) => bounds[i][0]), hi: freeIdx.map((i) => bounds[i][1]) };
  const full = (free: number[]) => {
    const g = bounds.map((b) => b[0]);
    freeIdx.forEach((i, k) => (g[i] = free[k]));
    return g;
  };
  const f = (free: number[]) => value(full(free));
  const refined: Basin[] = [];
  for (const s of seeds) {
    const x0 = freeIdx.map((i) => s.gapsEv[i]);
    const nm = nelderMeadMax(f, x0, step / 2, box, 2e-6, 3000);
    const polished = compassMax(f, nm.x, 0.002, box, 2e-5);
    refined.push({ gapsEv: full(polished.x), value: polished.value });
  }
  refined.sort((a, b) => b.value - a.value);
  const basins: Basin[] = [];
  for (const r of refined) if (basins.every((b) => b.gapsEv.some((g, i) => Math.abs(g - r.gapsEv[i]) > 0.003))) basins.push(r);
  const best = basins[0];
  return {
    best,
    ...regionAndRunnersUp(p, value, best, basins, bounds),
    bounds,
    stats: {
      stepEv: step,
      axisPoints: axis.length,
      edgePoints: prep.edgeCount,
      leaves: en.leaves,
      pruned: en.pruned,
      seeds: seeds.length,
      evaluations,
      seconds: clockSeconds() - t0,
    },
  };
}

/**
 * The tolerance region and the runner-up basins (up to seven, best first) of a
 * search. An optimum-only question gets neither: the region keeps its
 * threshold with no intervals, and no basins.
 */
function regionAndRunnersUp(p: SearchProblem, value: (g: number[]) => number, best: Basin, basins: Basin[], bounds: [number, number][]): { tolerance: ToleranceRegion; basins: Basin[] } {
  if (p.optimumOnly) return { tolerance: { loss: p.loss, threshold: best.value * (1 - p.loss), intervals: [] }, basins: [] };
  return { tolerance: toleranceIntervals(value, best, bounds, p.loss), basins: basins.slice(1, 8) };
}

/** Slice intervals of the tolerance region: each free gap moved alone, others at the optimum. */
function toleranceIntervals(value: (g: number[]) => number, best: Basin, bounds: [number, number][], loss: number): ToleranceRegion {
  const threshold = best.value * (1 - loss);
  const intervals: ToleranceInterval[] = [];
  best.gapsEv.forEach((g0, i) => {
    if (bounds[i][0] === bounds[i][1]) return;
    const at = (e: number) => {
      const g = best.gapsEv.slice();
      g[i] = e;
      return value(g);
    };
    const edge = (dir: 1 | -1): { e: number; open: boolean } => {
      const limitOrder = dir > 0 ? (i > 0 ? best.gapsEv[i - 1] : Infinity) : i < best.gapsEv.length - 1 ? best.gapsEv[i + 1] : -Infinity;
      const limit = dir > 0 ? Math.min(bounds[i][1], limitOrder - 1e-6) : Math.max(bounds[i][0], limitOrder + 1e-6);
      let inside = g0;
      let h = 0.001;
      for (;;) {
        const next = inside + dir * h;
        if ((dir > 0 && next >= limit) || (dir < 0 && next <= limit)) {
          if (at(limit) >= threshold) return { e: limit, open: true };
          return { e: bisect(at, inside, limit, threshold), open: false };
        }
        if (at(next) < threshold) return { e: bisect(at, inside, next, threshold), open: false };
        inside = next;
        h = Math.min(h * 1.5, 0.02);
      }
    };
    const low = edge(-1);
    const high = edge(1);
    intervals.push({ subcell: i, gapEv: g0, lowEv: low.e, highEv: high.e, openLow: low.open, openHigh: high.open });
  });
  return { loss, threshold, intervals };
}

function bisect(f: (e: number) => number, inside: number, outside: number, threshold: number): number {
  let a = inside;
  let b = outside;
  for (let k = 0; k < 60 && Math.abs(b - a) > 1e-6; k++) {
    const m = 0.5 * (a + b);
    if (f(m) >= threshold) a = m;
    else b = m;
  }
  return 0.5 * (a + b);
}

export { bandEdgeEnergiesEv };
