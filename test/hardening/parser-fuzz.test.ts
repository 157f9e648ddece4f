/** Property-based fuzzing of the spectrum parser: it accepts or rejects cleanly, never crashes or hangs. */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { UserError } from '../../src/errors.js';
import { spectrumFromText } from '../../src/light/table-file.js';
import { totalPhotonFlux } from '../../src/light/spectrum.js';

const outcome = (text: string) => {
  const t0 = performance.now();
  try {
    const s = spectrumFromText('fuzz.csv', text);
    return { ok: true as const, s, ms: performance.now() - t0 };
  } catch (err) {
    if (!(err instanceof UserError)) throw err;
    expect(err.message.startsWith('fuzz.csv')).toBe(true);
    expect(err.message.includes('\n')).toBe(false);
    return { ok: false as const, ms: performance.now() - t0 };
  }
};

describe('spectrum parser fuzzing (fast-check, bounded runs)', () => {
  test('arbitrary text is accepted or refused with a one-line UserError naming the file', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 400 }), (text) => {
        const r = outcome(text);
        // A hang guard, not a speed target: a parse that loops would never return.
        expect(r.ms).toBeLessThan(20_000);
      }),
      { numRuns: 400, seed: 20261202 },
    );
  });

  test('table-shaped text with random cells: every accepted table is finite, positive and ascending', () => {
    const cell = fc.oneof(
      fc.double({ min: -10, max: 5000, noNaN: false }).map(String),
      fc.constantFrom('', 'NaN', 'inf', '-0', '1e400', 'x', '3,5', '"7"', '١٢'),
    );
    const row = fc.tuple(cell, cell).map(([a, b]) => `${a},${b}`);
    const table = fc.tuple(fc.constantFrom('wavelength_nm,irradiance_W_m2_nm', 'energy_eV,photons/m2/s/eV', 'x,y', ''), fc.array(row, { maxLength: 30 }));
    fc.assert(
      fc.property(table, ([head, rows]) => {
        const r = outcome([head, ...rows].join('\n'));
        if (r.ok) {
          const w = r.s.wavelengthNm;
          for (let i = 1; i < w.length; i++) expect(w[i]).toBeGreaterThan(w[i - 1]);
          expect(Number.isFinite(r.s.pinWm2)).toBe(true);
          expect(r.s.pinWm2).toBeGreaterThanOrEqual(0);
          expect(Number.isFinite(totalPhotonFlux(r.s))).toBe(true);
        }
      }),
      { numRuns: 400, seed: 7 },
    );
  });

  test('valid random tables are always accepted', () => {
    const table = fc
      .array(fc.tuple(fc.double({ min: 0.01, max: 50, noNaN: true }), fc.double({ min: 0, max: 3, noNaN: true })), { minLength: 5, maxLength: 60 })
      .map((steps) => {
        let x = 250;
        return steps.map(([dx, y]) => `${(x += dx).toPrecision(12)},${y}`);
      });
    fc.assert(
      fc.property(table, (rows) => {
        const r = outcome(['wavelength_nm,irradiance_W_m2_nm', ...rows].join('\n'));
        expect(r.ok).toBe(true);
      }),
      { numRuns: 200, seed: 11 },
    );
  });
});
