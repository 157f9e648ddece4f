/**
 * Thinning the top cell: the constant absorptance A above the top gap that
 * maximises a stack's efficiency, (1 − A) of its band passing down to the
 * cell below (docs/PHYSICS.md §4). In a series stack η(A) rises while the top
 * cell over-produces and falls once it limits the current, so one golden-
 * section search over [MIN_TOP_ABSORPTANCE, 1] finds it; A = 1 wins ties.
 */
import { goldenSectionMax } from '../numerics/golden.js';
import type { Spectrum } from '../light/spectrum.js';
import { evaluateStack } from './evaluate.js';
import type { StackSpec } from './model.js';

/** Lowest constant top absorptance the optimiser considers [-]: thinner top cells carry too little of the band to be worth a step model. */
export const MIN_TOP_ABSORPTANCE = 0.02;

export interface TopAbsorptanceChoice {
  /** Constant top absorptance [-], in [MIN_TOP_ABSORPTANCE, 1]. */
  absorptance: number;
  /** Efficiency there [-]. */
  efficiency: number;
}

/**
 * Best constant top absorptance for an efficiency function of it.
 * @param efficiencyAt η [-] of the stack at top absorptance A [-]
 * @param tol bracket width at which the search stops [-]
 */
export function bestTopAbsorptance(efficiencyAt: (absorptance: number) => number, tol = 1e-7): TopAbsorptanceChoice {
  const a = goldenSectionMax(efficiencyAt, MIN_TOP_ABSORPTANCE, 1, tol);
  const full = efficiencyAt(1);
  const fa = efficiencyAt(a);
  return fa >= full ? { absorptance: a, efficiency: fa } : { absorptance: 1, efficiency: full };
}

/** The stack with its top cell an ideal step of constant absorptance [-]. */
export function withTopAbsorptance(spec: StackSpec, absorptance: number): StackSpec {
  return { ...spec, subcells: spec.subcells.map((c, i) => (i === 0 ? { ...c, absorptance: { kind: 'step', value: absorptance } } : c)) };
}

/** Best constant top absorptance of any stack under one spectrum, each trial evaluated in full. */
export function bestTopAbsorptanceOfStack(spec: StackSpec, spectrum: Spectrum): TopAbsorptanceChoice {
  return bestTopAbsorptance((a) => evaluateStack(withTopAbsorptance(spec, a), spectrum).efficiency, 1e-9);
}
