/**
 * From a batch's rows to the points of a site map: which column colours the
 * dots, in which unit, and the derived columns people ask for (the optimal top
 * gap, the 2T loss of the AM1.5G design, the 4T-over-2T yield gain).
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { extname } from 'node:path';
import { UserError } from '../errors.js';
import type { SiteMapPoint } from './site-map.js';

/** A row as read back from a part (JSON Lines values, or CSV text converted). */
export type SiteRow = Record<string, unknown>;

export interface MapColumn {
  /** Legend label with unit. */
  label: string;
  value: (row: SiteRow) => number | null;
}

/** Named colourings; any numeric column name also works. */
export const MAP_COLOURINGS = ['top-gap', '2t-loss', '4t-gain'] as const;

const numberOf = (x: unknown): number | null => {
  const n = typeof x === 'number' ? x : typeof x === 'string' && x.trim() !== '' ? Number(x) : NaN;
  return Number.isFinite(n) ? n : null;
};

const gapsOf = (x: unknown): number[] => (Array.isArray(x) ? x.map(Number) : typeof x === 'string' ? x.split(';').map(Number) : []);

/** The colouring a user named: a named one or a numeric column of the rows. */
export function mapColumn(name: string, columns: readonly string[], wiring?: string): MapColumn {
  const prefixes = columns.filter((c) => c.endsWith('_gaps_ev')).map((c) => c.slice(0, -'_gaps_ev'.length));
  const need = (c: string) => {
    if (!columns.includes(c)) throw new UserError(`--colour ${name} needs the column ${c}, which these rows lack (columns: ${columns.join(', ')})`);
  };
  if (name === 'top-gap') {
    const w = wiring ?? prefixes[0];
    if (w === undefined) throw new UserError('these rows hold no gaps to colour by');
    need(`${w}_gaps_ev`);
    return { label: `${w.toUpperCase()} site-optimal top gap [eV]`, value: (r) => numberOf(gapsOf(r[`${w}_gaps_ev`])[0]) };
  }
  if (name === '2t-loss') {
    need('2t_am15g_loss_pct');
    return { label: '2T loss of the AM1.5G design [%]', value: (r) => numberOf(r['2t_am15g_loss_pct']) };
  }
  if (name === '4t-gain') {
    need('2t_yield_kwh_m2');
    need('4t_yield_kwh_m2');
    return {
      label: '4T over 2T yield gain [%]',
      value: (r) => {
        const a = numberOf(r['2t_yield_kwh_m2']);
        const b = numberOf(r['4t_yield_kwh_m2']);
        return a === null || b === null || a <= 0 ? null : ((b - a) / a) * 100;
      },
    };
  }
  if (!columns.includes(name) || ['site_key', 'file', 'site'].includes(name) || name.endsWith('_gaps_ev')) {
    throw new UserError(`--colour must be ${MAP_COLOURINGS.join(', ')} or a numeric column (${columns.filter((c) => !['site_key', 'file', 'site'].includes(c) && !c.endsWith('_gaps_ev')).join(', ')}), got "${name}"`);
  }
  const unit = /_pct$/.test(name) ? ' [%]' : /_kwh_m2$/.test(name) ? ' [kWh/m²]' : /_deg$/.test(name) ? ' [°]' : '';
  return { label: `${name.replace(/_(pct|kwh_m2|deg)$/, '').replace(/_/g, ' ')}${unit}`, value: (r) => numberOf(r[name]) };
}

export interface RowsFile {
  columns: string[];
  questionSha256: string;
  version: string;
  rows: SiteRow[];
}

/** Rows of a part or merged file (.jsonl or .csv), for drawing (a map holds every site anyway). */
export function readRowsFile(path: string): RowsFile {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new UserError(`${path}: cannot read the rows file`);
  }
  const ext = extname(path).toLowerCase();
  if (ext === '.jsonl' || ext === '.json') {
    const lines = text.split('\n').filter((l) => l.trim() !== '');
    let head: Record<string, unknown>;
    try {
      head = JSON.parse(lines[0] ?? '');
    } catch {
      throw new UserError(`${path}:1: not a gapstack sites file`);
    }
    if (!Array.isArray(head.columns)) throw new UserError(`${path}:1: not a gapstack sites file`);
    return { columns: head.columns as string[], questionSha256: String(head.question_sha256), version: String(head.gapstack_version), rows: lines.slice(1).map((l) => JSON.parse(l) as SiteRow) };
  }
  if (ext === '.csv') {
    const require = createRequire(import.meta.url);
    const { parse } = require('csv-parse/sync') as typeof import('csv-parse/sync');
    const meta = Object.fromEntries(text.split('\n').filter((l) => l.startsWith('# ')).map((l) => { const i = l.indexOf(': '); return [l.slice(2, i), l.slice(i + 2)]; }));
    const records = parse(text, { comment: '#', comment_no_infix: true, columns: true, skip_empty_lines: true }) as SiteRow[];
    const columns = text.split('\n').find((l) => l !== '' && !l.startsWith('#'))?.split(',') ?? [];
    return { columns, questionSha256: String(meta.question_sha256), version: String(meta.gapstack_version), rows: records };
  }
  throw new UserError(`${path}: a sites rows file ends in .csv or .jsonl`);
}

/** Map points of the rows under a colouring. */
export function mapPoints(rows: readonly SiteRow[], column: MapColumn): SiteMapPoint[] {
  return rows.map((r) => ({ site: String(r.site ?? ''), latDeg: numberOf(r.lat_deg) ?? NaN, lonDeg: numberOf(r.lon_deg) ?? NaN, value: column.value(r) }));
}
