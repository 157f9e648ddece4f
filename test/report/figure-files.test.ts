/**
 * The report's figures folder: PNGs rendered on the thread pool while charts are
 * drawn are the same bytes as the one-at-a-time renderer makes.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadDesign } from '../../src/design/index.js';
import { buildReport, type Chart } from '../../src/report/build.js';
import { figureFilesAsync, standaloneSvg, startPng, svgToPng } from '../../src/report/figures.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-figure-files-'));

describe('figure files with PNGs started as each chart is drawn', () => {
  test('every chart is announced once, and the files PNGs equal the one-at-a-time renderer’s, byte for byte', async () => {
    const design = join(dir, 'quick.yaml');
    writeFileSync(design, 'name: invented figure-files check\nspectrum: am1.5g\nsubcells:\n  - label: top\n    range: [1.5, 2.0]\n  - label: bottom\n    gap: 1.12\nwirings: [series]\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 2]\n      x: [1.4, 2.1]\n      y: [0.9, 1.3]\n');
    const announced: Chart[] = [];
    const built = buildReport(await loadDesign(design), {
      date: new Date(0),
      onChart: (c) => {
        announced.push(c);
        startPng(c.svg);
      },
    });
    expect(announced.map((c) => c.name)).toEqual(built.charts.map((c) => c.name));
    const files = await figureFilesAsync(built.charts, built.summary);
    expect(files.map((f) => f.name)).toEqual([...built.charts.flatMap((c) => ['svg', 'png', 'csv', 'json'].map((e) => `${c.name}.${e}`)), 'summary.json']);
    for (const c of built.charts) {
      const png = files.find((f) => f.name === `${c.name}.png`)?.data as Uint8Array;
      expect(Buffer.from(png).equals(Buffer.from(svgToPng(standaloneSvg(c.svg)))), c.name).toBe(true);
    }
  }, 120_000);
});
