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
import { singlePowerWm2, type StepObjective } from '../stack/step-objective.js';
import { lastIndexNotPast } from '../numerics/sorted.js';
import type { Spectrum } from '../light/spectrum.js';

export interface Candidate {
  /** Gaps [eV], top first. */
  gapsEv: number[];
  value: number;
}

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

/**
 * Enumerate a StepObjective on an axis, in named steps: tables along the axis
 * (photon currents and J0 per spectrum), the bound tables (independent tails,
 * the spectrum's steepest photon current), then a depth-first placement that
 * extends partial sums along the path, cuts subtrees whose bound cannot reach
 * the threshold, and keeps every solved leaf within the margin.
 */
export function enumerateStep(obj: StepObjective, opts: EnumerationOptions): EnumerationResult {
  const { axis, ranges, margin } = opts;
  const n = obj.cells;
  const spectra = obj.spectra;
  const ns = spectra.length;
  const g = axis.length;
  const tables = obj.axisTables(axis);
  const qn = tables.map((t) => t.qnAm2);
  const j0 = tables.map((t) => t.j0RadAm2);
  const vt = spectra.map((s) => thermalVoltageV(s.tempK));
  const weights = spectra.map((s) => s.weight);
  const pin = obj.incidentPowerWm2;
  const ere = obj.options.ere;
  const topA = obj.options.topAbsorptance;
  const canPrune = topA === 1;
  const series = obj.options.wiring === 'series';
  const lowestIndex = ranges[n - 1][0];

  const stride = g + 1;
  const tail = !series && canPrune ? qn.map((q, k) => independentTailPowers(q, j0[k], ere, vt[k], ranges)) : [];
  const maxFluxPerEv = spectra.map((ws) => maxPhotonCurrentPerEv(ws.spectrum));

  const idx = new Int32Array(n);
  const qnCell = new Float64Array(n);
  const j0Cell = new Float64Array(n);
  let best: Candidate = { gapsEv: [], value: opts.initialBest ?? 0 };
  let bestValue = opts.initialBest ?? 0;
  let kept: Candidate[] = [];
  let leaves = 0;
  let pruned = 0;
  let solved = 0;

  // Per-spectrum partial state along the current path.
  const minJ = new Float64Array(ns * (n + 1));
  const vocSum = new Float64Array(ns * (n + 1));
  const powerSum = new Float64Array(ns * (n + 1));

  const threshold = () => bestValue * (1 - margin);

  const leafValue = (): number => {
    let p = 0;
    for (let k = 0; k < ns; k++) {
      for (let i = 0; i < n; i++) {
        qnCell[i] = qn[k][idx[i]];
        j0Cell[i] = j0[k][idx[i]];
      }
      let a = topA === 'free' ? 1 : topA;
      if (topA === 'free' && n > 1) a = matched(qnCell[0], qnCell[1] - qnCell[0]);
      p += weights[k] * obj.powerFromTables(k, qnCell, j0Cell, a);
    }
    return p / pin;
  };

  // Current fractions that partition [0, J_bound] for the series bound.
  const FRACTIONS = [0, 0.5, 0.7, 0.82, 0.9, 0.95, 0.98, 1];

  /** Highest axis index g in [lowestIndex, below) with q·N(E_g) ≥ target (−1 if none). */
  const highestCollecting = (k: number, below: number, target: number): number => {
    const q = qn[k];
    if (below - 1 < lowestIndex || q[lowestIndex] < target) return -1;
    return lastIndexNotPast(q, target, lowestIndex, below - 1, true);
  };

  const boundAt = (depth: number): number => {
    // Upper bound on the power of any completion of the first `depth` cells, all spectra.
    let p = 0;
    const last = idx[depth - 1];
    const left = n - depth;
    for (let k = 0; k < ns; k++) {
      const base = k * (n + 1) + depth;
      const remaining = qn[k][lowestIndex] - qn[k][last];
      if (!(remaining > 0)) return 0;
      if (!series) {
        p += weights[k] * (powerSum[base] + tail[k][left * stride + last]);
        continue;
      }
      // Operating current J ≤ J_b. With J in [f_a, f_b]·J_b, remaining cell j must collect
      // j·J photons below the last gap, so its gap is at most E*_j(f_a·J_b); its Voc is at
      // most V_t ln(R/J0(E*_j) + 1), and Voc falls as the gap falls.
      const jb = Math.min(minJ[base], remaining / left);
      let bestK = 0;
      for (let f = 1; f < FRACTIONS.length; f++) {
        const ja = FRACTIONS[f - 1] * jb;
        let sCap = 0;
        for (let j = 1; j <= left; j++) {
          const g = highestCollecting(k, last, qn[k][last] + j * ja);
          if (g < 0) {
            sCap = -Infinity;
            break;
          }
          sCap += vt[k] * Math.log1p(remaining / j0[k][g]);
        }
        const b = FRACTIONS[f] * jb * (vocSum[base] + sCap);
        if (b > bestK) bestK = b;
      }
      p += weights[k] * bestK;
    }
    return p / pin;
  };

  /** Independent wiring: the cells above are already summed; only the bottom cell is new. */
  const leafValueIndependent = (): number => {
    let p = 0;
    const b = idx[n - 1];
    for (let k = 0; k < ns; k++) {
      const above = n > 1 ? powerSum[k * (n + 1) + n - 1] : 0;
      const band = qn[k][b] - (n > 1 ? qn[k][idx[n - 2]] : 0);
      p += weights[k] * (above + singlePowerWm2(band, j0[k][b] / ere[n - 1], vt[k]));
    }
    return p / pin;
  };

  let monotoneTail = false;
  /** Cheap leaf bound J_min·Σ Voc (series) from the partial sums of the cells above: one log per spectrum. */
  const leafBound = (): number => {
    if (!canPrune || !series) return Infinity;
    let p = 0;
    const b = idx[n - 1];
    monotoneTail = n > 1;
    for (let k = 0; k < ns; k++) {
      const base = k * (n + 1) + n - 1;
      const band = qn[k][b] - (n > 1 ? qn[k][idx[n - 2]] : 0);
      const jmin = n > 1 ? Math.min(minJ[base], band) : band;
      // Past the current match, lowering the bottom gap only lowers this bound while
      // d ln J0/dE (≈ 1/kT) outweighs d ln J_ph/dE (≤ q·φ_E,max / J_ph).
      if (!(n > 1 && band >= minJ[base] && band > vt[k] * maxFluxPerEv[k])) monotoneTail = false;
      const voc = (n > 1 ? vocSum[base] : 0) + vt[k] * Math.log1p(band / (j0[k][b] / ere[n - 1]));
      p += weights[k] * jmin * voc;
    }
    return p / pin;
  };

  /** Partial sums along the path after placing cell `depth` at axis index gi: smallest band current, Σ Voc, Σ P (independent). */
  const extendPath = (depth: number, gi: number): void => {
    for (let k = 0; k < ns; k++) {
      const prev = k * (n + 1) + depth;
      const here = prev + 1;
      const band = qn[k][gi] - (depth === 0 ? 0 : qn[k][idx[depth - 1]]);
      const j0i = j0[k][gi] / ere[depth];
      const voc = band > 0 ? vt[k] * Math.log1p(band / j0i) : 0;
      minJ[here] = depth === 0 ? band : Math.min(minJ[prev], band);
      vocSum[here] = (depth === 0 ? 0 : vocSum[prev]) + voc;
      powerSum[here] = (depth === 0 ? 0 : powerSum[prev]) + (series ? 0 : singlePowerWm2(band, j0i, vt[k]));
    }
  };

  /** A solved leaf: keep it when it is within the margin of the best so far. */
  const keepLeaf = (v: number): void => {
    if (!(v >= threshold())) return;
    const c = { gapsEv: Array.from(idx, (q) => axis[q]), value: v };
    if (v > bestValue) {
      bestValue = v;
      best = c;
    }
    kept.push(c);
    if (kept.length > 200000) kept = kept.filter((x) => x.value >= threshold());
  };

  /** Depth-first: place cell `depth` at every allowed axis index, top down, cutting subtrees by the bounds. */
  const place = (depth: number): void => {
    const [lo, hiRange] = ranges[depth];
    const hi = depth === 0 ? hiRange : Math.min(hiRange, idx[depth - 1] - 1);
    const list = depth === 0 && opts.firstIndices ? opts.firstIndices : null;
    const count = list ? list.length : hi - lo + 1;
    for (let t = 0; t < count; t++) {
      const gi = list ? list[t] : hi - t;
      if (gi < lo || gi > hi) continue;
      // Room below for the remaining cells.
      if (depth < n - 1 && gi - (n - 1 - depth) < ranges[n - 1][0]) continue;
      idx[depth] = gi;
      if (depth === n - 1) {
        leaves++;
        if (bestValue > 0 && leafBound() < threshold()) {
          pruned++;
          if (monotoneTail && !list) break;
          continue;
        }
        solved++;
        keepLeaf(!series && canPrune ? leafValueIndependent() : leafValue());
      } else {
        if (canPrune) {
          extendPath(depth, gi);
          if (bestValue > 0 && boundAt(depth + 1) < threshold()) {
            pruned++;
            continue;
          }
        }
        place(depth + 1);
      }
      if (depth === 0 && opts.progress && t % 4 === 0) opts.progress(t / count);
    }
  };
  place(0);
  const cut = threshold();
  const candidates = kept.filter((c) => c.value >= cut).sort((a, b) => b.value - a.value);
  return { best, candidates, leaves, pruned, solved };
}

/**
 * Independent wiring: U[m·(g+1) + top] = best power [W/m²] of the last m cells when the
 * first of them receives photons from axis index `top` downwards (top = axis length: the
 * top of the stack), over their allowed ranges. This dynamic programme makes the bound
 * exact for one spectrum.
 */
function independentTailPowers(qn: Float64Array, j0: Float64Array, ere: readonly number[], vt: number, ranges: [number, number][]): Float64Array {
  const n = ranges.length;
  const g = qn.length;
  const stride = g + 1;
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
        const pw = singlePowerWm2(qn[gi] - qTop, j0[gi] / ere[cell], vt) + rest;
        if (pw > bestP) bestP = pw;
      }
      u[m * stride + top] = bestP;
    }
  }
  return u;
}

/** Largest spectral photon current per eV of a spectrum, q·φ_E [A m⁻² eV⁻¹], for the monotone-tail test. */
function maxPhotonCurrentPerEv(s: Spectrum): number {
  let m = 0;
  const w = s.wavelengthNm;
  const f = s.photonFlux;
  for (let i = 0; i < w.length; i++) m = Math.max(m, (f[i] * w[i] * w[i]) / HC_EV_NM);
  return ELEMENTARY_CHARGE_C * m;
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
  let best: Candidate = { gapsEv: [], value: 0 };
  let kept: Candidate[] = [];
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
        const v = value(gaps);
        if (v >= best.value * (1 - margin)) {
          const c = { gapsEv: gaps.slice(), value: v };
          if (v > best.value) best = c;
          kept.push(c);
          if (kept.length > 200000) kept = kept.filter((x) => x.value >= best.value * (1 - margin));
        }
      } else place(depth + 1);
      if (depth === 0 && progress) progress((hi - gi) / Math.max(1, hi - lo + 1));
    }
  };
  place(0);
  const cut = best.value * (1 - margin);
  return { best, candidates: kept.filter((c) => c.value >= cut).sort((a, b) => b.value - a.value), leaves, pruned: 0, solved: leaves };
}
