import { mkdirSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { UserError } from '../../src/errors.js';
import {
  ensembleSummary,
  loadEnsemble,
  OUT_OF_RANGE_POLICY,
  type EnsembleMember,
} from '../../src/light/ensemble.js';
import { yieldForStack } from '../../src/stack/yield.js';
import { am15g } from '../../src/light/sources.js';
import { averagePhotonEnergyEv, makeSpectrum, photonsAboveEv, type Spectrum } from '../../src/light/spectrum.js';
import { readSpectrumFile } from '../../src/light/table-file.js';
import { buildObjective } from '../../src/stack/objectives.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack, independentWiring, seriesWiring, type Wiring } from '../../src/stack/model.js';
import { ROOT } from '../helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-ensemble-'));
function write(name: string, text: string): string {
  const p = join(dir, name);
  mkdirSync(join(p, '..'), { recursive: true });
  writeFileSync(p, text);
  return p;
}
const ref = am15g();
const opts = { defaultTempK: 300 };

/** AM1.5G reweighted by (λ / 700 nm)^β: β > 0 pushes photons to long wavelengths (an invented red shift). */
function tilted(beta: number): Spectrum {
  return makeSpectrum({
    name: `AM1.5G × (λ/700)^${beta}`,
    sha256: `tilt-${beta}`,
    source: 'test: AM1.5G reweighted towards long wavelengths (invented)',
    wavelengthNm: ref.wavelengthNm,
    irradiance: ref.irradiance.map((e, i) => e * (ref.wavelengthNm[i] / 700) ** beta),
  });
}
const member = (spectrum: Spectrum, weight = 1, tempK = 300, label = spectrum.name): EnsembleMember => ({ spectrum, weight, tempK, label });

/** A small flat-ish spectrum table (enough points for the loader), irradiance scaled by `k`. */
function smallTable(k: number, from = 300, to = 2500, step = 200): string {
  const rows: string[] = [];
  for (let l = from; l <= to; l += step) rows.push(`${l}\t${(k * (1 + l / 1000)).toPrecision(6)}`);
  return `wavelength_nm\tirradiance_W_m2_nm\n${rows.join('\n')}\n`;
}

/** Best top gap [eV] on a fixed 1.12 eV bottom: 5 meV scan, then golden section in the best cell. */
function bestTopGap(wiring: Wiring, spectra: EnsembleMember[]): { gapEv: number; efficiency: number } {
  const o = buildObjective(idealStack([1.7, 1.12], wiring), spectra);
  const f = (g: number) => o.value([g, 1.12]);
  let best = 1.4;
  for (let g = 1.4; g <= 2.1 + 1e-9; g += 0.005) if (f(g) > f(best)) best = g;
  let lo = best - 0.005;
  let hi = best + 0.005;
  const r = (Math.sqrt(5) - 1) / 2;
  while (hi - lo > 1e-5) {
    const a = hi - r * (hi - lo);
    const b = lo + r * (hi - lo);
    if (f(a) < f(b)) lo = a;
    else hi = b;
  }
  const g = 0.5 * (lo + hi);
  return { gapEv: g, efficiency: f(g) };
}

describe('yield-weighted efficiency Σ w·P_max / Σ w·P_in (docs/PHYSICS.md §8)', () => {
  const stacks = [
    ['2T 1.73/1.12', idealStack([1.73, 1.12], seriesWiring(2))],
    ['4T 1.73/1.12', idealStack([1.73, 1.12], independentWiring(2))],
    ['2T 1.6/1.12 with η_LC 0.5', idealStack([1.6, 1.12], seriesWiring(2), { coupling: { model: 'empirical', eta: [0.5] } })],
    ['3J 2T 1.9/1.37/0.93', idealStack([1.9, 1.37, 0.93], seriesWiring(3))],
  ] as const;

  test.each(stacks)('copies of AM1.5G give the AM1.5G result to 1e-6: %s', (_name, spec) => {
    const single = evaluateStack(spec, ref);
    const y = yieldForStack(spec, [member(ref, 3), member(ref, 0.5), member(ref, 11)]);
    expect(Math.abs(y.yieldEfficiency - single.efficiency)).toBeLessThan(1e-6);
    for (const p of y.perSpectrum) expect(Math.abs(p.efficiency - single.efficiency)).toBeLessThan(1e-12);
    expect(y.weightedPinWm2).toBeCloseTo(14.5 * ref.pinWm2, 6);
  });

  test('scaling every weight leaves the yield unchanged; energies scale', () => {
    const spec = idealStack([1.73, 1.12], seriesWiring(2));
    const ms = [member(tilted(0.4), 120), member(ref, 300), member(tilted(-0.3), 80)];
    const a = yieldForStack(spec, ms);
    const b = yieldForStack(spec, ms.map((m) => ({ ...m, weight: m.weight * 37.5 })));
    expect(Math.abs(a.yieldEfficiency - b.yieldEfficiency)).toBeLessThan(1e-14);
    expect(b.weightedPmaxWm2 / a.weightedPmaxWm2).toBeCloseTo(37.5, 9);
  });

  test('agrees with the search objective (buildObjective) over the same weighted spectra', () => {
    const ms = [member(tilted(0.5), 2, 310), member(ref, 1, 290)];
    for (const w of [seriesWiring(2), independentWiring(2)]) {
      const spec = idealStack([1.68, 1.12], w);
      expect(Math.abs(yieldForStack(spec, ms).yieldEfficiency - buildObjective(spec, ms).value([1.68, 1.12]))).toBeLessThan(1e-9);
    }
  });

  test('a 2T stack re-matches its current under each spectrum', () => {
    const spec = idealStack([1.73, 1.12], seriesWiring(2));
    const y = yieldForStack(spec, [member(tilted(-0.5), 1, 300, 'blue'), member(tilted(0.8), 1, 300, 'red')]);
    for (const p of y.perSpectrum) expect(p.subcells[0].jOpAm2).toBeCloseTo(p.subcells[1].jOpAm2, 9);
    // Red light: the top cell limits the string, so the common current sits near the top cell's photocurrent.
    const red = y.perSpectrum[1];
    expect(red.subcells[0].jphAm2).toBeLessThan(red.subcells[1].jphAm2);
    expect(y.perSpectrum[0].subcells[0].jOpAm2).not.toBeCloseTo(red.subcells[0].jOpAm2, 3);
  });

  test('hotter cells have a lower Voc: every member is solved at its own temperature', () => {
    const spec = idealStack([1.73, 1.12], seriesWiring(2));
    const y = yieldForStack(spec, [member(ref, 1, 280, 'cold'), member(ref, 1, 300, 'stc'), member(ref, 1, 340, 'hot')]);
    const [cold, stc, hot] = y.perSpectrum;
    expect(cold.stackVocV!).toBeGreaterThan(stc.stackVocV!);
    expect(stc.stackVocV!).toBeGreaterThan(hot.stackVocV!);
    for (let i = 0; i < 2; i++) expect(cold.subcells[i].vocV).toBeGreaterThan(hot.subcells[i].vocV);
    expect(hot.efficiency).toBeLessThan(cold.efficiency);
    expect(hot.efficiency).toBeCloseTo(evaluateStack({ ...spec, tempK: 340 }, ref).efficiency, 12);
    expect(stc.efficiency).toBeCloseTo(evaluateStack(spec, ref).efficiency, 12);
  });

  test('rejects an empty ensemble and non-positive weights', () => {
    const spec = idealStack([1.34], seriesWiring(1));
    expect(() => yieldForStack(spec, [])).toThrow(UserError);
    expect(() => yieldForStack(spec, [member(ref, 0)])).toThrow(/weight must be a positive finite number/);
  });
});

describe('a red-shifted ensemble moves the 2T optimum, and 4T cares less', () => {
  // Invented ensemble: AM1.5G tilted towards long wavelengths by three amounts, weights in hours.
  const red = [member(tilted(0.25), 300), member(tilted(0.5), 500), member(tilted(0.75), 200)];
  const am = [member(ref)];
  const am2 = bestTopGap(seriesWiring(2), am);
  const am4 = bestTopGap(independentWiring(2), am);
  const red2 = bestTopGap(seriesWiring(2), red);
  const red4 = bestTopGap(independentWiring(2), red);

  test('AM1.5G optima on a 1.12 eV bottom: 2T 45.04 % at 1.729 eV, 4T 45.24 % near 1.81 eV (docs/PHYSICS.md §5, independent reference)', () => {
    expect(Math.abs(am2.gapEv - 1.729)).toBeLessThan(0.003);
    expect(Math.abs(am2.efficiency - 0.4504)).toBeLessThan(2e-4);
    expect(Math.abs(am4.efficiency - 0.4524)).toBeLessThan(2e-4);
    expect(am4.gapEv).toBeGreaterThan(1.76);
  });

  test('the 2T top gap optimum drops under red light', () => {
    expect(red2.gapEv).toBeLessThan(am2.gapEv - 0.05);
    // The same optimum found with yieldForStack (full evaluation) is no worse than its neighbours.
    const y = (g: number) => yieldForStack(idealStack([g, 1.12], seriesWiring(2)), red).yieldEfficiency;
    expect(y(red2.gapEv)).toBeGreaterThanOrEqual(y(red2.gapEv + 0.01));
    expect(y(red2.gapEv)).toBeGreaterThanOrEqual(y(red2.gapEv - 0.01));
  });

  test('the AM1.5G-optimal 4T design loses less of its ensemble optimum than the AM1.5G-optimal 2T design', () => {
    const y2 = yieldForStack(idealStack([am2.gapEv, 1.12], seriesWiring(2)), red).yieldEfficiency;
    const y4 = yieldForStack(idealStack([am4.gapEv, 1.12], independentWiring(2)), red).yieldEfficiency;
    const loss2 = 1 - y2 / red2.efficiency;
    const loss4 = 1 - y4 / red4.efficiency;
    expect(loss2).toBeGreaterThan(0.01);
    expect(loss4).toBeGreaterThanOrEqual(0);
    expect(loss4).toBeLessThan(loss2 / 2);
  });
});

describe('ensembleSummary', () => {
  test('counts, weights, irradiance statistics, APE and temperatures', () => {
    const ms = [member(ref, 100, 290, 'am'), member(tilted(0.5), 300, 320, 'red'), member(tilted(-0.4), 100, 300, 'blue')];
    const e = { name: 't', source: 'test', sha256: 'x', members: ms, layout: 'folder' as const, weightUnit: 'hours' as const, skipped: [] };
    const s = ensembleSummary(e);
    expect(s.count).toBe(3);
    expect(s.totalWeight).toBe(500);
    expect(s.weightedMeanIrradianceWm2).toBeCloseTo((100 * ms[0].spectrum.pinWm2 + 300 * ms[1].spectrum.pinWm2 + 100 * ms[2].spectrum.pinWm2) / 500, 9);
    const pins = ms.map((m) => m.spectrum.pinWm2);
    expect(s.irradianceWm2.min).toBe(Math.min(...pins));
    expect(s.irradianceWm2.max).toBe(Math.max(...pins));
    expect(s.irradianceWm2.median).toBe(ms[1].spectrum.pinWm2); // weighted: 'red' holds 60 % of the weight
    expect(s.ape.windowNm).toEqual([350, 1050]);
    expect(s.ape.perMember[0].apeEv).toBeCloseTo(averagePhotonEnergyEv(ref, 350, 1050), 12);
    // APE of AM1.5G over 350–1050 nm ≈ 1.88 eV (from memory; the usual reference value).
    expect(Math.abs(s.ape.perMember[0].apeEv! - 1.88)).toBeLessThan(0.01);
    expect(s.ape.perMember[1].apeEv!).toBeLessThan(s.ape.perMember[0].apeEv!);
    expect(s.ape.perMember[2].apeEv!).toBeGreaterThan(s.ape.perMember[0].apeEv!);
    const h = s.ape.histogram;
    expect(h.edgesEv.length).toBe(h.weights.length + 1);
    expect(h.weights.reduce((a, b) => a + b, 0)).toBe(500);
    for (const p of s.ape.perMember) expect(p.apeEv!).toBeGreaterThanOrEqual(h.edgesEv[0]);
    for (const p of s.ape.perMember) expect(p.apeEv!).toBeLessThan(h.edgesEv[h.edgesEv.length - 1]);
    expect(s.tempK).toEqual({ min: 290, max: 320 });
    expect(s.outOfRangePolicy).toBe(OUT_OF_RANGE_POLICY);
    expect(s.warnings).toEqual([]);
    expect(ensembleSummary(e, [400, 900]).ape.windowNm).toEqual([400, 900]);
  });

  test('warns when a member stops short of the lowest gap edge, and photons beyond count as zero', () => {
    const cut = (toNm: number) => {
      const n = ref.wavelengthNm.findIndex((l) => l > toNm);
      return makeSpectrum({ name: `cut ${toNm}`, sha256: 'c', source: 'test', wavelengthNm: ref.wavelengthNm.slice(0, n), irradiance: ref.irradiance.slice(0, n) });
    };
    const short = cut(1700);
    const e = { name: 't', source: 'test', sha256: 'x', members: [member(ref), member(short, 1, 300, 'short')], layout: 'folder' as const, weightUnit: 'share' as const, skipped: [] };
    const s = ensembleSummary(e);
    expect(s.requiredToNm).toBeCloseTo(2479.68, 1);
    expect(s.warnings.join('\n')).toMatch(/1 of 2 spectra end before 2480 nm.*"short" at 1700 nm/);
    expect(ensembleSummary(e, undefined, { lowestGapEv: 0.9 }).warnings).toEqual([]);
    // N(E) is constant beyond the table: a 0.6 eV gap sees exactly the table's photons.
    expect(photonsAboveEv(short, 0.6)).toBe(photonsAboveEv(short, 0.72));
    expect(photonsAboveEv(short, 0.6)).toBeLessThan(photonsAboveEv(ref, 0.6));
  });
});

describe('loadEnsemble: a folder of spectrum files', () => {
  test('sorted files, equal weights, the default temperature; README and scripts skipped', () => {
    write('folder/b-10.csv', smallTable(2).replace(/\t/g, ','));
    write('folder/b-9.tsv', smallTable(1));
    write('folder/a.dat', smallTable(3));
    write('folder/README.md', '# notes\n');
    write('folder/make.mjs', '// generator\n');
    const e = loadEnsemble(join(dir, 'folder'), { defaultTempK: 310 });
    expect(e.layout).toBe('folder');
    expect(e.members.map((m) => m.label)).toEqual(['a', 'b-9', 'b-10']);
    expect(e.members.every((m) => m.weight === 1 && m.tempK === 310)).toBe(true);
    expect(e.weightUnit).toBe('share');
    expect(e.skipped).toEqual(['make.mjs', 'README.md']);
    expect(e.members[1].spectrum.pinWm2).toBeCloseTo(readSpectrumFile(join(dir, 'folder/b-9.tsv')).pinWm2, 12);
    expect(e.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(loadEnsemble(join(dir, 'folder'), { defaultTempK: 310 }).sha256).toBe(e.sha256);
  });

  test('an unknown file type is an error naming it; an empty folder is an error', () => {
    write('odd/a.tsv', smallTable(1));
    write('odd/b.spc', 'whatever');
    expect(() => loadEnsemble(join(dir, 'odd'), opts)).toThrow(/odd[\\/]b\.spc: is not a recognised spectrum table/);
    write('empty/README.md', 'nothing\n');
    expect(() => loadEnsemble(join(dir, 'empty'), opts)).toThrow(/empty: the ensemble holds no spectra/);
  });

  test('a bad spectrum file in a folder is reported with its own file and line', () => {
    write('badfolder/a.tsv', smallTable(1).replace('700\t', '700\t-'));
    expect(() => loadEnsemble(join(dir, 'badfolder'), opts)).toThrow(/badfolder[\\/]a\.tsv:4: negative spectral value/);
  });

  test('a folder holding manifest.yaml is read through it', () => {
    write('withman/s/x.tsv', smallTable(1));
    write('withman/manifest.yaml', 'weight_unit: hours\nspectra:\n  - {file: s/x.tsv, weight: 5, temp_k: 320}\n');
    const e = loadEnsemble(join(dir, 'withman'), opts);
    expect(e.layout).toBe('yaml-manifest');
    expect(e.members[0]).toMatchObject({ weight: 5, tempK: 320, label: 'x' });
  });

  test('a missing path says what is expected', () => {
    expect(() => loadEnsemble(join(dir, 'nope'), opts)).toThrow(/cannot open the ensemble \(ENOENT[^)]*\); give a folder of spectra, a manifest/);
  });
});

describe('loadEnsemble: CSV manifest', () => {
  write('m/s1.tsv', smallTable(1));
  write('m/sub/s2.tsv', smallTable(2));

  test('file,weight,temp_k with a weight_unit comment; paths relative to the manifest; blank temperature → default', () => {
    const p = write('m/man.csv', '# weight_unit: hours\nfile,weight,temp_k\ns1.tsv,120,310\nsub/s2.tsv,30.5,\ns1.tsv,10,290\n');
    const e = loadEnsemble(p, { defaultTempK: 298 });
    expect(e.layout).toBe('csv-manifest');
    expect(e.weightUnit).toBe('hours');
    expect(e.members.map((m) => [m.label, m.weight, m.tempK])).toEqual([
      ['s1', 120, 310],
      ['s2', 30.5, 298],
      ['s1', 10, 290],
    ]);
    // The same file listed twice is read once; duplicate labels are allowed.
    expect(e.members[0].spectrum).toBe(e.members[2].spectrum);
  });

  test('the weight unit may come from the column name or a weight_unit column; labels and timestamps columns', () => {
    const a = loadEnsemble(write('m/share.csv', 'file,weight_share\ns1.tsv,0.25\nsub/s2.tsv,0.75\n'), opts);
    expect(a.weightUnit).toBe('share');
    const b = loadEnsemble(write('m/col.csv', 'file,weight,weight_unit,label,timestamp\ns1.tsv,2,hours,noon,2024-06-01T12:00\nsub/s2.tsv,3,hours,,\n'), opts);
    expect(b.weightUnit).toBe('hours');
    expect(b.members[0]).toMatchObject({ label: 'noon', timestamp: '2024-06-01T12:00' });
    expect(b.members[1].label).toBe('s2');
  });

  test.each([
    ['a plain weight without a unit', 'file,weight\ns1.tsv,1\n', /bad\.csv:1: say what the weights are/],
    ['a missing file, named with the manifest line', 'file\ns1.tsv\nmissing.tsv\n', /bad\.csv:3: spectrum file "missing\.tsv" not found/],
    ['a zero weight', '# weight_unit: hours\nfile,weight\ns1.tsv,1\ns1.tsv,0\n', /bad\.csv:4: weight "0" must be a positive finite number/],
    ['a non-numeric weight', '# weight_unit: share\nfile,weight\ns1.tsv,abc\n', /bad\.csv:3: weight "abc"/],
    ['a temperature in °C', 'file,temp_k\ns1.tsv,25\n', /bad\.csv:2: cell temperature "25" must be a number of kelvin within 150–500 K \(°C\?/],
    ['a temperature too hot', 'file,temp_k\ns1.tsv,600\n', /bad\.csv:2: cell temperature "600"/],
    ['an unknown column', 'file,temp_c\ns1.tsv,25\n', /bad\.csv:1: unknown manifest column "temp_c" \(cell temperatures go in a temp_k column/],
    ['a short row', 'file,temp_k\ns1.tsv\n', /bad\.csv:2: expected 2 cells/],
    ['an empty manifest', 'file,temp_k\n', /bad\.csv: the ensemble holds no spectra/],
    ['conflicting units', '# weight_unit: share\nfile,weight_h\ns1.tsv,1\n', /bad\.csv:2: column "weight_h" says hours but weight_unit says share/],
  ])('rejects %s', (_what, text, message) => {
    const p = write('m/bad.csv', text);
    expect(() => loadEnsemble(p, opts)).toThrow(message);
  });

  test('a bad member file names its own line and where the manifest lists it', () => {
    write('m/broken.tsv', smallTable(1).replace('900\t', '900\tx'));
    const p = write('m/listbroken.csv', 'file\ns1.tsv\nbroken.tsv\n');
    expect(() => loadEnsemble(p, opts)).toThrow(/broken\.tsv:5: "x[0-9.]+" is not a finite number \(listed at .*listbroken\.csv:3\)/);
  });
});

describe('loadEnsemble: YAML manifest', () => {
  write('y/s1.tsv', smallTable(1));
  write('y/s2.tsv', smallTable(4));

  test('name, weight_unit, default_temp_k and entries (mappings or bare file names)', () => {
    const p = write(
      'y/ens.yaml',
      [
        '# test ensemble',
        'name: test-site',
        'weight_unit: hours',
        'default_temp_k: 305',
        'spectra:',
        '  - file: s1.tsv',
        '    weight: 100',
        '    temp_k: 330',
        '    timestamp: 2024-07-01T13:00',
        '  - file: s2.tsv',
        '    weight: 50',
        '    label: dim',
      ].join('\n'),
    );
    const e = loadEnsemble(p, opts);
    expect(e.name).toBe('test-site');
    expect(e.layout).toBe('yaml-manifest');
    expect(e.members.map((m) => [m.label, m.weight, m.tempK, m.timestamp])).toEqual([
      ['s1', 100, 330, '2024-07-01T13:00'],
      ['dim', 50, 305, undefined],
    ]);
    const bare = loadEnsemble(write('y/bare.yml', 'spectra:\n  - s1.tsv\n  - s2.tsv\n'), opts);
    expect(bare.members.map((m) => m.weight)).toEqual([1, 1]);
    expect(bare.weightUnit).toBe('share');
  });

  test.each([
    ['a bad weight at its line', 'weight_unit: hours\nspectra:\n  - file: s1.tsv\n    weight: -3\n', /y[\\/]bad\.yaml:4: weight "-3"/],
    ['a missing file at its line', 'spectra:\n  - file: s1.tsv\n  - file: gone.tsv\n', /bad\.yaml:3: spectrum file "gone\.tsv" not found/],
    ['a temperature out of range', 'spectra:\n  - file: s1.tsv\n    temp_k: 100\n', /bad\.yaml:3: cell temperature "100"/],
    ['an unknown key', 'spectra:\n  - file: s1.tsv\n    temp_c: 20\n', /bad\.yaml:3: unknown entry key "temp_c" \(cell temperatures go in temp_k/],
    ['weights without a unit', 'spectra:\n  - file: s1.tsv\n    weight: 2\n', /bad\.yaml: say what the weights are/],
    ['an empty list', 'spectra: []\n', /bad\.yaml: the ensemble holds no spectra/],
    ['no list', 'name: x\n', /bad\.yaml: no "spectra:" list/],
    ['broken YAML', 'spectra:\n  - file: [s1.tsv\n', /bad\.yaml:\d+: YAML: /],
    ['some entries without weights', 'weight_unit: hours\nspectra:\n  - {file: s1.tsv, weight: 2}\n  - {file: s2.tsv}\n', /bad\.yaml:4: entry has no "weight:"/],
  ])('rejects %s', (_what, text, message) => {
    const p = write('y/bad.yaml', text);
    expect(() => loadEnsemble(p, opts)).toThrow(message);
  });
});

describe('loadEnsemble: one wide table', () => {
  const wl = [300, 500, 700, 900, 1100, 1300, 1500];
  const a = wl.map((l) => 1 + l / 1000);
  const b = wl.map((l) => 2 - l / 2000);

  test('one spectrum per column: wavelength unit from the header, spectral unit from "# units:", weight and temp_k rows', () => {
    const text = [
      '# units: nm,W/m2/nm',
      '# weight_unit: hours',
      'wavelength_nm,2024-06-01T10:00,2024-06-01T12:00,late',
      'weight,1.5,2,0.5',
      'temp_k,300,320,',
      ...wl.map((l, i) => `${l},${a[i]},${b[i]},${i < 5 ? 1 : ''}`),
    ].join('\n');
    const e = loadEnsemble(write('wide-col.csv', text), opts);
    expect(e.layout).toBe('wide-columns');
    expect(e.weightUnit).toBe('hours');
    expect(e.members.map((m) => [m.label, m.weight, m.tempK])).toEqual([
      ['2024-06-01T10:00', 1.5, 300],
      ['2024-06-01T12:00', 2, 320],
      ['late', 0.5, 300],
    ]);
    expect(e.members[0].timestamp).toBe('2024-06-01T10:00');
    expect(e.members[2].timestamp).toBeUndefined();
    // Members keep their own range: the third stops at 1100 nm (trailing blanks).
    expect(e.members[2].spectrum.wavelengthNm.length).toBe(5);
    const twoCol = readSpectrumFile(write('col-a.csv', `wavelength_nm,irradiance_W_m2_nm\n${wl.map((l, i) => `${l},${a[i]}`).join('\n')}\n`));
    expect(e.members[0].spectrum.pinWm2).toBeCloseTo(twoCol.pinWm2, 12);
    expect(photonsAboveEv(e.members[0].spectrum, 1.2)).toBeCloseTo(photonsAboveEv(twoCol, 1.2), 0);
    expect(e.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  test('one spectrum per row: header row of wavelengths, weight and temp_k columns; µm units declared', () => {
    const text = [
      '# units: um,W/m2/um',
      'timestamp,weight_h,temp_k,' + wl.map((l) => l / 1000).join(','),
      `2024-01-01T12:00,3,290,${a.map((v) => v * 1000).join(',')}`,
      `2024-01-01T13:00,1,,${b.map((v) => v * 1000).join(',')}`,
    ].join('\n');
    const e = loadEnsemble(write('wide-row.csv', text), opts);
    expect(e.layout).toBe('wide-rows');
    expect(e.weightUnit).toBe('hours');
    expect(e.members.map((m) => [m.label, m.weight, m.tempK])).toEqual([
      ['2024-01-01T12:00', 3, 290],
      ['2024-01-01T13:00', 1, 300],
    ]);
    const byCol = loadEnsemble(write('wide-col-plain.tsv', ['# units: nm,W/m2/nm', 'wavelength_nm\tA\tB', ...wl.map((l, i) => `${l}\t${a[i]}\t${b[i]}`)].join('\n')), opts);
    expect(e.members[1].spectrum.pinWm2).toBeCloseTo(byCol.members[1].spectrum.pinWm2, 10);
    expect(byCol.weightUnit).toBe('share');
  });

  test('a two-column table whose header names its unit is an ensemble of one', () => {
    const e = loadEnsemble(write('one.csv', `wavelength_nm,irradiance_W_m2_nm\n${wl.map((l, i) => `${l},${a[i]}`).join('\n')}\n`), opts);
    expect(e.members.length).toBe(1);
  });

  test.each([
    ['no spectral unit', `wavelength_nm,A,B\n${wl.map((l, i) => `${l},${a[i]},${b[i]}`).join('\n')}\n`, /w\.csv:1: no spectral unit: add a comment line such as "# units: nm,W\/m2\/nm"/],
    ['no wavelength unit', `# units: W/m2/nm\nx,A\n${wl.map((l, i) => `${l},${a[i]}`).join('\n')}\n`, /w\.csv:2: no wavelength unit/],
    ['a hole inside a column', `# units: nm,W/m2/nm\nwavelength_nm,A\n${wl.map((l, i) => `${l},${i === 3 ? '' : a[i]}`).join('\n')}\n`, /w\.csv:7: spectrum "A" resumes after a blank at line 6/],
    ['a negative value', `# units: nm,W/m2/nm\nwavelength_nm,A\n${wl.map((l, i) => `${l},${i === 2 ? -1 : a[i]}`).join('\n')}\n`, /w\.csv:5: spectrum "A": negative spectral value -1/],
    ['descending wavelengths', `# units: nm,W/m2/nm\nwavelength_nm,A\n${[...wl].reverse().map((l, i) => `${l},${a[i]}`).join('\n')}\n`, /w\.csv:4: wavelength 1300 is below the previous 1500/],
    ['a non-numeric row label in the column layout', `# units: nm,W/m2/nm\nwavelength_nm,A\n${wl.map((l, i) => `${l},${a[i]}`).join('\n')}\nfoo,1\n`, /w\.csv:10: first column must hold the wavelength of every row, found "foo"/],
    ['a row layout header that is not wavelengths', `# units: nm,W/m2/nm\ntimestamp,300,500,red,900\nt1,1,1,1,1\n`, /w\.csv:2: header cell 4 "red" is neither a wavelength nor weight\/temp_k: .*one spectrum per row/],
    ['a row with too few values', `# units: nm,W/m2/nm\ntimestamp,${wl.join(',')}\nt1,${a.join(',')}\nt2,1,2\n`, /w\.csv:4: expected 8 cells/],
    ['a bad temperature row', `# units: nm,W/m2/nm\nwavelength_nm,A\ntemp_k,20\n${wl.map((l, i) => `${l},${a[i]}`).join('\n')}\n`, /w\.csv:3: cell temperature "20"/],
    ['a weight row without a unit', `# units: nm,W/m2/nm\nwavelength_nm,A\nweight,2\n${wl.map((l, i) => `${l},${a[i]}`).join('\n')}\n`, /w\.csv:3: say what the weights are/],
    ['a header only', `# units: nm,W/m2/nm\nwavelength_nm,A\n`, /w\.csv: holds no data rows; a wide table has either one spectrum per column/],
  ])('rejects %s, naming file and line', (_what, text, message) => {
    const p = write('w.csv', text);
    expect(() => loadEnsemble(p, opts)).toThrow(message);
  });
});

describe('the shipped synthetic demo ensemble (examples/ensemble-demo)', () => {
  const demo = join(ROOT, 'examples', 'ensemble-demo');

  test('every file says it is synthetic demo data', () => {
    const files = ['README.md', 'manifest.yaml', 'manifest-as-csv.csv', 'make-demo.mjs', ...readdirSync(join(demo, 'spectra')).map((f) => join('spectra', f))];
    expect(files.length).toBeGreaterThanOrEqual(16);
    for (const f of files) expect(readFileSync(join(demo, f), 'utf8')).toMatch(/SYNTHETIC DEMO DATA/);
  });

  test('the folder, its YAML manifest and its CSV manifest give the same members, weights in hours', () => {
    const viaFolder = loadEnsemble(demo, opts);
    const viaCsv = loadEnsemble(join(demo, 'manifest-as-csv.csv'), opts);
    expect(viaFolder.layout).toBe('yaml-manifest');
    expect(viaFolder.weightUnit).toBe('hours');
    expect(viaFolder.members.length).toBe(16);
    const key = (m: EnsembleMember) => [m.label, m.weight, m.tempK, m.spectrum.sha256];
    expect(viaCsv.members.map(key)).toEqual(viaFolder.members.map(key));
    const s = ensembleSummary(viaFolder);
    expect(s.warnings).toEqual([]);
    expect(s.irradianceWm2.max).toBeLessThan(1000);
    const y = yieldForStack(idealStack([1.73, 1.12], seriesWiring(2)), viaFolder.members);
    expect(y.yieldEfficiency).toBeGreaterThan(0.3);
    expect(y.yieldEfficiency).toBeLessThan(evaluateStack(idealStack([1.73, 1.12], seriesWiring(2)), ref).efficiency);
  });
});
