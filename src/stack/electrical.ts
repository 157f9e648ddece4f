/**
 * Electrical operation of a stack (docs/PHYSICS.md §5): series groups at a common
 * current, independent groups each at its own maximum, voltage-matched
 * strings at one free voltage, with luminescent coupling carried top-down.
 *
 * Every subcell obeys J_i = J_ph,i − J0_i(exp(V_i/V_t) − 1). With coupling,
 * J_ph,i+1 = J_gen,i+1 + η_i·(J_ph,i − J_i), so every photocurrent is affine in
 * the operating currents and u_i = J_ph,i − J_i + J0_i is affine in any one
 * group current. P(J) = J·Σ V_t·ln(u_i/J0_i) is then concave on its domain,
 * and the group maximum is the root of dP/dJ by safeguarded Newton. Series
 * resistance (docs/PHYSICS.md §11) subtracts J²·ΣR from a group's power, which
 * keeps P(J) concave, so the same method applies.
 */

import { maximiseScan } from '../numerics/golden.js';
import { voltageAtCurrentV } from '../junction/diode.js';

/** Electrical inputs of a stack, top first. */
export interface StackElectrical {
  /** Photogeneration [A/m²]. */
  jgenAm2: Float64Array;
  /** Saturation current, including ERE and any coupling factor [A/m²]. */
  j0Am2: Float64Array;
  /** Coupling efficiency per interface (length n − 1) [-]. */
  eta: Float64Array;
  /** Thermal voltage [V]. */
  vt: number;
  /** Series resistance per subcell [Ω·m²]; absent when no subcell has any. V_i = V_diode,i(J) − J·R_i. */
  rsOhmM2?: Float64Array;
}

/** Cascade photocurrents top-down for given operating currents [A/m²]. */
function cascadePhotocurrents(el: StackElectrical, currents: Float64Array, jph: Float64Array): void {
  const n = el.jgenAm2.length;
  jph[0] = el.jgenAm2[0];
  for (let i = 1; i < n; i++) jph[i] = el.jgenAm2[i] + el.eta[i - 1] * (jph[i - 1] - currents[i - 1]);
}

/**
 * Maximise f(J) = J·Σ_{in} V_t ln(u_i/J0_i) − J²·Σ_{in} R_i + Σ_{out} J_i·V_t ln(u_i/J0_i) over J ≥ 0
 * where u_i = c_i + d_i·J. `inGroup[i]` marks the cells that carry J; `fixedJ[i]`
 * is the current of the others; `rs` the series resistances [Ω·m²]. Returns the maximising J [A/m²].
 */
function maximiseGroupCurrent(
  c: Float64Array,
  d: Float64Array,
  j0: Float64Array,
  inGroup: Uint8Array,
  fixedJ: Float64Array,
  n: number,
  vt: number,
  rs?: Float64Array,
): number {
  let rIn = 0;
  if (rs) for (let i = 0; i < n; i++) if (inGroup[i]) rIn += rs[i];
  let jMax = Infinity;
  for (let i = 0; i < n; i++) if (d[i] < 0) jMax = Math.min(jMax, -c[i] / d[i]);
  if (!(jMax > 0) || !Number.isFinite(jMax)) return 0;
  const slope = (j: number, second: boolean): number => {
    let s = 0;
    let s2 = 0;
    for (let i = 0; i < n; i++) {
      const u = c[i] + d[i] * j;
      const r = d[i] / u;
      if (inGroup[i]) {
        s += Math.log(u / j0[i]) + j * r;
        if (second) s2 += 2 * r - j * r * r;
      } else if (d[i] !== 0) {
        s += fixedJ[i] * r;
        if (second) s2 -= fixedJ[i] * r * r;
      }
    }
    return second ? vt * s2 - 2 * rIn : vt * s - 2 * j * rIn;
  };
  if (slope(0, false) <= 0) return 0;
  // Newton in y = ln(J_max − J), where the log barrier at J_max becomes an
  // exponential wall and dP/dJ is smooth; bracketed so it cannot escape.
  let sLog = 0;
  for (let i = 0; i < n; i++) if (inGroup[i]) sLog += Math.log(Math.max(c[i], j0[i] * 1.0000001) / j0[i]);
  const yMax = Math.log(jMax);
  let yLo = -Infinity;
  let yHi = yMax;
  let y = yMax - Math.log(Math.max(1, sLog) + 1);
  for (let it = 0; it < 200; it++) {
    const t = Math.exp(y);
    const j = jMax - t;
    const g = slope(j, false);
    if (g < 0) yLo = y;
    else yHi = y;
    const gy = -t * slope(j, true);
    let next = y - g / gy;
    if (!(next > yLo && next < yHi)) next = Number.isFinite(yLo) ? 0.5 * (yLo + yHi) : Math.min(y, yHi) - 2;
    if (Math.abs(next - y) < 1e-13 || yHi - yLo < 1e-13) return jMax - Math.exp(next);
    y = next;
  }
  return jMax - Math.exp(y);
}

/** Result of operating a stack. */
export interface Operation {
  /** Operating current of each subcell [A/m²]. */
  currentsAm2: Float64Array;
  /** Operating voltage of each subcell [V]. */
  voltagesV: Float64Array;
  /** Photocurrent at the operating point, coupling included [A/m²]. */
  jphAm2: Float64Array;
  /** Total electrical power [W/m²]. */
  powerWm2: number;
}

const cellVoltage = (jph: number, j: number, j0: number, vt: number): number => voltageAtCurrentV(jph, j0, vt, j);

function finish(el: StackElectrical, currents: Float64Array, jph: Float64Array): Operation {
  const n = currents.length;
  const voltages = new Float64Array(n);
  let p = 0;
  for (let i = 0; i < n; i++) {
    voltages[i] = cellVoltage(jph[i], currents[i], el.j0Am2[i], el.vt) - currents[i] * (el.rsOhmM2?.[i] ?? 0);
    p += voltages[i] * currents[i];
  }
  return { currentsAm2: currents, voltagesV: voltages, jphAm2: jph, powerWm2: p };
}

/** Operate groups of cells, each group in series, each at its own maximum (jointly, with coupling). */
export function operateGroups(el: StackElectrical, groups: number[][]): Operation {
  const n = el.jgenAm2.length;
  const currents = new Float64Array(n);
  const jph = new Float64Array(n);
  const c = new Float64Array(n);
  const d = new Float64Array(n);
  const inGroup = new Uint8Array(n);
  const u1 = new Float64Array(n);
  const coupled = el.eta.some((e) => e !== 0);
  for (const g of groups) for (const i of g) currents[i] = 0.9 * el.jgenAm2[i];
  const maxSweeps = coupled && groups.length > 1 ? 500 : 1;
  for (let sweep = 0; sweep < maxSweeps; sweep++) {
    let change = 0;
    for (const g of groups) {
      const old = currents[g[0]];
      // u(J) = J_ph(J) − J_i + J0, affine in this group's J: read it at J = 0 and J = 1.
      for (const i of g) currents[i] = 0;
      cascadePhotocurrents(el, currents, jph);
      for (let i = 0; i < n; i++) c[i] = jph[i] - currents[i] + el.j0Am2[i];
      for (const i of g) currents[i] = 1;
      cascadePhotocurrents(el, currents, jph);
      for (let i = 0; i < n; i++) {
        u1[i] = jph[i] - currents[i] + el.j0Am2[i];
        d[i] = u1[i] - c[i];
        inGroup[i] = 0;
      }
      for (const i of g) inGroup[i] = 1;
      const j = maximiseGroupCurrent(c, d, el.j0Am2, inGroup, currents, n, el.vt, el.rsOhmM2);
      for (const i of g) currents[i] = j;
      change = Math.max(change, Math.abs(j - old) / Math.max(j, 1e-30));
    }
    if (change < 1e-13) break;
  }
  cascadePhotocurrents(el, currents, jph);
  return finish(el, currents, jph);
}

/**
 * Operate a series group at a terminal voltage V [V]: find the common current
 * and each cell's voltage, given the currents of other cells (for coupling).
 * With w_i(J) = J_ph,i(J) − J affine in J, write J = J_max − δ so that the
 * limiting cell has w = q·δ exactly; V(δ) = Σ V_t ln(w_i/J0_i + 1) rises with δ.
 * Bisection on z = ln(δ − δ_min) keeps the voltages accurate even when a cell
 * sits near short circuit (w ≪ J_ph), where V recomputed from J would not be.
 * Series resistance adds −J·ΣR = (δ − J_max)·ΣR, which also rises with δ.
 * Writes the group's current into `currents`, its voltages into `voltages`.
 */
function operateGroupAtVoltage(el: StackElectrical, group: number[], voltageV: number, currents: Float64Array, jph: Float64Array, voltages: Float64Array, warm?: { z?: number }): number {
  const rs = el.rsOhmM2;
  const rSum = rs ? group.reduce((a, i) => a + rs[i], 0) : 0;
  if (group.length === 1 && rSum === 0) {
    // One cell: its photocurrent depends only on the cells above, so J(V) is the diode law itself.
    const i = group[0];
    cascadePhotocurrents(el, currents, jph);
    const j = jph[i] - el.j0Am2[i] * Math.expm1(voltageV / el.vt);
    currents[i] = j;
    voltages[i] = voltageV;
    cascadePhotocurrents(el, currents, jph);
    return j;
  }
  const m = group.length;
  const r = new Float64Array(m);
  const q = new Float64Array(m);
  for (const i of group) currents[i] = 0;
  cascadePhotocurrents(el, currents, jph);
  const a = group.map((i) => jph[i]);
  for (const i of group) currents[i] = 1;
  cascadePhotocurrents(el, currents, jph);
  let jMax = Infinity;
  let lim = 0;
  group.forEach((i, k) => {
    q[k] = -(jph[i] - 1 - a[k]); // −dw/dJ ≥ 1
    const root = a[k] / q[k];
    if (root < jMax) {
      jMax = root;
      lim = k;
    }
  });
  // Reverse-bias limit: δ > δ_min where the first cell reaches w = −J0 (V → −∞).
  let dMin = -Infinity;
  let dLim = 0;
  group.forEach((i, k) => {
    r[k] = k === lim ? 0 : Math.max(0, a[k] - q[k] * jMax);
    const d = -(r[k] + el.j0Am2[i]) / q[k];
    if (d > dMin) {
      dMin = d;
      dLim = k;
    }
  });
  // With δ = δ_min + e^z, each cell has w + J0 = c_k + q_k·e^z, c_k ≥ 0 and exactly 0 for the
  // cell that sets δ_min: no cancellation, however close to its limit a cell is driven.
  const c = new Float64Array(m);
  group.forEach((i, k) => (c[k] = k === dLim ? 0 : Math.max(0, r[k] + el.j0Am2[i] + q[k] * dMin)));
  // Group current at z: J = J_max − δ = (J_max − δ_min) − e^z.
  const jBase = jMax - dMin;
  const volts = (z: number, out?: Float64Array): number => {
    const e = Math.exp(z);
    const j = jBase - e;
    let v = 0;
    group.forEach((i, k) => {
      const vi = el.vt * Math.log((c[k] + q[k] * e) / el.j0Am2[i]) - (rs ? j * rs[i] : 0);
      v += vi;
      if (out) out[i] = vi;
    });
    return v;
  };
  let zLo = -745;
  let zHi = Math.log(Math.max(1e-300, Math.abs(dMin)) + Math.max(1, Math.abs(jMax)));
  // NaN (a cell pushed past its reverse-bias limit by rounding) counts as −∞.
  const below = (z: number) => !(volts(z) >= voltageV);
  for (let k = 0; k < 200 && below(zHi); k++) zHi += 1;
  // Newton on V(z) − V, kept inside the bracket; bisection where a step would leave it.
  // A neighbouring voltage's solution (warm start) is usually a few steps away.
  let z = warm?.z !== undefined && warm.z > zLo && warm.z < zHi ? warm.z : zHi;
  for (let it = 0; it < 200 && zHi - zLo > 1e-14 * Math.max(1, Math.abs(zHi)); it++) {
    const e = Math.exp(z);
    let v = 0;
    let dv = 0;
    group.forEach((i, k) => {
      const w = c[k] + q[k] * e;
      v += el.vt * Math.log(w / el.j0Am2[i]);
      dv += (el.vt * q[k] * e) / w;
    });
    v -= (jBase - e) * rSum;
    dv += e * rSum;
    if (!(v >= voltageV)) zLo = z;
    else zHi = z;
    // Converged once the voltage matches to rounding (V ~ volts, so 1e-13 V is a few ulps).
    if (Math.abs(v - voltageV) <= 1e-13 * Math.max(1, Math.abs(voltageV))) break;
    let next = z - (v - voltageV) / dv;
    if (!(next > zLo && next < zHi) || !Number.isFinite(next)) next = 0.5 * (zLo + zHi);
    const step = next - z;
    z = next;
    if (Math.abs(step) < 1e-13 * Math.max(1, Math.abs(z))) break;
  }
  // The converged iterate, unless rounding left a cell voltage undefined there.
  zHi = Number.isFinite(volts(z)) ? z : zHi;
  if (warm) warm.z = zHi;
  volts(zHi, voltages);
  const delta = dMin + Math.exp(zHi);
  const j = jMax - delta;
  for (const i of group) currents[i] = j;
  cascadePhotocurrents(el, currents, jph);
  return j;
}

/**
 * Voltage-matched strings (Warren et al., Sustainable Energy Fuels 2 (2018)
 * 1412; Schulte-Huxel et al., IEEE J. Photovolt. 8 (2018) 1370): m circuits of
 * the upper group in series match n of the lower, m·V_upper = n·V_lower, so
 * P = max_V [P_upper(V) + P_lower(m·V/n)] per unit area.
 */
export function operateVoltageMatched(el: StackElectrical, upper: number[], lower: number[], m: number, n: number): Operation {
  const cells = el.jgenAm2.length;
  const currents = new Float64Array(cells);
  const jph = new Float64Array(cells);
  const voltages = new Float64Array(cells);
  const warmUpper: { z?: number } = {};
  const warmLower: { z?: number } = {};
  const power = (v: number): number => {
    const ja = operateGroupAtVoltage(el, upper, v, currents, jph, voltages, warmUpper);
    const vb = (m * v) / n;
    const jb = operateGroupAtVoltage(el, lower, vb, currents, jph, voltages, warmLower);
    return v * ja + vb * jb;
  };
  // The upper group's open-circuit voltage bounds the search.
  for (let i = 0; i < cells; i++) currents[i] = 0;
  cascadePhotocurrents(el, currents, jph);
  let vocUpper = 0;
  for (const i of upper) vocUpper += cellVoltage(jph[i], 0, el.j0Am2[i], el.vt);
  const v = maximiseScan(power, 0, vocUpper, 24, 1e-11);
  const p = power(v);
  return { currentsAm2: currents, voltagesV: voltages, jphAm2: jph, powerWm2: p };
}

/** Open-circuit voltage [V] and short-circuit current [A/m²] of one series group (2T terminals). */
export function seriesTerminals(el: StackElectrical, group: number[]): { vocV: number; jscAm2: number } {
  const n = el.jgenAm2.length;
  const currents = new Float64Array(n);
  const jph = new Float64Array(n);
  for (const i of group) currents[i] = 0;
  cascadePhotocurrents(el, currents, jph);
  let voc = 0;
  for (const i of group) voc += cellVoltage(jph[i], 0, el.j0Am2[i], el.vt);
  const jsc = operateGroupAtVoltage(el, group, 0, currents, jph, new Float64Array(n));
  return { vocV: voc, jscAm2: jsc };
}


/**
 * One subcell alone at its photocurrent with a series resistance: maximum power [W/m²],
 * its voltage [V] and current [A/m²], from the concave P(J) = J·(V_t ln((J_ph − J + J0)/J0) − J·R).
 */
export function maxPowerPointWithRs(jphAm2: number, j0Am2: number, vt: number, rsOhmM2: number): { pmaxWm2: number; vmpV: number; jmpAm2: number } {
  const c = Float64Array.of(jphAm2 + j0Am2);
  const d = Float64Array.of(-1);
  const j = maximiseGroupCurrent(c, d, Float64Array.of(j0Am2), Uint8Array.of(1), Float64Array.of(0), 1, vt, Float64Array.of(rsOhmM2));
  const v = cellVoltage(jphAm2, j, j0Am2, vt) - j * rsOhmM2;
  return { pmaxWm2: j * v, vmpV: v, jmpAm2: j };
}
