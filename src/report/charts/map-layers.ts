/**
 * The layers every efficiency map over two gaps draws, whether alone (map
 * chart) or as a panel beside another (compare chart): the plot geometry of a
 * grid, filled contour bands on viridis, labelled isolines, the tolerance
 * outline, the shading of gaps out of order, the windows / ranges / fixed
 * absorbers of bound families ("marks") with their labels, the colour bar and
 * the legend swatches. One set of styles serves both charts, and any section
 * that draws maps to be compared: give them one `ColourDomain`
 * (`sharedColourDomain`) and place every label through one `LabelBoard` per plot.
 */
import { contours, type ContourMultiPolygon, type Contours } from 'd3-contour';
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { interpolateViridis } from 'd3-scale-chromatic';
import type { MapMark } from '../compute.js';
import { d3, linePath, num, styleAxis, svgText, type Sel } from '../svg.js';
import { LabelBoard, pointBox, textWidthPx, type Candidate, type Placed, type TextStyle } from './labels.js';

export type Ring = [number, number][];
export type Pos = number[];
type Point = [number, number];

/** Palette of the overlays, chosen to read on every part of viridis. */
export const MAP_COLOURS = {
  tolerance: '#ffffff',
  matching: '#ff5a36',
  fixed: '#111111',
  window: '#ffffff',
  invalid: '#e6e6e6',
  marker: '#111111',
  /** Values below the colour domain: a neutral grey that viridis never reaches, darker than the out-of-order grey. */
  under: '#9e9e9e',
};

/** Stroke widths, opacities and dashes of the map layers. */
export const MAP_STYLE = {
  isoline: { stroke: '#ffffff', opacity: 0.75, width: 0.8 },
  isolabel: { size: 10, fill: '#111111', halo: '#ffffff', haloWidth: 2.5 },
  tolerance: { width: 1.8, dash: '4,2.5', halo: '#000000', haloOpacity: 0.45, haloWidth: 3.6 },
  fixed: { width: 1.6, halo: '#ffffff', haloWidth: 4 },
  window: { width: 1.4, dash: '6,3', halo: '#000000', haloOpacity: 0.5, haloWidth: 3, band: 7, hatch: 5 },
  range: { width: 1.2, dash: '2,3' },
  markLabel: { size: 10, fill: '#ffffff', halo: '#000000', haloWidth: 2.2, pad: 6 },
};

/** Label styles as the board measures them. */
const ISO_TEXT: TextStyle = { size: MAP_STYLE.isolabel.size };
const MARK_TEXT: TextStyle = { size: MAP_STYLE.markLabel.size };
export const OPTIMUM_TEXT: TextStyle = { size: 11, bold: true };
/** Isoline labels sit this far inside the plot's left/right and top/bottom edges [px], clear of the axes. */
const ISO_EDGE = { x: 18, y: 12 };
/** Most isoline-label places tried per level. */
const ISO_CANDIDATES = 240;

/** The colour range of a map [%]: values below `lo` take the under-range colour, above `hi` cannot occur. */
export interface ColourDomain {
  lo: number;
  hi: number;
}

/** Default depth of a map's colour scale below its highest value [percentage points]. */
export const MAP_SPAN_PCT = 12;

/**
 * One colour domain for maps a reader compares: up to the highest value of
 * any of them, down to their lowest value or `spanPct` below the highest,
 * whichever is higher. Maps given the same domain show the same efficiency in
 * the same colour.
 */
export function sharedColourDomain(maps: { values: ArrayLike<number> }[], spanPct = MAP_SPAN_PCT): ColourDomain {
  let lo = Infinity;
  let hi = -Infinity;
  for (const m of maps) {
    for (let k = 0; k < m.values.length; k++) {
      const v = m.values[k];
      if (Number.isNaN(v)) continue;
      lo = Math.min(lo, v * 100);
      hi = Math.max(hi, v * 100);
    }
  }
  if (!Number.isFinite(hi)) return { lo: 0, hi: 1 };
  return { lo: Math.max(lo, hi - spanPct), hi: Math.max(hi, Math.max(lo, hi - spanPct) + 1e-6) };
}

/** Plot geometry of a map's grid: scales, and d3-contour output in plot pixels. */
export interface MapPlot {
  w: number;
  h: number;
  nx: number;
  ny: number;
  x0: number;
  x1: number;
  y0: number;
  y1: number;
  xs: ScaleLinear<number, number>;
  ys: ScaleLinear<number, number>;
  /** Contour generator of the grid's size. */
  gen: Contours;
  /** Plot pixel of a contour coordinate (c_x, c_y). */
  pixel(c: Pos): Point;
  /** Path data of a contour multipolygon. */
  path(mp: { coordinates: Pos[][][] }): string;
}

export function mapPlot(axes: { x: ArrayLike<number>; y: ArrayLike<number> }, w: number, h: number): MapPlot {
  const nx = axes.x.length;
  const ny = axes.y.length;
  const x0 = axes.x[0];
  const x1 = axes.x[nx - 1];
  const y0 = axes.y[0];
  const y1 = axes.y[ny - 1];
  const xs = scaleLinear().domain([x0, x1]).range([0, w]);
  const ys = scaleLinear().domain([y0, y1]).range([h, 0]);
  const dx = nx > 1 ? (x1 - x0) / (nx - 1) : 1;
  const dy = ny > 1 ? (y1 - y0) / (ny - 1) : 1;
  // d3-contour puts sample (i, j) at grid coordinate (i + 0.5, j + 0.5).
  const pixel = (c: Pos): Point => [xs(x0 + (c[0] - 0.5) * dx), ys(y0 + (c[1] - 0.5) * dy)];
  const ringPath = (rings: Pos[][]) => rings.map((r) => `${linePath(r.map(pixel), 1)}Z`).join('');
  return { w, h, nx, ny, x0, x1, y0, y1, xs, ys, gen: contours().size([nx, ny]), pixel, path: (mp) => mp.coordinates.map(ringPath).join('') };
}

/** Values in percent with unordered pixels filled from their row's nearest ordered neighbour (for contouring only). */
export function filledGrid(values: Float64Array, nx: number, ny: number, scale: number): { grid: number[]; lo: number; hi: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (Number.isNaN(v)) continue;
    lo = Math.min(lo, v * scale);
    hi = Math.max(hi, v * scale);
  }
  const grid = new Array<number>(nx * ny);
  for (let iy = 0; iy < ny; iy++) {
    let next = NaN;
    for (let ix = nx - 1; ix >= 0; ix--) {
      const v = values[iy * nx + ix];
      if (!Number.isNaN(v)) next = v * scale;
      grid[iy * nx + ix] = Number.isNaN(v) ? next : v * scale;
    }
    let prev = NaN;
    for (let ix = 0; ix < nx; ix++) {
      const k = iy * nx + ix;
      if (!Number.isNaN(grid[k])) prev = grid[k];
      else grid[k] = Number.isNaN(prev) ? lo : prev;
    }
  }
  return { grid, lo, hi };
}

/** The first step in `steps` that splits `range` into at most `target` parts. */
export function niceStep(range: number, target: number, steps: number[]): number {
  for (const s of steps) if (range / s <= target) return s;
  return steps[steps.length - 1];
}

/** Viridis over [lo, hi] [%], clamped at both ends. */
export function viridisColour(lo: number, hi: number): (v: number) => string {
  return (v) => interpolateViridis(Math.min(1, Math.max(0, (v - lo) / Math.max(1e-9, hi - lo))));
}

/** Filled-band step [percentage points] over a colour range. */
export function bandStep(lo: number, hi: number): number {
  return niceStep(hi - lo, 30, [0.1, 0.25, 0.5, 1, 2]);
}

/** Isoline step [percentage points] over a colour range. */
export function isoStep(lo: number, hi: number): number {
  return niceStep(hi - lo, 7, [0.2, 0.5, 1, 2, 5]);
}

/** Multiples of `step` from lo up to below hi; `inner` leaves out levels on either end. */
export function stepLevels(lo: number, hi: number, step: number, inner: boolean): number[] {
  const eps = inner ? 1e-9 : 0;
  const out: number[] = [];
  for (let t = Math.ceil((lo + eps) / step) * step; t < hi - eps; t += step) out.push(Number(t.toFixed(4)));
  return out;
}

/** The polygon of the rectangle [x0,x1]×[y0,y1] where y ≥ x (gaps out of order). */
export function unorderedRegion(x0: number, x1: number, y0: number, y1: number): Ring {
  const corners: Ring = [
    [x0, y0],
    [x1, y0],
    [x1, y1],
    [x0, y1],
  ];
  const inside = (p: [number, number]) => p[1] >= p[0];
  const out: Ring = [];
  for (let i = 0; i < 4; i++) {
    const a = corners[i];
    const b = corners[(i + 1) % 4];
    if (inside(a)) out.push(a);
    if (inside(a) !== inside(b)) {
      const da = a[1] - a[0];
      const db = b[1] - b[0];
      const t = da / (da - db);
      out.push([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]);
    }
  }
  return out;
}

/** Area of a polygon [eV²] (shoelace). */
export function ringArea(r: Ring): number {
  let a = 0;
  for (let i = 0; i < r.length; i++) {
    const p = r[i];
    const q = r[(i + 1) % r.length];
    a += p[0] * q[1] - q[0] * p[1];
  }
  return Math.abs(a) / 2;
}

/** A clip path of the plot's size (in `defsParent`) and the clipped group in `g` to draw the layers into. */
export function clippedPlot(defsParent: Sel, g: Sel, clipId: string, p: MapPlot): Sel {
  defsParent.append('defs').append('clipPath').attr('id', clipId).append('rect').attr('width', p.w).attr('height', p.h);
  return g.append('g').attr('clip-path', `url(#${clipId})`);
}

/**
 * The under-range base and the filled bands from `lo` up, each coloured at
 * the middle of its step: everything below `lo` keeps the under-range grey.
 */
/** Contours already traced, by level, with their path data: the isolines reuse the bands' (a band's edge is the isoline of its level). */
type Traced = Map<number, { c: ContourMultiPolygon; d: string }>;

function drawBands(plot: Sel, p: MapPlot, grid: number[], lo: number, hi: number): Traced {
  const colour = viridisColour(lo, hi);
  const step = bandStep(lo, hi);
  plot.append('rect').attr('class', 'gs-map-base gs-under-range').attr('width', p.w).attr('height', p.h).attr('fill', MAP_COLOURS.under);
  const bands = plot.append('g').attr('class', 'gs-bands');
  const levels = [lo, ...stepLevels(lo, hi, step, true)];
  const traced: Traced = new Map();
  for (const c of p.gen.thresholds(levels)(grid)) {
    const d = c.coordinates.length === 0 ? '' : p.path(c);
    traced.set(c.value, { c, d });
    if (c.coordinates.length === 0) continue;
    const next = levels.find((t) => t > c.value + 1e-9) ?? hi;
    bands.append('path').attr('class', 'gs-band').attr('data-level', num(c.value, 2)).attr('fill', colour((c.value + Math.min(next, hi)) / 2)).attr('d', d);
  }
  return traced;
}

/** The hatch pattern of window edge bands, defined once per chart (`<id>-hatch`). */
export function defineHatch(defsParent: Sel, chartId: string): string {
  const id = `${chartId}-hatch`;
  const S = MAP_STYLE.window;
  defsParent
    .append('defs')
    .append('pattern')
    .attr('id', id)
    .attr('patternUnits', 'userSpaceOnUse')
    .attr('width', S.hatch)
    .attr('height', S.hatch)
    .attr('patternTransform', 'rotate(45)')
    .append('line')
    .attr('x1', 0)
    .attr('y1', 0)
    .attr('x2', 0)
    .attr('y2', S.hatch)
    .attr('stroke', MAP_COLOURS.window)
    .attr('stroke-opacity', 0.85)
    .attr('stroke-width', 1.6);
  return id;
}

/**
 * Windows as dashed outlines with a hatched band just inside each edge (the
 * data colours inside stay as they are), ranges as dotted outlines, fixed
 * absorbers as haloed lines.
 */
function drawMarks(plot: Sel, p: MapPlot, marks: MapMark[], hatchId: string): void {
  const S = MAP_STYLE;
  const g = plot.append('g').attr('class', 'gs-marks');
  for (const mk of marks) {
    const horizontal = mk.axis === 'y';
    const a = horizontal ? p.ys(mk.hiEv) : p.xs(mk.loEv);
    const b = horizontal ? p.ys(mk.loEv) : p.xs(mk.hiEv);
    if (mk.kind === 'fixed') {
      const l = horizontal ? { x1: 0, x2: p.w, y1: a, y2: a } : { x1: a, x2: a, y1: 0, y2: p.h };
      const line = (cls: string) => g.append('line').attr('class', cls);
      const ends = (s: Sel) => s.attr('x1', num(l.x1)).attr('x2', num(l.x2)).attr('y1', num(l.y1)).attr('y2', num(l.y2));
      ends(line('gs-fixed-halo')).attr('stroke', S.fixed.halo).attr('stroke-width', S.fixed.haloWidth);
      ends(line('gs-fixed').attr('data-gap', num(mk.loEv, 4))).attr('stroke', MAP_COLOURS.fixed).attr('stroke-width', S.fixed.width);
      continue;
    }
    const window = mk.kind === 'window';
    const r = horizontal ? { x: 0, y: a, width: p.w, height: b - a } : { x: a, y: 0, width: b - a, height: p.h };
    const rect = (cls: string) =>
      g
        .append('rect')
        .attr('class', cls)
        .attr('x', num(r.x))
        .attr('y', num(r.y))
        .attr('width', num(Math.max(0, r.width)))
        .attr('height', num(Math.max(0, r.height)))
        .attr('fill', 'none');
    if (window) {
      // Edge bands: hatch only within S.window.band px inside each edge that crosses the plot.
      const band = Math.min(S.window.band, Math.max(0, (horizontal ? r.height : r.width) / 2));
      const strips = horizontal
        ? [{ x: 0, y: a, width: p.w, height: band }, { x: 0, y: b - band, width: p.w, height: band }]
        : [{ x: a, y: 0, width: band, height: p.h }, { x: b - band, y: 0, width: band, height: p.h }];
      for (const st of strips) {
        g.append('rect').attr('class', 'gs-window-band').attr('x', num(st.x)).attr('y', num(st.y)).attr('width', num(st.width)).attr('height', num(st.height)).attr('fill', `url(#${hatchId})`);
      }
      rect('gs-window-halo').attr('stroke', S.window.halo).attr('stroke-opacity', S.window.haloOpacity).attr('stroke-width', S.window.haloWidth);
    }
    rect(window ? 'gs-window' : 'gs-range')
      .attr('data-lo', num(mk.loEv, 4))
      .attr('data-hi', num(mk.hiEv, 4))
      .attr('stroke', MAP_COLOURS.window)
      .attr('stroke-width', window ? S.window.width : S.range.width)
      .attr('stroke-dasharray', window ? S.window.dash : S.range.dash);
  }
}

/** Places for a mark's label, best first: inside its band or beside its line, along either end. */
function markCandidates(p: MapPlot, mk: MapMark, side: 'left' | 'right'): Candidate[] {
  const pad = MAP_STYLE.markLabel.pad;
  const size = MAP_STYLE.markLabel.size;
  if (mk.axis === 'y') {
    const top = p.ys(mk.hiEv);
    const bottom = p.ys(mk.loEv);
    const ys = mk.kind === 'fixed' ? [top - 5, top + size + 3] : [top + size + 3, bottom - 5, top - 5, bottom + size + 3];
    const ends = side === 'left' ? ['start', 'end'] : ['end', 'start'];
    return ends.flatMap((e) => ys.map((y): Candidate => ({ x: e === 'start' ? pad : p.w - pad, y, anchor: e as 'start' | 'end' })));
  }
  const a = p.xs(mk.loEv);
  const b = p.xs(mk.hiEv);
  const ys = [size + 4, p.h - 6, size * 2 + 8, p.h - size - 10];
  return [
    ...ys.map((y): Candidate => ({ x: a + 4, y, anchor: 'start' })),
    ...ys.map((y): Candidate => ({ x: b - 4, y, anchor: 'end' })),
    ...ys.map((y): Candidate => ({ x: a - 4, y, anchor: 'end' })),
  ];
}

/** Place the marks' labels on the board (before the isolines': they matter more). */
function placeMarkLabels(board: LabelBoard, p: MapPlot, marks: MapMark[], side: 'left' | 'right'): Placed[] {
  const out: Placed[] = [];
  for (const mk of marks) {
    const placed = board.placeOrShorten(markCandidates(p, mk, side), mk.label, MARK_TEXT, 8);
    if (placed) out.push(placed);
  }
  return out;
}

/**
 * Candidate places of a contour's label (plot pixels, anchored at the middle):
 * its vertices, those farthest from `others` first (distances along x count
 * 1/1.6), at most ISO_CANDIDATES of them.
 */
export function isolabelCandidates(p: MapPlot, c: { coordinates: Pos[][][] }, others: Point[]): Candidate[] {
  const pts: { x: number; y: number; score: number }[] = [];
  for (const poly of c.coordinates) {
    for (const ring of poly) {
      for (const q of ring) {
        const [X, Y] = p.pixel(q);
        if (X < ISO_EDGE.x || X > p.w - ISO_EDGE.x || Y < ISO_EDGE.y || Y > p.h - ISO_EDGE.y) continue;
        let d = Infinity;
        for (const r of others) d = Math.min(d, Math.hypot((X - r[0]) / 1.6, Y - r[1]));
        pts.push({ x: X, y: Y, score: d });
      }
    }
  }
  pts.sort((u, v) => v.score - u.score);
  const stride = Math.max(1, Math.floor(pts.length / ISO_CANDIDATES));
  const out: Candidate[] = [];
  for (let i = 0; i < pts.length && out.length < ISO_CANDIDATES; i += stride) out.push({ x: pts[i].x, y: pts[i].y + 3.5, anchor: 'middle' });
  return out;
}

/** Isolines every `step` points within (lo, hi); each labelled once where the board has room, or left unlabelled. */
function drawIsolines(plot: Sel, p: MapPlot, grid: number[], lo: number, hi: number, board: LabelBoard, away: Point[], traced: Traced): void {
  const S = MAP_STYLE;
  const step = isoStep(lo, hi);
  const iso = plot.append('g').attr('class', 'gs-isolines');
  const labels = plot.append('g').attr('class', 'gs-isolabels');
  const others = [...away];
  const levels = stepLevels(lo, hi, step, true);
  const untraced = levels.filter((v) => !traced.has(v));
  const fresh = untraced.length > 0 ? p.gen.thresholds(untraced)(grid) : [];
  const contoursAt = levels.map((v) => traced.get(v) ?? { c: fresh.find((f) => f.value === v) as ContourMultiPolygon, d: '' });
  for (const { c, d } of contoursAt) {
    if (!c || c.coordinates.length === 0) continue;
    iso.append('path').attr('class', 'gs-isoline').attr('data-level', num(c.value, 2)).attr('fill', 'none').attr('stroke', S.isoline.stroke).attr('stroke-opacity', S.isoline.opacity).attr('stroke-width', S.isoline.width).attr('d', d || p.path(c));
    const pick = board.place(isolabelCandidates(p, c, others), `${num(c.value, step < 1 ? 1 : 0)} %`, ISO_TEXT);
    if (!pick) continue;
    others.push([pick.x, pick.y]);
    haloText(labels, pick, S.isolabel).attr('class', 'gs-isolabel gs-label');
  }
}

/** A placed label as haloed text, with its full text as a tooltip when it was cut. */
export function haloText(parent: Sel, t: Placed, style: { size: number; fill: string; halo: string; haloWidth: number }, bold = false): Sel {
  let host = parent;
  if (t.full) {
    host = parent.append('g').attr('class', 'gs-cut');
    host.append('title').text(svgText(t.full));
  }
  const el = host
    .append('text')
    .attr('x', num(t.x, 1))
    .attr('y', num(t.y, 1))
    .attr('text-anchor', t.anchor)
    .attr('font-size', style.size)
    .attr('font-weight', bold ? 'bold' : null)
    .attr('fill', style.fill)
    .attr('stroke', style.halo)
    .attr('stroke-width', style.haloWidth)
    .attr('paint-order', 'stroke')
    .text(svgText(t.text));
  return el;
}

/** The outline of η ≥ threshold (a fraction), dashed over a dark halo. */
function drawTolerance(plot: Sel, p: MapPlot, grid: number[], threshold: number): void {
  const S = MAP_STYLE.tolerance;
  const tol: ContourMultiPolygon = p.gen.contour(grid, threshold * 100);
  if (tol.coordinates.length === 0) return;
  const d = p.path(tol);
  plot.append('path').attr('class', 'gs-tolerance-halo').attr('fill', 'none').attr('stroke', S.halo).attr('stroke-opacity', S.haloOpacity).attr('stroke-width', S.haloWidth).attr('d', d);
  plot.append('path').attr('class', 'gs-tolerance').attr('data-threshold', num(threshold, 8)).attr('fill', 'none').attr('stroke', MAP_COLOURS.tolerance).attr('stroke-width', S.width).attr('stroke-dasharray', S.dash).attr('d', d);
}

/** Grey over the part of the plot where the gaps are out of order. */
function drawUnordered(plot: Sel, p: MapPlot): void {
  const bad = unorderedRegion(p.x0, p.x1, p.y0, p.y1);
  if (bad.length >= 3) plot.append('path').attr('class', 'gs-unordered').attr('fill', MAP_COLOURS.invalid).attr('d', `${linePath(bad.map(([a, b]) => [p.xs(a), p.ys(b)]), 1)}Z`);
}

/**
 * A vertical colour bar `h` high for [lo, hi] [%] at (x, y) in `parent`, with
 * the under-range colour as a triangle below it, labelled "< lo".
 */
export function drawColourBar(parent: Sel, x: number, y: number, h: number, lo: number, hi: number): void {
  const colour = viridisColour(lo, hi);
  const cb = parent.append('g').attr('class', 'gs-colourbar').attr('transform', `translate(${x},${y})`).attr('data-lo', num(lo, 4)).attr('data-hi', num(hi, 4));
  const cs = scaleLinear().domain([lo, hi]).range([h, 0]);
  const steps = 64;
  for (let k = 0; k < steps; k++) {
    const v0 = lo + ((hi - lo) * k) / steps;
    const v1 = lo + ((hi - lo) * (k + 1)) / steps;
    cb.append('rect').attr('x', 0).attr('y', num(cs(v1), 2)).attr('width', 14).attr('height', num(cs(v0) - cs(v1) + 0.4, 2)).attr('fill', colour((v0 + v1) / 2));
  }
  cb.append('rect').attr('width', 14).attr('height', h).attr('fill', 'none').attr('stroke', '#333333');
  const under = cb.append('g').attr('class', 'gs-under-mark');
  under.append('path').attr('d', `M0,${num(h + 2)}H14L7,${num(h + 14)}Z`).attr('fill', MAP_COLOURS.under).attr('stroke', '#333333');
  under.append('text').attr('x', 18).attr('y', num(h + 13)).attr('font-size', 10).text(`< ${num(lo, 1)}`);
  const cax = cb.append('g').attr('transform', 'translate(14,0)');
  // Keep the lowest tick label clear of the under-range label.
  const ticks = cs.ticks(8).filter((t) => cs(t) < h - 12);
  cax.call(d3().axisRight(cs).tickValues(ticks).tickSizeOuter(0));
  styleAxis(cax);
  // The title sits right of the bar's centre, clear of a composition axis's ticks above the plot's right corner.
  cb.append('text').attr('x', 0).attr('y', -12).attr('text-anchor', 'start').attr('font-size', 11).text('η [%]');
}

/** The group of a map's optimum marker, `id` optimum-<chart id>, carrying the optimum's gaps and value as data attributes. */
export function optimumGroup(g: Sel, chartId: string, o: { x: number; y: number; value: number }): Sel {
  return g.append('g').attr('class', 'gs-optimum').attr('id', `optimum-${chartId}`).attr('data-gap-x', num(o.x, 6)).attr('data-gap-y', num(o.y, 6)).attr('data-efficiency', num(o.value, 8));
}

/** A label board over a map's plot with its markers (centre, radius [px]) already taken. */
export function mapBoard(p: MapPlot, markers: { x: number; y: number; r: number }[]): LabelBoard {
  const board = new LabelBoard({ x0: 2, y0: 2, x1: p.w - 2, y1: p.h - 2 });
  for (const m of markers) board.reserve(pointBox(m.x, m.y, m.r));
  return board;
}

/** Places beside a marker at (x, y), best first: right, left, then above and below. */
export function besideCandidates(x: number, y: number, size: number): Candidate[] {
  const d = 11;
  return [
    { x: x + d, y: y + size + 4, anchor: 'start' },
    { x: x + d, y: y - 7, anchor: 'start' },
    { x: x - d, y: y + size + 4, anchor: 'end' },
    { x: x - d, y: y - 7, anchor: 'end' },
    { x, y: y - d - 2, anchor: 'middle' },
    { x, y: y + d + size, anchor: 'middle' },
    { x: x + d, y: y + 2 * size + 8, anchor: 'start' },
    { x: x - d, y: y + 2 * size + 8, anchor: 'end' },
    { x: x + d, y: y - size - 10, anchor: 'start' },
    { x: x - d, y: y - size - 10, anchor: 'end' },
  ];
}

/**
 * The optimum's bold label beside its marker, through the board: the first
 * of `variants` (full text first, then shorter forms that still say the
 * numbers) that fits; as a last resort the full text cut, with it as tooltip.
 */
export function drawOptimumLabel(opt: Sel, board: LabelBoard, x: number, y: number, variants: string[]): void {
  const text = variants[0];
  const cands = besideCandidates(x, y, OPTIMUM_TEXT.size);
  const t = board.placeVariant(cands, variants, OPTIMUM_TEXT) ?? board.placeOrShorten(cands, text, OPTIMUM_TEXT, 10);
  if (!t) {
    opt.append('title').text(svgText(text));
    return;
  }
  haloText(opt, t, { size: OPTIMUM_TEXT.size, fill: '#111111', halo: '#ffffff', haloWidth: 3 }, true).attr('class', 'gs-optimum-label gs-label');
}

/** What the shared layers of one map need. */
export interface MapLayers {
  /** Chart id (prefixes the hatch pattern's id). */
  id: string;
  /** Where the pattern definitions go (the chart's root). */
  defs: Sel;
  /** Values [%] with unordered pixels filled (filledGrid). */
  grid: number[];
  /** Colour domain [%]. */
  domain: ColourDomain;
  marks: MapMark[];
  /** Side for the labels of horizontal marks. */
  markSide: 'left' | 'right';
  /** The plot's label board, markers and the optimum's label already on it. */
  board: LabelBoard;
  /** Points the isoline labels prefer to stay far from (markers). */
  away: Point[];
  /** Tolerance threshold η [-]. */
  threshold: number;
  /** Drawn over the isolines and under the tolerance outline (e.g. the current-matching locus). */
  overlay?: (plot: Sel) => void;
}

/**
 * The layers in order, bottom to top: bands, marks, labelled isolines, the
 * overlay, the tolerance outline, the unordered mask, and the marks' labels
 * last so they stay legible. Mark labels claim their places before isoline
 * labels; an isoline label that finds no free place is left out.
 */
export function drawMapLayers(plot: Sel, p: MapPlot, l: MapLayers): void {
  const { lo, hi } = l.domain;
  const traced = drawBands(plot, p, l.grid, lo, hi);
  drawMarks(plot, p, l.marks, defineHatch(l.defs, l.id));
  const markLabels = placeMarkLabels(l.board, p, l.marks, l.markSide);
  drawIsolines(plot, p, l.grid, lo, hi, l.board, l.away, traced);
  l.overlay?.(plot);
  drawTolerance(plot, p, l.grid, l.threshold);
  drawUnordered(plot, p);
  const g = plot.append('g').attr('class', 'gs-mark-labels');
  for (const t of markLabels) haloText(g, t, { size: MAP_STYLE.markLabel.size, fill: MAP_STYLE.markLabel.fill, halo: MAP_STYLE.markLabel.halo, haloWidth: MAP_STYLE.markLabel.haloWidth }).attr('class', 'gs-mark-label gs-label');
}


/** One legend entry of a map: a swatch drawn around (0..18, 0) and its text. */
export interface MapLegendItem {
  draw: (s: Sel) => void;
  text: string;
}

/** Legend swatches of the shared layers. */
export const MAP_SWATCHES = {
  tolerance: (s: Sel) => s.append('path').attr('d', 'M0,0H18').attr('stroke', '#555555').attr('stroke-width', 2).attr('stroke-dasharray', MAP_STYLE.tolerance.dash),
  window: (s: Sel) => {
    s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', '#bbbbbb');
    s.append('rect').attr('x', 0).attr('y', -6).attr('width', 5).attr('height', 12).attr('fill', '#777777');
    s.append('rect').attr('x', 13).attr('y', -6).attr('width', 5).attr('height', 12).attr('fill', '#777777');
    s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', 'none').attr('stroke', '#333333').attr('stroke-dasharray', '3,2');
  },
  fixed: (s: Sel) => s.append('path').attr('d', 'M0,0H18').attr('stroke', MAP_COLOURS.fixed).attr('stroke-width', MAP_STYLE.fixed.width),
  unordered: (s: Sel) => s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', MAP_COLOURS.invalid).attr('stroke', '#999999'),
};

/** The legend entries of the marks present. */
export function markLegendItems(marks: MapMark[]): MapLegendItem[] {
  const items: MapLegendItem[] = [];
  if (marks.some((k) => k.kind === 'window')) items.push({ draw: MAP_SWATCHES.window, text: 'practical window (outline, hatched edges)' });
  if (marks.some((k) => k.kind === 'fixed')) items.push({ draw: MAP_SWATCHES.fixed, text: 'fixed absorber' });
  return items;
}

/** Height of one map legend row [px]. */
export const MAP_LEGEND_ROW = 18;

/** Where each legend entry goes when wrapped within `span` px: its offset and row. */
function legendLayout(items: MapLegendItem[], span: number): { x: number; row: number }[] {
  let lx = 0;
  let row = 0;
  return items.map((it) => {
    const width = 40 + textWidthPx(it.text, { size: 11 });
    if (lx > 0 && lx + width > span) {
      lx = 0;
      row++;
    }
    const at = { x: lx, row };
    lx += width;
    return at;
  });
}

/** Rows a map legend takes within `span` px. */
export function mapLegendRows(items: MapLegendItem[], span: number): number {
  const l = legendLayout(items, span);
  return l.length === 0 ? 0 : l[l.length - 1].row + 1;
}

/** Legend entries in rows, wrapped within `span` px. */
export function drawMapLegend(lg: Sel, items: MapLegendItem[], span: number): void {
  const at = legendLayout(items, span);
  items.forEach((it, k) => {
    const item = lg.append('g').attr('transform', `translate(${num(at[k].x, 1)},${at[k].row * MAP_LEGEND_ROW})`);
    it.draw(item);
    item.append('text').attr('x', 24).attr('y', 4).attr('font-size', 11).text(it.text);
  });
}
