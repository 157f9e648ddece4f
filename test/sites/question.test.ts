/**
 * The per-site question reuses the existing search and comparison: a site whose
 * light is the demo ensemble gets exactly what `gapstack optimize --ensemble`
 * answers for the same question (gaps, yield-weighted efficiency, AM1.5G loss).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadDesign } from '../../src/design/index.js';
import { loadEnsemble } from '../../src/light/ensemble.js';
import { insolationKwhM2, questionSha256, siteQuestion, wiringPrefix } from '../../src/sites/question.js';
import { ROOT, runJson } from '../helpers/cli.js';

const MANIFEST = join(ROOT, 'examples/ensemble-demo/manifest.yaml');
const work = mkdtempSync(join(tmpdir(), 'gapstack-question-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

describe('site question', () => {
  it('answers what optimize --ensemble answers for the 2T fixed-bottom question', async () => {
    const designPath = join(work, 'design.yaml');
    writeFileSync(designPath, [
      'name: invented two-terminal question',
      `ensemble: ${JSON.stringify(MANIFEST)}`,
      'temperature: 300',
      'subcells:',
      '  - label: top',
      '    free: true',
      '  - label: bottom',
      '    gap: 1.12',
      'wirings: [series]',
      '',
    ].join('\n'));
    const design = await loadDesign(designPath);
    const members = loadEnsemble(MANIFEST, { defaultTempK: 300 }).members;
    const q = siteQuestion(design, async () => ({ name: 'Demo Year', latDeg: 12.5, lonDeg: -3.25, spectra: members }));
    expect(q.wirings).toEqual(['2t']);
    const row = await q.evaluate('unused.epw');
    const cli = runJson(['optimize', '--cells', '2', '--fix', '2=1.12', '--wiring', 'series', '--ensemble', MANIFEST]);
    const w = row.wirings[0]!;
    expect(w.gapsEv[0]).toBeCloseTo(cli.best.gaps_ev[0], 5);
    expect(w.gapsEv[1]).toBeCloseTo(1.12, 9);
    expect(w.yieldEfficiency).toBeCloseTo(cli.am15g_comparison.ensemble_best_yield_efficiency, 8);
    expect(w.am15gLoss).toBeCloseTo(cli.am15g_comparison.loss_rel, 7);
    // Insolation is Σ hours·P_in; the yield is the yield-weighted efficiency times it (definition, PHYSICS.md §8).
    const poa = insolationKwhM2(members);
    expect(row.poaKwhM2).toBe(poa);
    expect(w.yieldKwhM2).toBeCloseTo(w.yieldEfficiency * poa, 9);
    expect(row).toMatchObject({ name: 'Demo Year', latDeg: 12.5, lonDeg: -3.25 });
  }, 300_000);

  it('wiring columns use terminal counts where the trade does', () => {
    expect(wiringPrefix({ key: 'series', slug: 'series' })).toBe('2t');
    expect(wiringPrefix({ key: 'independent', slug: 'independent' })).toBe('4t');
    expect(wiringPrefix({ key: '3t', slug: '3t' })).toBe('3t');
    expect(wiringPrefix({ key: 'vm:1:2', slug: 'vm-1-2' })).toBe('vm-1-2');
  });

  it('the question hash changes with the design and with any option, not with option order', () => {
    const a = questionSha256('d'.repeat(64), { tilt: 30, azimuth: 180 });
    expect(questionSha256('d'.repeat(64), { azimuth: 180, tilt: 30 })).toBe(a);
    expect(questionSha256('d'.repeat(64), { tilt: 31, azimuth: 180 })).not.toBe(a);
    expect(questionSha256('e'.repeat(64), { tilt: 30, azimuth: 180 })).not.toBe(a);
  });
});
