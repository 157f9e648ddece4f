#!/usr/bin/env node
// Entry point: the compiled command line (built by `npm ci` through the prepare script).
import { main } from '../dist/cli/main.js';

await main();
