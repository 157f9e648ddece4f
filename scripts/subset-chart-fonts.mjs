#!/usr/bin/env node
/**
 * Build step: a subset of the regular chart font into dist/fonts/ (see
 * src/report/chart-fonts.ts for why), made with subset-font (HarfBuzz's
 * subsetter). Runs after tsc, from the compiled face and list of blocks.
 * Without DejaVu installed there is nothing to subset and charts render with
 * the system fonts, as before.
 */
import { mkdirSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import subsetFont from 'subset-font';
import { SUBSET_BLOCKS, SUBSET_DIR, SUBSET_FACE, subsetFileOf } from '../dist/report/chart-fonts.js';

rmSync(SUBSET_DIR, { recursive: true, force: true });
if (existsSync(SUBSET_FACE)) {
  mkdirSync(SUBSET_DIR, { recursive: true });
  let text = '';
  for (const [a, b] of SUBSET_BLOCKS) for (let c = a; c <= b; c++) text += String.fromCodePoint(c);
  // Name ids 0, 13 and 14: copyright, licence and licence URL travel with the glyphs.
  const out = await subsetFont(readFileSync(SUBSET_FACE), text, { targetFormat: 'truetype', preserveNameIds: [0, 13, 14] });
  writeFileSync(subsetFileOf(SUBSET_FACE), out);
}
