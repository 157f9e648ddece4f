/**
 * The chart fonts (src/report/chart-fonts.ts): the build's subset of DejaVu
 * Sans makes the same PNG bytes as the full faces, for every chart of the
 * example report and for text outside the subset (resvg falls back to the
 * full face). Needs DejaVu installed (Debian's fonts-dejavu-core), as the
 * subset does; without it charts use the system fonts and there is nothing to
 * compare.
 */
import { existsSync, readFileSync } from 'node:fs';
import { Resvg } from '@resvg/resvg-js';
import { describe, expect, it } from 'vitest';
import { loadDesign } from '../../src/design/index.js';
import { buildReport } from '../../src/report/build.js';
import { chartFontFiles, DEJAVU_FACES, SUBSET_FACE, subsetFileOf, subsetMadeFrom, subsetNoteOf } from '../../src/report/chart-fonts.js';
import { pngRenderOptions, standaloneSvg } from '../../src/report/figures.js';

const installed = DEJAVU_FACES.every((f) => existsSync(f));

/** A PNG as the figures folder renders it, with the given font files. */
function png(svg: string, fontFiles: string[]): Buffer {
  const options = pngRenderOptions();
  expect(options.font?.fontFiles).toEqual(chartFontFiles());
  return new Resvg(svg, { ...options, font: { ...options.font, fontFiles } }).render().asPng();
}

describe.skipIf(!installed)('the chart font subset', () => {
  it('the build made it of the regular face, and it is listed before the full faces', () => {
    expect(chartFontFiles()).toEqual([subsetFileOf(SUBSET_FACE), ...DEJAVU_FACES]);
    expect(chartFontFiles(false)).toEqual(DEJAVU_FACES);
    expect(readFileSync(subsetFileOf(SUBSET_FACE)).length).toBeLessThan(readFileSync(SUBSET_FACE).length / 4);
  });

  it('keeps the copyright and licence names of the face it comes from', () => {
    // Name strings are UTF-16BE in the Windows-platform records of the name table.
    const utf16be = (s: string) => Buffer.from(s, 'utf16le').swap16();
    const sub = readFileSync(subsetFileOf(SUBSET_FACE));
    const full = readFileSync(SUBSET_FACE);
    for (const name of ['Copyright', 'DejaVu', 'Bitstream']) {
      expect(full.includes(utf16be(name)), `${name} in the full face`).toBe(true);
      expect(sub.includes(utf16be(name)), `${name} in the subset`).toBe(true);
    }
  });

  it('gives the same PNG bytes as the full faces for every chart of the example report', async () => {
    const built = buildReport(await loadDesign('examples/perovskite-silicon.yaml'), { date: new Date(0) });
    expect(built.charts.length).toBeGreaterThan(4);
    for (const c of built.charts) {
      const svg = standaloneSvg(c.svg);
      expect(png(svg, chartFontFiles()).equals(png(svg, chartFontFiles(false))), c.name).toBe(true);
    }
  }, 120_000);

  it('falls back to the full faces, with the same bytes, for characters it leaves out, in every weight and style', () => {
    for (const weight of ['normal', 'bold', '300']) {
      for (const style of ['normal', 'italic']) {
        const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="260" height="40"><text x="5" y="25" font-family="DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif" font-weight="${weight}" font-style="${style}" font-size="14">Жизнь ∮ ℏ Ա ✓ Ω ≥ η λ µ ° × −</text></svg>`;
        expect(png(svg, chartFontFiles()).equals(png(svg, chartFontFiles(false))), `${weight} ${style}`).toBe(true);
      }
    }
  });

  it('draws the missing-glyph box, as the full face does, for characters no DejaVu face has', () => {
    const svg = '<svg xmlns="http://www.w3.org/2000/svg" width="200" height="40"><text x="5" y="25" font-size="14">a漢 가 ア ก</text></svg>';
    const withSubset = png(svg, chartFontFiles());
    expect(withSubset.equals(png(svg, chartFontFiles(false)))).toBe(true);
    // And the box is drawn: the same text without those characters gives other bytes.
    expect(withSubset.equals(png(svg.replace('a漢 가 ア ก', 'a'), chartFontFiles()))).toBe(false);
  });

  it('is used only with the face it was made from (size and SHA-256 in its note)', () => {
    const note = readFileSync(subsetNoteOf(SUBSET_FACE), 'utf8');
    const face = readFileSync(SUBSET_FACE);
    expect(subsetMadeFrom(note, face)).toBe(true);
    const other = Buffer.from(face);
    other[other.length - 1] ^= 1;
    expect(subsetMadeFrom(note, other)).toBe(false);
    expect(subsetMadeFrom(note, face.subarray(1))).toBe(false);
  });
});
