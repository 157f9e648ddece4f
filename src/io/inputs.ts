/**
 * The files this run has read, so that no output can replace one: `-o`,
 * `--out` and `--figures` are checked against them before any work is
 * written (an output path that is an input, by path or through a link, or a
 * figures folder that holds one, is refused).
 *
 * Run-wide bookkeeping of I/O only; the physics never sees it.
 */
import { realpathSync, statSync } from 'node:fs';
import { dirname, basename, join, resolve, sep } from 'node:path';
import { UserError } from '../errors.js';

interface InputFile {
  /** The path as the user gave it. */
  given: string;
  /** Canonical absolute path. */
  real: string;
  /** Device and inode: the same file under any name. */
  id: string;
}

/** Keyed by canonical path: a file read many times (a library caller's loop) is held once. */
const inputs = new Map<string, InputFile>();

function canonical(path: string): string {
  try {
    return realpathSync(path);
  } catch {
    // Not there (yet): canonicalise the folder that should hold it.
    try {
      return join(realpathSync(dirname(resolve(path))), basename(path));
    } catch {
      return resolve(path);
    }
  }
}

/** Record a file read as input (its device and inode, if known, identify it under any name). */
export function noteInput(path: string, stat?: { dev: number; ino: number }): void {
  let id = '';
  try {
    const st = stat ?? statSync(path);
    id = `${st.dev}:${st.ino}`;
  } catch {
    // unreadable inputs fail elsewhere
  }
  const real = canonical(path);
  inputs.set(real, { given: path, real, id });
}

/** The inputs recorded so far (for tests). */
export function notedInputs(): readonly string[] {
  return [...inputs.values()].map((i) => i.given);
}

/** Forget recorded inputs (each library call that reads a new set starts here; tests too). */
export function forgetInputs(): void {
  inputs.clear();
}

/** Refuse an output file that is one of this run's inputs. */
export function assertNotAnInput(outPath: string, option: string): void {
  const real = canonical(outPath);
  let id = '';
  try {
    const st = statSync(outPath);
    id = `${st.dev}:${st.ino}`;
  } catch {
    // a new file cannot be an input
  }
  const hit = [...inputs.values()].find((i) => i.real === real || (id !== '' && i.id === id));
  if (hit) throw new UserError(`${option} ${outPath} is an input of this run (${hit.given}); choose another path, nothing was written`);
}

/** Refuse a figures folder that holds one of this run's inputs (publishing it replaces the folder). */
export function assertNoInputInside(folder: string, option: string): void {
  const real = canonical(folder);
  const hit = [...inputs.values()].find((i) => i.real === real || i.real.startsWith(real.endsWith(sep) ? real : real + sep));
  if (hit) throw new UserError(`${option} ${folder} holds an input of this run (${hit.given}); choose a folder of its own, nothing was written`);
}
