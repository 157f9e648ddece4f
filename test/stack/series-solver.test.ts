import { describe, expect, it } from 'vitest';
import { BOLTZMANN_J_K, ELEMENTARY_CHARGE_C } from '../../src/physics/constants.js';
import { seriesPowerWm2 } from '../../src/stack/step-objective.js';

/**
 * Maximum power of a series string found the slow way: dP/dJ (a sum of
 * log1p terms taken one by one) bisected to the last bit on (0, J_max), then
 * P(J) at the root. Checks the fast solver's product-of-logarithms form and
 * its start, not the physics (the reference fixtures under test/fixtures do that).
 */
function bisectedPower(jph: number[], j0: number[], vt: number): number {
  const jMax = Math.min(...jph.map((p, i) => p + j0[i]));
  const dPdJ = (j: number) => jph.reduce((s, p, i) => s + Math.log1p((p - j) / j0[i]), 0) - j * jph.reduce((s, p, i) => s + 1 / (p + j0[i] - j), 0);
  let lo = 0;
  let hi = jMax;
  for (let k = 0; k < 400 && hi - lo > 0; k++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (dPdJ(mid) > 0) lo = mid;
    else hi = mid;
  }
  const j = 0.5 * (lo + hi);
  return j * vt * jph.reduce((s, p, i) => s + Math.log1p((p - j) / j0[i]), 0);
}

const VT_300K = (BOLTZMANN_J_K * 300) / ELEMENTARY_CHARGE_C; // kT/q at 300 K [V], from the 2019 SI exact k_B and e

describe('series string solver', () => {
  it('agrees with a bisection for two, four and six cells, mismatched and matched', () => {
    const cases: [number[], number[]][] = [
      [[160, 250], [1e-18, 1e-8]],
      [[200, 200.0001], [1e-20, 1e-10]],
      [[90, 110, 100, 130], [1e-30, 1e-24, 1e-17, 1e-11]],
      [[55, 60, 58, 70, 65, 80], [1e-38, 1e-33, 1e-28, 1e-22, 1e-16, 1e-9]],
    ];
    for (const [jph, j0] of cases) {
      const fast = seriesPowerWm2(Float64Array.from(jph), Float64Array.from(j0), jph.length, VT_300K);
      expect(Math.abs(fast / bisectedPower(jph, j0, VT_300K) - 1)).toBeLessThan(1e-13);
    }
  });

  it('folds the product before it overflows (wide gaps under concentration: each ratio near 1e70)', () => {
    const jph = [4.0e6, 4.1e6, 4.2e6, 4.3e6, 4.4e6, 4.5e6];
    const j0 = [1e-64, 1e-63, 1e-62, 1e-61, 1e-60, 1e-59];
    // The plain product of J_ph/J0 is far beyond the largest double.
    expect(jph.reduce((p, v, i) => p * (v / j0[i]), 1)).toBe(Infinity);
    const fast = seriesPowerWm2(Float64Array.from(jph), Float64Array.from(j0), 6, VT_300K);
    expect(Number.isFinite(fast)).toBe(true);
    expect(Math.abs(fast / bisectedPower(jph, j0, VT_300K) - 1)).toBeLessThan(1e-13);
  });

  it('keeps a string of nearly dark cells (photocurrent far below J0) positive and right', () => {
    const jph = [1e-12, 2e-12];
    const j0 = [1e-3, 1e-3];
    const fast = seriesPowerWm2(Float64Array.from(jph), Float64Array.from(j0), 2, VT_300K);
    expect(fast).toBeGreaterThan(0);
    expect(Math.abs(fast / bisectedPower(jph, j0, VT_300K) - 1)).toBeLessThan(1e-12);
  });

  it('gives zero without light, and the dark current\'s tiny power when one cell is dark', () => {
    expect(seriesPowerWm2(Float64Array.from([0, 0]), Float64Array.from([1e-20, 1e-10]), 2, VT_300K)).toBe(0);
    const fast = seriesPowerWm2(Float64Array.from([0, 10]), Float64Array.from([1e-20, 1e-10]), 2, VT_300K);
    expect(fast).toBeGreaterThan(0);
    expect(Math.abs(fast / bisectedPower([0, 10], [1e-20, 1e-10], VT_300K) - 1)).toBeLessThan(1e-12);
  });
});
