import { readFileSync, readdirSync, existsSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { describe, expect, test } from 'vitest';

// The command line runs from the esbuild bundle in dist/bundle (scripts/bundle-cli.mjs, built by
// `npm run build`, which the test script runs first).
const root = resolve(import.meta.dirname, '../..');
const bundleDir = join(root, 'dist', 'bundle');
const files = existsSync(bundleDir) ? readdirSync(bundleDir).filter((f) => f.endsWith('.js')) : [];

describe('the command-line bundle', () => {
  test('bin/gapstack.js loads the bundle, and the bundle exists', () => {
    expect(readFileSync(join(root, 'bin', 'gapstack.js'), 'utf8')).toMatch(/from '\.\.\/dist\/bundle\/main\.js'/);
    expect(files).toContain('main.js');
  });

  test('every path a bundled module builds from import.meta.url names a file that exists', () => {
    const found: string[] = [];
    for (const f of files) {
      const text = readFileSync(join(bundleDir, f), 'utf8');
      for (const m of text.matchAll(/new URL\(\s*["'`]([^"'`$]+)["'`]\s*,\s*import\.meta\.url\s*\)/g)) found.push(m[1]);
      for (const m of text.matchAll(/new URL\(\s*`([^`]*)\$\{[^}]*\}`\s*,\s*import\.meta\.url\s*\)/g)) found.push(`${m[1]}<dir>`);
    }
    expect(found.length).toBeGreaterThan(3);
    for (const rel of found) {
      const target = rel.endsWith('<dir>') ? dirname(join(bundleDir, rel.replace('<dir>', 'x'))) : join(bundleDir, rel);
      expect(existsSync(target), `${rel} from dist/bundle`).toBe(true);
    }
    // The worker threads' module is the compiled search module, not a bundled copy.
    expect(found).toContain('../search/enumerate-worker.js');
  });

  test('the entry chunk imports no package (heavy ones load only in the commands that use them)', () => {
    const main = readFileSync(join(bundleDir, 'main.js'), 'utf8');
    const statics = [...main.matchAll(/^import\s[^;]*?from\s*["']([^"']+)["']/gm)].map((m) => m[1]);
    expect(statics.filter((s) => !s.startsWith('node:') && !s.startsWith('./'))).toEqual([]);
  });

  test('the bundled command line and the compiled modules give the same answer', () => {
    const run = (entry: string) => spawnSync(process.execPath, ['--input-type=module', '-e', `const { run } = await import(${JSON.stringify(entry)}); await run(['evaluate', '--gaps', '1.73,1.12', '--json']);`], { encoding: 'utf8', cwd: root });
    const bundled = run(join(bundleDir, 'main.js'));
    const plain = run(join(root, 'dist', 'cli', 'main.js'));
    expect(bundled.status).toBe(0);
    expect(plain.status).toBe(0);
    expect(JSON.parse(bundled.stdout)).toEqual(JSON.parse(plain.stdout));
  }, 30_000);
});

describe('the report DOM in the bundles (scripts/report-dom.mjs)', () => {
  const text = files.map((f) => readFileSync(join(bundleDir, f), 'utf8')).join('\n');

  test('the library entry is bundled beside the command line, and the package exports it', () => {
    expect(files).toContain('index.js');
    const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
    expect(pkg.exports['.'].import).toBe('./dist/bundle/index.js');
  });

  test("d3-node's document is linkedom's, its d3 only selection and axes, and linkedom has no CSS parser", () => {
    // Markers of what the redirects leave out (each present in a bundle built without them):
    // jsdom's CommonJS module paths, d3's force layout, cssomnom's rule classes.
    expect(text).not.toMatch(/node_modules\/jsdom\//);
    expect(text).not.toMatch(/forceSimulation/);
    expect(text).not.toMatch(/CSSKeyframesRule/);
    // And what they bring in.
    expect(text).toMatch(/node_modules\/linkedom\//);
    expect(text).toMatch(/gapstack builds without a CSS parser/);
  });

  test('neither entry loads the DOM when it is imported: the report chunks come in only with a report', () => {
    // The files each entry imports statically, followed through the chunks.
    const closure = (entry: string): string[] => {
      const seen = new Set<string>();
      const visit = (f: string) => {
        if (seen.has(f)) return;
        seen.add(f);
        const src = readFileSync(join(bundleDir, f), 'utf8');
        for (const m of src.matchAll(/(?:^|[;}\s])import(?:[^"'();]*?from)?\s*["']\.\/([^"']+)["']/g)) visit(m[1]);
      };
      visit(entry);
      return [...seen];
    };
    const domMarker = /node_modules\/linkedom\/|function D3Node\b/;
    // The markers are in the bundle, in some chunk a report loads.
    expect(files.some((f) => domMarker.test(readFileSync(join(bundleDir, f), 'utf8')))).toBe(true);
    for (const entry of ['main.js', 'index.js']) {
      const loaded = closure(entry);
      expect(loaded.length, entry).toBeGreaterThan(1);
      expect(loaded.filter((f) => domMarker.test(readFileSync(join(bundleDir, f), 'utf8'))), entry).toEqual([]);
    }
  });
});
