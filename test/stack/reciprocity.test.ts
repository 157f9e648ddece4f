import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';
import { thermalVoltageV } from '../../src/physics/constants.js';

const s = am15g();

describe('reciprocity at the front surface (detailed balance: what cannot get in cannot get out)', () => {
  test('front reflectance R scales both photocurrent and J0 by (1 − R), so Voc stays (Shockley & Queisser 1961 reciprocity)', () => {
    const a = evaluateStack(idealStack([1.34], seriesWiring(1)), s).subcells[0];
    const b = evaluateStack(idealStack([1.34], seriesWiring(1), { frontReflectance: 0.1 }), s).subcells[0];
    expect(b.jphAm2 / a.jphAm2).toBeCloseTo(0.9, 12);
    expect(b.j0Am2 / a.j0Am2).toBeCloseTo(0.9, 12);
    expect(Math.abs(b.vocV - a.vocV)).toBeLessThan(1e-9);
  });
  test('the step path and the energy-bin path agree on J0 with tabulated reflectance', () => {
    const flat = evaluateStack(idealStack([1.34], seriesWiring(1), { frontReflectance: 0.2 }), s).subcells[0];
    const table = evaluateStack(idealStack([1.34], seriesWiring(1), { frontReflectance: { energyEv: [0.5, 4.5], value: [0.2, 0.2] } }), s).subcells[0];
    expect(table.j0Am2 / flat.j0Am2).toBeCloseTo(1, 6);
  });
  test('an absorbing interlayer lowers the lower cell’s photocurrent but not its J0 (it emits at cell temperature what it absorbs)', () => {
    const a = evaluateStack(idealStack([1.7, 1.1], seriesWiring(2)), s).subcells[1];
    const b = evaluateStack(idealStack([1.7, 1.1], seriesWiring(2), { interlayerTransmittance: [0.9] }), s).subcells[1];
    expect(b.jgenAm2 / a.jgenAm2).toBeCloseTo(0.9, 12);
    expect(b.j0Am2).toBe(a.j0Am2);
    expect(a.vocV - b.vocV).toBeCloseTo(-thermalVoltageV(300) * Math.log(0.9), 6);
  });
});
