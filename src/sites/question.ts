/**
 * The question a batch asks at every site, built from a design: per wiring, the
 * site-optimal gaps and their yield (the existing design search over the site's
 * weighted spectra), and how much the AM1.5G-optimal design of the same
 * question loses there. The site's light comes from a function handed in
 * (weather file → hourly weighted spectra), so the batch reuses the one engine
 * that turns weather into light.
 */
import { createHash } from 'node:crypto';
import type { Design, DesignWiring } from '../design/index.js';
import { UserError } from '../errors.js';
import { am15g } from '../light/sources.js';
import type { LabelledSpectrum } from '../light/weighted-spectrum.js';
import { runDesignSearch, withFamilySlopes, type DesignSearchRequest } from '../search/design-search.js';
import type { SiteResult, SiteWiringResult } from './parts.js';
import type { SiteQuestion } from './run.js';

/** A site's light as the weather engine gives it. */
export interface SiteLight {
  name: string;
  latDeg: number;
  lonDeg: number;
  /** Weighted spectra on the module plane; weights in hours. */
  spectra: LabelledSpectrum[];
  /** Annual plane-of-array insolation as the light's engine reports it [kWh/m²]; default Σ hours·P_in of the spectra. */
  poaKwhM2?: number;
}

/** Turns one weather file into its site's light. */
export type SiteLightSource = (weatherPath: string) => Promise<SiteLight>;

/** Column prefix of a wiring: the trade's terminal counts where they apply, else the wiring's slug. */
export function wiringPrefix(w: Pick<DesignWiring, 'key' | 'slug'>): string {
  if (w.key === 'series') return '2t';
  if (w.key === 'independent') return '4t';
  return w.slug.toLowerCase().replace(/[^a-z0-9]+/g, '-');
}

/**
 * SHA-256 (hex) of a question: the design file's hash plus every option that
 * changes a number (in a fixed key order), so parts of different questions never merge.
 */
export function questionSha256(designSha256: string, options: Record<string, string | number | boolean | null>): string {
  const keys = Object.keys(options).sort();
  return createHash('sha256').update(JSON.stringify({ design: designSha256, options: keys.map((k) => [k, options[k]]) })).digest('hex');
}

function request(design: Design, w: DesignWiring, spectra: DesignSearchRequest['spectra']): DesignSearchRequest {
  return {
    // Under a site's hours, material-bound gaps are stated at 300 K and move with each hour's cell temperature, whatever light the design file itself names (docs/PHYSICS.md §10).
    template: withFamilySlopes(w.template, design.subcells.map((s) => s.constraint)),
    spectra,
    constraints: design.subcells.map((s) => s.constraint),
    spanEv: design.spanEv,
    stepEv: design.searchStepEv,
    loss: design.loss,
    // A site's row holds the optimum and the AM1.5G design's loss: no tolerance region, no runner-up basins.
    optimumOnly: true,
  };
}

/** Annual plane-of-array insolation Σ w·P_in [kWh/m²] of hourly weighted spectra. */
export function insolationKwhM2(spectra: readonly LabelledSpectrum[]): number {
  return spectra.reduce((s, m) => s + m.weight * m.spectrum.pinWm2, 0) / 1000;
}

/** One site's answer for every wiring of the design. */
export function answerAtSite(design: Design, light: SiteLight, am15gOptima: readonly number[][]): Omit<SiteResult, 'key' | 'file'> {
  if (light.spectra.length === 0) throw new UserError(`${light.name}: no daylight hours to weigh`);
  const poa = light.poaKwhM2 ?? insolationKwhM2(light.spectra);
  const wirings: SiteWiringResult[] = design.wirings.map((w, k) => {
    const d = runDesignSearch(request(design, w, light.spectra));
    const best = d.result.best;
    const refYield = d.objective.value(am15gOptima[k]!);
    return {
      wiring: wiringPrefix(w),
      gapsEv: [...best.gapsEv],
      // Yield-weighted efficiency Σ w·P_max / Σ w·P_in times the insolation Σ w·P_in.
      yieldKwhM2: best.value * poa,
      yieldEfficiency: best.value,
      am15gLoss: 1 - refYield / best.value,
    };
  });
  return { name: light.name, latDeg: light.latDeg, lonDeg: light.lonDeg, poaKwhM2: poa, wirings };
}

/** The AM1.5G-optimal gaps of each wiring of a design at its cell temperature (computed once per batch). */
export function am15gOptima(design: Design): number[][] {
  return design.wirings.map((w) => [...runDesignSearch(request(design, w, [{ spectrum: am15g(), weight: 1, tempK: design.tempK }])).result.best.gapsEv]);
}

/** The batch's question: the design asked under each site's light. */
export function siteQuestion(design: Design, lightOf: SiteLightSource, options: Record<string, string | number | boolean | null> = {}): SiteQuestion {
  let optima: number[][] | null = null;
  return {
    questionSha256: questionSha256(design.sha256, options),
    wirings: design.wirings.map(wiringPrefix),
    evaluate: async (path) => {
      optima ??= am15gOptima(design);
      return answerAtSite(design, await lightOf(path), optima);
    },
  };
}
