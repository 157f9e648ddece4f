/**
 * gapstack as a package: pack it as npm would publish it, install the tarball
 * into a fresh project, import it by name, type-check a script against the
 * shipped declarations, and check one number against the specification.
 * Needs dist/ built (npm test's pretest does it) and a warm npm cache (npm ci).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROOT } from '../helpers/cli.js';

const TSC = join(ROOT, 'node_modules', 'typescript', 'bin', 'tsc');
const MINUTES = 60_000;

/** The script a user would write; the @ts-expect-error line fails type-checking if the declarations were loose (any). */
const SCRIPT_TS = `import { am15g, evaluateStack, idealStack, seriesWiring, toMaCm2, type StackResult } from 'gapstack';

const result: StackResult = evaluateStack(idealStack([1.729, 1.12], seriesWiring(2)), am15g());
const jsc: number | null = result.stackJscAm2 === null ? null : toMaCm2(result.stackJscAm2);
console.log(JSON.stringify({ efficiency: result.efficiency, jsc }));

// @ts-expect-error gaps are numbers [eV], not text
evaluateStack(idealStack(['1.7'], seriesWiring(1)), am15g());
`;

/** The README's "Use it from TypeScript" example and the output printed under it. */
function readmeExample(): { script: string; output: string } {
  const m = /## Use it from TypeScript[\s\S]*?```ts\n([\s\S]*?)```[\s\S]*?```text\n([\s\S]*?)```/.exec(readFileSync(join(ROOT, 'README.md'), 'utf8'));
  if (!m) throw new Error('README.md has no "Use it from TypeScript" example with its output');
  return { script: m[1], output: m[2] };
}

const SCRIPT_JS = `import { am15g, evaluateStack, idealStack, seriesWiring } from 'gapstack';
const result = evaluateStack(idealStack([1.729, 1.12], seriesWiring(2)), am15g());
console.log(JSON.stringify({ efficiency: result.efficiency }));
`;

/** A report through the installed library, with the example the package ships. */
const REPORT_JS = `import { buildReportFromFile } from 'gapstack';
const r = await buildReportFromFile('node_modules/gapstack/examples/perovskite-silicon.yaml', { date: new Date(0) });
console.log(JSON.stringify({ charts: (r.html.match(/<svg[ >]/g) ?? []).length, caution: r.html.includes('no substitute for certified measurement') }));
`;

/** Preloaded with --require: names every jsdom module Node's CommonJS loader is asked for (jsdom is CommonJS). */
const JSDOM_WATCH_CJS = `const Module = require('node:module');
const load = Module._load;
Module._load = function (request, ...rest) {
  if (/(^|[\\/])jsdom([\\/]|$)/.test(request)) process.stderr.write('jsdom loaded: ' + request + '\\n');
  return load.call(this, request, ...rest);
};
`;

describe('the packed package', () => {
  let dir = '';

  beforeAll(() => {
    if (!existsSync(join(ROOT, 'dist', 'index.d.ts'))) throw new Error('dist/ is not built: run `npx tsc -p tsconfig.json` (npm test does it first)');
    dir = mkdtempSync(join(tmpdir(), 'gapstack-consumer-'));
    const packed = JSON.parse(execFileSync('npm', ['pack', '--ignore-scripts', '--json', '--pack-destination', dir], { cwd: ROOT, encoding: 'utf8' })) as { filename: string }[];
    writeFileSync(join(dir, 'package.json'), JSON.stringify({ name: 'consumer', private: true, type: 'module' }));
    execFileSync('npm', ['install', '--prefer-offline', '--no-audit', '--no-fund', '--ignore-scripts', join(dir, packed[0].filename)], { cwd: dir, encoding: 'utf8', stdio: 'pipe' });
    writeFileSync(join(dir, 'use.ts'), SCRIPT_TS);
    writeFileSync(join(dir, 'use.mjs'), SCRIPT_JS);
    writeFileSync(join(dir, 'readme.ts'), readmeExample().script);
    writeFileSync(join(dir, 'report.mjs'), REPORT_JS);
    writeFileSync(join(dir, 'jsdom-watch.cjs'), JSDOM_WATCH_CJS);
    const compilerOptions = { target: 'ES2022', module: 'NodeNext', moduleResolution: 'NodeNext', strict: true, types: [] };
    writeFileSync(join(dir, 'tsconfig.json'), JSON.stringify({ compilerOptions: { ...compilerOptions, noEmit: true }, files: ['use.ts', 'readme.ts'] }));
    writeFileSync(join(dir, 'tsconfig.readme.json'), JSON.stringify({ compilerOptions: { ...compilerOptions, outDir: 'out' }, files: ['readme.ts'] }));
  }, 10 * MINUTES);

  afterAll(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('declares an ESM entry with types, and keeps the command line at bin', () => {
    const pkg = JSON.parse(readFileSync(join(dir, 'node_modules', 'gapstack', 'package.json'), 'utf8'));
    expect(pkg.exports['.']).toEqual({ types: './dist/index.d.ts', import: './dist/bundle/index.js', default: './dist/bundle/index.js' });
    expect(pkg.types).toBe('./dist/index.d.ts');
    expect(pkg.bin).toEqual({ gapstack: 'bin/gapstack.cjs' });
    expect(existsSync(join(dir, 'node_modules', 'gapstack', 'dist', 'index.d.ts'))).toBe(true);
  });

  it('runs the installed command line (its bundles and code caches came in the tarball) with its own version', () => {
    const bin = join(dir, 'node_modules', '.bin', 'gapstack');
    const out = JSON.parse(execFileSync(bin, ['evaluate', '--gaps', '1.729,1.12', '--json'], { cwd: dir, encoding: 'utf8' })) as { efficiency: number };
    // Independent reference test/fixtures/reference/runner.py (reference.json, 2T 1.729 / 1.12 eV under AM1.5G at 300 K):
    // 45.04 %, as in the check table of docs/PHYSICS.md §5.
    expect(out.efficiency * 100).toBeCloseTo(45.04, 2);
    const version = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')).version as string;
    expect(execFileSync(bin, ['--version'], { cwd: dir, encoding: 'utf8' }).trim()).toBe(version);
    // A library error from inside a command's bundle reaches the user by the flag's name, as a user error.
    const bad = spawnSync(bin, ['map', '--x', '0.5:2.5', '--y', '0.5:2.5', '--step', '0.0001'], { cwd: dir, encoding: 'utf8' });
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/^gapstack: 20001 points per axis .* use a coarser --step/);
  }, 2 * MINUTES);

  it('type-checks scripts against the shipped declarations (tsc --noEmit): a small one and the README example', () => {
    // Throws, with the compiler's messages, on any type error.
    const out = execFileSync(process.execPath, [TSC, '-p', 'tsconfig.json'], { cwd: dir, encoding: 'utf8' });
    expect(out).toBe('');
  }, 5 * MINUTES);

  it('imports by name and gives 2T 1.729/1.12 eV under AM1.5G at 300 K', () => {
    const out = JSON.parse(execFileSync(process.execPath, ['use.mjs'], { cwd: dir, encoding: 'utf8' })) as { efficiency: number };
    // docs/PHYSICS.md §5 check table: 2T with a 1.12 eV bottom, top 1.729 eV: 45.04 %.
    expect(out.efficiency * 100).toBeCloseTo(45.04, 2);
  }, 2 * MINUTES);

  it('builds a report through the installed library bundle, its charts drawn without jsdom', () => {
    const run = spawnSync(process.execPath, ['--require', './jsdom-watch.cjs', 'report.mjs'], { cwd: dir, encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout) as { charts: number; caution: boolean };
    expect(out.charts).toBeGreaterThan(4);
    expect(out.caution).toBe(true);
    expect(run.stderr).not.toMatch(/jsdom loaded/);
    // The watch does see jsdom when it loads: d3-node imported as installed, outside the bundle, brings it in.
    const control = spawnSync(process.execPath, ['--require', './jsdom-watch.cjs', '--input-type=module', '-e', "await import('d3-node');"], { cwd: dir, encoding: 'utf8' });
    expect(control.status, control.stderr).toBe(0);
    expect(control.stderr).toMatch(/jsdom loaded/);
  }, 2 * MINUTES);

  it('runs the README example and prints what the README shows', () => {
    execFileSync(process.execPath, [TSC, '-p', 'tsconfig.readme.json'], { cwd: dir, encoding: 'utf8' });
    const printed = execFileSync(process.execPath, [join('out', 'readme.js')], { cwd: dir, encoding: 'utf8' });
    expect(printed).toBe(readmeExample().output);
    // docs/PHYSICS.md §5 and §6: best top gap over 1.12 eV is 1.729 eV at 45.04 %; 1.7105–1.752 eV keeps η within 1 % relative.
    expect(printed).toContain('best top gap 1.729 eV, η = 45.04 %, within 1 %: 1.710–1.752 eV');
  }, 5 * MINUTES);
});
