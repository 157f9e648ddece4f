/**
 * What the report's Sites section shows, as the page template reads it. The
 * section is computed above the report (the batch over sites, src/sites/,
 * runs the question at every site and draws the map); the page only places it.
 */
import type { Chart } from './figure-data.js';

/** A header cell spanning several columns (one wiring's columns). */
export interface ColumnGroup {
  title: string;
  span: number;
}

export interface SitesSectionView {
  heading: string;
  /** What the rows are and how they were asked. */
  intro: string[];
  table: { groups: ColumnGroup[]; head: string[]; rows: string[][] };
  /** Site maps, each with its own colour bar and caption. */
  maps: { id: string; svg: string; caption: string }[];
  /** The rows in plain words: where the optimum moves most, the largest gains and losses. */
  reading: string[];
  /** The assumptions of the site light, as the single-site section states them. */
  assumptions: string[];
  /** Figures for the figures folder (the map, with its data and metadata block). */
  charts: Chart[];
  /** summary.json's `sites`: the rows as the batch writes them, with their identity. */
  summary: Record<string, unknown>;
}
