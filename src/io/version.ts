/** gapstack's own version, read once from package.json (no heavy imports: file headers and batch parts carry it). */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const PACKAGE_JSON = fileURLToPath(new URL('../../package.json', import.meta.url));
let version: string | undefined;

/** The tool's version from package.json. */
export function toolVersion(): string {
  version ??= (JSON.parse(readFileSync(PACKAGE_JSON, 'utf8')) as { version: string }).version;
  return version;
}
