import { describe, expect, test } from 'vitest';
import { CandidateKeeper } from '../../src/search/candidates.js';
import { enumerateGeneric } from '../../src/search/enumerate.js';

/** Deterministic pseudo-random sequence in [0, 1) (a linear congruential generator, common practice). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/** The kept list defined directly: every offer within the margin of the final best, best first. */
function directlyKept(values: number[], margin: number): number[] {
  const best = values.reduce((a, v) => Math.max(a, v), 0);
  return values.filter((v) => v >= best * (1 - margin)).sort((a, b) => b - a);
}

describe('candidate bookkeeping stays linear in the leaves offered', () => {
  test('far more leaves inside the margin than any fixed cap: sweeps examine at most 3 entries per kept leaf', () => {
    const keeper = new CandidateKeeper(0.01, 0, 1000);
    const values: number[] = [];
    const rnd = lcg(7);
    // 300 000 leaves all within 1 % of the best: the case that made a capped list re-filter on every insert.
    for (let i = 0; i < 300_000; i++) {
      const v = 0.6 - 0.005 * rnd();
      values.push(v);
      keeper.offer(() => [v], v);
    }
    expect(keeper.offered).toBe(300_000);
    expect(keeper.swept).toBeLessThanOrEqual(3 * keeper.offered);
    expect(keeper.sweeps).toBeLessThan(20);
    expect(keeper.result().map((c) => c.value)).toEqual(directlyKept(values, 0.01));
  });

  test('a rising best drops stale entries in batches and keeps the list bounded by twice the live entries', () => {
    const keeper = new CandidateKeeper(0.001, 0, 64);
    const values: number[] = [];
    for (let i = 1; i <= 100_000; i++) {
      const v = i / 100_000;
      values.push(v);
      keeper.offer(() => [v], v);
      // Live entries: those within 0.1 % of i/100 000, about 0.001·i + 1 of them.
      expect(keeper.size).toBeLessThanOrEqual(64 + 2 * (0.001 * i + 2));
    }
    expect(keeper.swept).toBeLessThanOrEqual(3 * keeper.offered);
    expect(keeper.result().map((c) => c.value)).toEqual(directlyKept(values, 0.001));
    expect(keeper.best.value).toBe(1);
  });

  test('offers below the threshold are refused without building their gaps', () => {
    const keeper = new CandidateKeeper(0.1, 0.5);
    let built = 0;
    expect(keeper.offer(() => (built++, [1]), 0.4)).toBe(false);
    expect(keeper.offer(() => (built++, [1]), 0.46)).toBe(true);
    expect(built).toBe(1);
    // Nothing beat the initial value: the best carries no gaps.
    expect(keeper.best.gapsEv).toEqual([]);
  });

  test('the generic enumerator keeps exactly the combinations within the margin of the best', () => {
    const axis = Float64Array.from({ length: 60 }, (_, i) => 0.5 + 0.02 * i);
    // A smooth made-up objective with a broad top, so thousands of combinations lie within the margin.
    const f = (g: number[]) => 1 - 0.05 * ((g[0] - 1.6) ** 2 + (g[1] - 1.1) ** 2 + (g[2] - 0.8) ** 2);
    const r = enumerateGeneric(f, 3, axis, [[0, 59], [0, 59], [0, 59]], 0.02);
    const all: number[] = [];
    for (let a = 59; a >= 0; a--) for (let b = a - 1; b >= 0; b--) for (let c = b - 1; c >= 0; c--) all.push(f([axis[a], axis[b], axis[c]]));
    const expected = directlyKept(all, 0.02);
    expect(expected.length).toBeGreaterThan(4096);
    expect(r.candidates.map((c) => c.value)).toEqual(expected);
    expect(r.leaves).toBe(all.length);
  });
});

describe('six independent subcells (once a hang: more leaves within the margin than the old fixed cap)', () => {
  test(
    'the search returns its optimum and beats the best five-cell stack',
    async () => {
      const { am15g } = await import('../../src/light/sources.js');
      const { StepObjective } = await import('../../src/stack/step-objective.js');
      const { bandEdgeEnergiesEv, searchGaps } = await import('../../src/search/optimize.js');
      const s = am15g();
      const edges = bandEdgeEnergiesEv(s, 0.5, 2.6);
      const run = (cells: number) =>
        searchGaps(
          new StepObjective({ cells, wiring: 'independent', ere: Array(cells).fill(1), topAbsorptance: 1, spectra: [{ spectrum: s, weight: 1, tempK: 300 }] }),
          { cells, spanEv: [0.5, 2.6], ranges: [], fixed: [], loss: 0.01 },
          edges,
        );
      const six = run(6);
      // Regression value of this engine (no external source): 60.073 % at 2.5546/2.0324/1.6413/1.3354/0.9572/0.6916 eV.
      expect(six.best.value).toBeCloseTo(0.60073, 5);
      [2.5546, 2.0324, 1.6413, 1.3354, 0.9572, 0.6916].forEach((g, i) => expect(six.best.gapsEv[i]).toBeCloseTo(g, 3));
      // Adding an independently wired subcell can never lose power (common practice: it may take no photons).
      expect(six.best.value).toBeGreaterThan(run(5).best.value);
    },
    180_000,
  );
});
