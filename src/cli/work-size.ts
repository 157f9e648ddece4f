/**
 * How big a run is before it starts: stacks to evaluate times spectra to
 * evaluate them under. A search over many subcells and a large ensemble can
 * take hours; such a run is refused with the estimate unless the user says
 * they mean it (--accept-large).
 */
import { UserError } from '../errors.js';
import type { SubcellConstraint } from '../search/design-search.js';

/** Stack–spectrum evaluations above which a run is refused without --accept-large (hours on one core). */
export const MAX_EVALUATIONS_UNASKED = 5e9;
/** Rough cost of one profile-map point: a local search over the other free gaps (evaluations). */
const PROFILE_POINT_EVALUATIONS = 300;

/** Gap range [eV] a constraint leaves open (fixed: a point). */
function widthEv(c: SubcellConstraint, spanEv: [number, number]): number {
  switch (c.kind) {
    case 'fixed':
      return 0;
    case 'range':
      return Math.max(0, Math.min(c.hiEv, spanEv[1]) - Math.max(c.loEv, spanEv[0]));
    case 'material': {
      if (c.family.kind === 'fixed') return 0;
      const [lo, hi] = c.fullRange ? c.family.gapSpanEv : c.family.window.gapEv;
      return Math.max(0, hi - lo);
    }
    default:
      return spanEv[1] - spanEv[0];
  }
}

/**
 * Upper estimate of the coarse grid a search enumerates: the product of grid
 * points per open subcell, divided by k! for the k subcells that share the
 * whole span (their gaps are ordered, so only one ordering counts).
 */
export function searchStacks(constraints: readonly SubcellConstraint[], spanEv: [number, number], stepEv: number): number {
  let stacks = 1;
  let shared = 0;
  for (const c of constraints) {
    if (c.kind === 'fixed' || (c.kind === 'material' && c.family.kind === 'fixed')) continue;
    stacks *= Math.floor(widthEv(c, spanEv) / stepEv) + 1;
    if (c.kind === 'free') stacks /= ++shared;
  }
  return stacks;
}

/** Points of a map times the cost of each (a local search when other subcells are maximised). */
export function mapStacks(nx: number, ny: number, profiled: boolean): number {
  return nx * ny * (profiled ? PROFILE_POINT_EVALUATIONS : 1);
}

const sci = (x: number) => (x >= 1e6 ? x.toExponential(1).replace('e+', 'e') : Math.round(x).toString());

/** Refuse a run estimated above MAX_EVALUATIONS_UNASKED unless accepted; the message says what to change. */
export function checkWorkSize(what: string, stacks: number, spectra: number, accepted: boolean): void {
  const total = stacks * spectra;
  if (accepted || !(total > MAX_EVALUATIONS_UNASKED)) return;
  throw new UserError(
    `this ${what} would evaluate about ${sci(total)} stack–spectrum pairs (${sci(stacks)} stacks × ${spectra} spectra), hours of work; ` +
      `coarsen --step, narrow --span or --range, fix a subcell, thin the ensemble, or pass --accept-large to run it anyway`,
  );
}
