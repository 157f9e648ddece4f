/** gapstack's own version, from package.json (parts of batch runs carry it). */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const PACKAGE_JSON = fileURLToPath(new URL('../../package.json', import.meta.url));

/** The tool's version from package.json. */
export function toolVersion(): string {
  return (JSON.parse(readFileSync(PACKAGE_JSON, 'utf8')) as { version: string }).version;
}
