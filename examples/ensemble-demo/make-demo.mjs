#!/usr/bin/env node
// SYNTHETIC DEMO DATA generator: invents a spectral ensemble by transforming the
// AM1.5G table in spectra/am1.5g.tsv. Nothing here is a measurement or a model of
// any real site; the numbers are chosen only to make a readable example.
//
// Each member = AM1.5G × (λ / 700 nm)^(−β) × deeper (or shallower) water bands,
// then rescaled to an invented plane irradiance G:
//   * β > 0 tilts the spectrum blue (overcast, diffuse light), β < 0 red (low sun);
//   * water bands: inside 900–990, 1080–1190, 1300–1500 and 1780–2020 nm the
//     ratio t = E / envelope (envelope = running maximum over ±40 nm) becomes
//     t^(1 + k), as if the water column were (1 + k) times the reference one;
//   * cell temperature T = T_ambient + 0.03 K/(W/m²) · G (an invented rule of thumb).
//
// Run from the repository root:  node examples/ensemble-demo/make-demo.mjs
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..', '..');
const rows = readFileSync(join(root, 'spectra', 'am1.5g.tsv'), 'utf8')
  .split(/\r?\n/)
  .filter((l) => /^\d/.test(l.trim()))
  .map((l) => l.trim().split(/\s+/).map(Number));
const wl = rows.map((r) => r[0]);
const ref = rows.map((r) => r[1]);

const trapezoid = (y) => {
  let s = 0;
  for (let i = 1; i < wl.length; i++) s += 0.5 * (y[i] + y[i - 1]) * (wl[i] - wl[i - 1]);
  return s;
};

const WATER_BANDS = [
  [900, 990],
  [1080, 1190],
  [1300, 1500],
  [1780, 2020],
];
const envelope = wl.map((l) => {
  let m = 0;
  for (let j = 0; j < wl.length; j++) if (Math.abs(wl[j] - l) <= 40 && ref[j] > m) m = ref[j];
  return m;
});

function member({ g, beta, k }) {
  const y = wl.map((l, i) => {
    let e = ref[i] * Math.pow(l / 700, -beta);
    const inBand = WATER_BANDS.some(([a, b]) => l >= a && l <= b);
    if (inBand && envelope[i] > 0 && ref[i] > 0) {
      const t = Math.min(1, ref[i] / envelope[i]);
      e *= Math.pow(t, k);
    }
    return e;
  });
  const f = g / trapezoid(y);
  return y.map((v) => v * f);
}

// Invented seasons and sky conditions: hours, plane irradiance [W/m²], tilt β, water k.
const SEASONS = [
  { name: 'winter', ambientK: 278, water: -0.3, gScale: 0.75, betaShift: -0.2, hours: 820 },
  { name: 'spring', ambientK: 288, water: 0.2, gScale: 0.95, betaShift: 0, hours: 1150 },
  { name: 'summer', ambientK: 298, water: 0.8, gScale: 1.0, betaShift: 0.1, hours: 1350 },
  { name: 'autumn', ambientK: 287, water: 0.3, gScale: 0.85, betaShift: -0.1, hours: 1000 },
];
const SKIES = [
  { name: 'clear-midday', g: 950, beta: 0, share: 0.3 },
  { name: 'clear-low-sun', g: 450, beta: -0.8, share: 0.25 },
  { name: 'hazy', g: 600, beta: -0.3, share: 0.2 },
  { name: 'overcast', g: 180, beta: 0.6, share: 0.25 },
];

const HEADER = [
  '# SYNTHETIC DEMO DATA, invented: not a measurement of any site or instrument.',
  '# Made by examples/ensemble-demo/make-demo.mjs from the AM1.5G table spectra/am1.5g.tsv',
];

mkdirSync(join(here, 'spectra'), { recursive: true });
const entries = [];
let n = 0;
for (const season of SEASONS) {
  for (const sky of SKIES) {
    n++;
    const g = Math.round(sky.g * season.gScale);
    const beta = Number((sky.beta + season.betaShift).toFixed(2));
    const k = season.water;
    const label = `${season.name}-${sky.name}`;
    const file = `spectra/${String(n).padStart(2, '0')}-${label}.tsv`;
    const y = member({ g, beta, k });
    const text = [
      ...HEADER,
      `# Transform: plane irradiance ${g} W/m2, spectral tilt beta = ${beta} (x (lambda/700 nm)^-beta), water-band exponent 1 ${k < 0 ? '-' : '+'} ${Math.abs(k)}.`,
      'wavelength_nm\tirradiance_w_m2_nm',
      ...wl.map((l, i) => `${l}\t${y[i].toPrecision(5)}`),
      '',
    ].join('\n');
    writeFileSync(join(here, file), text);
    const tempK = Number((season.ambientK + 0.03 * g).toFixed(1));
    entries.push({ file, label, weight: Math.round(season.hours * sky.share), tempK, g, beta, k });
  }
}

const yaml = [
  '# SYNTHETIC DEMO DATA, invented: a made-up year of 16 sky conditions for trying `gapstack yield`.',
  '# Not a measurement or a model of any real site. Regenerate with: node examples/ensemble-demo/make-demo.mjs',
  '# weight = hours in the year under that condition; temp_k = invented cell temperature [K].',
  'name: synthetic-demo-year',
  'weight_unit: hours',
  'spectra:',
  ...entries.flatMap((e) => [`  - file: ${e.file}`, `    label: ${e.label}`, `    weight: ${e.weight}`, `    temp_k: ${e.tempK}`]),
  '',
].join('\n');
writeFileSync(join(here, 'manifest.yaml'), yaml);

const csv = [
  '# SYNTHETIC DEMO DATA, invented: the same ensemble as manifest.yaml, as a CSV manifest.',
  '# weight_unit: hours',
  'file,label,weight,temp_k',
  ...entries.map((e) => `${e.file},${e.label},${e.weight},${e.tempK}`),
  '',
].join('\n');
writeFileSync(join(here, 'manifest-as-csv.csv'), csv);

console.log(`wrote ${entries.length} synthetic spectra, manifest.yaml and manifest-as-csv.csv; total ${entries.reduce((a, e) => a + e.weight, 0)} h`);
