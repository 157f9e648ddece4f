import { existsSync, readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { BUILTIN_SPECTRUM_FILES, parseBuiltinTable, am0, am15d, am15g } from '../../src/light/sources.js';

// Internal consistency: the build's packs of the shipped ASTM G173-03 tables hold exactly what
// reading the files gives (the integrals of the tables themselves are checked in standard-spectra.test.ts).

describe('built-in spectra packed at build time', () => {
  test.each(BUILTIN_SPECTRUM_FILES.map((f) => [f]))('%s: the pack equals the parsed file, value for value, with its SHA-256', (file) => {
    const packPath = `dist/spectra/${file}.json`;
    expect(existsSync(packPath), 'npm run build makes the packs').toBe(true);
    const pack = JSON.parse(readFileSync(packPath, 'utf8'));
    const parsed = parseBuiltinTable(file);
    expect(pack.sha256).toBe(parsed.sha256);
    expect(pack.wavelengthNm).toEqual(parsed.wavelengthNm);
    expect(pack.irradiance).toEqual(parsed.irradiance);
  });

  test('the spectra the commands use come with their files’ SHA-256 and arrays', () => {
    for (const [s, file] of [[am15g(), 'am1.5g.tsv'], [am15d(), 'am1.5d.tsv'], [am0(), 'am0.tsv']] as const) {
      const parsed = parseBuiltinTable(file);
      expect(s.sha256).toBe(parsed.sha256);
      expect(Array.from(s.wavelengthNm)).toEqual(parsed.wavelengthNm);
      expect(Array.from(s.irradiance)).toEqual(parsed.irradiance);
    }
  });
});
