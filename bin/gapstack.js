#!/usr/bin/env node
// Entry point: the command line as one bundle (scripts/bundle-cli.mjs), built
// by `npm ci` through the prepare script, so a quick call stays quick.
import { main } from '../dist/bundle/main.js';

await main();
