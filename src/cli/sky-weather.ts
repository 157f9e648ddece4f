/**
 * `gapstack sky --weather FILE --tilt B --azimuth G --out DIR`: the hourly site
 * year written as an ordinary ensemble (one spectrum file per used hour and a
 * CSV manifest with weights in hours and cell temperatures), plus site.json
 * with the site, annual sums and the assumptions. `--ensemble DIR` reads it
 * back to the same numbers: values are written with round-trip precision.
 */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../errors.js';
import { writeFileAtomic } from '../io/atomic-write.js';
import { loadSiteYear, type SiteYear } from '../light/site-year.js';
import { CAUTION } from '../report/assumptions.js';
import { fix, round } from './format.js';
import { siteOptionsFromArgs, type WeatherArgs } from './weather-options.js';

export interface SkyWeatherArgs extends WeatherArgs {
  out?: unknown;
  json?: boolean;
}

/** Write a site year into a folder that `--ensemble DIR` loads; returns the file count. */
export function writeSiteYear(y: SiteYear, dir: string): number {
  mkdirSync(join(dir, 'hours'), { recursive: true });
  const manifest = [
    `# Hourly spectra of ${y.site.name} on the module plane, written by gapstack sky --weather (theoretical model inputs, not measurements).`,
    '# weight_unit: hours',
    'file,label,weight_h,temp_k',
  ];
  y.ensemble.members.forEach((m, k) => {
    const name = `hours/${String(k + 1).padStart(4, '0')}.csv`;
    const s = m.spectrum;
    const lines = [`# ${m.label} (${m.timestamp ?? ''} local standard time, hour ending), from ${s.source}`, 'wavelength_nm,irradiance_w_m2_nm'];
    for (let i = 0; i < s.wavelengthNm.length; i++) lines.push(`${s.wavelengthNm[i]},${s.irradiance[i]}`);
    writeFileAtomic(join(dir, name), `${lines.join('\n')}\n`);
    manifest.push(`${name},${m.label},${m.weight},${m.tempK}`);
  });
  writeFileAtomic(join(dir, 'manifest.csv'), `${manifest.join('\n')}\n`);
  writeFileAtomic(join(dir, 'site.json'), `${JSON.stringify(siteYearJson(y), null, 2)}\n`);
  return y.ensemble.members.length + 2;
}

/** Site metadata, annual sums, skipped hours and assumptions of a site year. */
export function siteYearJson(y: SiteYear): Record<string, unknown> {
  return {
    site: { name: y.site.name, latitude_deg: y.site.latitudeDeg, longitude_deg: y.site.longitudeDeg, elevation_m: y.site.elevationM, utc_offset_h: y.site.utcOffsetHours },
    format: y.format,
    ensemble: { name: y.ensemble.name, sha256: y.ensemble.sha256, members: y.ensemble.members.length, weight_unit: 'hours' },
    annual_kwh_m2: { poa: round(y.totals.poaKwhM2), ghi: round(y.totals.ghiKwhM2), dni: round(y.totals.dniKwhM2), dhi: round(y.totals.dhiKwhM2) },
    hours: { in_file: y.totals.fileHours, used: y.totals.usedHours },
    monthly_poa_kwh_m2: y.monthly.map((m) => ({ month: m.month, hours: m.hours, poa_kwh_m2: round(m.poaKwhM2) })),
    skipped: y.skipped.map((k) => ({ reason: k.reason, hours: k.count, ghi_kwh_m2: round(k.ghiKwhM2), first_line: k.firstLine })),
    defaults_used: y.defaultsUsed,
    assumptions: y.assumptions,
    caution: CAUTION,
  };
}

export function skyWeatherCommand(a: SkyWeatherArgs): string {
  const y = loadSiteYear(String(a.weather), siteOptionsFromArgs(a));
  let written = 0;
  if (a.out !== undefined) {
    const dir = String(a.out).trim();
    if (dir === '') throw new UserError('--out needs a folder');
    written = writeSiteYear(y, dir);
  }
  if (a.json) return JSON.stringify({ ...siteYearJson(y), ...(a.out !== undefined ? { out: String(a.out), files_written: written } : {}) }, null, 2);
  return [
    `Site ${y.site.name} (${y.site.latitudeDeg}°, ${y.site.longitudeDeg}°, ${y.site.elevationM} m): ${y.totals.usedHours} of ${y.totals.fileHours} hours used`,
    `  annual plane-of-array insolation ${fix(y.totals.poaKwhM2, 1)} kWh/m² (file: GHI ${fix(y.totals.ghiKwhM2, 1)}, DNI ${fix(y.totals.dniKwhM2, 1)}, DHI ${fix(y.totals.dhiKwhM2, 1)} kWh/m²)`,
    `  skipped: ${y.skipped.map((k) => `${k.count} h ${k.reason}`).join('; ') || 'none'}`,
    `  defaults and estimates: ${y.defaultsUsed.join('; ')}`,
    a.out !== undefined ? `Wrote ${written} files to ${String(a.out)} (manifest.csv, hours/*.csv, site.json); use it with --ensemble ${String(a.out)}` : 'Give --out DIR to write the hourly spectra as an ensemble.',
    '',
    'Assumptions:',
    ...y.assumptions.map((l) => `  ${l}`),
    '',
    CAUTION,
  ].join('\n');
}
