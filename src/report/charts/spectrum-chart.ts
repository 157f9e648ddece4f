/**
 * The light with each subcell's absorbed band: subcell i takes the photons
 * between its own gap and the gap above, [E_g,i, E_g,i−1) (docs/PHYSICS.md §4,
 * step absorbers); what no subcell takes is left grey.
 */
import type { Spectrum } from '../../light/spectrum.js';
import { HC_EV_NM, toMaCm2 } from '../../physics/constants.js';
import { buildSvg, linePath, num, svgText } from '../svg.js';
import { drawFrame, FRAME_MARGIN, LEGEND_ROW, legendRows, subcellColour, type LegendItem, shortLabel } from './frame.js';

export const SPECTRUM_WIDTH = 680;

export interface SpectrumChartInput {
  id: string;
  spectrum: Spectrum;
  gapsEv: number[];
  labels: string[];
  /** Photogeneration per subcell [A/m²]. */
  jgenAm2: number[];
}

export interface SpectrumChartData {
  wavelengthNm: number[];
  irradiance: number[];
  /** 1-based subcell absorbing each point, 0 for none. */
  subcell: number[];
  rangeNm: [number, number];
}

/** Points drawn (at least 1 nm apart) and the band each falls in. */
export function spectrumChartData(inp: Pick<SpectrumChartInput, 'spectrum' | 'gapsEv'>): SpectrumChartData {
  const s = inp.spectrum;
  const wl = s.wavelengthNm;
  const lowest = Math.min(...inp.gapsEv);
  const lo = Math.max(wl[0], 280);
  const hi = Math.min(wl[wl.length - 1], Math.max(1300, Math.ceil((HC_EV_NM / lowest + 250) / 100) * 100), 4000);
  const edges = inp.gapsEv.map((g) => HC_EV_NM / g);
  const out: SpectrumChartData = { wavelengthNm: [], irradiance: [], subcell: [], rangeNm: [lo, hi] };
  let last = -Infinity;
  for (let i = 0; i < wl.length; i++) {
    if (wl[i] < lo || wl[i] > hi) continue;
    if (wl[i] - last < 1 && i !== wl.length - 1) continue;
    last = wl[i];
    out.wavelengthNm.push(wl[i]);
    out.irradiance.push(s.irradiance[i]);
    const k = edges.findIndex((e) => wl[i] <= e);
    out.subcell.push(k + 1);
  }
  return out;
}

export function spectrumChartSvg(inp: SpectrumChartInput): string {
  const data = spectrumChartData(inp);
  const n = inp.gapsEv.length;
  const legend: LegendItem[] = inp.labels.map((l, i) => ({
    colour: subcellColour(i, n),
    kind: 'area' as const,
    text: `${i + 1}: ${shortLabel(l)}, ${num(inp.gapsEv[i], 3)} eV, J_gen ${num(toMaCm2(inp.jgenAm2[i]), 2)} mA/cm²`,
    full: `${i + 1}: ${l}, ${num(inp.gapsEv[i], 3)} eV, J_gen ${num(toMaCm2(inp.jgenAm2[i]), 2)} mA/cm²`,
  }));
  legend.push({ colour: '#c8c8c8', kind: 'area', text: 'not absorbed' });
  const plotW = SPECTRUM_WIDTH - FRAME_MARGIN.left - FRAME_MARGIN.right;
  const height = 300 + LEGEND_ROW * (legendRows(legend, plotW) - 1);
  const ymax = Math.max(...data.irradiance) * 1.06;
  return buildSvg(SPECTRUM_WIDTH, height, { id: inp.id, class: 'gs-chart gs-spectrum', role: 'img' }, (svg) => {
    svg.append('title').text(svgText(`Spectrum ${inp.spectrum.name} with the band each subcell absorbs`));
    const f = drawFrame(svg, inp.id, { width: SPECTRUM_WIDTH, height, xDomain: data.rangeNm, yDomain: [0, ymax], xLabel: 'wavelength [nm]', yLabel: 'spectral irradiance [W m⁻² nm⁻¹]', legend });
    const pts = data.wavelengthNm.map((x, i) => [f.x(x), f.y(data.irradiance[i])] as [number, number]);
    const area = (a: number, b: number) => {
      const seg = pts.filter((_, i) => data.wavelengthNm[i] >= a && data.wavelengthNm[i] <= b);
      if (seg.length < 2) return '';
      return `${linePath([[seg[0][0], f.y(0)], ...seg, [seg[seg.length - 1][0], f.y(0)]], 1)}Z`;
    };
    f.plot.append('path').attr('class', 'gs-unabsorbed').attr('d', area(data.rangeNm[0], data.rangeNm[1])).attr('fill', '#c8c8c8');
    const edges = inp.gapsEv.map((g) => HC_EV_NM / g);
    edges.forEach((e, i) => {
      const a = i === 0 ? data.rangeNm[0] : edges[i - 1];
      f.plot.append('path').attr('class', 'gs-absorbed').attr('data-subcell', i + 1).attr('d', area(a, e)).attr('fill', subcellColour(i, n)).attr('fill-opacity', 0.9);
      f.plot.append('line').attr('x1', num(f.x(e))).attr('x2', num(f.x(e))).attr('y1', 0).attr('y2', num(f.h)).attr('stroke', '#333333').attr('stroke-dasharray', '3,3');
      f.plot.append('text').attr('x', num(f.x(e) - 4)).attr('y', 14).attr('text-anchor', 'end').attr('font-size', 10).text(`${num(inp.gapsEv[i], 3)} eV`);
    });
    f.plot.append('path').attr('class', 'gs-spectrum-line').attr('d', linePath(pts, 1)).attr('fill', 'none').attr('stroke', '#222222').attr('stroke-width', 0.7);
  });
}
