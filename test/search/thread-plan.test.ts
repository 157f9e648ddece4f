import { describe, expect, test } from 'vitest';
import { enumerationThreads, MIN_CORES_FOR_THREADS, WORK_PER_THREAD } from '../../src/search/thread-plan.js';

describe('worker threads are planned from the work and the cores, never a clock', () => {
  test('below four cores every search stays in the main thread, however large', () => {
    for (const cores of [1, 2, 3]) {
      expect(enumerationThreads({ combinations: 5e6, spectra: 8760, cores, maxThreads: 8 })).toBe(1);
    }
  });
  test('on many cores the thread count grows with combinations × spectra, up to the cores and the user limit', () => {
    const plan = (combinations: number, spectra: number, cores = 16, maxThreads = 64) => enumerationThreads({ combinations, spectra, cores, maxThreads });
    expect(plan(24_000, 1)).toBe(1);
    expect(plan(2 * WORK_PER_THREAD, 1)).toBe(2);
    expect(plan(WORK_PER_THREAD, 3)).toBe(3);
    expect(plan(24_000, 8760)).toBe(16);
    expect(plan(24_000, 8760, 16, 4)).toBe(4);
    expect(plan(24_000, 8760, MIN_CORES_FOR_THREADS, 64)).toBe(MIN_CORES_FOR_THREADS);
  });
  test('--threads 1 always means one thread', () => {
    expect(enumerationThreads({ combinations: 1e9, spectra: 100, cores: 64, maxThreads: 1 })).toBe(1);
  });
});
