'use strict';
/**
 * Loads the command line's CommonJS bundles (dist/bundle/*.cjs, one for the
 * front and one per command, built by scripts/bundle-cli.mjs) with V8 code
 * caches beside them (*.cjs.v8cache, written by scripts/prime-code-cache.mjs).
 * Node 20 compiles every function of a module when it is first called; a code
 * cache holds the bytecode of the functions a command ran when it was primed,
 * so a quick command skips most of that work.
 *
 * A cache file is the SHA-256 (hex) of the bundle it was made from, then
 * V8's data. V8 itself checks only the source's length (and refuses a cache
 * from another V8 version or other flags, NODE_OPTIONS included: then the
 * bundle is compiled as usual), so a cache made from other bytes is never
 * given to it; hashing a bundle takes about 0.2 ms.
 *
 * Each bundle runs in the usual CommonJS wrapper plus two names the build
 * leaves free: gapstackBundleUrl (what import.meta.url was in the compiled
 * modules) and gapstackLoadBundle (this function, for the command table).
 * With GAPSTACK_WRITE_CODE_CACHE=1 (the priming script only) the caches of
 * the bundles loaded are written at exit instead of read.
 */
const { createHash } = require('node:crypto');
const { readFileSync, renameSync, rmSync, writeFileSync } = require('node:fs');
const { join } = require('node:path');
const { pathToFileURL } = require('node:url');
const { createRequire } = require('node:module');
const vm = require('node:vm');

const DIR = join(__dirname, '..', 'dist', 'bundle');
const WRITE = process.env.GAPSTACK_WRITE_CODE_CACHE === '1';
/** Length of the hex SHA-256 that opens a cache file. */
const ID_LENGTH = 64;
/** Loaded bundles by name: their exports, their scripts and ids for the cache writer, and what became of their caches. */
const loaded = new Map();

/** The V8 data of a bundle's cache and what became of it: none (no file), stale (made from other bytes), or to be tried. */
function readCache(file, id) {
  let bytes;
  try {
    bytes = readFileSync(`${file}.v8cache`);
  } catch {
    return { state: 'none' };
  }
  if (bytes.length <= ID_LENGTH || bytes.toString('latin1', 0, ID_LENGTH) !== id) return { state: 'stale' };
  return { state: 'tried', data: bytes.subarray(ID_LENGTH) };
}

/** The exports of dist/bundle/<name>.cjs, run once per process. */
function loadBundle(name) {
  const known = loaded.get(name);
  if (known) return known.module.exports;
  const file = join(DIR, `${name}.cjs`);
  let bytes;
  try {
    bytes = readFileSync(file);
  } catch (err) {
    throw new Error(`cannot read ${file} (${err.code ?? 'error'}): build the package first (npm ci, or npm run build in a clone)`);
  }
  const id = createHash('sha256').update(bytes).digest('hex');
  const cache = WRITE ? { state: 'none' } : readCache(file, id);
  // The wrapper's own line is line 0, so the bundle's lines and columns stay as written.
  const wrapped = `(function (exports, require, module, __filename, __dirname, gapstackBundleUrl, gapstackLoadBundle) {\n${bytes.toString('utf8')}\n})`;
  const script = new vm.Script(wrapped, { filename: file, lineOffset: -1, cachedData: cache.data });
  const state = cache.state !== 'tried' ? cache.state : script.cachedDataRejected ? 'rejected' : 'used';
  const module = { exports: {} };
  loaded.set(name, { module, script, file, id, cache: state });
  script.runInThisContext()(module.exports, createRequire(file), module, file, DIR, pathToFileURL(file).href, loadBundle);
  return module.exports;
}

/** Each bundle loaded so far, with what became of its cache: none, stale, rejected by V8, or used (for the tests). */
function cacheReport() {
  return [...loaded.entries()].map(([name, b]) => ({ name, cache: b.cache }));
}

if (WRITE) {
  process.on('exit', () => {
    for (const { script, file, id } of loaded.values()) {
      const temp = `${file}.v8cache.${process.pid}.tmp`;
      try {
        writeFileSync(temp, Buffer.concat([Buffer.from(id, 'latin1'), script.createCachedData()]));
        renameSync(temp, `${file}.v8cache`);
      } catch (err) {
        rmSync(temp, { force: true });
        process.stderr.write(`gapstack: code cache for ${file} not written (${err.code ?? err.message})\n`);
      }
    }
  });
}

module.exports = { loadBundle, cacheReport };
