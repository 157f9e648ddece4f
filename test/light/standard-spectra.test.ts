import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadDesignText } from '../../src/design/index.js';
import { am0, am15d, am15g, resolveSpectrum } from '../../src/light/sources.js';
import { trapezoid } from '../../src/light/spectrum.js';
import { runJsonHere } from '../helpers/cli.js';

describe('built-in ASTM G173-03 columns', () => {
  test('AM1.5D (direct + circumsolar) integrates to 900.14 W/m² over 280–4000 nm (value stated with the ASTM G173-03 tables)', () => {
    const s = am15d();
    expect(s.wavelengthNm.length).toBe(2002);
    expect(s.wavelengthNm[0]).toBe(280);
    expect(s.wavelengthNm[2001]).toBe(4000);
    expect(Math.abs(s.pinWm2 - 900.14)).toBeLessThan(0.01);
    expect(s.pinWm2).toBeCloseTo(trapezoid(s.wavelengthNm, s.irradiance), 10);
  });

  test('AM0 (extraterrestrial) integrates to 1347.93 W/m² over 280–4000 nm (value stated with the ASTM G173-03 tables)', () => {
    const s = am0();
    expect(s.wavelengthNm.length).toBe(2002);
    expect(Math.abs(s.pinWm2 - 1347.93)).toBeLessThan(0.01);
  });

  test('AM1.5G still integrates to 1000.37 W/m² (value stated with the ASTM G173-03 tables)', () => {
    expect(Math.abs(am15g().pinWm2 - 1000.37)).toBeLessThan(0.01);
  });

  test('at 500 nm the three columns hold the table values 1.916 (AM0), 1.5451 (global), 1.3391 (direct) W m⁻² nm⁻¹ (ASTM G173-03 table, row 500 nm)', () => {
    const at500 = (s: ReturnType<typeof am0>) => s.irradiance[s.wavelengthNm.indexOf(500)];
    expect(at500(am0())).toBe(1.916);
    expect(at500(am15g())).toBe(1.5451);
    expect(at500(am15d())).toBe(1.3391);
  });

  test('the short names resolve, case-insensitively, with concentration applied', () => {
    expect(resolveSpectrum('AM1.5D').pinWm2).toBeCloseTo(am15d().pinWm2, 10);
    expect(resolveSpectrum('am0').pinWm2).toBeCloseTo(am0().pinWm2, 10);
    expect(resolveSpectrum('am1.5d', { suns: 500 }).pinWm2).toBeCloseTo(500 * am15d().pinWm2, 6);
  });
});

describe('AM1.5D and AM0 wherever AM1.5G is accepted', () => {
  test('command line: evaluate --spectrum am1.5d and am0 report their own P_in', async () => {
    const d = await runJsonHere(['evaluate', '--gaps', '1.34', '--spectrum', 'am1.5d']);
    expect(d.pin_w_m2).toBeCloseTo(900.14, 1);
    expect(d.spectrum.name).toMatch(/AM1\.5D/);
    const s = await runJsonHere(['evaluate', '--gaps', '1.34', '--spectrum', 'am0']);
    expect(s.pin_w_m2).toBeCloseTo(1347.93, 1);
    // Efficiency is P_max over the P_in of the spectrum used (docs/PHYSICS.md §10).
    expect(s.pmax_w_m2 / s.pin_w_m2).toBeCloseTo(s.efficiency, 6);
  }, 60_000);

  test('design file: spectrum am1.5d is the built-in, not a path beside the design', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'gapstack-std-'));
    const d = await loadDesignText(join(dir, 'concentrator.yaml'), 'name: test\nsubcells:\n  - gap: 1.8\n  - gap: 1.12\nspectrum:\n  source: am1.5d\n  suns: 100\n');
    expect(d.light.kind).toBe('spectrum');
    expect(d.spectra[0].spectrum.name).toMatch(/AM1\.5D/);
    expect(d.spectra[0].spectrum.pinWm2).toBeCloseTo(100 * am15d().pinWm2, 6);
    const space = await loadDesignText(join(dir, 'space.yaml'), 'name: test\nsubcells:\n  - gap: 1.8\n  - gap: 1.12\nspectrum: AM0\n');
    expect(space.spectra[0].spectrum.pinWm2).toBeCloseTo(am0().pinWm2, 10);
  });
});
