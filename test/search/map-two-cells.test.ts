import { describe, expect, test } from 'vitest';
import { am15g, am15d } from '../../src/light/sources.js';
import { StepObjective, type StepObjectiveOptions } from '../../src/stack/step-objective.js';
import { uniformAxis } from '../../src/search/map.js';

/**
 * StepObjective.mapTwoCells runs the arithmetic of powerFromTables for every
 * pixel in one loop. Here each pixel is computed the long way (axis tables,
 * then powerFromTables per spectrum, weighted and divided by the incident
 * power) and must agree bit for bit, with the same count and best pixel.
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
    expect(Buffer.from(out.buffer).equals(Buffer.from(ref.out.buffer))).toBe(true);
  });

  test('refuses an objective of other than two cells', () => {
    const obj = new StepObjective({ cells: 3, wiring: 'series', ere: [1, 1, 1], topAbsorptance: 1, spectra: [{ spectrum: am15g(), weight: 1, tempK: 300 }] });
    expect(() => obj.mapTwoCells(uniformAxis(1.5, 1.6, 0.05), uniformAxis(1, 1.1, 0.05), 1, new Float64Array(9))).toThrow(/two-cell/);
  });
});
