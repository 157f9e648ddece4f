import { describe, expect, it } from 'vitest';
import { materialsCommand } from '../../src/cli/materials-command.js';
import { UserError } from '../../src/errors.js';
import { listFamilies } from '../../src/materials/index.js';

const FAMILY_KEYS = [
  'id',
  'name',
  'kind',
  'variable',
  'window',
  'range',
  'composition_range',
  'window_reason',
  'dEg_dT_ev_per_k',
  'refractive_index',
  'source',
  'sources',
];

describe('materials command, JSON', () => {
  it('lists every family with the documented fields', () => {
    const out = JSON.parse(materialsCommand({ json: true })) as { families: Record<string, unknown>[] };
    expect(out.families.map((f) => f['id'])).toEqual(listFamilies().map((f) => f.id));
    for (const f of out.families) {
      for (const key of FAMILY_KEYS) expect(f, `${String(f['id'])}.${key}`).toHaveProperty(key);
      expect(f['window']).toHaveLength(2);
      expect(f['range']).toHaveLength(2);
      expect(f['composition_range']).toHaveLength(2);
      expect(typeof f['source']).toBe('string');
    }
    const snpb = out.families.find((f) => f['id'] === 'perovskite-sn-pb')!;
    expect(snpb['kind']).toBe('alloy');
    expect(snpb['composition_window']).toEqual([0, 0.7]);
    expect((snpb['range'] as number[])[0]).toBeCloseTo(1.227, 2);
    const si = out.families.find((f) => f['id'] === 'si')!;
    expect(si['variable']).toBeNull();
    expect(si['range']).toEqual([1.12, 1.12]);
  });

  it('maps a gap to every composition with window flags', () => {
    const out = JSON.parse(materialsCommand({ id: 'perovskite-sn-pb', gap: 1.25, json: true })) as Record<string, unknown>;
    expect(Object.keys(out)).toEqual(['family', 'gap_ev', 'compositions', 'reachable', 'in_window', 'note']);
    expect(out['family']).toBe('perovskite-sn-pb');
    expect(out['gap_ev']).toBe(1.25);
    const comps = out['compositions'] as { x: number; in_window: boolean }[];
    expect(comps).toHaveLength(2);
    expect(comps.map((c) => c.in_window)).toEqual([true, false]);
    expect(out['reachable']).toBe(true);
    expect(out['in_window']).toBe(true);
    expect(typeof out['note']).toBe('string');
  });

  it('reports an unreachable gap', () => {
    const out = JSON.parse(materialsCommand({ id: 'perovskite-sn-pb', gap: 1.05, json: true })) as Record<string, unknown>;
    expect(out['compositions']).toEqual([]);
    expect(out['reachable']).toBe(false);
    expect(out['note']).toContain('below the lowest gap');
  });

  it('maps a composition to its gap', () => {
    const out = JSON.parse(materialsCommand({ id: 'gainp', composition: 0.51, json: true })) as Record<string, unknown>;
    expect(Object.keys(out)).toEqual(['family', 'composition', 'gap_ev', 'in_window']);
    expect(out['composition']).toBe(0.51);
    expect(out['gap_ev'] as number).toBeCloseTo(1.917, 3);
    expect(out['in_window']).toBe(true);
  });

  it('shows one family with its model', () => {
    const out = JSON.parse(materialsCommand({ id: 'cigs', json: true })) as { family: Record<string, unknown> };
    for (const key of FAMILY_KEYS) expect(out.family).toHaveProperty(key);
    expect(out.family['model']).toEqual({ form: 'bowing', ea_ev: 1.04, eb_ev: 1.68, bowing_ev: 0.21 });
  });
});

describe('materials command, text', () => {
  it('prints units and the caution', () => {
    const list = materialsCommand({ json: false });
    expect(list).toContain('[eV]');
    expect(list).toContain('300 K');
    expect(list).toMatch(/Caution: gap models are approximate room-temperature/);
    const one = materialsCommand({ id: 'perovskite-i-br', gap: 1.7, json: false });
    expect(one).toContain('eV');
    expect(one).toContain('Caution');
    expect(materialsCommand({ id: 'algaas', json: false })).toContain('eV/K');
  });
});

describe('materials command, mistakes', () => {
  it('gap and composition together', () => {
    expect(() => materialsCommand({ id: 'cigs', gap: 1.2, composition: 0.3, json: true })).toThrow(UserError);
  });
  it('gap without a family', () => {
    expect(() => materialsCommand({ gap: 1.2, json: true })).toThrow(/needs a family id/);
  });
  it('unknown family', () => {
    expect(() => materialsCommand({ id: 'cigse', json: false })).toThrow(/known families/);
  });
  it('composition out of range', () => {
    expect(() => materialsCommand({ id: 'cigs', composition: 1.5, json: false })).toThrow(UserError);
  });
});
