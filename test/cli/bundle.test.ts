import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { isBuiltin } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { describe, expect, test } from 'vitest';

// The command line runs from the CommonJS bundles in dist/bundle (scripts/bundle-cli.mjs) with
// their code caches (scripts/prime-code-cache.mjs), built by `npm run build`, which the test
// script runs first; the library entry is an ES-module bundle beside them.
const root = resolve(import.meta.dirname, '../..');
const bundleDir = join(root, 'dist', 'bundle');
const listed = existsSync(bundleDir) ? readdirSync(bundleDir) : [];
const files = listed.filter((f) => f.endsWith('.js') || f.endsWith('.cjs'));
const cjs = listed.filter((f) => f.endsWith('.cjs'));
const loader = join(root, 'bin', 'load-bundle.cjs');
const commandNames = [...readFileSync(join(root, 'src', 'cli', 'commands.ts'), 'utf8').matchAll(/^\s+'?([a-z-]+)'?: \(\) => import\('\.\/([a-z-]+)-command\.js'\),$/gm)].map((m) => m[1]);

/**
 * Runs the command line on `args` through the loader of the package at `dir`, in a fresh node
 * (it must exit 0): what it printed, and what became of each bundle's cache.
 */
function runThroughLoader(dir: string, args: string[]): { stdout: string; caches: { name: string; cache: string }[] } {
  const code = `const l = require(${JSON.stringify(join(dir, 'bin', 'load-bundle.cjs'))}); l.loadBundle('cli').run(${JSON.stringify(args)}).then(() => console.error('CACHES ' + JSON.stringify(l.cacheReport())));`;
  const r = spawnSync(process.execPath, ['-e', code], { encoding: 'utf8', cwd: dir });
  expect(r.status, r.stderr).toBe(0);
  return { stdout: r.stdout, caches: JSON.parse(r.stderr.split('CACHES ')[1]) };
}

/** Removes every code cache of the package at `dir`. */
function removeCaches(dir: string): void {
  const bundles = join(dir, 'dist', 'bundle');
  for (const f of readdirSync(bundles).filter((f) => f.endsWith('.v8cache'))) rmSync(join(bundles, f));
}

/** Runs a script in a fresh node and returns its stdout (it must exit 0). */
function nodeScript(code: string, cwd = root): string {
  const r = spawnSync(process.execPath, ['-e', code], { encoding: 'utf8', cwd });
  expect(r.status, r.stderr).toBe(0);
  return r.stdout;
}

describe('the command-line bundles', () => {
  test('bin/gapstack.cjs runs the front through the loader; the front and every command of the table have a bundle', () => {
    const bin = readFileSync(join(root, 'bin', 'gapstack.cjs'), 'utf8');
    expect(bin).toMatch(/require\('\.\/load-bundle\.cjs'\)\.loadBundle\('cli'\)/);
    expect(bin).toMatch(/cli\?\.main\(\)/);
    expect(commandNames.length).toBeGreaterThan(8);
    expect(cjs.sort()).toEqual(['cli.cjs', ...commandNames.map((c) => `${c}-command.cjs`)].sort());
    // Every command in the table names its own module (the pattern the build replaces).
    for (const m of readFileSync(join(root, 'src', 'cli', 'commands.ts'), 'utf8').matchAll(/^\s+'?([a-z-]+)'?: \(\) => import\('\.\/([a-z-]+)-command\.js'\),$/gm)) expect(m[1]).toBe(m[2]);
  });

  test('the former entry point bin/gapstack.js still runs the command line, exit codes included', () => {
    const via = (entry: string, args: string[]) => spawnSync(process.execPath, [join(root, 'bin', entry), ...args], { encoding: 'utf8', cwd: root });
    const ok = [via('gapstack.js', ['evaluate', '--gaps', '1.73,1.12', '--json']), via('gapstack.cjs', ['evaluate', '--gaps', '1.73,1.12', '--json'])];
    for (const r of ok) expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(ok[0].stdout)).toEqual(JSON.parse(ok[1].stdout));
    const bad = via('gapstack.js', ['evaluate', '--gaps', 'x']);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/^gapstack: /);
  }, 30_000);

  test('every path a bundled module builds from import.meta.url names a file that exists', () => {
    const found: string[] = [];
    for (const f of files) {
      const text = readFileSync(join(bundleDir, f), 'utf8');
      for (const m of text.matchAll(/new URL\(\s*["'`]([^"'`$]+)["'`]\s*,\s*(?:import\.meta\.url|gapstackBundleUrl)\s*\)/g)) found.push(m[1]);
      for (const m of text.matchAll(/new URL\(\s*`([^`]*)\$\{[^}]*\}`\s*,\s*(?:import\.meta\.url|gapstackBundleUrl)\s*\)/g)) found.push(`${m[1]}<dir>`);
    }
    expect(found.length).toBeGreaterThan(3);
    for (const rel of found) {
      const target = rel.endsWith('<dir>') ? dirname(join(bundleDir, rel.replace('<dir>', 'x'))) : join(bundleDir, rel);
      expect(existsSync(target), `${rel} from dist/bundle`).toBe(true);
    }
    // The worker threads' module is the compiled search module, not a bundled copy.
    expect(found).toContain('../search/enumerate-worker.js');
  });

  test('the CommonJS bundles keep no import() (the loader gives compiled scripts no dynamic-import hook) and no import.meta', () => {
    for (const f of cjs) {
      const text = readFileSync(join(bundleDir, f), 'utf8');
      expect(text, f).not.toMatch(/\bimport\s*\(/);
      expect(text, f).not.toMatch(/import\.meta/);
    }
  });

  test('the front requires no package (heavy ones load only in the commands that use them)', () => {
    const front = readFileSync(join(bundleDir, 'cli.cjs'), 'utf8');
    const required = [...front.matchAll(/\brequire\("([^"]+)"\)/g)].map((m) => m[1]);
    expect(required.length).toBeGreaterThan(0);
    expect(required.filter((r) => !isBuiltin(r))).toEqual([]);
  });

  test('the bundled command line and the compiled modules give the same answer', () => {
    const args = JSON.stringify(['evaluate', '--gaps', '1.73,1.12', '--json']);
    const bundled = nodeScript(`require(${JSON.stringify(loader)}).loadBundle('cli').run(${args});`);
    const plain = spawnSync(process.execPath, ['--input-type=module', '-e', `const { run } = await import(${JSON.stringify(join(root, 'dist', 'cli', 'main.js'))}); await run(${args});`], { encoding: 'utf8', cwd: root });
    expect(plain.status).toBe(0);
    expect(JSON.parse(bundled)).toEqual(JSON.parse(plain.stdout));
  }, 30_000);

  test('a command loads two bundles, the front and its own, each with a code cache V8 takes', () => {
    const r = runThroughLoader(root, ['map', '--x', '1.5:1.7', '--y', '1.0:1.2', '--step', '0.1', '--json']);
    expect(r.caches).toEqual([{ name: 'cli', cache: 'used' }, { name: 'map-command', cache: 'used' }]);
    expect(JSON.parse(r.stdout).best.efficiency).toBeGreaterThan(0.4);
  }, 30_000);

  test('every bundle has a cache V8 takes', () => {
    const names = cjs.map((f) => f.slice(0, -'.cjs'.length));
    const report = JSON.parse(nodeScript(`const l = require(${JSON.stringify(loader)}); for (const b of ${JSON.stringify(names)}) l.loadBundle(b); console.log(JSON.stringify(l.cacheReport()));`));
    expect(report).toEqual(names.map((name) => ({ name, cache: 'used' })));
  }, 30_000);
});

describe('the code caches, in a copy of the package', () => {
  /** A copy of bin/ and dist/bundle/ in a temporary package whose other files link to this one's. */
  function copyPackage(): string {
    const dir = mkdtempSync(join(tmpdir(), 'gapstack-cache-'));
    for (const entry of readdirSync(root)) {
      if (entry === 'bin' || entry === 'dist' || entry.startsWith('.')) continue;
      symlinkSync(join(root, entry), join(dir, entry));
    }
    cpSync(join(root, 'bin'), join(dir, 'bin'), { recursive: true });
    mkdirSync(join(dir, 'dist'));
    for (const entry of readdirSync(join(root, 'dist'))) {
      if (entry === 'bundle') cpSync(join(root, 'dist', 'bundle'), join(dir, 'dist', 'bundle'), { recursive: true, preserveTimestamps: true });
      else symlinkSync(join(root, 'dist', entry), join(dir, 'dist', entry));
    }
    return dir;
  }
  /** Runs the test in a fresh copy of the package, removed afterwards. */
  const inCopy = (body: (dir: string) => void) => {
    const dir = copyPackage();
    try {
      body(dir);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  };
  const evaluateIn = (dir: string) => {
    const r = runThroughLoader(dir, ['evaluate', '--gaps', '1.73,1.12', '--json']);
    return { answer: JSON.parse(r.stdout), report: r.caches };
  };

  test('a cache made from this bundle whose data V8 cannot take is refused and the bundle compiled: the same answer', () => {
    inCopy((dir) => {
      const before = evaluateIn(dir);
      expect(before.report.map((b) => b.cache)).toEqual(['used', 'used']);
      const bundle = join(dir, 'dist', 'bundle', 'evaluate-command.cjs');
      const id = createHash('sha256').update(readFileSync(bundle)).digest('hex');
      writeFileSync(`${bundle}.v8cache`, Buffer.concat([Buffer.from(id, 'latin1'), Buffer.alloc(4096, 7)]));
      const after = evaluateIn(dir);
      expect(after.report).toEqual([{ name: 'cli', cache: 'used' }, { name: 'evaluate-command', cache: 'rejected' }]);
      expect(after.answer).toEqual(before.answer);
    });
  }, 30_000);

  test('a cache made from other bytes of the same length is never given to V8, whatever the file dates say; without caches the answer is the same', () => {
    inCopy((dir) => {
      const before = evaluateIn(dir);
      // Patch the bundle in place, same length, and date it back before its cache.
      const bundle = join(dir, 'dist', 'bundle', 'evaluate-command.cjs');
      const text = readFileSync(bundle, 'utf8');
      expect(text).toContain('stated assumptions');
      writeFileSync(bundle, text.replace('stated assumptions', 'STATED assumptions'));
      utimesSync(bundle, new Date(2000, 0, 1), new Date(2000, 0, 1));
      const patched = evaluateIn(dir);
      expect(patched.report).toEqual([{ name: 'cli', cache: 'used' }, { name: 'evaluate-command', cache: 'stale' }]);
      expect(patched.answer.caution).toContain('STATED assumptions');
      writeFileSync(bundle, text);
      removeCaches(dir);
      const none = evaluateIn(dir);
      expect(none.report.map((b) => b.cache)).toEqual(['none', 'none']);
      expect(none.answer).toEqual(before.answer);
    });
  }, 30_000);

  test('without its bundles the command line says to build, in one line, exit 1', () => {
    inCopy((dir) => {
      rmSync(join(dir, 'dist', 'bundle', 'cli.cjs'));
      const r = spawnSync(process.execPath, [join(dir, 'bin', 'gapstack.cjs'), 'evaluate', '--gaps', '1.7,1.1'], { encoding: 'utf8', cwd: dir });
      expect(r.status).toBe(1);
      expect(r.stderr).toMatch(/^gapstack: cannot read .*cli\.cjs \(ENOENT\): build the package first \(npm ci, or npm run build in a clone\)\n$/);
    });
  }, 30_000);

  test('GAPSTACK_WRITE_CODE_CACHE=1 writes the caches of the bundles a run loaded, which the next run takes', () => {
    inCopy((dir) => {
      removeCaches(dir);
      const r = spawnSync(process.execPath, [join(dir, 'bin', 'gapstack.cjs'), 'spectrum', 'am1.5g'], { encoding: 'utf8', cwd: dir, env: { ...process.env, GAPSTACK_WRITE_CODE_CACHE: '1' } });
      expect(r.status, r.stderr).toBe(0);
      expect(readdirSync(join(dir, 'dist', 'bundle')).filter((f) => f.endsWith('.v8cache')).sort()).toEqual(['cli.cjs.v8cache', 'spectrum-command.cjs.v8cache']);
      const again = runThroughLoader(dir, ['spectrum', 'am1.5g']);
      expect(again.stdout).toBe(r.stdout);
      expect(again.caches).toEqual([{ name: 'cli', cache: 'used' }, { name: 'spectrum-command', cache: 'used' }]);
    });
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

  test('neither the library entry nor the front loads the DOM, nor do the quick commands: it comes in only with a report or figure', () => {
    // The files the library entry imports statically, followed through the chunks.
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
    const has = (f: string) => domMarker.test(readFileSync(join(bundleDir, f), 'utf8'));
    // The markers are in the bundles that draw charts.
    expect(has('report-command.cjs')).toBe(true);
    expect(has('figure-command.cjs')).toBe(true);
    const loaded = closure('index.js');
    expect(loaded.length).toBeGreaterThan(1);
    expect(loaded.filter(has)).toEqual([]);
    for (const f of ['cli.cjs', 'evaluate-command.cjs', 'map-command.cjs', 'optimize-command.cjs', 'yield-command.cjs', 'spectrum-command.cjs']) expect(has(f), f).toBe(false);
  });
});
