/**
 * gapstack as a library: multijunction (tandem) solar-cell stacks in the
 * detailed-balance limit, for scripts, notebooks and web pages.
 *
 * Engine units throughout: photon energy [eV], wavelength [nm], current
 * density [A/m²], power and irradiance [W/m²], temperature [K]; efficiencies
 * are fractions [-]. `toMaCm2` converts a current density for people.
 *
 * Every number is a theoretical limit under the stated assumptions (detailed
 * balance after Shockley & Queisser, J. Appl. Phys. 32 (1961) 510; see
 * docs/PHYSICS.md and `CAUTION`). It is no substitute for certified
 * measurement, engineering sign-off, local codes or licensed practice.
 *
 * Mistakes in what a caller passes throw `ParameterError` (a `UserError`)
 * naming the parameter and what it allows; file problems throw `UserError`
 * with `file:line`.
 *
 * @example
 * ```ts
 * import { am15g, evaluateStack, idealStack, seriesWiring } from 'gapstack';
 * const r = evaluateStack(idealStack([1.729, 1.12], seriesWiring(2)), am15g());
 * console.log(r.efficiency); // 0.4504… (docs/PHYSICS.md §5)
 * ```
 *
 * @packageDocumentation
 */

// ── Errors ────────────────────────────────────────────────────────────────
export { UserError, fileError } from './errors.js';
export { ParameterError } from './errors.js';

// ── Constants and units ───────────────────────────────────────────────────
export {
  BOLTZMANN_EV_K,
  ELEMENTARY_CHARGE_C,
  HC_EV_NM,
  energyEvFromNm,
  thermalVoltageV,
  toMaCm2,
} from './physics/constants.js';

// ── Light: built-in, blackbody, files, ensembles ──────────────────────────
export type { Spectrum, SpectrumInput } from './light/spectrum.js';
export {
  averagePhotonEnergyEv,
  makeSpectrum,
  photonsAboveEv,
  scaleSpectrum,
  stepJscAm2,
  totalPhotonFlux,
} from './light/spectrum.js';
export type { LightOptions } from './light/sources.js';
export { am0, am15d, am15g, resolveSpectrum } from './light/sources.js';
export type { BlackbodyOptions } from './light/blackbody.js';
export { blackbodySpectrum } from './light/blackbody.js';
export type { TableUnits } from './light/table-file.js';
export { parseUnitDeclaration, readSpectrumFile, spectrumFromText } from './light/table-file.js';
export type { LabelledSpectrum, WeightedSpectrum } from './light/weighted-spectrum.js';
export type { Ensemble, EnsembleMember, EnsembleSummary, LoadEnsembleOptions } from './light/ensemble.js';
export { ensembleSummary, loadEnsemble } from './light/ensemble.js';

// ── Site light: sun position, clear-sky spectra, weather files, the hourly year ──
export type { Observer, SunPosition } from './light/sun-position.js';
export { airMassKastenYoung, angleOfIncidenceDeg, sunPosition } from './light/sun-position.js';
export type { Plane, Spectrl2Inputs, Spectrl2Result } from './light/spectrl2.js';
export { SPECTRL2_RURAL, bandIntegralWm2, earthSunFactor, spectrl2 } from './light/spectrl2.js';
export { clearSkySpectrum, parseClearSkyRequest } from './light/clear-sky-source.js';
export type { FaimanCoefficients } from './light/atmosphere.js';
export { FAIMAN_DEFAULT, faimanCellTempC, precipitableWaterFromDewPointCm, standardPressureHpa } from './light/atmosphere.js';
export type { WeatherFile, WeatherHour, WeatherSite } from './light/weather/index.js';
export { readEpw, readTmy3, readWeatherFile } from './light/weather/index.js';
export type { SiteHour, SiteLightOptions, SiteYear, SkippedHours, Tracking } from './light/site-year.js';
export { SITE_DEFAULTS, loadSiteYear, siteYearFromWeather } from './light/site-year.js';

// ── One junction ──────────────────────────────────────────────────────────
export { ereFromVocLoss, j0RadStepAm2 } from './junction/radiative.js';

// ── A stack: model, evaluation, yield ────────────────────────────────────
export type { AbsorptanceModel, AlphaModel, Coupling, SpectralValue, StackSpec, SubcellSpec, Wiring } from './stack/model.js';
export { GAP_REFERENCE_TEMPERATURE_K, gapAtCellTemperatureEv, idealStack, independentWiring, seriesWiring, stackAtCellTemperature } from './stack/model.js';
export { parseWiring } from './stack/wiring-text.js';
export type { StackResult, SubcellResult } from './stack/evaluate.js';
export { evaluateStack, stackWarnings, validateStack } from './stack/evaluate.js';
export type { SpectrumYield, YieldResult } from './stack/yield.js';
export { yieldForStack } from './stack/yield.js';
export type { GapObjective } from './stack/gap-objective.js';
export type { ObjectiveOptions } from './stack/objectives.js';
export { buildObjective } from './stack/objectives.js';

// ── Search: global optimum, tolerance, maps, design questions ─────────────
export type { Basin, SearchProblem, SearchResult, ToleranceInterval, ToleranceRegion } from './search/optimize.js';
export { searchGaps } from './search/optimize.js';
export type { GapMap, MapRequest } from './search/map.js';
export { computeMap, mapToCsv, uniformAxis } from './search/map.js';
export type { CompositionNote, DesignSearchRequest, DesignSearchResult, SubcellConstraint } from './search/design-search.js';
export { runDesignSearch } from './search/design-search.js';

// ── Materials: composition ↔ gap ──────────────────────────────────────────
export type { AbsorberFamily, GapDescription, GapReach } from './materials/index.js';
export {
  REFERENCE_TEMPERATURE_K,
  compositionsForGap,
  describeGap,
  gapAtReference,
  gapAtTemperature,
  gapFromComposition,
  gapReach,
  getFamily,
  listFamilies,
} from './materials/index.js';

// ── Reports ───────────────────────────────────────────────────────────────
export { CAUTION } from './report/assumptions.js';
export { buildReportFromFile, buildReportFromText, type ReportOutput } from './sites/report-from-design.js';
