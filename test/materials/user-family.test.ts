import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/errors.js';
import { compositionsForGap, familyFromEntry, gapFromComposition, type UserFamilyEntry } from '../../src/materials/index.js';
import { loadDesignText } from '../../src/design/index.js';

// Invented data for these tests.
const valid: UserFamilyEntry = {
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

function errorOf(obj: UserFamilyEntry): UserError {
  try {
    familyFromEntry(obj, where);
  } catch (e) {
    if (e instanceof UserError) return e;
    throw e;
  }
  throw new Error('expected a UserError');
}

describe('familyFromEntry: a schema-valid entry becomes a family', () => {
  it('builds a bowing-form family with default range [0, 1]', () => {
    const f = familyFromEntry(valid, where);
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
    const f = familyFromEntry({ ...valid, range: [0.1, 0.6], window_reason: 'phase separation above x=0.6' }, where);
    expect(f.compositionRange).toEqual([0.1, 0.6]);
    expect(f.window.reason).toBe('phase separation above x=0.6');
    expect(() => gapFromComposition(f, 0.7)).toThrow(UserError);
  });

  // What a schema cannot say: relations between fields.
  const cases: [string, UserFamilyEntry, RegExp][] = [
    ['window_ev reversed', { ...valid, window_ev: [1.7, 1.2] }, /field "window_ev" must have lo < hi/],
    ['range reversed', { ...valid, range: [0.6, 0.1] }, /field "range" must have lo < hi/],
    ['window_ev out of reach', { ...valid, window_ev: [2.5, 3] }, /field "window_ev" .* does not overlap/],
    ['bowing drives the gap below zero', { ...valid, bowing_ev: 9 }, /field "bowing_ev" makes the gap fall/],
  ];
  for (const [what, obj, message] of cases) {
    it(`rejects ${what}, naming the field and where`, () => {
      const e = errorOf(obj);
      expect(e.message.startsWith(`${where}: `)).toBe(true);
      expect(e.message).toMatch(message);
    });
  }
});

/** The family as YAML under materials:, in a design with one bound subcell. */
function designWith(fields: Record<string, unknown>): string {
  const body = Object.entries(fields)
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => `    ${k}: ${JSON.stringify(v)}`)
    .join('\n')
    .replace(/^    /, '  - ');
  return `name: family check\nmaterials:\n${body}\nsubcells:\n  - material: my-alloy\n  - gap: 1.0\n`;
}

describe('the design schema checks each field of a user family (schema/design.schema.json $defs/family)', () => {
  const cases: [string, Record<string, unknown>, RegExp][] = [
    ['missing id', { ...valid, id: undefined }, /materials\[0\]: missing required key "id"/],
    ['id not kebab-case', { ...valid, id: 'My_Alloy' }, /materials\[0\]\.id: "My_Alloy" is not allowed; expected kebab-case id/],
    ['ea_ev not a number', { ...valid, ea_ev: '1.1' }, /materials\[0\]\.ea_ev: must be a number/],
    ['eb_ev not positive', { ...valid, eb_ev: -1 }, /materials\[0\]\.eb_ev: must be > 0/],
    ['bowing_ev missing', { ...valid, bowing_ev: undefined }, /missing required key "bowing_ev"/],
    ['window_ev missing', { ...valid, window_ev: undefined }, /missing required key "window_ev"/],
    ['window_ev not a pair', { ...valid, window_ev: [1.2] }, /materials\[0\]\.window_ev: must hold at least 2 item/],
    ['range outside [0, 1]', { ...valid, range: [0, 1.5] }, /materials\[0\]\.range\[1\]: must be ≤ 1/],
    ['dEg/dT in meV/K by mistake', { ...valid, dEg_dT_ev_per_k: -0.3 }, /materials\[0\]\.dEg_dT_ev_per_k: must be ≥ -0\.01 .*meV\/K/],
    ['refractive index absurd', { ...valid, refractive_index: 0.5 }, /materials\[0\]\.refractive_index: must be ≥ 1/],
    ['unknown field (typo)', { ...valid, bowing: 0.2 }, /unknown key "bowing"; allowed here: id, name/],
    ['empty source', { ...valid, source: '' }, /materials\[0\]\.source: must not be empty/],
  ];
  for (const [what, fields, message] of cases) {
    it(`rejects ${what}, with the design line`, async () => {
      await expect(loadDesignText('family.yaml', designWith(fields))).rejects.toThrow(message);
      await expect(loadDesignText('family.yaml', designWith(fields))).rejects.toThrow(/^family\.yaml:\d+: /);
    });
  }
  it('accepts the valid entry and binds the subcell to it', async () => {
    const d = await loadDesignText('family.yaml', designWith({ ...valid }));
    expect(d.subcells[0].constraint.kind).toBe('material');
  });
});
