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

/** The series solve's start, J_max/(J_max − J): the single-junction optimum r with r + ln r = S + 1, to first order in S = Σ ln(1 + J_ph/J0). */
const firstOrderStart = (s: number): number => s + 1 - Math.log(s + 1);

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
  let y = Math.log(jMax / firstOrderStart(s));
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

/** Scratch for seriesPairPowerWm2's hand-over to seriesPowerWm2. */
const PAIR_JPH = new Float64Array(2);
const PAIR_J0 = new Float64Array(2);

/**
 * Maximum power [W/m²] of two cells in series, photocurrents jph0, jph1 and
 * saturation currents j00, j01 [A/m²], thermal voltage vt [V]: seriesPowerWm2
 * along a line of pixels (a map row), the same Newton in y = ln(J_max − J)
 * with the same last step, written out for two cells and started from the
 * pixels before. `warm[at]` and `warm[at + 1]` hold R = J_max/(J_max − J) at
 * the optimum of the last two pixels (NaN after a row starts); the start is
 * their geometric extrapolation R₁²/R₂ (linear in y), or R₁ after one pixel,
 * or the cold start of seriesPowerWm2 on a row's first pixel. Neighbouring
 * pixels 5 meV apart then take 2.2 evaluations on average instead of 3.25 (the
 * 0.5–2.5 eV map; 2.0 at 1 meV). The stop is the same (a next step shorter
 * than 1e-7 in y), so the power agrees with seriesPowerWm2's within a few
 * 1e-15 relative (measured up to 2e-15 on maps, 3e-14 for strings near the
 * dark limit): both are the stationary value at a y within 1e-14 of the root.
 * A map's pixel therefore depends, at that level, on the pixels before it in
 * its row; the CSV's six decimals of a percent have come out the same bytes on
 * every map tried. The step runs in t = e^y, so no logarithm of J_max is
 * needed. A near-dark string (Π(1 + J_ph/J0) below 3), a product near
 * overflow, or a solve that does not settle goes to seriesPowerWm2 instead,
 * and the row's start is forgotten.
 */
export function seriesPairPowerWm2(jph0: number, jph1: number, j00: number, j01: number, vt: number, warm: Float64Array, at: number): number {
  const m0 = jph0 + j00;
  const m1 = jph1 + j01;
  const jMax = m0 < m1 ? m0 : m1;
  const prod = (m0 / j00) * (m1 / j01);
  if (jMax > 0 && prod > 3 && prod < PRODUCT_FOLD) {
    const r1 = warm[at];
    const r2 = warm[at + 1];
    let t: number;
    if (r1 === r1) t = jMax / (r2 === r2 ? (r1 * r1) / r2 : r1);
    else {
      const s = Math.log(prod);
      t = jMax / firstOrderStart(s);
    }
    for (let it = 0; it < 100; it++) {
      const j = jMax - t;
      const u0 = m0 - j;
      const u1 = m1 - j;
      const sum = Math.log((u0 / j00) * (u1 / j01));
      const q0 = 1 / u0;
      const q1 = 1 / u1;
      const s1 = q0 + q1;
      const step = (sum - j * s1) / (t * (2 * s1 + j * (q0 * q0 + q1 * q1)));
      if (Math.abs(step) < NEWTON_LAST_STEP) {
        warm[at + 1] = r1;
        warm[at] = jMax / t;
        const p = j * vt * sum;
        return p > 0 ? p : 0;
      }
      // y − step, or halfway to y_max (t → √(t·J_max)) where the step would cross it.
      const next = t * Math.exp(-step);
      t = next < jMax ? next : Math.sqrt(t * jMax);
    }
  }
  warm[at] = NaN;
  warm[at + 1] = NaN;
  PAIR_JPH[0] = jph0;
  PAIR_JPH[1] = jph1;
  PAIR_J0[0] = j00;
  PAIR_J0[1] = j01;
  return seriesPowerWm2(PAIR_JPH, PAIR_J0, 2, vt);
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
   * work, mostly run before the optimising compiler has seen it). A series
   * pair is solved by seriesPairPowerWm2, each row from its own pixels before.
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
    const series = this.series;
    const vt = this.vt;
    // Each spectrum's last two optima along the row (seriesPairPowerWm2).
    const warm = new Float64Array(2 * ns);
    let points = 0;
    let best = -1;
    let bestValue = -Infinity;
    for (let iy = 0; iy < ny; iy++) {
      const yv = y[iy];
      warm.fill(NaN);
      for (let ix = 0; ix < nx; ix++) {
        if (!(yv < x[ix])) continue;
        let p = 0;
        for (let k = 0; k < ns; k++) {
          const qx = onX[k].qnAm2[ix];
          let a0 = qx;
          let a1 = onY[k].qnAm2[iy] - qx;
          let b0 = onX[k].j0RadAm2[ix] / ere0;
          const b1 = onY[k].j0RadAm2[iy] / ere1;
          if (series) {
            // powerOfCells' top absorptance, in the same operations.
            if (topA !== 1) {
              const band = a0;
              a0 = topA * band;
              a1 += (1 - topA) * band;
              b0 *= topA;
            }
            p += weights[k] * seriesPairPowerWm2(a0, a1, b0, b1, vt[k], warm, 2 * k);
            continue;
          }
          jph[0] = a0;
          jph[1] = a1;
          j0[0] = b0;
          j0[1] = b1;
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
