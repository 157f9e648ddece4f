/**
 * `gapstack sites`: one design question answered at many weather files, this
 * task's shard of them, into part files; `gapstack sites merge` combines the
 * parts of all shards.
 */
import { loadDesign, type Design } from '../design/index.js';
import { UserError } from '../errors.js';
import { CAUTION } from '../report/assumptions.js';
import { mergeParts } from '../sites/merge.js';
import { siteQuestion, type SiteLightSource } from '../sites/question.js';
import { listWeatherFiles, runSites, type SitesRunSummary } from '../sites/run.js';
import { resolveShard, shardLabel, type ShardSource } from '../sites/shard.js';
import { toolVersion } from '../io/version.js';
import { startProgress } from './progress.js';
import { parsePlane } from '../sites/plane.js';
import { defaultStepEv } from '../search/optimize.js';
import { siteOptionsFromArgs, type WeatherArgs } from './weather-options.js';
import { checkWorkSize, searchStacks } from './work-size.js';

export interface SitesArgs {
  design: string;
  weather: string[];
  out: string;
  shard?: string;
  shardCount?: string;
  json?: boolean;
}

export interface SitesMergeArgs {
  parts: string[];
  out: string;
  json?: boolean;
}

const SOURCE_WORDS: Record<ShardSource, string> = {
  option: 'from --shard',
  slurm: 'from the Slurm job array',
  kubernetes: 'from the Kubernetes indexed Job',
  none: 'the whole batch',
};

function shardCountOf(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  if (!/^\d+$/.test(text.trim())) throw new UserError(`--shard-count must be a whole number, got "${text}"`);
  return Number(text);
}

/** Text or JSON describing a finished shard run. */
export function describeRun(s: SitesRunSummary, source: ShardSource, json: boolean): string {
  if (json) {
    return JSON.stringify(
      {
        shard: shardLabel(s.shard),
        shard_source: source,
        sites_total: s.sitesTotal,
        shard_sites: s.shardSites,
        resumed: s.resumed,
        computed: s.computed,
        duplicates: s.duplicates,
        csv: s.csvPath,
        jsonl: s.jsonlPath,
        caution: CAUTION,
      },
      null,
      2,
    );
  }
  return [
    `shard ${shardLabel(s.shard)} (${SOURCE_WORDS[source]}): ${s.shardSites} of ${s.sitesTotal} sites; ${s.resumed} already done, ${s.computed} computed now`,
    `rows: ${s.csvPath} and ${s.jsonlPath}`,
    ...(s.duplicates.length > 0 ? [`skipped as identical to another file: ${s.duplicates.join(', ')}`] : []),
    ...(s.shard.count > 1 ? ['when every shard has finished: gapstack sites merge <all part files> --out <file>'] : []),
    CAUTION,
  ].join('\n');
}

/** Run this task's shard; `lightOf` turns a weather file into the site's light. */
export async function sitesCommand(a: SitesArgs, lightOf: SiteLightSource, lightOptions: Record<string, string | number | boolean | null> = {}): Promise<string> {
  if (a.weather.length === 0) throw new UserError('name the weather files or folders of the sites');
  const { shard, source } = resolveShard({ option: a.shard, shardCount: shardCountOf(a.shardCount) });
  const design = await loadDesign(a.design);
  const files = listWeatherFiles(a.weather);
  const bar = a.json ? null : await startProgress(`sites ${shardLabel(shard)}`);
  let summary: SitesRunSummary;
  try {
    summary = await runSites({
      files,
      outDir: a.out,
      shard,
      question: siteQuestion(design, lightOf, lightOptions),
      version: toolVersion(),
      onProgress: bar ? (done, total) => bar.update(total === 0 ? 1 : done / total) : undefined,
    });
  } finally {
    bar?.stop();
  }
  return describeRun(summary, source, Boolean(a.json));
}

export interface SitesWeatherArgs extends SitesArgs, Omit<WeatherArgs, 'weather'> {
  acceptLarge?: boolean;
}

/** The most hourly spectra one site's year can give (a leap year of daylight and night). */
const HOURS_IN_A_LEAP_YEAR = 8784;

/**
 * The size check once per batch, before any site: the design's search grid
 * times the most hours a year can hold, per wiring (`gapstack sites`, and
 * `gapstack report` on a design that names sites).
 */
export function checkSiteBatchSize(design: Design, what: string, accepted: boolean): void {
  const openCells = design.subcells.filter((c) => c.constraint.kind !== 'fixed').length;
  const stacks = searchStacks(design.subcells.map((c) => c.constraint), design.spanEv, design.searchStepEv ?? defaultStepEv(openCells));
  checkWorkSize(what, stacks * design.wirings.length, HOURS_IN_A_LEAP_YEAR + 1, accepted);
}

/** `gapstack sites DESIGN WEATHER… --tilt --azimuth`: each site's light is its weather file's hourly year on that plane. */
export async function sitesWeatherCommand(a: SitesWeatherArgs): Promise<string> {
  if ((a.weather ?? []).length === 0) return sitesOfDesignCommand(a);
  if (a.tilt === undefined || a.azimuth === undefined) throw new UserError('sites needs --tilt <° | latitude> and --azimuth <° east of north | equator>');
  const plane = parsePlane(String(a.tilt), String(a.azimuth));
  // The engine's own option parser for everything but the plane, which may differ per site here.
  const { tiltDeg: _t, azimuthDeg: _a, ...model } = siteOptionsFromArgs({ ...a, tilt: '0', azimuth: '0' });
  checkSiteBatchSize(await loadDesign(a.design), 'batch (per site)', Boolean(a.acceptLarge));
  const { siteLightHashOptions, weatherSiteLight } = await import('../sites/weather-light.js');
  // Every option that changes a number enters the question's hash, so parts of different planes or models never merge.
  return sitesCommand(a, weatherSiteLight(plane, model), siteLightHashOptions(plane, model));
}

/** Light-model options that a design's `sites:` sets, as flags. */
const LIGHT_FLAGS: [keyof SitesWeatherArgs, string][] = [
  ['tilt', 'tilt'],
  ['azimuth', 'azimuth'],
  ['albedo', 'albedo'],
  ['tracking', 'tracking'],
  ['maxRotation', 'max-rotation'],
  ['aod500', 'aod500'],
  ['waterCm', 'water-cm'],
  ['ozoneAtmCm', 'ozone-atm-cm'],
  ['faiman', 'faiman'],
];

/**
 * `gapstack sites DESIGN` without weather files: the sites, plane and light
 * model of the design's own `sites:` — the same question (same hash, same
 * rows) that `gapstack report DESIGN` puts in its Sites section.
 */
async function sitesOfDesignCommand(a: SitesWeatherArgs): Promise<string> {
  const design = await loadDesign(a.design);
  const s = design.sites;
  if (!s) throw new UserError(`name the weather files or folders of the sites after the design, or give ${a.design} a sites: list`);
  const given = LIGHT_FLAGS.filter(([k]) => a[k] !== undefined).map(([, flag]) => `--${flag}`);
  if (given.length > 0) throw new UserError(`${given.join(', ')}: ${a.design} sets the plane and light model in its sites:; change them there, or name weather files on the command line`);
  checkSiteBatchSize(design, 'batch (per site)', Boolean(a.acceptLarge));
  const { siteLightHashOptions, weatherSiteLight } = await import('../sites/weather-light.js');
  return sitesCommand({ ...a, weather: s.files }, weatherSiteLight(s.plane, s.model), siteLightHashOptions(s.plane, s.model));
}

/** Merge the parts of every shard into one file, byte-identical to an unsharded run's part. */
export function sitesMergeCommand(a: SitesMergeArgs): string {
  const m = mergeParts(a.parts, a.out);
  if (a.json) return JSON.stringify({ out: m.out, parts: m.parts, sites: m.sites }, null, 2);
  return `merged ${m.parts} part${m.parts === 1 ? '' : 's'}, ${m.sites} sites → ${m.out}`;
}

export interface SitesMapArgs {
  rows: string;
  colour: string;
  wiring?: string;
  out: string;
  world?: boolean;
}

/** Draw the sites of a rows file coloured by a column: `<out>.svg` and `<out>.png`. */
export async function sitesMapCommand(a: SitesMapArgs): Promise<string> {
  const { mapColumn, mapPoints, readRowsFile } = await import('../sites/map-data.js');
  const { siteMapSvg } = await import('../sites/site-map.js');
  const { standaloneSvg, svgToPng } = await import('../report/figures.js');
  const { writeFileAtomic } = await import('../io/atomic-write.js');
  const file = readRowsFile(a.rows);
  const column = mapColumn(a.colour, file.columns, a.wiring);
  const points = mapPoints(file.rows, column);
  const svg = standaloneSvg(
    await siteMapSvg({
      points,
      valueLabel: column.label,
      extent: a.world ? 'world' : 'auto',
      caption: [
        `${points.length} site${points.length === 1 ? '' : 's'} coloured by ${column.label}; question SHA-256 ${file.questionSha256.slice(0, 12)}…, gapstack ${file.version}.`,
        'Each site: its weather file turned into hourly spectra on the module plane, the stack solved hour by hour in the detailed-balance limit; gaps optimised per site. Land and borders: Natural Earth 1:110m (world-atlas), Equal Earth projection.',
        CAUTION,
      ],
    }),
  );
  const base = a.out.replace(/\.(svg|png)$/i, '');
  writeFileAtomic(`${base}.svg`, svg);
  writeFileAtomic(`${base}.png`, svgToPng(svg));
  // The drawn numbers beside the picture, as every figure has them.
  const q = (t: string) => (/[",\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t);
  writeFileAtomic(`${base}.csv`, `site,lat_deg,lon_deg,value\n${points.map((p) => `${q(p.site)},${p.latDeg},${p.lonDeg},${p.value ?? ''}`).join('\n')}\n`);
  writeFileAtomic(`${base}.json`, `${JSON.stringify({ value: column.label, question_sha256: file.questionSha256, gapstack_version: file.version, points: points.map((p) => ({ site: p.site, lat_deg: p.latDeg, lon_deg: p.lonDeg, value: p.value })), caution: CAUTION }, null, 2)}\n`);
  return `site map of ${points.length} sites coloured by ${column.label} → ${base}.svg, ${base}.png (data: ${base}.csv, ${base}.json)`;
}
