/**
 * A report as a string, for library callers: read a design, compute, render.
 * The page builder (templating, charts) loads only when a report is asked for,
 * so importing the library stays light.
 */
import type { ReportData } from './compute.js';

/** A built report: the self-contained HTML page and the machine-readable answer behind it. */
export interface ReportOutput {
  /** The page, one self-contained HTML document (charts inline as SVG). */
  html: string;
  /** The answer as plain data (what `report --json` prints). */
  summary: Record<string, unknown>;
  /** Every number the page shows. */
  data: ReportData;
}

/**
 * Build the report of a design file (YAML or JSON; paths inside it are relative to it).
 * @param path design file
 * @param opts.date the date printed on the page (default now)
 */
export async function buildReportFromFile(path: string, opts: { date?: Date } = {}): Promise<ReportOutput> {
  const { loadDesign } = await import('../design/index.js');
  return render(await loadDesign(path), opts.date);
}

/**
 * The same from design text already in memory.
 * @param path names the design in messages and anchors relative paths in it
 * @param text the design (YAML or JSON)
 */
export async function buildReportFromText(path: string, text: string, opts: { date?: Date } = {}): Promise<ReportOutput> {
  const { loadDesignText } = await import('../design/index.js');
  return render(await loadDesignText(path, text), opts.date);
}

async function render(design: Awaited<ReturnType<typeof import('../design/index.js').loadDesign>>, date = new Date()): Promise<ReportOutput> {
  const { buildReport } = await import('./build.js');
  const built = buildReport(design, { date });
  return { html: built.html, summary: built.summary, data: built.data };
}
