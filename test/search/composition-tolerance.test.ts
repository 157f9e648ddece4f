/**
 * Tolerance regions in composition units of bound families. Expected values:
 * the inverse of the family's published quadratic 1.57 + 0.39x + 0.33x² eV
 * (Noh et al., Nano Lett. 13 (2013) 1764, from memory) by the quadratic
 * formula, and the 2T optimum on a 1.12 eV bottom near 1.729 eV (docs/PHYSICS.md §5).
 */
import { describe, expect, test } from 'vitest';
import { compositionInterval } from '../../src/search/composition-tolerance.js';
import { runDesignSearch } from '../../src/search/design-search.js';
import { getFamily } from '../../src/materials/index.js';
import { am15g } from '../../src/light/sources.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';

/** x with 1.57 + 0.39x + 0.33x² = E (the root in [0, 1]). */
const brFraction = (e: number) => (-0.39 + Math.sqrt(0.39 ** 2 - 4 * 0.33 * (1.57 - e))) / (2 * 0.33);

describe('composition tolerance', () => {
  test('mixed-halide top on silicon: the 1 % tolerance in Br fraction is the inverse of the gap interval (≈0.29–0.36)', () => {
    const spectrum = am15g();
    const r = runDesignSearch({
      template: idealStack([1.7, 1.12], seriesWiring(2)),
      spectra: [{ spectrum, weight: 1, tempK: 300 }],
      constraints: [{ kind: 'material', family: getFamily('perovskite-i-br'), fullRange: false }, { kind: 'fixed', gapEv: 1.12 }],
      spanEv: [0.5, 2.6],
      loss: 0.01,
    });
    const t = r.result.tolerance.intervals.find((i) => i.subcell === 0)!;
    expect(Math.abs(t.gapEv - 1.729)).toBeLessThan(0.003); // docs/PHYSICS.md §5
    const c = r.compositionTolerance.find((i) => i.subcell === 0)!;
    expect(c.family).toBe('perovskite-i-br');
    expect(Math.abs(c.lowX - brFraction(t.lowEv))).toBeLessThan(1e-9);
    expect(Math.abs(c.highX - brFraction(t.highEv))).toBeLessThan(1e-9);
    expect(Math.abs(c.x - brFraction(t.gapEv))).toBeLessThan(1e-9);
    expect(c.lowX).toBeGreaterThan(0.27);
    expect(c.highX).toBeLessThan(0.38);
  });

  test('a non-monotonic family keeps the optimum’s branch (tin–lead: the Pb-rich side)', () => {
    const snpb = getFamily('perovskite-sn-pb');
    const c = compositionInterval(snpb, 1, 1.27, 1.25, 1.3, 300)!;
    expect(c.x).toBeLessThan(0.6);
    expect(c.lowX).toBeLessThan(c.x);
    expect(c.highX).toBeGreaterThan(c.x);
    expect(c.highX).toBeLessThan(0.67); // the minimum (families.test.ts) is not crossed
  });

  test('fixed compounds have no composition interval', () => {
    expect(compositionInterval(getFamily('si'), 1, 1.12, 1.11, 1.13, 300)).toBeUndefined();
  });
});
