/**
 * The search's hot path, stack physics for ideal steps: efficiency of ideal-step stacks (constant
 * absorptance, no coupling) under one spectrum or a weighted set, in closed
 * form from the cumulative photon tables, with no allocation per call.
 *
 * Band currents: cell i absorbs [E_i, E_{i−1}), J_ph,i = q·(N(E_i) − N(E_{i−1}))
 * (with a partly transparent top cell, (1 − A) of its band passes down).
 * Series: P = max_J J·Σ V_t ln((J_ph,i − J)/J0_i + 1), the root of dP/dJ by
 * safeguarded Newton. Independent: each cell at its Lambert-W maximum.
 * Yield over spectra k: Σ w_k·P_k / Σ w_k·P_in,k (docs/PHYSICS.md §8).
 */
import { ELEMENTARY_CHARGE_C, thermalVoltageV } from '../physics/constants.js';
import { photonsAboveEv, spectraColumns, stepJscManyAm2, type SpectraColumns } from '../light/spectrum.js';
import { j0RadStepAm2 } from '../junction/radiative.js';
import { lambertW0OfExp } from '../junction/lambert-w.js';
import { bestTopAbsorptance, type TopAbsorptanceChoice } from './top-absorptance.js';
import type { WeightedSpectrum } from '../light/weighted-spectrum.js';
import type { GapObjective } from './gap-objective.js';

export type FastWiring = 'series' | 'independent';

export interface StepObjectiveOptions {
  cells: number;
  wiring: FastWiring;
  /** ERE per subcell (0, 1]. */
  ere: number[];
  /** Constant absorptance of the top cell above its gap (0, 1]; 'free' lets the objective choose it per stack (2T). */
  topAbsorptance: number | 'free';
  spectra: WeightedSpectrum[];
}

/** A Newton step in y shorter than this is the last one taken (seriesPowerWm2). */
const NEWTON_LAST_STEP = 1e-7;
/** Σ ln x_i is taken as ln Π x_i, the product folded into the sum before it could overflow. */
const PRODUCT_FOLD = 1e150;

/**
 * Maximum power [W/m²] of a series string with photocurrents and saturation
 * currents [A/m²]. dP/dJ/V_t = Σ ln(u_i/J0_i) − J·Σ 1/u_i, u_i = J_ph,i + J0_i − J,
 * has a log barrier at J_max = min(J_ph + J0). Newton runs in y = ln(J_max − J),
 * where dP/dJ is concave and increasing, so from any start it converges
 * quadratically, monotonically after its first step (a tangent of a concave
 * function lies above it: a step from right of the root lands left of it).
 * The start is the single-junction optimum J_max/u = r with r + ln r = S + 1,
 * S = Σ ln(1 + J_ph/J0), to first order (r ≈ S + 1 − ln(S + 1)): about three
 * steps on average. The solve stops when the next step would be shorter than
 * 1e-7, leaving y within about 1e-14 of the root, and returns the power at the
 * last point evaluated: the power is stationary there, so it agrees with a
 * solve run to |Δy| < 1e-13 within 1e-15 relative. The logarithms of each
 * sum are taken as one logarithm of a product. A near-dark string (S < 1) is
 * bisected in J instead (darkSeriesPowerWm2).
 */
export function seriesPowerWm2(jph: Float64Array, j0: Float64Array, n: number, vt: number): number {
  let jMax = Infinity;
  let prod = 1;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const m = jph[i] + j0[i];
    if (m < jMax) jMax = m;
    prod *= m / j0[i];
    if (prod > PRODUCT_FOLD) {
      s += Math.log(prod);
      prod = 1;
    }
  }
  s += Math.log(prod);
  if (!(jMax > 0) || !(s > 0)) return 0;
  if (s < 1) return darkSeriesPowerWm2(jph, j0, n, vt, jMax);
  const yMax = Math.log(jMax);
  let y = Math.log(jMax / (s + 1 - Math.log(s + 1)));
  for (let it = 0; it < 100; it++) {
    const t = Math.exp(y);
    const j = jMax - t;
    let s1 = 0;
    let s2 = 0;
    let logs = 0;
    let pr = 1;
    for (let i = 0; i < n; i++) {
      const u = jph[i] + j0[i] - j;
      pr *= u / j0[i];
      if (pr > PRODUCT_FOLD) {
        logs += Math.log(pr);
        pr = 1;
      }
      const r = 1 / u;
      s1 += r;
      s2 += r * r;
    }
    const sum = logs + Math.log(pr);
    const g = sum - j * s1;
    const gy = t * (2 * s1 + j * s2);
    let next = y - g / gy;
    if (next >= yMax) next = 0.5 * (y + yMax);
    if (Math.abs(next - y) < NEWTON_LAST_STEP) {
      const p = j * vt * sum;
      return p > 0 ? p : 0;
    }
    y = next;
  }
  const j = jMax - Math.exp(y);
  if (!(j > 0)) return 0;
  const p = j * vt * logSum1p(jph, j0, n, j);
  return p > 0 ? p : 0;
}

/** Σ ln(u_i/J0_i) at current J [A/m²], term by term through log1p: exact where the terms are small. */
function logSum1p(jph: Float64Array, j0: Float64Array, n: number, j: number): number {
  let sum = 0;
  for (let i = 0; i < n; i++) sum += Math.log1p((jph[i] - j) / j0[i]);
  return sum;
}

/**
 * seriesPowerWm2 for a near-dark string (S < 1: photocurrents not far above J0),
 * where the optimum J is a small share of J_max and a step in y says little about J:
 * dP/dJ, strictly decreasing from S at J = 0, bisected in J to the last bit.
 */
function darkSeriesPowerWm2(jph: Float64Array, j0: Float64Array, n: number, vt: number, jMax: number): number {
  let lo = 0;
  let hi = jMax;
  for (let it = 0; it < 2000; it++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    let s1 = 0;
    for (let i = 0; i < n; i++) s1 += 1 / (jph[i] + j0[i] - mid);
    if (logSum1p(jph, j0, n, mid) - mid * s1 > 0) lo = mid;
    else hi = mid;
  }
  const j = 0.5 * (lo + hi);
  const p = j * vt * logSum1p(jph, j0, n, j);
  return p > 0 ? p : 0;
}

/** Maximum power [W/m²] of one junction: V_mp = V_t(W(e(1 + J_ph/J0)) − 1). */
export function singlePowerWm2(jph: number, j0: number, vt: number): number {
  if (!(jph > 0)) return 0;
  const w = lambertW0OfExp(1 + Math.log1p(jph / j0));
  const v = vt * (w - 1);
  return v * (jph - j0 * Math.expm1(w - 1));
}

/** Fast objective for step stacks without coupling. */
export class StepObjective implements GapObjective {
  readonly cells: number;
  readonly label: string;
  private readonly opts: StepObjectiveOptions;
  private readonly vt: Float64Array;
  private readonly pinTotal: number;
  private readonly jph: Float64Array;
  private readonly j0: Float64Array;
  /** Index of each spectrum's cell temperature in `temps` (an ensemble often has one temperature). */
  private readonly tempOf: Int32Array;
  private readonly temps: number[];
  /**
   * Caches for valueAt, which a search calls with one gap moving and the rest
   * fixed: q·N(E_i) per cell and spectrum [A/m²] for the gap last seen in that
   * cell, and J0 per cell and temperature [A/m²] likewise.
   */
  private readonly lastGapQn: Float64Array;
  private readonly qnCache: Float64Array;
  private readonly lastGapJ0: Float64Array;
  private readonly j0Cache: Float64Array;
  /** Per-cell ERE, per-spectrum weight, and whether the cells form one series string: read on every evaluation. */
  private readonly ere: Float64Array;
  private readonly weights: Float64Array;
  private readonly series: boolean;
  /** The spectra's tables as parallel arrays (valueAt loops over thousands of spectra). */
  private readonly columns: SpectraColumns;

  constructor(opts: StepObjectiveOptions) {
    this.opts = opts;
    this.cells = opts.cells;
    this.vt = Float64Array.from(opts.spectra, (s) => thermalVoltageV(s.tempK));
    this.ere = Float64Array.from(opts.ere);
    this.weights = Float64Array.from(opts.spectra, (s) => s.weight);
    this.series = opts.wiring === 'series';
    this.columns = spectraColumns(opts.spectra);
    this.pinTotal = opts.spectra.reduce((a, s) => a + s.weight * s.spectrum.pinWm2, 0);
    this.jph = new Float64Array(opts.cells);
    this.j0 = new Float64Array(opts.cells);
    this.label = opts.spectra.length === 1 ? 'efficiency' : 'yield-weighted efficiency';
    const index = new Map<number, number>();
    this.tempOf = Int32Array.from(opts.spectra, (s) => {
      if (!index.has(s.tempK)) index.set(s.tempK, index.size);
      return index.get(s.tempK)!;
    });
    this.temps = [...index.keys()];
    const ns = opts.spectra.length;
    this.lastGapQn = new Float64Array(opts.cells).fill(NaN);
    this.qnCache = new Float64Array(opts.cells * ns);
    this.lastGapJ0 = new Float64Array(opts.cells).fill(NaN);
    this.j0Cache = new Float64Array(opts.cells * this.temps.length);
  }

  /** Power [W/m²] from photons-above values q·N(E_i) [A/m²] and radiative J0 [A/m²] of each cell, under spectrum k. */
  powerFromTables(k: number, qn: ArrayLike<number>, j0rad: ArrayLike<number>, topA: number): number {
    const n = this.cells;
    const jph = this.jph;
    const j0 = this.j0;
    const ere = this.ere;
    let prev = 0;
    for (let i = 0; i < n; i++) {
      jph[i] = qn[i] - prev;
      prev = qn[i];
      j0[i] = j0rad[i] / ere[i];
    }
    return this.powerOfCells(k, topA);
  }

  /** Power [W/m²] of the cells' photocurrents and J0 in this.jph and this.j0 (top absorptance applied here), under spectrum k. */
  private powerOfCells(k: number, topA: number): number {
    const n = this.cells;
    const jph = this.jph;
    const j0 = this.j0;
    if (topA !== 1) {
      const band = jph[0];
      jph[0] = topA * band;
      if (n > 1) jph[1] += (1 - topA) * band;
      j0[0] *= topA;
    }
    const vt = this.vt[k];
    if (this.series) return seriesPowerWm2(jph, j0, n, vt);
    let p = 0;
    for (let i = 0; i < n; i++) p += singlePowerWm2(jph[i], j0[i], vt);
    return p;
  }

  /**
   * Tables over an axis of gaps [eV], one per spectrum, for searches that
   * evaluate many stacks on the same axis through `powerFromTables`:
   * q·N(E) [A/m²] (photons above E, docs/PHYSICS.md §2) and the radiative J0
   * of an ideal step at E [A/m²] (Shockley & Queisser 1961).
   */
  axisTables(axisEv: ArrayLike<number>): { qnAm2: Float64Array; j0RadAm2: Float64Array }[] {
    // J0 depends on the temperature only: one table per temperature, shared by its spectra.
    const j0ByTemp = this.temps.map((t) => Float64Array.from(axisEv, (e) => j0RadStepAm2(e, t)));
    return this.opts.spectra.map((ws, k) => ({
      qnAm2: Float64Array.from(axisEv, (e) => ELEMENTARY_CHARGE_C * photonsAboveEv(ws.spectrum, e)),
      j0RadAm2: j0ByTemp[this.tempOf[k]],
    }));
  }


  /**
   * Efficiency [-] of two-cell stacks over two axes of gaps [eV], x the upper
   * cell and y the lower, written to out[iy·nx + ix] wherever y[iy] < x[ix]
   * (other entries are left alone): powerFromTables for each pixel and
   * spectrum, its cells filled straight from the per-axis tables (a map's only
   * work, mostly run before the optimising compiler has seen it).
   * Returns the pixels written and the index of the best (the first on ties).
   */
  mapTwoCells(x: Float64Array, y: Float64Array, topA: number, out: Float64Array): { points: number; best: number } {
    if (this.cells !== 2) throw new Error(`mapTwoCells needs a two-cell objective, not ${this.cells} cells`);
    const onX = this.axisTables(x);
    const onY = this.axisTables(y);
    const ns = onX.length;
    const nx = x.length;
    const ny = y.length;
    const jph = this.jph;
    const j0 = this.j0;
    const ere0 = this.ere[0];
    const ere1 = this.ere[1];
    const weights = this.weights;
    const pin = this.pinTotal;
    let points = 0;
    let best = -1;
    let bestValue = -Infinity;
    for (let iy = 0; iy < ny; iy++) {
      const yv = y[iy];
      for (let ix = 0; ix < nx; ix++) {
        if (!(yv < x[ix])) continue;
        let p = 0;
        for (let k = 0; k < ns; k++) {
          const qx = onX[k].qnAm2[ix];
          jph[0] = qx;
          jph[1] = onY[k].qnAm2[iy] - qx;
          j0[0] = onX[k].j0RadAm2[ix] / ere0;
          j0[1] = onY[k].j0RadAm2[iy] / ere1;
          p += weights[k] * this.powerOfCells(k, topA);
        }
        const v = p / pin;
        const at = iy * nx + ix;
        out[at] = v;
        points++;
        if (v > bestValue) {
          bestValue = v;
          best = at;
        }
      }
    }
    return { points, best };
  }

  /** Efficiency at a fixed top absorptance [-]. */
  valueAt(gapsEv: ArrayLike<number>, topA: number): number {
    const spectra = this.opts.spectra;
    const ns = spectra.length;
    const nt = this.temps.length;
    for (let i = 0; i < this.cells; i++) {
      const g = gapsEv[i];
      if (g !== this.lastGapQn[i]) {
        stepJscManyAm2(this.columns, g, this.qnCache, i * ns);
        this.lastGapQn[i] = g;
      }
      if (g !== this.lastGapJ0[i]) {
        for (let t = 0; t < nt; t++) this.j0Cache[i * nt + t] = j0RadStepAm2(g, this.temps[t]);
        this.lastGapJ0[i] = g;
      }
    }
    // powerFromTables for each spectrum, its cells filled straight from the caches.
    const n = this.cells;
    const jph = this.jph;
    const j0 = this.j0;
    const ere = this.ere;
    const qn = this.qnCache;
    const j0c = this.j0Cache;
    const weights = this.weights;
    let p = 0;
    for (let k = 0; k < ns; k++) {
      const t = this.tempOf[k];
      let prev = 0;
      for (let i = 0; i < n; i++) {
        const q = qn[i * ns + k];
        jph[i] = q - prev;
        prev = q;
        j0[i] = j0c[i * nt + t] / ere[i];
      }
      p += weights[k] * this.powerOfCells(k, topA);
    }
    return p / this.pinTotal;
  }

  value(gapsEv: ArrayLike<number>): number {
    for (let i = 1; i < this.cells; i++) if (!(gapsEv[i] < gapsEv[i - 1])) return 0;
    const a = this.opts.topAbsorptance;
    if (a !== 'free') return this.valueAt(gapsEv, a);
    return this.bestTopAbsorptance(gapsEv).efficiency;
  }

  /** Best constant top absorptance for these gaps (the engine's one top-absorptance optimiser, `top-absorptance.ts`). */
  bestTopAbsorptance(gapsEv: ArrayLike<number>): TopAbsorptanceChoice {
    return bestTopAbsorptance((x) => this.valueAt(gapsEv, x));
  }

  get spectra(): readonly WeightedSpectrum[] {
    return this.opts.spectra;
  }
  get options(): StepObjectiveOptions {
    return this.opts;
  }
  get incidentPowerWm2(): number {
    return this.pinTotal;
  }
}
