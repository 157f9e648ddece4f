/**
 * A SPECTRL2 clear-sky spectrum as a light source, written
 * `clearsky:zenith=40,water-cm=2,aod500=0.2,part=poa` (keys as the sky
 * command's options). Unnamed inputs take the defaults below, which every
 * spectrum's source text lists.
 */
import { UserError } from '../errors.js';
import { airMassKastenYoung } from './sun-position.js';
import { makeSpectrum, sha256OfTable, type Spectrum } from './spectrum.js';
import { SPECTRL2_RURAL, spectrl2, type Plane, type Spectrl2Inputs, type Spectrl2Result } from './spectrl2.js';

/** Which column becomes the spectrum. */
export type ClearSkyPart = 'poa' | 'dni' | 'dhi' | 'ghi';

/** Defaults for inputs a request leaves out (stated in every source text): a mid-latitude spring day, sea level, a clean rural sky. */
export const CLEAR_SKY_DEFAULTS = {
  dayOfYear: 81,
  pressurePa: 101325,
  waterCm: 1.42,
  ozoneAtmCm: 0.34,
  aod500: 0.1,
  albedo: 0.2,
} as const;

export interface ClearSkyRequest {
  inputs: Spectrl2Inputs;
  plane: Plane;
  part: ClearSkyPart;
}

const KEYS: Record<string, string> = {
  zenith: 'apparent solar zenith [°] (required)',
  aoi: 'angle of incidence on the plane [°] (default: the zenith, a horizontal plane)',
  tilt: 'plane tilt [°] (default 0)',
  day: 'day of year 1–366',
  'pressure-hpa': 'surface pressure [hPa]',
  'water-cm': 'precipitable water [cm]',
  'ozone-atm-cm': 'ozone column [atm-cm]',
  aod500: 'aerosol optical depth at 500 nm',
  albedo: 'ground albedo',
  'air-mass': 'relative air mass (default Kasten–Young of the zenith)',
  alpha: 'Ångström exponent',
  omega0: 'single-scattering albedo at 400 nm',
  asymmetry: 'aerosol asymmetry factor',
  part: 'poa | dni | dhi | ghi (default poa)',
};

/** Parse the text after `clearsky:` into model inputs; UserError naming the key on any mistake. */
export function parseClearSkyRequest(text: string): ClearSkyRequest {
  const body = text.replace(/^clearsky:/i, '').trim();
  const values = new Map<string, string>();
  for (const part of body.split(',').map((s) => s.trim()).filter((s) => s !== '')) {
    const eq = part.indexOf('=');
    const key = (eq < 0 ? part : part.slice(0, eq)).trim().toLowerCase();
    if (!(key in KEYS)) throw new UserError(`clearsky: unknown key "${key}"; allowed: ${Object.keys(KEYS).join(', ')}`);
    if (eq < 0) throw new UserError(`clearsky: "${part}" needs a value, as ${key}=<${KEYS[key]}>`);
    if (values.has(key)) throw new UserError(`clearsky: "${key}" is given twice`);
    values.set(key, part.slice(eq + 1).trim());
  }
  const num = (key: string): number | undefined => {
    const v = values.get(key);
    if (v === undefined) return undefined;
    const x = Number(v);
    if (v === '' || !Number.isFinite(x)) throw new UserError(`clearsky: ${key} must be a number (${KEYS[key]}), got "${v}"`);
    return x;
  };
  const zenithDeg = num('zenith');
  if (zenithDeg === undefined) throw new UserError('clearsky: give zenith=<apparent solar zenith [°]>, e.g. clearsky:zenith=48.2');
  const partText = (values.get('part') ?? 'poa').toLowerCase();
  if (!['poa', 'dni', 'dhi', 'ghi'].includes(partText)) throw new UserError(`clearsky: part must be poa, dni, dhi or ghi, got "${partText}"`);
  const hpa = num('pressure-hpa');
  const airMass = num('air-mass') ?? airMassKastenYoung(zenithDeg);
  const inputs: Spectrl2Inputs = {
    zenithDeg,
    airMass,
    pressurePa: hpa === undefined ? CLEAR_SKY_DEFAULTS.pressurePa : hpa * 100,
    waterCm: num('water-cm') ?? CLEAR_SKY_DEFAULTS.waterCm,
    ozoneAtmCm: num('ozone-atm-cm') ?? CLEAR_SKY_DEFAULTS.ozoneAtmCm,
    aod500: num('aod500') ?? CLEAR_SKY_DEFAULTS.aod500,
    dayOfYear: num('day') ?? CLEAR_SKY_DEFAULTS.dayOfYear,
    albedo: num('albedo') ?? CLEAR_SKY_DEFAULTS.albedo,
    alpha: num('alpha') ?? SPECTRL2_RURAL.alpha,
    omega0: num('omega0') ?? SPECTRL2_RURAL.omega0,
    omegaPrime: SPECTRL2_RURAL.omegaPrime,
    asymmetry: num('asymmetry') ?? SPECTRL2_RURAL.asymmetry,
  };
  const plane: Plane = { aoiDeg: num('aoi') ?? zenithDeg, tiltDeg: num('tilt') ?? 0 };
  return { inputs, plane, part: partText as ClearSkyPart };
}

/** The column of a result that a part names [W m⁻² nm⁻¹]. */
export function clearSkyColumn(r: Spectrl2Result, part: ClearSkyPart): Float64Array {
  return part === 'poa' ? r.poaWm2Nm : part === 'dni' ? r.dniWm2Nm : part === 'dhi' ? r.dhiWm2Nm : r.ghiWm2Nm;
}

/** Words naming every input of a request (for a spectrum's source and a report's assumptions). */
export function describeClearSky(q: ClearSkyRequest): string {
  const i = q.inputs;
  return (
    `SPECTRL2 (Bird & Riordan 1986) ${q.part}: Z ${i.zenithDeg}°, M ${i.airMass.toFixed(4)}, AOI ${q.plane.aoiDeg}°, tilt ${q.plane.tiltDeg}°, ` +
    `day ${i.dayOfYear}, P ${i.pressurePa / 100} hPa, W ${i.waterCm} cm, O3 ${i.ozoneAtmCm} atm-cm, τ500 ${i.aod500}, α ${i.alpha}, ω0 ${i.omega0}, g ${i.asymmetry}, albedo ${i.albedo}`
  );
}

/** Resolve `clearsky:…` into a spectrum on the model's 122 wavelengths (300–4000 nm). */
export function clearSkySpectrum(text: string): Spectrum {
  const q = parseClearSkyRequest(text);
  const r = spectrl2(q.inputs, q.plane);
  const irradiance = clearSkyColumn(r, q.part);
  return makeSpectrum({
    name: `clear sky (SPECTRL2 ${q.part}, Z ${q.inputs.zenithDeg}°)`,
    sha256: sha256OfTable(r.wavelengthNm, irradiance),
    source: describeClearSky(q),
    wavelengthNm: r.wavelengthNm,
    irradiance,
  });
}
