/**
 * The command line's names for the engine's parameters: engine errors name
 * parameters as the library does (`stepEv`, `fixedEv[1]`); people at the
 * command line read them as the flags they typed (`--step`, `--fix 2`).
 */
import { isParameterError } from '../errors.js';

const FLAGS: Record<string, string> = {
  cells: '--cells',
  spanEv: '--span',
  stepEv: '--step',
  loss: '--loss',
  fixedEv: '--fix',
  rangesEv: '--range',
  suns: '--suns',
  irradianceWm2: '--irradiance',
  units: '--units',
  wiring: '--wiring',
  tiltDeg: '--tilt',
  azimuthDeg: '--azimuth',
  albedo: '--albedo',
  ozoneAtmCm: '--ozone-atm-cm',
  aod500: '--aod500',
  waterCm: '--water-cm',
  maxRotationDeg: '--max-rotation',
  faiman: '--faiman',
};

/** The flag for an engine parameter; indexed ones name the 1-based subcell (`fixedEv[1]` → `--fix 2`). */
export function flagForParameter(parameter: string): string | undefined {
  const m = /^([A-Za-z][A-Za-z0-9]*)(?:\[(\d+)\])?$/.exec(parameter);
  if (!m) return undefined;
  const flag = FLAGS[m[1]];
  if (flag === undefined) return undefined;
  return m[2] === undefined ? flag : `${flag} ${Number(m[2]) + 1}`;
}

/** The one-line message a user sees for a user error, with engine parameters as flags. */
export function commandLineMessage(err: Error): string {
  const text = isParameterError(err) ? err.messageWith(flagForParameter) : err.message;
  return text.split('\n')[0];
}

