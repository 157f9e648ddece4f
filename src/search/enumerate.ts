/**
 * Exhaustive enumeration of ordered gap combinations on an axis
 * (E_1 > E_2 > …, top first), by depth-first branch and bound: a subtree is
 * cut when an upper bound on its power cannot reach the running threshold.
 * Bounds (step absorbers, no coupling): the common series current is at most
 * the smallest band current, and the cells still to place share the photons
 * below the last gap; no subcell's Voc exceeds that of the next-higher gap
 * with all remaining photons.
 */
import { ELEMENTARY_CHARGE_C, HC_EV_NM, thermalVoltageV } from '../physics/constants.js';
import { photonFluxAt } from '../light/spectrum.js';
import { singlePowerWm2, type StepObjective } from '../stack/step-objective.js';
import { CandidateKeeper, type Candidate } from './candidates.js';
import { lastIndexNotPast } from '../numerics/sorted.js';

export type { Candidate } from './candidates.js';

export interface EnumerationResult {
  best: Candidate;
  /** Every leaf within `margin` (relative) of the best, best first. */
  candidates: Candidate[];
  leaves: number;
  pruned: number;
  /** Leaves whose power was actually solved (not cut by a bound). */
  solved: number;
}

export interface EnumerationOptions {
  axis: Float64Array;
  /** Allowed axis index range per cell, inclusive [lo, hi]. */
  ranges: [number, number][];
  /** Keep leaves within this relative loss of the best [-]. */
  margin: number;
  /** Restrict the first cell to these axis indices (for splitting across workers). */
  firstIndices?: number[];
  /** Called every so often with the share of top-level work done. */
  progress?: (fraction: number) => void;
  /** Start from this threshold value (e.g. a known lower bound on the best) [-]. */
  initialBest?: number;
}

/** Per-spectrum tables on the axis, computed once per enumeration. */
interface AxisTables {
  /** q·N(E_g) per spectrum and axis point [A/m²]. */
  qn: Float64Array[];
  /** Radiative J0 per spectrum and axis point [A/m²]. */
  j0: Float64Array[];
  /** Thermal voltage per spectrum [V]. */
  vt: Float64Array;
  weights: Float64Array;
  /** Largest spectral photon current per eV, q·φ_E [A m⁻² eV⁻¹], for the monotone-tail test. */
  maxFluxPerEv: Float64Array;
}

function axisTables(obj: StepObjective, axis: Float64Array): AxisTables {
  const spectra = obj.spectra;
  const tables = obj.axisTables(axis);
  return {
    qn: tables.map((t) => t.qnAm2),
    j0: tables.map((t) => t.j0RadAm2),
    vt: Float64Array.from(spectra, (s) => thermalVoltageV(s.tempK)),
    weights: Float64Array.from(spectra, (s) => s.weight),
    maxFluxPerEv: Float64Array.from(spectra, (ws) => {
      let m = 0;
      const w = ws.spectrum.wavelengthNm;
      const e = ws.spectrum.irradiance;
      // φ_λ as the spectrum defines it, without making its photon-flux table.
      for (let i = 0; i < w.length; i++) m = Math.max(m, (photonFluxAt(e, w, i) * w[i] * w[i]) / HC_EV_NM);
      return ELEMENTARY_CHARGE_C * m;
    }),
  };
}

/** Largest pair table built (spectra × cells × (axis + 1) × axis entries). */
const MAX_PAIR_TABLE = 4e6;

/**
 * Independent wiring: the power [W/m²] of cell `c` with its gap at axis index
 * gi under a cell whose gap is at axis index `top` (top = axis length: nothing
 * above), per spectrum, at p[k][(c·(g+1) + top)·g + gi]. Every leaf and every
 * bound of an independent enumeration is a sum of these, so they are solved
 * once per pair instead of once per leaf (the same calls, so the same values).
 */
function pairPowers(t: AxisTables, ranges: [number, number][], ere: number[]): Float64Array[] | undefined {
  const n = ranges.length;
  const g = t.qn[0]?.length ?? 0;
  if (t.qn.length * n * (g + 1) * g > MAX_PAIR_TABLE) return undefined;
  return t.qn.map((qn, k) => {
    const j0 = t.j0[k];
    const p = new Float64Array(n * (g + 1) * g).fill(NaN);
    for (let c = 0; c < n; c++) {
      const [lo, hi] = ranges[c];
      for (let top = 0; top <= g; top++) {
        const qTop = top === g ? 0 : qn[top];
        const row = (c * (g + 1) + top) * g;
        for (let gi = Math.min(hi, top - 1); gi >= lo; gi--) p[row + gi] = singlePowerWm2(qn[gi] - qTop, j0[gi] / ere[c], t.vt[k]);
      }
    }
    return p;
  });
}

/**
 * Independent wiring: u[m·(g+1) + top] = best power [W/m²] of the last m cells
 * when the first of them receives photons from axis gap `top` downwards
 * (top = axis length: the top of the stack). This dynamic programme makes the
 * independent bound exact for one spectrum.
 */
function independentTails(t: AxisTables, ranges: [number, number][], ere: number[], pairs: Float64Array[] | undefined): Float64Array[] {
  const n = ranges.length;
  const g = t.qn[0]?.length ?? 0;
  const stride = g + 1;
  return t.qn.map((qn, k) => {
    const j0 = t.j0[k];
    const pk = pairs?.[k];
    const u = new Float64Array((n + 1) * stride);
    for (let m = 1; m <= n; m++) {
      const cell = n - m;
      const [lo, hi] = ranges[cell];
      for (let top = 0; top <= g; top++) {
        const qTop = top === g ? 0 : qn[top];
        let bestP = -Infinity;
        for (let gi = Math.min(hi, top - 1); gi >= lo; gi--) {
          const rest = m === 1 ? 0 : u[(m - 1) * stride + gi];
          if (rest === -Infinity) continue;
          const pw = (pk ? pk[(cell * stride + top) * g + gi] : singlePowerWm2(qn[gi] - qTop, j0[gi] / ere[cell], t.vt[k])) + rest;
          if (pw > bestP) bestP = pw;
        }
        u[m * stride + top] = bestP;
      }
    }
    return u;
  });
}

// Current fractions that partition [0, J_bound] for the series bound.
const FRACTIONS = [0, 0.5, 0.7, 0.82, 0.9, 0.95, 0.98, 1];

/**
 * One depth-first walk. The path state (axis index per placed cell and, per
 * spectrum, the running minimum band current, Σ Voc and Σ P of the cells
 * placed) lives in typed arrays; each step of the walk is a named method.
 */
class StepWalk {
  readonly n: number;
  readonly ns: number;
  readonly idx: Int32Array;
  private readonly qnCell: Float64Array;
  private readonly j0Cell: Float64Array;
  private readonly minJ: Float64Array;
  private readonly vocSum: Float64Array;
  private readonly powerSum: Float64Array;
  private readonly tail: Float64Array[];
  private readonly pairs: Float64Array[] | undefined;
  private readonly stride: number;
  private readonly axisLength: number;
  private readonly series: boolean;
  readonly canPrune: boolean;
  private readonly topA: number | 'free';
  private readonly ere: number[];
  private readonly pin: number;
  private readonly lowestIndex: number;
  /** Set by leafBound: lowering the bottom gap further can only lower the bound. */
  monotoneTail = false;
  leaves = 0;
  pruned = 0;
  solved = 0;

  constructor(
    private readonly obj: StepObjective,
    private readonly t: AxisTables,
    private readonly ranges: [number, number][],
    readonly keeper: CandidateKeeper,
  ) {
    this.n = obj.cells;
    this.ns = obj.spectra.length;
    this.idx = new Int32Array(this.n);
    this.qnCell = new Float64Array(this.n);
    this.j0Cell = new Float64Array(this.n);
    const size = this.ns * (this.n + 1);
    this.minJ = new Float64Array(size);
    this.vocSum = new Float64Array(size);
    this.powerSum = new Float64Array(size);
    this.series = obj.options.wiring === 'series';
    this.topA = obj.options.topAbsorptance;
    this.canPrune = this.topA === 1;
    this.ere = obj.options.ere;
    this.pin = obj.incidentPowerWm2;
    this.lowestIndex = ranges[this.n - 1][0];
    this.axisLength = t.qn[0]?.length ?? 0;
    this.stride = this.axisLength + 1;
    this.pairs = !this.series && this.canPrune ? pairPowers(t, ranges, this.ere) : undefined;
    this.tail = !this.series && this.canPrune ? independentTails(t, ranges, this.ere, this.pairs) : [];
  }

  private threshold(): number {
    return this.keeper.threshold();
  }

  /** Whether a bound may cut: only once some achievable value is known. */
  private cuts(bound: number): boolean {
    return this.keeper.bestValue > 0 && bound < this.threshold();
  }

  /** Full leaf value [-] through the objective (any top absorptance, any wiring). */
  leafValue(): number {
    const { qn, j0, weights } = this.t;
    const n = this.n;
    let p = 0;
    for (let k = 0; k < this.ns; k++) {
      for (let i = 0; i < n; i++) {
        this.qnCell[i] = qn[k][this.idx[i]];
        this.j0Cell[i] = j0[k][this.idx[i]];
      }
      let a = this.topA === 'free' ? 1 : this.topA;
      if (this.topA === 'free' && n > 1) a = matched(this.qnCell[0], this.qnCell[1] - this.qnCell[0]);
      p += weights[k] * this.obj.powerFromTables(k, this.qnCell, this.j0Cell, a);
    }
    return p / this.pin;
  }

  /** Independent wiring: the cells above are already summed; only the bottom cell is new. */
  leafValueIndependent(): number {
    const { qn, j0, vt, weights } = this.t;
    const n = this.n;
    const b = this.idx[n - 1];
    let p = 0;
    const top = n > 1 ? this.idx[n - 2] : this.axisLength;
    const at = ((n - 1) * this.stride + top) * this.axisLength + b;
    for (let k = 0; k < this.ns; k++) {
      const above = n > 1 ? this.powerSum[k * (n + 1) + n - 1] : 0;
      if (this.pairs) {
        p += weights[k] * (above + this.pairs[k][at]);
        continue;
      }
      const band = qn[k][b] - (n > 1 ? qn[k][this.idx[n - 2]] : 0);
      p += weights[k] * (above + singlePowerWm2(band, j0[k][b] / this.ere[n - 1], vt[k]));
    }
    return p / this.pin;
  }

  /** Cheap leaf bound J_min·Σ Voc (series) from the partial sums of the cells above: one log per spectrum. */
  leafBound(): number {
    if (!this.canPrune || !this.series) return Infinity;
    const { qn, j0, vt, weights, maxFluxPerEv } = this.t;
    const n = this.n;
    const b = this.idx[n - 1];
    let p = 0;
    this.monotoneTail = n > 1;
    for (let k = 0; k < this.ns; k++) {
      const base = k * (n + 1) + n - 1;
      const band = qn[k][b] - (n > 1 ? qn[k][this.idx[n - 2]] : 0);
      const jmin = n > 1 ? Math.min(this.minJ[base], band) : band;
      // Past the current match, lowering the bottom gap only lowers this bound while
      // d ln J0/dE (≈ 1/kT) outweighs d ln J_ph/dE (≤ q·φ_E,max / J_ph).
      if (!(n > 1 && band >= this.minJ[base] && band > vt[k] * maxFluxPerEv[k])) this.monotoneTail = false;
      const voc = (n > 1 ? this.vocSum[base] : 0) + vt[k] * Math.log1p(band / (j0[k][b] / this.ere[n - 1]));
      p += weights[k] * jmin * voc;
    }
    return p / this.pin;
  }

  /** Highest axis index g in [lowestIndex, below) with q·N(E_g) ≥ target (−1 if none). */
  private highestCollecting(k: number, below: number, target: number): number {
    const q = this.t.qn[k];
    const lowest = this.lowestIndex;
    if (below - 1 < lowest || q[lowest] < target) return -1;
    return lastIndexNotPast(q, target, lowest, below - 1, true);
  }

  /** Upper bound [-] on the value of any completion of the first `depth` cells, all spectra. */
  subtreeBound(depth: number): number {
    const { qn, j0, vt, weights } = this.t;
    const n = this.n;
    const last = this.idx[depth - 1];
    const left = n - depth;
    let p = 0;
    for (let k = 0; k < this.ns; k++) {
      const base = k * (n + 1) + depth;
      const remaining = qn[k][this.lowestIndex] - qn[k][last];
      if (!(remaining > 0)) return 0;
      if (!this.series) {
        p += weights[k] * (this.powerSum[base] + this.tail[k][left * this.stride + last]);
        continue;
      }
      // Operating current J ≤ J_b. With J in [f_a, f_b]·J_b, remaining cell j must collect
      // j·J photons below the last gap, so its gap is at most E*_j(f_a·J_b); its Voc is at
      // most V_t ln(R/J0(E*_j) + 1), and Voc falls as the gap falls.
      const jb = Math.min(this.minJ[base], remaining / left);
      let bestK = 0;
      for (let f = 1; f < FRACTIONS.length; f++) {
        const ja = FRACTIONS[f - 1] * jb;
        let sCap = 0;
        for (let j = 1; j <= left; j++) {
          const g = this.highestCollecting(k, last, qn[k][last] + j * ja);
          if (g < 0) {
            sCap = -Infinity;
            break;
          }
          sCap += vt[k] * Math.log1p(remaining / j0[k][g]);
        }
        const b = FRACTIONS[f] * jb * (this.vocSum[base] + sCap);
        if (b > bestK) bestK = b;
      }
      p += weights[k] * bestK;
    }
    return p / this.pin;
  }

  /** Record the partial sums for cell `depth` placed at axis index gi. */
  extendPath(depth: number, gi: number): void {
    const { qn, j0, vt } = this.t;
    const n = this.n;
    for (let k = 0; k < this.ns; k++) {
      const prev = k * (n + 1) + depth;
      const here = prev + 1;
      const band = qn[k][gi] - (depth === 0 ? 0 : qn[k][this.idx[depth - 1]]);
      const j0i = j0[k][gi] / this.ere[depth];
      const voc = band > 0 ? vt[k] * Math.log1p(band / j0i) : 0;
      this.minJ[here] = depth === 0 ? band : Math.min(this.minJ[prev], band);
      this.vocSum[here] = (depth === 0 ? 0 : this.vocSum[prev]) + voc;
      const top = depth === 0 ? this.axisLength : this.idx[depth - 1];
      const pw = this.series ? 0 : this.pairs ? this.pairs[k][(depth * this.stride + top) * this.axisLength + gi] : singlePowerWm2(band, j0i, vt[k]);
      this.powerSum[here] = (depth === 0 ? 0 : this.powerSum[prev]) + pw;
    }
  }

  /**
   * Visit the bottom cell at the current path. Returns false when the rest of
   * this descending run of bottom gaps can be skipped (monotone tail).
   */
  visitLeaf(axis: Float64Array, mayStopRun: boolean): boolean {
    this.leaves++;
    if (this.cuts(this.leafBound())) {
      this.pruned++;
      return !(this.monotoneTail && mayStopRun);
    }
    this.solved++;
    const v = !this.series && this.canPrune ? this.leafValueIndependent() : this.leafValue();
    this.keeper.offer(() => Array.from(this.idx, (q) => axis[q]), v);
    return true;
  }

  /** Whether cell `depth` at gi leaves room for the cells below it. */
  roomBelow(depth: number, gi: number): boolean {
    return depth >= this.n - 1 || gi - (this.n - 1 - depth) >= this.ranges[this.n - 1][0];
  }

  /** Place an inner cell: extend the path and report whether its subtree survives the bound. */
  enterInner(depth: number): boolean {
    if (!this.canPrune) return true;
    this.extendPath(depth, this.idx[depth]);
    if (this.cuts(this.subtreeBound(depth + 1))) {
      this.pruned++;
      return false;
    }
    return true;
  }
}

/**
 * Enumerate a StepObjective on an axis, in named steps: tables along the axis
 * (photon currents and J0 per spectrum), the bound tables (independent tails
 * and pair powers, the spectrum's steepest photon current), then a depth-first
 * placement that extends partial sums along the path, cuts subtrees whose
 * bound cannot reach the threshold, and offers every solved leaf to the
 * candidate list (kept within the margin at linear cost, see candidates.ts).
 */
export function enumerateStep(obj: StepObjective, opts: EnumerationOptions): EnumerationResult {
  const { axis, ranges } = opts;
  const keeper = new CandidateKeeper(opts.margin, opts.initialBest ?? 0);
  const walk = new StepWalk(obj, axisTables(obj, axis), ranges, keeper);
  const n = walk.n;
  const idx = walk.idx;

  const place = (depth: number): void => {
    const [lo, hiRange] = ranges[depth];
    const hi = depth === 0 ? hiRange : Math.min(hiRange, idx[depth - 1] - 1);
    const list = depth === 0 && opts.firstIndices ? opts.firstIndices : null;
    const count = list ? list.length : hi - lo + 1;
    for (let t = 0; t < count; t++) {
      const gi = list ? list[t] : hi - t;
      if (gi < lo || gi > hi) continue;
      if (!walk.roomBelow(depth, gi)) continue;
      idx[depth] = gi;
      if (depth === n - 1) {
        if (!walk.visitLeaf(axis, !list)) break;
      } else if (walk.enterInner(depth)) place(depth + 1);
      if (depth === 0 && opts.progress && t % 4 === 0) opts.progress(t / count);
    }
  };
  place(0);
  return { best: keeper.best, candidates: keeper.result(), leaves: walk.leaves, pruned: walk.pruned, solved: walk.solved };
}

function matched(topBand: number, secondBand: number): number {
  return topBand > 0 ? Math.min(1, Math.max(1e-3, (topBand + secondBand) / (2 * topBand))) : 1;
}

/** Generic enumeration for any objective (no pruning): every ordered combination on the axis. */
export function enumerateGeneric(
  value: (gaps: number[]) => number,
  cells: number,
  axis: Float64Array,
  ranges: [number, number][],
  margin: number,
  progress?: (fraction: number) => void,
): EnumerationResult {
  const idx = new Int32Array(cells);
  const keeper = new CandidateKeeper(margin);
  let leaves = 0;
  const gaps = new Array<number>(cells);
  const place = (depth: number): void => {
    const [lo, hiRange] = ranges[depth];
    const hi = depth === 0 ? hiRange : Math.min(hiRange, idx[depth - 1] - 1);
    for (let gi = hi; gi >= lo; gi--) {
      if (depth < cells - 1 && gi - (cells - 1 - depth) < ranges[cells - 1][0]) continue;
      idx[depth] = gi;
      gaps[depth] = axis[gi];
      if (depth === cells - 1) {
        leaves++;
        keeper.offer(() => gaps.slice(), value(gaps));
      } else place(depth + 1);
      if (depth === 0 && progress) progress((hi - gi) / Math.max(1, hi - lo + 1));
    }
  };
  place(0);
  return { best: keeper.best, candidates: keeper.result(), leaves, pruned: 0, solved: leaves };
}
