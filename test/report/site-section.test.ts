import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadDesign } from '../../src/design/index.js';
import { loadSiteYear } from '../../src/light/site-year.js';
import { siteSection } from '../../src/report/site-section.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';
import { yieldForStack } from '../../src/stack/yield.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const LONG = 180_000;

describe('the report\'s site section', () => {
  test('monthly insolation and yield add up to the annual yield; every hour is a point of the APE scatter; CSV and JSON beside the SVG', () => {
    const site = loadSiteYear(join(ROOT, 'examples/sites/cinder-reach.epw'), { tiltDeg: 30, azimuthDeg: 180, tracking: 'none' });
    const stack = idealStack([1.8, 1.12], seriesWiring(2));
    const s = siteSection(site, stack, 'Series (2T)');
    const y = yieldForStack(stack, site.ensemble.members);
    const monthly = s.charts.find((c) => c.name === 'site-monthly')!;
    const months = (monthly.json.months as { poa_kwh_m2: number; yield_kwh_m2: number; hours: number }[]);
    expect(months).toHaveLength(12);
    expect(months.reduce((a, m) => a + m.yield_kwh_m2, 0)).toBeCloseTo(y.weightedPmaxWm2 / 1000, 1);
    expect(months.reduce((a, m) => a + m.poa_kwh_m2, 0)).toBeCloseTo(site.totals.poaKwhM2, 1);
    expect(months.reduce((a, m) => a + m.hours, 0)).toBe(site.totals.usedHours);
    expect(monthly.csv.trim().split('\n')).toHaveLength(14);
    expect(monthly.svg).toMatch(/<svg/);
    expect((monthly.svg.match(/class="gs-site-yield"/g) ?? []).length).toBe(12);
    const ape = s.charts.find((c) => c.name === 'site-ape-vs-irradiance')!;
    expect((ape.json.hours as unknown[]).length).toBe(site.totals.usedHours);
    expect(s.lines.join(' ')).toMatch(/Annual plane-of-array insolation [\d.]+ kWh\/m²; annual yield/);
  }, LONG);

  test('a design file with weather: resolves to the site year, material gaps not involved here stay put', async () => {
    const d = await loadDesign(join(ROOT, 'examples/perovskite-silicon-site.yaml'));
    expect(d.light.kind).toBe('ensemble');
    if (d.light.kind !== 'ensemble') return;
    expect(d.light.site?.site.name).toMatch(/Cinder Reach/);
    expect(d.spectra.length).toBe(d.light.site?.totals.usedHours);
    expect(d.light.summaryLines.join(' ')).toMatch(/all-sky approximation/);
    expect(d.wirings.every((w) => w.template.subcells.every((c) => c.dEgDtEvPerK === undefined))).toBe(true);
  }, LONG);
});
