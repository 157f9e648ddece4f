/**
 * The batch over sites as plumbing: parts, shards, resume and merge. The
 * per-site answer here is a small test double (site metadata and annual GHI
 * read straight from each EPW), not the physics: these tests prove that sharded
 * and merged output equals the unsharded run byte for byte, whatever the
 * engine computes per site.
 */
import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { UserError } from '../../src/errors.js';
import { mergeParts } from '../../src/sites/merge.js';
import { columnsFor, csvRow, CSV_HEADER_LINES, jsonRow, type SiteResult } from '../../src/sites/parts.js';
import { listWeatherFiles, partPaths, runSites, type SiteQuestion } from '../../src/sites/run.js';
import { parseShard, WHOLE } from '../../src/sites/shard.js';
import { ROOT } from '../helpers/cli.js';

const SITES = join(ROOT, 'examples/sites');
const work = mkdtempSync(join(tmpdir(), 'gapstack-batch-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

/** Test double of the per-site engine: deterministic numbers derived from the file itself. */
function fakeQuestion(hash = 'a'.repeat(64), calls: string[] = []): SiteQuestion {
  return {
    questionSha256: hash,
    wirings: ['2t', '4t'],
    evaluate: async (path) => {
      calls.push(path);
      const lines = readFileSync(path, 'utf8').split('\n');
      const loc = lines[0]!.split(',');
      const ghi = lines.slice(8).filter(Boolean).reduce((s, l) => s + Number(l.split(',')[13]), 0) / 1000;
      const top = 1.6 + (ghi % 100) / 1000;
      return {
        name: loc[1]!,
        latDeg: Number(loc[6]),
        lonDeg: Number(loc[7]),
        poaKwhM2: ghi * 1.1,
        wirings: [
          { wiring: '2t', gapsEv: [top, 1.12], yieldKwhM2: ghi * 0.4, yieldEfficiency: 0.4, am15gLoss: 0.01 },
          { wiring: '4t', gapsEv: [top + 0.1, 1.12], yieldKwhM2: ghi * 0.41, yieldEfficiency: 0.41, am15gLoss: 0.002 },
        ],
      };
    },
  };
}

const files = listWeatherFiles([SITES]);
const run = (outDir: string, shard = WHOLE, q = fakeQuestion(), list = files) => runSites({ files: list, outDir, shard, question: q, version: '0.0.0-test' });

describe('sites batch', () => {
  it('a folder lists its weather files', () => {
    expect(files).toHaveLength(12);
    expect(() => listWeatherFiles([join(work, 'nowhere')])).toThrow(UserError);
  });

  it('sharded runs merged are byte-identical to the unsharded run (CSV and JSON Lines)', async () => {
    const whole = join(work, 'whole');
    const s = await run(whole);
    expect(s.computed).toBe(12);
    const sharded = join(work, 'sharded');
    const counts: number[] = [];
    for (const k of [1, 2, 3]) counts.push((await run(sharded, parseShard(`${k}/3`))).shardSites);
    expect(counts.reduce((a, b) => a + b, 0)).toBe(12);
    const parts = (ext: string) => [1, 2, 3].map((k) => join(sharded, `part-${k}-of-3.${ext}`));
    // Merge order must not matter either.
    mergeParts(parts('csv').reverse(), join(work, 'merged.csv'));
    mergeParts(parts('jsonl'), join(work, 'merged.jsonl'));
    const ref = partPaths(whole, WHOLE);
    expect(readFileSync(join(work, 'merged.csv')).equals(readFileSync(ref.csv))).toBe(true);
    expect(readFileSync(join(work, 'merged.jsonl')).equals(readFileSync(ref.jsonl))).toBe(true);
    // One row per site plus the header lines, and JSON Lines that parse.
    const jsonl = readFileSync(ref.jsonl, 'utf8').trim().split('\n').map((l) => JSON.parse(l));
    expect(jsonl).toHaveLength(13);
    expect(jsonl[0].columns).toEqual(columnsFor(['2t', '4t']));
    expect(jsonl[1]['2t_gaps_ev']).toHaveLength(2);
  }, 120_000);

  it('the partition does not depend on the order or the names the files are listed under', async () => {
    const renamed = join(work, 'renamed');
    cpSync(SITES, renamed, { recursive: true });
    for (const f of readdirSync(renamed)) if (f.endsWith('.epw')) cpSync(join(renamed, f), join(renamed, `x-${f}`));
    for (const f of readdirSync(renamed)) if (f.endsWith('.epw') && !f.startsWith('x-')) rmSync(join(renamed, f));
    const a = join(work, 'order-a');
    const b = join(work, 'order-b');
    await run(a, parseShard('2/3'));
    const s = await run(b, parseShard('2/3'), fakeQuestion(), listWeatherFiles([renamed]).reverse());
    const keys = (dir: string) => readFileSync(join(dir, 'part-2-of-3.csv'), 'utf8').split('\n').slice(CSV_HEADER_LINES).filter(Boolean).map((l) => l.split(',')[0]);
    expect(keys(b)).toEqual(keys(a));
    expect(s.shardSites).toBe(keys(a).length);
  }, 120_000);

  it('a rerun resumes: a half-written last row is redone, finished sites are skipped', async () => {
    const dir = join(work, 'resume');
    await run(dir);
    const ref = partPaths(dir, WHOLE);
    const full = { csv: readFileSync(ref.csv), jsonl: readFileSync(ref.jsonl) };
    // Cut the CSV inside its 10th row and the JSON after its 11th: as if stopped while writing.
    const csvLines = full.csv.toString().split('\n');
    truncateSync(ref.csv, csvLines.slice(0, CSV_HEADER_LINES + 9).join('\n').length + 1 + 20);
    const jsonLines = full.jsonl.toString().split('\n');
    truncateSync(ref.jsonl, jsonLines.slice(0, 1 + 11).join('\n').length + 1);
    const calls: string[] = [];
    const s = await run(dir, WHOLE, fakeQuestion(undefined, calls));
    expect(s.resumed).toBe(9);
    expect(s.computed).toBe(3);
    expect(calls).toHaveLength(3);
    expect(readFileSync(ref.csv).equals(full.csv)).toBe(true);
    expect(readFileSync(ref.jsonl).equals(full.jsonl)).toBe(true);
    // A complete part: nothing to compute.
    const again = await run(dir, WHOLE, fakeQuestion(undefined, calls));
    expect(again.computed).toBe(0);
    expect(calls).toHaveLength(3);
  }, 120_000);

  it('a rerun with a different question into the same folder is refused, not mixed', async () => {
    const dir = join(work, 'other-question');
    await run(dir, parseShard('1/2'));
    await expect(run(dir, parseShard('1/2'), fakeQuestion('b'.repeat(64)))).rejects.toThrow(/another run.*different questions/);
  }, 120_000);

  it('merge refuses different questions, missing or repeated shards, unfinished parts, mixed formats', async () => {
    const a = join(work, 'm-a');
    const b = join(work, 'm-b');
    await run(a, parseShard('1/2'));
    await run(a, parseShard('2/2'));
    await run(b, parseShard('2/2'), fakeQuestion('c'.repeat(64)));
    const out = join(work, 'm.csv');
    expect(() => mergeParts([join(a, 'part-1-of-2.csv'), join(b, 'part-2-of-2.csv')], out)).toThrow(/different questions/);
    expect(() => mergeParts([join(a, 'part-1-of-2.csv')], out)).toThrow(/shard 2\/2 missing/);
    expect(() => mergeParts([join(a, 'part-1-of-2.csv'), join(a, 'part-1-of-2.csv')], out)).toThrow(/both shard 1\/2/);
    expect(() => mergeParts([join(a, 'part-1-of-2.csv'), join(a, 'part-2-of-2.jsonl')], out)).toThrow(/cannot merge .csv and .jsonl/);
    const whole = join(work, 'm-whole');
    await run(whole);
    expect(() => mergeParts([join(a, 'part-1-of-2.csv'), join(whole, 'part-1-of-1.csv')], out)).toThrow(/different splits/);
    const p2 = join(a, 'part-2-of-2.csv');
    const text = readFileSync(p2, 'utf8');
    writeFileSync(p2, text.split('\n').slice(0, -2).join('\n') + '\n');
    expect(() => mergeParts([join(a, 'part-1-of-2.csv'), p2], out)).toThrow(UserError);
    expect(() => statSync(out)).toThrow(); // nothing written on refusal
    expect(() => mergeParts([join(work, 'notes.txt')], out)).toThrow(/\.csv or \.jsonl/);
  }, 120_000);
});

describe('part rows', () => {
  const row: SiteResult = {
    key: 'f'.repeat(64),
    file: 'a.epw',
    name: 'Gull Rock, "North"\nPoint',
    latDeg: -0.00001,
    lonDeg: 12.5,
    poaKwhM2: 1834.567,
    wirings: [{ wiring: '2t', gapsEv: [1.68123, 1.12], yieldKwhM2: 512.3456, yieldEfficiency: 0.312346, am15gLoss: 0.004321 }],
  };
  const cols = columnsFor(['2t']);

  it('CSV quotes names with commas and quotes, keeps one line per site, prints no "-0"', () => {
    expect(csvRow(row, cols)).toBe(`${'f'.repeat(64)},a.epw,"Gull Rock, ""North"" Point",0.0000,12.5000,1834.57,1.6812;1.1200,512.346,31.235,0.432\n`);
  });

  it('JSON Lines holds the same numbers as the CSV', () => {
    expect(JSON.parse(jsonRow(row, cols))).toEqual({
      site_key: 'f'.repeat(64), file: 'a.epw', site: 'Gull Rock, "North" Point', lat_deg: 0, lon_deg: 12.5, poa_kwh_m2: 1834.57,
      '2t_gaps_ev': [1.6812, 1.12], '2t_yield_kwh_m2': 512.346, '2t_efficiency_pct': 31.235, '2t_am15g_loss_pct': 0.432,
    });
  });
});

describe('sites batch edge cases', () => {
  it('identical weather files are one site; a site that cannot be answered stops the run naming its file, and a rerun resumes', async () => {
    const dir = join(work, 'dup-sites');
    cpSync(SITES, dir, { recursive: true });
    cpSync(join(dir, 'orvale.epw'), join(dir, 'zz-orvale-copy.epw'));
    const out = join(work, 'dup-out');
    const s = await run(out, WHOLE, fakeQuestion(), listWeatherFiles([dir]));
    expect(s.sitesTotal).toBe(12);
    expect(s.duplicates).toEqual([join(dir, 'zz-orvale-copy.epw')]);

    const failing = fakeQuestion('e'.repeat(64));
    const good = failing.evaluate;
    let calls = 0;
    failing.evaluate = async (path) => {
      if (++calls === 4) throw new UserError('no daylight hours to weigh');
      return good(path);
    };
    const out2 = join(work, 'fail-out');
    await expect(run(out2, WHOLE, failing)).rejects.toThrow(/\.epw: no daylight hours to weigh/);
    const again = await run(out2, WHOLE, fakeQuestion('e'.repeat(64)));
    expect(again.resumed).toBe(3);
    expect(again.computed).toBe(9);
  }, 120_000);
});
