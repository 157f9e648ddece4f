import { describe, expect, test } from 'vitest';
import { am15g, am15d } from '../../src/light/sources.js';
import { StepObjective, seriesPairPowerWm2, seriesPowerWm2, type StepObjectiveOptions } from '../../src/stack/step-objective.js';
import { thermalVoltageV } from '../../src/physics/constants.js';
import { mapToCsvBytes, uniformAxis, type GapMap } from '../../src/search/map.js';

/**
 * StepObjective.mapTwoCells runs the arithmetic of powerFromTables for every
 * pixel in one loop. Here each pixel is computed the long way (axis tables,
 * then powerFromTables per spectrum, weighted and divided by the incident
 * power) and must agree, with the same count and best pixel: bit for bit for
 * independent cells; for a series pair, whose solve starts from the pixels
 * before it (seriesPairPowerWm2), within 5e-15 relative, both being the
 * stationary power within 1e-14 of the same root in y.
 */
function longWay(obj: StepObjective, x: Float64Array, y: Float64Array, topA: number) {
  const onX = obj.axisTables(x);
  const onY = obj.axisTables(y);
  const out = new Float64Array(x.length * y.length).fill(NaN);
  let points = 0;
  let best = -1;
  for (let iy = 0; iy < y.length; iy++) {
    for (let ix = 0; ix < x.length; ix++) {
      if (!(y[iy] < x[ix])) continue;
      let p = 0;
      obj.spectra.forEach((s, k) => {
        p += s.weight * obj.powerFromTables(k, [onX[k].qnAm2[ix], onY[k].qnAm2[iy]], [onX[k].j0RadAm2[ix], onY[k].j0RadAm2[iy]], topA);
      });
      const at = iy * x.length + ix;
      out[at] = p / obj.incidentPowerWm2;
      points++;
      if (best < 0 || out[at] > out[best]) best = at;
    }
  }
  return { out, points, best };
}

const cases: [string, Omit<StepObjectiveOptions, 'cells'>][] = [
  ['2T, ideal', { wiring: 'series', ere: [1, 1], topAbsorptance: 1, spectra: [{ spectrum: am15g(), weight: 1, tempK: 300 }] }],
  ['4T, ideal', { wiring: 'independent', ere: [1, 1], topAbsorptance: 1, spectra: [{ spectrum: am15g(), weight: 1, tempK: 300 }] }],
  ['2T, thinned top and ERE below 1', { wiring: 'series', ere: [0.01, 0.002], topAbsorptance: 0.8, spectra: [{ spectrum: am15g(), weight: 1, tempK: 300 }] }],
  [
    '2T, two spectra at two temperatures',
    {
      wiring: 'series',
      ere: [1, 0.05],
      topAbsorptance: 1,
      spectra: [
        { spectrum: am15g(), weight: 3, tempK: 300 },
        { spectrum: am15d(), weight: 1, tempK: 330 },
      ],
    },
  ],
];

describe('the two-cell map loop', () => {
  test.each(cases)('%s: every pixel, the count and the best pixel as the long way gives them', (_, o) => {
    const obj = new StepObjective({ cells: 2, ...o });
    const x = uniformAxis(1.3, 2.2, 0.03);
    const y = uniformAxis(0.7, 1.4, 0.035);
    const topA = o.topAbsorptance as number;
    const ref = longWay(obj, x, y, topA);
    const out = new Float64Array(x.length * y.length).fill(NaN);
    const got = obj.mapTwoCells(x, y, topA, out);
    expect(got.points).toBe(ref.points);
    expect(got.best).toBe(ref.best);
    if (o.wiring === 'independent') expect(Buffer.from(out.buffer).equals(Buffer.from(ref.out.buffer))).toBe(true);
    let worst = 0;
    let differing = 0;
    for (let i = 0; i < out.length; i++) {
      expect(Number.isNaN(out[i])).toBe(Number.isNaN(ref.out[i]));
      if (!(ref.out[i] > 0)) {
        expect(Object.is(out[i], ref.out[i]) || (Number.isNaN(out[i]) && Number.isNaN(ref.out[i]))).toBe(true);
        continue;
      }
      if (out[i] !== ref.out[i]) differing++;
      worst = Math.max(worst, Math.abs(out[i] - ref.out[i]) / ref.out[i]);
    }
    expect(worst).toBeLessThan(5e-15);
    // The series loop does take its own path (a copy of the long way would differ nowhere).
    if (o.wiring === 'series') expect(differing).toBeGreaterThan(0);
  });

  test('the 0.5–2.5 eV map at 5 meV under AM1.5G writes the same CSV bytes as the long way', () => {
    const obj = new StepObjective({ cells: 2, wiring: 'series', ere: [1, 1], topAbsorptance: 1, spectra: [{ spectrum: am15g(), weight: 1, tempK: 300 }] });
    const axis = uniformAxis(0.5, 2.5, 0.005);
    const ref = longWay(obj, axis, axis, 1);
    const out = new Float64Array(axis.length ** 2).fill(NaN);
    const got = obj.mapTwoCells(axis, axis, 1, out);
    const asMap = (values: Float64Array, best: number): GapMap => ({
      x: axis, y: axis, xCell: 0, yCell: 1, values, profileGaps: [], profile: false, points: got.points,
      best: { x: axis[best % axis.length], y: axis[Math.floor(best / axis.length)], value: values[best] },
    });
    expect(got.points).toBe(80200);
    expect(got.best).toBe(ref.best);
    expect(Buffer.from(mapToCsvBytes(asMap(out, got.best))).equals(Buffer.from(mapToCsvBytes(asMap(ref.out, ref.best))))).toBe(true);
  });

  test('refuses an objective of other than two cells', () => {
    const obj = new StepObjective({ cells: 3, wiring: 'series', ere: [1, 1, 1], topAbsorptance: 1, spectra: [{ spectrum: am15g(), weight: 1, tempK: 300 }] });
    expect(() => obj.mapTwoCells(uniformAxis(1.5, 1.6, 0.05), uniformAxis(1, 1.1, 0.05), 1, new Float64Array(9))).toThrow(/two-cell/);
  });
});

describe('the series pair solve along a row', () => {
  const vt = thermalVoltageV(300);
  const general = (a0: number, a1: number, b0: number, b1: number) => seriesPowerWm2(Float64Array.of(a0, a1), Float64Array.of(b0, b1), 2, vt);

  test('any start the row hands it (none, close, far, absurd) gives seriesPowerWm2\'s power within 5e-15 and leaves the optimum\'s R = J_max/(J_max − J)', () => {
    // Photocurrents [A/m²] from 1 to 400, J0 [A/m²] from 1e-40 to 1e-3, mismatched both ways.
    const cases: [number, number, number, number][] = [
      [200, 180, 1e-25, 1e-12],
      [150, 210, 3e-30, 2e-9],
      [1, 350, 1e-40, 1e-3],
      [400, 2, 1e-18, 1e-16],
      [120, 120, 1e-20, 1e-20],
    ];
    for (const [a0, a1, b0, b1] of cases) {
      const want = general(a0, a1, b0, b1);
      const starts: [number, number][] = [[NaN, NaN], [1.5, NaN], [40, 38], [1.0000001, 1e6], [1e12, 1.0001], [3, 2.9]];
      for (const [r1, r2] of starts) {
        const warm = Float64Array.of(7, r1, r2);
        const got = seriesPairPowerWm2(a0, a1, b0, b1, vt, warm, 1);
        expect(Math.abs(got - want) / want).toBeLessThan(5e-15);
        // The optimum's R, and the one before it moved down.
        expect(warm[0]).toBe(7);
        expect(Object.is(warm[2], r1)).toBe(true);
        // The power at the J that R gives is the maximum: P is stationary there, so an R off by
        // more than about 1e-6 relative would fall short by more than 1e-12.
        const jMax = Math.min(a0 + b0, a1 + b1);
        const j = jMax - jMax / warm[1];
        const atR = j * vt * (Math.log1p((a0 - j) / b0) + Math.log1p((a1 - j) / b1));
        expect(Math.abs(atR - want) / want).toBeLessThan(1e-12);
      }
    }
  });

  test('near-dark strings and products near overflow go to seriesPowerWm2 itself, and the row forgets its start', () => {
    // Π(1 + J_ph/J0) = 2.25: below 3. And a product of 1e90·1e90, above the fold at 1e150.
    for (const [a0, a1, b0, b1] of [[0.5, 0.5, 1, 1], [1e3, 1e3, 1e-87, 1e-87]] as [number, number, number, number][]) {
      const warm = Float64Array.of(2, 1.9);
      expect(seriesPairPowerWm2(a0, a1, b0, b1, vt, warm, 0)).toBe(general(a0, a1, b0, b1));
      expect(Number.isNaN(warm[0]) && Number.isNaN(warm[1])).toBe(true);
    }
    // A negative photocurrent (J_max ≤ 0): no power, from either.
    const warm = Float64Array.of(NaN, NaN);
    expect(seriesPairPowerWm2(-1, 100, 1e-20, 1e-10, vt, warm, 0)).toBe(0);
    expect(general(-1, 100, 1e-20, 1e-10)).toBe(0);
  });
});
