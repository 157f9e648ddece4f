/**
 * Efficiency over two gaps as filled contour bands on a perceptually uniform
 * scale (viridis), with labelled isolines, the tolerance outline at
 * (1 − loss)·best, the current-matching locus (series), practical windows of
 * bound families as shaded bands, fixed absorbers as lines, and the
 * recommended optimum as a marker that carries its gaps as data attributes.
 */
import type { MapOutcome } from '../compute.js';
import { buildSvg, num, svgText } from '../svg.js';
import { drawAxes } from './frame.js';
import { drawCompositionAxes } from './composition-axis.js';
import {
  besideCandidates,
  clippedPlot,
  drawColourBar,
  drawMapLayers,
  drawMapLegend,
  drawOptimumLabel,
  filledGrid,
  haloText,
  MAP_COLOURS,
  MAP_LEGEND_ROW,
  MAP_SWATCHES,
  mapLegendRows,
  mapBoard,
  mapPlot,
  markLegendItems,
  optimumGroup,
  sharedColourDomain,
  type ColourDomain,
  type MapLegendItem,
} from './map-layers.js';

export const MAP_WIDTH = 680;
export const MAP_HEIGHT = 590;
const M = { top: 30, right: 118, bottom: 88, left: 68 };

export interface MapChartInput {
  outcome: MapOutcome;
  /** Element id; also prefixes inner ids. */
  id: string;
  /** Id of the <script type="application/json"> holding the grid for the hover readout. */
  gridId: string;
  wiringLabel: string;
  xLabel: string;
  yLabel: string;
  loss: number;
  /** Colour domain [%] shared with the maps this one is compared with; its own range when absent. */
  domain?: ColourDomain;
  /** Overall size in SVG user units [px]; MAP_WIDTH × MAP_HEIGHT when absent. */
  size?: { width: number; height: number };
}

export function mapChartSvg(inp: MapChartInput): string {
  const o = inp.outcome;
  const m = o.map;
  const width = inp.size?.width ?? MAP_WIDTH;
  // Legend entries (their rows set the chart's height).
  const items: MapLegendItem[] = [
    { draw: (s) => s.append('circle').attr('cx', 8).attr('cy', 0).attr('r', 5).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1.5), text: 'recommended optimum' },
    { draw: MAP_SWATCHES.tolerance, text: `tolerance: ≥ (1 − ${num(inp.loss * 100, 1)} %)·best` },
  ];
  if (o.matching) items.push({ draw: (s) => s.append('path').attr('d', 'M0,0H18').attr('stroke', MAP_COLOURS.matching).attr('stroke-width', 2).attr('stroke-dasharray', '9,4'), text: 'current matched (J_gen equal)' });
  items.push(...markLegendItems(o.marks));
  const legendSpan = width - M.left - 18;
  // The layout leaves room for two legend rows; each further row adds to the chart's height, not to the plot's.
  const extraRows = Math.max(0, mapLegendRows(items, legendSpan) - 2);
  const height = (inp.size?.height ?? MAP_HEIGHT) + MAP_LEGEND_ROW * extraRows;
  const p = mapPlot(m, width - M.left - M.right, height - M.top - M.bottom - MAP_LEGEND_ROW * extraRows);
  const { w, h, xs, ys } = p;
  const { grid } = filledGrid(m.values, p.nx, p.ny, 100);
  const domain = inp.domain ?? sharedColourDomain([m]);
  const { lo, hi } = domain;
  const optX = xs(o.optimum.x);
  const optY = ys(o.optimum.y);

  return buildSvg(
    width,
    height,
    {
      id: inp.id,
      class: 'gs-chart gs-map',
      'data-grid': inp.gridId,
      'data-x-min': num(p.x0, 6),
      'data-x-max': num(p.x1, 6),
      'data-y-min': num(p.y0, 6),
      'data-y-max': num(p.y1, 6),
      'data-plot-left': M.left,
      'data-plot-top': M.top,
      'data-plot-width': w,
      'data-plot-height': h,
      'data-colour-lo': num(lo, 4),
      'data-colour-hi': num(hi, 4),
      role: 'img',
    },
    (svg) => {
      svg.append('title').text(svgText(`Efficiency map, ${inp.wiringLabel}: ${inp.xLabel} against ${inp.yLabel}`));
      const g = svg.append('g').attr('transform', `translate(${M.left},${M.top})`);
      const plot = clippedPlot(svg, g, `${inp.id}-clip`, p);
      const bx = xs(m.best.x);
      const by = ys(m.best.y);
      const showMax = Math.abs(m.best.x - o.optimum.x) > 1.5 * o.stepEv || Math.abs(m.best.y - o.optimum.y) > 1.5 * o.stepEv;
      // Markers first, then the optimum's label, then the map maximum's: every later label keeps clear of them.
      const board = mapBoard(p, [{ x: optX, y: optY, r: 9 }, ...(showMax ? [{ x: bx, y: by, r: 7 }] : [])]);
      // The lower subcell's composition axis writes its ticks inside the right edge: keep labels off that strip.
      if (o.compositionAxes?.y) board.reserve({ x0: w - 36, y0: 0, x1: w, y1: h });
      const opt = optimumGroup(g, inp.id, o.optimum);
      const eff = `${num(o.optimum.value * 100, 2)} %`;
      const gapsText = `${num(o.optimum.x, 3)} / ${num(o.optimum.y, 3)} eV`;
      drawOptimumLabel(opt, board, optX, optY, [`optimum ${eff} (${gapsText})`, `${eff} (${gapsText})`, `${eff}, ${num(o.optimum.x, 3)}/${num(o.optimum.y, 3)}`, `optimum ${eff}`, eff]);
      const maxLabel = showMax ? board.placeOrShorten(besideCandidates(bx, by, 10), `map max ${num(m.best.value * 100, 2)} %`, { size: 10 }, 8) : null;
      drawMapLayers(plot, p, {
        id: inp.id,
        defs: svg,
        grid,
        domain,
        marks: o.marks,
        markSide: 'left',
        board,
        away: [
          [optX, optY],
          [bx, by],
        ],
        threshold: o.threshold,
        // Current-matching locus J_gen(x) = J_gen(y) (series only).
        overlay: (layer) => {
          if (!o.matching) return;
          const fm = filledGrid(o.matching, p.nx, p.ny, 1);
          const c = p.gen.contour(fm.grid, 0);
          if (c.coordinates.length > 0 && fm.lo < 0 && fm.hi > 0) {
            layer.append('path').attr('class', 'gs-matching').attr('fill', 'none').attr('stroke', MAP_COLOURS.matching).attr('stroke-width', 2).attr('stroke-dasharray', '9,4').attr('d', p.path(c));
          }
        },
      });
      // Map maximum (unconstrained on this view) when it differs from the recommendation.
      if (showMax) {
        const mx = plot.append('g').attr('class', 'gs-mapmax').attr('data-gap-x', num(m.best.x, 4)).attr('data-gap-y', num(m.best.y, 4));
        mx.append('title').text(`map maximum ${num(m.best.value * 100, 2)} % at ${num(m.best.x, 3)} / ${num(m.best.y, 3)} eV`);
        mx.append('path').attr('d', `M${num(bx - 6)},${num(by)}H${num(bx + 6)}M${num(bx)},${num(by - 6)}V${num(by + 6)}`).attr('stroke', '#ffffff').attr('stroke-width', 2);
        if (maxLabel) haloText(mx, maxLabel, { size: 10, fill: '#ffffff', halo: '#000000', haloWidth: 2 }).attr('class', 'gs-mapmax-label gs-label');
      }
      // The recommendation's marker (its group sits above the plot's layers).
      opt.append('circle').attr('class', 'gs-optimum-ring').attr('cx', num(optX)).attr('cy', num(optY)).attr('r', 7).attr('fill', 'none').attr('stroke', '#ffffff').attr('stroke-width', 3);
      opt.append('circle').attr('class', 'gs-optimum-dot').attr('cx', num(optX)).attr('cy', num(optY)).attr('r', 3.2).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1);
      // Axes and frame.
      g.append('rect').attr('class', 'gs-plot-area').attr('width', w).attr('height', h).attr('fill', 'none').attr('stroke', '#333333').attr('stroke-width', 1);
      drawAxes(g, { x: xs, y: ys, w, h, xTicks: 8, yTicks: 8, xLabel: inp.xLabel, yLabel: inp.yLabel });
      drawCompositionAxes(g, o.compositionAxes, xs, ys, w);
      drawColourBar(g, w + 22, 0, h, lo, hi);
      drawMapLegend(g.append('g').attr('class', 'gs-legend').attr('transform', `translate(0,${h + 58})`), items, legendSpan);
      // Hover readout (the page's script fills it; inert in a standalone file).
      const hover = g.append('g').attr('class', 'gs-hover').attr('visibility', 'hidden').attr('pointer-events', 'none');
      hover.append('line').attr('class', 'gs-hover-x').attr('y1', 0).attr('y2', h).attr('stroke', '#ffffff').attr('stroke-width', 0.8);
      hover.append('line').attr('class', 'gs-hover-y').attr('x1', 0).attr('x2', w).attr('stroke', '#ffffff').attr('stroke-width', 0.8);
      hover.append('text').attr('class', 'gs-readout').attr('x', w - 6).attr('y', 16).attr('text-anchor', 'end').attr('font-size', 11).attr('fill', '#111111').attr('stroke', '#ffffff').attr('stroke-width', 3).attr('paint-order', 'stroke');
    },
  );
}
