/**
 * `gapstack sky`: the sun's position for a place and instant, a SPECTRL2
 * clear-sky spectrum for given conditions, or (with --weather) the hourly
 * site year written out as an ensemble (docs/PHYSICS.md §10).
 */
import { UserError } from '../errors.js';
import { airMassKastenYoung, sunPosition } from '../light/sun-position.js';
import { CLEAR_SKY_DEFAULTS } from '../light/clear-sky-source.js';
import { bandIntegralWm2, SPECTRL2_RURAL, spectrl2, type Spectrl2Inputs } from '../light/spectrl2.js';
import { CAUTION } from '../report/assumptions.js';
import { fix, round, table } from './format.js';
import { parseNumber } from './options.js';

export interface SkyArgs {
  lat?: unknown;
  lon?: unknown;
  time?: unknown;
  elevation?: unknown;
  pressureHpa?: unknown;
  airTemp?: unknown;
  deltaT?: unknown;
  zenith?: unknown;
  aoi?: unknown;
  tilt?: unknown;
  day?: unknown;
  waterCm?: unknown;
  ozoneAtmCm?: unknown;
  aod500?: unknown;
  albedo?: unknown;
  airMass?: unknown;
  alpha?: unknown;
  omega0?: unknown;
  asymmetry?: unknown;
  weather?: unknown;
  out?: unknown;
  json?: boolean;
}

const ISO_WITH_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/;

/** An ISO 8601 instant with its UTC offset, as ms since the epoch. */
export function parseInstant(value: unknown): number {
  const text = String(value ?? '').trim();
  if (!ISO_WITH_OFFSET.test(text)) throw new UserError(`--time must be an ISO 8601 time with its UTC offset, e.g. 2003-10-17T12:30:30-07:00 or …Z, got "${text}"`);
  const t = Date.parse(text);
  if (!Number.isFinite(t)) throw new UserError(`--time "${text}" is not a valid date and time`);
  return t;
}

const opt = (name: string, v: unknown, fallback: number): number => (v === undefined ? fallback : parseNumber(name, v));

function sunCommand(a: SkyArgs): string {
  if (a.lat === undefined || a.lon === undefined || a.time === undefined) throw new UserError('sun position needs --lat, --lon and --time');
  const lat = parseNumber('lat', a.lat);
  const lon = parseNumber('lon', a.lon);
  if (lat < -90 || lat > 90) throw new UserError(`--lat must be within −90…90 ° (north positive), got ${lat}`);
  if (lon < -180 || lon > 180) throw new UserError(`--lon must be within −180…180 ° (east positive), got ${lon}`);
  const utcMs = parseInstant(a.time);
  const elevationM = opt('elevation', a.elevation, 0);
  const pressureHpa = opt('pressure-hpa', a.pressureHpa, 1013.25);
  const airTempC = opt('air-temp', a.airTemp, 12);
  const deltaT = opt('delta-t', a.deltaT, 69);
  if (!(pressureHpa > 0)) throw new UserError(`--pressure-hpa must be positive, got ${pressureHpa}`);
  if (airTempC <= -273.15) throw new UserError(`--air-temp is in °C and must be above −273.15, got ${airTempC}`);
  const p = sunPosition(utcMs, { latitudeDeg: lat, longitudeDeg: lon, elevationM, pressureHpa, airTempC }, deltaT);
  const m = airMassKastenYoung(p.apparentZenithDeg);
  const airMass = Number.isFinite(m) ? m : null;
  const j = {
    time_utc: new Date(utcMs).toISOString(),
    zenith_deg: round(p.zenithDeg),
    apparent_zenith_deg: round(p.apparentZenithDeg),
    azimuth_deg: round(p.azimuthDeg),
    air_mass: airMass === null ? null : round(airMass),
    sun_up: p.apparentZenithDeg < 90,
    declination_deg: round(p.declinationDeg),
    earth_sun_au: round(p.earthSunAu),
    inputs: { lat_deg: lat, lon_deg: lon, elevation_m: elevationM, pressure_hpa: pressureHpa, air_temp_c: airTempC, delta_t_s: deltaT },
    method: 'NREL SPA (Reda & Andreas, Sol. Energy 76 (2004) 577), stated accuracy ±0.0003°; refraction from pressure and temperature; air mass Kasten & Young (1989) of the apparent zenith',
  };
  if (a.json) return JSON.stringify(j, null, 2);
  return [
    `Sun at ${j.time_utc} for ${lat}°, ${lon}° (${elevationM} m):`,
    `  zenith ${fix(p.zenithDeg, 5)}° (apparent, with refraction: ${fix(p.apparentZenithDeg, 5)}°), azimuth ${fix(p.azimuthDeg, 5)}° east of north`,
    `  air mass ${airMass === null ? '– (sun below the horizon)' : fix(airMass, 4)}${p.apparentZenithDeg >= 90 ? '; the sun is below the horizon' : ''}`,
    `  ${j.method}`,
  ].join('\n');
}

/** SPECTRL2 inputs from the sky options; defaults for the optional ones are those of clearsky: sources. */
export function spectrl2InputsFromArgs(a: SkyArgs): { inputs: Spectrl2Inputs; aoiDeg: number; tiltDeg: number } {
  const zenithDeg = parseNumber('zenith', a.zenith);
  const hpa = opt('pressure-hpa', a.pressureHpa, CLEAR_SKY_DEFAULTS.pressurePa / 100);
  const inputs: Spectrl2Inputs = {
    zenithDeg,
    airMass: a.airMass === undefined ? airMassKastenYoung(zenithDeg) : parseNumber('air-mass', a.airMass),
    pressurePa: hpa * 100,
    waterCm: opt('water-cm', a.waterCm, CLEAR_SKY_DEFAULTS.waterCm),
    ozoneAtmCm: opt('ozone-atm-cm', a.ozoneAtmCm, CLEAR_SKY_DEFAULTS.ozoneAtmCm),
    aod500: opt('aod500', a.aod500, CLEAR_SKY_DEFAULTS.aod500),
    dayOfYear: opt('day', a.day, CLEAR_SKY_DEFAULTS.dayOfYear),
    albedo: opt('albedo', a.albedo, CLEAR_SKY_DEFAULTS.albedo),
    alpha: opt('alpha', a.alpha, SPECTRL2_RURAL.alpha),
    omega0: opt('omega0', a.omega0, SPECTRL2_RURAL.omega0),
    omegaPrime: SPECTRL2_RURAL.omegaPrime,
    asymmetry: opt('asymmetry', a.asymmetry, SPECTRL2_RURAL.asymmetry),
  };
  return { inputs, aoiDeg: opt('aoi', a.aoi, zenithDeg), tiltDeg: opt('tilt', a.tilt, 0) };
}

function clearSkyCommand(a: SkyArgs): string {
  const { inputs, aoiDeg, tiltDeg } = spectrl2InputsFromArgs(a);
  const r = spectrl2(inputs, { aoiDeg, tiltDeg });
  const wl = r.wavelengthNm;
  const integrals = {
    dni_w_m2: bandIntegralWm2(wl, r.dniWm2Nm),
    dhi_w_m2: bandIntegralWm2(wl, r.dhiWm2Nm),
    ghi_w_m2: bandIntegralWm2(wl, r.ghiWm2Nm),
    poa_w_m2: bandIntegralWm2(wl, r.poaWm2Nm),
    etr_w_m2: bandIntegralWm2(wl, r.etrWm2Nm),
  };
  const inputsJson = {
    zenith_deg: inputs.zenithDeg, aoi_deg: aoiDeg, tilt_deg: tiltDeg, day_of_year: inputs.dayOfYear, pressure_hpa: inputs.pressurePa / 100,
    water_cm: inputs.waterCm, ozone_atm_cm: inputs.ozoneAtmCm, aod500: inputs.aod500, albedo: inputs.albedo, air_mass: inputs.airMass,
    alpha: inputs.alpha, omega0: inputs.omega0, omega_prime: inputs.omegaPrime, asymmetry: inputs.asymmetry,
  };
  const model = 'SPECTRL2 (Bird & Riordan 1986) with the constants of NREL\'s C code; sky diffuse on the plane by Hay & Davies (1980), ground reflection isotropic; clear sky only';
  if (a.json) {
    const arr = (x: Float64Array) => Array.from(x, (v) => round(v, 12));
    return JSON.stringify(
      {
        wavelength_nm: Array.from(wl),
        dni_w_m2_nm: arr(r.dniWm2Nm),
        dhi_w_m2_nm: arr(r.dhiWm2Nm),
        ghi_w_m2_nm: arr(r.ghiWm2Nm),
        poa_w_m2_nm: arr(r.poaWm2Nm),
        etr_w_m2_nm: arr(r.etrWm2Nm),
        integrals_w_m2: Object.fromEntries(Object.entries(integrals).map(([k, v]) => [k.replace(/_w_m2$/, ''), round(v)])),
        band_nm: [wl[0], wl[wl.length - 1]],
        inputs: inputsJson,
        model,
        caution: CAUTION,
      },
      null,
      2,
    );
  }
  const shown = [300, 350, 400, 450, 500, 550, 610, 710, 800, 905, 1100, 1200, 1497, 2005, 3000, 4000];
  const rows = shown.map((nm) => {
    const k = wl.indexOf(nm);
    return [String(nm), fix(r.dniWm2Nm[k], 4), fix(r.dhiWm2Nm[k], 4), fix(r.ghiWm2Nm[k], 4), fix(r.poaWm2Nm[k], 4)];
  });
  return [
    `Clear-sky spectrum at zenith ${inputs.zenithDeg}° (air mass ${fix(inputs.airMass, 4)}), plane tilt ${tiltDeg}°, angle of incidence ${aoiDeg}°`,
    `Integrals over ${wl[0]}–${wl[wl.length - 1]} nm: DNI ${fix(integrals.dni_w_m2, 2)}, DHI ${fix(integrals.dhi_w_m2, 2)}, GHI ${fix(integrals.ghi_w_m2, 2)}, plane of array ${fix(integrals.poa_w_m2, 2)} W/m²`,
    '',
    table(['λ [nm]', 'DNI [W/m²/nm]', 'DHI [W/m²/nm]', 'GHI [W/m²/nm]', 'POA [W/m²/nm]'], rows),
    `(${wl.length} wavelengths in all with --json)`,
    '',
    `Inputs: day ${inputs.dayOfYear}, pressure ${inputs.pressurePa / 100} hPa, water ${inputs.waterCm} cm, ozone ${inputs.ozoneAtmCm} atm-cm, τ500 ${inputs.aod500}, Ångström ${inputs.alpha}, ω0 ${inputs.omega0}, asymmetry ${inputs.asymmetry}, albedo ${inputs.albedo}`,
    model,
    CAUTION,
  ].join('\n');
}

export async function skyCommand(a: SkyArgs): Promise<string> {
  const modes = [a.weather !== undefined, a.zenith !== undefined, a.lat !== undefined || a.lon !== undefined || a.time !== undefined].filter(Boolean).length;
  if (modes > 1) throw new UserError('give one of: --lat/--lon/--time (sun position), --zenith (clear-sky spectrum) or --weather (site year)');
  if (a.weather !== undefined) return (await import('./sky-weather.js')).skyWeatherCommand(a as never);
  if (a.zenith !== undefined) return clearSkyCommand(a);
  if (a.lat !== undefined || a.lon !== undefined || a.time !== undefined) return sunCommand(a);
  throw new UserError('sky needs --lat/--lon/--time (sun position), --zenith (clear-sky spectrum) or --weather FILE --tilt --azimuth (site year); see gapstack sky --help');
}
