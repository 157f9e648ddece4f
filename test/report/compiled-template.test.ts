import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';

describe('the report template is precompiled ahead of time', () => {
  test('the built template is exactly what the generator makes from templates/report.hbs (never edited by hand)', () => {
    const out = join(mkdtempSync(join(tmpdir(), 'gapstack-template-')), 't.ts');
    execFileSync(process.execPath, ['scripts/compile-report-template.mjs', out]);
    const sha = (path: string) => createHash('sha256').update(readFileSync(path)).digest('hex');
    // On a mismatch, run `npm run generate` (every build does).
    expect(sha(out)).toBe(sha('src/report/report-template.generated.ts'));
  });

  test('the report modules load the Handlebars runtime only, never the template compiler', () => {
    const build = readFileSync('src/report/build.ts', 'utf8');
    expect(build).toMatch(/from 'handlebars\/runtime\.js'/);
    expect(build).not.toMatch(/from 'handlebars'/);
    expect(build).not.toMatch(/\.compile\(/);
  });
});
