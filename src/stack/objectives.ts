/**
 * Choosing the objective a search maximises: the closed-form step objective
 * where the stack allows it, otherwise the general stack evaluation (any
 * optics, coupling or wiring) with the gaps substituted into a template.
 * Both score a weighted set of spectra as Σ w·P_max / Σ w·P_in.
 */
import { hasSeriesResistance, isSeriesString, stackWithGaps, type StackSpec } from './model.js';
import { evaluateStack } from './evaluate.js';
import type { WeightedSpectrum } from '../light/weighted-spectrum.js';
import type { GapObjective } from './gap-objective.js';
import { StepObjective } from './step-objective.js';

/** Any stack: gaps substituted into a template and evaluated in full per spectrum. */
export class GenericObjective implements GapObjective {
  readonly cells: number;
  readonly label: string;
  private readonly template: StackSpec;
  private readonly spectra: WeightedSpectrum[];
  private readonly pinTotal: number;
  private readonly steps: boolean;

  constructor(template: StackSpec, spectra: WeightedSpectrum[]) {
    this.template = template;
    this.spectra = spectra;
    this.cells = template.subcells.length;
    this.pinTotal = spectra.reduce((a, s) => a + s.weight * s.spectrum.pinWm2, 0);
    this.steps = template.subcells.every((c) => c.absorptance.kind === 'step');
    this.label = spectra.length === 1 ? 'efficiency' : 'yield-weighted efficiency';
  }

  /** The template with these gaps [eV] (and, for a spectrum, its cell temperature). */
  stackAt(gapsEv: ArrayLike<number>, tempK = this.template.tempK): StackSpec {
    return stackWithGaps(this.template, gapsEv, tempK);
  }

  value(gapsEv: ArrayLike<number>): number {
    if (this.steps) for (let i = 1; i < this.cells; i++) if (!(gapsEv[i] < gapsEv[i - 1])) return 0;
    let p = 0;
    for (const s of this.spectra) p += s.weight * evaluateStack(this.stackAt(gapsEv, s.tempK), s.spectrum).pmaxWm2;
    return p / this.pinTotal;
  }
}

/** True when the closed-form step objective reproduces the template exactly. */
export function stepObjectiveApplies(t: StackSpec): boolean {
  const w = t.wiring;
  const n = t.subcells.length;
  const series = isSeriesString(w);
  const independent = w.kind === 'groups' && w.groups.length === n && w.groups.every((g) => g.length === 1);
  return (
    (series || independent) &&
    t.coupling.model === 'none' &&
    !hasSeriesResistance(t) &&
    t.frontReflectance === 0 &&
    t.interlayerTransmittance.every((x) => x === 1) &&
    t.subcells.every((c, i) => c.absorptance.kind === 'step' && (i === 0 || c.absorptance.value === 1))
  );
}

/** Choices of the objective beyond the template stack. */
export interface ObjectiveOptions {
  /** Let the search choose the top cell's constant absorptance (2T thinning). */
  freeTopAbsorptance?: boolean;
}

/**
 * The fastest exact objective for a template stack under weighted spectra: the
 * closed-form step objective where it reproduces the template, else the full
 * evaluation. Its value is Σ w·P_max / Σ w·P_in [-] at gaps [eV] (docs/PHYSICS.md §8).
 */
export function buildObjective(template: StackSpec, spectra: WeightedSpectrum[], opts: ObjectiveOptions = {}): GapObjective {
  if (stepObjectiveApplies(template)) {
    const w = template.wiring;
    const top = template.subcells[0].absorptance;
    return new StepObjective({
      cells: template.subcells.length,
      wiring: isSeriesString(w) ? 'series' : 'independent',
      ere: template.subcells.map((c) => c.ere),
      topAbsorptance: opts.freeTopAbsorptance ? 'free' : top.kind === 'step' ? top.value : 1,
      spectra,
    });
  }
  return new GenericObjective(template, spectra);
}
