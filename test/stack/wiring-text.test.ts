import { describe, expect, test } from 'vitest';
import { parseWiring } from '../../src/stack/wiring-text.js';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack } from '../../src/stack/model.js';
import { UserError } from '../../src/errors.js';
import { runJsonHere } from '../helpers/cli.js';

describe('wiring as text', () => {
  test.each([
    ['series', 3, [[0, 1, 2]]],
    ['4t', 3, [[0], [1], [2]]],
    ['groups:1+2/3', 3, [[0, 1], [2]]],
    ['groups:1/2+3+4', 4, [[0], [1, 2, 3]]],
  ])('%s on %i subcells', (text, n, groups) => {
    expect(parseWiring(text, n).groups).toEqual(groups);
  });
  test('voltage-matched strings of two groups', () => {
    const w = parseWiring('vm:2:3:1+2/3', 3);
    expect(w).toMatchObject({ kind: 'voltage-matched', m: 2, n: 3, groups: [[0, 1], [2]] });
  });
  test.each([
    ['groups:1+2', 3, /every subcell must be in one group/],
    ['groups:1+2/2+3', 3, /subcell 2 is in two groups/],
    ['groups:1/4', 3, /"4" is not a subcell/],
    ['vm:1:2', 3, /needs its two groups/],
    ['vm:1:2:1/2/3', 3, /exactly two groups/],
    ['3t', 3, /needs exactly 2 subcells/],
    ['parallel', 2, /must be series/],
  ])('%s on %i subcells is refused', (text, n, message) => {
    expect(() => parseWiring(text as string, n as number)).toThrow(UserError);
    expect(() => parseWiring(text as string, n as number)).toThrow(message as RegExp);
  });
  test('a mixed 3J (top two in series, bottom alone) lies between full series and independent (docs/PHYSICS.md §5)', () => {
    const s = am15g();
    const gaps = [1.9, 1.37, 0.93];
    const eta = (w: string) => evaluateStack(idealStack(gaps, parseWiring(w, 3)), s).efficiency;
    expect(eta('groups:1+2/3')).toBeGreaterThanOrEqual(eta('series') - 1e-12);
    expect(eta('groups:1+2/3')).toBeLessThanOrEqual(eta('independent') + 1e-12);
  });
  test('the command line takes grouped wirings', async () => {
    const j = await runJsonHere(['evaluate', '--gaps', '1.9,1.37,0.93', '--wiring', 'groups:1+2/3']);
    expect(j.wiring).toBe('groups:1+2/3');
    expect(j.voc_v).toBeNull();
    expect(j.subcells[0].j_op_ma_cm2).toBeCloseTo(j.subcells[1].j_op_ma_cm2, 9);
  });
});
