import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/errors.js';
import {
  compositionsForGap,
  describeGap,
  gapAtTemperature,
  gapFromComposition,
  gapReach,
  getFamily,
  isInWindow,
  listFamilies,
  makeFamily,
} from '../../src/materials/index.js';

const alloys = listFamilies().filter((f) => f.kind === 'alloy');

describe('composition → gap → composition round trip', () => {
  for (const family of alloys) {
    it(`${family.id}: every grid composition is among the compositions of its own gap`, () => {
      const [lo, hi] = family.compositionRange;
      for (let i = 0; i <= 50; i++) {
        const x = lo + ((hi - lo) * i) / 50;
        const g = gapFromComposition(family, x);
        const roots = compositionsForGap(family, g);
        expect(roots.length).toBeGreaterThanOrEqual(1);
        // Near a flat extremum the root is only defined to ~sqrt(machine eps).
        const nearest = roots.reduce((a, b) => (Math.abs(b - x) < Math.abs(a - x) ? b : a));
        expect(Math.abs(nearest - x)).toBeLessThan(1e-6);
        for (const r of roots) expect(Math.abs(gapFromComposition(family, r) - g)).toBeLessThan(1e-11);
        expect([...roots].sort((a, b) => a - b)).toEqual(roots);
      }
    });
  }
});

describe('non-monotonic Sn–Pb perovskite', () => {
  const snpb = getFamily('perovskite-sn-pb');
  const reach = gapReach(snpb);

  it('gives two compositions for a gap between its minimum and its lower end member', () => {
    const g = 0.5 * (reach.minEv + 1.35);
    const roots = compositionsForGap(snpb, g);
    expect(roots).toHaveLength(2);
    expect(roots[0]!).toBeLessThan(reach.xAtMin);
    expect(roots[1]!).toBeGreaterThan(reach.xAtMin);
  });

  it('gives one composition between its two end members (Pb-rich branch only)', () => {
    const roots = compositionsForGap(snpb, 1.45);
    expect(roots).toHaveLength(1);
    expect(roots[0]!).toBeLessThan(reach.xAtMin);
  });

  it('gives exactly one composition at its minimum', () => {
    const roots = compositionsForGap(snpb, reach.minEv);
    expect(roots).toHaveLength(1);
    expect(roots[0]!).toBeCloseTo(reach.xAtMin, 6);
  });

  it('flags the Sn-rich branch outside the window (composition limit)', () => {
    const d = describeGap(snpb, 1.25);
    expect(d.compositions.map((c) => c.inWindow)).toEqual([true, false]);
    expect(d.inWindow).toBe(true);
    expect(d.note).toContain('only x=');
  });
});

describe('out of reach', () => {
  it('a gap below the minimum is unreachable, with a note naming the lowest gap and where', () => {
    const snpb = getFamily('perovskite-sn-pb');
    const d = describeGap(snpb, 1.05);
    expect(d.reachable).toBe(false);
    expect(d.inWindow).toBe(false);
    expect(d.compositions).toEqual([]);
    expect(d.note).toMatch(/^1\.05 eV is below the lowest gap of Tin–lead iodide perovskite \(1\.23 eV at x=0\.6\d\)$/);
  });

  it('a gap above the maximum is unreachable, with a note naming the highest gap', () => {
    const d = describeGap(getFamily('perovskite-i-br'), 2.6);
    expect(d.reachable).toBe(false);
    expect(d.note).toContain('above the highest gap');
    expect(d.note).toContain('2.29 eV at x=1.00');
  });

  it('a fixed absorber reaches only its own gap', () => {
    const si = getFamily('si');
    expect(compositionsForGap(si, 1.12)).toEqual([0]);
    expect(compositionsForGap(si, 1.13)).toEqual([]);
    expect(describeGap(si, 1.3).note).toContain('fixed absorber');
  });
});

describe('practical window flags', () => {
  it('mixed-halide perovskite: 1.70 eV is inside, 1.95 eV outside with the segregation reason', () => {
    const ibr = getFamily('perovskite-i-br');
    expect(describeGap(ibr, 1.7).inWindow).toBe(true);
    const d = describeGap(ibr, 1.95);
    expect(d.reachable).toBe(true);
    expect(d.inWindow).toBe(false);
    expect(d.note).toContain('segregation');
  });

  it('AlGaAs above 1.9 eV, near the direct–indirect crossover, is outside the window', () => {
    const algaas = getFamily('algaas');
    expect(isInWindow(algaas, 0.2, gapFromComposition(algaas, 0.2))).toBe(true);
    expect(isInWindow(algaas, 0.44, gapFromComposition(algaas, 0.44))).toBe(false);
  });

  it('every built-in window overlaps the gaps its model reaches', () => {
    for (const f of listFamilies()) {
      const r = gapReach(f);
      expect(f.window.gapEv[0]).toBeLessThanOrEqual(f.window.gapEv[1]);
      expect(f.window.gapEv[1]).toBeGreaterThanOrEqual(r.minEv - 1e-9);
      expect(f.window.gapEv[0]).toBeLessThanOrEqual(r.maxEv + 1e-9);
      expect(f.gapSpanEv).toEqual([r.minEv, r.maxEv]);
    }
  });
});

describe('inversion of a polynomial with two interior extrema', () => {
  // Invented for this test: Eg = 1.5 + 10(x−0.2)(x−0.5)(x−0.8) eV crosses 1.5 eV three times.
  const wiggle = makeFamily({
    id: 'test-wiggle',
    name: 'invented cubic',
    kind: 'alloy',
    variable: { symbol: 'x', meaning: 'invented' },
    model: { form: 'polynomial', coefficientsEv: [0.7, 6.6, -15, 10] },
    compositionRange: [0, 1],
    window: { gapEv: [0.5, 2.5], reason: 'invented' },
    dEgDtEvPerK: 0,
    refractiveIndex: 3,
    citation: 'invented',
    sources: {},
  });

  it('finds all three compositions, ascending, to 1e-12', () => {
    const roots = compositionsForGap(wiggle, 1.5);
    expect(roots).toHaveLength(3);
    expect(roots[0]!).toBeCloseTo(0.2, 11);
    expect(roots[1]!).toBeCloseTo(0.5, 11);
    expect(roots[2]!).toBeCloseTo(0.8, 11);
  });

  it('reports the reach at the end points, not the interior extrema, when those are larger', () => {
    const r = gapReach(wiggle);
    expect(r.minEv).toBeCloseTo(0.7, 12);
    expect(r.xAtMin).toBe(0);
    expect(r.maxEv).toBeCloseTo(2.3, 12);
    expect(r.xAtMax).toBe(1);
  });
});

describe('input errors are UserErrors', () => {
  const cigs = getFamily('cigs');
  it('composition outside the tunable range', () => {
    expect(() => gapFromComposition(cigs, 1.01)).toThrow(UserError);
    expect(() => gapFromComposition(cigs, -0.01)).toThrow(/outside the tunable range/);
    expect(() => gapFromComposition(cigs, Number.NaN)).toThrow(UserError);
  });
  it('setting a composition on a fixed absorber', () => {
    expect(gapFromComposition(getFamily('ge'), 0)).toBe(0.66);
    expect(() => gapFromComposition(getFamily('ge'), 0.5)).toThrow(/fixed absorber/);
  });
  it('non-finite gap', () => {
    expect(() => compositionsForGap(cigs, Number.POSITIVE_INFINITY)).toThrow(UserError);
    expect(() => describeGap(cigs, Number.NaN)).toThrow(UserError);
  });
  it('unknown family id lists the known ids', () => {
    expect(() => getFamily('perovskite')).toThrow(UserError);
    expect(() => getFamily('perovskite')).toThrow(/known families: .*perovskite-i-br/);
  });
});

describe('gap at temperature (linear about 300 K)', () => {
  it('is the 300 K gap at 300 K', () => {
    expect(gapAtTemperature(getFamily('si'), 1.12, 300)).toBe(1.12);
  });
  it('narrows on heating for Si and III-V, widens for lead-halide perovskite', () => {
    expect(gapAtTemperature(getFamily('si'), 1.12, 350)).toBeLessThan(1.12);
    expect(gapAtTemperature(getFamily('gainp'), 1.9, 350)).toBeLessThan(1.9);
    expect(gapAtTemperature(getFamily('perovskite-i-br'), 1.6, 350)).toBeGreaterThan(1.6);
  });
  it('applies dEg/dT exactly', () => {
    const f = getFamily('perovskite-i-br');
    expect(gapAtTemperature(f, 1.6, 340)).toBeCloseTo(1.6 + 40 * f.dEgDtEvPerK, 14);
  });
  it('rejects a non-positive temperature or a non-finite gap', () => {
    expect(() => gapAtTemperature(getFamily('si'), 1.12, 0)).toThrow(UserError);
    expect(() => gapAtTemperature(getFamily('si'), Number.NaN, 300)).toThrow(UserError);
  });
});
