import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { StepObjective } from '../../src/stack/step-objective.js';
import { computeMap, mapToCsv, mapToCsvBytes, uniformAxis, type GapMap } from '../../src/search/map.js';

const spectra = [{ spectrum: am15g(), weight: 1, tempK: 300 }];

/** A one-row map of these values at x0, x0 + dx, … (NaN for an empty pixel). */
function rowMap(vals: number[], x0: number, dx: number): GapMap {
  return {
    x: Float64Array.from(vals, (_, i) => x0 + dx * i),
    y: Float64Array.of(0.9),
    xCell: 0,
    yCell: 1,
    values: Float64Array.from(vals),
    profileGaps: [],
    profile: false,
    best: { x: x0, y: 0.9, value: 0 },
    points: vals.filter((v) => !Number.isNaN(v)).length,
  };
}

describe('the byte map writer writes exactly the bytes of the plain writer', () => {
  test('a 2T map at 5 meV over 0.5–2.5 eV (about 80 000 pixels, half of them empty)', () => {
    const obj = new StepObjective({ cells: 2, wiring: 'series', ere: [1, 1], topAbsorptance: 1, spectra });
    const axis = uniformAxis(0.5, 2.5, 0.005);
    const m = computeMap(obj, { x: axis, y: axis, xCell: 0, yCell: 1, fixed: [], bounds: [] });
    expect(Buffer.from(mapToCsvBytes(m)).equals(Buffer.from(mapToCsv(m), 'utf8'))).toBe(true);
  });

  test('a profile map with its maximised gap column', () => {
    const obj = new StepObjective({ cells: 3, wiring: 'series', ere: [1, 1, 1], topAbsorptance: 1, spectra });
    const m = computeMap(obj, { x: uniformAxis(1.8, 2.0, 0.02), y: uniformAxis(1.3, 1.45, 0.03), xCell: 0, yCell: 1, fixed: [], bounds: [[0.5, 2.6], [0.5, 2.6], [0.5, 1.3]] });
    expect(m.profile).toBe(true);
    expect(Buffer.from(mapToCsvBytes(m, [2])).equals(Buffer.from(mapToCsv(m, [2]), 'utf8'))).toBe(true);
  });

  test('values whose product with 1e8 is a half as a double round as toFixed does, whichever side of the half they lie', () => {
    // toFixed rounds the exact decimal value: of these, some lie above the half (rounded up) and some below (down).
    const vals: number[] = [];
    let up = 0;
    let down = 0;
    for (let k = 0; k < 5e6 && vals.length < 6000; k += 997) {
      const v = (k + 0.5) / 1e8;
      if (v * 100 * 1e6 !== k + 0.5) continue;
      vals.push(v);
      if (Number((v * 100).toFixed(6).replace('.', '')) === k + 1) up++;
      else down++;
    }
    expect(up).toBeGreaterThan(500);
    expect(down).toBeGreaterThan(500);
    const m = rowMap(vals, 1, 0.0001);
    expect(Buffer.from(mapToCsvBytes(m)).toString('latin1')).toBe(mapToCsv(m));
  });

  test('any values, including exact halves of the last digit, zero, negatives and empty pixels', () => {
    const value = fc.oneof(
      fc.double({ min: 0, max: 1, noNaN: true }),
      fc.integer({ min: 0, max: 2e8 }).map((k) => (k + 0.5) / 1e8),
      fc.constantFrom(0, -0, NaN, 1, 0.123456785, 0.5, 1e-9, -1e-9, 12345.678),
      fc.double({ min: -10, max: 1e6, noNaN: true }),
    );
    fc.assert(
      fc.property(fc.array(value, { minLength: 1, maxLength: 30 }), fc.double({ min: 0.3, max: 3, noNaN: true }), (vals, x0) => {
        const m = rowMap(vals, x0, 0.001);
        expect(Buffer.from(mapToCsvBytes(m)).toString('latin1')).toBe(mapToCsv(m));
      }),
      { numRuns: 2000 },
    );
  });
});
