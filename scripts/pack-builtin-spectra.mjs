#!/usr/bin/env node
/**
 * Build step (after tsc): pack each shipped spectrum table (spectra/*.tsv) as
 * its parsed columns and the SHA-256 of its file into dist/spectra/<file>.json,
 * so every command reads the built-in light without splitting text or hashing
 * at start. The parse is the compiled reader's own (parseBuiltinTable), so the
 * pack holds exactly what reading the file gives; a test compares the two.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const { BUILTIN_SPECTRUM_FILES, parseBuiltinTable } = await import(`${root}dist/light/sources.js`);
mkdirSync(`${root}dist/spectra`, { recursive: true });
for (const file of BUILTIN_SPECTRUM_FILES) {
  // JSON keeps every double exactly (shortest round-trip form).
  writeFileSync(`${root}dist/spectra/${file}.json`, `${JSON.stringify(parseBuiltinTable(file))}\n`);
}
