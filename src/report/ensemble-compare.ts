/**
 * The user's spectra against the AM1.5G reference, as plain numbers: for
 * every wiring the same design question answered under AM1.5G alone, each
 * optimum valued under the other light, the gap shift, what the AM1.5G
 * design gives up over the ensemble, and the AM1.5G maps on the ensemble
 * maps' own axes. Only for designs whose light is an ensemble.
 */
import type { Design } from '../design/index.js';
import { UserError } from '../errors.js';
import type { EnsembleSummary } from '../light/ensemble.js';
import { am15g } from '../light/sources.js';
import { averagePhotonEnergyEv, type Spectrum } from '../light/spectrum.js';
import { computeMap, type GapMap } from '../search/map.js';
import { runDesignSearch, type DesignSearchRequest, type DesignSearchResult } from '../search/design-search.js';
import { isSeriesString, stackWithGaps, type StackSpec } from '../stack/model.js';
import { stackOptics } from '../stack/optics.js';
import type { MapOutcome, WiringOutcome } from './outcomes.js';

/** One design point valued under both lights. */
export interface ComparedPoint {
  gapsEv: number[];
  /** η under AM1.5G at the design temperature [-]. */
  referenceEfficiency: number;
  /** Yield-weighted η over the ensemble [-]. */
  yieldEfficiency: number;
}

export interface ComparedMap {
  /** The ensemble's map outcome (axes, marks, optimum) this one sits beside. */
  ensemble: MapOutcome;
  /** The AM1.5G map on the same axes, same fixed and profiled subcells. */
  reference: GapMap;
  /** The AM1.5G optimum on the mapped pair. */
  referenceOptimum: { x: number; y: number; value: number };
  /** AM1.5G tolerance threshold, (1 − loss)·best [-]. */
  referenceThreshold: number;
}

/** Photocurrent mismatch of a series stack, largest over smallest subcell J_gen minus 1 [-]. */
export interface MismatchSpread {
  /** Under AM1.5G. */
  reference: number;
  /** Over the ensemble's spectra: smallest, largest, and the mean weighted by energy received (w·P_in). */
  min: number;
  max: number;
  energyWeightedMean: number;
}

/** One design question's answer under an ensemble set against its answer under AM1.5G. */
export interface AnswerComparison {
  /** The AM1.5G optimum, valued under both lights. */
  referenceOptimal: ComparedPoint;
  /** The ensemble optimum, valued under both lights. */
  ensembleOptimal: ComparedPoint;
  /** Ensemble-optimal minus AM1.5G-optimal gap, per subcell [eV]. */
  shiftEv: number[];
  /** Yield-weighted η the AM1.5G design gives up: ensemble optimum minus the AM1.5G design's yield [-]. */
  lossAbs: number;
  /** The same relative to the ensemble optimum [-]. */
  lossRel: number;
}

export interface WiringComparison extends AnswerComparison {
  outcome: WiringOutcome;
  /** The design search under AM1.5G alone. */
  reference: DesignSearchResult;
  /** Series stacks: how far the AM1.5G-optimal stack's photocurrents drift apart under the ensemble's spectra; else null. */
  mismatch: MismatchSpread | null;
  maps: ComparedMap[];
}

export interface EnsembleComparison {
  name: string;
  source: string;
  summary: EnsembleSummary;
  /** The reference spectrum (AM1.5G) and its average photon energy over the summary's APE window [eV]. */
  referenceSpectrum: Spectrum;
  referenceApeEv: number;
  /** True when the ensemble's own name marks it as synthetic or demo data. */
  synthetic: boolean;
  wirings: WiringComparison[];
}

/** Words in an ensemble's name that mark it as made-up data. */
export const SYNTHETIC_NAME = /synthetic|demo|invented|fictional|made[- ]up/i;

function mismatchOf(t: StackSpec, gaps: number[], tempK: number, spectrum: Spectrum): number {
  const j = stackOptics(stackWithGaps(t, gaps, tempK), spectrum).jgenAm2;
  return Math.max(...j) / Math.min(...j) - 1;
}

/** The same design question under AM1.5G alone (ASTM G173-03 global tilt), at the template's cell temperature. */
export function questionUnderReference(question: DesignSearchRequest): DesignSearchRequest {
  return { ...question, spectra: [{ spectrum: am15g(), weight: 1, tempK: question.template.tempK }], progress: undefined };
}

/** Each optimum valued under the other light: the gap shift and what the AM1.5G design gives up under the ensemble. */
export function compareAnswers(ensemble: DesignSearchResult, reference: DesignSearchResult): AnswerComparison {
  const refGaps = reference.result.best.gapsEv.slice();
  const ensGaps = ensemble.result.best.gapsEv.slice();
  const referenceOptimal = { gapsEv: refGaps, referenceEfficiency: reference.result.best.value, yieldEfficiency: ensemble.objective.value(refGaps) };
  const ensembleOptimal = { gapsEv: ensGaps, referenceEfficiency: reference.objective.value(ensGaps), yieldEfficiency: ensemble.result.best.value };
  const lossAbs = ensembleOptimal.yieldEfficiency - referenceOptimal.yieldEfficiency;
  return { referenceOptimal, ensembleOptimal, shiftEv: ensGaps.map((g, i) => g - refGaps[i]), lossAbs, lossRel: lossAbs / ensembleOptimal.yieldEfficiency };
}

/** Compare each wiring's ensemble answer with the same question under AM1.5G; null unless the light is an ensemble. */
export function compareWithReference(design: Design, outcomes: WiringOutcome[]): EnsembleComparison | null {
  const l = design.light;
  if (l.kind !== 'ensemble') return null;
  const ref = am15g();
  const wirings = outcomes.map((o, k): WiringComparison => {
    const w = o.wiring;
    const ens = o.search;
    let reference: DesignSearchResult;
    try {
      reference = runDesignSearch(
        questionUnderReference({
          template: w.template,
          spectra: [],
          constraints: design.subcells.map((s) => s.constraint),
          spanEv: design.spanEv,
          stepEv: design.searchStepEv,
          loss: design.loss,
        }),
      );
    } catch (err) {
      if (err instanceof UserError) throw new UserError(`${design.path}: wirings[${k}] (${w.key}) under AM1.5G: ${err.message}`);
      throw err;
    }
    const answers = compareAnswers(ens, reference);
    const refGaps = answers.referenceOptimal.gapsEv;
    const maps = o.maps.map((m): ComparedMap => {
      const { xCell, yCell } = m.pair;
      const bounds = ens.result.bounds;
      const fixed = bounds.map((b, i) => (i !== xCell && i !== yCell && b[0] === b[1] ? b[0] : undefined));
      const map = computeMap(reference.objective, { x: m.map.x, y: m.map.y, xCell, yCell, fixed, bounds });
      const best = reference.result.best;
      return {
        ensemble: m,
        reference: map,
        referenceOptimum: { x: best.gapsEv[xCell], y: best.gapsEv[yCell], value: best.value },
        referenceThreshold: best.value * (1 - design.loss),
      };
    });
    const series = isSeriesString(w.wiring) && refGaps.length > 1;
    let mismatch: MismatchSpread | null = null;
    if (series) {
      const per = design.spectra.map((s) => ({ x: mismatchOf(w.template, refGaps, s.tempK, s.spectrum), w: s.weight * s.spectrum.pinWm2 }));
      const total = per.reduce((a, p) => a + p.w, 0);
      mismatch = {
        reference: mismatchOf(w.template, refGaps, w.template.tempK, ref),
        min: Math.min(...per.map((p) => p.x)),
        max: Math.max(...per.map((p) => p.x)),
        energyWeightedMean: per.reduce((a, p) => a + p.x * p.w, 0) / total,
      };
    }
    return { outcome: o, reference, ...answers, mismatch, maps };
  });
  const [wlo, whi] = l.summary.ape.windowNm;
  return {
    name: l.name,
    source: l.source,
    summary: l.summary,
    referenceSpectrum: ref,
    referenceApeEv: averagePhotonEnergyEv(ref, wlo, whi),
    synthetic: SYNTHETIC_NAME.test(l.name),
    wirings,
  };
}
