#!/usr/bin/env node
/**
 * Build step after scripts/bundle-cli.mjs: the V8 code cache of every
 * command-line bundle (dist/bundle/<name>.cjs.v8cache, read by
 * bin/load-bundle.cjs). The quick commands run once each on a small input
 * with GAPSTACK_WRITE_CODE_CACHE=1, so their caches hold the functions a run
 * compiles, not only the top level; the front's cache comes from the last run
 * (evaluate, the quickest). The other bundles get a cache of their top level.
 * Outputs go to a temporary folder, removed afterwards. Every cache is then
 * read back in a fresh process. The caches only make starts quicker: if any
 * step fails, this says why, removes every cache and lets the build go on
 * (test/cli/bundle.test.ts fails on a bundle without a cache V8 takes).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const bin = join(root, 'bin', 'gapstack.cjs');
const loader = join(root, 'bin', 'load-bundle.cjs');
const bundleDir = join(root, 'dist', 'bundle');
const out = mkdtempSync(join(tmpdir(), 'gapstack-prime-'));

/** Removes every cache beside the bundles. */
function removeCaches() {
  for (const f of readdirSync(bundleDir).filter((f) => f.endsWith('.v8cache'))) rmSync(join(bundleDir, f), { force: true });
}

/** Runs node with these arguments, writing caches; stops the build on a failure. */
function node(args, what) {
  const r = spawnSync(process.execPath, args, { cwd: root, encoding: 'utf8', env: { ...process.env, GAPSTACK_WRITE_CODE_CACHE: '1' } });
  if (r.status !== 0) throw new Error(`priming the code cache: ${what} failed (exit ${r.status}):\n${r.stderr}`);
}

try {
  // Caches of an earlier build are dropped first: each is rewritten below.
  removeCaches();
  const runs = [
    ['spectrum', 'am1.5g', '--gaps', '1.12,1.7'],
    ['optimize', '--cells', '2', '--fix', '2=1.12'],
    ['map', '--x', '1.5:1.8', '--y', '0.9:1.2', '--step', '0.05', '--out', join(out, 'map.csv')],
    ['yield', '--gaps', '1.73,1.12', '--ensemble', 'examples/ensemble-demo/manifest.yaml'],
    ['materials'],
    ['sky', '--zenith', '48.2', '--water-cm', '1.4', '--aod500', '0.1'],
    ['report', 'examples/perovskite-silicon.yaml', '-o', join(out, 'report.html'), '--figures', join(out, 'figures')],
    ['evaluate', '--gaps', '1.7,1.1'],
  ];
  for (const args of runs) node([bin, ...args], `gapstack ${args[0]}`);
  const bundles = readdirSync(bundleDir).filter((f) => f.endsWith('.cjs')).map((f) => f.slice(0, -'.cjs'.length));
  for (const name of bundles.filter((b) => !existsSync(join(bundleDir, `${b}.cjs.v8cache`)))) {
    node(['-e', `require(${JSON.stringify(loader)}).loadBundle(${JSON.stringify(name)})`], `loading ${name}`);
  }
  // Read back: every bundle with its cache, in one fresh process.
  const check = spawnSync(process.execPath, ['-e', `const l = require(${JSON.stringify(loader)}); for (const b of ${JSON.stringify(bundles)}) l.loadBundle(b); console.log(JSON.stringify(l.cacheReport()));`], { cwd: root, encoding: 'utf8' });
  if (check.status !== 0) throw new Error(`reading the code caches back failed:\n${check.stderr}`);
  const refused = JSON.parse(check.stdout).filter((b) => b.cache !== 'used');
  if (refused.length > 0) throw new Error(`code caches not used: ${refused.map((b) => `${b.name} (${b.cache})`).join(', ')}`);
} catch (err) {
  removeCaches();
  process.stderr.write(`gapstack build: no code caches written (${err.message.split('\n').filter(Boolean).slice(0, 2).join(' ')}); the command line works without them, only slower to start\n`);
} finally {
  rmSync(out, { recursive: true, force: true });
}
