/**
 * Two maps of the same gap pair side by side: efficiency under the AM1.5G
 * reference and yield-weighted efficiency over the user's ensemble, on the
 * same axes and one shared colour scale so a colour means the same number in
 * both. Each panel carries its own optimum (filled marker), the other light's
 * optimum (open marker) joined to it, its tolerance outline, the bound
 * families' windows and the fixed absorbers.
 */
import type { MapMark } from '../compute.js';
import type { GapMap } from '../../search/map.js';
import { buildSvg, num, svgText, type Sel } from '../svg.js';
import { drawAxes } from './frame.js';
import {
  clippedPlot,
  drawColourBar,
  drawMapLayers,
  drawMapLegend,
  drawOptimumLabel,
  filledGrid,
  MAP_COLOURS,
  MAP_LEGEND_ROW,
  MAP_SWATCHES,
  mapLegendRows,
  mapBoard,
  mapPlot,
  markLegendItems,
  optimumGroup,
  ringArea,
  sharedColourDomain,
  unorderedRegion,
  type ColourDomain,
  type MapLegendItem,
} from './map-layers.js';

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
  /** Colour domain [%] shared with every map this chart is compared with; both panels' own range when absent. */
  domain?: ColourDomain;
}

/** The shared colour range [%] of maps compared side by side: up to the highest maximum, at most COMPARE_SPAN_PCT below it. */
export function compareColourRange(maps: GapMap[]): ColourDomain {
  return sharedColourDomain(maps, COMPARE_SPAN_PCT);
}

function drawPanel(g: Sel, id: string, p: ComparePanel, inp: CompareChartInput, range: ColourDomain, showYLabel: boolean): void {
  const pl = mapPlot(p.map, PLOT_W, PLOT_H);
  const { w, h, xs, ys } = pl;
  const { grid } = filledGrid(p.map.values, pl.nx, pl.ny, 100);
  const optX = xs(p.optimum.x);
  const optY = ys(p.optimum.y);
  const othX = xs(p.other.x);
  const othY = ys(p.other.y);

  g.attr('class', 'gs-compare-panel').attr('data-light', p.light);
  g.append('text').attr('class', 'gs-panel-title').attr('x', 0).attr('y', -12).attr('font-size', 13).attr('font-weight', 'bold').text(svgText(p.title));
  const plot = clippedPlot(g, g, `${id}-clip`, pl);
  const board = mapBoard(pl, [
    { x: optX, y: optY, r: 8 },
    { x: othX, y: othY, r: 9 },
  ]);
  const opt = optimumGroup(g, id, p.optimum);
  const eff = `${num(p.optimum.value * 100, 2)} %`;
  drawOptimumLabel(opt, board, optX, optY, [`${eff} at ${num(p.optimum.x, 3)} / ${num(p.optimum.y, 3)} eV`, `${eff}, ${num(p.optimum.x, 3)}/${num(p.optimum.y, 3)}`, eff]);
  drawMapLayers(plot, pl, {
    id,
    defs: g,
    grid,
    domain: range,
    marks: inp.marks,
    // Labels of horizontal lines go to the side away from the optima.
    markSide: (optX + othX) / 2 > w / 2 ? 'left' : 'right',
    board,
    away: [
      [optX, optY],
      [othX, othY],
    ],
    threshold: p.threshold,
  });
  // The other light's optimum (open), joined to this one's (filled) when they are apart.
  const other = g.append('g').attr('class', 'gs-optimum-other').attr('data-gap-x', num(p.other.x, 6)).attr('data-gap-y', num(p.other.y, 6)).attr('data-efficiency', num(p.other.value, 8));
  if (Math.hypot(othX - optX, othY - optY) > 3) {
    other.append('path').attr('class', 'gs-shift').attr('d', `M${num(othX)},${num(othY)}L${num(optX)},${num(optY)}`).attr('stroke', '#ffffff').attr('stroke-width', 1.5).attr('stroke-dasharray', '3,2');
  }
  other.append('circle').attr('cx', num(othX)).attr('cy', num(othY)).attr('r', 6.5).attr('fill', 'none').attr('stroke', '#000000').attr('stroke-width', 3.2);
  other.append('circle').attr('cx', num(othX)).attr('cy', num(othY)).attr('r', 6.5).attr('fill', 'none').attr('stroke', '#ffffff').attr('stroke-width', 1.6);
  g.node()?.appendChild(opt.node() as Element);
  opt.append('circle').attr('cx', num(optX)).attr('cy', num(optY)).attr('r', 3.4).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1.2);
  g.append('rect').attr('class', 'gs-plot-area').attr('width', w).attr('height', h).attr('fill', 'none').attr('stroke', '#333333');
  drawAxes(g, { x: xs, y: ys, w, h, xTicks: 6, yTicks: 7, xLabel: inp.xLabel, yLabel: showYLabel ? inp.yLabel : undefined });
}

export function compareChartSvg(inp: CompareChartInput): string {
  const range = inp.domain ?? compareColourRange(inp.panels.map((p) => p.map));
  // Legend under both panels (its rows set the chart's height).
  const items: MapLegendItem[] = [
    { draw: (s) => s.append('circle').attr('cx', 9).attr('cy', 0).attr('r', 4).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1.2), text: "the panel's own optimum" },
    { draw: (s) => s.append('circle').attr('cx', 9).attr('cy', 0).attr('r', 5.5).attr('fill', 'none').attr('stroke', '#333333').attr('stroke-width', 1.6), text: "the other panel's optimum" },
    { draw: MAP_SWATCHES.tolerance, text: `tolerance: ≥ (1 − ${num(inp.loss * 100, 1)} %)·own best` },
    ...markLegendItems(inp.marks),
  ];
  const m0 = inp.panels[0].map;
  if (ringArea(unorderedRegion(m0.x[0], m0.x[m0.x.length - 1], m0.y[0], m0.y[m0.y.length - 1])) > 1e-6) items.push({ draw: MAP_SWATCHES.unordered, text: 'gaps out of order' });
  const legendSpan = 2 * PLOT_W + M.between + 60;
  const height = COMPARE_HEIGHT + MAP_LEGEND_ROW * Math.max(0, mapLegendRows(items, legendSpan) - 2);
  return buildSvg(COMPARE_WIDTH, height, { id: inp.id, class: 'gs-chart gs-compare', 'data-colour-lo': num(range.lo, 4), 'data-colour-hi': num(range.hi, 4), role: 'img' }, (svg) => {
    svg.append('title').text(svgText(`${inp.panels[0].title} and ${inp.panels[1].title}, ${inp.wiringLabel}: ${inp.xLabel} against ${inp.yLabel}, one colour scale`));
    inp.panels.forEach((p, k) => {
      const g = svg.append('g').attr('transform', `translate(${M.left + k * (PLOT_W + M.between)},${M.top})`);
      drawPanel(g, `${inp.id}-${p.light.replace(/\./g, '')}`, p, inp, range, k === 0);
    });
    // One colour bar for both panels.
    drawColourBar(svg, M.left + 2 * PLOT_W + M.between + 20, M.top, PLOT_H, range.lo, range.hi);
    drawMapLegend(svg.append('g').attr('class', 'gs-legend').attr('transform', `translate(${M.left},${M.top + PLOT_H + 64})`), items, legendSpan);
  });
}
