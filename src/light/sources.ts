/**
 * Resolving what the user names as light: the built-in AM1.5G, AM1.5D or AM0, a blackbody
 * sun, or a file; then concentration or rescale to a target irradiance.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { DILUTION_ONE_SUN, MAX_CONCENTRATION } from '../physics/constants.js';
import { ParameterError, ref, says, UserError } from '../errors.js';
import { blackbodySpectrum } from './blackbody.js';
import { clearSkySpectrum } from './clear-sky-source.js';
import { scaleSpectrum, sha256Hex, spectrumOfArrays, type Spectrum } from './spectrum.js';
import { extendWithReferenceShape } from './coverage.js';
import { readSpectrumFile, spectrumFromText, type TableUnits } from './table-file.js';

/** Path of a file shipped in the package's spectra/ folder. */
function builtinSpectrumPath(fileName: string): string {
  return fileURLToPath(new URL(`../../spectra/${fileName}`, import.meta.url));
}

const builtinCache = new Map<string, Spectrum>();

/** A shipped table as the build packs it (scripts/pack-builtin-spectra.mjs): its parsed columns and the SHA-256 of its file. */
export interface PackedSpectrum {
  sha256: string;
  wavelengthNm: number[];
  irradiance: number[];
}

/** Parse a shipped table from its file: what the build packs, and the way when no pack is there. */
export function parseBuiltinTable(file: string): PackedSpectrum {
  const path = builtinSpectrumPath(file);
  const bytes = readFileSync(path);
  const s = spectrumFromText(path, bytes.toString('utf8'), undefined, sha256Hex(bytes));
  return { sha256: s.sha256, wavelengthNm: Array.from(s.wavelengthNm), irradiance: Array.from(s.irradiance) };
}

/** The build's pack of a shipped table (dist/spectra/<file>.json, found from src/, dist/light/ and dist/bundle/ alike), if there is one. */
function packedTable(file: string): PackedSpectrum | undefined {
  try {
    return JSON.parse(readFileSync(fileURLToPath(new URL(`../../dist/spectra/${file}.json`, import.meta.url)), 'utf8')) as PackedSpectrum;
  } catch {
    return undefined;
  }
}

/**
 * A shipped ASTM G173-03 column, read once and cached: from the build's pack
 * (parsed columns, no text to split and no hash to compute at every start), else
 * from its file. Both give the same spectrum (a test compares them).
 */
function builtinSpectrum(file: string, name: string, source: string): Spectrum {
  let s = builtinCache.get(file);
  if (!s) {
    const t = packedTable(file) ?? parseBuiltinTable(file);
    s = spectrumOfArrays({ name, source, sha256: t.sha256, wavelengthNm: Float64Array.from(t.wavelengthNm), irradiance: Float64Array.from(t.irradiance) });
    builtinCache.set(file, s);
  }
  return s;
}

/** The shipped tables the build packs. */
export const BUILTIN_SPECTRUM_FILES = ['am1.5g.tsv', 'am1.5d.tsv', 'am0.tsv'] as const;

/** ASTM G173-03 global tilt (AM1.5G) as shipped in spectra/am1.5g.tsv; P_in = 1000.37 W/m². */
export function am15g(): Spectrum {
  return builtinSpectrum('am1.5g.tsv', 'AM1.5G (ASTM G173-03 global tilt)', 'ASTM G173-03 global tilt, spectra/am1.5g.tsv');
}

/** ASTM G173-03 direct normal + circumsolar (AM1.5D) as shipped in spectra/am1.5d.tsv; P_in = 900.14 W/m². */
export function am15d(): Spectrum {
  return builtinSpectrum('am1.5d.tsv', 'AM1.5D (ASTM G173-03 direct + circumsolar)', 'ASTM G173-03 direct normal + circumsolar, spectra/am1.5d.tsv');
}

/** ASTM G173-03 extraterrestrial (AM0) as shipped in spectra/am0.tsv; P_in = 1347.93 W/m² over 280–4000 nm. */
export function am0(): Spectrum {
  return builtinSpectrum('am0.tsv', 'AM0 (ASTM G173-03 extraterrestrial)', 'ASTM G173-03 extraterrestrial, spectra/am0.tsv');
}

/** Short names of the built-in standard spectra, lower case. */
export const BUILTIN_SPECTRUM_NAMES: Readonly<Record<string, () => Spectrum>> = {
  'am1.5g': am15g,
  am15g: am15g,
  'am1.5d': am15d,
  am15d: am15d,
  am0: am0,
};

/** How to scale a resolved spectrum: concentration [suns] or a target irradiance [W/m²], and units for a headerless file. */
export interface LightOptions {
  /** Concentration [suns], a number ≥ 1e-6, or 'max' for full concentration (≈ 46 240). */
  suns?: number | 'max';
  /** Rescale the spectrum to this irradiance [W/m²]. */
  irradianceWm2?: number;
  /** Units declared for a headerless file. */
  units?: TableUnits;
  /** Extend a table that ends before 4000 nm with the AM1.5G shape, joined at its last point (docs/PHYSICS.md §11). */
  extendWithAm15g?: boolean;
}

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Refuse a rescale to an irradiance beyond full concentration of the source
 * (the bound --suns has): `factor` is the requested irradiance over the
 * source's own one-sun irradiance.
 */
function checkIrradianceBound(irradianceWm2: number, oneSunWm2: number): void {
  const factor = irradianceWm2 / oneSunWm2;
  if (!(factor <= MAX_CONCENTRATION * (1 + 1e-9))) {
    throw new ParameterError(
      'irradianceWm2',
      `a positive irradiance [W/m²] up to full concentration (${MAX_CONCENTRATION.toFixed(0)} suns) of the light`,
      says`${ref('irradianceWm2')} ${irradianceWm2} W/m2 is ${factor.toPrecision(3)} times this light's ${oneSunWm2.toFixed(1)} W/m2, beyond full concentration (${MAX_CONCENTRATION.toFixed(0)} suns)`,
    );
  }
}

const SUNS_ALLOWED = `a number from 1e-6 to ${MAX_CONCENTRATION.toFixed(0)} [suns], or "max"`;

/** Read a concentration [suns]: a positive number (1e-6 up to full concentration) or "max". */
export function parseSuns(value: unknown): number | 'max' | undefined {
  if (value === undefined) return undefined;
  if (value === 'max') return 'max';
  // Decimal only: Number() would also take 0x10 and 0b101, which no other option accepts.
  const x = typeof value === 'number' ? value : typeof value === 'string' && DECIMAL.test(value.trim()) ? Number(value) : NaN;
  if (!Number.isFinite(x) || !(x > 0)) throw new ParameterError('suns', SUNS_ALLOWED, says`${ref('suns')} must be a positive number or "max", got "${String(value)}"`);
  if (x < 1e-6) throw new ParameterError('suns', SUNS_ALLOWED, says`${ref('suns')} ${x} is below 1e-6 suns; the detailed-balance numbers mean little there`);
  if (x > MAX_CONCENTRATION * (1 + 1e-9)) throw new ParameterError('suns', SUNS_ALLOWED, says`${ref('suns')} ${x} exceeds full concentration (${MAX_CONCENTRATION.toFixed(0)} suns)`);
  return x;
}

/**
 * Resolve a spectrum name: "am1.5g", "am1.5d", "am0", "clearsky:<key=value,…>" (SPECTRL2), "blackbody:<K>" or a file path, then
 * apply concentration (`suns`) or a target irradiance. For a blackbody the
 * concentration sets the dilution f = C·(R_sun/D)²; for a table it scales it.
 */
export function resolveSpectrum(name: string, opts: LightOptions = {}): Spectrum {
  if (opts.suns !== undefined && opts.irradianceWm2 !== undefined) throw new ParameterError('irradianceWm2', 'either suns or irradianceWm2, not both', says`give either ${ref('suns')} or ${ref('irradianceWm2')}, not both`);
  const suns = opts.suns === 'max' ? MAX_CONCENTRATION : opts.suns;
  if (opts.irradianceWm2 !== undefined && !(opts.irradianceWm2 > 0 && Number.isFinite(opts.irradianceWm2))) {
    throw new ParameterError('irradianceWm2', 'a positive irradiance [W/m²]', says`${ref('irradianceWm2')} must be a positive number of W/m2, got ${opts.irradianceWm2}`);
  }
  const key = name.trim().toLowerCase();
  let s: Spectrum;
  const builtin = BUILTIN_SPECTRUM_NAMES[key];
  if (builtin) {
    s = builtin();
  } else if (key.startsWith('clearsky:')) {
    s = clearSkySpectrum(name.trim());
  } else if (key.startsWith('blackbody:') || key.startsWith('bb:')) {
    const word = key.slice(key.indexOf(':') + 1).replace(/k$/, '').trim();
    const t = DECIMAL.test(word) ? Number(word) : NaN;
    if (!Number.isFinite(t)) throw new UserError(`"${name}": blackbody temperature must be a number of kelvin, e.g. blackbody:5778`);
    const dilution = suns === undefined ? DILUTION_ONE_SUN : Math.min(1, suns * DILUTION_ONE_SUN);
    s = blackbodySpectrum({ tempK: t, dilution });
    if (opts.irradianceWm2 !== undefined) {
      checkIrradianceBound(opts.irradianceWm2, s.pinWm2 / (dilution / DILUTION_ONE_SUN));
      s = scaleSpectrum(s, opts.irradianceWm2 / s.pinWm2);
    }
    return s;
  } else {
    s = readSpectrumFile(name, opts.units);
    if (opts.extendWithAm15g) s = extendWithReferenceShape(s, am15g(), 'AM1.5G (ASTM G173-03)');
  }
  if (suns !== undefined) s = scaleSpectrum(s, suns);
  if (opts.irradianceWm2 !== undefined) {
    checkIrradianceBound(opts.irradianceWm2, s.pinWm2);
    s = scaleSpectrum(s, opts.irradianceWm2 / s.pinWm2);
  }
  return s;
}
