import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { UserError } from '../../src/errors.js';
import { mapColumn, mapPoints, readRowsFile } from '../../src/sites/map-data.js';
import { columnsFor, csvHeader, csvRow, jsonHeader, jsonRow, type SiteResult } from '../../src/sites/parts.js';
import { siteMapSvg } from '../../src/sites/site-map.js';
import { runCli } from '../helpers/cli.js';

const work = mkdtempSync(join(tmpdir(), 'gapstack-site-map-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const cols = columnsFor(['2t', '4t']);
// Invented sites and invented numbers: the map's plumbing, not physics.
const site = (i: number, name: string, lat: number, lon: number, top: number, y2: number, y4: number): SiteResult => ({
  key: String(i).repeat(64).slice(0, 64).replace(/[^0-9a-f]/g, 'a'),
  file: `${name}.epw`,
  name,
  latDeg: lat,
  lonDeg: lon,
  poaKwhM2: 2000,
  wirings: [
    { wiring: '2t', gapsEv: [top, 1.12], yieldKwhM2: y2, yieldEfficiency: 0.4, am15gLoss: 0.001 * i },
    { wiring: '4t', gapsEv: [top + 0.1, 1.12], yieldKwhM2: y4, yieldEfficiency: 0.41, am15gLoss: 0 },
  ],
});
const rows = [site(1, 'Gullhaven', 60.1, 5.2, 1.70, 500, 510), site(2, 'Redmarsh', 51.5, -1.0, 1.68, 480, 500), site(3, 'Sunfold', 38.2, -4.1, 1.74, 700, 707)];
const identity = { version: '0.1.0', questionSha256: 'c'.repeat(64), sitesSha256: 'd'.repeat(64), sitesTotal: 3, shard: { index: 0, count: 1 }, shardSites: 3, columns: cols };
const jsonlPath = join(work, 'rows.jsonl');
const csvPath = join(work, 'rows.csv');
writeFileSync(jsonlPath, jsonHeader(identity) + rows.map((r) => jsonRow(r, cols)).join(''));
writeFileSync(csvPath, csvHeader(identity) + rows.map((r) => csvRow(r, cols)).join(''));

describe('site map data', () => {
  it('CSV and JSON Lines rows give the same points', () => {
    const a = readRowsFile(jsonlPath);
    const b = readRowsFile(csvPath);
    expect(b.columns).toEqual(a.columns);
    for (const name of ['top-gap', '2t-loss', '4t-gain', 'poa_kwh_m2']) {
      expect(mapPoints(b.rows, mapColumn(name, b.columns))).toEqual(mapPoints(a.rows, mapColumn(name, a.columns)));
    }
  });

  it('named colourings: top gap of a wiring, the 2T loss, the 4T-over-2T gain', () => {
    const f = readRowsFile(jsonlPath);
    expect(mapPoints(f.rows, mapColumn('top-gap', f.columns)).map((p) => p.value)).toEqual([1.7, 1.68, 1.74]);
    expect(mapPoints(f.rows, mapColumn('top-gap', f.columns, '4t')).map((p) => p.value)).toEqual([1.8, 1.78, 1.84]);
    expect(mapPoints(f.rows, mapColumn('2t-loss', f.columns)).map((p) => p.value)).toEqual([0.1, 0.2, 0.3]);
    const gain = mapPoints(f.rows, mapColumn('4t-gain', f.columns)).map((p) => p.value!);
    expect(gain[0]).toBeCloseTo(2, 9); // (510 − 500)/500
    expect(gain[2]).toBeCloseTo(1, 9); // (707 − 700)/700
    expect(mapColumn('2t-loss', f.columns).label).toBe('2T loss of the AM1.5G design [%]');
  });

  it('refuses an unknown or non-numeric column, and 4t-gain without a 4T column', () => {
    const f = readRowsFile(jsonlPath);
    expect(() => mapColumn('site', f.columns)).toThrow(UserError);
    expect(() => mapColumn('nonsense', f.columns)).toThrow(/--colour must be/);
    expect(() => mapColumn('4t-gain', columnsFor(['2t']))).toThrow(/4t_yield_kwh_m2/);
  });
});

describe('site map drawing', () => {
  const points = mapPoints(readRowsFile(jsonlPath).rows, mapColumn('top-gap', cols));

  it('one dot per site, the colour bar, the caption with its caution', async () => {
    const svg = await siteMapSvg({ points, valueLabel: '2T site-optimal top gap [eV]', caption: ['Invented sites.', 'These are theoretical limits.'] });
    expect(svg.match(/<circle [^>]*r="5.5"/g)).toHaveLength(3);
    expect(svg).toContain('linearGradient id="site-map-bar"');
    expect(svg).toContain('These are theoretical limits.');
    for (const p of points) expect(svg).toContain(`>${p.site}</text>`);
    // Ends of the scale take the ends of viridis (d3-scale-chromatic's interpolateViridis: #440154 at 0, #fde725 at 1).
    expect(svg).toMatch(/<circle [^>]*fill="#fde725"/);
    expect(svg).toMatch(/<circle [^>]*fill="#440154"/);
  });

  it('sites in one region are framed regionally, unless the world is asked for', async () => {
    const spread = (svg: string) => {
      const xs = [...svg.matchAll(/<circle cx="([\d.]+)"/g)].map((m) => Number(m[1]));
      return Math.max(...xs) - Math.min(...xs);
    };
    const regional = await siteMapSvg({ points, valueLabel: 'x', caption: [] });
    const world = await siteMapSvg({ points, valueLabel: 'x', caption: [], extent: 'world' });
    expect(spread(regional)).toBeGreaterThan(3 * spread(world));
  });

  it('a site without a value is drawn hollow and named in the legend', async () => {
    const svg = await siteMapSvg({ points: [...points, { site: 'Nullcove', latDeg: 45, lonDeg: 0, value: null }], valueLabel: 'x', caption: [] });
    expect(svg).toMatch(/<circle [^>]*fill="none"[^>]*><title>Nullcove: no value/);
    expect(svg).toContain('>no value</text>');
  });

  it('gapstack sites map writes an SVG and a PNG', () => {
    const r = runCli(['sites', 'map', csvPath, '--colour', '4t-gain', '--out', join(work, 'gain')]);
    expect(r.code, r.stderr).toBe(0);
    expect(readFileSync(join(work, 'gain.svg'), 'utf8')).toMatch(/^<\?xml[^]*<svg[^]*4T over 2T yield/);
    expect(readFileSync(join(work, 'gain.png')).subarray(0, 8).toString('hex')).toBe('89504e470d0a1a0a'); // PNG signature (ISO/IEC 15948)
    const data = JSON.parse(readFileSync(join(work, 'gain.json'), 'utf8'));
    expect(data.points.map((p: { site: string }) => p.site)).toEqual(['Gullhaven', 'Redmarsh', 'Sunfold']);
    expect(data.points[0].value).toBeCloseTo(2, 9);
    expect(readFileSync(join(work, 'gain.csv'), 'utf8').split('\n')[0]).toBe('site,lat_deg,lon_deg,value');
    const bad = runCli(['sites', 'map', csvPath, '--colour', 'nonsense', '--out', join(work, 'bad')]);
    expect(bad.code).toBe(2);
  }, 60_000);
});
