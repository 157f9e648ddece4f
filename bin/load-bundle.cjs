'use strict';
/**
 * Loads the command line's CommonJS bundles (dist/bundle/*.cjs, one for the
 * front and one per command, built by scripts/bundle-cli.mjs) with V8 code
 * caches beside them (*.cjs.v8cache, written by scripts/prime-code-cache.mjs).
 * Node 20 compiles every function of a module when it is first called; a code
 * cache holds the bytecode of the functions a command ran when it was primed,
 * so a quick command skips most of that work.
 *
 * V8 refuses a cache made by another V8 version or flags (then the bundle is
 * compiled as usual), but it checks only the source's length, so a cache is
 * used only if it is not older than its bundle: the build wipes dist/bundle
 * and writes the caches after the bundles.
 *
 * Each bundle runs in the usual CommonJS wrapper plus two names the build
 * leaves free: gapstackBundleUrl (what import.meta.url was in the compiled
 * modules) and gapstackLoadBundle (this function, for the command table).
 * With GAPSTACK_WRITE_CODE_CACHE=1 (the priming script only) the caches of
 * the bundles loaded are written at exit instead of read.
 */
const { readFileSync, renameSync, statSync, writeFileSync } = require('node:fs');
const { join } = require('node:path');
const { pathToFileURL } = require('node:url');
const { createRequire } = require('node:module');
const vm = require('node:vm');

const DIR = join(__dirname, '..', 'dist', 'bundle');
const WRITE = process.env.GAPSTACK_WRITE_CODE_CACHE === '1';
/** Loaded bundles by name: their exports, and their scripts for the cache writer. */
const loaded = new Map();

/** The cache of a bundle, if there is one no older than the bundle. */
function readCache(file) {
  try {
    const cache = `${file}.v8cache`;
    return statSync(cache).mtimeMs >= statSync(file).mtimeMs ? readFileSync(cache) : undefined;
  } catch {
    return undefined;
  }
}

/** The exports of dist/bundle/<name>.cjs, run once per process. */
function loadBundle(name) {
  const known = loaded.get(name);
  if (known) return known.module.exports;
  const file = join(DIR, `${name}.cjs`);
  const cachedData = WRITE ? undefined : readCache(file);
  // The wrapper's first line is the source's first line, so stack traces keep their line numbers.
  const wrapped = `(function (exports, require, module, __filename, __dirname, gapstackBundleUrl, gapstackLoadBundle) {${readFileSync(file, 'utf8')}\n})`;
  const script = new vm.Script(wrapped, { filename: file, cachedData });
  const module = { exports: {} };
  loaded.set(name, { module, script, file, cache: cachedData === undefined ? 'none' : script.cachedDataRejected ? 'rejected' : 'used' });
  script.runInThisContext()(module.exports, createRequire(file), module, file, DIR, pathToFileURL(file).href, loadBundle);
  return module.exports;
}

/** Each bundle loaded so far, with what became of its cache: none, used, or rejected by V8 (for the tests). */
function cacheReport() {
  return [...loaded.entries()].map(([name, b]) => ({ name, cache: b.cache }));
}

if (WRITE) {
  process.on('exit', () => {
    for (const { script, file } of loaded.values()) {
      const temp = `${file}.v8cache.${process.pid}.tmp`;
      writeFileSync(temp, script.createCachedData());
      renameSync(temp, `${file}.v8cache`);
    }
  });
}

module.exports = { loadBundle, cacheReport };
