/**
 * Turning command-line words into engine inputs, with errors that name the
 * option and the allowed values.
 */
import { UserError } from '../errors.js';
import { resolveSpectrum, parseSuns } from '../light/sources.js';
import { parseUnitDeclaration } from '../light/table-file.js';
import type { Spectrum } from '../light/spectrum.js';
import { ereFromVocLoss } from '../junction/radiative.js';
import { DEFAULT_FILM_INDEX, type AbsorptanceModel, type AlphaModel, type Coupling, type StackSpec, type SubcellSpec, type Wiring } from '../stack/model.js';
import { readCurveFile } from '../stack/curve-file.js';
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

function asList(value: unknown): string[] {
  if (value === undefined) return [];
  return (Array.isArray(value) ? value : [value]).flatMap((v) => String(v).split(/\s+/)).filter((v) => v !== '');
}

/** Parse "i=value" items (1-based subcell from the top). */
export function parseIndexed(option: string, value: unknown, cells: number): Map<number, string> {
  const out = new Map<number, string>();
  for (const item of asList(value)) {
    const m = /^(\d+)=(.+)$/.exec(item);
    if (!m) throw new UserError(`--${option} takes "i=value" with i the subcell from the top (1 = top), got "${item}"`);
    const i = Number(m[1]);
    if (!(i >= 1 && i <= cells)) throw new UserError(`--${option} ${item}: subcell ${i} does not exist in a ${cells}-subcell stack`);
    if (out.has(i - 1)) throw new UserError(`--${option} names subcell ${i} twice`);
    out.set(i - 1, m[2]);
  }
  return out;
}

/** Expand one value or a per-item list to `count` items. */
function perItem(option: string, values: number[], count: number, what: string): number[] {
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
function tempFromArgs(value: unknown): number {
  if (value === undefined) return 300;
  const t = parseNumber('temp', value);
  if (!(t >= 150 && t <= 500)) throw new UserError(`--temp must be a cell temperature within 150–500 K, got ${t}`);
  return t;
}

/** Wiring from --wiring (see src/stack/wiring-text.ts for the forms). */
function wiringFromArgs(value: unknown, cells: number): Wiring {
  return parseWiring(String(value ?? 'series'), cells);
}

/** Coupling from --lc: a value or list of η (empirical) or "radiative[:n]". */
function couplingFromArgs(value: unknown, cells: number): Coupling {
  if (value === undefined || value === 'none' || value === 'isolated') return { model: 'none' };
  const text = String(value).trim().toLowerCase();
  const radiative = /^radiative(?::([^:]+))?$/.exec(text);
  // Without an explicit index each upper film emits into the cell below with its own index (stack model).
  if (text.startsWith('radiative') && !radiative) throw new UserError(`--lc radiative takes an optional index, "radiative" or "radiative:<n>", got "${String(value)}"`);
  if (radiative) {
    if (radiative[1] === undefined) return { model: 'radiative' };
    const n = parseNumber('lc', radiative[1]);
    if (!(n >= 1 && n <= 10)) throw new UserError(`--lc radiative:<n> needs a refractive index within 1–10, got ${n}`);
    return { model: 'radiative', refractiveIndex: n };
  }
  if (cells < 2) throw new UserError('--lc needs at least 2 subcells');
  const eta = perItem('lc', parseNumberList('lc', text), cells - 1, 'interface');
  for (const e of eta) if (!(e >= 0 && e <= 1)) throw new UserError(`--lc efficiencies must be within [0, 1], got ${e}`);
  return { model: 'empirical', eta };
}

/** ERE per subcell from --ere, or from --voc-loss [V]. */
function ereFromArgs(ere: unknown, vocLoss: unknown, cells: number, tempK: number): number[] {
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
  rs?: unknown;
  thickness?: unknown;
  alpha0?: unknown;
  urbach?: unknown;
  alphaFile?: unknown;
  bottomOptics?: unknown;
  index?: unknown;
  absorptanceFile?: unknown;
  eqeFile?: unknown;
}

/** Default α at 1 eV above the gap [cm⁻¹]: a typical direct-gap order of magnitude (common practice). */
export const DEFAULT_ALPHA0_PER_CM = 1.5e5;
/** Default Urbach energy [eV] (common practice for good perovskite and III–V films). */
export const DEFAULT_URBACH_EV = 0.015;

/** Series resistance per subcell [Ω·cm²] from --rs (default 0). */
export function rsFromArgs(value: unknown, cells: number): number[] {
  if (value === undefined) return Array.from({ length: cells }, () => 0);
  const rs = perItem('rs', parseNumberList('rs', value), cells, 'subcell');
  for (const r of rs) if (!(r >= 0 && r <= 1000)) throw new UserError(`--rs must be within 0–1000 Ω·cm² per subcell, got ${r}`);
  return rs;
}

/** A per-subcell list where "-" leaves a subcell out; one value applies to every subcell. */
function perSubcellOrDash(option: string, value: unknown, cells: number): (number | undefined)[] {
  const text = Array.isArray(value) ? value.join(',') : String(value);
  const parts = text.split(',').map((p) => p.trim());
  const items = parts.length === 1 ? Array.from({ length: cells }, () => parts[0]) : parts;
  if (items.length !== cells) throw new UserError(`--${option} takes one value or ${cells} (one per subcell, "-" for none), got ${parts.length}`);
  return items.map((p) => (p === '-' ? undefined : parseNumber(option, p)));
}

/** Refractive index of each subcell's film [-] from --index, else its family's (when bound), else none given. */
export function indicesFromArgs(value: unknown, cells: number, familyIndex: (number | undefined)[] = []): (number | undefined)[] {
  const given = value === undefined ? Array.from({ length: cells }, () => undefined) : perSubcellOrDash('index', value, cells);
  return given.map((n, i) => {
    if (n !== undefined && !(n >= 1 && n <= 10)) throw new UserError(`--index must be a refractive index within 1–10, got ${n}`);
    return n ?? familyIndex[i];
  });
}

/** Light path of the bottom film from --bottom-optics (default single). */
function bottomOpticsFromArgs(value: unknown): 'single' | 'double' | 'lambertian' {
  const o = String(value ?? 'single');
  if (o === 'single' || o === 'double' || o === 'lambertian') return o;
  throw new UserError(`--bottom-optics must be single, double (rear mirror) or lambertian, got "${o}"`);
}

/**
 * Absorptance of every subcell below the top from the per-subcell options:
 * --thickness (nm, "-" for an ideal step) with --alpha0/--urbach or --alpha-file,
 * --absorptance-file / --eqe-file (measured), --bottom-optics for the last one.
 * `index` gives the Lambertian index.
 */
export function subcellAbsorptanceFromArgs(a: StackArgs, cells: number, index: (number | undefined)[]): (AbsorptanceModel | undefined)[] {
  const out: (AbsorptanceModel | undefined)[] = Array.from({ length: cells }, () => undefined);
  const thickness = a.thickness === undefined ? [] : perSubcellOrDash('thickness', a.thickness, cells);
  const alpha0 = a.alpha0 === undefined ? [] : perSubcellOrDash('alpha0', a.alpha0, cells);
  const urbach = a.urbach === undefined ? [] : perSubcellOrDash('urbach', a.urbach, cells);
  const alphaFiles = parseIndexed('alpha-file', a.alphaFile, cells);
  const measured = new Map<number, AbsorptanceModel>();
  for (const [option, raw, kind] of [['absorptance-file', a.absorptanceFile, 'absorptance'], ['eqe-file', a.eqeFile, 'eqe']] as const) {
    for (const [i, file] of parseIndexed(option, raw, cells)) {
      if (measured.has(i)) throw new UserError(`subcell ${i + 1} is given both --absorptance-file and --eqe-file; choose one`);
      const c = readCurveFile(file, kind);
      measured.set(i, { kind: kind === 'eqe' ? 'eqe-table' : 'absorptance-table', energyEv: c.energyEv, value: c.value, source: c.source });
    }
  }
  const bottomOptics = bottomOpticsFromArgs(a.bottomOptics);
  for (let i = 0; i < cells; i++) {
    const d = thickness[i];
    const m = measured.get(i);
    if (m && d !== undefined) throw new UserError(`subcell ${i + 1}: give either a --thickness or a measured file, not both (the measured curve already holds the film)`);
    if (m) {
      out[i] = m;
      continue;
    }
    if (d === undefined) {
      for (const [name, list] of [['alpha0', alpha0], ['urbach', urbach]] as const) {
        // One value applies to every film; a per-subcell value for a step subcell is a mistake.
        if (list[i] !== undefined && String(name === 'alpha0' ? a.alpha0 : a.urbach).includes(',')) throw new UserError(`--${name} for subcell ${i + 1} describes a film and needs its --thickness`);
      }
      if (alphaFiles.has(i)) throw new UserError(`--alpha-file ${i + 1}=… describes a film and needs a --thickness for subcell ${i + 1}`);
      continue;
    }
    if (!(d > 0 && d <= 1e6)) throw new UserError(`--thickness must be within (0, 1e6] nm, got ${d}`);
    let alpha: AlphaModel;
    const file = alphaFiles.get(i);
    if (file !== undefined) {
      if (alpha0[i] !== undefined || urbach[i] !== undefined) throw new UserError(`subcell ${i + 1}: --alpha-file replaces --alpha0 and --urbach; give one or the other`);
      const c = readCurveFile(file, 'alpha');
      alpha = { kind: 'table', energyEv: c.energyEv, alphaPerCm: c.value };
    } else {
      const a0 = alpha0[i] ?? DEFAULT_ALPHA0_PER_CM;
      if (!(a0 > 0)) throw new UserError(`--alpha0 must be a positive absorption coefficient [cm^-1], got ${a0}`);
      const eu = urbach[i] ?? DEFAULT_URBACH_EV;
      if (!(eu >= 0 && eu <= 0.2)) throw new UserError(`--urbach must be within 0–0.2 eV, got ${eu}`);
      alpha = { kind: 'direct', alpha0PerCm: a0, urbachEv: eu };
    }
    const optics = i === cells - 1 ? bottomOptics : 'single';
    out[i] =
      optics === 'lambertian'
        ? { kind: 'lambertian', refractiveIndex: index[i] ?? DEFAULT_FILM_INDEX, thicknessNm: d, alpha }
        : { kind: 'beer-lambert', passes: optics === 'double' ? 2 : 1, thicknessNm: d, alpha };
  }
  if (a.bottomOptics !== undefined && bottomOptics !== 'single' && out[cells - 1]?.kind !== 'beer-lambert' && out[cells - 1]?.kind !== 'lambertian') {
    throw new UserError(`--bottom-optics ${bottomOptics} describes the bottom film and needs its --thickness (the last of --thickness)`);
  }
  return out;
}

/** Absorptance of the top cell from --top-absorptance or --top-thickness and its model. */
function topAbsorptanceFromArgs(a: StackArgs): AbsorptanceModel {
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
    const alpha0 = a.topAlpha0 === undefined ? DEFAULT_ALPHA0_PER_CM : parseNumber('top-alpha0', a.topAlpha0);
    if (!(alpha0 > 0)) throw new UserError(`--top-alpha0 must be a positive absorption coefficient [cm^-1], got ${alpha0}`);
    const urbach = a.topUrbach === undefined ? DEFAULT_URBACH_EV : parseNumber('top-urbach', a.topUrbach);
    if (!(urbach >= 0 && urbach <= 0.2)) throw new UserError(`--top-urbach must be within 0–0.2 eV, got ${urbach}`);
    const alpha = { kind: 'direct' as const, alpha0PerCm: alpha0, urbachEv: urbach };
    const optics = String(a.topOptics ?? 'single');
    if (optics === 'single') return { kind: 'beer-lambert', passes: 1, thicknessNm: d, alpha };
    if (optics === 'double') return { kind: 'beer-lambert', passes: 2, thicknessNm: d, alpha };
    if (optics === 'lambertian') return { kind: 'lambertian', refractiveIndex: DEFAULT_FILM_INDEX, thicknessNm: d, alpha };
    throw new UserError(`--top-optics must be single, double or lambertian, got "${optics}"`);
  }
  return { kind: 'step', value: 1 };
}

/**
 * A full stack from --gaps and the stack options. `familyIndex` holds the
 * refractive index of each subcell's bound family (undefined where unbound).
 */
export function stackFromArgs(gapsEv: number[], a: StackArgs, familyIndex: (number | undefined)[] = []): StackSpec {
  const n = gapsEv.length;
  const tempK = tempFromArgs(a.temp);
  const ere = ereFromArgs(a.ere, a.vocLoss, n, tempK);
  const topOptics = a.topOptics === undefined ? 'single' : String(a.topOptics);
  if (n > 1 && a.topThickness !== undefined && (topOptics === 'double' || topOptics === 'lambertian')) {
    throw new UserError(`--top-optics ${topOptics} puts a reflector behind the top film, so no light would reach the subcells below; upper films are single pass (a rear mirror or Lambertian trapping belongs to the bottom subcell: --bottom-optics)`);
  }
  const topGiven = a.topAbsorptance !== undefined || a.topThickness !== undefined;
  const index = indicesFromArgs(a.index, n, familyIndex);
  const films = subcellAbsorptanceFromArgs(a, n, index);
  if (topGiven && films[0] !== undefined) throw new UserError('the top subcell is given both a --top-… option and a per-subcell film or measured file; choose one');
  const top = topGiven || films[0] === undefined ? topAbsorptanceFromArgs(a) : films[0];
  const rs = rsFromArgs(a.rs, n);
  const subcells: SubcellSpec[] = gapsEv.map((g, i) => ({
    gapEv: g,
    ere: ere[i],
    absorptance: i === 0 ? top : (films[i] ?? { kind: 'step', value: 1 }),
    ...(rs[i] > 0 ? { rsOhmCm2: rs[i] } : {}),
    ...(index[i] !== undefined ? { refractiveIndex: index[i] } : {}),
  }));
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
