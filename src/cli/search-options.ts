/** Options shared by `optimize`, `map` and `report`: constraints, span, step and loss. */
import { UserError } from '../errors.js';
import { getFamily } from '../materials/index.js';
import type { SubcellConstraint } from '../search/design-search.js';
import type { StackSpec } from '../stack/model.js';
import { parseIndexed, parseNumber, parseRange } from './options.js';

export interface ConstraintArgs {
  fix?: unknown;
  range?: unknown;
  material?: unknown;
  fullRange?: boolean;
}

/** Per-subcell constraints from --fix, --range and --material; fixed gaps and ranges must meet the search span, as in design files. */
export function constraintsFromArgs(a: ConstraintArgs, cells: number, spanEv?: [number, number]): SubcellConstraint[] {
  const out: SubcellConstraint[] = Array.from({ length: cells }, () => ({ kind: 'free' }) as SubcellConstraint);
  const taken = new Map<number, string>();
  const claim = (i: number, opt: string) => {
    if (taken.has(i)) throw new UserError(`subcell ${i + 1} is given both --${taken.get(i)} and --${opt}; choose one`);
    taken.set(i, opt);
  };
  for (const [i, v] of parseIndexed('fix', a.fix, cells)) {
    claim(i, 'fix');
    const g = parseNumber('fix', v);
    if (!(g > 0)) throw new UserError(`--fix ${i + 1}=${v}: gap must be a positive number of eV`);
    if (spanEv && (g < spanEv[0] || g > spanEv[1])) throw new UserError(`--fix ${i + 1}=${v}: the gap lies outside the search span ${spanEv[0]}–${spanEv[1]} eV (--span)`);
    out[i] = { kind: 'fixed', gapEv: g };
  }
  for (const [i, v] of parseIndexed('range', a.range, cells)) {
    claim(i, 'range');
    const [lo, hi] = parseRange('range', v);
    if (!(lo > 0)) throw new UserError(`--range ${i + 1}=${v}: gaps must be positive eV`);
    if (spanEv && (hi < spanEv[0] || lo > spanEv[1])) throw new UserError(`--range ${i + 1}=${v}: the range lies outside the search span ${spanEv[0]}–${spanEv[1]} eV (--span)`);
    out[i] = { kind: 'range', loEv: lo, hiEv: hi };
  }
  for (const [i, v] of parseIndexed('material', a.material, cells)) {
    claim(i, 'material');
    out[i] = { kind: 'material', family: getFamily(v), fullRange: Boolean(a.fullRange) };
  }
  return out;
}

/** --cells: 1 to 6. */
export function cellsFromArgs(value: unknown): number {
  const n = parseNumber('cells', value ?? 2);
  if (!(Number.isInteger(n) && n >= 1 && n <= 6)) throw new UserError(`--cells must be a whole number 1–6, got ${String(value)}`);
  return n;
}

/** --span (default 0.5–2.6 eV). */
export function spanFromArgs(value: unknown): [number, number] {
  if (value === undefined) return [0.5, 2.6];
  const [lo, hi] = parseRange('span', value);
  if (!(lo >= 0.2 && hi <= 5)) throw new UserError(`--span must lie within 0.2–5 eV, got ${String(value)}`);
  return [lo, hi];
}

/** --loss (default 1 % relative). */
export function lossFromArgs(value: unknown): number {
  if (value === undefined) return 0.01;
  const l = parseNumber('loss', value);
  if (!(l > 0 && l < 0.5)) throw new UserError(`--loss must be a relative loss within (0, 0.5), e.g. 0.01 for 1 %, got ${l}`);
  return l;
}

/** --step (coarse grid) [eV], optional. */
export function stepFromArgs(value: unknown): number | undefined {
  if (value === undefined) return undefined;
  const s = parseNumber('step', value);
  if (!(s >= 1e-4 && s <= 0.2)) throw new UserError(`--step must be within 0.0001–0.2 eV, got ${s}`);
  return s;
}

/** Refractive index of each bound subcell's family [-], undefined where unbound. */
export function familyIndices(constraints: SubcellConstraint[]): (number | undefined)[] {
  return constraints.map((c) => (c.kind === 'material' ? c.family.refractiveIndex : undefined));
}

/** A measured curve fixes its subcell's absorption: a search may not move that gap. */
export function requireMeasuredFixed(spec: StackSpec, constraints: SubcellConstraint[]): void {
  spec.subcells.forEach((c, i) => {
    const k = c.absorptance.kind;
    if ((k === 'absorptance-table' || k === 'eqe-table') && constraints[i].kind !== 'fixed') {
      throw new UserError(`subcell ${i + 1} has a measured ${k === 'eqe-table' ? 'EQE' : 'absorptance'}, which does not move with a gap: fix its gap with --fix ${i + 1}=<eV>`);
    }
  });
}
