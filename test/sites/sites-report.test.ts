/**
 * A design that names several sites (`sites:`): the design file's checks, and
 * the report's Sites section, whose table is the batch's own output — the
 * same rows `gapstack sites` writes for the same design and weather files,
 * same numbers, same order — with the map, the reading and the rows in
 * summary.json.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { loadDesign, loadScenarioSet } from '../../src/design/index.js';
import { UserError } from '../../src/errors.js';
import { reportCommand } from '../../src/cli/report-command.js';
import { sitesWeatherCommand } from '../../src/cli/sites-command.js';
import { sitesReading } from '../../src/sites/report-section.js';
import type { SiteRow } from '../../src/sites/map-data.js';
import { ROOT, runJsonHere } from '../helpers/cli.js';

const SITES = join(ROOT, 'examples/sites');
/** Whole-year batches of two sites and a report take seconds, more on a loaded machine. */
const LONG = 240_000;
const work = mkdtempSync(join(tmpdir(), 'gapstack-sites-report-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

function design(name: string, text: string): string {
  const p = join(work, name);
  writeFileSync(p, text);
  return p;
}

/** The UserError message loading a design raises. */
async function failure(path: string, load: (p: string) => Promise<unknown> = loadDesign): Promise<string> {
  try {
    await load(path);
  } catch (err) {
    expect(err).toBeInstanceOf(UserError);
    return (err as Error).message;
  }
  throw new Error(`${path} loaded without error`);
}

const STACK = `subcells:
  - label: top
    range: [1.6, 2.2]
  - label: bottom
    gap: 1.12
`;

describe('sites: in a design file', () => {
  test('resolves: files relative to the design, folders expanded in name order, the plane kept, the other sections under AM1.5G', async () => {
    const folder = join(work, 'two-sites');
    mkdirSync(folder, { recursive: true });
    writeFileSync(join(folder, 'b.epw'), readFileSync(join(SITES, 'saltreach.epw')));
    writeFileSync(join(folder, 'a.epw'), readFileSync(join(SITES, 'verdance.epw')));
    writeFileSync(join(folder, 'notes.txt'), 'not a weather file');
    const p = design('ok.yaml', `name: ok\nsites:\n  files: [two-sites, ${join(SITES, 'orvale.epw')}]\n  tilt: latitude\n  azimuth: equator\n  albedo: 0.25\n${STACK}`);
    const d = await loadDesign(p);
    expect(d.sites?.files).toEqual([join(folder, 'a.epw'), join(folder, 'b.epw'), join(SITES, 'orvale.epw')]);
    expect(d.sites?.plane).toEqual({ tilt: 'latitude', azimuth: 'equator' });
    expect(d.sites?.model).toMatchObject({ tracking: 'none', albedo: 0.25 });
    expect(d.light.kind).toBe('spectrum');
    if (d.light.kind === 'spectrum') expect(d.light.spectrum.name).toMatch(/AM1\.5G/i);
  });

  test('one light only: sites with weather, spectrum or ensemble is refused naming the fields, at the line of sites', async () => {
    const withWeather = design('both.yaml', `name: both\nweather:\n  file: ${join(SITES, 'orvale.epw')}\n  tilt: 20\n  azimuth: 180\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\n${STACK}`);
    expect(await failure(withWeather)).toMatch(/both\.yaml:6: sites: give one light: spectrum, ensemble, weather or sites, not both sites and weather/);
    const withSpectrum = design('spec.yaml', `name: spec\nspectrum: am1.5g\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\n${STACK}`);
    expect(await failure(withSpectrum)).toMatch(/spec\.yaml:3: sites: .*not both sites and spectrum/);
    const withEnsemble = design('ens.yaml', `name: ens\nensemble: ${join(ROOT, 'examples/ensemble-demo/manifest.yaml')}\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\n${STACK}`);
    expect(await failure(withEnsemble)).toMatch(/ens\.yaml:3: sites: .*not both sites and ensemble/);
  });

  test('a missing file, an empty list, a folder without weather files, a bad plane and a tracker with tilt are refused naming the field and line', async () => {
    const missing = design('missing.yaml', `name: m\nsites:\n  files:\n    - ${join(SITES, 'orvale.epw')}\n    - nowhere.epw\n  tilt: 20\n  azimuth: 180\n${STACK}`);
    expect(await failure(missing)).toMatch(/missing\.yaml:5: sites\.files\[1\]: .*nowhere\.epw: no such weather file or folder/);
    const empty = design('empty.yaml', `name: e\nsites:\n  files: []\n  tilt: 20\n  azimuth: 180\n${STACK}`);
    expect(await failure(empty)).toMatch(/empty\.yaml:3: sites\.files: must hold at least 1 item/);
    mkdirSync(join(work, 'no-weather'), { recursive: true });
    writeFileSync(join(work, 'no-weather', 'readme.txt'), 'nothing here');
    const bare = design('bare.yaml', `name: b\nsites:\n  files: [no-weather]\n  tilt: 20\n  azimuth: 180\n${STACK}`);
    expect(await failure(bare)).toMatch(/bare\.yaml:3: sites\.files\[0\]: .*no-weather: no weather files \(\.epw, \.csv\) in this folder/);
    const tilt = design('tilt.yaml', `name: t\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: steep\n  azimuth: 180\n${STACK}`);
    expect(await failure(tilt)).toMatch(/tilt\.yaml:4: sites\.tilt: "steep" is not allowed; expected module tilt \[°\] from 0 to 90, or "latitude"/);
    const noPlane = design('noplane.yaml', `name: n\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n${STACK}`);
    expect(await failure(noPlane)).toMatch(/noplane\.yaml:2: sites: missing required key "azimuth"/);
    const tracker = design('tracker.yaml', `name: tr\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: latitude\n  azimuth: 180\n  tracking: single-axis\n${STACK}`);
    expect(await failure(tracker)).toMatch(/tracker\.yaml:4: sites\.tilt: single-axis tracking turns about a horizontal axis: give tilt 0/);
  });

  test('sites does not go with scenarios', async () => {
    const p = design('scen.yaml', `name: s\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\nscenarios:\n  - name: one\n${STACK.replace(/^/gm, '    ').replace(/^ {4}subcells/m, '    subcells')}`);
    expect(await failure(p, loadScenarioSet)).toMatch(/scen\.yaml:2: sites: does not go with scenarios/);
  });
});

describe('the report of a design with sites', () => {
  // Two invented sites, a coarse search and a coarse map: the smallest report that still has everything.
  const files = [join(SITES, 'saltreach.epw'), join(SITES, 'skarholm.epw')];
  let path: string;
  let html: string;
  let summary: Record<string, any>;
  let batchRows: Record<string, unknown>[];
  let batchCsv: string[][];
  let batchHeader: Record<string, unknown>;
  const figures = join(work, 'figures');

  beforeAll(async () => {
    path = design(
      'two-sites.yaml',
      [
        'name: invented two-site question (illustrative)',
        'sites:',
        `  files: [${files.join(', ')}]`,
        '  tilt: latitude',
        '  azimuth: equator',
        STACK.trimEnd(),
        'wirings: [series, independent]',
        'search:',
        '  step: 0.02',
        'map:',
        '  step: 0.05',
        '  pairs:',
        '    - axes: [1, 2]',
        '      x: [1.6, 2.2]',
        '      y: [1.0, 1.2]',
        '',
      ].join('\n'),
    );
    await reportCommand({ design: path, output: join(work, 'two-sites.html'), figures });
    html = readFileSync(join(work, 'two-sites.html'), 'utf8');
    summary = JSON.parse(readFileSync(join(figures, 'summary.json'), 'utf8'));
    // The batch command over the same design and files, on the same plane.
    const out = join(work, 'batch');
    await sitesWeatherCommand({ design: path, weather: files, out, tilt: 'latitude', azimuth: 'equator' });
    const lines = readFileSync(join(out, 'part-1-of-1.jsonl'), 'utf8').trim().split('\n');
    batchHeader = JSON.parse(lines[0]!);
    batchRows = lines.slice(1).map((l) => JSON.parse(l));
    batchCsv = readFileSync(join(out, 'part-1-of-1.csv'), 'utf8').trim().split('\n').filter((l) => !l.startsWith('#')).slice(1).map((l) => l.match(/("[^"]*"|[^,]+)/g)!.map((c) => c.replace(/^"|"$/g, '')));
  }, LONG);

  test('gapstack sites DESIGN without weather files asks at the design\'s own sites: the same part, byte for byte', async () => {
    const own = join(work, 'batch-own');
    await sitesWeatherCommand({ design: path, weather: [], out: own });
    expect(readFileSync(join(own, 'part-1-of-1.jsonl'), 'utf8')).toBe(readFileSync(join(work, 'batch', 'part-1-of-1.jsonl'), 'utf8'));
    expect(readFileSync(join(own, 'part-1-of-1.csv'), 'utf8')).toBe(readFileSync(join(work, 'batch', 'part-1-of-1.csv'), 'utf8'));
    // The design sets the plane; a flag beside it would ask another question.
    await expect(sitesWeatherCommand({ design: path, weather: [], out: own, tilt: '10' })).rejects.toThrow(/--tilt: .*two-sites\.yaml sets the plane and light model in its sites:/);
    const plain = design('plain.yaml', `name: p\n${STACK}`);
    await expect(sitesWeatherCommand({ design: plain, weather: [], out: own })).rejects.toThrow(/name the weather files or folders of the sites after the design, or give .*plain\.yaml a sites: list/);
  }, LONG);

  test('--sites-rows takes the rows of the batch already run (JSON Lines or CSV) after checking they answer this design\'s question', async () => {
    for (const ext of ['jsonl', 'csv']) {
      const figs = join(work, `figures-from-${ext}`);
      await reportCommand({ design: path, output: join(work, `from-${ext}.html`), figures: figs, sitesRows: join(work, 'batch', `part-1-of-1.${ext}`) });
      const again = JSON.parse(readFileSync(join(figs, 'summary.json'), 'utf8'));
      expect(again.sites.rows, ext).toEqual(summary.sites.rows);
      expect(again.sites.question_sha256, ext).toBe(summary.sites.question_sha256);
      expect(readFileSync(join(work, `from-${ext}.html`), 'utf8'), ext).toContain(`They were read from part-1-of-1.${ext}, a batch run before this report`);
    }
    // A part of a sharded batch is not the whole set of sites.
    const part = join(work, 'shard-part.jsonl');
    writeFileSync(part, readFileSync(join(work, 'batch', 'part-1-of-1.jsonl'), 'utf8').replace('"shard":"1/1"', '"shard":"1/2"'));
    await expect(reportCommand({ design: path, output: join(work, 'x.html'), sitesRows: part })).rejects.toThrow(/shard-part\.jsonl: holds shard 1\/2 of a batch; merge every shard first/);
    // The same files on another plane are another question.
    const tilted = design('tilted.yaml', readFileSync(path, 'utf8').replace('tilt: latitude', 'tilt: 10'));
    await expect(reportCommand({ design: tilted, output: join(work, 'x.html'), sitesRows: join(work, 'batch', 'part-1-of-1.jsonl') })).rejects.toThrow(/part-1-of-1\.jsonl: rows of another question/);
    // A design without sites has no use for them.
    const plain = design('plain-rows.yaml', `name: p\n${STACK}`);
    await expect(reportCommand({ design: plain, output: join(work, 'x.html'), sitesRows: join(work, 'batch', 'part-1-of-1.jsonl') })).rejects.toThrow(/--sites-rows needs a design that names its sites/);
    expect(existsSync(join(work, 'x.html'))).toBe(false);
  }, LONG);

  test('summary.json carries the batch\'s rows: same question, same numbers, same order', () => {
    expect(summary.sites.question_sha256).toBe(batchHeader.question_sha256);
    expect(summary.sites.sites_sha256).toBe(batchHeader.sites_sha256);
    expect(summary.sites.columns).toEqual(batchHeader.columns);
    expect(summary.sites.rows).toHaveLength(2);
    expect(summary.sites.rows).toEqual(batchRows);
    expect(summary.sites.rows.map((r: SiteRow) => r.file)).toEqual(batchRows.map((r) => r.file));
    expect(summary.sites.caution).toMatch(/no substitute for certified measurement, engineering sign-off, local codes or licensed professional practice/);
  });

  test('the page\'s site table shows the batch\'s CSV numbers, row by row in the batch\'s order', () => {
    const table = /<table class="detail sites-table" id="sites-table">([\s\S]*?)<\/table>/.exec(html)?.[1] ?? '';
    const body = /<tbody>([\s\S]*?)<\/tbody>/.exec(table)?.[1] ?? '';
    const rows = [...body.matchAll(/<tr>([\s\S]*?)<\/tr>/g)].map((m) => [...m[1]!.matchAll(/<td>([\s\S]*?)<\/td>/g)].map((c) => c[1]!));
    expect(rows).toHaveLength(batchCsv.length);
    // CSV columns: site_key, file, site, lat, lon, poa, then per wiring gaps, yield, efficiency, loss.
    const expected = batchCsv.map((c) => [c[2], Number(c[3]).toFixed(2), Number(c[4]).toFixed(2), c[5], c[6]!.replace(/;/g, ' / '), c[7], c[8], c[9], c[10]!.replace(/;/g, ' / '), c[11], c[12], c[13]]);
    expect(rows.map((r) => r.map((x) => x.replace(/&#x27;/g, "'")))).toEqual(expected);
    expect(table).toContain('Series (2T, current-matched)');
    expect(table).toContain('Independent (4T)');
  });

  test('the section holds the map with its colour bar and caption, the reading, the site-light assumptions and the caution', () => {
    const section = /<section class="sites" id="sites">([\s\S]*?)<\/section>/.exec(html)?.[1] ?? '';
    expect(section).toMatch(/<h2>Sites: the question at 2 sites<\/h2>/);
    expect(section).toMatch(/<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" id="sites-map" class="gs-chart gs-site-map"/);
    expect(section).toMatch(/class="gs-colourbar"/);
    // Two maps (the 2T top gap; the 4T-over-2T gain, as both wirings are asked), one dot per site on each.
    expect((section.match(/<circle /g) ?? []).length).toBe(4);
    expect(section).toMatch(/<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" id="sites-map-4t-gain" class="gs-chart gs-site-map"/);
    expect(section).toMatch(/<figcaption>Each dot is one site, coloured by the 4T over 2T yield gain \[%\]: one colour scale, [\d.−-]+–[\d.]+ %/);
    expect(section).toMatch(/weather files \(SHA-256 of their bytes\): [a-z-]+\.epw [0-9a-f]{12}…, [a-z-]+\.epw [0-9a-f]{12}…/);
    expect(section).toMatch(/<figcaption>Each dot is one site, coloured by the 2T site-optimal top gap \[eV\]: one colour scale, [\d.]+–[\d.]+ eV/);
    expect(section).toMatch(/Reading the sites/);
    expect(section).toMatch(/plane: fixed plane tilted at each site&#x27;s latitude, facing the equator/);
    expect(section).toMatch(/cell temperature: Faiman/);
    expect(section).toMatch(/SPECTRL2 clear-sky shapes/);
    expect(section).toMatch(/no substitute for certified measurement, engineering sign-off, local codes or licensed professional practice/);
  });

  test('the map\'s figure files carry the metadata block and units, like every figure', () => {
    const csv = readFileSync(join(figures, 'sites-map.csv'), 'utf8').split('\n');
    expect(csv[0]).toMatch(/^# tool: gapstack /);
    expect(csv.find((l) => l.startsWith('# light:'))).toMatch(/2 sites\), site set SHA-256 [0-9a-f]{64}/);
    expect(csv.find((l) => l.startsWith('# units:'))).toMatch(/2t_top_gap_ev \[eV\]/);
    expect(csv.find((l) => l.startsWith('# caution:'))).toMatch(/theoretical|detailed-balance limits/);
    const head = csv.findIndex((l) => l.startsWith('site,'));
    expect(csv[head]).toBe('site,file,lat_deg,lon_deg,2t_top_gap_ev');
    // The drawn value is the batch's 2T top gap of each site, in the batch's order.
    expect(csv.slice(head + 1, head + 3).map((l) => Number(l.split(',').at(-1)))).toEqual(batchRows.map((r) => (r['2t_gaps_ev'] as number[])[0]));
    // The gain map draws (4T − 2T) / 2T of the batch's yields.
    const gain = readFileSync(join(figures, 'sites-map-4t-gain.csv'), 'utf8').split('\n').filter((l) => l !== '' && !l.startsWith('#')).slice(1);
    expect(gain.map((l) => Number(l.split(',').at(-1)))).toEqual(batchRows.map((r) => Number(((((r['4t_yield_kwh_m2'] as number) - (r['2t_yield_kwh_m2'] as number)) / (r['2t_yield_kwh_m2'] as number)) * 100).toFixed(4))));
    const json = JSON.parse(readFileSync(join(figures, 'sites-map.json'), 'utf8'));
    expect(json.meta.light).toMatchObject({ kind: 'sites', sites: 2 });
    expect(json.meta.units['2t_top_gap_ev']).toBe('eV');
    expect(readFileSync(join(figures, 'sites-map.png')).subarray(1, 4).toString()).toBe('PNG');
  });
});

describe('a report whose sites cannot all be answered', () => {
  test('a malformed weather file stops the report with exit-2 words naming it; nothing is written and the temporary rows are gone', async () => {
    const folder = join(work, 'bad-sites');
    mkdirSync(folder, { recursive: true });
    writeFileSync(join(folder, 'broken.epw'), 'LOCATION,Nowhere\nthis is not an EPW file\n');
    const p = design('bad.yaml', `name: bad\nsites:\n  files: [bad-sites]\n  tilt: 20\n  azimuth: 180\n${STACK}wirings: [series]\nsearch:\n  step: 0.02\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 2]\n      x: [1.6, 2.2]\n      y: [1.0, 1.2]\n`);
    const out = join(work, 'bad.html');
    const err = await reportCommand({ design: p, output: out }).then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(UserError);
    expect((err as Error).message).toMatch(/broken\.epw/);
    expect(existsSync(out)).toBe(false);
    const { trackedTemps } = await import('../../src/io/temp-files.js');
    expect(trackedTemps()).toEqual([]);
  }, LONG);

  test('a batch estimated at hours per site is refused before any work unless accepted, as gapstack sites refuses it', async () => {
    const p = design('huge.yaml', `name: huge\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\nsubcells:\n  - free: true\n  - free: true\n  - free: true\n  - free: true\nsearch:\n  step: 0.005\n`);
    await expect(reportCommand({ design: p, output: join(work, 'huge.html') })).rejects.toThrow(/this report's batch over sites \(per site\) would evaluate about [\d.]+e\d+ stack–spectrum pairs/);
    await expect(sitesWeatherCommand({ design: p, weather: [], out: join(work, 'huge') })).rejects.toThrow(/this batch \(per site\) would evaluate about/);
    expect(existsSync(join(work, 'huge.html'))).toBe(false);
  });

  test('a figures folder that holds a weather file of the design is refused before any work', async () => {
    const p = design('inside.yaml', `name: inside\nsites:\n  files: [two-sites]\n  tilt: 20\n  azimuth: 180\n${STACK}`);
    mkdirSync(join(work, 'two-sites'), { recursive: true });
    writeFileSync(join(work, 'two-sites', 'a.epw'), readFileSync(join(SITES, 'verdance.epw')));
    await expect(reportCommand({ design: p, output: join(work, 'inside.html'), figures: join(work, 'two-sites') })).rejects.toThrow(/--figures .*two-sites holds an input of this run/);
  });
});

describe('the library builds the same report', () => {
  test('buildReportFromFile on a design with sites gives the Sites section and its rows', async () => {
    const { buildReportFromFile } = await import('../../src/index.js');
    const p = design('lib.yaml', `name: library sites\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 15\n  azimuth: 180\n${STACK}wirings: [series]\nsearch:\n  step: 0.02\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 2]\n      x: [1.6, 2.2]\n      y: [1.0, 1.2]\n`);
    const r = await buildReportFromFile(p, { date: new Date(0) });
    const sites = r.summary.sites as { rows: SiteRow[]; columns: string[] };
    expect(sites.rows).toHaveLength(1);
    expect(sites.rows[0]!.file).toBe('orvale.epw');
    expect(sites.columns.slice(-4)).toEqual(['2t_gaps_ev', '2t_yield_kwh_m2', '2t_efficiency_pct', '2t_am15g_loss_pct']);
    expect(r.html).toContain('<section class="sites" id="sites">');
  }, LONG);
});

describe('material-bound gaps at a site', () => {
  test('move with each hour\'s cell temperature whether or not the design names sites: the site question answers as optimize --ensemble does', async () => {
    const manifest = join(ROOT, 'examples/ensemble-demo/manifest.yaml');
    const { loadEnsemble } = await import('../../src/light/ensemble.js');
    const { siteQuestion } = await import('../../src/sites/question.js');
    const members = loadEnsemble(manifest, { defaultTempK: 300 }).members;
    const light = async () => ({ name: 'Demo Year', latDeg: 0, lonDeg: 0, spectra: members });
    const subcells = 'subcells:\n  - material: perovskite-i-br\n  - gap: 1.12\nwirings: [series]\n';
    const plain = await loadDesign(design('material-plain.yaml', `name: m\n${subcells}`));
    const withSites = await loadDesign(design('material-sites.yaml', `name: m\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\n${subcells}`));
    const a = await siteQuestion(plain, light).evaluate('unused.epw');
    const b = await siteQuestion(withSites, light).evaluate('unused.epw');
    expect(a.wirings).toEqual(b.wirings);
    // The reference: the command line's own yield search with the same material binding (it carries dE_g/dT under an ensemble).
    const cli = await runJsonHere(['optimize', '--cells', '2', '--material', '1=perovskite-i-br', '--fix', '2=1.12', '--wiring', 'series', '--ensemble', manifest]);
    expect(a.wirings[0]!.gapsEv[0]).toBeCloseTo(cli.best.gaps_ev[0], 5);
    expect(a.wirings[0]!.yieldEfficiency).toBeCloseTo(cli.am15g_comparison.ensemble_best_yield_efficiency, 8);
  }, LONG);
});

describe('the site map\'s labels', () => {
  test('crowded sites: labels never overlap each other or a dot, and read the first part of each name with the whole name as tooltip', async () => {
    const { siteMapSvg } = await import('../../src/sites/site-map.js');
    const { textBox, boxesOverlap, pointBox } = await import('../../src/report/charts/labels.js');
    // Seven invented sites a few degrees apart on a world map: too close for their whole names.
    const points = Array.from({ length: 7 }, (_, k) => ({ site: `Site ${String.fromCharCode(65 + k)}, Long Invented Region, Invented`, latDeg: 36 + 3 * k, lonDeg: 5 + 7 * (k % 3), value: 1.7 + 0.01 * k }));
    const svg = await siteMapSvg({ points, valueLabel: 'top gap [eV]', caption: [], id: 'crowded', extent: 'world' });
    const dots = [...svg.matchAll(/<circle cx="([\d.-]+)" cy="([\d.-]+)" r="5\.5"/g)].map((m) => pointBox(Number(m[1]), Number(m[2]), 5.5));
    const labels = [...svg.matchAll(/<text class="gs-site-label" x="([\d.-]+)" y="([\d.-]+)" text-anchor="(start|middle|end)"[^>]*>(?:<title>([^<]*)<\/title>)?([^<]*)<\/text>/g)].map((m) => ({
      box: textBox({ x: Number(m[1]), y: Number(m[2]), anchor: m[3] as 'start' | 'middle' | 'end' }, m[5]!, { size: 10 }),
      tip: m[4],
      text: m[5]!,
    }));
    expect(dots).toHaveLength(7);
    // Crowded: every label is the first part of a name, the whole name its tooltip; most sites keep one.
    expect(labels.length).toBeGreaterThanOrEqual(4);
    for (const l of labels) expect([l.text, l.tip]).toEqual([expect.stringMatching(/^Site [A-G]$/), `${l.text}, Long Invented Region, Invented`]);
    for (const [i, l] of labels.entries()) {
      for (const d of dots) expect(boxesOverlap(l.box, d)).toBe(false);
      for (const m of labels.slice(i + 1)) expect(boxesOverlap(l.box, m.box)).toBe(false);
      const full = points.find((p) => p.site === (l.tip ?? l.text));
      expect(full, l.text).toBeDefined();
      if (l.tip) expect(l.tip.startsWith(l.text.replace(/…$/, ''))).toBe(true);
    }
  });
});

describe('the reading of the rows', () => {
  test('names where the top gap moves most, the largest AM1.5G loss and the largest 4T-over-2T gain, from the rows themselves', async () => {
    const d = await loadDesign(design('reading.yaml', `name: r\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\n${STACK}wirings: [series, independent]\n`));
    // Invented rows: the numbers are chosen so each sentence has one right answer.
    const rows: SiteRow[] = [
      { site: 'North', '2t_gaps_ev': [1.75, 1.12], '2t_yield_kwh_m2': 400, '2t_am15g_loss_pct': 1.5, '4t_gaps_ev': [1.85, 1.12], '4t_yield_kwh_m2': 420, '4t_am15g_loss_pct': 0.2, poa_kwh_m2: 1000 },
      { site: 'South', '2t_gaps_ev': [1.86, 1.12], '2t_yield_kwh_m2': 500, '2t_am15g_loss_pct': 3.25, '4t_gaps_ev': [1.9, 1.12], '4t_yield_kwh_m2': 505, '4t_am15g_loss_pct': 0.1, poa_kwh_m2: 1200 },
    ];
    const text = sitesReading(d, rows, [[1.73, 1.12], [1.81, 1.12]]).join('\n');
    expect(text).toContain('2T: the site-optimal top gap moves most at South, 1.860 eV against 1.730 eV under AM1.5G (+130 meV); across the 2 sites it lies within 1.750–1.860 eV.');
    expect(text).toContain('2T: the AM1.5G design loses most at South, 3.25 % of the site optimum\'s annual yield; least at North, 1.50 %.');
    // (420 − 400)/400 = +5.00 %; (505 − 500)/500 = +1.00 %.
    expect(text).toContain('4T over 2T: the largest gain is at North, +5.00 % annual yield (4T 420.0 against 2T 400.0 kWh/m², each at its own site-optimal gaps); the smallest at South, +1.00 %.');
    expect(text).toContain('Annual plane-of-array insolation runs from 1000 kWh/m² at North to 1200 kWh/m² at South.');
  });

  test('a top gap held by the end of its allowed range is said to be', async () => {
    const d = await loadDesign(design('edge.yaml', `name: e\nsites:\n  files: [${join(SITES, 'orvale.epw')}]\n  tilt: 20\n  azimuth: 180\n${STACK}wirings: [series]\n`));
    const rows: SiteRow[] = [{ site: 'Edge', '2t_gaps_ev': [2.2, 1.12], '2t_yield_kwh_m2': 300, '2t_am15g_loss_pct': 9, poa_kwh_m2: 900 }];
    expect(sitesReading(d, rows, [[1.73, 1.12]]).join(' ')).toMatch(/At Edge it sits on an end of its allowed range \(1\.600–2\.200 eV\)/);
  });
});
