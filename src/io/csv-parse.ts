/**
 * csv-parse's synchronous parser, loaded on first use: quick commands (the
 * built-in spectrum, one stack) never need it, and building a `require` costs
 * milliseconds at every start.
 */
import { createRequire } from 'node:module';

type Parse = typeof import('csv-parse/sync').parse;
let parse: Parse | undefined;

/** The csv-parse/sync `parse` function. */
export function csvParseSync(): Parse {
  parse ??= (createRequire(import.meta.url)('csv-parse/sync') as typeof import('csv-parse/sync')).parse;
  return parse;
}
