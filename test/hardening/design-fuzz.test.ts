/** Property-based fuzzing of the design-file parser: accept or reject cleanly, never crash or hang. */
import fc from 'fast-check';
import { stringify } from 'yaml';
import { describe, expect, test } from 'vitest';
import { loadDesignText } from '../../src/design/index.js';
import { UserError } from '../../src/errors.js';

async function outcome(text: string): Promise<'ok' | 'refused'> {
  try {
    await loadDesignText('/tmp/fuzz-design.yaml', text);
    return 'ok';
  } catch (err) {
    if (!(err instanceof UserError)) throw err;
    expect(err.message.startsWith('/tmp/fuzz-design.yaml')).toBe(true);
    expect(err.message.split('\n')[0].length).toBeGreaterThan(10);
    return 'refused';
  }
}

describe('design parser fuzzing (fast-check, bounded runs)', () => {
  test('arbitrary text', async () => {
    await fc.assert(
      fc.asyncProperty(fc.string({ maxLength: 300 }), async (text) => {
        await outcome(text);
      }),
      { numRuns: 150, seed: 42 },
    );
  });

  test('arbitrary YAML documents of design-like shape', async () => {
    const gap = fc.oneof(fc.double({ min: -1, max: 5, noNaN: true }), fc.constantFrom('1.1', null, 'x', 1e309));
    const subcell = fc.oneof(
      fc.record({ gap }),
      fc.record({ range: fc.array(gap, { maxLength: 3 }) }),
      fc.record({ material: fc.constantFrom('si', 'perovskite-i-br', 'cigs', 'nope', '') }),
      fc.record({ free: fc.boolean(), ere: fc.double({ min: -1, max: 2, noNaN: true }) }),
      fc.dictionary(fc.string({ maxLength: 6 }), fc.anything({ maxDepth: 1 }), { maxKeys: 2 }),
    );
    const design = fc.record(
      {
        name: fc.oneof(fc.string({ maxLength: 20 }), fc.integer()),
        subcells: fc.array(subcell, { maxLength: 7 }),
        wirings: fc.array(fc.constantFrom('series', 'independent', '3t', 'vm:1:2', 'vm:0:1', 'parallel'), { maxLength: 3 }),
        temperature: fc.double({ min: 0, max: 900, noNaN: true }),
        tolerance: fc.record({ loss: fc.double({ min: -1, max: 1, noNaN: true }) }),
        search: fc.record({ step: fc.constantFrom(0.05, 0.1, -1, 0) }),
        map: fc.record({ step: fc.constantFrom(0.05, 0.1, 0) }),
      },
      { requiredKeys: [] },
    );
    await fc.assert(
      fc.asyncProperty(design, async (d) => {
        const t0 = performance.now();
        await outcome(stringify(d));
        // A hang guard, not a speed target.
        expect(performance.now() - t0).toBeLessThan(20_000);
      }),
      { numRuns: 150, seed: 4242 },
    );
  });
});
