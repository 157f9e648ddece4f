import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { blackbodySpectrum } from '../../src/light/blackbody.js';
import { photonsAboveEv, sha256OfTable, spectraColumns, spectrumOfArrays, stepJscManyAm2 } from '../../src/light/spectrum.js';
import { ELEMENTARY_CHARGE_C, HC_EV_NM, HC_J_NM } from '../../src/physics/constants.js';

// Internal consistency only: every value here is compared with the project's own
// definitions (φ_λ = E_λ·λ/(hc), q·N(E) from photonsAboveEv), not with an outside source.

/** A member of an invented year: AM1.5G's grid (shared array) with its irradiance scaled by a smooth factor. */
function member(grid: Float64Array, base: Float64Array, k: number) {
  const irradiance = Float64Array.from(base, (e, i) => e * (0.3 + 0.5 * Math.abs(Math.sin(k + i / 500))));
  return spectrumOfArrays({ name: `hour ${k}`, sha256: () => sha256OfTable(grid, irradiance), source: 'invented', wavelengthNm: grid, irradiance });
}

describe('spectra built for large ensembles', () => {
  const ref = am15g();
  const grid = Float64Array.from(ref.wavelengthNm);
  const members = Array.from({ length: 6 }, (_, k) => member(grid, ref.irradiance, k));

  test('the photon-flux table, made on first read, is E_λ·λ/(hc) and stays the same object', () => {
    const s = members[2];
    const f = s.photonFlux;
    expect(f.length).toBe(grid.length);
    for (const i of [0, 17, 900, grid.length - 1]) expect(f[i]).toBe((s.irradiance[i] * grid[i]) / HC_J_NM);
    expect(s.photonFlux).toBe(f);
  });

  test('a hash given as a function is computed when read and kept; spreads and JSON carry both lazy fields', () => {
    const s = members[3];
    const expected = sha256OfTable(grid, s.irradiance);
    expect(s.sha256).toBe(expected);
    const copy = { ...s };
    expect(copy.sha256).toBe(expected);
    expect(copy.photonFlux).toBe(s.photonFlux);
    expect(JSON.parse(JSON.stringify({ sha256: s.sha256 })).sha256).toBe(expected);
  });

  test('q·N(E) of many spectra at once equals photonsAboveEv of each, bit for bit, on shared and separate grids', () => {
    const separate = blackbodySpectrum({ tempK: 5800 });
    const list = [...members, { ...members[0], wavelengthNm: Float64Array.from(grid) }, separate].map((spectrum) => ({ spectrum }));
    const out = new Float64Array(list.length + 2);
    // Probes include the energies of the grid's first and last wavelengths, where the look-up changes branch.
    fc.assert(
      fc.property(fc.oneof(fc.double({ min: 0.2, max: 4.5, noNaN: true }), fc.constantFrom(0, -1, 0.3, 4.43, HC_EV_NM / ref.wavelengthNm[0], HC_EV_NM / ref.wavelengthNm[ref.wavelengthNm.length - 1])), (e) => {
        stepJscManyAm2(spectraColumns(list), e, out, 2);
        list.forEach(({ spectrum }, k) => expect(out[k + 2]).toBe(ELEMENTARY_CHARGE_C * photonsAboveEv(spectrum, e)));
      }),
      { numRuns: 300 },
    );
  });
});
