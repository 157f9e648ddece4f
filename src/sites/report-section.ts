/**
 * The report's Sites section for a design that names several sites
 * (`sites:` in the design file): the batch over sites run in-process (the same
 * question, engine and part files as `gapstack sites`, written to a temporary
 * folder and read back), then the site table, the site map, a plain reading
 * of the rows and the assumptions of the site light.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { constraintRangeEv, type Design, type DesignSites } from '../design/index.js';
import { UserError } from '../errors.js';
import { noteInput } from '../io/inputs.js';
import { discardTemp, trackTemp } from '../io/temp-files.js';
import { toolVersion } from '../io/version.js';
import { FAIMAN_DEFAULT } from '../light/atmosphere.js';
import { hourlyModelAssumptions, SITE_DEFAULTS } from '../light/site-year.js';
import { CAUTION } from '../report/assumptions.js';
import type { BuiltReport } from '../report/build.js';
import type { StageReporter } from '../report/compute.js';
import type { Chart, FigureMeta } from '../report/figure-data.js';
import type { SitesSectionView } from '../report/sites-view.js';
import { fx, wiringTitle } from '../report/view.js';
import { mapColumn, mapPoints, readRowsFile, type SiteRow } from './map-data.js';
import { columnsFor, CSV_HEADER_LINES, parseCsvHeader, parseJsonHeader, sitesSha256 } from './parts.js';
import type { BatchPlane } from './plane.js';
import { siteQuestion, wiringPrefix, type SiteLightSource } from './question.js';
import { identifySites, runSites, type SiteQuestion } from './run.js';
import { shardLabel, WHOLE } from './shard.js';
import { siteColourDomain, siteMapSvg, type SiteColourDomain } from './site-map.js';
import { siteLightHashOptions, weatherSiteLight } from './weather-light.js';

/** The batch's rows of a design's sites, as `gapstack sites` writes them (JSON Lines values). */
export interface DesignSitesRows {
  /** Column names of the rows, in order. */
  columns: string[];
  questionSha256: string;
  /** SHA-256 (hex) of the sorted site keys. */
  sitesSha256: string;
  version: string;
  /** One row per site, in the batch's order (ascending SHA-256 of the weather file). */
  rows: SiteRow[];
  /** Files skipped because their bytes equal another listed file's. */
  duplicates: string[];
  /** The rows file they were read from, when the batch ran before the report (--sites-rows). */
  source?: string;
}

function sitesOf(design: Design): DesignSites {
  if (!design.sites) throw new UserError(`${design.path}: names no sites (add sites: with files, tilt and azimuth)`);
  return design.sites;
}

/** The question `gapstack sites DESIGN FILES --tilt --azimuth …` asks, from the design's own `sites:` (same hash). */
export function designSitesQuestion(design: Design, lightOf?: SiteLightSource): SiteQuestion {
  const s = sitesOf(design);
  return siteQuestion(design, lightOf ?? weatherSiteLight(s.plane, s.model), siteLightHashOptions(s.plane, s.model));
}

/**
 * Run the batch over the design's sites in a temporary folder (removed
 * afterwards, also on Ctrl-C) and read its rows back.
 * @param onProgress called after every site with the fraction done (0–1)
 */
export async function runDesignSites(design: Design, onProgress?: (fraction: number) => void, lightOf?: SiteLightSource): Promise<DesignSitesRows> {
  const s = sitesOf(design);
  const dir = mkdtempSync(join(tmpdir(), 'gapstack-report-sites-'));
  trackTemp(dir);
  try {
    const run = await runSites({
      files: s.files,
      outDir: dir,
      shard: WHOLE,
      question: designSitesQuestion(design, lightOf),
      version: toolVersion(),
      onProgress: onProgress ? (done, total) => onProgress(total === 0 ? 1 : done / total) : undefined,
    });
    const file = readRowsFile(run.jsonlPath);
    const keys = file.rows.map((r) => String(r.site_key));
    return { columns: file.columns, questionSha256: file.questionSha256, sitesSha256: sitesSha256(keys), version: file.version, rows: file.rows, duplicates: run.duplicates };
  } finally {
    discardTemp(dir);
  }
}

/** A CSV row's text values as the JSON Lines rows hold them: numbers as numbers, gaps as lists, site names as text. */
function typedRow(r: SiteRow): SiteRow {
  const out: SiteRow = {};
  for (const [k, v] of Object.entries(r)) {
    const text = String(v ?? '');
    if (k === 'site_key' || k === 'file' || k === 'site') out[k] = text;
    else if (k.endsWith('_gaps_ev')) out[k] = text === '' ? [] : text.split(';').map(Number);
    else out[k] = text === '' ? null : Number(text);
  }
  return out;
}

/**
 * The rows of a batch already run (`gapstack sites`, merged when sharded),
 * checked to answer this design's question over its own weather files with
 * this gapstack version, so the Sites section can use them as they are.
 */
export function designSitesRowsFromFile(design: Design, path: string): DesignSitesRows {
  const s = sitesOf(design);
  const question = designSitesQuestion(design);
  const file = readRowsFile(path);
  const lines = readFileSync(path, 'utf8').split('\n');
  const id = /\.csv$/i.test(path) ? parseCsvHeader(lines.slice(0, CSV_HEADER_LINES), path) : parseJsonHeader(lines[0] ?? '', path);
  if (id.shard.count !== 1) throw new UserError(`${path}: holds shard ${shardLabel(id.shard)} of a batch; merge every shard first (gapstack sites merge) and give the merged file`);
  if (id.version !== toolVersion()) throw new UserError(`${path}: computed by gapstack ${id.version}, this is ${toolVersion()}; rerun the batch or leave out --sites-rows`);
  if (id.questionSha256 !== question.questionSha256) {
    throw new UserError(`${path}: rows of another question (question SHA-256 ${id.questionSha256.slice(0, 12)}…, this design's ${question.questionSha256.slice(0, 12)}…): the design, its plane or its light model differ; rerun gapstack sites with this design or leave out --sites-rows`);
  }
  const { sites, duplicates } = identifySites(s.files);
  if (id.sitesSha256 !== sitesSha256(sites.map((x) => x.key))) throw new UserError(`${path}: rows of other weather files (${id.sitesTotal} sites) than this design names (${sites.length} sites)`);
  if (file.rows.length !== id.shardSites) throw new UserError(`${path}: unfinished, ${file.rows.length} of ${id.shardSites} rows; let the batch finish (a rerun resumes)`);
  if (id.columns.join(',') !== columnsFor(question.wirings).join(',')) throw new UserError(`${path}: columns differ from this design's wirings`);
  noteInput(path);
  const rows = /\.csv$/i.test(path) ? file.rows.map(typedRow) : file.rows;
  return { columns: id.columns, questionSha256: id.questionSha256, sitesSha256: id.sitesSha256, version: id.version, rows, duplicates, source: path };
}

/** The plane in words: "fixed plane tilted 30°, facing azimuth 180° (east of north)". */
export function planeWords(plane: BatchPlane, s: DesignSites): string {
  if (s.model.tracking === 'single-axis') {
    const axis = plane.azimuth === 'equator' ? 'along the equator-facing direction of each site' : `at azimuth ${plane.azimuth}° (east of north)`;
    return `single-axis tracker, horizontal axis ${axis}, rotation ±${s.model.maxRotationDeg ?? SITE_DEFAULTS.maxRotationDeg}°, no backtracking`;
  }
  const tilt = plane.tilt === 'latitude' ? "tilted at each site's latitude" : `tilted ${plane.tilt}°`;
  const facing = plane.azimuth === 'equator' ? 'facing the equator (south in the northern hemisphere, north in the southern)' : `facing azimuth ${plane.azimuth}° (east of north, 180° = south)`;
  return `fixed plane ${tilt}, ${facing}`;
}

/** The light-model lines that hold at every site: the plane, the hourly model, and where each input comes from. */
export function sitesLightAssumptions(design: Design): string[] {
  const s = sitesOf(design);
  const m = s.model;
  const given = (v: number | undefined, what: string, otherwise: string) => (v !== undefined ? `${what} ${v} (given) at every site and hour` : otherwise);
  return [
    `plane: ${planeWords(s.plane, s)}`,
    ...hourlyModelAssumptions(m.faiman ?? FAIMAN_DEFAULT),
    [
      given(m.aod500, 'τ500', `τ500 from each file's aerosol optical depth where it has one, else ${SITE_DEFAULTS.aod500}`),
      given(m.waterCm, 'precipitable water [cm]', `precipitable water from each file where it has it, else from air temperature and dew point (Gueymard, Sol. Energy 53 (1994) 57), else ${SITE_DEFAULTS.waterCm} cm`),
      given(m.albedo, 'albedo', `albedo from each file where it has one, else ${SITE_DEFAULTS.albedo}`),
      m.ozoneAtmCm !== undefined ? `ozone ${m.ozoneAtmCm} atm-cm (given)` : `ozone ${SITE_DEFAULTS.ozoneAtmCm} atm-cm (default; weather files carry none)`,
      'pressure from each file, else the ISO 2533 standard atmosphere at its elevation',
    ].join('; '),
    `site-optimal gaps: the design's own search (span ${design.spanEv[0]}–${design.spanEv[1]} eV, its constraints) maximising the yield-weighted efficiency Σ w·P_max / Σ w·P_in over the site's daylight hours; gaps of material-bound subcells are stated at 300 K and move with each hour's cell temperature`,
    `AM1.5G-optimal design: the same search under ASTM G173-03 global tilt at ${design.tempK} K (the answer at the top of this report), valued under each site's hours; its loss is 1 − its yield over the site optimum's yield`,
  ];
}

const num = (x: unknown): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);
const gapsOf = (x: unknown): number[] => (Array.isArray(x) ? x.map(Number) : []);
/** The batch's own decimals (src/sites/parts.ts), so a cell reads as the part file does. */
const cell = (x: unknown, digits: number): string => {
  const v = num(x);
  return v === null ? '–' : v.toFixed(digits);
};
const signedMev = (ev: number): string => `${ev >= 0 ? '+' : '−'}${Math.abs(ev * 1000).toFixed(0)} meV`;

/** A wiring's short name for sentences: "2T", "4T", "3T", or its key. */
function shortName(key: string): string {
  const short: Record<string, string> = { series: '2T', independent: '4T', '3t': '3T' };
  return short[key] ?? wiringTitle(key);
}

/** The rows in plain words: where each wiring's top gap moves most, where the AM1.5G design loses most, and 4T over 2T. */
export function sitesReading(design: Design, rows: readonly SiteRow[], am15gGapsEv: readonly (readonly number[])[]): string[] {
  const out: string[] = [];
  if (rows.length === 0) return ['No site was answered.'];
  const name = (r: SiteRow) => String(r.site);
  design.wirings.forEach((w, k) => {
    const p = wiringPrefix(w);
    const who = shortName(w.key);
    const ref = am15gGapsEv[k]?.[0];
    const tops = rows.map((r) => ({ r, top: gapsOf(r[`${p}_gaps_ev`])[0] })).filter((t) => t.top !== undefined && Number.isFinite(t.top)) as { r: SiteRow; top: number }[];
    if (tops.length > 0 && ref !== undefined) {
      const far = tops.reduce((a, b) => (Math.abs(b.top - ref) > Math.abs(a.top - ref) ? b : a));
      const lo = Math.min(...tops.map((t) => t.top));
      const hi = Math.max(...tops.map((t) => t.top));
      // A top gap held by the end of its allowed range is named as such: the optimum there may lie beyond it.
      const [rlo, rhi] = constraintRangeEv(design.subcells[0]!.constraint, design.tempK, design.spanEv);
      const held = tops.filter((t) => rlo < rhi && (Math.abs(t.top - rlo) < 5e-4 || Math.abs(t.top - rhi) < 5e-4)).map((t) => name(t.r));
      const edge = held.length > 0 ? ` At ${held.join('; ')} it sits on an end of its allowed range (${fx(rlo, 3)}–${fx(rhi, 3)} eV): the optimum there may lie beyond it.` : '';
      if (Math.abs(far.top - ref) < 0.0005) out.push(`${who}: the site-optimal top gap stays at the AM1.5G optimum, ${fx(ref, 3)} eV, at every site.`);
      else
        out.push(
          `${who}: the site-optimal top gap moves most at ${name(far.r)}, ${fx(far.top, 3)} eV against ${fx(ref, 3)} eV under AM1.5G (${signedMev(far.top - ref)}); across the ${rows.length} sites it lies within ${fx(lo, 3)}–${fx(hi, 3)} eV.${edge}`,
        );
    }
    const losses = rows.map((r) => ({ r, loss: num(r[`${p}_am15g_loss_pct`]) })).filter((x): x is { r: SiteRow; loss: number } => x.loss !== null);
    if (losses.length > 0) {
      const most = losses.reduce((a, b) => (b.loss > a.loss ? b : a));
      const least = losses.reduce((a, b) => (b.loss < a.loss ? b : a));
      out.push(
        most.loss < 0.01
          ? `${who}: the AM1.5G design yields within 0.01 % of each site's optimum: no difference at this resolution.`
          : `${who}: the AM1.5G design loses most at ${name(most.r)}, ${most.loss.toFixed(2)} % of the site optimum's annual yield${losses.length > 1 ? `; least at ${name(least.r)}, ${least.loss.toFixed(2)} %` : ''}.`,
      );
    }
  });
  const prefixes = design.wirings.map(wiringPrefix);
  if (prefixes.includes('2t') && prefixes.includes('4t')) {
    const gains = rows
      .map((r) => {
        const a = num(r['2t_yield_kwh_m2']);
        const b = num(r['4t_yield_kwh_m2']);
        return a !== null && b !== null && a > 0 ? { r, a, b, gain: ((b - a) / a) * 100 } : null;
      })
      .filter((g): g is { r: SiteRow; a: number; b: number; gain: number } => g !== null);
    if (gains.length > 0) {
      const best = gains.reduce((x, y) => (y.gain > x.gain ? y : x));
      const worst = gains.reduce((x, y) => (y.gain < x.gain ? y : x));
      out.push(
        `4T over 2T: the largest gain is at ${name(best.r)}, ${best.gain >= 0 ? '+' : '−'}${Math.abs(best.gain).toFixed(2)} % annual yield (4T ${best.b.toFixed(1)} against 2T ${best.a.toFixed(1)} kWh/m², each at its own site-optimal gaps)` +
          (gains.length > 1 ? `; the smallest at ${name(worst.r)}, ${worst.gain >= 0 ? '+' : '−'}${Math.abs(worst.gain).toFixed(2)} %.` : '.') +
          ' Whether that pays for two more terminals is outside these limits.',
      );
    }
  }
  const poa = rows.map((r) => ({ r, poa: num(r.poa_kwh_m2) })).filter((x): x is { r: SiteRow; poa: number } => x.poa !== null);
  if (poa.length > 1) {
    const hi = poa.reduce((a, b) => (b.poa > a.poa ? b : a));
    const lo = poa.reduce((a, b) => (b.poa < a.poa ? b : a));
    out.push(`Annual plane-of-array insolation runs from ${lo.poa.toFixed(0)} kWh/m² at ${name(lo.r)} to ${hi.poa.toFixed(0)} kWh/m² at ${name(hi.r)}.`);
  }
  return out;
}

interface SiteMapFigure {
  chart: Chart;
  caption: string;
}

/** One site map of the rows coloured by a column, with its caption and its figure files' data and metadata block. */
async function siteMapFigure(
  design: Design,
  s: DesignSitesRows,
  o: { name: string; column: ReturnType<typeof mapColumn>; valueName: string; unit: string; digits: number; wiring: string | null; note: string | ((d: SiteColourDomain) => string); extraJson: Record<string, unknown> },
): Promise<SiteMapFigure> {
  const ds = sitesOf(design);
  const points = mapPoints(s.rows, o.column);
  const domain = await siteColourDomain(points.map((p) => p.value));
  const svg = await siteMapSvg({ points, valueLabel: o.column.label, extent: 'auto', caption: [], id: o.name, domain });
  const note = typeof o.note === 'string' ? o.note : o.note(domain);
  const caption =
    `Each dot is one site, coloured by the ${o.column.label}: one colour scale, ${fx(domain.lo, o.digits)}–${fx(domain.hi, o.digits)} ${o.unit} (viridis, the report's map palette), for this map; a hollow dot would mark a site without a value.${note}` +
    " Positions from each weather file's header; land and borders: Natural Earth 1:110m (world-atlas), Equal Earth projection. Labels that would overlap are left out (the table names every site).";
  const meta: FigureMeta = {
    tool: `gapstack ${toolVersion()}`,
    wiring: o.wiring,
    light: { kind: 'sites', name: `hourly weather years on one plane (${planeWords(ds.plane, ds)})`, sha256: s.sitesSha256, sites: s.rows.length },
    temperature_k: { model: "each hour's Faiman cell temperature", gaps_held_at: design.tempK },
    units: { lat_deg: '°', lon_deg: '°', [o.valueName]: o.unit, note: 'columns ending in _pct are in percent' },
    caution: CAUTION,
  };
  const q = (t: string) => (/[",\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t);
  const value = (v: number | null) => (v === null ? '' : v.toFixed(4));
  const chart: Chart = {
    name: o.name,
    svg,
    csv: `site,file,lat_deg,lon_deg,${o.valueName}\n${s.rows.map((r, k) => `${q(String(r.site))},${q(String(r.file))},${cell(r.lat_deg, 4)},${cell(r.lon_deg, 4)},${value(points[k]!.value)}`).join('\n')}\n`,
    json: {
      colour: o.column.label,
      colour_range: { low: domain.lo, high: domain.hi, unit: o.unit },
      ...o.extraJson,
      question_sha256: s.questionSha256,
      sites_sha256: s.sitesSha256,
      points: points.map((p) => ({ site: p.site, lat_deg: p.latDeg, lon_deg: p.lonDeg, [o.valueName]: p.value })),
      caution: CAUTION,
    },
    meta,
  };
  return { chart, caption };
}

/** Build the Sites section from the batch's rows; `am15gGapsEv` are the report's AM1.5G optima, one per wiring (top first). */
export async function sitesSection(design: Design, s: DesignSitesRows, am15gGapsEv: readonly (readonly number[])[]): Promise<SitesSectionView> {
  const ds = sitesOf(design);
  const prefixes = design.wirings.map(wiringPrefix);
  const groups = design.wirings.map((w) => ({ title: wiringTitle(w.key), span: 4 }));
  const head = ['site', 'lat [°]', 'lon [°]', 'POA [kWh/m²]', ...prefixes.flatMap(() => ['gaps [eV]', 'yield [kWh/m²]', 'η [%]', 'AM1.5G loss [%]'])];
  const rows = s.rows.map((r) => [
    String(r.site),
    cell(r.lat_deg, 2),
    cell(r.lon_deg, 2),
    cell(r.poa_kwh_m2, 2),
    ...prefixes.flatMap((p) => [gapsOf(r[`${p}_gaps_ev`]).map((g) => g.toFixed(4)).join(' / '), cell(r[`${p}_yield_kwh_m2`], 3), cell(r[`${p}_efficiency_pct`], 3), cell(r[`${p}_am15g_loss_pct`], 3)]),
  ]);

  // The maps: each site coloured by the first wiring's site-optimal top gap, and by the 4T-over-2T gain when both are asked.
  const first = prefixes[0]!;
  const ref = am15gGapsEv[0]?.[0];
  const maps: SiteMapFigure[] = [
    await siteMapFigure(design, s, {
      name: 'sites-map',
      column: mapColumn('top-gap', s.columns, first),
      valueName: `${first}_top_gap_ev`,
      unit: 'eV',
      digits: 3,
      wiring: design.wirings[0]!.key,
      note: ref === undefined ? '' : (domain) => ` Under AM1.5G the ${shortName(design.wirings[0]!.key)} top gap is ${fx(ref, 3)} eV${ref < domain.lo || ref > domain.hi ? ', outside this colour range' : ''}.`,
      extraJson: { am15g_top_gap_ev: ref ?? null },
    }),
  ];
  if (prefixes.includes('2t') && prefixes.includes('4t')) {
    maps.push(
      await siteMapFigure(design, s, {
        name: 'sites-map-4t-gain',
        column: mapColumn('4t-gain', s.columns),
        valueName: '4t_over_2t_yield_gain_pct',
        unit: '%',
        digits: 2,
        wiring: null,
        note: () => ' The gain is (4T yield − 2T yield) / 2T yield, each wiring at its own site-optimal gaps; a different quantity from the map above, so a scale of its own.',
        extraJson: { convention: '(4t_yield_kwh_m2 - 2t_yield_kwh_m2) / 2t_yield_kwh_m2 × 100, each at its site-optimal gaps' },
      }),
    );
  }

  const intro = [
    `The question above asked at ${s.rows.length} site${s.rows.length === 1 ? '' : 's'}, each under its weather file's hourly year on one module plane (${planeWords(ds.plane, ds)}): per wiring the site-optimal gaps, their annual yield and yield-weighted efficiency, and how much less the AM1.5G-optimal design yields there. The sections above answer under AM1.5G; this one under each site's light.`,
    `These are the rows gapstack sites writes for this design and these weather files (question SHA-256 ${s.questionSha256.slice(0, 12)}…, gapstack ${s.version}), in its order (by the SHA-256 of each weather file); summary.json carries them in full.${s.source ? ` They were read from ${basename(s.source)}, a batch run before this report, after checking its question, version and weather files.` : ''}`,
    ...(s.duplicates.length > 0 ? [`Counted once, as identical to another listed file: ${s.duplicates.map((d) => basename(d)).join(', ')}.`] : []),
  ];
  const assumptions = [`weather files (SHA-256 of their bytes): ${s.rows.map((r) => `${String(r.file)} ${String(r.site_key).slice(0, 12)}…`).join(', ')}`, ...sitesLightAssumptions(design)];
  return {
    heading: `Sites: the question at ${s.rows.length} site${s.rows.length === 1 ? '' : 's'}`,
    intro,
    table: { groups, head, rows },
    maps: maps.map((m) => ({ id: m.chart.name, svg: m.chart.svg, caption: m.caption })),
    reading: sitesReading(design, s.rows, am15gGapsEv),
    assumptions,
    charts: maps.map((m) => m.chart),
    summary: {
      question_sha256: s.questionSha256,
      sites_sha256: s.sitesSha256,
      gapstack_version: s.version,
      plane: { tilt: ds.plane.tilt, azimuth: ds.plane.azimuth, tracking: ds.model.tracking },
      files: ds.files.map((f) => basename(f)),
      duplicates: s.duplicates.map((d) => basename(d)),
      columns: s.columns,
      rows: s.rows,
      units: { lat_deg: '°', lon_deg: '°', poa_kwh_m2: 'kWh/m²', gaps_ev: 'eV', yield_kwh_m2: 'kWh/m²', efficiency_pct: '%', am15g_loss_pct: '%' },
      assumptions,
      caution: CAUTION,
    },
  };
}

/**
 * The whole report of a design with `sites:`: the answer under AM1.5G, the
 * batch over the sites (or its rows from `opts.rowsFile`, a batch already
 * run and merged), and the page with its Sites section.
 * @param opts.stage named progress stages (the report's, then "sites")
 */
export async function buildSitesReport(design: Design, opts: { date: Date; stage?: StageReporter; onChart?: (chart: Chart) => void; rowsFile?: string }): Promise<BuiltReport> {
  const { buildReport } = await import('../report/build.js');
  const { computeReport } = await import('../report/compute.js');
  // Rows of a batch already run are checked before the work, so a mismatch costs nothing.
  const given = opts.rowsFile !== undefined ? designSitesRowsFromFile(design, opts.rowsFile) : null;
  const data = computeReport(design, opts.stage);
  const rows = given ?? (await runDesignSites(design, opts.stage?.(`sites (${sitesOf(design).files.length} weather files)`)));
  const sites = await sitesSection(design, rows, data.outcomes.map((o) => o.search.result.best.gapsEv));
  return buildReport(design, { date: opts.date, data, sites, onChart: opts.onChart });
}
