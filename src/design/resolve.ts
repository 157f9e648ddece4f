/**
 * From a schema-valid design file to the engine's inputs: light, subcell
 * constraints, a template stack per wiring, map pairs. Everything the schema
 * cannot say (impossible orderings, list lengths that depend on the number of
 * subcells, paths relative to the file) is checked here, and every error
 * names the field and its line.
 */
import { dirname, isAbsolute, resolve } from 'node:path';
import { ParameterError, UserError } from '../errors.js';
import { powerWeight } from '../light/ensemble-weights.js';
import { resolveSpectrum } from '../light/sources.js';
import { parseUnitDeclaration } from '../light/table-file.js';
import { listWeatherFiles } from '../light/weather/list.js';
import { noteInput } from '../io/inputs.js';
import { ereFromVocLoss } from '../junction/radiative.js';
import { familyFromEntry, gapAtTemperature, gapReach, getFamily, type AbsorberFamily } from '../materials/index.js';
import type { SubcellConstraint } from '../search/design-search.js';
import { isSeriesString, type Coupling, type StackSpec, type Wiring } from '../stack/model.js';
import { parseWiring } from '../stack/wiring-text.js';
import { designError, type DesignSource, type FieldPath } from './source.js';
import { perInterface, subcellAbsorptance } from './films.js';
import type { Design, DesignFile, DesignLight, DesignSites, DesignMapPair, DesignSubcell, DesignWiring, LabelledSpectrum, SpectrumEntry, SubcellEntry } from './types.js';

/** Defaults a design file may leave out. */
export const DESIGN_DEFAULTS = {
  spectrum: 'am1.5g',
  temperatureK: 300,
  spanEv: [0.5, 2.6] as [number, number],
  loss: 0.01,
  wirings: ['series', 'independent'],
} as const;

/** Most points along one map axis. */
export const MAX_MAP_AXIS_POINTS = 401;

type Located = Pick<DesignSource, 'path' | 'lineOf'>;

/** Re-raise a UserError from a lower layer as one located at a field of the design. */
/** Engine parameters named in engine messages, and what a design file says instead. */
const PARAMETER_FIELDS: Record<string, string> = {
  units: 'spectrum.units',
  suns: 'spectrum.suns',
  irradianceWm2: 'spectrum.irradiance',
  stepEv: 'map.step',
};

/**
 * An engine message reworded for a design file: parameters become design
 * fields (`fields` overrides the defaults), and a field that opens the message
 * is dropped because the location already names it.
 */
function designWording(err: UserError, fields: Record<string, string> = {}): string {
  if (!(err instanceof ParameterError)) return err.message;
  const names: Record<string, string> = { ...PARAMETER_FIELDS, ...fields };
  return err.messageWith((p) => names[p], { omitLeading: (p) => p in names });
}

function at<T>(src: Located, path: FieldPath, fn: () => T, fields?: Record<string, string>): T {
  try {
    return fn();
  } catch (err) {
    if (err instanceof UserError) throw designError(src, path, designWording(err, fields));
    throw err;
  }
}

const isBuiltinLight = (s: string) => /^(am1\.?5[gd]$|am0$|blackbody:|bb:|clearsky:)/i.test(s.trim());

function relativeTo(src: Located, p: string): string {
  return isAbsolute(p) ? p : resolve(dirname(src.path), p);
}

/**
 * The sites of `sites:`: one light source only (the other sections answer
 * under AM1.5G, the reference each site is compared with), every listed file
 * or folder present, folders expanded to their weather files.
 */
function resolveSites(src: Located, f: DesignFile): DesignSites | undefined {
  const s = f.sites;
  if (s === undefined) return undefined;
  const others = (['spectrum', 'ensemble', 'weather'] as const).filter((k) => f[k] !== undefined);
  if (others.length > 0) {
    throw designError(src, ['sites'], `give one light: spectrum, ensemble, weather or sites, not both sites and ${others.join(' and ')} (with sites the other sections answer under AM1.5G)`, true);
  }
  const tracking = s.tracking ?? 'none';
  if (tracking === 'single-axis' && s.tilt !== 0) throw designError(src, ['sites', 'tilt'], `single-axis tracking turns about a horizontal axis: give tilt 0 (azimuth is the axis azimuth), got ${JSON.stringify(s.tilt)}`);
  const files = s.files.flatMap((p, k) => at(src, ['sites', 'files', k], () => listWeatherFiles([relativeTo(src, p)])));
  // Inputs of the run from now on (read later, site by site): no output may replace one.
  for (const file of files) noteInput(file);
  return {
    files,
    plane: { tilt: s.tilt, azimuth: s.azimuth },
    model: {
      tracking,
      albedo: s.albedo,
      aod500: s.aod500,
      waterCm: s.water_cm,
      ozoneAtmCm: s.ozone_atm_cm,
      faiman: s.faiman ? { u0: s.faiman[0], u1: s.faiman[1] } : undefined,
    },
  };
}

async function resolveLight(src: Located, f: DesignFile, tempK: number, spanEv: [number, number]): Promise<{ light: DesignLight; spectra: LabelledSpectrum[] }> {
  if (f.weather !== undefined) {
    if (f.spectrum !== undefined || f.ensemble !== undefined) throw designError(src, ['weather'], 'give one light: spectrum, ensemble or weather', true);
    const w = f.weather;
    const { loadSiteYear } = await import('../light/site-year.js');
    const { ensembleSummary } = await import('../light/ensemble.js');
    const site = at(src, ['weather', 'file'], () =>
      loadSiteYear(relativeTo(src, w.file), {
        tiltDeg: w.tilt,
        azimuthDeg: w.azimuth,
        tracking: w.tracking ?? 'none',
        albedo: w.albedo,
        aod500: w.aod500,
        waterCm: w.water_cm,
        ozoneAtmCm: w.ozone_atm_cm,
        faiman: w.faiman ? { u0: w.faiman[0], u1: w.faiman[1] } : undefined,
      }),
    );
    const e = site.ensemble;
    const s = ensembleSummary(e, undefined, { lowestGapEv: spanEv[0] });
    const summaryLines = [
      `${site.site.name} (${site.site.latitudeDeg}°, ${site.site.longitudeDeg}°, ${site.site.elevationM} m), ${site.format.toUpperCase()} weather year: ${site.totals.usedHours} of ${site.totals.fileHours} hours used`,
      `annual plane-of-array insolation ${site.totals.poaKwhM2.toFixed(1)} kWh/m² (file: GHI ${site.totals.ghiKwhM2.toFixed(1)}, DNI ${site.totals.dniKwhM2.toFixed(1)}, DHI ${site.totals.dhiKwhM2.toFixed(1)} kWh/m²)`,
      `skipped: ${site.skipped.map((k) => `${k.count} h ${k.reason}`).join('; ') || 'none'}`,
      `defaults and estimates: ${site.defaultsUsed.join('; ')}`,
      ...site.assumptions,
      s.ape.weightedMeanEv === null ? `average photon energy: not available over ${s.ape.windowNm[0]}–${s.ape.windowNm[1]} nm` : `average photon energy ${s.ape.weightedMeanEv.toFixed(4)} eV (weighted mean, ${s.ape.windowNm[0]}–${s.ape.windowNm[1]} nm)`,
      `cell temperatures ${s.tempK.min.toFixed(1)}–${s.tempK.max.toFixed(1)} K; gaps of material-bound subcells are stated at 300 K and move with each hour's cell temperature`,
    ];
    const spectra = e.members.map((m) => ({ spectrum: m.spectrum, weight: m.weight, tempK: m.tempK, label: m.label }));
    return {
      light: { kind: 'ensemble', name: e.name, sha256: e.sha256, source: e.source, summaryLines, summary: s, warnings: s.warnings, request: w.file, site },
      spectra,
    };
  }
  if (f.ensemble !== undefined) {
    if (f.spectrum !== undefined) throw designError(src, ['ensemble'], 'give either spectrum or ensemble, not both', true);
    const path = relativeTo(src, f.ensemble);
    let mod: typeof import('../light/ensemble.js');
    try {
      mod = await import('../light/ensemble.js');
    } catch {
      throw designError(src, ['ensemble'], 'spectral ensembles are not available in this build of gapstack; use spectrum instead');
    }
    const e = at(src, ['ensemble'], () => mod.loadEnsemble(path, { defaultTempK: tempK }), { units: 'a "# units:" line in the ensemble file' });
    const s = at(src, ['ensemble'], () => mod.ensembleSummary(e, undefined, { lowestGapEv: spanEv[0] }));
    const unit = s.weightUnit === 'hours' ? 'h' : '';
    const summaryLines = [
      `${s.count} spectra, total weight ${s.totalWeight.toFixed(3)}${unit ? ` ${unit}` : ''} (${s.weightUnit === 'hours' ? 'hours' : 'relative shares'})`,
      `irradiance ${s.irradianceWm2.min.toFixed(1)}–${s.irradianceWm2.max.toFixed(1)} W/m² (weighted median ${s.irradianceWm2.median.toFixed(1)}, weighted mean ${s.weightedMeanIrradianceWm2.toFixed(1)})`,
      s.ape.weightedMeanEv === null ? `average photon energy: not available over ${s.ape.windowNm[0]}–${s.ape.windowNm[1]} nm` : `average photon energy ${s.ape.weightedMeanEv.toFixed(4)} eV (weighted mean, ${s.ape.windowNm[0]}–${s.ape.windowNm[1]} nm)`,
      `cell temperatures ${s.tempK.min}–${s.tempK.max} K`,
    ];
    // Σ w·P_max / Σ w·P_in with shares entering as s/P_in (docs/PHYSICS.md §10).
    const spectra = e.members.map((m) => ({ spectrum: m.spectrum, weight: powerWeight(m.weight, e.weightUnit, m.spectrum), tempK: m.tempK, label: m.label }));
    return {
      light: { kind: 'ensemble', name: e.name, sha256: e.sha256, source: e.source, summaryLines, summary: s, warnings: s.warnings, request: f.ensemble },
      spectra,
    };
  }
  const entry: SpectrumEntry = typeof f.spectrum === 'string' ? { source: f.spectrum } : f.spectrum ?? { source: DESIGN_DEFAULTS.spectrum };
  const base: FieldPath = typeof f.spectrum === 'object' ? ['spectrum', 'source'] : ['spectrum'];
  if (entry.suns !== undefined && entry.irradiance !== undefined) throw designError(src, ['spectrum', 'irradiance'], 'give either suns or irradiance, not both', true);
  const units = entry.units === undefined ? undefined : at(src, ['spectrum', 'units'], () => parseUnitDeclaration(entry.units as string));
  const name = isBuiltinLight(entry.source) ? entry.source : relativeTo(src, entry.source);
  const spectrum = at(src, base, () => resolveSpectrum(name, { suns: entry.suns, irradianceWm2: entry.irradiance, units }));
  return { light: { kind: 'spectrum', spectrum, request: entry.source }, spectra: [{ spectrum, weight: 1, tempK, label: spectrum.name }] };
}

/** Gap bounds [eV] a constraint allows at a cell temperature (family windows shifted by dE_g/dT). */
export function constraintRangeEv(c: SubcellConstraint, tempK: number, spanEv: [number, number]): [number, number] {
  switch (c.kind) {
    case 'free':
      return spanEv;
    case 'range':
      return [c.loEv, c.hiEv];
    case 'fixed':
      return [c.gapEv, c.gapEv];
    case 'material': {
      const f = c.family;
      if (f.kind === 'fixed') {
        const g = gapAtTemperature(f, f.gapSpanEv[0], tempK);
        return [g, g];
      }
      const r = gapReach(f);
      const [lo, hi] = c.fullRange ? [r.minEv, r.maxEv] : f.window.gapEv;
      return [gapAtTemperature(f, lo, tempK), gapAtTemperature(f, hi, tempK)];
    }
  }
}

const KIND_KEYS = ['free', 'range', 'gap', 'material'] as const;

function resolveSubcell(src: Located, e: SubcellEntry, i: number, n: number, tempK: number, userFamilies: readonly AbsorberFamily[]): DesignSubcell {
  const here: FieldPath = ['subcells', i];
  const kinds = KIND_KEYS.filter((k) => e[k] !== undefined);
  if (kinds.length > 1) throw designError(src, [...here, kinds[1]], `give one of free, range, gap or material, not ${kinds.join(' and ')}`, true);
  if (e.full_range !== undefined && e.material === undefined) throw designError(src, [...here, 'full_range'], 'full_range applies only to a subcell bound to a material', true);
  if (e.ere !== undefined && e.voc_loss !== undefined) throw designError(src, [...here, 'voc_loss'], 'give either ere or voc_loss, not both', true);
  if (e.absorptance !== undefined && i !== 0) throw designError(src, [...here, 'absorptance'], 'a constant absorptance below 1 (or best) is offered for the top cell (subcells[0]) only', true);
  let constraint: SubcellConstraint = { kind: 'free' };
  if (e.range) {
    const [lo, hi] = e.range;
    if (!(lo < hi)) throw designError(src, [...here, 'range'], `low end must be below high end, got [${lo}, ${hi}]`);
    constraint = { kind: 'range', loEv: lo, hiEv: hi };
  } else if (e.gap !== undefined) {
    constraint = { kind: 'fixed', gapEv: e.gap };
  } else if (e.material !== undefined) {
    const family: AbsorberFamily = at(src, [...here, 'material'], () => getFamily(e.material as string, userFamilies));
    constraint = { kind: 'material', family, fullRange: Boolean(e.full_range) };
  }
  const ere = e.voc_loss !== undefined ? ereFromVocLoss(e.voc_loss, tempK) : e.ere ?? 1;
  const labelled = e.label !== undefined;
  const refractiveIndex = e.refractive_index ?? (constraint.kind === 'material' ? constraint.family.refractiveIndex : undefined);
  const model = subcellAbsorptance(src, e, i, n, refractiveIndex);
  return {
    index: i + 1,
    label: e.label ?? `subcell ${i + 1}`,
    labelled,
    constraint,
    ere,
    vocLossV: e.voc_loss,
    absorptance: typeof e.absorptance === 'number' ? e.absorptance : 1,
    model,
    rsOhmCm2: e.rs_ohm_cm2 ?? 0,
    ...(refractiveIndex !== undefined ? { refractiveIndex } : {}),
  };
}

/** The field that states a subcell's constraint, for messages. */
function constraintField(e: SubcellEntry, i: number): FieldPath {
  const k = KIND_KEYS.find((key) => e[key] !== undefined);
  return k ? ['subcells', i, k] : ['subcells', i];
}

function checkFeasible(src: Located, f: DesignFile, cells: DesignSubcell[], tempK: number, span: [number, number]): void {
  const ranges = cells.map((c) => constraintRangeEv(c.constraint, tempK, span));
  ranges.forEach(([lo, hi], i) => {
    const field = constraintField(f.subcells[i], i);
    const c = cells[i].constraint;
    if (lo === hi) {
      if (lo < span[0] || lo > span[1]) throw designError(src, field, `fixed gap ${lo.toFixed(4)} eV lies outside the search span ${span[0]}–${span[1]} eV (search.span)`);
    } else if (hi < span[0] || lo > span[1]) {
      const what = c.kind === 'material' ? `the allowed gaps of ${c.family.name} (${lo.toFixed(3)}–${hi.toFixed(3)} eV at ${tempK} K)` : `the range ${lo}–${hi} eV`;
      throw designError(src, field, `${what} lie outside the search span ${span[0]}–${span[1]} eV (search.span)`);
    }
  });
  const clipped = ranges.map(([lo, hi]) => [Math.max(lo, span[0]), Math.min(hi, span[1])] as const);
  for (let j = 1; j < cells.length; j++) {
    for (let i = 0; i < j; i++) {
      if (!(clipped[j][0] < clipped[i][1])) {
        const fixedBoth = clipped[j][0] === clipped[j][1] && clipped[i][0] === clipped[i][1];
        const msg = fixedBoth
          ? `fixed gaps must descend from the top: subcell ${j + 1} (${clipped[j][0].toFixed(4)} eV) is not below subcell ${i + 1} (${clipped[i][1].toFixed(4)} eV)`
          : `subcell ${j + 1} (≥ ${clipped[j][0].toFixed(4)} eV) cannot lie below subcell ${i + 1} (≤ ${clipped[i][1].toFixed(4)} eV): gaps must descend from the top`;
        throw designError(src, constraintField(f.subcells[j], j), msg);
      }
    }
  }
}

function resolveCoupling(src: Located, lc: NonNullable<DesignFile['optics']>['lc'], n: number, path: FieldPath = ['optics', 'lc']): Coupling {
  if (lc === undefined || lc === 'none') return { model: 'none' };
  if (typeof lc === 'string') {
    if (n < 2) throw designError(src, path, 'luminescent coupling needs at least 2 subcells');
    // Without an index, each upper film couples with its own (refractive_index, its material's, else 3.5).
    if (!lc.includes(':')) return { model: 'radiative' };
    const idx = Number(lc.split(':')[1]);
    if (!(idx >= 1 && idx <= 10)) throw designError(src, path, `radiative coupling needs a refractive index within 1–10, got ${idx}`);
    return { model: 'radiative', refractiveIndex: idx };
  }
  if (n < 2) throw designError(src, path, 'luminescent coupling needs at least 2 subcells');
  const eta = typeof lc === 'number' ? Array.from({ length: n - 1 }, () => lc) : lc;
  if (eta.length !== n - 1) throw designError(src, path, n === 2 ? `takes one efficiency (there is one interface), got ${eta.length}` : `takes one efficiency or ${n - 1} (one per interface), got ${eta.length}`);
  return { model: 'empirical', eta: [...eta] };
}

const WIRING_ALIASES: Record<string, string> = { '2t': 'series', '4t': 'independent' };

function resolveWiringAt(src: Located, text: string, path: FieldPath, n: number): Wiring {
  return at(src, path, () => parseWiring(WIRING_ALIASES[text] ?? text, n, 'wiring'));
}

function resolvePairs(src: Located, f: DesignFile, cells: DesignSubcell[], tempK: number, span: [number, number]): DesignMapPair[] {
  const n = cells.length;
  if (n < 2) {
    if (f.map?.pairs !== undefined) throw designError(src, ['map', 'pairs'], 'a map needs at least 2 subcells', true);
    return [];
  }
  const entries = f.map?.pairs ?? (n === 2 ? [{ axes: [1, 2] as [number, number] }] : Array.from({ length: n - 1 }, (_, i) => ({ axes: [i + 1, i + 2] as [number, number] })));
  const seen = new Set<string>();
  return entries.map((p, k) => {
    const here: FieldPath = ['map', 'pairs', k];
    const [i, j] = p.axes;
    if (!(i >= 1 && j <= n && i < j)) throw designError(src, [...here, 'axes'], `takes two subcells [i, j] with 1 ≤ i < j ≤ ${n} (upper first), got [${i}, ${j}]`);
    if (seen.has(`${i},${j}`)) throw designError(src, [...here, 'axes'], `the pair [${i}, ${j}] is mapped twice`);
    seen.add(`${i},${j}`);
    const checkAxis = (axis: 'x' | 'y', cell: number, r: [number, number] | undefined) => {
      if (!r) return;
      if (!(r[0] < r[1])) throw designError(src, [...here, axis], `low end must be below high end, got [${r[0]}, ${r[1]}]`);
      const [lo, hi] = constraintRangeEv(cells[cell].constraint, tempK, span);
      if (lo === hi && (lo < r[0] || lo > r[1])) throw designError(src, [...here, axis], `subcell ${cell + 1} is fixed at ${lo.toFixed(4)} eV, outside this axis range ${r[0]}–${r[1]} eV`);
      const step = f.map?.step;
      if (step !== undefined && Math.floor((r[1] - r[0]) / step + 1e-9) + 1 > MAX_MAP_AXIS_POINTS) {
        throw designError(src, ['map', 'step'], `${Math.floor((r[1] - r[0]) / step + 1e-9) + 1} points along ${axis} of pair [${i}, ${j}]; at most ${MAX_MAP_AXIS_POINTS}: use a coarser step`);
      }
    };
    checkAxis('x', i - 1, p.x);
    checkAxis('y', j - 1, p.y);
    if (p.x && p.y && !(p.y[0] < p.x[1])) throw designError(src, [...here, 'y'], `the lower subcell's axis (from ${p.y[0]} eV) must reach below the upper's (to ${p.x[1]} eV)`);
    return { xCell: i - 1, yCell: j - 1, xRangeEv: p.x, yRangeEv: p.y };
  });
}

/** Resolve a schema-valid design file into a Design. */
export async function resolveDesign(src: DesignSource, f: DesignFile): Promise<Design> {
  const tempK = f.temperature ?? DESIGN_DEFAULTS.temperatureK;
  const span: [number, number] = f.search?.span ? [f.search.span[0], f.search.span[1]] : [...DESIGN_DEFAULTS.spanEv];
  if (!(span[0] < span[1])) throw designError(src, ['search', 'span'], `low end must be below high end, got [${span[0]}, ${span[1]}]`);
  // mathjs loads only when a family gives its gap as a formula.
  const formulas = (f.materials ?? []).some((m) => m.gap_formula !== undefined) ? await import('../materials/formula.js') : undefined;
  const userFamilies = (f.materials ?? []).map((m, k) => {
    try {
      const coeffs = m.gap_formula !== undefined && formulas ? formulas.polynomialFromFormula(m.gap_formula, 'gap_formula') : undefined;
      return familyFromEntry(m, `materials[${k}]`, coeffs);
    } catch (err) {
      if (err instanceof UserError && err.message.startsWith('gap_formula: ')) throw designError(src, ['materials', k, 'gap_formula'], err.message.slice('gap_formula: '.length));
      if (err instanceof UserError) throw designError(src, ['materials', k], err.message.replace(/^materials\[\d+\]: /, ''));
      throw err;
    }
  });
  const ids = new Set<string>();
  userFamilies.forEach((fam, k) => {
    if (ids.has(fam.id)) throw designError(src, ['materials', k, 'id'], `"${fam.id}" is defined twice`);
    ids.add(fam.id);
  });
  const cells = f.subcells.map((e, i) => resolveSubcell(src, e, i, f.subcells.length, tempK, userFamilies));
  checkFeasible(src, f, cells, tempK, span);
  const n = cells.length;
  const o = f.optics ?? {};
  const reflectance = o.reflectance ?? 0;
  const interlayer = perInterface(src, ['optics', 'interlayer_transmittance'], o.interlayer_transmittance, n, 1);
  const coupling = resolveCoupling(src, o.lc, n);
  const entries = (f.wirings ?? (n === 1 ? ['series'] : [...DESIGN_DEFAULTS.wirings])).map((w) => (typeof w === 'string' ? { wiring: w } : w));
  const bestTop = f.subcells[0]?.absorptance === 'best';
  if (bestTop && n < 2) throw designError(src, ['subcells', 0, 'absorptance'], 'best thins the top cell of a stack of 2 or more subcells', true);
  const wirings: DesignWiring[] = [];
  entries.forEach((entry, k) => {
    const text = entry.wiring.toLowerCase();
    const wpath: FieldPath = typeof f.wirings?.[k] === 'object' ? ['wirings', k, 'wiring'] : ['wirings', k];
    const wiring = resolveWiringAt(src, text, wpath, n);
    const key = WIRING_ALIASES[text] ?? text;
    if (wirings.some((w) => w.key === key)) throw designError(src, wpath, `"${text}" is listed twice`);
    // Per-wiring overrides: transparent contacts multiply the interlayer transmittance; own coupling and resistance.
    const contacts = perInterface(src, ['wirings', k, 'contact_transmittance'], entry.contact_transmittance, n, 1);
    const rs = entry.rs_ohm_cm2 ?? cells.map((c) => c.rsOhmCm2);
    if (rs.length !== n) throw designError(src, ['wirings', k, 'rs_ohm_cm2'], `takes one resistance per subcell (${n}), got ${rs.length}`);
    const series = isSeriesString(wiring);
    const template: StackSpec = {
      subcells: cells.map((c, i) => ({
        gapEv: 2.5 - 0.3 * i,
        ere: c.ere,
        absorptance: c.model,
        ...(rs[i] > 0 ? { rsOhmCm2: rs[i] } : {}),
        ...(c.refractiveIndex !== undefined ? { refractiveIndex: c.refractiveIndex } : {}),
        // Under an ensemble, a material-bound gap is stated at 300 K and moves with each member's cell temperature (docs/PHYSICS.md §10).
        ...((f.ensemble !== undefined || f.weather !== undefined || f.sites !== undefined) && c.constraint.kind === 'material' ? { dEgDtEvPerK: c.constraint.family.dEgDtEvPerK } : {}),
      })),
      tempK,
      frontReflectance: reflectance,
      interlayerTransmittance: interlayer.map((t, i) => t * contacts[i]),
      coupling: entry.lc !== undefined ? resolveCoupling(src, entry.lc, n, ['wirings', k, 'lc']) : coupling,
      wiring,
    };
    // A thinned top cell helps only a series string (current matching); other wirings keep it fully absorbing.
    wirings.push({ key, slug: key.replace(/:/g, '-'), wiring, template, freeTopAbsorptance: bestTop && series });
  });
  const sites = resolveSites(src, f);
  const { light, spectra } = await resolveLight(src, f, tempK, span);
  const reference = spectra.reduce((best, s) => (s.weight * s.spectrum.pinWm2 > best.weight * best.spectrum.pinWm2 ? s : best), spectra[0]);
  return {
    path: src.path,
    sha256: src.sha256,
    file: f,
    name: f.name,
    description: f.description ?? '',
    tempK,
    light,
    spectra,
    reference,
    subcells: cells,
    wirings,
    spanEv: span,
    searchStepEv: f.search?.step,
    loss: f.tolerance?.loss ?? DESIGN_DEFAULTS.loss,
    mapStepEv: f.map?.step,
    pairs: resolvePairs(src, f, cells, tempK, span),
    ...(sites ? { sites } : {}),
  };
}
