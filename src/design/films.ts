/**
 * A design file's subcell as a film, measured data or an ideal step, and the
 * per-wiring optics overrides. Paths are relative to the design file; every
 * error names the field (and, for data files, the data file's line).
 */
import { dirname, isAbsolute, resolve } from 'node:path';
import { UserError } from '../errors.js';
import { readCurveFile } from '../stack/curve-file.js';
import { DEFAULT_FILM_INDEX, type AbsorptanceModel, type AlphaModel } from '../stack/model.js';
import { designError, type DesignSource, type FieldPath } from './source.js';
import type { SubcellEntry } from './types.js';

type Located = Pick<DesignSource, 'path' | 'lineOf'>;

/** Default α at 1 eV above the gap [cm⁻¹] and Urbach energy [eV] of a design film (common practice, as on the command line). */
export const DESIGN_FILM_DEFAULTS = { alpha0PerCm: 1.5e5, urbachEv: 0.015 } as const;

const FILM_KEYS = ['thickness_nm', 'alpha0_per_cm', 'urbach_ev', 'alpha_file', 'optics'] as const;

function readCurve(src: Located, path: FieldPath, file: string, quantity: 'absorptance' | 'eqe' | 'alpha') {
  const full = isAbsolute(file) ? file : resolve(dirname(src.path), file);
  try {
    return readCurveFile(full, quantity);
  } catch (err) {
    if (err instanceof UserError) throw designError(src, path, err.message);
    throw err;
  }
}

/**
 * The absorptance model of subcell i (0-based) of n, from its design entry.
 * `index` is the film's refractive index (given, or its family's).
 */
export function subcellAbsorptance(src: Located, e: SubcellEntry, i: number, n: number, index: number | undefined): AbsorptanceModel {
  const here: FieldPath = ['subcells', i];
  const film = FILM_KEYS.filter((k) => e[k] !== undefined);
  const measured = (['absorptance_file', 'eqe_file'] as const).filter((k) => e[k] !== undefined);
  if (measured.length > 1) throw designError(src, [...here, measured[1]], 'give either absorptance_file or eqe_file, not both', true);
  if (measured.length === 1) {
    if (film.length > 0) throw designError(src, [...here, film[0]], `${film[0]} describes a film; ${measured[0]} already holds the measured film`, true);
    if (e.absorptance !== undefined) throw designError(src, [...here, 'absorptance'], `absorptance and ${measured[0]} both describe the top cell's absorption; give one`, true);
    if (e.gap === undefined) throw designError(src, [...here, measured[0]], 'a measured curve does not move with a gap: give the subcell its gap (gap: <eV>)', true);
    const key = measured[0];
    const c = readCurve(src, [...here, key], e[key] as string, key === 'eqe_file' ? 'eqe' : 'absorptance');
    return { kind: key === 'eqe_file' ? 'eqe-table' : 'absorptance-table', energyEv: c.energyEv, value: c.value, source: c.source };
  }
  if (e.thickness_nm === undefined) {
    if (film.length > 0) throw designError(src, [...here, film[0]], `${film[0]} describes a film and needs thickness_nm`, true);
    return { kind: 'step', value: typeof e.absorptance === 'number' ? e.absorptance : 1 };
  }
  if (e.absorptance !== undefined) throw designError(src, [...here, 'absorptance'], 'give either a constant absorptance or a film (thickness_nm), not both', true);
  let alpha: AlphaModel;
  if (e.alpha_file !== undefined) {
    const clash = (['alpha0_per_cm', 'urbach_ev'] as const).find((k) => e[k] !== undefined);
    if (clash) throw designError(src, [...here, clash], 'alpha_file replaces alpha0_per_cm and urbach_ev; give one or the other', true);
    const c = readCurve(src, [...here, 'alpha_file'], e.alpha_file, 'alpha');
    alpha = { kind: 'table', energyEv: c.energyEv, alphaPerCm: c.value };
  } else {
    alpha = { kind: 'direct', alpha0PerCm: e.alpha0_per_cm ?? DESIGN_FILM_DEFAULTS.alpha0PerCm, urbachEv: e.urbach_ev ?? DESIGN_FILM_DEFAULTS.urbachEv };
  }
  const optics = e.optics ?? 'single';
  if (optics !== 'single' && i < n - 1) {
    throw designError(src, [...here, 'optics'], `${optics === 'double' ? 'a rear mirror (double)' : 'Lambertian trapping'} puts a reflector behind the film, so no light would reach the subcells below; only the bottom subcell (subcells[${n - 1}]) may have it`, true);
  }
  if (optics === 'lambertian') return { kind: 'lambertian', refractiveIndex: index ?? DEFAULT_FILM_INDEX, thicknessNm: e.thickness_nm, alpha };
  return { kind: 'beer-lambert', passes: optics === 'double' ? 2 : 1, thicknessNm: e.thickness_nm, alpha };
}

/** One value or one per interface, expanded to n − 1 values, or an error naming the field. */
export function perInterface(src: Located, path: FieldPath, v: number | number[] | undefined, n: number, fallback: number): number[] {
  if (v === undefined) return Array.from({ length: n - 1 }, () => fallback);
  const list = typeof v === 'number' ? Array.from({ length: n - 1 }, () => v) : v;
  if (list.length !== n - 1) {
    throw designError(src, path, n === 1 ? `a single subcell has no interface; leave it out, got ${list.length} values` : n === 2 ? `takes one value (there is one interface), got ${list.length}` : `takes one value or ${n - 1} (one per interface), got ${list.length}`);
  }
  return [...list];
}
