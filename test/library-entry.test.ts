/**
 * The public entry (src/index.ts) in-process: what a script gets, and that a
 * report comes back as a string with its caution. The packed-package test
 * checks the same entry as installed from the tarball.
 */
import { describe, expect, it } from 'vitest';
import * as lib from '../src/index.js';

describe('the library entry', () => {
  it('exports the engine by area', () => {
    for (const name of [
      'am15g', 'resolveSpectrum', 'blackbodySpectrum', 'readSpectrumFile', 'loadEnsemble', 'ensembleSummary',
      'evaluateStack', 'idealStack', 'seriesWiring', 'independentWiring', 'parseWiring', 'yieldForStack',
      'buildObjective', 'searchGaps', 'runDesignSearch', 'computeMap', 'uniformAxis',
      'getFamily', 'listFamilies', 'gapFromComposition', 'compositionsForGap', 'gapAtTemperature', 'gapAtReference',
      'buildReportFromFile', 'buildReportFromText', 'ParameterError', 'UserError', 'toMaCm2',
    ]) {
      expect(typeof (lib as Record<string, unknown>)[name], name).toBe('function');
    }
    expect(lib.CAUTION).toMatch(/detailed-balance limits .* no substitute for certified measurement/);
  });

  it('a blackbody sun keeps its closed-form power, f·σ·T⁴', () => {
    // docs/PHYSICS.md §1: P_in = f·σ·T_s⁴; σ = 5.670374419e-8 W m⁻² K⁻⁴ (CODATA 2018), f = (R_sun/1 au)² = 2.1627e-5 (IAU nominal values).
    const s = lib.blackbodySpectrum({ tempK: 6000 });
    expect(s.pinWm2 / (2.1627e-5 * 5.670374419e-8 * 6000 ** 4)).toBeCloseTo(1, 4);
  });

  it('builds a report to a string, with the caution on the page', async () => {
    const r = await lib.buildReportFromFile('examples/perovskite-silicon.yaml', { date: new Date(0) });
    expect(r.html.startsWith('<!DOCTYPE html>') || r.html.startsWith('<!doctype html>')).toBe(true);
    expect(r.html).toContain('no substitute for certified measurement');
    expect(r.data.outcomes.length).toBeGreaterThan(0);
  }, 120_000);
});
