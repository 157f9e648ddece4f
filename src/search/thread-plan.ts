/**
 * How many worker threads an enumeration gets, from the size of the work and
 * the core count only, never from a clock: the same question on the same
 * machine always runs the same way, however loaded the machine is.
 *
 * Work is counted in stack evaluations the enumeration may need: ordered gap
 * combinations on the coarse axis times spectra. A worker costs a thread
 * start, a module load and its own copy of the axis tables (≈ 0.1–0.2 s);
 * measured on a 2-core machine, two workers lost to one thread on every
 * single-spectrum search up to 6 independent subcells (4.9 M combinations:
 * 5.4 s → 9.0 s), because the second core is the one the main thread and
 * the operating system already use. So below four cores the enumeration
 * stays in the main thread.
 */

/** Fewest cores at which worker threads are used at all. */
export const MIN_CORES_FOR_THREADS = 4;

/** Stack evaluations each worker should have before another is started. */
export const WORK_PER_THREAD = 2e6;

export interface ThreadPlanInput {
  /** Ordered gap combinations on the coarse axis. */
  combinations: number;
  /** Spectra evaluated per combination. */
  spectra: number;
  /** Cores the process may use (os.availableParallelism()). */
  cores: number;
  /** Upper limit set by the user (--threads). */
  maxThreads: number;
}

/** Worker threads for an enumeration (1: stay in the main thread). */
export function enumerationThreads(w: ThreadPlanInput): number {
  const cap = Math.min(Math.floor(w.maxThreads), Math.floor(w.cores));
  if (!(cap >= 2) || w.cores < MIN_CORES_FOR_THREADS) return 1;
  const work = w.combinations * w.spectra;
  const wanted = Math.floor(work / WORK_PER_THREAD);
  return wanted >= 2 ? Math.min(cap, wanted) : 1;
}
