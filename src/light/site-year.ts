/**
 * The hourly year of a site as a spectral ensemble (docs/PHYSICS.md §10): for
 * every daylight hour of a weather file, the sun at mid-interval (NREL SPA),
 * SPECTRL2 clear-sky shapes of direct and diffuse light scaled to the file's
 * DNI and DHI, transposed to the module plane (Hay–Davies, isotropic ground),
 * a Faiman cell temperature, and a weight of one hour.
 *
 * The scaling is the usual all-sky approximation (common practice): clouds
 * change the amount of direct and diffuse light, not their spectral shape here,
 * although real clouds blue-shift diffuse light. Every output carries that.
 */
import { ParameterError, UserError, ref, says } from '../errors.js';
import { FAIMAN_DEFAULT, faimanCellTempC, precipitableWaterFromDewPointCm, standardPressureHpa, type FaimanCoefficients } from './atmosphere.js';
import type { Ensemble, EnsembleMember } from './ensemble.js';
import { sha256Hex, sha256OfTable, spectrumOfArrays } from './spectrum.js';
import { bandIntegralWm2, planeParts, SPECTRL2_RURAL, spectrl2 } from './spectrl2.js';
import { airMassKastenYoung, sunPosition } from './sun-position.js';
import { readWeatherFile, type WeatherFile, type WeatherSite } from './weather/index.js';

export type Tracking = 'none' | 'single-axis';

export interface SiteLightOptions {
  /** Plane tilt from horizontal [°] (fixed plane); must be 0 with single-axis tracking (horizontal axis). */
  tiltDeg: number;
  /** Azimuth the plane faces, east of north [°] (180 = south); with tracking, the azimuth of the axis. */
  azimuthDeg: number;
  tracking: Tracking;
  /** Largest tracker rotation [°] (default 60, common practice for single-axis trackers). */
  maxRotationDeg?: number;
  /** Ground albedo [-], overriding the file's. */
  albedo?: number;
  /** Ozone column [atm-cm] (default 0.3; weather files carry none). */
  ozoneAtmCm?: number;
  /** Aerosol optical depth at 500 nm, overriding the file's. */
  aod500?: number;
  /** Precipitable water [cm], overriding the file's and the dew-point estimate. */
  waterCm?: number;
  faiman?: FaimanCoefficients;
  /** TT − UT1 [s] for the sun position (default 69). */
  deltaTSeconds?: number;
}

/** Defaults used when the file and the options say nothing (stated in every output). */
export const SITE_DEFAULTS = {
  ozoneAtmCm: 0.3,
  aod500: 0.1,
  albedo: 0.2,
  waterCm: 1.42,
  maxRotationDeg: 60,
  /** Broadband aerosol optical depth taken as τ at 700 nm, then carried to 500 nm with the rural Ångström exponent (from memory: a common reading of broadband AOD). */
  broadbandAodWavelengthNm: 700,
} as const;

export interface SiteHour {
  label: string;
  line: number;
  month: number;
  /** Mid-interval instant [ms since the Unix epoch, UTC]. */
  midUtcMs: number;
  apparentZenithDeg: number;
  aoiDeg: number;
  ghiWm2: number;
  dniWm2: number;
  dhiWm2: number;
  /** Broadband plane-of-array irradiance of the hour's spectrum, 300–4000 nm [W/m²]. */
  poaWm2: number;
  airTempC: number;
  windMs: number;
  cellTempK: number;
  waterCm: number;
  aod500: number;
}

export interface SkippedHours {
  reason: string;
  count: number;
  /** GHI the file records in these hours [kWh/m²]. */
  ghiKwhM2: number;
  /** Line of the first such record. */
  firstLine: number;
}

export interface SiteYear {
  ensemble: Ensemble;
  site: WeatherSite;
  format: WeatherFile['format'];
  /** Hours used, parallel to ensemble.members. */
  hours: SiteHour[];
  totals: {
    fileHours: number;
    usedHours: number;
    /** Sums over all the file's hours (missing values left out) [kWh/m²]. */
    ghiKwhM2: number;
    dniKwhM2: number;
    dhiKwhM2: number;
    /** Annual plane-of-array insolation of the ensemble [kWh/m²]. */
    poaKwhM2: number;
  };
  monthly: { month: number; hours: number; poaKwhM2: number }[];
  skipped: SkippedHours[];
  /** Inputs taken from defaults or estimates, with how many hours each. */
  defaultsUsed: string[];
  assumptions: string[];
}

const RAD = Math.PI / 180;
const DEG = 180 / Math.PI;

/** Unit normal of the receiving plane (x east, y north, z up) and its tilt [°]. */
function planeNormal(o: SiteLightOptions, sun: [number, number, number]): { n: [number, number, number]; tiltDeg: number } {
  if (o.tracking === 'single-axis') {
    // Horizontal axis along azimuth γ_a; ideal rotation R = atan2(s·p, s·z) about it, p the horizontal
    // unit vector across the axis (true tracking, no backtracking: one row, no row-to-row shade).
    const ga = o.azimuthDeg * RAD;
    const p: [number, number, number] = [Math.sin(ga + Math.PI / 2), Math.cos(ga + Math.PI / 2), 0];
    const lim = (o.maxRotationDeg ?? SITE_DEFAULTS.maxRotationDeg) * RAD;
    const r = Math.max(-lim, Math.min(lim, Math.atan2(sun[0] * p[0] + sun[1] * p[1], sun[2])));
    return { n: [Math.sin(r) * p[0], Math.sin(r) * p[1], Math.cos(r)], tiltDeg: Math.abs(r) * DEG };
  }
  const b = o.tiltDeg * RAD;
  const g = o.azimuthDeg * RAD;
  return { n: [Math.sin(b) * Math.sin(g), Math.sin(b) * Math.cos(g), Math.cos(b)], tiltDeg: o.tiltDeg };
}

function checkOptions(o: SiteLightOptions): void {
  const bad = (parameter: string, unit: string, x: number | undefined, lo: number, hi: number) => {
    if (x !== undefined && !(Number.isFinite(x) && x >= lo && x <= hi)) throw new ParameterError(parameter, `${lo}–${hi}${unit}`, says`${ref(parameter)} must be within ${lo}–${hi}${unit}, got ${x}`);
  };
  bad('tiltDeg', ' °', o.tiltDeg, 0, 90);
  bad('azimuthDeg', ' ° east of north', o.azimuthDeg, 0, 360);
  bad('albedo', '', o.albedo, 0, 1);
  bad('ozoneAtmCm', ' atm-cm', o.ozoneAtmCm, 0, 1);
  bad('aod500', '', o.aod500, 0, 5);
  bad('waterCm', ' cm', o.waterCm, 0, 10);
  bad('maxRotationDeg', ' °', o.maxRotationDeg, 0, 90);
  if (o.faiman) {
    bad('faiman', ' W/m²/K for U0', o.faiman.u0, 1, 200);
    bad('faiman', ' W·s/m³/K for U1', o.faiman.u1, 0, 100);
  }
  if (o.tracking === 'single-axis' && o.tiltDeg !== 0) {
    throw new ParameterError('tiltDeg', '0 with single-axis tracking', says`single-axis tracking here turns about a horizontal axis: give ${ref('tiltDeg')} 0 (the axis azimuth is ${ref('azimuthDeg')})`);
  }
}

/**
 * The assumptions of the hourly model that hold at every site (time stamps,
 * spectra, plane of array, cell temperature, weights), as every output states
 * them; the weather file and the plane are stated beside them.
 */
export function hourlyModelAssumptions(faiman: FaimanCoefficients = FAIMAN_DEFAULT): string[] {
  return [
    'time stamps read as hour-ending local standard time; sun (NREL SPA) at mid-interval; hours with the sun below the horizon there are skipped',
    'spectra: SPECTRL2 clear-sky shapes (rural aerosol, 300–4000 nm) with direct scaled to the file\'s DNI and diffuse to its DHI (all-sky approximation: clouds change amounts, not shapes; real clouds blue-shift diffuse light); the file\'s broadband irradiance is placed in 300–4000 nm',
    'plane of array: beam by the angle of incidence, sky diffuse by Hay & Davies (1980), ground isotropic',
    `cell temperature: Faiman (Prog. Photovolt. 16 (2008) 307), T_c = T_air + G_poa/(U0 + U1·v), U0 ${faiman.u0} W/m²/K, U1 ${faiman.u1} W·s/m³/K`,
    'weight: one hour per used hour (Σ w·P is energy in Wh/m²)',
  ];
}

/** Read a weather file and build its hourly ensemble (see the module comment). */
export function loadSiteYear(path: string, o: SiteLightOptions): SiteYear {
  return siteYearFromWeather(readWeatherFile(path), o);
}

/** The hourly ensemble of weather already read. */
export function siteYearFromWeather(w: WeatherFile, o: SiteLightOptions): SiteYear {
  checkOptions(o);
  const faiman = o.faiman ?? FAIMAN_DEFAULT;
  const ozone = o.ozoneAtmCm ?? SITE_DEFAULTS.ozoneAtmCm;
  const skipped = new Map<string, SkippedHours>();
  const skip = (reason: string, line: number, ghi: number) => {
    const s = skipped.get(reason) ?? { reason, count: 0, ghiKwhM2: 0, firstLine: line };
    s.count++;
    if (Number.isFinite(ghi) && ghi > 0) s.ghiKwhM2 += ghi / 1000;
    skipped.set(reason, s);
  };
  const used = { waterFromDew: 0, waterDefault: 0, aodFromFile: 0, aodDefault: 0, pressureStandard: 0, albedoDefault: 0, beamDropped: 0 };
  const members: EnsembleMember[] = [];
  const hours: SiteHour[] = [];
  const totals = { fileHours: w.hours.length, usedHours: 0, ghiKwhM2: 0, dniKwhM2: 0, dhiKwhM2: 0, poaKwhM2: 0 };
  const monthly = Array.from({ length: 12 }, (_, k) => ({ month: k + 1, hours: 0, poaKwhM2: 0 }));
  const observer = { latitudeDeg: w.site.latitudeDeg, longitudeDeg: w.site.longitudeDeg, elevationM: w.site.elevationM, pressureHpa: 1013.25, airTempC: 12 };
  const sitePressure = standardPressureHpa(w.site.elevationM);
  let sharedGrid: Float64Array | undefined;

  for (const h of w.hours) {
    if (Number.isFinite(h.ghiWm2)) totals.ghiKwhM2 += h.ghiWm2 / 1000;
    if (Number.isFinite(h.dniWm2)) totals.dniKwhM2 += h.dniWm2 / 1000;
    if (Number.isFinite(h.dhiWm2)) totals.dhiKwhM2 += h.dhiWm2 / 1000;
    if (!Number.isFinite(h.dniWm2) || !Number.isFinite(h.dhiWm2)) {
      skip('DNI or DHI missing in the file', h.line, h.ghiWm2);
      continue;
    }
    if (h.dniWm2 <= 0 && h.dhiWm2 <= 0) {
      skip('no irradiance recorded (night)', h.line, h.ghiWm2);
      continue;
    }
    const pressureHpa = Number.isFinite(h.pressureHpa) && h.pressureHpa > 300 ? h.pressureHpa : sitePressure;
    const midUtcMs = h.endUtcMs - 1_800_000;
    const sun = sunPosition(midUtcMs, { ...observer, pressureHpa, airTempC: Number.isFinite(h.airTempC) ? h.airTempC : 12 }, o.deltaTSeconds);
    if (!(sun.apparentZenithDeg < 90)) {
      skip('sun below the horizon at mid-hour (light at dawn or dusk)', h.line, h.ghiWm2);
      continue;
    }
    if (!Number.isFinite(h.airTempC) || !Number.isFinite(h.windMs)) {
      skip('air temperature or wind missing (no cell temperature)', h.line, h.ghiWm2);
      continue;
    }
    const tally = { waterFromDew: 0, waterDefault: 0, aodFromFile: 0, aodDefault: 0, pressureStandard: 0, albedoDefault: 0, beamDropped: 0 };
    if (!(Number.isFinite(h.pressureHpa) && h.pressureHpa > 300)) tally.pressureStandard++;

    let waterCm = o.waterCm ?? h.waterCm;
    if (!(waterCm >= 0)) {
      if (Number.isFinite(h.dewPointC)) {
        waterCm = precipitableWaterFromDewPointCm(h.airTempC, h.dewPointC);
        tally.waterFromDew++;
      } else {
        waterCm = SITE_DEFAULTS.waterCm;
        tally.waterDefault++;
      }
    }
    let aod500 = o.aod500;
    if (aod500 === undefined) {
      if (h.aodBroadband > 0) {
        aod500 = h.aodBroadband * (SITE_DEFAULTS.broadbandAodWavelengthNm / 500) ** SPECTRL2_RURAL.alpha;
        tally.aodFromFile++;
      } else {
        aod500 = SITE_DEFAULTS.aod500;
        tally.aodDefault++;
      }
    }
    let albedo = o.albedo ?? h.albedo;
    if (!(albedo >= 0 && albedo <= 1)) {
      albedo = SITE_DEFAULTS.albedo;
      tally.albedoDefault++;
    }

    const z = sun.apparentZenithDeg * RAD;
    const a = sun.azimuthDeg * RAD;
    const s: [number, number, number] = [Math.sin(z) * Math.sin(a), Math.sin(z) * Math.cos(a), Math.cos(z)];
    const { n, tiltDeg } = planeNormal(o, s);
    const cosAoiRaw = s[0] * n[0] + s[1] * n[1] + s[2] * n[2];
    const aoiDeg = Math.acos(Math.max(-1, Math.min(1, cosAoiRaw))) * DEG;
    const cs = spectrl2(
      {
        zenithDeg: sun.apparentZenithDeg,
        // Kasten–Young's fit dips to 0.9997 with the sun overhead (tropics); SPECTRL2 takes air mass from 1.
        airMass: Math.max(1, airMassKastenYoung(sun.apparentZenithDeg)),
        pressurePa: pressureHpa * 100,
        waterCm: Math.min(waterCm, 10),
        ozoneAtmCm: ozone,
        aod500: Math.min(aod500, 5),
        dayOfYear: dayOfYear(midUtcMs + w.site.utcOffsetHours * 3_600_000),
        albedo,
        ...SPECTRL2_RURAL,
      },
      { aoiDeg, tiltDeg },
    );
    // One grid array for every hour (SPECTRL2's grid is fixed): searches then find each
    // gap's grid interval once for the whole year.
    sharedGrid ??= cs.wavelengthNm;
    const wl = sameValues(sharedGrid, cs.wavelengthNm) ? sharedGrid : cs.wavelengthNm;
    const dniClear = bandIntegralWm2(wl, cs.dniWm2Nm);
    const dhiClear = bandIntegralWm2(wl, cs.dhiWm2Nm);
    let beamScale = dniClear > 1e-3 ? Math.max(0, h.dniWm2) / dniClear : 0;
    if (dniClear <= 1e-3 && h.dniWm2 > 0) tally.beamDropped++;
    const diffuseScale = dhiClear > 1e-6 ? Math.max(0, h.dhiWm2) / dhiClear : 0;
    if (!Number.isFinite(beamScale)) beamScale = 0;

    const cosZ = Math.cos(z);
    const cosAoi = Math.max(cosAoiRaw, 0);
    const cosBeta = Math.cos(tiltDeg * RAD);
    const rb = cosAoi / Math.max(cosZ, 0.01745);
    const poa = new Float64Array(wl.length);
    for (let k = 0; k < wl.length; k++) {
      const p = planeParts(cs.dniWm2Nm[k] * beamScale, cs.dhiWm2Nm[k] * diffuseScale, cs.etrWm2Nm[k], cosZ, cosAoi, cosBeta, rb, albedo);
      poa[k] = p.beam + p.sky + p.ground;
    }
    const poaWm2 = bandIntegralWm2(wl, poa);
    if (!(poaWm2 > 0.01)) {
      skip('no light reaches the plane', h.line, h.ghiWm2);
      continue;
    }
    for (const k of Object.keys(tally) as (keyof typeof tally)[]) used[k] += tally[k];
    const cellTempC = faimanCellTempC(h.airTempC, poaWm2, h.windMs, faiman);
    const label = h.localLabel;
    members.push({
      label,
      timestamp: new Date(h.endUtcMs + w.site.utcOffsetHours * 3_600_000).toISOString().slice(0, 16),
      // The hour's own arrays (never changed afterwards), the grid shared by every hour.
      spectrum: spectrumOfArrays({ name: `${w.site.name} ${label}`, sha256: () => sha256OfTable(wl, poa), source: `${w.path}:${h.line}`, wavelengthNm: wl, irradiance: poa }),
      weight: 1,
      tempK: cellTempC + 273.15,
    });
    hours.push({
      label, line: h.line, month: h.month, midUtcMs, apparentZenithDeg: sun.apparentZenithDeg, aoiDeg,
      ghiWm2: h.ghiWm2, dniWm2: h.dniWm2, dhiWm2: h.dhiWm2, poaWm2, airTempC: h.airTempC, windMs: h.windMs,
      cellTempK: cellTempC + 273.15, waterCm, aod500,
    });
    totals.usedHours++;
    totals.poaKwhM2 += poaWm2 / 1000;
    monthly[h.month - 1].hours++;
    monthly[h.month - 1].poaKwhM2 += poaWm2 / 1000;
  }
  if (members.length === 0) throw new UserError(`${w.path}: no usable daylight hour (${[...skipped.values()].map((s) => `${s.count} ${s.reason}`).join('; ')})`);

  const defaultsUsed: string[] = [];
  const say = (count: number, text: string) => count > 0 && defaultsUsed.push(`${text}: ${count} h`);
  if (o.waterCm !== undefined) defaultsUsed.push(`precipitable water ${o.waterCm} cm (given) in every hour`);
  say(used.waterFromDew, 'precipitable water from air temperature and dew point (Gueymard, Sol. Energy 53 (1994) 57)');
  say(used.waterDefault, `precipitable water default ${SITE_DEFAULTS.waterCm} cm (neither water nor dew point in the file)`);
  if (o.aod500 !== undefined) defaultsUsed.push(`τ500 ${o.aod500} (given) in every hour`);
  say(used.aodFromFile, `τ500 from the file's broadband AOD taken at ${SITE_DEFAULTS.broadbandAodWavelengthNm} nm, Ångström ${SPECTRL2_RURAL.alpha} (from memory)`);
  say(used.aodDefault, `τ500 default ${SITE_DEFAULTS.aod500} (no AOD in the file; overridable)`);
  say(used.pressureStandard, 'pressure of the ISO 2533 standard atmosphere at the site elevation (none in the file)');
  if (o.albedo !== undefined) defaultsUsed.push(`albedo ${o.albedo} (given) in every hour`);
  say(used.albedoDefault, `albedo default ${SITE_DEFAULTS.albedo} (none in the file)`);
  defaultsUsed.push(`ozone ${ozone} atm-cm in every hour${o.ozoneAtmCm === undefined ? ' (default; weather files carry none)' : ' (given)'}`);
  say(used.beamDropped, 'direct light dropped (the clear-sky model has none at this sun height)');

  const plane = o.tracking === 'single-axis'
    ? `single-axis tracker, horizontal axis at azimuth ${o.azimuthDeg}°, rotation ±${o.maxRotationDeg ?? SITE_DEFAULTS.maxRotationDeg}°, no backtracking`
    : `fixed plane, tilt ${o.tiltDeg}°, facing azimuth ${o.azimuthDeg}° (east of north)`;
  const assumptions = [
    `weather: ${w.path} (${w.format.toUpperCase()}, SHA-256 ${w.sha256.slice(0, 16)}…), ${w.site.name}, ${w.site.latitudeDeg}°, ${w.site.longitudeDeg}°, ${w.site.elevationM} m, UTC${w.site.utcOffsetHours >= 0 ? '+' : ''}${w.site.utcOffsetHours}`,
    `plane: ${plane}`,
    ...hourlyModelAssumptions(faiman),
  ];
  const optionsKey = JSON.stringify({ ...o, faiman });
  const ensemble: Ensemble = {
    name: `${w.site.name} hourly year`,
    source: `weather file ${w.path} (${w.format.toUpperCase()}), ${plane}`,
    sha256: sha256Hex(`${w.sha256}\n${optionsKey}`),
    members,
    layout: 'weather-year',
    weightUnit: 'hours',
    skipped: [],
  };
  return { ensemble, site: w.site, format: w.format, hours, totals, monthly, skipped: [...skipped.values()], defaultsUsed, assumptions };
}

/** Whether two arrays hold the same values. */
function sameValues(a: Float64Array, b: Float64Array): boolean {
  if (a === b) return true;
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** Day of year 1–366 of a local-time instant [ms]. */
function dayOfYear(localMs: number): number {
  const d = new Date(localMs);
  return Math.floor((localMs - Date.UTC(d.getUTCFullYear(), 0, 1)) / 86_400_000) + 1;
}
