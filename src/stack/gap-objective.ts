/**
 * The one interface the search maximises: a stack's efficiency as a function
 * of its gaps. `objectives.ts` chooses the implementation (closed form for
 * ideal steps, the general evaluation otherwise).
 */

/** A stack objective over gaps (top first, [eV]); higher is better. */
export interface GapObjective {
  readonly cells: number;
  /** Efficiency (or yield-weighted efficiency) [-] at continuous gaps [eV]. */
  value(gapsEv: ArrayLike<number>): number;
  /** Describe what is maximised, for reports. */
  readonly label: string;
}
