#!/usr/bin/env node
// The command line's former entry point, kept for scripts (and npx's cache of a clone)
// that still call bin/gapstack.js: it runs bin/gapstack.cjs.
import './gapstack.cjs';
