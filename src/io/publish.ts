/**
 * Publishing a report: the HTML page and its figure folder appear together
 * or not at all. Everything is written first into temporaries on the same
 * filesystems as the targets (a hidden staging folder beside the figures
 * folder, a hidden file beside the page); only when every byte is down are
 * they renamed into place, figures first and the page last, in one
 * synchronous step that no signal handler can interleave. A previous figure
 * set is moved aside and removed after the swap. A folder holding anything
 * but a previous figure set is refused rather than replaced.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { UserError } from '../errors.js';
import { assertNoInputInside, assertNotAnInput } from './inputs.js';
import { injectedWriteFault } from './fault-injection.js';
import { discardTemp, releaseTemp, trackTemp } from './temp-files.js';

export interface PublishedFile {
  name: string;
  data: string | Uint8Array;
}

/** The list of names a figure folder holds, written into it so a later run knows the folder is its own. */
export const FIGURE_SET_MARKER = '.gapstack-figures';

const STAGING_TAG = '.gapstack-staging-';

function errnoText(err: unknown): string {
  const code = (err as NodeJS.ErrnoException)?.code;
  return code === 'ENOSPC' ? 'ENOSPC: no space left on the device' : code ?? (err as Error)?.message ?? 'error';
}

/** True when a process with this id is alive (a staging folder of a live run is left alone). */
function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Remove staging folders and temp files that a killed run (SIGKILL) left beside `target`. */
export function removeStaleTemporaries(target: string): void {
  const dir = dirname(resolve(target));
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return;
  }
  const base = basename(target);
  for (const n of names) {
    const m = new RegExp(`^\\.${escapeRe(base)}(?:${escapeRe(STAGING_TAG)}|\\.)(\\d+)\\.`).exec(n);
    if (m && !alive(Number(m[1]))) rmSync(join(dir, n), { recursive: true, force: true });
  }
}

function escapeRe(s: string): string {
  return s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

/**
 * Check that a figures folder may be replaced: missing, empty, or holding
 * only a previous figure set (names listed in its marker or among the new
 * set's names). Throws a UserError naming the option otherwise.
 */
export function checkFiguresFolder(folder: string, newNames: readonly string[], option = '--figures'): void {
  assertNoInputInside(folder, option);
  if (!existsSync(folder)) return;
  let st;
  try {
    st = statSync(folder);
  } catch (err) {
    throw new UserError(`${option}: cannot use ${folder} (${errnoText(err)}); nothing was written`);
  }
  if (!st.isDirectory()) throw new UserError(`${option}: ${folder} is not a folder; nothing was written`);
  // A name may hold a folder part; the folder's top level holds its first segment.
  const top = (n: string) => n.split(/[\\/]/)[0];
  const known = new Set<string>([...newNames.map(top), FIGURE_SET_MARKER]);
  try {
    const marker = join(folder, FIGURE_SET_MARKER);
    if (existsSync(marker)) for (const n of readFigureMarker(marker)) known.add(top(n));
  } catch {
    // an unreadable marker just means fewer known names
  }
  const foreign = readdirSync(folder).filter((n) => !known.has(n));
  if (foreign.length > 0) {
    throw new UserError(
      `${option}: ${folder} holds files this report does not write (${foreign.slice(0, 3).join(', ')}${foreign.length > 3 ? ', …' : ''}); give a new or empty folder, or one an earlier report wrote; nothing was written`,
    );
  }
}

function readFigureMarker(path: string): string[] {
  return readFileSync(path, 'utf8')
    .split('\n')
    .filter((l) => l !== '' && !l.startsWith('#'));
}

/**
 * Write the report page and (optionally) its figure folder, together or not at all.
 * `htmlPath` and every figure are checked against this run's inputs first.
 */
export function publishReport(htmlPath: string, html: string, figures?: { folder: string; files: readonly PublishedFile[] }): void {
  assertNotAnInput(htmlPath, '-o/--output');
  const htmlDir = dirname(resolve(htmlPath));
  try {
    mkdirSync(htmlDir, { recursive: true });
  } catch (err) {
    throw new UserError(`-o/--output: cannot create the folder ${htmlDir} (${errnoText(err)}); nothing was written`);
  }
  if (figures) {
    checkFiguresFolder(
      figures.folder,
      figures.files.map((f) => f.name),
    );
    const parent = dirname(resolve(figures.folder));
    try {
      mkdirSync(parent, { recursive: true });
    } catch (err) {
      throw new UserError(`--figures: cannot create the folder ${parent} (${errnoText(err)}); nothing was written`);
    }
    removeStaleTemporaries(figures.folder);
  }
  removeStaleTemporaries(htmlPath);

  const stamp = `${process.pid}.${Date.now()}`;
  const htmlTmp = join(htmlDir, `.${basename(htmlPath)}.${stamp}.tmp`);
  const staging = figures ? join(dirname(resolve(figures.folder)), `.${basename(resolve(figures.folder))}${STAGING_TAG}${stamp}`) : undefined;
  const old = figures ? join(dirname(resolve(figures.folder)), `.${basename(resolve(figures.folder))}${STAGING_TAG}${stamp}.old`) : undefined;
  // 1. Every byte into temporaries.
  try {
    trackTemp(htmlTmp);
    injectedWriteFault(htmlTmp);
    writeFileSync(htmlTmp, html);
    if (figures && staging) {
      trackTemp(staging);
      mkdirSync(staging);
      for (const f of figures.files) {
        const p = join(staging, f.name);
        mkdirSync(dirname(p), { recursive: true });
        injectedWriteFault(p);
        writeFileSync(p, f.data);
      }
      writeFileSync(join(staging, FIGURE_SET_MARKER), `# written by gapstack report; the folder is replaced as a whole by the next report\n${figures.files.map((f) => f.name).join('\n')}\n`);
    }
  } catch (err) {
    discardTemp(htmlTmp);
    if (staging) discardTemp(staging);
    throw new UserError(`cannot write the report (${errnoText(err)}); nothing was replaced`);
  }
  // 2. Swap them in: figures, then the page (renames on one filesystem; synchronous, so no
  //    signal handler runs in between); the previous figure set goes only once the page is in.
  const target = figures ? resolve(figures.folder) : undefined;
  let swapped = false;
  let hadOld = false;
  try {
    if (target && staging && old) {
      hadOld = existsSync(target);
      if (hadOld) {
        trackTemp(old);
        renameSync(target, old);
      }
      renameSync(staging, target);
      swapped = true;
      releaseTemp(staging);
    }
    renameSync(htmlTmp, htmlPath);
    releaseTemp(htmlTmp);
  } catch (err) {
    // Put the previous figure set back where it was.
    if (target && old && hadOld) {
      if (swapped) rmSync(target, { recursive: true, force: true });
      if (existsSync(old)) renameSync(old, target);
      releaseTemp(old);
    }
    discardTemp(htmlTmp);
    if (staging) discardTemp(staging);
    throw new UserError(`cannot publish the report (${errnoText(err)}); nothing was replaced`);
  }
  if (old && hadOld) discardTemp(old);
}
