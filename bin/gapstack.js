#!/usr/bin/env node
// Entry point: the compiled command line (built by `npm ci` through the prepare script).
import '../dist/cli/main.js';
