/** Report details that depend on the design: per-wiring map grids, map size limits, wording. */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { reportCommand } from '../../src/cli/report-command.js';
import { UserError } from '../../src/errors.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-details-'));

/** Writes a design and returns its path. */
function design(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

/** The page's text with handlebars' entity escapes undone. */
function plain(html: string): string {
  return html.replace(/&#x3D;/g, '=').replace(/&quot;/g, '"').replace(/&#x27;/g, "'").replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');
}

async function report(name: string, text: string): Promise<string> {
  const out = join(dir, name.replace(/\.yaml$/, ''), 'report.html');
  await reportCommand({ design: design(name, text), output: out, figures: join(dir, name.replace(/\.yaml$/, ''), 'figures') });
  return plain(readFileSync(out, 'utf8'));
}

describe('assumptions list the map grid of every wiring', () => {
  test('wirings whose default map steps differ each get a line', async () => {
    const html = await report(
      'grids.yaml',
      'name: grids\nsubcells:\n  - range: [1.7, 2.1]\n  - range: [1.2, 1.6]\n  - gap: 0.7\nwirings: [series, "groups:1+2/3"]\nsearch:\n  step: 0.02\nmap:\n  pairs:\n    - axes: [1, 2]\n      x: [1.6, 2.2]\n      y: [1.1, 1.7]\n',
    );
    const lines = [...html.matchAll(/Map of subcells 1 and 2[^<]*/g)].map((m) => m[0]);
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^Map of subcells 1 and 2, series: 10\.0 meV grid/);
    expect(lines[1]).toMatch(/^Map of subcells 1 and 2, groups:1\+2\/3: 20\.0 meV grid/);
  }, 60_000);
});

describe('the map point limit', () => {
  test('applies to default map axes too, naming map.step', async () => {
    const p = design('fine.yaml', 'name: fine\nsubcells:\n  - range: [1.5, 2.0]\n  - gap: 1.12\nwirings: [series]\nsearch:\n  step: 0.02\nmap:\n  step: 0.001\n');
    const err = await reportCommand({ design: p, output: join(dir, 'fine', 'report.html'), figures: join(dir, 'fine', 'figures') }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(UserError);
    expect((err as Error).message).toMatch(/fine\.yaml: map\.step: \d+ points along the default x axis .*at most 401/);
  }, 60_000);
});

describe('long subcell labels', () => {
  test('map axis titles fall back to the subcell number; legend items are cut with an ellipsis', async () => {
    const long = 'a very long description of the bottom absorber, its texture and its contacts'.padEnd(80, '.');
    expect(long).toHaveLength(80);
    const html = await report(
      'long.yaml',
      `name: long\nsubcells:\n  - label: top\n    range: [1.5, 2.0]\n  - label: "${long}"\n    gap: 1.12\nwirings: [series]\nsearch:\n  step: 0.02\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 2]\n      x: [1.4, 2.1]\n      y: [0.9, 1.3]\n`,
    );
    const map = /<svg[^>]*id="map-series-1-2"[\s\S]*?<\/svg>/.exec(html)?.[0] ?? '';
    expect(map).toContain('>gap of subcell 1 (top) [eV]<');
    expect(map).toContain('>gap of subcell 2 [eV]<');
    expect(map).not.toContain(`>gap of subcell 2 (${long}) [eV]<`);
    const spectrum = /<svg[^>]*id="spectrum-series"[\s\S]*?<\/svg>/.exec(html)?.[0] ?? '';
    const item = /<text[^>]*>(2: [^<]*)<\/text>/.exec(spectrum)?.[1] ?? '';
    expect(item).toMatch(/^2: a very long description of…, 1\.120 eV, J_gen/);
    // The full label stays available as the item's tooltip.
    expect(spectrum).toContain(`<title>2: ${long}, 1.120 eV`);
  }, 60_000);
});

describe('the question', () => {
  test('names the concentration and uses the singular for one profiled subcell', async () => {
    const html = await report(
      'suns.yaml',
      'name: suns\nspectrum:\n  source: am1.5g\n  suns: 10\nsubcells:\n  - range: [1.6, 2.0]\n  - range: [1.1, 1.4]\n  - gap: 0.7\nwirings: [series]\nsearch:\n  step: 0.04\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 3]\n      x: [1.5, 2.1]\n      y: [0.6, 0.9]\n',
    );
    expect(html).toMatch(/under AM1\.5G \(ASTM G173-03 global tilt\) at 10 suns \(\d+\.\d W\/m²\)/);
    expect(html).toContain('subcell 2 maximised at every point');
  }, 60_000);
});
