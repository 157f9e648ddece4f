/**
 * A spectrum that stops short of the lowest gap's absorption edge
 * (docs/PHYSICS.md §11): detected, and extendable with the AM1.5G shape
 * joined at the table's last point.
 */
import { describe, expect, test } from 'vitest';
import { coverageShortfall, coverageWarnings, extendWithReferenceShape } from '../../src/light/coverage.js';
import { am15g } from '../../src/light/sources.js';
import { makeSpectrum, photonsAboveEv, type Spectrum } from '../../src/light/spectrum.js';
import { HC_EV_NM } from '../../src/physics/constants.js';

/** AM1.5G cut at `endNm` (a point of its grid), as a spectroradiometer would record it. */
function truncated(endNm: number, factor = 1): Spectrum {
  const s = am15g();
  const keep = Array.from(s.wavelengthNm).filter((w) => w <= endNm).length;
  return makeSpectrum({
    name: `AM1.5G to ${endNm} nm`,
    sha256: 'test',
    source: 'test',
    wavelengthNm: s.wavelengthNm.slice(0, keep),
    irradiance: s.irradiance.slice(0, keep).map((v) => v * factor),
  });
}

describe('spectrum coverage of the lowest gap', () => {
  test('a table ending at 1050 nm stops short of a 1.12 eV edge (hc/E_g = 1107 nm) but covers 1.73 eV', () => {
    const s = truncated(1050);
    const f = coverageShortfall(s, 1.12);
    // hc = 1239.84198 eV nm (CODATA 2018, exact SI constants).
    expect(f?.edgeNm).toBeCloseTo(1239.84198 / 1.12, 3);
    expect(f?.tableEndNm).toBe(1050);
    expect(coverageShortfall(s, 1.73)).toBeNull();
    expect(coverageWarnings(s, 1.12)[0]).toMatch(/stops at 1050 nm, short of the 1\.120 eV gap's absorption edge at 1107 nm/);
    expect(coverageWarnings(am15g(), 0.5)).toEqual([]);
  });

  test('AM1.5G cut at 1050 nm and extended with its own shape gives back P_in = 1000.37 W/m² (ASTM G173-03 stated integral)', () => {
    const ext = extendWithReferenceShape(truncated(1050), am15g(), 'AM1.5G');
    expect(ext.pinWm2).toBeCloseTo(1000.37, 1);
    expect(ext.wavelengthNm[ext.wavelengthNm.length - 1]).toBe(4000);
    expect(photonsAboveEv(ext, 0.5)).toBeCloseTo(photonsAboveEv(am15g(), 0.5), -15);
    expect(ext.source).toMatch(/beyond 1050 nm: the AM1\.5G shape scaled by 1\.000 to join/);
  });

  test('the extension joins the table at its last point, whatever the table’s level', () => {
    const low = truncated(1050, 0.37);
    const ext = extendWithReferenceShape(low, am15g(), 'AM1.5G');
    const n = low.wavelengthNm.length;
    // The table is kept point for point; the first appended point continues at the reference's ratio.
    for (let i = 0; i < n; i++) expect(ext.irradiance[i]).toBe(low.irradiance[i]);
    const ref = am15g();
    const k = Array.from(ref.wavelengthNm).indexOf(ext.wavelengthNm[n]);
    expect(ext.irradiance[n] / ref.irradiance[k]).toBeCloseTo(0.37, 10);
    expect(ext.pinWm2).toBeCloseTo(0.37 * 1000.37, 0);
    expect(HC_EV_NM / 0.5).toBeLessThan(ext.wavelengthNm[ext.wavelengthNm.length - 1]);
  });

  test('a table that already reaches past the reference is returned unchanged', () => {
    expect(extendWithReferenceShape(am15g(), truncated(1050), 'short')).toBe(am15g());
  });
});
