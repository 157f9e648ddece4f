/**
 * The layers every efficiency map over two gaps draws, whether alone (map
 * chart) or as a panel beside another (compare chart): the plot geometry of a
 * grid, filled contour bands on viridis, labelled isolines, the tolerance
 * outline, the shading of gaps out of order, the windows / ranges / fixed
 * absorbers of bound families ("marks") with their labels, the colour bar and
 * the legend swatches. One set of styles serves both charts.
 */
import { contours, type ContourMultiPolygon, type Contours } from 'd3-contour';
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { interpolateViridis } from 'd3-scale-chromatic';
import type { MapMark } from '../compute.js';
import { d3, linePath, num, styleAxis, svgText, type Sel } from '../svg.js';

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
};

/** Stroke widths, opacities and dashes of the map layers. */
export const MAP_STYLE = {
  isoline: { stroke: '#ffffff', opacity: 0.75, width: 0.8 },
  isolabel: { size: 10, fill: '#111111', halo: '#ffffff', haloWidth: 2.5 },
  tolerance: { width: 1.8, dash: '4,2.5', halo: '#000000', haloOpacity: 0.45, haloWidth: 3.6 },
  fixed: { width: 1.6, halo: '#ffffff', haloWidth: 4 },
  window: { fillOpacity: 0.2, width: 1.2, dash: '6,3' },
  range: { width: 1.2, dash: '2,3' },
  markLabel: { size: 10, fill: '#ffffff', halo: '#000000', haloWidth: 2.2, pad: 6 },
};

/** Isoline labels keep this far from the plot's left/right and top/bottom edges [px]. */
const LABEL_EDGE = { x: 22, y: 12 };
/** Width one keep-out point of a mark label stands for along the text [px]; four cover a label. */
const MARK_LABEL_STEP = 40;

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

/** The base colour and the filled bands over [lo, hi] [%], each coloured at the middle of its step. */
function drawBands(plot: Sel, p: MapPlot, grid: number[], lo: number, hi: number): void {
  const colour = viridisColour(lo, hi);
  const step = bandStep(lo, hi);
  plot.append('rect').attr('class', 'gs-map-base').attr('width', p.w).attr('height', p.h).attr('fill', colour(lo));
  const bands = plot.append('g').attr('class', 'gs-bands');
  for (const c of p.gen.thresholds(stepLevels(lo, hi, step, false))(grid)) {
    if (c.coordinates.length === 0) continue;
    bands.append('path').attr('class', 'gs-band').attr('data-level', num(c.value, 2)).attr('fill', colour(c.value + step / 2)).attr('d', p.path(c));
  }
}

/** Where a mark's label goes; horizontal lines' labels on `side`. */
export interface MarkLabel {
  x: number;
  y: number;
  text: string;
  anchor: 'start' | 'end';
}

/** Windows and ranges as bands, fixed absorbers as haloed lines; returns their labels' places (draw them later, above the mask). */
function drawMarks(plot: Sel, p: MapPlot, marks: MapMark[], side: 'left' | 'right'): MarkLabel[] {
  const S = MAP_STYLE;
  const pad = S.markLabel.pad;
  const g = plot.append('g').attr('class', 'gs-marks');
  const labels: MarkLabel[] = [];
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
    } else {
      const window = mk.kind === 'window';
      const r = horizontal ? { x: 0, y: a, width: p.w, height: b - a } : { x: a, y: 0, width: b - a, height: p.h };
      g.append('rect')
        .attr('class', window ? 'gs-window' : 'gs-range')
        .attr('data-lo', num(mk.loEv, 4))
        .attr('data-hi', num(mk.hiEv, 4))
        .attr('x', num(r.x))
        .attr('y', num(r.y))
        .attr('width', num(Math.max(0, r.width)))
        .attr('height', num(Math.max(0, r.height)))
        .attr('fill', window ? MAP_COLOURS.window : 'none')
        .attr('fill-opacity', window ? S.window.fillOpacity : 0)
        .attr('stroke', MAP_COLOURS.window)
        .attr('stroke-width', window ? S.window.width : S.range.width)
        .attr('stroke-dasharray', window ? S.window.dash : S.range.dash);
    }
    const end = horizontal && side === 'right';
    labels.push({
      x: horizontal ? (end ? p.w - pad : pad) : Math.min(p.w - pad, Math.max(pad, a + 4)),
      y: horizontal ? Math.max(12, a - 5) : 14,
      text: mk.label,
      anchor: end ? 'end' : 'start',
    });
  }
  return labels;
}

/** Points an isoline label keeps away from, along each mark label. */
export function markLabelKeepouts(labels: MarkLabel[]): Point[] {
  return labels.flatMap((t) => [0, 1, 2, 3].map((k) => [t.x + (t.anchor === 'end' ? -k : k) * MARK_LABEL_STEP, t.y - 4] as Point));
}

/** The vertex of a contour (in plot pixels, off the edges) farthest from every point in `placed`, distances along x counted at 1/1.6. */
export function labelPoint(p: MapPlot, c: { coordinates: Pos[][][] }, placed: Point[]): Point | null {
  let pick: Point | null = null;
  let score = -Infinity;
  for (const poly of c.coordinates) {
    for (const ring of poly) {
      for (const q of ring) {
        const [X, Y] = p.pixel(q);
        if (X < LABEL_EDGE.x || X > p.w - LABEL_EDGE.x || Y < LABEL_EDGE.y || Y > p.h - LABEL_EDGE.y) continue;
        let d = Infinity;
        for (const r of placed) d = Math.min(d, Math.hypot((X - r[0]) / 1.6, Y - r[1]));
        if (d > score + 1e-9) {
          score = d;
          pick = [X, Y];
        }
      }
    }
  }
  return pick;
}

/** Isolines every `step` points within (lo, hi), each labelled once where it is farthest from `keepouts` and the labels already placed. */
function drawIsolines(plot: Sel, p: MapPlot, grid: number[], lo: number, hi: number, keepouts: Point[]): void {
  const S = MAP_STYLE;
  const step = isoStep(lo, hi);
  const iso = plot.append('g').attr('class', 'gs-isolines');
  const labels = plot.append('g').attr('class', 'gs-isolabels');
  const placed = [...keepouts];
  for (const c of p.gen.thresholds(stepLevels(lo, hi, step, true))(grid)) {
    if (c.coordinates.length === 0) continue;
    iso.append('path').attr('class', 'gs-isoline').attr('data-level', num(c.value, 2)).attr('fill', 'none').attr('stroke', S.isoline.stroke).attr('stroke-opacity', S.isoline.opacity).attr('stroke-width', S.isoline.width).attr('d', p.path(c));
    const pick = labelPoint(p, c, placed);
    if (!pick) continue;
    placed.push(pick);
    labels
      .append('text')
      .attr('class', 'gs-isolabel')
      .attr('x', num(pick[0], 1))
      .attr('y', num(pick[1] + 3.5, 1))
      .attr('text-anchor', 'middle')
      .attr('font-size', S.isolabel.size)
      .attr('fill', S.isolabel.fill)
      .attr('stroke', S.isolabel.halo)
      .attr('stroke-width', S.isolabel.haloWidth)
      .attr('paint-order', 'stroke')
      .text(`${num(c.value, step < 1 ? 1 : 0)} %`);
  }
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

/** The marks' labels (light on a dark halo). */
function drawMarkLabels(plot: Sel, labels: MarkLabel[]): void {
  const S = MAP_STYLE.markLabel;
  const g = plot.append('g').attr('class', 'gs-mark-labels');
  for (const t of labels) {
    g.append('text')
      .attr('class', 'gs-mark-label')
      .attr('x', num(t.x))
      .attr('y', num(t.y))
      .attr('text-anchor', t.anchor)
      .attr('font-size', S.size)
      .attr('fill', S.fill)
      .attr('stroke', S.halo)
      .attr('stroke-width', S.haloWidth)
      .attr('paint-order', 'stroke')
      .text(svgText(t.text));
  }
}

/** A vertical colour bar `h` high for [lo, hi] [%] at (x, y) in `parent`. */
export function drawColourBar(parent: Sel, x: number, y: number, h: number, lo: number, hi: number): void {
  const colour = viridisColour(lo, hi);
  const cb = parent.append('g').attr('class', 'gs-colourbar').attr('transform', `translate(${x},${y})`);
  const cs = scaleLinear().domain([lo, hi]).range([h, 0]);
  const steps = 64;
  for (let k = 0; k < steps; k++) {
    const v0 = lo + ((hi - lo) * k) / steps;
    const v1 = lo + ((hi - lo) * (k + 1)) / steps;
    cb.append('rect').attr('x', 0).attr('y', num(cs(v1), 2)).attr('width', 14).attr('height', num(cs(v0) - cs(v1) + 0.4, 2)).attr('fill', colour((v0 + v1) / 2));
  }
  cb.append('rect').attr('width', 14).attr('height', h).attr('fill', 'none').attr('stroke', '#333333');
  const cax = cb.append('g').attr('transform', 'translate(14,0)');
  cax.call(d3().axisRight(cs).ticks(8).tickSizeOuter(0));
  styleAxis(cax);
  cb.append('text').attr('x', 7).attr('y', -12).attr('text-anchor', 'middle').attr('font-size', 11).text('η [%]');
}

/** The group of a map's optimum marker, `id` optimum-<chart id>, carrying the optimum's gaps and value as data attributes. */
export function optimumGroup(g: Sel, chartId: string, o: { x: number; y: number; value: number }): Sel {
  return g.append('g').attr('class', 'gs-optimum').attr('id', `optimum-${chartId}`).attr('data-gap-x', num(o.x, 6)).attr('data-gap-y', num(o.y, 6)).attr('data-efficiency', num(o.value, 8));
}

/** The optimum's bold label beside the marker at (x, y): to the right where it fits, above it near the bottom edge. */
export function drawOptimumLabel(opt: Sel, p: MapPlot, x: number, y: number, text: string): void {
  const right = x + 12 + text.length * 6.6 < p.w;
  opt
    .append('text')
    .attr('x', num(x + (right ? 12 : -12)))
    .attr('y', num(y > p.h - 26 ? y - 10 : y + 18))
    .attr('text-anchor', right ? 'start' : 'end')
    .attr('font-size', 11)
    .attr('font-weight', 'bold')
    .attr('fill', '#111111')
    .attr('stroke', '#ffffff')
    .attr('stroke-width', 3)
    .attr('paint-order', 'stroke')
    .text(text);
}

/** What the shared layers of one map need. */
export interface MapLayers {
  /** Values [%] with unordered pixels filled (filledGrid). */
  grid: number[];
  /** Colour range [%]. */
  lo: number;
  hi: number;
  marks: MapMark[];
  /** Side for the labels of horizontal marks. */
  markSide: 'left' | 'right';
  /** Points the isoline labels keep away from (markers and their labels); the marks' labels are added. */
  keepouts: Point[];
  /** Tolerance threshold η [-]. */
  threshold: number;
  /** Drawn over the isolines and under the tolerance outline (e.g. the current-matching locus). */
  overlay?: (plot: Sel) => void;
}

/**
 * The layers in order, bottom to top: bands, marks, labelled isolines, the
 * overlay, the tolerance outline, the unordered mask, and the marks' labels
 * last so they stay legible.
 */
export function drawMapLayers(plot: Sel, p: MapPlot, l: MapLayers): void {
  drawBands(plot, p, l.grid, l.lo, l.hi);
  const markLabels = drawMarks(plot, p, l.marks, l.markSide);
  drawIsolines(plot, p, l.grid, l.lo, l.hi, [...l.keepouts, ...markLabelKeepouts(markLabels)]);
  l.overlay?.(plot);
  drawTolerance(plot, p, l.grid, l.threshold);
  drawUnordered(plot, p);
  drawMarkLabels(plot, markLabels);
}

/** One legend entry of a map: a swatch drawn around (0..18, 0) and its text. */
export interface MapLegendItem {
  draw: (s: Sel) => void;
  text: string;
}

/** Legend swatches of the shared layers. */
export const MAP_SWATCHES = {
  tolerance: (s: Sel) => s.append('path').attr('d', 'M0,0H18').attr('stroke', '#555555').attr('stroke-width', 2).attr('stroke-dasharray', MAP_STYLE.tolerance.dash),
  window: (s: Sel) => s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', '#bbbbbb').attr('stroke', '#777777').attr('stroke-dasharray', '3,2'),
  fixed: (s: Sel) => s.append('path').attr('d', 'M0,0H18').attr('stroke', MAP_COLOURS.fixed).attr('stroke-width', MAP_STYLE.fixed.width),
  unordered: (s: Sel) => s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', MAP_COLOURS.invalid).attr('stroke', '#999999'),
};

/** The legend entries of the marks present. */
export function markLegendItems(marks: MapMark[]): MapLegendItem[] {
  const items: MapLegendItem[] = [];
  if (marks.some((k) => k.kind === 'window')) items.push({ draw: MAP_SWATCHES.window, text: 'practical window' });
  if (marks.some((k) => k.kind === 'fixed')) items.push({ draw: MAP_SWATCHES.fixed, text: 'fixed absorber' });
  return items;
}

/** Legend entries in rows, wrapped within `span` px. */
export function drawMapLegend(lg: Sel, items: MapLegendItem[], span: number): void {
  let lx = 0;
  let ly = 0;
  for (const it of items) {
    const width = 40 + it.text.length * 7;
    if (lx > 0 && lx + width > span) {
      lx = 0;
      ly += 18;
    }
    const item = lg.append('g').attr('transform', `translate(${num(lx, 1)},${ly})`);
    it.draw(item);
    item.append('text').attr('x', 24).attr('y', 4).attr('font-size', 11).text(it.text);
    lx += width;
  }
}
