import { describe, expect, test } from 'vitest';
import { am15g, resolveSpectrum } from '../../src/light/sources.js';
import { blackbodySpectrum } from '../../src/light/blackbody.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';
import { boseEinsteinTailEv3, j0RadStepAm2 } from '../../src/junction/radiative.js';
import { maxPowerPoint, currentAtVoltageAm2, voltageAtCurrentV, vocV } from '../../src/junction/diode.js';
import { lambertW0 } from '../../src/junction/lambert-w.js';
import { thermalVoltageV, BOLTZMANN_EV_K } from '../../src/physics/constants.js';
import type { Spectrum } from '../../src/light/spectrum.js';
import { maximiseScan } from '../../src/numerics/golden.js';

const single = (gap: number, s: Spectrum, over = {}) => evaluateStack(idealStack([gap], seriesWiring(1), over), s);

describe('Shockley–Queisser single junction under AM1.5G at 300 K', () => {
  const s = am15g();
  // Expected values: docs/PHYSICS.md §2 table (independent numpy/scipy implementation);
  // Rühle, Sol. Energy 130 (2016) 139 gives 33.7 % at 1.34 eV (from memory).
  test.each([
    [1.12, 0.3339],
    [1.34, 0.3368],
    [1.6, 0.3052],
  ])('η(%f eV) = %f within 0.02 % abs', (gap, eta) => {
    expect(Math.abs(single(gap, s).efficiency - eta)).toBeLessThan(2e-4);
  });
  test('Jsc(1.12 eV) = 43.81 mA/cm² (docs/PHYSICS.md §2)', () => {
    expect(Math.abs(single(1.12, s).subcells[0].jphAm2 / 10 - 43.81)).toBeLessThan(0.05);
  });
  test('Voc(1.34 eV) = 1.0817 V within 1 mV (docs/PHYSICS.md §2)', () => {
    expect(Math.abs(single(1.34, s).subcells[0].vocV - 1.0817)).toBeLessThan(1e-3);
  });
  test('Voc(1.12 eV) = 0.8766 V, Voc(1.60 eV) = 1.3245 V within 1 mV (docs/PHYSICS.md §2)', () => {
    expect(Math.abs(single(1.12, s).subcells[0].vocV - 0.8766)).toBeLessThan(1e-3);
    expect(Math.abs(single(1.6, s).subcells[0].vocV - 1.3245)).toBeLessThan(1e-3);
  });
});

describe('6000 K blackbody at 1 sun (f = 2.1646e-5)', () => {
  test('single-gap optimum is 30.96 % near 1.31 eV within 0.05 % abs (De Vos, J. Phys. D 13 (1980) 839; Martí & Araújo 1996: 31.0 %, from memory)', () => {
    const s = blackbodySpectrum({ tempK: 6000, dilution: 2.1646e-5 });
    const gap = maximiseScan((g) => single(g, s).efficiency, 0.9, 1.8, 90, 1e-7);
    expect(Math.abs(single(gap, s).efficiency - 0.3096)).toBeLessThan(5e-4);
    expect(Math.abs(gap - 1.31)).toBeLessThan(0.02);
  });
});

describe('non-ideal junctions', () => {
  const s = am15g();
  test('ERE = 1e-4 lowers Voc by V_t·ln(10⁴) within 0.1 mV (Green, Prog. Photovolt. 20 (2012) 472)', () => {
    const a = single(1.34, s).subcells[0].vocV;
    const b = single(1.34, s, { subcells: [{ gapEv: 1.34, ere: 1e-4, absorptance: { kind: 'step', value: 1 } }] }).subcells[0].vocV;
    expect(Math.abs(a - b - thermalVoltageV(300) * Math.log(1e4))).toBeLessThan(1e-4);
  });
  test('concentration X raises Voc by V_t·ln X (ideal diode, Jsc ≫ J0; common practice)', () => {
    for (const x of [10, 1000, 46000]) {
      const a = single(1.34, s).subcells[0].vocV;
      const b = single(1.34, resolveSpectrum('am1.5g', { suns: x })).subcells[0].vocV;
      expect(Math.abs(b - a - thermalVoltageV(300) * Math.log(x))).toBeLessThan(1e-6);
    }
  });
  test('a hotter cell has a lower Voc and efficiency', () => {
    const cold = single(1.34, s, { tempK: 250 });
    const hot = single(1.34, s, { tempK: 350 });
    expect(hot.subcells[0].vocV).toBeLessThan(cold.subcells[0].vocV);
    expect(hot.efficiency).toBeLessThan(cold.efficiency);
  });
});

describe('junction functions', () => {
  test('Bose–Einstein series equals numerical quadrature of E²/(e^{E/kT}−1) to 1e-9', () => {
    for (const [e, t] of [[1.12, 300], [0.3, 400], [2.5, 200], [0.05, 300]]) {
      const kt = BOLTZMANN_EV_K * t;
      let sum = 0;
      const hi = e + 60 * kt;
      const n = 200000;
      const h = (hi - e) / n;
      for (let k = 0; k <= n; k++) {
        const u = e + k * h;
        const w = k === 0 || k === n ? 1 : k % 2 ? 4 : 2;
        sum += (w * u * u) / Math.expm1(u / kt);
      }
      expect(boseEinsteinTailEv3(e, t) / ((sum * h) / 3)).toBeCloseTo(1, 9);
    }
  });
  test('Bose–Einstein differs from the Boltzmann shortcut at low x', () => {
    const kt = BOLTZMANN_EV_K * 300;
    const x = 3;
    const boltzmann = kt ** 3 * Math.exp(-x) * (x * x + 2 * x + 2);
    expect(boseEinsteinTailEv3(x * kt, 300) / boltzmann).toBeGreaterThan(1.01);
  });
  test('Lambert W satisfies W·e^W = x', () => {
    for (const x of [1e-6, 0.3, 1, Math.E, 10, 1e5, 1e30, 1e300]) {
      const w = lambertW0(x);
      expect(Math.log(w) + w).toBeCloseTo(Math.log(x), 12);
    }
  });
  test('closed-form MPP is a stationary point of P(V) and V(J) inverts J(V)', () => {
    const vt = thermalVoltageV(300);
    const j0 = j0RadStepAm2(1.4, 300);
    const jph = 320;
    const mpp = maxPowerPoint(jph, j0, vt);
    const p = (v: number) => v * currentAtVoltageAm2(jph, j0, vt, v);
    expect(p(mpp.vmpV)).toBeGreaterThan(p(mpp.vmpV + 1e-4));
    expect(p(mpp.vmpV)).toBeGreaterThan(p(mpp.vmpV - 1e-4));
    expect(voltageAtCurrentV(jph, j0, vt, mpp.jmpAm2)).toBeCloseTo(mpp.vmpV, 12);
    expect(currentAtVoltageAm2(jph, j0, vt, vocV(jph, j0, vt))).toBeCloseTo(0, 9);
  });
});
