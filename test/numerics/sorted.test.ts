/** Bisection over sorted arrays: the one helper the spectrum, the optics tables and the enumeration bound share. */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { lastIndexNotPast } from '../../src/numerics/sorted.js';
import { isSeriesString, independentWiring, seriesWiring, stackWithGaps, idealStack } from '../../src/stack/model.js';

/** The same answer by a plain scan. */
function scan(xs: number[], x: number, lo: number, hi: number, descending: boolean): number {
  let i = lo;
  for (let k = lo; k <= hi; k++) if (descending ? xs[k] >= x : xs[k] <= x) i = k;
  return i;
}

describe('lastIndexNotPast', () => {
  test('ascending: the interval holding x, and the last index when x is at or beyond it', () => {
    const xs = Float64Array.from([300, 400, 500, 600]);
    expect(lastIndexNotPast(xs, 300)).toBe(0);
    expect(lastIndexNotPast(xs, 450)).toBe(1);
    expect(lastIndexNotPast(xs, 500)).toBe(2);
    expect(lastIndexNotPast(xs, 600)).toBe(3);
    expect(lastIndexNotPast(xs, 650)).toBe(3);
  });

  test('descending, within a sub-range', () => {
    const q = [9, 7, 5, 3, 1];
    expect(lastIndexNotPast(q, 4, 1, 4, true)).toBe(2);
    expect(lastIndexNotPast(q, 1, 1, 3, true)).toBe(3);
  });

  test('agrees with a plain scan on random sorted arrays', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: 1, maxLength: 40 }), fc.integer({ min: -1100, max: 1100 }), fc.boolean(), (raw, x, descending) => {
        const xs = [...raw].sort((a, b) => (descending ? b - a : a - b));
        if (descending ? xs[0] < x : xs[0] > x) return; // precondition: xs[lo] is not past x
        expect(lastIndexNotPast(xs, x, 0, xs.length - 1, descending)).toBe(scan(xs, x, 0, xs.length - 1, descending));
      }),
      { numRuns: 300 },
    );
  });
});

describe('stack helpers', () => {
  test('a template with other gaps keeps everything else', () => {
    const t = idealStack([1.7, 1.1], seriesWiring(2), { tempK: 320, frontReflectance: 0.05 });
    const s = stackWithGaps(t, [1.8, 1.0]);
    expect(s.subcells.map((c) => c.gapEv)).toEqual([1.8, 1.0]);
    expect(s.tempK).toBe(320);
    expect(s.frontReflectance).toBe(0.05);
    expect(stackWithGaps(t, [1.8, 1.0], 300).tempK).toBe(300);
    expect(t.subcells.map((c) => c.gapEv)).toEqual([1.7, 1.1]);
  });

  test('one series string is 2T; independent and grouped wirings are not', () => {
    expect(isSeriesString(seriesWiring(3))).toBe(true);
    expect(isSeriesString(independentWiring(2))).toBe(false);
    expect(isSeriesString({ kind: 'voltage-matched', label: 'vm:1:2', m: 1, n: 2, groups: [[0], [1]] })).toBe(false);
  });
});
