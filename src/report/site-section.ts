/**
 * The report's site section, when the light is a weather file's hourly year:
 * monthly plane-of-array insolation and yield of the recommended design (first
 * wiring), and each hour's average photon energy against its irradiance, as
 * charts with their CSV and JSON (docs/PHYSICS.md §10).
 */
import { averagePhotonEnergyEv } from '../light/spectrum.js';
import { ENSEMBLE_APE_WINDOW_NM } from '../light/ensemble.js';
import type { SiteYear } from '../light/site-year.js';
import { yieldForStack } from '../stack/yield.js';
import type { StackSpec } from '../stack/model.js';
import { CAUTION } from './assumptions.js';
import { drawFrame, type LegendItem } from './charts/frame.js';
import { buildSvg, num, svgText } from './svg.js';

export interface SiteChart {
  name: string;
  svg: string;
  csv: string;
  json: Record<string, unknown>;
}

export interface SiteSection {
  heading: string;
  lines: string[];
  monthlySvg: string;
  monthlyCaption: string;
  apeSvg: string;
  apeCaption: string;
  charts: SiteChart[];
  summary: Record<string, unknown>;
}

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const COLOURS = { poa: '#8fb3d1', yield: '#c0392b', dot: '#4a7fa8' };
const r6 = (x: number) => Number(x.toPrecision(6));

/** Monthly plane-of-array insolation and yield [kWh/m²] as a bar chart. */
function monthlySvg(id: string, poa: number[], out: number[], design: string): string {
  const width = 680;
  const height = 300;
  const ymax = Math.max(1, ...poa) * 1.1;
  const legend: LegendItem[] = [
    { colour: COLOURS.poa, kind: 'area', text: 'plane-of-array insolation' },
    { colour: COLOURS.yield, kind: 'area', text: `yield, ${design}` },
  ];
  return buildSvg(width, height, { id, class: 'gs-chart gs-site-monthly', role: 'img' }, (svg) => {
    svg.append('title').text(svgText('Monthly plane-of-array insolation and yield [kWh/m²]'));
    const f = drawFrame(svg, id, { width, height, xDomain: [0.5, 12.5], yDomain: [0, ymax], xLabel: 'month (1 = January)', yLabel: 'energy per month [kWh/m²]', legend });
    const g = f.plot.append('g');
    const bw = (f.x(1.5) - f.x(0.5)) * 0.38;
    for (let m = 0; m < 12; m++) {
      const cx = f.x(m + 1);
      g.append('rect').attr('class', 'gs-site-poa').attr('data-month', m + 1).attr('data-kwh-m2', num(poa[m], 4)).attr('x', num(cx - bw)).attr('y', num(f.y(poa[m]))).attr('width', num(bw)).attr('height', num(f.h - f.y(poa[m]))).attr('fill', COLOURS.poa);
      g.append('rect').attr('class', 'gs-site-yield').attr('data-month', m + 1).attr('data-kwh-m2', num(out[m], 4)).attr('x', num(cx)).attr('y', num(f.y(out[m]))).attr('width', num(bw)).attr('height', num(f.h - f.y(out[m]))).attr('fill', COLOURS.yield);
    }
  });
}

/** Hourly average photon energy against plane-of-array irradiance as a scatter. */
function apeScatterSvg(id: string, points: { g: number; ape: number }[], windowNm: readonly [number, number]): string {
  const width = 680;
  const height = 320;
  const apes = points.map((p) => p.ape);
  const lo = Math.min(...apes) - 0.02;
  const hi = Math.max(...apes) + 0.02;
  const gmax = Math.max(100, ...points.map((p) => p.g)) * 1.05;
  return buildSvg(width, height, { id, class: 'gs-chart gs-site-ape', 'data-points': points.length, role: 'img' }, (svg) => {
    svg.append('title').text(svgText('Average photon energy of each hour against its plane-of-array irradiance'));
    const f = drawFrame(svg, id, {
      width,
      height,
      xDomain: [0, gmax],
      yDomain: [lo, hi],
      xLabel: 'plane-of-array irradiance [W/m²]',
      yLabel: `APE ${windowNm[0]}–${windowNm[1]} nm [eV]`,
      legend: [{ colour: COLOURS.dot, kind: 'dot', text: 'one hour of the year' }],
    });
    const g = f.plot.append('g').attr('fill', COLOURS.dot).attr('fill-opacity', 0.35);
    for (const p of points) g.append('circle').attr('cx', num(f.x(p.g), 1)).attr('cy', num(f.y(p.ape), 1)).attr('r', 1.6);
  });
}

/** Build the site section for a design's recommended stack (gaps stated at 300 K). */
export function siteSection(site: SiteYear, best: StackSpec, wiringTitle: string): SiteSection {
  const members = site.ensemble.members;
  const y = yieldForStack(best, members);
  const poa = Array.from({ length: 12 }, () => 0);
  const out = Array.from({ length: 12 }, () => 0);
  const hours = Array.from({ length: 12 }, () => 0);
  y.perSpectrum.forEach((p, k) => {
    const m = site.hours[k].month - 1;
    poa[m] += (p.weight * p.pinWm2) / 1000;
    out[m] += (p.weight * p.pmaxWm2) / 1000;
    hours[m] += p.weight;
  });
  const [w0, w1] = ENSEMBLE_APE_WINDOW_NM;
  const points = members
    .map((m, k) => ({ label: m.label, g: site.hours[k].poaWm2, ape: averagePhotonEnergyEv(m.spectrum, w0, w1), tempK: m.tempK }))
    .filter((p) => Number.isFinite(p.ape));
  const design = `${wiringTitle.split(' (')[0]} at ${best.subcells.map((c) => c.gapEv.toFixed(3)).join(' / ')} eV`;
  const monthly = {
    name: 'site-monthly',
    svg: monthlySvg('site-monthly', poa, out, design),
    csv: [
      `# gapstack site: monthly plane-of-array insolation and yield [kWh/m²] of ${design} at ${site.site.name}; theoretical limits under the stated assumptions, not device predictions`,
      'month,hours,poa_kwh_m2,yield_kwh_m2',
      ...poa.map((p, m) => `${m + 1},${hours[m]},${r6(p)},${r6(out[m])}`),
    ].join('\n') + '\n',
    json: { site: site.site.name, design, months: poa.map((p, m) => ({ month: m + 1, hours: hours[m], poa_kwh_m2: r6(p), yield_kwh_m2: r6(out[m]) })), caution: CAUTION },
  };
  const ape = {
    name: 'site-ape-vs-irradiance',
    svg: apeScatterSvg('site-ape-vs-irradiance', points, ENSEMBLE_APE_WINDOW_NM),
    csv: ['# gapstack site: each hour\'s average photon energy (APE) and plane-of-array irradiance', `label,poa_w_m2,ape_ev_${w0}_${w1}_nm,cell_temp_k`, ...points.map((p) => `${p.label},${r6(p.g)},${r6(p.ape)},${r6(p.tempK)}`)].join('\n') + '\n',
    json: { site: site.site.name, window_nm: [w0, w1], hours: points.map((p) => ({ label: p.label, poa_w_m2: r6(p.g), ape_ev: r6(p.ape), cell_temp_k: r6(p.tempK) })), caution: CAUTION },
  };
  const annualPoa = y.weightedPinWm2 / 1000;
  const annualOut = y.weightedPmaxWm2 / 1000;
  const lines = [
    `${site.site.name}: ${site.site.latitudeDeg}°, ${site.site.longitudeDeg}°, ${site.site.elevationM} m (${site.format.toUpperCase()} weather year); ${site.totals.usedHours} of ${site.totals.fileHours} hours used.`,
    `Annual plane-of-array insolation ${annualPoa.toFixed(1)} kWh/m²; annual yield of ${design}: ${annualOut.toFixed(1)} kWh/m², yield-weighted efficiency ${(y.yieldEfficiency * 100).toFixed(2)} %.`,
    `Skipped: ${site.skipped.map((k) => `${k.count} h ${k.reason}`).join('; ') || 'none'}.`,
    `Defaults and estimates: ${site.defaultsUsed.join('; ')}.`,
  ];
  return {
    heading: `Site light: ${site.site.name}`,
    lines,
    monthlySvg: monthly.svg,
    monthlyCaption: `Plane-of-array insolation (light bars) and the yield of ${design} (dark bars) per month, from the hourly model whose assumptions are listed below.`,
    apeSvg: ape.svg,
    apeCaption: `Each dot is one hour: average photon energy over ${w0}–${w1} nm against plane-of-array irradiance. Cloudy hours carry the clear-sky shapes scaled to the measured amounts; the change of shape under clouds is not modelled (an approximation of the hourly model).`,
    charts: [monthly, ape],
    summary: {
      site: site.site,
      design,
      annual_poa_insolation_kwh_m2: r6(annualPoa),
      annual_yield_kwh_m2: r6(annualOut),
      yield_efficiency: r6(y.yieldEfficiency),
      skipped: site.skipped,
      defaults_used: site.defaultsUsed,
      assumptions: site.assumptions,
    },
  };
}
