import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { designSchema } from '../../src/design/schema.js';
import compiled from '../../src/design/validate-design.generated.js';

describe('the design schema is compiled ahead of time', () => {
  test('the built validator is exactly what the generator makes from the current schema (never edited by hand)', () => {
    const out = join(mkdtempSync(join(tmpdir(), 'gapstack-schema-')), 'v.ts');
    execFileSync(process.execPath, ['scripts/compile-design-schema.mjs', out]);
    const sha = (path: string) => createHash('sha256').update(readFileSync(path)).digest('hex');
    // Compared by hash: on a mismatch, run `npm run generate` (every build does) rather than read 70 kB of code.
    expect(sha(out)).toBe(sha('src/design/validate-design.generated.ts'));
  });

  test('it accepts and rejects the same documents, with the same errors, as ajv compiling the schema at run time', () => {
    const live = new Ajv2020({ allErrors: true, verbose: true, strict: true }).compile(designSchema());
    const documents: unknown[] = [
      { name: 'two cells', subcells: [{}, { gap: 1.12 }] },
      { name: '', subcells: [] },
      { name: 'x', subcells: [{ gap: 'high' }], unknown: 1 },
      { subcells: Array.from({ length: 7 }, () => ({})) },
      { name: 'x', subcells: [{}], spectrum: { source: 'am1.5g', suns: -1 } },
    ];
    for (const d of documents) {
      const a = live(d);
      const b = (compiled as typeof live)(d);
      expect(b).toBe(a);
      const strip = (errs: typeof live.errors) => (errs ?? []).map((e) => ({ keyword: e.keyword, instancePath: e.instancePath, params: e.params }));
      expect(strip((compiled as typeof live).errors)).toEqual(strip(live.errors));
    }
  });
});
