import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { stepJscAm2 } from '../../src/light/spectrum.js';
import { readSpectrumFile, spectrumFromText, parseUnitDeclaration, abscissaUnitOf, ordinateUnitOf } from '../../src/light/table-file.js';
import { HC_EV_NM, HC_J_NM } from '../../src/physics/constants.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-table-'));
function file(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}
const ref = am15g();
const rows = (f: (l: number, e: number) => string) => Array.from(ref.wavelengthNm, (l, i) => f(l, ref.irradiance[i])).join('\n');

describe('spectrum tables in every declared unit give the same photon currents', () => {
  const gaps = [0.8, 1.12, 1.55, 2.1];
  const nm = file('nm.csv', `# test copy\nwavelength [nm],irradiance [W m^-2 nm^-1]\n${rows((l, e) => `${l},${e}`)}\n`);
  const um = file('um.tsv', `wavelength_um\tirradiance_W_m2_um\n${rows((l, e) => `${l / 1000}\t${e * 1000}`)}\n`);
  const photons = file('ph.txt', `wl(nm)   photons/m2/s/nm\n${rows((l, e) => `${l}   ${(e * l) / HC_J_NM}`)}\n`);
  const evRows = Array.from(ref.wavelengthNm, (l, i) => [HC_EV_NM / l, (ref.irradiance[i] * l * l) / HC_EV_NM] as const).reverse();
  const ev = file('ev.csv', `energy_eV,irradiance_W_m2_eV\n${evRows.map(([e, y]) => `${e},${y}`).join('\n')}\n`);

  test.each([
    ['µm with W m⁻² µm⁻¹', um],
    ['nm with photons m⁻² s⁻¹ nm⁻¹', photons],
    ['eV with W m⁻² eV⁻¹', ev],
  ])('%s matches nm with W m⁻² nm⁻¹ to 1e-9 relative', (_label, path) => {
    const a = readSpectrumFile(nm);
    const b = readSpectrumFile(path);
    for (const g of gaps) expect(Math.abs(stepJscAm2(b, g) / stepJscAm2(a, g) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(b.pinWm2 / a.pinWm2 - 1)).toBeLessThan(1e-9);
  });

  test('a headerless file needs declared units', () => {
    const bare = file('bare.dat', rows((l, e) => `${l} ${e}`));
    expect(() => readSpectrumFile(bare)).toThrow(/bare\.dat:1: .*no header names the units/);
    const s = readSpectrumFile(bare, parseUnitDeclaration('nm,W/m2/nm'));
    expect(s.pinWm2).toBeCloseTo(ref.pinWm2, 9);
  });
});

describe('unit recognition', () => {
  test.each([
    ['wavelength (nm)', 'nm'],
    ['lambda [µm]', 'um'],
    ['Wavelength_microns', 'um'],
    ['E (eV)', 'ev'],
  ])('abscissa %s → %s', (text, unit) => expect(abscissaUnitOf(text)).toBe(unit));
  test.each([
    ['W m⁻² nm⁻¹', 'W/m2/nm'],
    ['irradiance (W/m2/um)', 'W/m2/um'],
    ['photons/m2/s/nm', 'photons/m2/s/nm'],
    ['flux [photons m-2 s-1 eV-1]', 'photons/m2/s/eV'],
  ])('ordinate %s → %s', (text, unit) => expect(ordinateUnitOf(text)).toBe(unit));
  test('an ordinate without a per-unit is refused, not guessed', () => {
    expect(ordinateUnitOf('irradiance')).toBeUndefined();
    expect(ordinateUnitOf('W/m2')).toBeUndefined();
    // The library names its parameter (`units`), never a command-line flag; the command line renames it to --units.
    expect(() => parseUnitDeclaration('nm')).toThrow(/^units "nm" is not understood/);
    expect(() => parseUnitDeclaration('nm')).toThrow(expect.objectContaining({ name: 'ParameterError', parameter: 'units' }));
  });
});

describe('bad tables are refused with file:line', () => {
  const header = 'wavelength_nm,irradiance_W_m2_nm\n';
  const good = ['300,1', '400,1', '500,1', '600,1', '700,1', '800,1'];
  const cases: [string, string[], RegExp][] = [
    ['descending wavelength', ['300,1', '400,1', '350,1', '600,1', '700,1', '800,1'], /:4: .*strictly ascending/],
    ['duplicated wavelength', ['300,1', '400,1', '400,1', '600,1', '700,1', '800,1'], /:4: duplicated abscissa 400/],
    ['negative value', ['300,1', '400,-1', '500,1', '600,1', '700,1', '800,1'], /:3: negative spectral value -1/],
    ['text in numbers', ['300,1', '400,abc', '500,1', '600,1', '700,1', '800,1'], /:3: "abc" is not a finite number/],
    ['NaN', ['300,1', '400,NaN', '500,1', '600,1', '700,1', '800,1'], /:3: "NaN" is not a finite number/],
    ['Infinity', ['300,1', '400,Infinity', '500,1', '600,1', '700,1', '800,1'], /:3: "Infinity" is not a finite number/],
    ['too few points', ['300,1', '400,1'], /has 2 data rows; at least 5/],
    ['three columns', ['300,1,2', ...good.slice(1)], /:2: expected 2 columns, found 3/],
  ];
  test.each(cases)('%s', (_name, lines, message) => {
    const p = file(`bad-${_name.replace(/\W+/g, '-')}.csv`, header + lines.join('\n'));
    expect(() => readSpectrumFile(p)).toThrow(message);
  });
  test('missing file', () => expect(() => readSpectrumFile(join(dir, 'nope.csv'))).toThrow(/nope\.csv: cannot open spectrum file \(ENOENT/));
  test('binary garbage', () => {
    const p = join(dir, 'garbage.bin');
    writeFileSync(p, Buffer.from([0x89, 0x50, 0x4e, 0x47, 0, 1, 2, 3]));
    expect(() => readSpectrumFile(p)).toThrow(/binary data/);
  });
  test('a header without units', () => {
    expect(() => spectrumFromText('x.csv', `wavelength,irradiance\n${good.join('\n')}`)).toThrow(/x\.csv:1: header column "wavelength" names no abscissa unit/);
  });
  test('comment lines are skipped and line numbers still count them', () => {
    const text = `# a comment\n${header}# another\n300,1\n400,1\n500,x\n600,1\n700,1\n`;
    expect(() => spectrumFromText('c.csv', text)).toThrow(/c\.csv:6: "x"/);
  });
});
