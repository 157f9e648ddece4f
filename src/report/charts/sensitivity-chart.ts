/**
 * η along a slice through the optimum: one gap moved, the others held at the
 * optimum. Where a subcell has a practical window (or an allowed range), the
 * offsets outside it are tinted in the subcell's colour and its curve is
 * drawn faded there: those gaps cannot be made, however high the curve climbs.
 */
import type { SensitivitySlice } from '../outcomes.js';
import { buildSvg, linePath, num, svgText } from '../svg.js';
import { drawFrame, FRAME_MARGIN, LEGEND_ROW, legendRows, subcellColour, type LegendItem, shortLabel } from './frame.js';

export const SENSITIVITY_WIDTH = 680;
/** Opacity of the tint outside a window, and of a curve's faded part. */
const OUTSIDE_TINT = 0.13;
const OUTSIDE_CURVE = 0.35;

export interface SensitivityChartInput {
  id: string;
  slices: SensitivitySlice[];
  labels: string[];
  best: number;
  threshold: number;
  loss: number;
  objective: string;
  /** Overall width in SVG user units [px]; SENSITIVITY_WIDTH when absent. */
  width?: number;
  /** Backdrop the curves must stand out from (a dark slide needs the light end of the palette). */
  backdrop?: 'light' | 'dark';
}

/** Offset ranges [meV] outside a slice's window, within [−dmax, dmax]. */
export function outsideWindowMev(s: SensitivitySlice, dmaxMev: number): [number, number][] {
  if (!s.windowEv) return [];
  const lo = (s.windowEv[0] - s.gapEv) * 1000;
  const hi = (s.windowEv[1] - s.gapEv) * 1000;
  const out: [number, number][] = [];
  if (lo > -dmaxMev) out.push([-dmaxMev, Math.min(lo, dmaxMev)]);
  if (hi < dmaxMev) out.push([Math.max(hi, -dmaxMev), dmaxMev]);
  return out.filter(([a, b]) => b > a);
}

export function sensitivityChartSvg(inp: SensitivityChartInput): string {
  const n = inp.slices.length;
  const colourOf = (i: number) => subcellColour(i, n, inp.backdrop);
  const width = inp.width ?? SENSITIVITY_WIDTH;
  const bestPct = inp.best * 100;
  const lo = Math.max(0, bestPct - 8);
  // A fixed subcell's slice can rise above the optimum (the design holds that gap, the slice moves it), so the top of the axis follows the highest slice value.
  const sliceMax = Math.max(bestPct, ...inp.slices.flatMap((s) => s.efficiency.filter((v): v is number => v !== null && Number.isFinite(v)).map((v) => v * 100)));
  const hi = sliceMax + 0.4;
  const dmax = Math.max(...inp.slices.flatMap((s) => s.deltaEv)) * 1000;
  const legend: LegendItem[] = inp.slices.map((s, i) => ({ colour: colourOf(i), dash: s.fixed ? '5,3' : undefined, text: `${i + 1}: ${shortLabel(inp.labels[i])} (${num(s.gapEv, 3)} eV${s.fixed ? ', fixed in the design' : ''})`, full: `${i + 1}: ${inp.labels[i]}` }));
  legend.push({ colour: '#555555', dash: '2,3', text: `tolerance threshold, −${num(inp.loss * 100, 1)} % relative` });
  if (inp.slices.some((s) => outsideWindowMev(s, dmax).length > 0)) legend.push({ colour: '#d6d6d6', kind: 'area', text: "outside the subcell's window (tint in its colour, curve faded)" });
  const plotW = width - FRAME_MARGIN.left - FRAME_MARGIN.right;
  const height = 300 + LEGEND_ROW * (legendRows(legend, plotW) - 1);
  return buildSvg(width, height, { id: inp.id, class: 'gs-chart gs-sensitivity', role: 'img' }, (svg) => {
    svg.append('title').text(svgText(`Sensitivity of the ${inp.objective} to each gap`));
    const f = drawFrame(svg, inp.id, { width, height, xDomain: [-dmax, dmax], yDomain: [lo, hi], xLabel: 'gap offset from the optimum [meV]', yLabel: `${inp.objective} [%]`, legend });
    const clipIds: string[] = [];
    inp.slices.forEach((s, i) => {
      const outside = outsideWindowMev(s, dmax);
      if (outside.length === 0) return;
      for (const [a, b] of outside) {
        f.plot.append('rect').attr('class', 'gs-outside-window').attr('data-subcell', i + 1).attr('x', num(f.x(a))).attr('y', 0).attr('width', num(f.x(b) - f.x(a))).attr('height', num(f.h)).attr('fill', colourOf(i)).attr('fill-opacity', OUTSIDE_TINT);
      }
      // A clip of the window's inside, for the curve's solid part.
      const id = `${inp.id}-win-${i + 1}`;
      const w0 = Math.max(-dmax, ((s.windowEv as [number, number])[0] - s.gapEv) * 1000);
      const w1 = Math.min(dmax, ((s.windowEv as [number, number])[1] - s.gapEv) * 1000);
      svg.append('defs').append('clipPath').attr('id', id).append('rect').attr('x', num(f.x(w0))).attr('y', -10).attr('width', num(Math.max(0, f.x(w1) - f.x(w0)))).attr('height', num(f.h + 20));
      clipIds[i] = id;
    });
    f.plot.append('line').attr('x1', num(f.x(0))).attr('x2', num(f.x(0))).attr('y1', 0).attr('y2', f.h).attr('stroke', '#999999');
    f.plot.append('line').attr('class', 'gs-threshold').attr('x1', 0).attr('x2', f.w).attr('y1', num(f.y(inp.threshold * 100))).attr('y2', num(f.y(inp.threshold * 100))).attr('stroke', '#555555').attr('stroke-dasharray', '2,3');
    inp.slices.forEach((s, i) => {
      const pts = s.deltaEv.map((d, k) => {
        const v = s.efficiency[k];
        return v === null ? null : ([f.x(d * 1000), f.y(Math.max(lo - 5, v * 100))] as [number, number]);
      });
      const d = linePath(pts, 2);
      const curve = (cls: string) => f.plot.append('path').attr('class', cls).attr('data-subcell', i + 1).attr('fill', 'none').attr('stroke', colourOf(i)).attr('stroke-width', 2).attr('stroke-dasharray', s.fixed ? '5,3' : null).attr('d', d);
      if (!clipIds[i]) {
        curve('gs-slice');
        return;
      }
      curve('gs-slice-outside').attr('stroke-opacity', OUTSIDE_CURVE);
      f.plot.append('g').attr('clip-path', `url(#${clipIds[i]})`).append('path').attr('class', 'gs-slice').attr('data-subcell', i + 1).attr('fill', 'none').attr('stroke', colourOf(i)).attr('stroke-width', 2).attr('stroke-dasharray', s.fixed ? '5,3' : null).attr('d', d);
    });
  });
}
