/**
 * The fonts resvg draws chart text with. DejaVu Sans where Debian installs it
 * (fonts-dejavu-core); otherwise every system font.
 *
 * resvg reads a font file whole each time it shapes or outlines a piece of
 * text (about a dozen times per text element), so with the 0.7 MB faces most
 * of a chart's rasterising time went to copying font files: 0.14 s of system
 * time for the example report's eight charts. The build
 * (scripts/subset-chart-fonts.mjs) writes a subset of the regular face with
 * the scripts and symbols charts use into dist/fonts/, under the same family
 * name and with the copyright and licence names kept. It is listed first, so
 * resvg picks it for regular text; a character outside it falls back to the
 * full regular face listed next, and the PNGs come out the same bytes
 * (test/report/chart-fonts.test.ts). Bold (one label per map) keeps the full
 * face: resvg's fallback from a bold subset picked the regular face. The
 * subset is used only with the face it was made from (size and SHA-256 in
 * the note beside it), so a different DejaVu installed later is never mixed
 * with it.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { fileURLToPath } from 'node:url';

export const DEJAVU_FACES = ['/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf', '/usr/share/fonts/truetype/dejavu/DejaVuSans-Bold.ttf'];

/** The face the build subsets: the regular one. */
export const SUBSET_FACE = DEJAVU_FACES[0];

/** Where the build writes the subset (from src/, dist/report/ and dist/bundle/ alike). */
export const SUBSET_DIR = fileURLToPath(new URL('../../dist/fonts/', import.meta.url));

/**
 * Unicode blocks in the subset: Basic Latin, Latin-1 Supplement, Latin
 * Extended-A, Greek and Coptic, General Punctuation, Superscripts and
 * Subscripts, Arrows, Mathematical Operators, Geometric Shapes.
 */
export const SUBSET_BLOCKS: readonly (readonly [number, number])[] = [
  [0x20, 0x7e],
  [0xa0, 0x17f],
  [0x370, 0x3ff],
  [0x2000, 0x206f],
  [0x2070, 0x209f],
  [0x2190, 0x21ff],
  [0x2200, 0x22ff],
  [0x25a0, 0x25ff],
];

/** The subset file the build makes of a face. */
export function subsetFileOf(face: string): string {
  return `${SUBSET_DIR}${basename(face, '.ttf')}-subset.ttf`;
}

/** The note the build writes beside a subset: the face it came from, its size and SHA-256. */
export function subsetNoteOf(face: string): string {
  return `${SUBSET_DIR}${basename(face, '.ttf')}-subset.json`;
}

/** Whether a subset's note (the JSON the build writes) names this face: same size and SHA-256. */
export function subsetMadeFrom(noteText: string, face: Uint8Array): boolean {
  const made = JSON.parse(noteText) as { bytes?: unknown; sha256?: unknown };
  return face.length === made.bytes && createHash('sha256').update(face).digest('hex') === made.sha256;
}

let subsetMatches: boolean | undefined;

/** Whether the built subset exists and was made from the face installed now (checked once per process). */
function subsetUsable(): boolean {
  if (subsetMatches === undefined) {
    const note = subsetNoteOf(SUBSET_FACE);
    subsetMatches = existsSync(subsetFileOf(SUBSET_FACE)) && existsSync(note) && existsSync(SUBSET_FACE) && subsetMadeFrom(readFileSync(note, 'utf8'), readFileSync(SUBSET_FACE));
  }
  return subsetMatches;
}

/** Font files for resvg, the subset (when built from the installed face) first; with `subset` false, the full faces only. Empty when DejaVu is not installed. */
export function chartFontFiles(subset = true): string[] {
  const full = DEJAVU_FACES.filter((f) => existsSync(f));
  return subset && subsetUsable() ? [subsetFileOf(SUBSET_FACE), ...full] : full;
}
