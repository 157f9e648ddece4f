import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/errors.js';
import { compositionsForGap, gapFromComposition, parseUserFamily } from '../../src/materials/index.js';

// Invented data for these tests.
const valid = {
  id: 'my-alloy',
  name: 'Invented alloy',
  variable: 'B fraction, x in A1−xBx',
  ea_ev: 1.1,
  eb_ev: 1.9,
  bowing_ev: 0.2,
  window_ev: [1.2, 1.7],
  dEg_dT_ev_per_k: -3e-4,
  refractive_index: 3.4,
  source: 'invented for a test',
};

const where = 'design.yaml: materials[0]';

function errorOf(obj: unknown): UserError {
  try {
    parseUserFamily(obj, where);
  } catch (e) {
    if (e instanceof UserError) return e;
    throw e;
  }
  throw new Error('expected a UserError');
}

describe('parseUserFamily', () => {
  it('builds a bowing-form family with default range [0, 1]', () => {
    const f = parseUserFamily(valid, where);
    expect(f.kind).toBe('alloy');
    expect(f.compositionRange).toEqual([0, 1]);
    expect(f.variable).toEqual({ symbol: 'x', meaning: valid.variable });
    expect(gapFromComposition(f, 0)).toBe(1.1);
    expect(gapFromComposition(f, 1)).toBe(1.9);
    expect(gapFromComposition(f, 0.5)).toBeCloseTo(1.5 - 0.05, 12);
    expect(f.sources['gap_model']).toContain('invented for a test');
    const [x] = compositionsForGap(f, 1.45);
    expect(x).toBeCloseTo(0.5, 10);
  });

  it('honours an explicit range and window reason', () => {
    const f = parseUserFamily({ ...valid, range: [0.1, 0.6], window_reason: 'phase separation above x=0.6' }, where);
    expect(f.compositionRange).toEqual([0.1, 0.6]);
    expect(f.window.reason).toBe('phase separation above x=0.6');
    expect(() => gapFromComposition(f, 0.7)).toThrow(UserError);
  });

  const cases: [string, unknown, RegExp][] = [
    ['not an object', [1, 2], /must be an object/],
    ['missing id', { ...valid, id: undefined }, /field "id" must be a non-empty string/],
    ['id not kebab-case', { ...valid, id: 'My_Alloy' }, /field "id" must be kebab-case/],
    ['ea_ev not a number', { ...valid, ea_ev: '1.1' }, /field "ea_ev" must be a finite number in eV/],
    ['eb_ev not positive', { ...valid, eb_ev: -1 }, /field "eb_ev" must be a gap above 0 eV/],
    ['bowing_ev missing', { ...valid, bowing_ev: undefined }, /field "bowing_ev"/],
    ['window_ev missing', { ...valid, window_ev: undefined }, /field "window_ev" is required/],
    ['window_ev not a pair', { ...valid, window_ev: [1.2] }, /field "window_ev" must be a pair/],
    ['window_ev reversed', { ...valid, window_ev: [1.7, 1.2] }, /field "window_ev" must have lo < hi/],
    ['window_ev out of reach', { ...valid, window_ev: [2.5, 3] }, /field "window_ev" .* does not overlap/],
    ['range outside [0, 1]', { ...valid, range: [0, 1.5] }, /field "range" must lie within \[0, 1\]/],
    ['dEg/dT in meV/K by mistake', { ...valid, dEg_dT_ev_per_k: -0.3 }, /field "dEg_dT_ev_per_k" is in eV\/K/],
    ['refractive index absurd', { ...valid, refractive_index: 0.5 }, /field "refractive_index"/],
    ['bowing drives the gap below zero', { ...valid, bowing_ev: 20 }, /field "bowing_ev" makes the gap fall/],
    ['unknown field (typo)', { ...valid, bowing: 0.2 }, /field "bowing" is not a material-family field; allowed: id, name/],
    ['missing source', { ...valid, source: '' }, /field "source" must be a non-empty string/],
  ];
  for (const [what, obj, message] of cases) {
    it(`rejects ${what}, naming the field and where`, () => {
      const e = errorOf(obj);
      expect(e.message.startsWith(`${where}: `)).toBe(true);
      expect(e.message).toMatch(message);
    });
  }
});
