/** A plain x–y chart frame: plot area, axes with titles, a legend row; and the series colours. */
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { interpolateViridis } from 'd3-scale-chromatic';
import { d3, num, styleAxis, svgText, type Sel } from '../svg.js';

export interface FrameSpec {
  width: number;
  height: number;
  xDomain: [number, number];
  yDomain: [number, number];
  xLabel: string;
  yLabel: string;
  /** Legend entries under the plot. */
  legend: LegendItem[];
}

export interface LegendItem {
  colour: string;
  text: string;
  dash?: string;
  /** The uncut text, shown as the item's tooltip when `text` (or its drawn form) is shorter. */
  full?: string;
  kind?: 'line' | 'area' | 'dot';
}

export interface Frame {
  plot: Sel;
  x: ScaleLinear<number, number>;
  y: ScaleLinear<number, number>;
  w: number;
  h: number;
}

export const FRAME_MARGIN = { top: 16, right: 24, bottom: 76, left: 64 };
/** Height of one legend row [px]; a frame's plot shrinks by this per extra row. */
export const LEGEND_ROW = 16;
/** Estimated width of a legend character at 11 px [px]. */
const CHAR_W = 6.7;

/** Colour of subcell i of n: evenly spaced on viridis, the light end kept away from white paper (or, on a dark backdrop, the dark end away from it). */
export function subcellColour(i: number, n: number, backdrop: 'light' | 'dark' = 'light'): string {
  const [a, b] = backdrop === 'dark' ? [0.4, 1] : [0.08, 0.8];
  const t = n <= 1 ? (backdrop === 'dark' ? 0.7 : 0.35) : a + ((b - a) * i) / (n - 1);
  return interpolateViridis(t);
}

/** Draw axes, titles and legend into `svg`; returns the clipped plot group and the scales. */
export function drawFrame(svg: Sel, id: string, f: FrameSpec): Frame {
  const M = FRAME_MARGIN;
  const w = f.width - M.left - M.right;
  const h = f.height - M.top - M.bottom - LEGEND_ROW * (legendRows(f.legend, w) - 1);
  const x = scaleLinear().domain(f.xDomain).range([0, w]);
  const y = scaleLinear().domain(f.yDomain).range([h, 0]);
  const clip = `${id}-clip`;
  svg.append('defs').append('clipPath').attr('id', clip).append('rect').attr('width', w).attr('height', h);
  const g = svg.append('g').attr('transform', `translate(${M.left},${M.top})`);
  const grid = g.append('g').attr('class', 'gs-grid');
  for (const t of y.ticks(6)) grid.append('line').attr('x1', 0).attr('x2', w).attr('y1', num(y(t))).attr('y2', num(y(t))).attr('stroke', '#e3e3e3');
  drawAxes(g, { x, y, w, h, xTicks: 8, yTicks: 6, xLabel: f.xLabel, yLabel: f.yLabel });
  const plot = g.append('g').attr('class', 'gs-plot').attr('clip-path', `url(#${clip})`);
  g.append('rect').attr('class', 'gs-plot-area').attr('width', w).attr('height', h).attr('fill', 'none').attr('stroke', '#333333');
  const lg = g.append('g').attr('class', 'gs-legend').attr('transform', `translate(0,${h + 56})`);
  let lx = 0;
  let ly = 0;
  for (const it of f.legend) {
    const text = legendText(it.text, w);
    const width = 32 + text.length * CHAR_W;
    if (lx > 0 && lx + width > w) {
      lx = 0;
      ly += LEGEND_ROW;
    }
    const item = lg.append('g').attr('transform', `translate(${num(lx, 1)},${ly})`);
    if (it.kind === 'area') item.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 11).attr('fill', it.colour);
    else if (it.kind === 'dot') item.append('circle').attr('cx', 9).attr('cy', 0).attr('r', 4).attr('fill', it.colour);
    else item.append('path').attr('d', 'M0,0H18').attr('stroke', it.colour).attr('stroke-width', 2.2).attr('stroke-dasharray', it.dash ?? null);
    const full = svgText(it.full ?? it.text);
    if (text !== full) item.append('title').text(full);
    item.append('text').attr('x', 24).attr('y', 4).attr('font-size', 11).text(text);
    lx += width;
  }
  return { plot, x, y, w, h };
}

export interface AxesSpec {
  x: ScaleLinear<number, number>;
  y: ScaleLinear<number, number>;
  w: number;
  h: number;
  xTicks: number;
  yTicks: number;
  xLabel: string;
  /** Left out when absent (a panel beside another that carries it). */
  yLabel?: string;
}

/** Bottom and left axes of a plot `w`×`h` at the origin of `g`, with their titles. */
export function drawAxes(g: Sel, a: AxesSpec): void {
  const ax = g.append('g').attr('class', 'gs-axis gs-axis-x').attr('transform', `translate(0,${a.h})`);
  ax.call(d3().axisBottom(a.x).ticks(a.xTicks).tickSizeOuter(0));
  styleAxis(ax);
  const ay = g.append('g').attr('class', 'gs-axis gs-axis-y');
  ay.call(d3().axisLeft(a.y).ticks(a.yTicks).tickSizeOuter(0));
  styleAxis(ay);
  g.append('text').attr('x', a.w / 2).attr('y', a.h + 36).attr('text-anchor', 'middle').text(svgText(a.xLabel));
  if (a.yLabel !== undefined) g.append('text').attr('transform', `translate(-46,${a.h / 2}) rotate(-90)`).attr('text-anchor', 'middle').text(svgText(a.yLabel));
}

/** Most characters of a subcell label inside a legend item; longer labels end in an ellipsis. */
export const LEGEND_LABEL_CHARS = 28;

/** `text` cut to `max` characters, ending in "…" when cut. */
export function shortLabel(text: string, max = LEGEND_LABEL_CHARS): string {
  const chars = [...text];
  return chars.length <= max ? text : `${chars.slice(0, max - 1).join('').trimEnd()}…`;
}

/** A legend item's text as drawn: cut so that one item never runs past a plot `w` wide. */
function legendText(text: string, w: number): string {
  return shortLabel(svgText(text), Math.max(8, Math.floor((w - 32) / CHAR_W)));
}

/** Rows a legend of `items` takes when wrapped within a plot `w` wide. */
export function legendRows(items: LegendItem[], w: number): number {
  let rows = 1;
  let lx = 0;
  for (const it of items) {
    const width = 32 + legendText(it.text, w).length * CHAR_W;
    if (lx > 0 && lx + width > w) {
      rows++;
      lx = 0;
    }
    lx += width;
  }
  return rows;
}
