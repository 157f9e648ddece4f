/**
 * The module plane of a batch over sites. One plane for every site, or the plane
 * each site would usually get: tilted at its latitude, facing the equator
 * (common practice for fixed-tilt arrays), so one batch can span both
 * hemispheres.
 */
import { UserError } from '../errors.js';

/** Tilt [°] from horizontal or 'latitude'; azimuth [°] east of north (180 = south) or 'equator'. */
export interface BatchPlane {
  tilt: number | 'latitude';
  azimuth: number | 'equator';
}

/** Parse `--tilt` (degrees 0–90 or "latitude") and `--azimuth` (degrees 0–360 or "equator"). */
export function parsePlane(tilt: string, azimuth: string): BatchPlane {
  const t = tilt.trim().toLowerCase();
  const a = azimuth.trim().toLowerCase();
  const deg = (text: string, name: string, hi: number, word: string): number => {
    const x = Number(text);
    if (text === '' || !Number.isFinite(x) || x < 0 || x > hi) throw new UserError(`--${name} must be degrees 0–${hi} or "${word}", got "${text}"`);
    return x;
  };
  return {
    tilt: t === 'latitude' ? 'latitude' : deg(t, 'tilt', 90, 'latitude'),
    azimuth: a === 'equator' ? 'equator' : deg(a, 'azimuth', 360, 'equator'),
  };
}

/** Tilt and azimuth [°] at a site of latitude `latDeg` [°, north positive]. */
export function planeAt(p: BatchPlane, latDeg: number): { tiltDeg: number; azimuthDeg: number } {
  return {
    tiltDeg: p.tilt === 'latitude' ? Math.min(90, Math.abs(latDeg)) : p.tilt,
    azimuthDeg: p.azimuth === 'equator' ? (latDeg >= 0 ? 180 : 0) : p.azimuth,
  };
}

/** The plane as it enters the question's hash. */
export function planeKey(p: BatchPlane): string {
  return `tilt=${p.tilt};azimuth=${p.azimuth}`;
}
