/**
 * Tunable absorbers: the gap model of an alloy family, composition → gap,
 * and its inversion gap → every composition that gives it.
 *
 * Alloys follow the bowing form (Vegard interpolation with a quadratic
 * correction)
 *   E_g(x) = (1 − x)·E_A + x·E_B − b·x(1 − x)
 * or, where a source publishes its fit that way, a polynomial Σ c_k x^k.
 * Both are evaluated as polynomials, so one inversion serves every model:
 * the tunable range is split at the model's extrema (roots of the derivative,
 * found recursively) and each monotonic piece is solved by bisection.
 * References: Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89 (2001) 5815
 * (bowing convention used for III-V alloys).
 */
import { UserError } from '../errors.js';

/** Gap of an alloy as published: bowing form, polynomial, or a fixed compound. */
export type GapModel =
  | {
      readonly form: 'bowing';
      /** Gap of the x = 0 end member [eV]. */
      readonly eaEv: number;
      /** Gap of the x = 1 end member [eV]. */
      readonly ebEv: number;
      /** Bowing parameter b [eV]; positive bows the gap downwards. */
      readonly bowingEv: number;
    }
  | {
      readonly form: 'polynomial';
      /** c_0, c_1, … of E_g(x) = Σ c_k x^k [eV]. */
      readonly coefficientsEv: readonly number[];
    }
  | {
      readonly form: 'fixed';
      /** Gap of the compound [eV]. */
      readonly gapEv: number;
    };

/** The composition variable of an alloy family. */
export interface CompositionVariable {
  /** Symbol used in formulas and output, e.g. "x". */
  readonly symbol: string;
  /** What the number means, in plain words, e.g. "Br fraction of the halide site". */
  readonly meaning: string;
}

/** Where a family is known to give working absorbers, and why it stops there. */
export interface PracticalWindow {
  /** Gap interval [lo, hi] [eV] of compositions in practical use. */
  readonly gapEv: readonly [number, number];
  /** Optional further limit on the composition itself [-] (e.g. Sn oxidation above some Sn fraction). */
  readonly composition?: readonly [number, number];
  /** Why the window ends where it does, with its source. */
  readonly reason: string;
}

/** A tunable (or fixed) absorber family with the source of every number. */
export interface AbsorberFamily {
  /** Kebab-case identifier, e.g. "perovskite-i-br". */
  readonly id: string;
  /** Display name. */
  readonly name: string;
  readonly kind: 'alloy' | 'fixed';
  /** Composition variable; null for a fixed absorber. */
  readonly variable: CompositionVariable | null;
  readonly model: GapModel;
  /** Full tunable composition range [xmin, xmax] [-]; [0, 0] for a fixed absorber. */
  readonly compositionRange: readonly [number, number];
  /** Gap span over the tunable range [min, max] [eV] (computed from the model). */
  readonly gapSpanEv: readonly [number, number];
  readonly window: PracticalWindow;
  /** Temperature coefficient of the gap near 300 K [eV/K]. */
  readonly dEgDtEvPerK: number;
  /** Typical real refractive index just above the gap [-]. */
  readonly refractiveIndex: number;
  /** Short citation of the gap model's main source. */
  readonly citation: string;
  /**
   * Source of each number, keyed by what it supports (gap_model, window,
   * dEg_dT, refractive_index, …); "from memory" or "common practice" where so.
   */
  readonly sources: Readonly<Record<string, string>>;
}

/** Everything of a family except what is computed from its model. */
export type FamilySpec = Omit<AbsorberFamily, 'gapSpanEv'>;

/** Temperature at which every built-in gap model holds [K]. */
export const REFERENCE_TEMPERATURE_K = 300;

/** Bisection stops when the bracket in composition is this narrow [-]. */
const COMPOSITION_TOLERANCE = 1e-12;
/** A model value this close to the target counts as equal [eV]. */
const GAP_TOLERANCE_EV = 1e-12;
/** A fixed absorber matches a requested gap within this [eV]. */
const FIXED_GAP_TOLERANCE_EV = 1e-9;
/** Window edges are compared with this slack [eV] or [-]. */
const WINDOW_SLACK = 1e-9;

// ---------------------------------------------------------------------------
// Polynomial helpers (coefficients ascending: c0 + c1 x + c2 x² …)

/** Polynomial coefficients [eV] of a gap model, ascending powers of x. */
export function modelCoefficientsEv(model: GapModel): readonly number[] {
  switch (model.form) {
    case 'bowing':
      // (1−x)EA + x EB − b x(1−x) = EA + (EB − EA − b) x + b x²
      return [model.eaEv, model.ebEv - model.eaEv - model.bowingEv, model.bowingEv];
    case 'polynomial':
      return model.coefficientsEv;
    case 'fixed':
      return [model.gapEv];
  }
}

function evaluate(coeffs: readonly number[], x: number): number {
  let y = 0;
  for (let k = coeffs.length - 1; k >= 0; k--) y = y * x + coeffs[k]!;
  return y;
}

function derivative(coeffs: readonly number[]): number[] {
  const d: number[] = [];
  for (let k = 1; k < coeffs.length; k++) d.push(k * coeffs[k]!);
  return d;
}

function trimmed(coeffs: readonly number[]): number[] {
  const c = [...coeffs];
  while (c.length > 0 && c[c.length - 1] === 0) c.pop();
  return c;
}

/** Roots of f(x) − target on [a, b] where f is monotonic there; at most one. */
function monotonicRoot(coeffs: readonly number[], target: number, a: number, b: number): number | undefined {
  let fa = evaluate(coeffs, a) - target;
  const fb = evaluate(coeffs, b) - target;
  if (Math.abs(fa) <= GAP_TOLERANCE_EV) return a;
  if (Math.abs(fb) <= GAP_TOLERANCE_EV) return b;
  if (Math.sign(fa) === Math.sign(fb)) return undefined;
  let lo = a;
  let hi = b;
  for (let i = 0; i < 200 && hi - lo > COMPOSITION_TOLERANCE; i++) {
    const mid = 0.5 * (lo + hi);
    const fm = evaluate(coeffs, mid) - target;
    if (fm === 0) return mid;
    if (Math.sign(fm) === Math.sign(fa)) {
      lo = mid;
      fa = fm;
    } else {
      hi = mid;
    }
  }
  return 0.5 * (lo + hi);
}

/**
 * Interior extrema of a polynomial on (lo, hi), ascending: the roots of its
 * derivative, each isolated between the derivative's own extrema (recursion
 * ends at a linear derivative).
 */
function interiorExtrema(coeffs: readonly number[], lo: number, hi: number): number[] {
  const d = trimmed(derivative(coeffs));
  if (d.length <= 1) return [];
  if (d.length === 2) {
    const r = -d[0]! / d[1]!;
    return r > lo && r < hi ? [r] : [];
  }
  const breaks = [lo, ...interiorExtrema(d, lo, hi), hi];
  const roots: number[] = [];
  for (let i = 0; i + 1 < breaks.length; i++) {
    const r = monotonicRoot(d, 0, breaks[i]!, breaks[i + 1]!);
    if (r !== undefined && r > lo && r < hi && !roots.some((q) => Math.abs(q - r) < 1e-9)) roots.push(r);
  }
  return roots.sort((p, q) => p - q);
}

// ---------------------------------------------------------------------------
// Formatting for messages

function eV(v: number): string {
  return v.toFixed(2);
}

function xs(v: number): string {
  return v.toFixed(2);
}

function symbolOf(family: AbsorberFamily): string {
  return family.variable?.symbol ?? 'x';
}

function requireFiniteGap(gapEv: number, what: string): void {
  if (!Number.isFinite(gapEv)) throw new UserError(`${what} must be a finite number in eV, got ${String(gapEv)}`);
}

// ---------------------------------------------------------------------------
// Public model functions

/**
 * Gap of a family at a composition.
 * @param family absorber family
 * @param x composition [-], inside the family's tunable range
 * @returns gap at 300 K [eV]
 * @throws UserError when x is not finite or outside the tunable range
 */
export function gapFromComposition(family: AbsorberFamily, x: number): number {
  const [xmin, xmax] = family.compositionRange;
  if (family.kind === 'fixed') {
    if (x !== 0) {
      throw new UserError(
        `${family.name} (${family.id}) is a fixed absorber with no composition to set; its gap is ${eV(evaluate(modelCoefficientsEv(family.model), 0))} eV`,
      );
    }
    return evaluate(modelCoefficientsEv(family.model), 0);
  }
  if (!Number.isFinite(x) || x < xmin || x > xmax) {
    throw new UserError(
      `composition ${symbolOf(family)}=${String(x)} is outside the tunable range ${xmin}–${xmax} of ${family.name} (${family.id}; ${symbolOf(family)} = ${family.variable?.meaning ?? 'composition'})`,
    );
  }
  return evaluate(modelCoefficientsEv(family.model), x);
}

/** Lowest and highest gap a family reaches over its tunable range, and where. */
export interface GapReach {
  /** Lowest gap [eV]. */
  readonly minEv: number;
  /** Highest gap [eV]. */
  readonly maxEv: number;
  /** Composition of the lowest gap [-]. */
  readonly xAtMin: number;
  /** Composition of the highest gap [-]. */
  readonly xAtMax: number;
}

/** Lowest and highest gap [eV] a model reaches over a composition range, and where. */
export function modelReach(model: GapModel, range: readonly [number, number]): GapReach {
  const coeffs = modelCoefficientsEv(model);
  const [lo, hi] = range;
  const candidates = [lo, ...interiorExtrema(coeffs, lo, hi), hi];
  let best = { minEv: Infinity, maxEv: -Infinity, xAtMin: lo, xAtMax: lo };
  for (const x of candidates) {
    const g = evaluate(coeffs, x);
    if (g < best.minEv) best = { ...best, minEv: g, xAtMin: x };
    if (g > best.maxEv) best = { ...best, maxEv: g, xAtMax: x };
  }
  return best;
}

/**
 * Gap span of a family over its tunable range.
 * @returns {minEv, maxEv} [eV] with the compositions [-] where they occur
 */
export function gapReach(family: AbsorberFamily): GapReach {
  return modelReach(family.model, family.compositionRange);
}

/**
 * Every composition in the tunable range whose gap equals gapEv, ascending.
 * Non-monotonic models (Sn–Pb perovskite) give two; an unreachable gap gives
 * none. Roots are bracketed between the model's extrema and bisected to
 * 1e-12 in composition.
 * @param family absorber family
 * @param gapEv target gap [eV]
 * @returns compositions [-], ascending; [0] for a fixed absorber whose gap matches
 * @throws UserError when gapEv is not finite
 */
export function compositionsForGap(family: AbsorberFamily, gapEv: number): number[] {
  requireFiniteGap(gapEv, 'gap');
  const coeffs = modelCoefficientsEv(family.model);
  if (family.kind === 'fixed') {
    return Math.abs(evaluate(coeffs, 0) - gapEv) <= FIXED_GAP_TOLERANCE_EV ? [0] : [];
  }
  const [lo, hi] = family.compositionRange;
  const breaks = [lo, ...interiorExtrema(coeffs, lo, hi), hi];
  const roots: number[] = [];
  for (let i = 0; i + 1 < breaks.length; i++) {
    const r = monotonicRoot(coeffs, gapEv, breaks[i]!, breaks[i + 1]!);
    if (r !== undefined && !roots.some((q) => Math.abs(q - r) < 1e-9)) roots.push(r);
  }
  return roots.sort((p, q) => p - q);
}

/**
 * Whether a composition with a given gap lies in the family's practical window.
 * @param family absorber family
 * @param x composition [-]
 * @param gapEv its gap [eV]
 */
export function isInWindow(family: AbsorberFamily, x: number, gapEv: number): boolean {
  const [glo, ghi] = family.window.gapEv;
  if (gapEv < glo - WINDOW_SLACK || gapEv > ghi + WINDOW_SLACK) return false;
  const cw = family.window.composition;
  if (cw !== undefined && (x < cw[0] - WINDOW_SLACK || x > cw[1] + WINDOW_SLACK)) return false;
  return true;
}

/** What a family can do at one gap. */
export interface GapDescription {
  /** Requested gap [eV]. */
  readonly gapEv: number;
  /** Compositions giving that gap [-], ascending, each flagged against the window. */
  readonly compositions: readonly { readonly x: number; readonly inWindow: boolean }[];
  /** At least one composition gives the gap. */
  readonly reachable: boolean;
  /** At least one such composition lies in the practical window. */
  readonly inWindow: boolean;
  /** One sentence a person can act on. */
  readonly note: string;
}

function windowText(family: AbsorberFamily): string {
  const [lo, hi] = family.window.gapEv;
  const cw = family.window.composition;
  const comp = cw === undefined ? '' : ` with ${symbolOf(family)} in ${xs(cw[0])}–${xs(cw[1])}`;
  return `${eV(lo)}–${eV(hi)} eV${comp}`;
}

/**
 * Compositions for a gap, flagged against the practical window, with a note.
 * @param family absorber family
 * @param gapEv target gap [eV]
 * @throws UserError when gapEv is not finite
 */
export function describeGap(family: AbsorberFamily, gapEv: number): GapDescription {
  const roots = compositionsForGap(family, gapEv);
  const compositions = roots.map((x) => ({ x, inWindow: isInWindow(family, x, gapEv) }));
  const reachable = compositions.length > 0;
  const inWindow = compositions.some((c) => c.inWindow);
  const sym = symbolOf(family);
  let note: string;
  if (!reachable) {
    const reach = gapReach(family);
    if (family.kind === 'fixed') {
      note = `${eV(gapEv)} eV is not available from ${family.name}, a fixed absorber with a gap of ${eV(reach.minEv)} eV`;
    } else if (gapEv < reach.minEv) {
      note = `${eV(gapEv)} eV is below the lowest gap of ${family.name} (${eV(reach.minEv)} eV at ${sym}=${xs(reach.xAtMin)})`;
    } else {
      note = `${eV(gapEv)} eV is above the highest gap of ${family.name} (${eV(reach.maxEv)} eV at ${sym}=${xs(reach.xAtMax)})`;
    }
  } else if (family.kind === 'fixed') {
    note = `${family.name} has a fixed gap of ${eV(gapEv)} eV`;
  } else {
    const parts = compositions.map(
      (c) => `${sym}=${xs(c.x)}${compositions.length > 1 ? (c.inWindow ? ' (in window)' : ' (outside window)') : ''}`,
    );
    const needs = `${eV(gapEv)} eV needs ${parts.join(' or ')}, where ${sym} = ${family.variable?.meaning ?? 'composition'}`;
    if (compositions.every((c) => c.inWindow)) {
      note = `${needs}; inside the practical window ${windowText(family)}`;
    } else if (inWindow) {
      const good = compositions.filter((c) => c.inWindow).map((c) => `${sym}=${xs(c.x)}`);
      note = `${needs}; only ${good.join(' or ')} lies in the practical window ${windowText(family)}: ${family.window.reason}`;
    } else {
      note = `${needs}; outside the practical window ${windowText(family)}: ${family.window.reason}`;
    }
  }
  return { gapEv, compositions, reachable, inWindow, note };
}

/**
 * Gap at another temperature, linear about 300 K with the family's dEg/dT.
 * @param family absorber family (supplies dEg/dT [eV/K])
 * @param gapEv300 gap at 300 K [eV]
 * @param tempK cell temperature [K]
 * @returns gap at tempK [eV]
 * @throws UserError on a non-finite gap or a non-positive temperature
 */
export function gapAtTemperature(family: AbsorberFamily, gapEv300: number, tempK: number): number {
  requireFiniteGap(gapEv300, 'gap at 300 K');
  if (!Number.isFinite(tempK) || tempK <= 0) {
    throw new UserError(`temperature must be a finite number of kelvin above 0 K, got ${String(tempK)}`);
  }
  return gapEv300 + family.dEgDtEvPerK * (tempK - REFERENCE_TEMPERATURE_K);
}

/**
 * Complete a family specification with its computed gap span.
 * Throws a plain Error on inconsistent data: built-in data is a programming
 * matter, user data is checked first by parseUserFamily.
 */
export function makeFamily(spec: FamilySpec): AbsorberFamily {
  const [xmin, xmax] = spec.compositionRange;
  if (spec.kind === 'fixed' ? xmin !== 0 || xmax !== 0 : !(xmin >= 0 && xmax <= 1 && xmin < xmax)) {
    throw new Error(`family ${spec.id}: bad composition range [${xmin}, ${xmax}]`);
  }
  if ((spec.kind === 'fixed') !== (spec.model.form === 'fixed')) {
    throw new Error(`family ${spec.id}: kind ${spec.kind} does not match model form ${spec.model.form}`);
  }
  const reach = modelReach(spec.model, spec.compositionRange);
  if (!(reach.minEv > 0)) throw new Error(`family ${spec.id}: model gives a gap ≤ 0 eV`);
  const [wlo, whi] = spec.window.gapEv;
  if (!(wlo <= whi) || whi < reach.minEv - WINDOW_SLACK || wlo > reach.maxEv + WINDOW_SLACK) {
    throw new Error(`family ${spec.id}: window [${wlo}, ${whi}] eV misses the model's reach`);
  }
  return { ...spec, gapSpanEv: [reach.minEv, reach.maxEv] };
}
