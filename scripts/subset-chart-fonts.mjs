#!/usr/bin/env node
/**
 * Build step: a subset of the regular chart font into dist/fonts/ (see
 * src/report/chart-fonts.ts for why), made with HarfBuzz's subsetter (the
 * harfbuzzjs WebAssembly build). Runs after tsc, from the compiled face and
 * list of blocks. Without DejaVu installed there is nothing to subset and
 * charts render with the system fonts, as before.
 *
 * Kept: the code points of SUBSET_BLOCKS and the glyphs layout reaches from
 * them, every layout feature, the hinting, the names HarfBuzz keeps (ids 0–6)
 * plus the licence and its URL (13, 14), and the outline of the missing-glyph
 * box (.notdef), which HarfBuzz empties by default: without it a character
 * no face has would vanish instead of showing as a box. Beside the subset, a
 * note of the face it came from (size and SHA-256), so a different face
 * installed later is not mixed with it.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { SUBSET_BLOCKS, SUBSET_DIR, SUBSET_FACE, subsetFileOf, subsetNoteOf } from '../dist/report/chart-fonts.js';

// hb-subset.h
const HB_MEMORY_MODE_WRITABLE = 2;
const HB_SUBSET_SETS_NAME_ID = 4;
const HB_SUBSET_SETS_LAYOUT_FEATURE_TAG = 6;
const HB_SUBSET_FLAGS_NOTDEF_OUTLINE = 0x40;

/** A TrueType face reduced to `codePoints`, as the bytes of a .ttf file. */
async function subset(font, codePoints, keepNameIds) {
  const wasm = createRequire(import.meta.url).resolve('harfbuzzjs/dist/harfbuzz-subset.wasm');
  const hb = (await WebAssembly.instantiate(readFileSync(wasm))).instance.exports;
  hb._initialize();
  const input = hb.hb_subset_input_create_or_fail();
  if (input === 0) throw new Error('HarfBuzz could not create a subset input');
  const fontPtr = hb.malloc(font.byteLength);
  new Uint8Array(hb.memory.buffer).set(font, fontPtr);
  const blob = hb.hb_blob_create(fontPtr, font.byteLength, HB_MEMORY_MODE_WRITABLE, 0, 0);
  const face = hb.hb_face_create(blob, 0);
  hb.hb_blob_destroy(blob);
  try {
    const features = hb.hb_subset_input_set(input, HB_SUBSET_SETS_LAYOUT_FEATURE_TAG);
    hb.hb_set_clear(features);
    hb.hb_set_invert(features); // every layout feature
    const names = hb.hb_subset_input_set(input, HB_SUBSET_SETS_NAME_ID);
    for (const id of keepNameIds) hb.hb_set_add(names, id);
    hb.hb_subset_input_set_flags(input, hb.hb_subset_input_get_flags(input) | HB_SUBSET_FLAGS_NOTDEF_OUTLINE);
    const unicodes = hb.hb_subset_input_unicode_set(input);
    for (const c of codePoints) hb.hb_set_add(unicodes, c);
    const out = hb.hb_subset_or_fail(face, input);
    if (out === 0) throw new Error('HarfBuzz could not subset the face');
    const result = hb.hb_face_reference_blob(out);
    const bytes = Buffer.from(new Uint8Array(hb.memory.buffer, hb.hb_blob_get_data(result, 0), hb.hb_blob_get_length(result)));
    hb.hb_blob_destroy(result);
    hb.hb_face_destroy(out);
    if (bytes.length === 0) throw new Error('HarfBuzz made an empty subset');
    return bytes;
  } finally {
    hb.hb_subset_input_destroy(input);
    hb.hb_face_destroy(face);
    hb.free(fontPtr);
  }
}

rmSync(SUBSET_DIR, { recursive: true, force: true });
if (existsSync(SUBSET_FACE)) {
  mkdirSync(SUBSET_DIR, { recursive: true });
  const font = readFileSync(SUBSET_FACE);
  const codePoints = SUBSET_BLOCKS.flatMap(([a, b]) => Array.from({ length: b - a + 1 }, (_, i) => a + i));
  writeFileSync(subsetFileOf(SUBSET_FACE), await subset(font, codePoints, [0, 1, 2, 3, 4, 5, 6, 13, 14]));
  const note = { face: SUBSET_FACE, bytes: font.length, sha256: createHash('sha256').update(font).digest('hex') };
  writeFileSync(subsetNoteOf(SUBSET_FACE), `${JSON.stringify(note, null, 2)}\n`);
}
