import { describe, expect, test } from 'vitest';
import { loadSiteYear } from '../../src/light/site-year.js';

// Internal consistency on an invented weather file (examples/sites, made by its committed generator).

describe('an hourly year built from a weather file', () => {
  test('every hour shares one wavelength grid array, and each hour hashes its own table on demand', () => {
    const y = loadSiteYear('examples/sites/orvale.epw', { tiltDeg: 35, azimuthDeg: 180, tracking: 'none' });
    const members = y.ensemble.members;
    expect(members.length).toBeGreaterThan(1000);
    const grid = members[0].spectrum.wavelengthNm;
    expect(members.every((m) => m.spectrum.wavelengthNm === grid)).toBe(true);
    const shas = new Set(members.slice(0, 50).map((m) => m.spectrum.sha256));
    expect(shas.size).toBe(50);
  }, 30_000);
});
