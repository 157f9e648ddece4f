/**
 * How blue or red an ensemble's light is: a histogram of the members'
 * average photon energy (APE) over the summary's window, each bar the share
 * of the ensemble's total weight whose APE falls in it, with the weighted
 * mean APE and the AM1.5G reference's APE over the same window as lines.
 */
import { buildSvg, num, svgText } from '../svg.js';
import { drawFrame, FRAME_MARGIN, LEGEND_ROW, legendRows, type LegendItem } from './frame.js';

export const APE_WIDTH = 680;

export interface ApeChartInput {
  id: string;
  /** Bin edges [eV] (one more than bins) and summed weight per bin, from ensembleSummary. */
  edgesEv: number[];
  weights: number[];
  /** Total weight of the ensemble (bars are shares of it). */
  totalWeight: number;
  windowNm: [number, number];
  weightedMeanEv: number | null;
  referenceApeEv: number;
  referenceName: string;
  ensembleName: string;
}

export const APE_COLOURS = { bar: '#4a7fa8', mean: '#c0392b', reference: '#111111' };

export function apeChartSvg(inp: ApeChartInput): string {
  const bins = inp.weights.length;
  const shares = inp.weights.map((w) => (100 * w) / inp.totalWeight);
  const values = [...inp.edgesEv, inp.referenceApeEv, ...(inp.weightedMeanEv === null ? [] : [inp.weightedMeanEv])].filter(Number.isFinite);
  const width = bins > 0 ? inp.edgesEv[1] - inp.edgesEv[0] : 0.02;
  const xlo = Math.min(...values) - width;
  const xhi = Math.max(...values) + width;
  const ymax = Math.max(1, ...shares) * 1.12;
  const legend: LegendItem[] = [{ colour: APE_COLOURS.bar, kind: 'area', text: `share of the ensemble's weight, ${num(width * 1000, 0)} meV bins` }];
  if (inp.weightedMeanEv !== null) legend.push({ colour: APE_COLOURS.mean, text: `weighted mean ${num(inp.weightedMeanEv, 3)} eV` });
  legend.push({ colour: APE_COLOURS.reference, dash: '5,3', text: `${inp.referenceName} ${num(inp.referenceApeEv, 3)} eV` });
  const plotW = APE_WIDTH - FRAME_MARGIN.left - FRAME_MARGIN.right;
  const height = 280 + LEGEND_ROW * (legendRows(legend, plotW) - 1);
  return buildSvg(APE_WIDTH, height, { id: inp.id, class: 'gs-chart gs-ape', 'data-bins': bins, role: 'img' }, (svg) => {
    svg.append('title').text(svgText(`Average photon energy of ${inp.ensembleName} (${inp.windowNm[0]}–${inp.windowNm[1]} nm), weighted histogram`));
    const f = drawFrame(svg, inp.id, {
      width: APE_WIDTH,
      height,
      xDomain: [xlo, xhi],
      yDomain: [0, ymax],
      xLabel: `average photon energy, ${inp.windowNm[0]}–${inp.windowNm[1]} nm [eV]`,
      yLabel: 'share of total weight [%]',
      legend,
    });
    const bars = f.plot.append('g').attr('class', 'gs-ape-bars');
    for (let k = 0; k < bins; k++) {
      const a = f.x(inp.edgesEv[k]);
      const b = f.x(inp.edgesEv[k + 1]);
      const y = f.y(shares[k]);
      bars
        .append('rect')
        .attr('class', 'gs-ape-bar')
        .attr('data-lo', num(inp.edgesEv[k], 4))
        .attr('data-hi', num(inp.edgesEv[k + 1], 4))
        .attr('data-weight', num(inp.weights[k], 6))
        .attr('x', num(a + 0.5))
        .attr('y', num(y))
        .attr('width', num(Math.max(0, b - a - 1)))
        .attr('height', num(Math.max(0, f.h - y)))
        .attr('fill', APE_COLOURS.bar);
    }
    if (bins === 0) f.plot.append('text').attr('x', f.w / 2).attr('y', f.h / 2).attr('text-anchor', 'middle').text('no member covers the APE window');
    const vline = (x: number, colour: string, dash: string | null, cls: string) =>
      f.plot.append('line').attr('class', cls).attr('data-ev', num(x, 6)).attr('x1', num(f.x(x))).attr('x2', num(f.x(x))).attr('y1', 0).attr('y2', num(f.h)).attr('stroke', colour).attr('stroke-width', 2).attr('stroke-dasharray', dash);
    if (inp.weightedMeanEv !== null) vline(inp.weightedMeanEv, APE_COLOURS.mean, null, 'gs-ape-mean');
    vline(inp.referenceApeEv, APE_COLOURS.reference, '5,3', 'gs-ape-reference');
  });
}
