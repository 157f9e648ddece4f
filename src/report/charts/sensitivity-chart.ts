/** η along a slice through the optimum: one gap moved, the others held at the optimum. */
import type { SensitivitySlice } from '../compute.js';
import { buildSvg, linePath, num, svgText } from '../svg.js';
import { drawFrame, FRAME_MARGIN, LEGEND_ROW, legendRows, subcellColour, type LegendItem, shortLabel } from './frame.js';

export const SENSITIVITY_WIDTH = 680;

export function sensitivityChartSvg(inp: { id: string; slices: SensitivitySlice[]; labels: string[]; best: number; threshold: number; loss: number; objective: string }): string {
  const n = inp.slices.length;
  const bestPct = inp.best * 100;
  const lo = Math.max(0, bestPct - 8);
  // A fixed subcell's slice can rise above the optimum (the design holds that gap, the slice moves it), so the top of the axis follows the highest slice value.
  const sliceMax = Math.max(bestPct, ...inp.slices.flatMap((s) => s.efficiency.filter((v): v is number => v !== null && Number.isFinite(v)).map((v) => v * 100)));
  const hi = sliceMax + 0.4;
  const legend: LegendItem[] = inp.slices.map((s, i) => ({ colour: subcellColour(i, n), dash: s.fixed ? '5,3' : undefined, text: `${i + 1}: ${shortLabel(inp.labels[i])} (${num(s.gapEv, 3)} eV${s.fixed ? ', fixed in the design' : ''})`, full: `${i + 1}: ${inp.labels[i]}` }));
  legend.push({ colour: '#555555', dash: '2,3', text: `tolerance threshold, −${num(inp.loss * 100, 1)} % relative` });
  const plotW = SENSITIVITY_WIDTH - FRAME_MARGIN.left - FRAME_MARGIN.right;
  const height = 300 + LEGEND_ROW * (legendRows(legend, plotW) - 1);
  const dmax = Math.max(...inp.slices.flatMap((s) => s.deltaEv)) * 1000;
  return buildSvg(SENSITIVITY_WIDTH, height, { id: inp.id, class: 'gs-chart gs-sensitivity', role: 'img' }, (svg) => {
    svg.append('title').text(svgText(`Sensitivity of the ${inp.objective} to each gap`));
    const f = drawFrame(svg, inp.id, { width: SENSITIVITY_WIDTH, height, xDomain: [-dmax, dmax], yDomain: [lo, hi], xLabel: 'gap offset from the optimum [meV]', yLabel: `${inp.objective} [%]`, legend });
    f.plot.append('line').attr('x1', num(f.x(0))).attr('x2', num(f.x(0))).attr('y1', 0).attr('y2', f.h).attr('stroke', '#999999');
    f.plot.append('line').attr('class', 'gs-threshold').attr('x1', 0).attr('x2', f.w).attr('y1', num(f.y(inp.threshold * 100))).attr('y2', num(f.y(inp.threshold * 100))).attr('stroke', '#555555').attr('stroke-dasharray', '2,3');
    inp.slices.forEach((s, i) => {
      const pts = s.deltaEv.map((d, k) => {
        const v = s.efficiency[k];
        return v === null ? null : ([f.x(d * 1000), f.y(Math.max(lo - 5, v * 100))] as [number, number]);
      });
      f.plot.append('path').attr('class', 'gs-slice').attr('data-subcell', i + 1).attr('fill', 'none').attr('stroke', subcellColour(i, n)).attr('stroke-width', 2).attr('stroke-dasharray', s.fixed ? '5,3' : null).attr('d', linePath(pts, 2));
    });
  });
}
