/**
 * `gapstack report <design>`: answer a design file's question as one
 * self-contained HTML page (inline CSS and SVG, no network), and on request a
 * folder of standalone figures (SVG, PNG) with the data behind them (CSV,
 * JSON). Everything is built in memory first and each file is written
 * atomically, so a failing report leaves existing outputs untouched.
 *
 * The report modules (d3-node, resvg, handlebars) load only here.
 */
import { mkdirSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { UserError } from '../errors.js';
import { writeFileAtomic } from '../io/atomic-write.js';
import { CAUTION } from '../report/assumptions.js';

export interface ReportArgs {
  /** Design file (YAML or JSON). */
  design: string;
  /** Output HTML file (default report.html). */
  output?: string;
  /** Folder for standalone figures and their data. */
  figures?: string;
  /** Return a JSON summary instead of text. */
  json?: boolean;
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

/** A folder that exists (created if missing) and is a folder, or a UserError naming the option. */
function preflight(dir: string, option: string): void {
  try {
    mkdirSync(dir, { recursive: true });
  } catch (err) {
    throw new UserError(`${option}: cannot create the folder ${dir} (${(err as NodeJS.ErrnoException).code ?? 'error'}); nothing was written`);
  }
  if (!statSync(dir).isDirectory()) throw new UserError(`${option}: ${dir} is not a folder; nothing was written`);
}

export async function reportCommand(a: ReportArgs): Promise<string> {
  if (typeof a.design !== 'string' || a.design === '') throw new UserError('name a design file, e.g. gapstack report examples/perovskite-silicon.yaml -o report.html');
  const output = a.output ?? 'report.html';
  if (!/\.html?$/i.test(output)) throw new UserError(`-o/--output must end in .html, got "${output}"`);
  const t0 = performance.now();
  const { loadScenarioSet } = await import('../design/index.js');
  const set = await loadScenarioSet(a.design);
  let built: { html: string; charts: import('../report/build.js').Chart[]; summary: Record<string, unknown> };
  let outcomes: { label: string; o: import('../report/outcomes.js').WiringOutcome }[];
  if (set.named) {
    // Several scenarios: one comparison table first, then each scenario's own sections.
    const { buildScenarioReport } = await import('../report/scenarios.js');
    const r = buildScenarioReport(set, { date: reportDate() });
    built = r;
    outcomes = r.built.flatMap((b, k) => b.data.outcomes.map((o) => ({ label: `${set.scenarios[k].name}, ${o.wiring.key}`, o })));
  } else {
    const { buildReport } = await import('../report/build.js');
    const r = buildReport(set.scenarios[0], { date: reportDate() });
    built = r;
    outcomes = r.data.outcomes.map((o) => ({ label: o.wiring.key, o }));
  }
  let files: { name: string; data: string | Uint8Array }[] = [];
  if (a.figures !== undefined) {
    const { figureFiles } = await import('../report/figures.js');
    files = figureFiles(built.charts, built.summary);
  }
  // Every byte exists in memory now. Make sure both folders can take files before writing any.
  preflight(dirname(resolve(output)), '-o/--output');
  if (a.figures !== undefined) preflight(resolve(a.figures), '--figures');
  const written: string[] = [];
  writeFileAtomic(output, built.html);
  written.push(output);
  for (const f of files) {
    const p = join(a.figures as string, f.name);
    writeFileAtomic(p, f.data);
    written.push(p);
  }
  const seconds = (performance.now() - t0) / 1000;
  if (a.json) {
    return JSON.stringify(
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
    ...outcomes.flatMap(({ label, o }) => o.search.warnings.map((w) => `Warning (${label}): ${w}`)),
    CAUTION,
  ];
  return lines.join('\n');
}
