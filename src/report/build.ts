/**
 * A design report in memory: the self-contained HTML page and, on request,
 * every chart as standalone SVG and PNG with the data behind it as CSV and
 * JSON. Nothing is written here; the command writes the files only after
 * everything has been built, so a failure leaves existing outputs as they were.
 */
import { siteSection } from './site-section.js';
import type { SitesSectionView } from './sites-view.js';
import HandlebarsRuntime from 'handlebars/runtime.js';
import precompiledPage from './report-template.generated.js';
import type { Design } from '../design/index.js';
import { coverageWarnings } from '../light/coverage.js';
import { toolVersion } from './version.js';
import { computeReport, type ReportData, type StageReporter } from './compute.js';
import { compareColourRange } from './charts/compare-chart.js';
import { sharedColourDomain, type ColourDomain } from './charts/map-layers.js';
import { apeChart, colourScaleWords, compareChart, detailCharts, figureMeta, mapChart, r6, r8, wiringComparisonJson, type Chart } from './figure-data.js';
import { toMaCm2 } from '../physics/constants.js';
import {
  answerRows,
  assumptionList,
  CAUTION,
  comparisonIntro,
  edgeNotes,
  edgeSentence,
  ensembleIdentity,
  fx,
  generatedLine,
  lightSummaryRows,
  lossText,
  pc,
  provenanceList,
  questionText,
  shiftTable,
  subcellTable,
  threeTerminalTwin,
  verdict,
  wiringPatternText,
  wiringTitle,
} from './view.js';

export { toolVersion } from './version.js';
export type { Chart, FigureMeta } from './figure-data.js';
export { colourScaleWords, figureMeta } from './figure-data.js';

export interface BuiltReport {
  html: string;
  charts: Chart[];
  /** Machine-readable answer (the figures folder's summary.json, and `--json`). */
  summary: Record<string, unknown>;
  data: ReportData;
}


/** The "Your spectra versus AM1.5G" section's context, and its charts (appended to `charts`). */
function comparisonSection(data: ReportData, charts: Chart[]): Record<string, unknown> | null {
  const c = data.comparison;
  if (!c) return null;
  const d = data.design;
  const ape = apeChart(data, c);
  // One colour scale per gap pair over every wiring's two panels.
  const ranges = (c.wirings[0]?.maps ?? []).map((_, j) => compareColourRange(c.wirings.flatMap((w) => (w.maps[j] ? [w.maps[j].reference, w.maps[j].ensemble.map] : []))));
  const twin = threeTerminalTwin(data.outcomes);
  const wirings = c.wirings.filter((w) => !twin || w.outcome !== twin.three).map((w) => {
    const maps = w.maps.map((cm, j) => {
      const x = compareChart(data, c, w, cm, ranges[j]);
      charts.push(x.chart);
      return { id: x.chart.name, svg: x.chart.svg, caption: x.caption, heading: x.heading };
    });
    return { slug: w.outcome.wiring.slug, title: wiringTitle(w.outcome.wiring.key), maps, table: shiftTable(d, w), loss: lossText(d, w) };
  });
  charts.push(ape);
  const s = c.summary;
  return {
    intro: comparisonIntro(d, c),
    ensemble: ensembleIdentity(d, c),
    synthetic: c.synthetic,
    wirings,
    pattern: wiringPatternText(c),
    apeSvg: ape.svg,
    apeCaption:
      `Average photon energy of each spectrum over ${s.ape.windowNm[0]}–${s.ape.windowNm[1]} nm; each bar is the share of the ensemble's total weight${s.weightUnit === 'hours' ? ' (hours)' : ''} whose spectra fall in it (${s.ape.histogram.weights.length} bins). ` +
      `The solid line is the weighted mean, the dashed line AM1.5G over the same window; a higher APE means bluer light.`,
    lightRows: lightSummaryRows(d, c),
  };
}

/**
 * A single spectrum that stops short of the lowest optimum gap's absorption
 * edge (docs/PHYSICS.md §11); an ensemble says so in its own summary.
 */
function lightCoverageWarnings(data: ReportData): string[] {
  const light = data.design.light;
  if (light.kind !== 'spectrum' || data.outcomes.length === 0) return [];
  const lowest = Math.min(...data.outcomes.flatMap((o) => o.search.result.best.gapsEv));
  return coverageWarnings(light.spectrum, lowest, 'list a spectrum in the design that reaches it');
}

function summaryJson(data: ReportData, version: string, generated: string): Record<string, unknown> {
  const d = data.design;
  return {
    light_warnings: lightCoverageWarnings(data),
    name: d.name,
    tool: `gapstack ${version}`,
    design_sha256: d.sha256,
    objective: data.outcomes[0]?.search.objective.label ?? 'efficiency',
    wirings: data.outcomes.map((o) => {
      const r = o.search.result;
      return {
        wiring: o.wiring.key,
        efficiency: r8(r.best.value),
        gaps_ev: r.best.gapsEv.map(r6),
        compositions: o.search.compositions.map((c) => ({ subcell: c.subcell + 1, family: c.family, compositions: c.compositions.map((x) => ({ x: r6(x.x), in_window: x.inWindow })), note: c.note })),
        tolerance: r.tolerance.intervals.map((t) => ({ subcell: t.subcell + 1, low_ev: r6(t.lowEv), high_ev: r6(t.highEv), open_low: t.openLow, open_high: t.openHigh })),
        threshold: r8(r.tolerance.threshold),
        stack_voc_v: o.detail.stackVocV === null ? null : r8(o.detail.stackVocV),
        stack_jsc_ma_cm2: o.detail.stackJscAm2 === null ? null : r8(toMaCm2(o.detail.stackJscAm2)),
        stack_ff: o.stackFf === null ? null : r8(o.stackFf),
        subcells: o.detail.subcells.map((c, i) => ({ subcell: i + 1, gap_ev: r6(c.gapEv), jgen_ma_cm2: r8(toMaCm2(c.jgenAm2)), jph_ma_cm2: r8(toMaCm2(c.jphAm2)), voc_v: r8(c.vocV), ff: r8(c.ff), v_op_v: r8(c.vOpV), j_op_ma_cm2: r8(toMaCm2(c.jOpAm2)) })),
        basins: r.basins.map((b) => ({ gaps_ev: b.gapsEv.map(r6), efficiency: r8(b.value) })),
        warnings: [...o.search.warnings, ...o.maps.flatMap((m) => m.warnings)],
        maps: o.maps.map((m) => ({ x_subcell: m.pair.xCell + 1, y_subcell: m.pair.yCell + 1, optimum: { x_ev: r6(m.optimum.x), y_ev: r6(m.optimum.y) } })),
      };
    }),
    ...(data.comparison
      ? { am15g_comparison: { ensemble: data.comparison.name, synthetic: data.comparison.synthetic, reference_spectrum: data.comparison.referenceSpectrum.name, wirings: data.comparison.wirings.map(wiringComparisonJson) } }
      : {}),
    assumptions: assumptionList(data),
    caution: CAUTION,
    generated,
  };
}

/** The Handlebars runtime (its declarations only re-export the full package's types). */
const Handlebars = HandlebarsRuntime as unknown as typeof import('handlebars');
let template: HandlebarsTemplateDelegate | undefined;

/**
 * The page template, precompiled at build time from templates/report.hbs
 * (scripts/compile-report-template.mjs, strict: a field the template names but
 * the context lacks is a bug, not an empty string); only the runtime loads here.
 */
function pageTemplate(): HandlebarsTemplateDelegate {
  template ??= Handlebars.create().template(precompiledPage);
  return template;
}

/** Colour scales given from outside, one per mapped gap pair ("x-y", 1-based), with the words naming who shares them. */
export interface SharedScales {
  byPair: Map<string, ColourDomain>;
  /** E.g. "every scenario and wiring". */
  sharedBy: string;
}

/** The key of a mapped gap pair in SharedScales ("1-2"). */
export const pairKey = (m: { pair: { xCell: number; yCell: number } }): string => `${m.pair.xCell + 1}-${m.pair.yCell + 1}`;

/** Build the report of a design: compute (or take `data` already computed), draw, format; `scales` sets maps' colour scales shared with other reports. */
/** How to build a report: its date, progress, precomputed data, shared colour scales, and a listener for each chart drawn. */
export interface BuildReportOptions {
  date: Date;
  stage?: StageReporter;
  data?: ReportData;
  scales?: SharedScales;
  /** Called with each chart as soon as it is drawn (the report command starts rasterising it then, on another thread). */
  onChart?: (chart: Chart) => void;
  /** The Sites section of a design that names several sites, computed above the report (src/sites/report-section.ts). */
  sites?: SitesSectionView;
}

/** A list of charts that tells `onChart` of each one added. */
function chartList(onChart?: (chart: Chart) => void): Chart[] {
  const charts: Chart[] = [];
  if (onChart) {
    charts.push = (...added: Chart[]) => {
      for (const c of added) onChart(c);
      return Array.prototype.push.apply(charts, added);
    };
  }
  return charts;
}

export function buildReport(design: Design, opts: BuildReportOptions): BuiltReport {
  const data = opts.data ?? computeReport(design, opts.stage);
  const version = toolVersion();
  const generated = generatedLine(opts.date);
  const charts = chartList(opts.onChart);
  // One colour scale per gap pair, shared by every wiring's map of it (or given, shared with other reports).
  const pairCount = Math.max(0, ...data.outcomes.map((o) => o.maps.length));
  const domains = Array.from({ length: pairCount }, (_, j) => {
    const ms = data.outcomes.flatMap((o) => (o.maps[j] ? [o.maps[j]] : []));
    return (ms[0] && opts.scales?.byPair.get(pairKey(ms[0]))) ?? sharedColourDomain(ms.map((m) => m.map));
  });
  const sharing = (j: number) => {
    const first = data.outcomes.find((o) => o.maps[j])?.maps[j];
    if (first && opts.scales?.byPair.has(pairKey(first))) return `the maps of this pair for ${opts.scales.sharedBy}`;
    const keys = data.outcomes.filter((o) => o.maps[j]).map((o) => wiringTitle(o.wiring.key).split(' (')[0].toLowerCase());
    return keys.length > 1 ? `the maps of this pair for every wiring (${keys.join(', ')})` : 'this map';
  };
  // 3T with independent loads equal to 4T is said once (in the verdict), not drawn twice.
  const twin = threeTerminalTwin(data.outcomes);
  const shown = data.outcomes.filter((o) => !twin || o !== twin.three);
  const maps = shown.flatMap((o) =>
    o.maps.map((m, j) => {
      const c = mapChart(data, o, m, domains[j]);
      charts.push(c.chart);
      const profile = m.profiled.length > 0 ? ` Subcells ${m.profiled.map((k) => k + 1).join(', ')} are re-optimised at every point (a profile map).` : '';
      const matching = m.matching ? ' The orange dashed curve is where the two mapped subcells generate equal photocurrent (series current matching).' : '';
      return {
        id: c.id,
        gridId: c.gridId,
        svg: c.chart.svg,
        gridJson: c.grid,
        heading: `${wiringTitle(o.wiring.key)}: subcells ${m.pair.xCell + 1} and ${m.pair.yCell + 1}`,
        caption:
          `${o.search.objective.label[0].toUpperCase()}${o.search.objective.label.slice(1)} over the gaps of subcells ${m.pair.xCell + 1} (x) and ${m.pair.yCell + 1} (y), ${fx(m.stepEv * 1000, 0)} meV grid, colour on a perceptually uniform scale with labelled isolines; ${colourScaleWords(domains[j], sharing(j))}.` +
          ` The marker is the recommended optimum (${pc(m.optimum.value)} at ${fx(m.optimum.x, 3)} / ${fx(m.optimum.y, 3)} eV); the white dashed outline encloses gaps within ${fx(design.loss * 100, 1)} % (relative) of it.${matching}` +
          ` Dashed outlines with hatched edges are practical windows of bound material families (colours inside are not altered), solid lines fixed absorbers; light grey marks gaps out of order.${profile}`,
      };
    }),
  );
  const details = shown.map((o) => {
    const c = detailCharts(data, o);
    charts.push(c.spectrum, c.jv, c.sensitivity);
    const res = o.search.result;
    const notes = [...o.search.warnings, ...o.maps.flatMap((m) => m.warnings)];
    const edge = edgeSentence(design, o);
    if (edge) notes.push(edge);
    else if (o.search.unconstrained) notes.push(`Without the material windows the best is ${pc(o.search.unconstrained.best.value)} at ${o.search.unconstrained.best.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV.`);
    if (o.bestSpec.coupling.model !== 'none') notes.push('J–V curves use the photocurrents at the operating point, luminescent coupling included.');
    return {
      slug: o.wiring.slug,
      title: wiringTitle(o.wiring.key),
      table: subcellTable(data, o),
      notes,
      objective: o.search.objective.label,
      basins: res.basins.slice(0, 5).map((b) => ({ gaps: b.gapsEv.map((g) => fx(g, 4)).join(' / '), value: pc(b.value, 3) })),
      spectrumSvg: c.spectrum.svg,
      spectrumCaption: `${design.reference.spectrum.name}: each subcell absorbs the photons between its gap and the gap above (step absorbers; a partly transparent top cell passes part of its band down).`,
      jvSvg: c.jv.svg,
      jvCaption: `Each subcell's J–V curve at its photocurrent in the stack${o.jv.stack ? ', the series terminal curve (voltages added at a common current) and its maximum power point' : ''}; dots are the subcells' operating points.`,
      sensitivitySvg: c.sensitivity.svg,
      sensitivityCaption: `One gap moved at a time, the others held at the optimum (${res.best.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV); the dotted line is the tolerance threshold ${pc(res.tolerance.threshold)}.${o.sensitivity.some((x) => x.windowEv) ? " Offsets outside a subcell's practical window (or allowed range) are tinted in its colour and its curve is faded there: those gaps are not on offer." : ''}`,
    };
  });
  const comparison = comparisonSection(data, charts);
  const light = design.light;
  const site = light.kind === 'ensemble' && light.site && data.outcomes.length > 0 ? siteSection(light.site, data.outcomes[0].bestSpec, wiringTitle(data.outcomes[0].wiring.key)) : null;
  if (site) charts.push(...site.charts);
  const sites = opts.sites ?? null;
  if (sites) charts.push(...sites.charts);
  const warnings = [...(design.light.kind === 'ensemble' ? design.light.warnings : []), ...lightCoverageWarnings(data), ...data.outcomes.flatMap((o) => o.search.warnings.map((w) => `${wiringTitle(o.wiring.key).split(' (')[0]}: ${w}`))];
  const html = pageTemplate()({
    version,
    title: design.name,
    question: questionText(design),
    description: design.description.trim(),
    verdict: verdict(data),
    edgeNotes: edgeNotes(data),
    columns: data.outcomes.map((o) => ({ key: o.wiring.key, title: wiringTitle(o.wiring.key) })),
    rows: answerRows(data),
    warnings,
    caution: CAUTION,
    maps,
    comparison,
    sites: sites ? { heading: sites.heading, intro: sites.intro, table: sites.table, maps: sites.maps, reading: sites.reading, assumptions: sites.assumptions } : null,
    site: site ? { heading: site.heading, lines: site.lines, monthlySvg: site.monthlySvg, monthlyCaption: site.monthlyCaption, apeSvg: site.apeSvg, apeCaption: site.apeCaption, assumptions: light.kind === 'ensemble' && light.site ? light.site.assumptions : [] } : null,
    details,
    assumptions: assumptionList(data),
    provenance: provenanceList(design, version),
    generated,
  });
  // Every figure file carries a metadata block, also from sections that did not set their own.
  const withMeta = charts.map((c) => (c.meta ? c : { ...c, meta: figureMeta(data, null, { see: 'the column names and the JSON fields' }) }));
  const summary = summaryJson(data, version, generated);
  if (site) summary.site = site.summary;
  if (sites) summary.sites = sites.summary;
  return { html, charts: withMeta, summary, data };
}
