/**
 * What a report gives library callers. The builders (`buildReportFromFile`,
 * `buildReportFromText`) live in src/sites/report-from-design.ts, a layer up,
 * because a design that names several sites needs the batch over sites for
 * its Sites section.
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
