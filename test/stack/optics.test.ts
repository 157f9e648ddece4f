/**
 * Stack optics (docs/PHYSICS.md §3–4): absorptance models, reciprocity between
 * photogeneration and emission, front reflectance and interlayer transmittance.
 * Expected relations are stated in docs/PHYSICS.md §3–4 (Beer–Lambert
 * a = 1 − exp(−p·α·d); Lambertian a = 4n²αd/(1 + 4n²αd), Tiedje et al., IEEE
 * Trans. Electron Dev. 31 (1984) 711; φ_i = φ_0·(1 − R)·Π(1 − a_j)·T_j).
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { stepJscAm2 } from '../../src/light/spectrum.js';
import { j0RadStepAm2 } from '../../src/junction/radiative.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { absorptanceAt, binnedOptics, stackOptics, stepOptics, type StackOptics } from '../../src/stack/optics.js';
import { idealStack, independentWiring, seriesWiring, type AbsorptanceModel, type AlphaModel, type StackSpec } from '../../src/stack/model.js';

const spectrum = am15g();
const SEED = 7031;
const params = (numRuns: number) => ({ seed: SEED, numRuns, endOnFailure: true });
const rel = (a: number, b: number) => Math.abs(a / b - 1);
/** Highest photon energy of the AM1.5G table (280 nm) [eV]. */
const E_MAX = 1239.841984 / 280;

const direct = (alpha0PerCm: number): AlphaModel => ({ kind: 'direct', alpha0PerCm, urbachEv: 0 });
const bl = (passes: 1 | 2, thicknessNm: number, alpha0PerCm: number): AbsorptanceModel => ({ kind: 'beer-lambert', passes, thicknessNm, alpha: direct(alpha0PerCm) });
const lambertian = (refractiveIndex: number, thicknessNm: number, alpha0PerCm: number): AbsorptanceModel => ({
  kind: 'lambertian',
  refractiveIndex,
  thicknessNm,
  alpha: direct(alpha0PerCm),
});

/** Optics of one film of a gap under AM1.5G at 300 K. */
function film(gapEv: number, a: AbsorptanceModel): StackOptics {
  const s = idealStack([gapEv], seriesWiring(1));
  s.subcells[0].absorptance = a;
  return stackOptics(s, spectrum);
}

const gapArb = fc.double({ min: 0.8, max: 2.2, noNaN: true });
const thicknessArb = fc.double({ min: 10, max: 3000, noNaN: true });
const alpha0Arb = fc.double({ min: 3, max: 5.5, noNaN: true }).map((x) => 10 ** x);

describe('Beer–Lambert single vs double pass (docs/PHYSICS.md §3: a = 1 − exp(−p·α·d))', () => {
  test('absorptance follows the formula with α = α0·√(E − E_g) and is 0 below the gap', () => {
    const gap = 1.5;
    const a0 = 1e5; // cm⁻¹ at 1 eV above the gap
    const d = 200; // nm
    for (const e of [1.5005, 1.51, 1.6, 2, 3]) {
      const alphaD = a0 * Math.sqrt(e - gap) * d * 1e-7;
      expect(absorptanceAt(bl(1, d, a0), gap, e)).toBeCloseTo(1 - Math.exp(-alphaD), 12);
      expect(absorptanceAt(bl(2, d, a0), gap, e)).toBeCloseTo(1 - Math.exp(-2 * alphaD), 12);
    }
    expect(absorptanceAt(bl(2, d, a0), gap, 1.49)).toBe(0);
  });

  test('a double pass through d is a single pass through 2d: identical J_gen and J0', () => {
    fc.assert(
      fc.property(gapArb, thicknessArb, alpha0Arb, (g, d, a0) => {
        const two = film(g, bl(2, d, a0));
        const one = film(g, bl(1, 2 * d, a0));
        expect(rel(two.jgenAm2[0], one.jgenAm2[0])).toBeLessThan(1e-12);
        expect(rel(two.j0RadAm2[0], one.j0RadAm2[0])).toBeLessThan(1e-12);
      }),
      params(50),
    );
  });

  test('the rear mirror (double pass) absorbs more than a single pass: higher J_gen and J0', () => {
    fc.assert(
      fc.property(gapArb, thicknessArb, alpha0Arb, (g, d, a0) => {
        const two = film(g, bl(2, d, a0));
        const one = film(g, bl(1, d, a0));
        expect(two.jgenAm2[0]).toBeGreaterThan(one.jgenAm2[0]);
        expect(two.j0RadAm2[0]).toBeGreaterThan(one.j0RadAm2[0]);
      }),
      params(50),
    );
  });
});

describe('Lambertian ≥ double pass ≥ single pass for the same film', () => {
  // Pointwise, 4n²y/(1 + 4n²y) ≥ 1 − e^{−2y} (y = αd) ⇔ 1 + 4n²y ≥ e^{2y}; for n ≥ 3 this holds
  // for all y ≤ 2 (at y = 2: 73 ≥ 54.6, and e^{2y} is convex). Beyond y ≈ 2.3 (n = 3.5) the
  // simple Lambertian expression of docs/PHYSICS.md §3 falls below a double pass; that is a
  // property of the formula, not of the engine, so films are drawn with α·d ≤ 2 over
  // the whole AM1.5G range (E ≤ 4.43 eV).
  const weakFilmArb = fc
    .tuple(gapArb, fc.double({ min: 3, max: 4, noNaN: true }), fc.double({ min: 0.02, max: 2, noNaN: true }), alpha0Arb)
    .map(([g, n, yMax, a0]) => ({ g, n, a0, d: (yMax / (a0 * Math.sqrt(E_MAX - g))) * 1e7 }));

  test('pointwise in a(E)', () => {
    fc.assert(
      fc.property(weakFilmArb, fc.double({ min: 0, max: 1, noNaN: true }), ({ g, n, a0, d }, t) => {
        const e = g + 1e-6 + t * (E_MAX - g);
        const s = absorptanceAt(bl(1, d, a0), g, e);
        const dp = absorptanceAt(bl(2, d, a0), g, e);
        const l = absorptanceAt(lambertian(n, d, a0), g, e);
        expect(dp).toBeGreaterThanOrEqual(s);
        expect(l).toBeGreaterThanOrEqual(dp);
      }),
      params(200),
    );
  });

  test('in J_gen and in J0 (reciprocity: the same a(E) sets both)', () => {
    fc.assert(
      fc.property(weakFilmArb, ({ g, n, a0, d }) => {
        const s = film(g, bl(1, d, a0));
        const dp = film(g, bl(2, d, a0));
        const l = film(g, lambertian(n, d, a0));
        expect(dp.jgenAm2[0]).toBeGreaterThan(s.jgenAm2[0]);
        expect(l.jgenAm2[0]).toBeGreaterThan(dp.jgenAm2[0]);
        expect(dp.j0RadAm2[0]).toBeGreaterThan(s.j0RadAm2[0]);
        expect(l.j0RadAm2[0]).toBeGreaterThan(dp.j0RadAm2[0]);
      }),
      params(50),
    );
  });
});

describe('thick films approach the step absorber (docs/PHYSICS.md §3)', () => {
  test.each<[string, (d: number) => AbsorptanceModel]>([
    ['Beer–Lambert single pass', (d) => bl(1, d, 1e5)],
    ['Beer–Lambert double pass', (d) => bl(2, d, 1e5)],
    ['Lambertian n = 3.5', (d) => lambertian(3.5, d, 1e5)],
  ])('%s, α0 = 1e5 cm⁻¹, 1.4 eV: J_gen and J0 rise monotonically to the step values', (_name, model) => {
    const gap = 1.4;
    const jStep = stepJscAm2(spectrum, gap);
    const j0Step = j0RadStepAm2(gap, 300);
    let prevJ = 0;
    let prevJ0 = 0;
    for (const d of [30, 100, 300, 1e3, 1e4, 1e5, 1e6, 1e7]) {
      const o = film(gap, model(d));
      // strictly rising while the film is thin; once a(E) = 1 to double precision it stays there
      if (d <= 1e3) {
        expect(o.jgenAm2[0]).toBeGreaterThan(prevJ);
        expect(o.j0RadAm2[0]).toBeGreaterThan(prevJ0);
      } else {
        expect(o.jgenAm2[0]).toBeGreaterThanOrEqual(prevJ);
        expect(o.j0RadAm2[0]).toBeGreaterThanOrEqual(prevJ0);
      }
      expect(o.jgenAm2[0]).toBeLessThanOrEqual(jStep * (1 + 1e-12));
      expect(o.j0RadAm2[0]).toBeLessThanOrEqual(j0Step * (1 + 1e-12));
      prevJ = o.jgenAm2[0];
      prevJ0 = o.j0RadAm2[0];
    }
    // 1 cm of film: 1 − a ≤ 1/(4n²αd) ≈ 5e-5 even 1 meV above the gap for the Lambertian form, e^{−100} for Beer–Lambert.
    expect(rel(prevJ, jStep)).toBeLessThan(1e-4);
    expect(rel(prevJ0, j0Step)).toBeLessThan(1e-4);
  });

  test('a 10 µm double-pass film (α0 = 1e5 cm⁻¹) reaches the step-absorber efficiency within 0.01 % abs', () => {
    const gap = 1.34;
    const thick = idealStack([gap], seriesWiring(1));
    thick.subcells[0].absorptance = bl(2, 1e4, 1e5);
    const step = evaluateStack(idealStack([gap], seriesWiring(1)), spectrum).efficiency;
    expect(Math.abs(evaluateStack(thick, spectrum).efficiency - step)).toBeLessThan(1e-4);
  });
});

describe('reciprocity: a thinner film lowers both J_gen and J0 (docs/PHYSICS.md §3)', () => {
  const modelArb = fc.oneof(
    fc.constantFrom<1 | 2>(1, 2).map((p) => (d: number, a0: number) => bl(p, d, a0)),
    fc.double({ min: 1, max: 4, noNaN: true }).map((n) => (d: number, a0: number) => lambertian(n, d, a0)),
  );
  test('for Beer–Lambert (1 and 2 passes) and Lambertian films', () => {
    fc.assert(
      fc.property(gapArb, thicknessArb, fc.double({ min: 0.05, max: 0.95, noNaN: true }), alpha0Arb, modelArb, (g, d, f, a0, model) => {
        const thick = film(g, model(d, a0));
        const thin = film(g, model(f * d, a0));
        expect(thin.jgenAm2[0]).toBeLessThan(thick.jgenAm2[0]);
        expect(thin.j0RadAm2[0]).toBeLessThan(thick.j0RadAm2[0]);
      }),
      params(80),
    );
  });

  test('a partial step a < 1 scales J_gen and J0 by the same factor a', () => {
    fc.assert(
      fc.property(gapArb, fc.double({ min: 0.01, max: 1, noNaN: true }), (g, a) => {
        const full = film(g, { kind: 'step', value: 1 });
        const part = film(g, { kind: 'step', value: a });
        expect(rel(part.jgenAm2[0], a * full.jgenAm2[0])).toBeLessThan(1e-12);
        expect(rel(part.j0RadAm2[0], a * full.j0RadAm2[0])).toBeLessThan(1e-12);
      }),
      params(50),
    );
  });
});

/** Strictly descending step gaps [eV], 2–4 cells. */
const stackGapsArb = fc
  .tuple(fc.double({ min: 0.6, max: 1.3, noNaN: true }), fc.array(fc.double({ min: 0.1, max: 0.6, noNaN: true }), { minLength: 1, maxLength: 3 }))
  .map(([b, steps]) => {
    const g = [b];
    for (const s of steps) g.unshift(g[0] + s);
    return g;
  });

describe('front reflectance R (docs/PHYSICS.md §4: φ_i = φ_0·(1 − R)·…)', () => {
  test('scales every step cell’s photocurrent by (1 − R)', () => {
    fc.assert(
      fc.property(stackGapsArb, fc.double({ min: 0, max: 0.95, noNaN: true }), (gaps, r) => {
        const bare = stackOptics(idealStack(gaps, seriesWiring(gaps.length)), spectrum);
        const refl = stackOptics(idealStack(gaps, seriesWiring(gaps.length), { frontReflectance: r }), spectrum);
        gaps.forEach((_g, i) => expect(rel(refl.jgenAm2[i], (1 - r) * bare.jgenAm2[i])).toBeLessThan(1e-12));
      }),
      params(80),
    );
  });

  test('and lowers η of any wiring', () => {
    fc.assert(
      fc.property(stackGapsArb, fc.double({ min: 0.01, max: 0.5, noNaN: true }), fc.boolean(), (gaps, r, series) => {
        const w = series ? seriesWiring(gaps.length) : independentWiring(gaps.length);
        const bare = evaluateStack(idealStack(gaps, w), spectrum).efficiency;
        const refl = evaluateStack(idealStack(gaps, w, { frontReflectance: r }), spectrum).efficiency;
        expect(refl).toBeLessThan(bare);
      }),
      params(50),
    );
  });
});

describe('interlayer transmittance T (docs/PHYSICS.md §4: φ_i = φ_0·…·Π T_j)', () => {
  test('T below cell k scales the photocurrent of every cell below k by T and leaves the cells above alone', () => {
    fc.assert(
      fc.property(
        stackGapsArb.chain((g) => fc.tuple(fc.constant(g), fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: g.length - 1, maxLength: g.length - 1 }))),
        ([gaps, t]) => {
          const bare = stackOptics(idealStack(gaps, seriesWiring(gaps.length)), spectrum);
          const lossy = stackOptics(idealStack(gaps, seriesWiring(gaps.length), { interlayerTransmittance: t }), spectrum);
          let through = 1;
          for (let i = 0; i < gaps.length; i++) {
            expect(Math.abs(lossy.jgenAm2[i] - through * bare.jgenAm2[i])).toBeLessThanOrEqual(1e-12 * bare.jgenAm2[i]);
            if (i < t.length) through *= t[i];
          }
          // Emission is set by each cell's own a(E): J0 does not depend on T (isolated convention).
          gaps.forEach((_g, i) => expect(lossy.j0RadAm2[i]).toBe(bare.j0RadAm2[i]));
        },
      ),
      params(80),
    );
  });

  test('two cells: T = 0.8 → bottom J_gen × 0.8 exactly, top unchanged (1.73/1.12 eV)', () => {
    const bare = stackOptics(idealStack([1.73, 1.12], seriesWiring(2)), spectrum);
    const lossy = stackOptics(idealStack([1.73, 1.12], seriesWiring(2), { interlayerTransmittance: [0.8] }), spectrum);
    expect(lossy.jgenAm2[0]).toBe(bare.jgenAm2[0]);
    expect(rel(lossy.jgenAm2[1], 0.8 * bare.jgenAm2[1])).toBeLessThan(1e-14);
  });

  test('a spectral T(E) that is 0 below 1.6 eV and 1 above cuts the bottom cell to the photons above 1.6 eV it still receives', () => {
    // Top 1.8 eV absorbs everything above 1.8 eV; the 1.12 eV bottom sees its band [1.12, 1.8)
    // times T(E): only [1.6, 1.8) survives (T ramps linearly from 0 at 1.599 to 1 at 1.601 eV).
    const spec = idealStack([1.8, 1.12], seriesWiring(2), { interlayerTransmittance: [{ energyEv: [1.599, 1.601], value: [0, 1] }] });
    const o = stackOptics(spec, spectrum);
    const want = stepJscAm2(spectrum, 1.6) - stepJscAm2(spectrum, 1.8);
    // bins are 2 meV wide; the ramp sits inside one bin: allow that bin's share (~0.2 % of the 200 meV band).
    expect(rel(o.jgenAm2[1], want)).toBeLessThan(1e-2);
    expect(rel(o.jgenAm2[0], stepJscAm2(spectrum, 1.8))).toBeLessThan(1e-9);
  });
});

describe('the closed-form step path and the energy-bin path agree for step cells', () => {
  // Forcing the bin path: a table-valued R or T that is constant. Both paths integrate
  // the same cumulative photon table and the same Bose–Einstein tail, bins edged at every gap.
  test('constant R, T given as tables equal the scalar case', () => {
    fc.assert(
      fc.property(
        stackGapsArb.chain((g) =>
          fc.tuple(
            fc.constant(g),
            fc.double({ min: 0, max: 0.5, noNaN: true }),
            fc.array(fc.double({ min: 0.5, max: 1, noNaN: true }), { minLength: g.length - 1, maxLength: g.length - 1 }),
            fc.array(fc.double({ min: 0.2, max: 1, noNaN: true }), { minLength: g.length, maxLength: g.length }),
          ),
        ),
        ([gaps, r, t, a]) => {
          const scalar: StackSpec = idealStack(gaps, seriesWiring(gaps.length), { frontReflectance: r, interlayerTransmittance: t });
          a.forEach((v, i) => (scalar.subcells[i].absorptance = { kind: 'step', value: v }));
          const table: StackSpec = {
            ...scalar,
            frontReflectance: { energyEv: [0.1, 5], value: [r, r] },
            interlayerTransmittance: t.map((x) => ({ energyEv: [0.1, 5], value: [x, x] })),
          };
          const cf = stepOptics(scalar, spectrum);
          const bins = binnedOptics(table, spectrum);
          expect(stackOptics(table, spectrum).jgenAm2).toEqual(bins.jgenAm2);
          gaps.forEach((_g, i) => {
            expect(rel(bins.jgenAm2[i], cf.jgenAm2[i])).toBeLessThan(1e-9);
            expect(rel(bins.j0RadAm2[i], cf.j0RadAm2[i])).toBeLessThan(1e-9);
          });
        },
      ),
      params(40),
    );
  });
});
