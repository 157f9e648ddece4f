/**
 * INVENTED benchmark data: a wide table of 8760 hourly spectra (one per
 * column, header "wavelength_nm,<timestamp>,…") made by transforming the
 * built-in AM1.5G table. Nothing here is a measurement or a model of a real
 * site; it only has the size and shape of an hourly year, so the bench can
 * time loading and solving one. Written at bench time (≈ 150 MB), never
 * committed.
 *
 * Member k (hour of an invented year): AM1.5G × (λ/700 nm)^(−β_k), rescaled to
 * an invented plane irradiance G_k = 20 + 980·s_k W/m², with s_k a smooth
 * day-and-season shape that never reaches zero (so every column carries power).
 */
import { closeSync, openSync, writeSync } from 'node:fs';
import { am15g } from '../light/sources.js';
import { trapezoid } from '../light/spectrum.js';

export const YEAR_HOURS = 8760;

/** Write the invented year to `path`; returns the number of spectra. */
export function writeInventedYearTable(path: string, hours = YEAR_HOURS): number {
  const ref = am15g();
  const wl = ref.wavelengthNm;
  const base = ref.irradiance;
  const scale = new Float64Array(hours);
  const beta = new Float64Array(hours);
  const labels: string[] = [];
  for (let k = 0; k < hours; k++) {
    const day = Math.floor(k / 24);
    const hour = k % 24;
    const season = 0.75 + 0.25 * Math.cos((2 * Math.PI * (day - 172)) / 365);
    const sun = Math.max(0, Math.sin((Math.PI * (hour - 6)) / 12));
    const s = 0.02 + 0.98 * season * sun;
    beta[k] = 0.3 - 0.5 * sun; // low sun reddens the invented light, high sun is near the reference
    let pin = 0;
    {
      const y = new Float64Array(wl.length);
      for (let i = 0; i < wl.length; i++) y[i] = base[i] * Math.pow(wl[i] / 700, -beta[k]);
      pin = trapezoid(wl, y);
    }
    scale[k] = ((20 + 980 * s) / pin);
    const d = new Date(Date.UTC(2001, 0, 1, k));
    labels.push(d.toISOString().slice(0, 16));
  }
  const fd = openSync(path, 'w');
  try {
    writeSync(fd, '# INVENTED benchmark data (src/bench/year-table.ts): an hourly year of made-up spectra, not a measurement.\n');
    writeSync(fd, '# weight_unit: hours\n# units: nm,W/m2/nm\n');
    writeSync(fd, `wavelength_nm,${labels.join(',')}\n`);
    writeSync(fd, `weight_h,${Array(hours).fill('1').join(',')}\n`);
    const cells = new Array<string>(hours + 1);
    for (let i = 0; i < wl.length; i++) {
      cells[0] = String(wl[i]);
      for (let k = 0; k < hours; k++) {
        const v = base[i] * Math.pow(wl[i] / 700, -beta[k]) * scale[k];
        cells[k + 1] = v === 0 ? '0' : v.toPrecision(4);
      }
      writeSync(fd, `${cells.join(',')}\n`);
    }
  } finally {
    closeSync(fd);
  }
  return hours;
}

// Run directly: node dist/bench/year-table.js <out.csv>
if (process.argv[1] && import.meta.url.endsWith(process.argv[1].split('/').pop() ?? '\0') && process.argv[2]) {
  writeInventedYearTable(process.argv[2]);
}
