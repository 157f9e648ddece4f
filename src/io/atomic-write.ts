/**
 * Every file gapstack writes goes to a temporary file beside the target and is
 * renamed over it only when complete, so a failure never leaves a partial or
 * clobbered output.
 */
import { mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, basename, join } from 'node:path';
import { UserError } from '../errors.js';
import { assertNotAnInput } from './inputs.js';
import { injectedWriteFault } from './fault-injection.js';
import { releaseTemp, trackTemp } from './temp-files.js';

/** Write text or bytes to `path` atomically (same-folder temp file, then rename). */
export function writeFileAtomic(path: string, data: string | Uint8Array, option = 'output'): void {
  assertNotAnInput(path, option);
  const dir = dirname(path);
  try {
    mkdirSync(dir, { recursive: true });
  } catch (err) {
    throw new UserError(`cannot create folder ${dir} (${(err as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  const tmp = join(dir, `.${basename(path)}.${process.pid}.${Date.now()}.tmp`);
  trackTemp(tmp);
  try {
    injectedWriteFault(tmp);
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw new UserError(`cannot write ${path} (${(err as NodeJS.ErrnoException).code ?? 'error'})`);
  } finally {
    releaseTemp(tmp);
  }
}
