#!/usr/bin/env node
'use strict';
// Entry point: the command line's bundles (scripts/bundle-cli.mjs), built by `npm ci`
// through the prepare script, loaded with their V8 code caches (load-bundle.cjs).
let cli;
try {
  cli = require('./load-bundle.cjs').loadBundle('cli');
} catch (err) {
  process.stderr.write(`gapstack: ${err.message}\n`);
  process.exitCode = 1;
}
cli?.main();
