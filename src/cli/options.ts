/**
 * Turning command-line words into engine inputs, with errors that name the
 * option and the allowed values.
 */
import { UserError } from '../errors.js';
import { resolveSpectrum, parseSuns } from '../light/sources.js';
import { parseUnitDeclaration } from '../light/table-file.js';
import type { Spectrum } from '../light/spectrum.js';
import { ereFromVocLoss } from '../junction/radiative.js';
import type { AbsorptanceModel, Coupling, StackSpec, SubcellSpec, Wiring } from '../stack/model.js';
import { parseWiring } from '../stack/wiring-text.js';

/** A finite number from an option value, or a UserError naming the option. */
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function parseNumber(option: string, value: unknown): number {
  const x = typeof value === 'number' ? value : typeof value === 'string' && DECIMAL.test(value.trim()) ? Number(value) : NaN;
  if (!Number.isFinite(x)) throw new UserError(`--${option} must be a number, got "${String(value)}"`);
  return x;
}

/** A comma list of finite numbers. */
export function parseNumberList(option: string, value: unknown): number[] {
  const text = Array.isArray(value) ? value.join(',') : String(value ?? '');
  const parts = text.split(',').map((p) => p.trim());
  if (parts.length === 0 || parts.some((p) => p === '')) throw new UserError(`--${option} must be a comma-separated list of numbers, got "${text}"`);
  return parts.map((p) => parseNumber(option, p));
}

/** A range "a:b" with a < b. */
export function parseRange(option: string, value: unknown): [number, number] {
  const text = String(value ?? '');
  const m = text.split(':');
  if (m.length !== 2) throw new UserError(`--${option} must be a range "low:high", got "${text}"`);
  const lo = parseNumber(option, m[0]);
  const hi = parseNumber(option, m[1]);
  if (!(lo < hi)) throw new UserError(`--${option}: low end must be below high end, got "${text}"`);
  return [lo, hi];
}

/** Expand one value or a per-item list to `count` items. */
export function perItem(option: string, values: number[], count: number, what: string): number[] {
  if (values.length === 1) return Array.from({ length: count }, () => values[0]);
  if (values.length !== count) throw new UserError(`--${option} takes one value or ${count} (one per ${what}), got ${values.length}`);
  return values;
}

export interface LightArgs {
  spectrum?: string;
  extendSpectrum?: boolean;
  suns?: unknown;
  irradiance?: unknown;
  units?: string;
}

/** The spectrum named by --spectrum/--suns/--irradiance/--units (default AM1.5G). */
export function spectrumFromArgs(a: LightArgs): Spectrum {
  return resolveSpectrum(a.spectrum ?? 'am1.5g', {
    suns: parseSuns(a.suns),
    irradianceWm2: a.irradiance === undefined ? undefined : parseNumber('irradiance', a.irradiance),
    units: a.units === undefined ? undefined : parseUnitDeclaration(a.units),
    extendWithAm15g: Boolean(a.extendSpectrum),
  });
}

/** Cell temperature [K] from --temp (default 300 K, the detailed-balance convention). */
export function tempFromArgs(value: unknown): number {
  if (value === undefined) return 300;
  const t = parseNumber('temp', value);
  if (!(t >= 150 && t <= 500)) throw new UserError(`--temp must be a cell temperature within 150–500 K, got ${t}`);
  return t;
}

/** Wiring from --wiring (see src/stack/wiring-text.ts for the forms). */
export function wiringFromArgs(value: unknown, cells: number): Wiring {
  return parseWiring(String(value ?? 'series'), cells);
}

/** Coupling from --lc: a value or list of η (empirical) or "radiative[:n]". */
export function couplingFromArgs(value: unknown, cells: number): Coupling {
  if (value === undefined || value === 'none' || value === 'isolated') return { model: 'none' };
  const text = String(value).trim().toLowerCase();
  const radiative = /^radiative(?::([^:]+))?$/.exec(text);
  if (text.startsWith('radiative') && !radiative) throw new UserError(`--lc radiative takes an optional index, "radiative" or "radiative:<n>", got "${String(value)}"`);
  if (radiative) {
    const n = radiative[1] !== undefined ? parseNumber('lc', radiative[1]) : 3.5;
    if (!(n >= 1 && n <= 10)) throw new UserError(`--lc radiative:<n> needs a refractive index within 1–10, got ${n}`);
    return { model: 'radiative', refractiveIndex: n };
  }
  if (cells < 2) throw new UserError('--lc needs at least 2 subcells');
  const eta = perItem('lc', parseNumberList('lc', text), cells - 1, 'interface');
  for (const e of eta) if (!(e >= 0 && e <= 1)) throw new UserError(`--lc efficiencies must be within [0, 1], got ${e}`);
  return { model: 'empirical', eta };
}

/** ERE per subcell from --ere, or from --voc-loss [V]. */
export function ereFromArgs(ere: unknown, vocLoss: unknown, cells: number, tempK: number): number[] {
  if (ere !== undefined && vocLoss !== undefined) throw new UserError('give either --ere or --voc-loss, not both');
  if (vocLoss !== undefined) {
    const losses = perItem('voc-loss', parseNumberList('voc-loss', vocLoss), cells, 'subcell');
    for (const l of losses) if (!(l >= 0 && l < 2)) throw new UserError(`--voc-loss must be within [0, 2) V, got ${l}`);
    return losses.map((l) => ereFromVocLoss(l, tempK));
  }
  if (ere === undefined) return Array.from({ length: cells }, () => 1);
  const values = perItem('ere', parseNumberList('ere', ere), cells, 'subcell');
  for (const e of values) if (!(e > 0 && e <= 1)) throw new UserError(`--ere must be within (0, 1], got ${e}`);
  return values;
}

export interface StackArgs {
  wiring?: unknown;
  lc?: unknown;
  ere?: unknown;
  vocLoss?: unknown;
  temp?: unknown;
  topAbsorptance?: unknown;
  topThickness?: unknown;
  topAlpha0?: unknown;
  topUrbach?: unknown;
  topOptics?: unknown;
  reflectance?: unknown;
  interlayerT?: unknown;
}

/** Absorptance of the top cell from --top-absorptance or --top-thickness and its model. */
export function topAbsorptanceFromArgs(a: StackArgs): AbsorptanceModel {
  if (a.topAbsorptance !== undefined && a.topThickness !== undefined) throw new UserError('give either --top-absorptance or --top-thickness, not both');
  if (a.topAbsorptance === 'best') return { kind: 'step', value: 1 };
  if (a.topAbsorptance !== undefined) {
    const v = parseNumber('top-absorptance', a.topAbsorptance);
    if (!(v > 0 && v <= 1)) throw new UserError(`--top-absorptance must be within (0, 1], got ${v}`);
    return { kind: 'step', value: v };
  }
  if (a.topThickness === undefined) {
    for (const [name, v] of [['top-alpha0', a.topAlpha0], ['top-urbach', a.topUrbach], ['top-optics', a.topOptics]] as const) {
      if (v !== undefined) throw new UserError(`--${name} describes a top-cell film and needs --top-thickness`);
    }
  }
  if (a.topThickness !== undefined) {
    const d = parseNumber('top-thickness', a.topThickness);
    if (!(d > 0 && d <= 1e6)) throw new UserError(`--top-thickness must be within (0, 1e6] nm, got ${d}`);
    const alpha0 = a.topAlpha0 === undefined ? 1.5e5 : parseNumber('top-alpha0', a.topAlpha0);
    if (!(alpha0 > 0)) throw new UserError(`--top-alpha0 must be a positive absorption coefficient [cm^-1], got ${alpha0}`);
    const urbach = a.topUrbach === undefined ? 0.015 : parseNumber('top-urbach', a.topUrbach);
    if (!(urbach >= 0 && urbach <= 0.2)) throw new UserError(`--top-urbach must be within 0–0.2 eV, got ${urbach}`);
    const alpha = { kind: 'direct' as const, alpha0PerCm: alpha0, urbachEv: urbach };
    const optics = String(a.topOptics ?? 'single');
    if (optics === 'single') return { kind: 'beer-lambert', passes: 1, thicknessNm: d, alpha };
    if (optics === 'double') return { kind: 'beer-lambert', passes: 2, thicknessNm: d, alpha };
    if (optics === 'lambertian') return { kind: 'lambertian', refractiveIndex: 2.5, thicknessNm: d, alpha };
    throw new UserError(`--top-optics must be single, double or lambertian, got "${optics}"`);
  }
  return { kind: 'step', value: 1 };
}

/** A full stack from --gaps and the stack options. */
export function stackFromArgs(gapsEv: number[], a: StackArgs): StackSpec {
  const n = gapsEv.length;
  const tempK = tempFromArgs(a.temp);
  const ere = ereFromArgs(a.ere, a.vocLoss, n, tempK);
  const top = topAbsorptanceFromArgs(a);
  const subcells: SubcellSpec[] = gapsEv.map((g, i) => ({ gapEv: g, ere: ere[i], absorptance: i === 0 ? top : { kind: 'step', value: 1 } }));
  const r = a.reflectance === undefined ? 0 : parseNumber('reflectance', a.reflectance);
  if (!(r >= 0 && r < 1)) throw new UserError(`--reflectance must be within [0, 1), got ${r}`);
  if (n === 1 && a.interlayerT !== undefined) throw new UserError('--interlayer-t needs at least 2 subcells (it sits between them)');
  const t = n > 1 && a.interlayerT !== undefined ? perItem('interlayer-t', parseNumberList('interlayer-t', a.interlayerT), n - 1, 'interface') : Array.from({ length: n - 1 }, () => 1);
  for (const v of t) if (!(v > 0 && v <= 1)) throw new UserError(`--interlayer-t must be within (0, 1], got ${v}`);
  return {
    subcells,
    tempK,
    frontReflectance: r,
    interlayerTransmittance: t,
    coupling: couplingFromArgs(a.lc, n),
    wiring: wiringFromArgs(a.wiring, n),
  };
}

/** Gaps from --gaps: positive numbers, top first. */
export function gapsFromArgs(value: unknown): number[] {
  if (value === undefined) throw new UserError('--gaps is required, e.g. --gaps 1.72,1.12 (eV, top first)');
  const gaps = parseNumberList('gaps', value);
  for (const g of gaps) if (!(g > 0)) throw new UserError(`--gaps: every gap must be a positive number of eV, got ${g}`);
  if (gaps.length > 6) throw new UserError(`--gaps: at most 6 subcells, got ${gaps.length}`);
  return gaps;
}
