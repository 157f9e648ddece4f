/**
 * Worker threads for the enumeration, through a piscina pool. Tasks carry
 * plain data only (objective options with their spectra's typed arrays, the
 * axis and index ranges); each worker rebuilds the objective and enumerates
 * its share of top-gap values.
 */
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import type { EnumerationResult } from './enumerate.js';
import type { StepObjectiveOptions } from '../stack/step-objective.js';

export interface EnumerationTask {
  objective: StepObjectiveOptions;
  axis: Float64Array;
  ranges: [number, number][];
  margin: number;
  firstIndices: number[];
  initialBest: number;
}

/** Run enumeration tasks on a pool of `threads` workers; progress is the share of tasks done. */
export async function runEnumerationTasks(tasks: EnumerationTask[], threads: number, progress?: (f: number) => void): Promise<EnumerationResult[]> {
  const pool = new Piscina({ filename: fileURLToPath(new URL('../search/enumerate-worker.js', import.meta.url)), minThreads: threads, maxThreads: threads, idleTimeout: 50 });
  let done = 0;
  try {
    return await Promise.all(
      tasks.map(async (t) => {
        const r = (await pool.run(t)) as EnumerationResult;
        progress?.(++done / tasks.length);
        return r;
      }),
    );
  } finally {
    await pool.destroy();
  }
}
