/**
 * `gapstack report <design>`: answer a design file's question as one
 * self-contained HTML page (inline CSS and SVG, no network), and on request a
 * folder of standalone figures (SVG, PNG) with the data behind them (CSV,
 * JSON). Everything is built in memory first, then the page and its figures
 * are published together (src/io/publish.ts), so a failing or interrupted
 * report leaves existing outputs untouched.
 *
 * The report modules (d3-node, resvg, handlebars) load only here.
 */
import { join, resolve } from 'node:path';
import { UserError } from '../errors.js';
import { assertNoInputInside, assertNotAnInput, forgetInputs } from '../io/inputs.js';
import { publishReport } from '../io/publish.js';
import { CAUTION } from '../report/assumptions.js';
import { finiteJson } from './guards.js';
import { startStagedProgress } from './progress.js';
import { clockSeconds } from '../io/clock.js';

export interface ReportArgs {
  /** Design file (YAML or JSON). */
  design: string;
  /** Output HTML file (default report.html). */
  output?: string;
  /** Folder for standalone figures and their data. */
  figures?: string;
  /** Return a JSON summary instead of text. */
  json?: boolean;
  /** Rows of a batch already run over the design's sites (merged part, .csv or .jsonl), instead of running it again. */
  sitesRows?: string;
  /** Run a design's batch over sites even when the size check estimates hours of work per site. */
  acceptLarge?: boolean;
}

/**
 * The date a report states: SOURCE_DATE_EPOCH [s] when set (reproducible
 * builds convention), else now.
 */
export function reportDate(env: NodeJS.ProcessEnv = process.env): Date {
  const s = env.SOURCE_DATE_EPOCH;
  if (s !== undefined && s.trim() !== '') {
    const t = Number(s);
    if (!Number.isFinite(t) || t < 0) throw new UserError(`SOURCE_DATE_EPOCH must be a whole number of seconds since 1970, got "${s}"`);
    return new Date(Math.floor(t) * 1000);
  }
  return new Date();
}

export async function reportCommand(a: ReportArgs): Promise<string> {
  if (typeof a.design !== 'string' || a.design === '') throw new UserError('name a design file, e.g. gapstack report examples/perovskite-silicon.yaml -o report.html');
  const output = a.output ?? 'report.html';
  if (!/\.html?$/i.test(output)) throw new UserError(`-o/--output must end in .html, got "${output}"`);
  const t0 = clockSeconds();
  forgetInputs();
  const { loadScenarioSet } = await import('../design/index.js');
  const set = await loadScenarioSet(a.design);
  // The design and every file it names are read now: refuse an output that would replace one, before the work.
  assertNotAnInput(output, '-o/--output');
  if (a.figures !== undefined) assertNoInputInside(a.figures, '--figures');
  const { reportStageCount } = await import('../report/compute.js');
  // Long work shows where it is on a terminal: each scenario's and wiring's search and map, then the figures.
  const sitesDesign = !set.named && set.scenarios[0]?.sites ? set.scenarios[0] : null;
  if (a.sitesRows !== undefined && !sitesDesign) throw new UserError(`--sites-rows needs a design that names its sites (sites: in ${a.design})`);
  if (sitesDesign && a.sitesRows === undefined) (await import('./sites-command.js')).checkSiteBatchSize(sitesDesign, "report's batch over sites (per site)", Boolean(a.acceptLarge));
  const stageCount = set.scenarios.reduce((n, d) => n + reportStageCount(d), 0) + (sitesDesign && a.sitesRows === undefined ? 1 : 0) + (a.figures !== undefined ? 1 : 0);
  const bar = a.json ? null : await startStagedProgress('report', stageCount);
  const stage = bar ? (name: string) => bar.stage(name) : undefined;
  let built: { html: string; charts: import('../report/build.js').Chart[]; summary: Record<string, unknown> };
  let outcomes: { label: string; o: import('../report/outcomes.js').WiringOutcome }[];
  let files: { name: string; data: string | Uint8Array }[] = [];
  try {
    // With figures, each chart's PNG starts rendering on the thread pool as soon as it is drawn.
    const figures = a.figures !== undefined ? await import('../report/figures.js') : undefined;
    figures?.preparePngWorker();
    const onChart = figures ? (c: { svg: string }) => figures.startPng(c.svg) : undefined;
    if (set.named) {
      // Several scenarios: one comparison table first, then each scenario's own sections.
      const { buildScenarioReport } = await import('../report/scenarios.js');
      const r = buildScenarioReport(set, { date: reportDate(), stage, onChart });
      built = r;
      outcomes = r.built.flatMap((b, k) => b.data.outcomes.map((o) => ({ label: `${set.scenarios[k].name}, ${o.wiring.key}`, o })));
    } else if (sitesDesign) {
      // Several sites: the answer under AM1.5G, then the batch over the sites in-process (the engine of gapstack sites), then the page.
      const { buildSitesReport } = await import('../sites/report-section.js');
      const r = await buildSitesReport(sitesDesign, { date: reportDate(), stage, onChart, rowsFile: a.sitesRows });
      built = r;
      outcomes = r.data.outcomes.map((o) => ({ label: o.wiring.key, o }));
    } else {
      const { buildReport } = await import('../report/build.js');
      const r = buildReport(set.scenarios[0], { date: reportDate(), stage, onChart });
      built = r;
      outcomes = r.data.outcomes.map((o) => ({ label: o.wiring.key, o }));
    }
    if (figures) {
      bar?.stage('figures')(0);
      files = await figures.figureFilesAsync(built.charts, built.summary);
    }
  } finally {
    bar?.stop();
  }
  // Every byte exists in memory now: publish the page and its figures together, or nothing.
  publishReport(output, built.html, a.figures !== undefined ? { folder: a.figures, files } : undefined);
  const written = [output, ...files.map((f) => join(a.figures as string, f.name))];
  const seconds = clockSeconds() - t0;
  if (a.json) {
    return finiteJson(
      {
        report: resolve(output),
        figures: a.figures === undefined ? null : resolve(a.figures),
        files: written.length,
        seconds: Number(seconds.toFixed(3)),
        ...built.summary,
      },
      null,
      2,
    );
  }
  const lines = [
    `Wrote ${output}${a.figures !== undefined ? ` and ${files.length} files in ${a.figures}` : ''} (${seconds.toFixed(2)} s).`,
    ...outcomes.map(({ label, o }) => `  ${label}: ${(o.search.result.best.value * 100).toFixed(3)} % at ${o.search.result.best.gapsEv.map((g) => g.toFixed(4)).join(' / ')} eV`),
    ...(built.summary.sites ? [`  sites: ${(built.summary.sites as { rows: unknown[] }).rows.length} rows in the Sites section (and in summary.json with --figures)`] : []),
    ...outcomes.flatMap(({ label, o }) => o.search.warnings.map((w) => `Warning (${label}): ${w}`)),
    ...((built.summary.light_warnings as string[] | undefined) ?? []).map((w) => `Warning: ${w}`),
    CAUTION,
  ];
  return lines.join('\n');
}
