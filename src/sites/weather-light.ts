/**
 * Each site's light from its weather file: the site-light engine's hourly year
 * (src/light/site-year.ts) on the plane the batch names, as the batch's
 * SiteLightSource. Across hemispheres a batch may ask for the plane each site
 * would usually get: tilted at the site's latitude and facing the equator.
 */
import { siteYearFromWeather, type SiteLightOptions } from '../light/site-year.js';
import { readWeatherFile } from '../light/weather/index.js';
import { planeAt, planeKey, type BatchPlane } from './plane.js';
import type { SiteLightSource } from './question.js';

/** Turn every weather file into its hourly year on the batch's plane and model setting. */
export function weatherSiteLight(plane: BatchPlane, o: Omit<SiteLightOptions, 'tiltDeg' | 'azimuthDeg'>): SiteLightSource {
  return async (path) => {
    const weather = readWeatherFile(path);
    const year = siteYearFromWeather(weather, { ...o, ...planeAt(plane, weather.site.latitudeDeg) });
    return {
      name: year.site.name,
      latDeg: year.site.latitudeDeg,
      lonDeg: year.site.longitudeDeg,
      spectra: year.ensemble.members,
      poaKwhM2: year.totals.poaKwhM2,
    };
  };
}

/**
 * Every light-model setting that changes a number, as it enters a batch
 * question's hash (parts of different planes or models never merge). The
 * command line and design files' `sites:` both hash through here, so the same
 * design asked either way is the same question.
 */
export function siteLightHashOptions(plane: BatchPlane, model: Omit<SiteLightOptions, 'tiltDeg' | 'azimuthDeg'>): Record<string, string | number | boolean | null> {
  return {
    plane: planeKey(plane),
    tracking: model.tracking,
    max_rotation_deg: model.maxRotationDeg ?? null,
    albedo: model.albedo ?? null,
    aod500: model.aod500 ?? null,
    water_cm: model.waterCm ?? null,
    ozone_atm_cm: model.ozoneAtmCm ?? null,
    faiman: model.faiman ? `${model.faiman.u0},${model.faiman.u1}` : null,
  };
}
