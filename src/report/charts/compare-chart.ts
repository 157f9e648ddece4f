/**
 * Two maps of the same gap pair side by side: efficiency under the AM1.5G
 * reference and yield-weighted efficiency over the user's ensemble, on the
 * same axes and one shared colour scale so a colour means the same number in
 * both. Each panel carries its own optimum (filled marker), the other light's
 * optimum (open marker) joined to it, its tolerance outline, the bound
 * families' windows and the fixed absorbers.
 */
import { contours } from 'd3-contour';
import { scaleLinear } from 'd3-scale';
import { interpolateViridis } from 'd3-scale-chromatic';
import type { MapMark } from '../compute.js';
import type { GapMap } from '../../search/map.js';
import { buildSvg, d3, linePath, num, styleAxis, svgText, type Sel } from '../svg.js';
import { filledGrid, MAP_COLOURS, niceStep, unorderedRegion, type Pos, type Ring } from './map-chart.js';

export const COMPARE_WIDTH = 900;
const PLOT_H = 330;
const M = { top: 30, right: 96, bottom: 104, left: 66, between: 60 };
const PLOT_W = (COMPARE_WIDTH - M.left - M.right - M.between) / 2;
export const COMPARE_HEIGHT = M.top + PLOT_H + M.bottom;
/** The shared colour scale spans at most this many percentage points below the higher maximum. */
export const COMPARE_SPAN_PCT = 14;

export interface ComparePanel {
  /** 'am1.5g' or 'ensemble'; also a data attribute. */
  light: 'am1.5g' | 'ensemble';
  title: string;
  map: GapMap;
  optimum: { x: number; y: number; value: number };
  /** Where the other panel's optimum lies on this panel, with its value here. */
  other: { x: number; y: number; value: number };
  /** Tolerance threshold η [-]. */
  threshold: number;
  /** Short name of this panel's optimum, e.g. "AM1.5G optimum". */
  optimumName: string;
  otherName: string;
}

export interface CompareChartInput {
  id: string;
  wiringLabel: string;
  xLabel: string;
  yLabel: string;
  panels: [ComparePanel, ComparePanel];
  marks: MapMark[];
  loss: number;
}

/** The shared colour range [%] of two maps: up to the higher maximum, at most COMPARE_SPAN_PCT below it. */
export function compareColourRange(maps: GapMap[]): { lo: number; hi: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (const m of maps) {
    for (const v of m.values) {
      if (Number.isNaN(v)) continue;
      lo = Math.min(lo, v * 100);
      hi = Math.max(hi, v * 100);
    }
  }
  return { lo: Math.max(lo, hi - COMPARE_SPAN_PCT), hi };
}

/** Area of a polygon [eV²] (shoelace). */
function ringArea(r: Ring): number {
  let a = 0;
  for (let i = 0; i < r.length; i++) {
    const p = r[i];
    const q = r[(i + 1) % r.length];
    a += p[0] * q[1] - q[0] * p[1];
  }
  return Math.abs(a) / 2;
}

function drawPanel(g: Sel, id: string, p: ComparePanel, inp: CompareChartInput, range: { lo: number; hi: number }, showYLabel: boolean): void {
  const m = p.map;
  const nx = m.x.length;
  const ny = m.y.length;
  const w = PLOT_W;
  const h = PLOT_H;
  const x0 = m.x[0];
  const x1 = m.x[nx - 1];
  const y0 = m.y[0];
  const y1 = m.y[ny - 1];
  const xs = scaleLinear().domain([x0, x1]).range([0, w]);
  const ys = scaleLinear().domain([y0, y1]).range([h, 0]);
  const dx = nx > 1 ? (x1 - x0) / (nx - 1) : 1;
  const dy = ny > 1 ? (y1 - y0) / (ny - 1) : 1;
  const px = (c: number) => xs(x0 + (c - 0.5) * dx);
  const py = (c: number) => ys(y0 + (c - 0.5) * dy);
  const ringPath = (rings: Pos[][]) => rings.map((r) => `${linePath(r.map((q) => [px(q[0]), py(q[1])] as [number, number]), 1)}Z`).join('');
  const polyPath = (mp: { coordinates: Pos[][][] }) => mp.coordinates.map(ringPath).join('');
  const { lo, hi } = range;
  const colour = (v: number) => interpolateViridis(Math.min(1, Math.max(0, (v - lo) / Math.max(1e-9, hi - lo))));
  const { grid } = filledGrid(m.values, nx, ny, 100);
  const bandStep = niceStep(hi - lo, 30, [0.1, 0.25, 0.5, 1, 2]);
  const bandLevels: number[] = [];
  for (let t = Math.ceil(lo / bandStep) * bandStep; t < hi; t += bandStep) bandLevels.push(Number(t.toFixed(4)));
  const isoStep = niceStep(hi - lo, 8, [0.5, 1, 2, 5]);
  const isoLevels: number[] = [];
  for (let t = Math.ceil((lo + 1e-9) / isoStep) * isoStep; t < hi - 1e-9; t += isoStep) isoLevels.push(Number(t.toFixed(4)));
  const gen = contours().size([nx, ny]);
  const clipId = `${id}-clip`;
  const optX = xs(p.optimum.x);
  const optY = ys(p.optimum.y);
  const othX = xs(p.other.x);
  const othY = ys(p.other.y);

  g.attr('class', 'gs-compare-panel').attr('data-light', p.light);
  g.append('text').attr('class', 'gs-panel-title').attr('x', 0).attr('y', -12).attr('font-size', 13).attr('font-weight', 'bold').text(svgText(p.title));
  g.append('defs').append('clipPath').attr('id', clipId).append('rect').attr('width', w).attr('height', h);
  const plot = g.append('g').attr('clip-path', `url(#${clipId})`);
  plot.append('rect').attr('class', 'gs-map-base').attr('width', w).attr('height', h).attr('fill', colour(lo));
  const bands = plot.append('g').attr('class', 'gs-bands');
  for (const c of gen.thresholds(bandLevels)(grid)) {
    if (c.coordinates.length === 0) continue;
    bands.append('path').attr('class', 'gs-band').attr('data-level', num(c.value, 2)).attr('fill', colour(c.value + bandStep / 2)).attr('d', polyPath(c));
  }
  const marks = plot.append('g').attr('class', 'gs-marks');
  const markTexts: { x: number; y: number; text: string; anchor: 'start' | 'end' }[] = [];
  // Labels of horizontal lines go to the side away from the optima.
  const leftSide = (xs(p.optimum.x) + xs(p.other.x)) / 2 > w / 2;
  for (const mk of inp.marks) {
    const horizontal = mk.axis === 'y';
    const a = horizontal ? ys(mk.hiEv) : xs(mk.loEv);
    const b = horizontal ? ys(mk.loEv) : xs(mk.hiEv);
    if (mk.kind === 'fixed') {
      const line = horizontal ? { x1: 0, x2: w, y1: a, y2: a } : { x1: a, x2: a, y1: 0, y2: h };
      marks.append('line').attr('class', 'gs-fixed-halo').attr('x1', num(line.x1)).attr('x2', num(line.x2)).attr('y1', num(line.y1)).attr('y2', num(line.y2)).attr('stroke', '#ffffff').attr('stroke-width', 3.5);
      marks.append('line').attr('class', 'gs-fixed').attr('data-gap', num(mk.loEv, 4)).attr('x1', num(line.x1)).attr('x2', num(line.x2)).attr('y1', num(line.y1)).attr('y2', num(line.y2)).attr('stroke', MAP_COLOURS.fixed).attr('stroke-width', 1.4);
    } else {
      const r = horizontal ? { x: 0, y: a, width: w, height: b - a } : { x: a, y: 0, width: b - a, height: h };
      marks
        .append('rect')
        .attr('class', mk.kind === 'window' ? 'gs-window' : 'gs-range')
        .attr('data-lo', num(mk.loEv, 4))
        .attr('data-hi', num(mk.hiEv, 4))
        .attr('x', num(r.x))
        .attr('y', num(r.y))
        .attr('width', num(Math.max(0, r.width)))
        .attr('height', num(Math.max(0, r.height)))
        .attr('fill', mk.kind === 'window' ? MAP_COLOURS.window : 'none')
        .attr('fill-opacity', mk.kind === 'window' ? 0.18 : 0)
        .attr('stroke', MAP_COLOURS.window)
        .attr('stroke-width', 1.1)
        .attr('stroke-dasharray', mk.kind === 'window' ? '6,3' : '2,3');
    }
    markTexts.push({ x: horizontal ? (leftSide ? 5 : w - 5) : Math.min(w - 5, Math.max(5, a + 4)), y: horizontal ? Math.max(12, a - 4) : 13, text: mk.label, anchor: horizontal && !leftSide ? 'end' : 'start' });
  }
  // Isolines at the same levels in both panels, labelled once each away from the markers and other labels.
  const iso = plot.append('g').attr('class', 'gs-isolines');
  const isoLabels = plot.append('g').attr('class', 'gs-isolabels');
  const placed: [number, number][] = [
    [optX, optY],
    [optX + 70, optY + 18],
    [othX, othY],
    ...markTexts.flatMap((t) => [0, 1, 2, 3].map((k) => [t.x + (t.anchor === 'end' ? -k : k) * 40, t.y - 4] as [number, number])),
  ];
  for (const c of gen.thresholds(isoLevels)(grid)) {
    if (c.coordinates.length === 0) continue;
    iso.append('path').attr('class', 'gs-isoline').attr('data-level', num(c.value, 2)).attr('fill', 'none').attr('stroke', '#ffffff').attr('stroke-opacity', 0.7).attr('stroke-width', 0.8).attr('d', polyPath(c));
    let pick: [number, number] | null = null;
    let score = -Infinity;
    for (const poly of c.coordinates) {
      for (const ring of poly) {
        for (const q of ring) {
          const X = px(q[0]);
          const Y = py(q[1]);
          if (X < 20 || X > w - 20 || Y < 12 || Y > h - 10) continue;
          let d = Infinity;
          for (const r of placed) d = Math.min(d, Math.hypot((X - r[0]) / 1.6, Y - r[1]));
          if (d > score + 1e-9) {
            score = d;
            pick = [X, Y];
          }
        }
      }
    }
    if (!pick) continue;
    placed.push(pick);
    isoLabels
      .append('text')
      .attr('class', 'gs-isolabel')
      .attr('x', num(pick[0], 1))
      .attr('y', num(pick[1] + 3.5, 1))
      .attr('text-anchor', 'middle')
      .attr('font-size', 10)
      .attr('fill', '#111111')
      .attr('stroke', '#ffffff')
      .attr('stroke-width', 2.5)
      .attr('paint-order', 'stroke')
      .text(`${num(c.value, isoStep < 1 ? 1 : 0)} %`);
  }
  const tol = gen.contour(grid, p.threshold * 100);
  if (tol.coordinates.length > 0) {
    plot.append('path').attr('class', 'gs-tolerance-halo').attr('fill', 'none').attr('stroke', '#000000').attr('stroke-opacity', 0.45).attr('stroke-width', 3.4).attr('d', polyPath(tol));
    plot.append('path').attr('class', 'gs-tolerance').attr('data-threshold', num(p.threshold, 8)).attr('fill', 'none').attr('stroke', MAP_COLOURS.tolerance).attr('stroke-width', 1.6).attr('stroke-dasharray', '4,2.5').attr('d', polyPath(tol));
  }
  const bad = unorderedRegion(x0, x1, y0, y1);
  if (bad.length >= 3) plot.append('path').attr('class', 'gs-unordered').attr('fill', MAP_COLOURS.invalid).attr('d', `${linePath(bad.map(([a, b]) => [xs(a), ys(b)]), 1)}Z`);
  const mt = plot.append('g').attr('class', 'gs-mark-labels');
  for (const t of markTexts) {
    mt.append('text').attr('class', 'gs-mark-label').attr('x', num(t.x)).attr('y', num(t.y)).attr('text-anchor', t.anchor).attr('font-size', 10).attr('fill', '#ffffff').attr('stroke', '#000000').attr('stroke-width', 2.2).attr('paint-order', 'stroke').text(svgText(t.text));
  }
  // The other light's optimum (open), joined to this one's (filled) when they are apart.
  const other = g.append('g').attr('class', 'gs-optimum-other').attr('data-gap-x', num(p.other.x, 6)).attr('data-gap-y', num(p.other.y, 6)).attr('data-efficiency', num(p.other.value, 8));
  if (Math.hypot(othX - optX, othY - optY) > 3) {
    other.append('path').attr('class', 'gs-shift').attr('d', `M${num(othX)},${num(othY)}L${num(optX)},${num(optY)}`).attr('stroke', '#ffffff').attr('stroke-width', 1.5).attr('stroke-dasharray', '3,2');
  }
  other.append('circle').attr('cx', num(othX)).attr('cy', num(othY)).attr('r', 6.5).attr('fill', 'none').attr('stroke', '#000000').attr('stroke-width', 3.2);
  other.append('circle').attr('cx', num(othX)).attr('cy', num(othY)).attr('r', 6.5).attr('fill', 'none').attr('stroke', '#ffffff').attr('stroke-width', 1.6);
  const opt = g.append('g').attr('class', 'gs-optimum').attr('id', `optimum-${id}`).attr('data-gap-x', num(p.optimum.x, 6)).attr('data-gap-y', num(p.optimum.y, 6)).attr('data-efficiency', num(p.optimum.value, 8));
  opt.append('circle').attr('cx', num(optX)).attr('cy', num(optY)).attr('r', 3.4).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1.2);
  const optText = `${num(p.optimum.value * 100, 2)} % at ${num(p.optimum.x, 3)} / ${num(p.optimum.y, 3)} eV`;
  const right = optX + 12 + optText.length * 6.4 < w;
  opt
    .append('text')
    .attr('x', num(optX + (right ? 12 : -12)))
    .attr('y', num(optY > h - 26 ? optY - 10 : optY + 18))
    .attr('text-anchor', right ? 'start' : 'end')
    .attr('font-size', 11)
    .attr('font-weight', 'bold')
    .attr('fill', '#111111')
    .attr('stroke', '#ffffff')
    .attr('stroke-width', 3)
    .attr('paint-order', 'stroke')
    .text(optText);
  g.append('rect').attr('class', 'gs-plot-area').attr('width', w).attr('height', h).attr('fill', 'none').attr('stroke', '#333333');
  const ax = g.append('g').attr('class', 'gs-axis gs-axis-x').attr('transform', `translate(0,${h})`);
  ax.call(d3().axisBottom(xs).ticks(6).tickSizeOuter(0));
  styleAxis(ax);
  const ay = g.append('g').attr('class', 'gs-axis gs-axis-y');
  ay.call(d3().axisLeft(ys).ticks(7).tickSizeOuter(0));
  styleAxis(ay);
  g.append('text').attr('x', w / 2).attr('y', h + 36).attr('text-anchor', 'middle').text(svgText(inp.xLabel));
  if (showYLabel) g.append('text').attr('transform', `translate(-48,${h / 2}) rotate(-90)`).attr('text-anchor', 'middle').text(svgText(inp.yLabel));
}

export function compareChartSvg(inp: CompareChartInput): string {
  const range = compareColourRange(inp.panels.map((p) => p.map));
  return buildSvg(COMPARE_WIDTH, COMPARE_HEIGHT, { id: inp.id, class: 'gs-chart gs-compare', 'data-colour-lo': num(range.lo, 4), 'data-colour-hi': num(range.hi, 4), role: 'img' }, (svg) => {
    svg.append('title').text(svgText(`${inp.panels[0].title} and ${inp.panels[1].title}, ${inp.wiringLabel}: ${inp.xLabel} against ${inp.yLabel}, one colour scale`));
    inp.panels.forEach((p, k) => {
      const g = svg.append('g').attr('transform', `translate(${M.left + k * (PLOT_W + M.between)},${M.top})`);
      drawPanel(g, `${inp.id}-${p.light.replace(/\./g, '')}`, p, inp, range, k === 0);
    });
    // One colour bar for both panels.
    const { lo, hi } = range;
    const colour = (v: number) => interpolateViridis(Math.min(1, Math.max(0, (v - lo) / Math.max(1e-9, hi - lo))));
    const cb = svg.append('g').attr('class', 'gs-colourbar').attr('transform', `translate(${M.left + 2 * PLOT_W + M.between + 20},${M.top})`);
    const cs = scaleLinear().domain([lo, hi]).range([PLOT_H, 0]);
    const steps = 64;
    for (let k = 0; k < steps; k++) {
      const v0 = lo + ((hi - lo) * k) / steps;
      const v1 = lo + ((hi - lo) * (k + 1)) / steps;
      cb.append('rect').attr('x', 0).attr('y', num(cs(v1), 2)).attr('width', 14).attr('height', num(cs(v0) - cs(v1) + 0.4, 2)).attr('fill', colour((v0 + v1) / 2));
    }
    cb.append('rect').attr('width', 14).attr('height', PLOT_H).attr('fill', 'none').attr('stroke', '#333333');
    const cax = cb.append('g').attr('transform', 'translate(14,0)');
    cax.call(d3().axisRight(cs).ticks(8).tickSizeOuter(0));
    styleAxis(cax);
    cb.append('text').attr('x', 7).attr('y', -12).attr('text-anchor', 'middle').attr('font-size', 11).text('η [%]');
    // Legend under both panels.
    const lg = svg.append('g').attr('class', 'gs-legend').attr('transform', `translate(${M.left},${M.top + PLOT_H + 64})`);
    const items: { draw: (s: Sel) => void; text: string }[] = [
      { draw: (s) => s.append('circle').attr('cx', 9).attr('cy', 0).attr('r', 4).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1.2), text: "the panel's own optimum" },
      { draw: (s) => s.append('circle').attr('cx', 9).attr('cy', 0).attr('r', 5.5).attr('fill', 'none').attr('stroke', '#333333').attr('stroke-width', 1.6), text: "the other panel's optimum" },
      { draw: (s) => s.append('path').attr('d', 'M0,0H18').attr('stroke', '#555555').attr('stroke-width', 2).attr('stroke-dasharray', '4,2.5'), text: `tolerance: ≥ (1 − ${num(inp.loss * 100, 1)} %)·own best` },
    ];
    if (inp.marks.some((k) => k.kind === 'window')) items.push({ draw: (s) => s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', '#bbbbbb').attr('stroke', '#777777').attr('stroke-dasharray', '3,2'), text: 'practical window' });
    if (inp.marks.some((k) => k.kind === 'fixed')) items.push({ draw: (s) => s.append('path').attr('d', 'M0,0H18').attr('stroke', MAP_COLOURS.fixed).attr('stroke-width', 1.6), text: 'fixed absorber' });
    const m0 = inp.panels[0].map;
    if (ringArea(unorderedRegion(m0.x[0], m0.x[m0.x.length - 1], m0.y[0], m0.y[m0.y.length - 1])) > 1e-6) {
      items.push({ draw: (s) => s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', MAP_COLOURS.invalid).attr('stroke', '#999999'), text: 'gaps out of order' });
    }
    let lx = 0;
    let ly = 0;
    const span = 2 * PLOT_W + M.between + 60;
    for (const it of items) {
      const width = 36 + it.text.length * 6.6;
      if (lx > 0 && lx + width > span) {
        lx = 0;
        ly += 18;
      }
      const item = lg.append('g').attr('transform', `translate(${num(lx, 1)},${ly})`);
      it.draw(item);
      item.append('text').attr('x', 24).attr('y', 4).attr('font-size', 11).text(it.text);
      lx += width;
    }
  });
}
