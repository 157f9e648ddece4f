/** `--weather FILE --tilt --azimuth …`: a weather file's hourly year as the light (docs/PHYSICS.md §10). */
import { UserError } from '../errors.js';
import type { SiteLightOptions, SiteYear } from '../light/site-year.js';
import { parseNumber, parseNumberList } from './options.js';

export interface WeatherArgs {
  weather?: unknown;
  tilt?: unknown;
  azimuth?: unknown;
  albedo?: unknown;
  tracking?: unknown;
  maxRotation?: unknown;
  aod500?: unknown;
  waterCm?: unknown;
  ozoneAtmCm?: unknown;
  faiman?: unknown;
}

/** Site-light options from the command line; UserError naming the option when one is wrong or missing. */
export function siteOptionsFromArgs(a: WeatherArgs): SiteLightOptions {
  if (a.tilt === undefined || a.azimuth === undefined) throw new UserError('--weather needs --tilt <°> and --azimuth <° east of north, 180 = south>');
  const tracking = String(a.tracking ?? 'none').trim().toLowerCase();
  if (tracking !== 'none' && tracking !== 'single-axis') throw new UserError(`--tracking must be none or single-axis, got "${String(a.tracking)}"`);
  const opt = (name: string, v: unknown) => (v === undefined ? undefined : parseNumber(name, v));
  let faiman: SiteLightOptions['faiman'];
  if (a.faiman !== undefined) {
    const f = parseNumberList('faiman', a.faiman);
    if (f.length !== 2) throw new UserError(`--faiman takes two numbers "U0,U1", got "${String(a.faiman)}"`);
    faiman = { u0: f[0], u1: f[1] };
  }
  return {
    tiltDeg: parseNumber('tilt', a.tilt),
    azimuthDeg: parseNumber('azimuth', a.azimuth),
    tracking: tracking as SiteLightOptions['tracking'],
    maxRotationDeg: opt('max-rotation', a.maxRotation),
    albedo: opt('albedo', a.albedo),
    aod500: opt('aod500', a.aod500),
    waterCm: opt('water-cm', a.waterCm),
    ozoneAtmCm: opt('ozone-atm-cm', a.ozoneAtmCm),
    faiman,
  };
}

/** Plane and model options given without --weather are mistakes worth naming. */
export function checkWeatherOnlyOptions(a: WeatherArgs): void {
  if (a.weather !== undefined) return;
  for (const [k, v] of Object.entries({ tilt: a.tilt, azimuth: a.azimuth, tracking: a.tracking, 'max-rotation': a.maxRotation, faiman: a.faiman })) {
    if (v !== undefined) throw new UserError(`--${k} applies only with --weather`);
  }
}

/** The site year named by --weather. */
export async function siteYearFromArgs(a: WeatherArgs): Promise<SiteYear> {
  const { loadSiteYear } = await import('../light/site-year.js');
  return loadSiteYear(String(a.weather), siteOptionsFromArgs(a));
}
