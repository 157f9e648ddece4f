/**
 * A report as a string, for library callers, including the Sites section of
 * a design that names several sites (which needs the batch over sites, a
 * layer above the report). Other designs go to the report's own builder.
 * Everything heavy loads only when a report is asked for.
 */
import type { ReportOutput } from '../report/from-design.js';

export type { ReportOutput } from '../report/from-design.js';

type Loaded = Awaited<ReturnType<typeof import('../design/index.js').loadDesign>>;

async function render(design: Loaded, date = new Date()): Promise<ReportOutput> {
  if (design.sites) {
    const { buildSitesReport } = await import('./report-section.js');
    const built = await buildSitesReport(design, { date });
    return { html: built.html, summary: built.summary, data: built.data };
  }
  const { buildReport } = await import('../report/build.js');
  const built = buildReport(design, { date });
  return { html: built.html, summary: built.summary, data: built.data };
}

/**
 * Build the report of a design file (YAML or JSON; paths inside it are relative to it).
 * A design with `sites:` runs the question at every site (seconds per site) for its Sites section.
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
