/** J–V curves of each subcell at its photocurrent in the stack, the series terminal curve, and the operating points. */
import type { JvOutcome } from '../compute.js';
import { buildSvg, linePath, num, svgText } from '../svg.js';
import { besideCandidates } from './map-layers.js';
import { LabelBoard, pointBox } from './labels.js';
import { drawFrame, FRAME_MARGIN, LEGEND_ROW, legendRows, subcellColour, type LegendItem, shortLabel } from './frame.js';
import { toMaCm2 } from '../../physics/constants.js';

export const JV_WIDTH = 680;

export function jvChartSvg(inp: { id: string; jv: JvOutcome; wiringLabel: string }): string {
  const jv = inp.jv;
  const n = jv.subcells.length;
  const curves = jv.stack ? [...jv.subcells, jv.stack] : jv.subcells;
  const vmax = Math.max(...curves.map((c) => Math.max(...c.voltageV))) * 1.04;
  const jmax = toMaCm2(Math.max(...curves.map((c) => Math.max(...c.currentAm2)))) * 1.1;
  const legend: LegendItem[] = jv.subcells.map((c, i) => ({ colour: subcellColour(i, n), text: `${i + 1}: ${shortLabel(c.label)}`, full: `${i + 1}: ${c.label}` }));
  if (jv.stack) legend.push({ colour: '#111111', text: 'stack terminals (series)' });
  legend.push({ colour: '#111111', kind: 'dot', text: 'operating point' });
  const plotW = JV_WIDTH - FRAME_MARGIN.left - FRAME_MARGIN.right;
  const height = 320 + LEGEND_ROW * (legendRows(legend, plotW) - 1);
  return buildSvg(JV_WIDTH, height, { id: inp.id, class: 'gs-chart gs-jv', role: 'img' }, (svg) => {
    svg.append('title').text(svgText(`J–V curves, ${inp.wiringLabel}`));
    const f = drawFrame(svg, inp.id, { width: JV_WIDTH, height, xDomain: [0, vmax], yDomain: [0, jmax], xLabel: 'voltage [V]', yLabel: 'current density [mA/cm²]', legend });
    const draw = (c: { voltageV: number[]; currentAm2: number[] }, colour: string, width: number, cls: string) =>
      f.plot.append('path').attr('class', cls).attr('fill', 'none').attr('stroke', colour).attr('stroke-width', width).attr('d', linePath(c.voltageV.map((v, k) => [f.x(v), f.y(toMaCm2(c.currentAm2[k]))] as [number, number]), 2));
    jv.subcells.forEach((c, i) => draw(c, subcellColour(i, n), 2, 'gs-jv-subcell'));
    if (jv.stack) draw(jv.stack, '#111111', 2.4, 'gs-jv-stack');
    jv.operating.forEach((p, i) => {
      f.plot.append('circle').attr('class', 'gs-operating').attr('cx', num(f.x(p.vV))).attr('cy', num(f.y(toMaCm2(p.jAm2)))).attr('r', 4.5).attr('fill', subcellColour(i, n)).attr('stroke', '#111111').attr('stroke-width', 1.2);
    });
    if (jv.stackMpp) {
      const x = f.x(jv.stackMpp.vV);
      const y = f.y(toMaCm2(jv.stackMpp.jAm2));
      f.plot.append('path').attr('class', 'gs-mpp').attr('d', `M${num(x)},${num(y - 6)}L${num(x + 6)},${num(y)}L${num(x)},${num(y + 6)}L${num(x - 6)},${num(y)}Z`).attr('fill', '#111111');
      // The label keeps clear of the operating points, the diamond and the plot's edges.
      const board = new LabelBoard({ x0: 2, y0: 2, x1: f.w - 2, y1: f.h - 2 });
      board.reserve(pointBox(x, y, 7));
      for (const p of jv.operating) board.reserve(pointBox(f.x(p.vV), f.y(toMaCm2(p.jAm2)), 6));
      const text = `MPP ${num(jv.stackMpp.vV, 3)} V, ${num(toMaCm2(jv.stackMpp.jAm2), 2)} mA/cm²`;
      const t = board.placeOrShorten(besideCandidates(x, y, 10), text, { size: 10 }, 8);
      if (t) {
        const host = t.full ? f.plot.append('g').attr('class', 'gs-cut') : f.plot;
        if (t.full) host.append('title').text(svgText(t.full));
        host.append('text').attr('class', 'gs-mpp-label gs-label').attr('x', num(t.x)).attr('y', num(t.y)).attr('text-anchor', t.anchor).attr('font-size', 10).text(t.text);
      }
    }
  });
}
