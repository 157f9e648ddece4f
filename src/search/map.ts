/**
 * Efficiency maps over two subcell gaps (x the upper, y the lower), others
 * fixed or maximised over (a profile map). The two-cell step case runs from
 * tables along each axis: one series solve per pixel, nothing else.
 */
import { ParameterError, ref, says } from '../errors.js';
import type { GapObjective } from '../stack/gap-objective.js';
import { StepObjective } from '../stack/step-objective.js';
import { nelderMeadMax } from './refine.js';
import { maximiseScan } from '../numerics/golden.js';

/** A map over two subcell gaps: axes [eV], which subcells, and what the others do (fixed or maximised per pixel). */
export interface MapRequest {
  /** Axis values [eV] of the upper mapped subcell. */
  x: Float64Array;
  /** Axis values [eV] of the lower mapped subcell. */
  y: Float64Array;
  /** 0-based indices of the mapped subcells, xCell < yCell. */
  xCell: number;
  yCell: number;
  /** Fixed gaps [eV] of the other subcells; undefined ones are maximised per pixel. */
  fixed: (number | undefined)[];
  /** Bounds [eV] for subcells maximised per pixel. */
  bounds: [number, number][];
  /** Called after each row with the share done. */
  progress?: (fraction: number) => void;
}

/** Efficiency [-] over two gaps [eV], row-major, with the best pixel. */
export interface GapMap {
  x: Float64Array;
  y: Float64Array;
  xCell: number;
  yCell: number;
  /** Row-major values, index = iy·nx + ix; NaN where the gaps are out of order. */
  values: Float64Array;
  /** Gaps of the maximised subcells per pixel (profile maps), else empty. */
  profileGaps: Float64Array[];
  profile: boolean;
  best: { x: number; y: number; value: number };
  /** Pixels with a value (the rest are NaN). */
  points: number;
}

/** Uniform axis from lo to hi [eV] by step. */
export function uniformAxis(lo: number, hi: number, step: number): Float64Array {
  if (!(step > 0)) throw new ParameterError('stepEv', 'a positive step [eV]', says`${ref('stepEv')} must be a positive number of eV, got ${step}`);
  const n = Math.floor((hi - lo) / step + 1e-9) + 1;
  if (n < 2) throw new ParameterError('stepEv', 'a step giving at least two points', says`the range ${lo}:${hi} eV holds fewer than two points at step ${step} eV`);
  if (n > 5001) throw new ParameterError('stepEv', 'a step giving at most 5001 points per axis', says`${n} points per axis at step ${step} eV; use a coarser ${ref('stepEv')} (at most 5001 per axis)`);
  return Float64Array.from({ length: n }, (_, k) => Number((lo + k * step).toFixed(10)));
}

/**
 * Efficiency [-] of the objective over two subcell gaps [eV] (x the upper, y the lower),
 * the other subcells fixed or maximised per pixel (a profile map); NaN where the gaps
 * would not descend. Two ideal step cells run from tables along each axis.
 */
export function computeMap(obj: GapObjective, req: MapRequest): GapMap {
  const { x, y, xCell, yCell } = req;
  const n = obj.cells;
  if (!(xCell >= 0 && yCell > xCell && yCell < n)) throw new ParameterError('yCell', `two subcell indices 0–${n - 1}, xCell < yCell`, says`mapped subcells must be two of 1–${n}, upper first`);
  const nx = x.length;
  const ny = y.length;
  const values = new Float64Array(nx * ny).fill(NaN);
  const free = Array.from({ length: n }, (_, i) => i).filter((i) => i !== xCell && i !== yCell && req.fixed[i] === undefined);
  const profileGaps = free.map(() => new Float64Array(nx * ny).fill(NaN));
  let best = { x: NaN, y: NaN, value: -Infinity };
  let points = 0;
  const note = (ix: number, iy: number, v: number) => {
    values[iy * nx + ix] = v;
    if (!Number.isNaN(v)) points++;
    if (v > best.value) best = { x: x[ix], y: y[iy], value: v };
  };
  const fast = obj instanceof StepObjective && n === 2 && typeof obj.options.topAbsorptance === 'number';
  if (fast) {
    const so = obj as StepObjective;
    const done = so.mapTwoCells(x, y, so.options.topAbsorptance as number, values);
    if (done.best >= 0) best = { x: x[done.best % nx], y: y[Math.floor(done.best / nx)], value: values[done.best] };
    return { x, y, xCell, yCell, values, profileGaps, profile: false, best, points: done.points };
  }
  const gaps = new Array<number>(n);
  for (let i = 0; i < n; i++) gaps[i] = req.fixed[i] ?? NaN;
  let warm: number[] | null = null;
  for (let iy = 0; iy < ny; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      if (!(y[iy] < x[ix])) continue;
      gaps[xCell] = x[ix];
      gaps[yCell] = y[iy];
      if (free.length === 0) {
        note(ix, iy, obj.value(gaps));
        continue;
      }
      // Profile: maximise over the free subcells inside their bounds and the ordering the
      // mapped gaps impose (a free cell between two mapped ones must lie between them).
      const lo: number[] = [];
      const hi: number[] = [];
      for (const i of free) {
        let l = req.bounds[i][0];
        let h = req.bounds[i][1];
        for (const [c, g] of [[xCell, x[ix]], [yCell, y[iy]]] as const) {
          if (c < i) h = Math.min(h, g - 1e-4);
          if (c > i) l = Math.max(l, g + 1e-4);
        }
        lo.push(l);
        hi.push(h);
      }
      if (lo.some((l, k) => !(l < hi[k]))) continue;
      const f = (v: number[]) => {
        free.forEach((i, k) => (gaps[i] = v[k]));
        return obj.value(gaps);
      };
      let bestLocal: { x: number[]; value: number };
      if (free.length === 1) {
        const g = maximiseScan((e) => f([e]), lo[0], hi[0], Math.max(8, Math.ceil((hi[0] - lo[0]) / 0.01)), 1e-7);
        bestLocal = { x: [g], value: f([g]) };
      } else {
        // Ordered starts: evenly spread inside each cell's interval, top cell highest; and the neighbour's answer.
        const spread = free.map((_, k) => lo[k] + ((hi[k] - lo[k]) * (free.length - k)) / (free.length + 1));
        const starts = [spread, ...(warm && warm.every((v, k) => v > lo[k] && v < hi[k]) ? [warm] : [])];
        bestLocal = { x: spread, value: -Infinity };
        for (const st of starts) {
          const r = nelderMeadMax(f, st, 0.05, { lo, hi }, 1e-5, 1500);
          if (r.value > bestLocal.value) bestLocal = r;
        }
      }
      warm = bestLocal.x;
      free.forEach((_, k) => (profileGaps[k][iy * nx + ix] = bestLocal.x[k]));
      note(ix, iy, bestLocal.value);
      // A profile point is a whole local search: report each one, not only whole rows.
      req.progress?.((iy * nx + ix + 1) / (nx * ny));
    }
    req.progress?.((iy + 1) / ny);
  }
  return { x, y, xCell, yCell, values, profileGaps, profile: free.length > 0, best, points };
}

const MAP_TITLE = '# gapstack map: detailed-balance efficiency [%] over two subcell gaps [eV]; theoretical limits under the stated assumptions, not device predictions';

/** The title line, then `# ` metadata lines (wiring, light, temperature, version…), then the column names. */
function mapCsvHead(m: GapMap, freeCells: number[], metaLines: readonly string[]): string {
  const head = [`gap${m.xCell + 1}_ev`, `gap${m.yCell + 1}_ev`, ...freeCells.map((i) => `gap${i + 1}_ev_profile`), 'efficiency_percent'];
  return [MAP_TITLE, ...metaLines.map((l) => `# ${l}`), head.join(',')].join('\n');
}

/**
 * CSV text of a map: one row per pixel, gaps [eV] and efficiency [%] to six
 * decimals, after a title and the caller's metadata lines. The plain form,
 * kept as the definition of the format; commands write mapToCsvBytes, which
 * gives the same bytes faster.
 */
export function mapToCsv(m: GapMap, freeCells: number[] = [], metaLines: readonly string[] = []): string {
  const lines = [mapCsvHead(m, freeCells, metaLines)];
  const nx = m.x.length;
  for (let iy = 0; iy < m.y.length; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      const v = m.values[iy * nx + ix];
      if (Number.isNaN(v)) continue;
      const extra = m.profileGaps.map((g) => g[iy * nx + ix].toFixed(5));
      lines.push([m.x[ix].toFixed(5), m.y[iy].toFixed(5), ...extra, (v * 100).toFixed(DIGITS)].join(','));
    }
  }
  return `${lines.join('\n')}\n`;
}

const DIGITS = 6;
const SCALE = 10 ** DIGITS;
/** 2^27 + 1: Veltkamp's constant, splitting a double into two halves of 26 bits. */
const SPLITTER = 134217729;

/** ASCII of the numbers 00–99, two bytes each. */
const DIGIT_PAIRS = Uint8Array.from({ length: 200 }, (_, i) => 48 + (i % 2 === 0 ? Math.floor(i / 20) : (i >> 1) % 10));

/** Each axis value as lead + toFixed(5) + tail, formatted once per axis: the bytes end to end and where each starts. */
function axisBytes(values: ArrayLike<number>, lead: string, tail: string): { bytes: Uint8Array; start: Int32Array } {
  const parts = Array.from(values as ArrayLike<number>, (v) => `${lead}${v.toFixed(5)}${tail}`);
  const start = new Int32Array(parts.length + 1);
  for (let i = 0; i < parts.length; i++) start[i + 1] = start[i] + parts[i].length;
  return { bytes: Buffer.from(parts.join(''), 'latin1'), start };
}

/**
 * mapToCsv as bytes, for writing large maps: the same bytes, without a string
 * per cell. A value w = 100·v in [0, 99.9999995) is written as toFixed(6) would,
 * from the nearest integer to the exact w·1e6, ties upward. The product rounded
 * to a double, p, has an error e that Dekker's split gives exactly (1e6 fits
 * in 26 bits); Math.round(p) is that integer unless p is itself a half, where
 * the sign of e decides (p + e cannot cross a half that p is not on: the
 * halves are doubles, farther from p than |e|). Other values (never on a
 * map) go through toFixed. One loop with no calls per row and no branch a map
 * reaches only now and then: a large map is written once, mostly before the
 * optimising compiler has seen the loop, and a rare branch reached after it
 * has would throw its code away (the toFixed fallback for near-halves did,
 * once per 5 meV map: 4 ms).
 */
export function mapToCsvBytes(m: GapMap, freeCells: number[] = [], metaLines: readonly string[] = []): Uint8Array {
  const preamble = Buffer.from(mapCsvHead(m, freeCells, metaLines), 'utf8');
  const nx = m.x.length;
  const ny = m.y.length;
  const xa = axisBytes(m.x, '\n', ',');
  const ya = axisBytes(m.y, '', ',');
  const xb = xa.bytes;
  const xs = xa.start;
  const yb = ya.bytes;
  const ys = ya.start;
  const values = m.values;
  const profile = m.profileGaps;
  const widest = (s: Int32Array) => s.reduce((w, v, i) => (i > 0 ? Math.max(w, v - s[i - 1]) : w), 0);
  // Room for every line: the widest x and y, each profile gap as toFixed(5) of up to 1e6 and a comma, the value up to 1e7 (percent).
  const perLine = widest(xs) + widest(ys) + profile.length * 16 + 20;
  const buf = Buffer.allocUnsafe(preamble.length + m.points * perLine + 2);
  buf.set(preamble, 0);
  let pos = preamble.length;
  for (let iy = 0; iy < ny; iy++) {
    const y0 = ys[iy];
    const y1 = ys[iy + 1];
    let k = iy * nx;
    for (let ix = 0; ix < nx; ix++, k++) {
      const v = values[k];
      if (v !== v) continue;
      for (let i = xs[ix], e = xs[ix + 1]; i < e; i++) buf[pos++] = xb[i];
      for (let i = y0; i < y1; i++) buf[pos++] = yb[i];
      for (let g = 0; g < profile.length; g++) {
        pos += buf.write(profile[g][k].toFixed(5), pos, 'latin1');
        buf[pos++] = 44;
      }
      const w = v * 100;
      const scaled = w * SCALE;
      // w·1e6 = scaled + err exactly (Dekker's product with w split in two 26-bit halves).
      const split = w * SPLITTER;
      const wHigh = split - (split - w);
      const err = wHigh * SCALE - scaled + (w - wHigh) * SCALE;
      const up = Math.round(scaled);
      const n = up - scaled === 0.5 && err < 0 ? up - 1 : up;
      const int = Math.floor(n / SCALE);
      if (!(w >= 0 && int < 100)) {
        pos += buf.write(w.toFixed(DIGITS), pos, 'latin1');
        continue;
      }
      let fr = n - int * SCALE;
      if (int >= 10) {
        buf[pos++] = DIGIT_PAIRS[2 * int];
        buf[pos++] = DIGIT_PAIRS[2 * int + 1];
      } else buf[pos++] = 48 + int;
      buf[pos++] = 46;
      // Six decimals as three pairs: fr < 1e6.
      const a = Math.floor(fr / 10000);
      fr -= a * 10000;
      const b = Math.floor(fr / 100);
      const c = fr - b * 100;
      buf[pos] = DIGIT_PAIRS[2 * a];
      buf[pos + 1] = DIGIT_PAIRS[2 * a + 1];
      buf[pos + 2] = DIGIT_PAIRS[2 * b];
      buf[pos + 3] = DIGIT_PAIRS[2 * b + 1];
      buf[pos + 4] = DIGIT_PAIRS[2 * c];
      buf[pos + 5] = DIGIT_PAIRS[2 * c + 1];
      pos += DIGITS;
    }
  }
  buf[pos++] = 10;
  return buf.subarray(0, pos);
}
