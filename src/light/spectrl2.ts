/**
 * SPECTRL2, the Bird simple spectral model for cloudless skies: R. Bird and
 * C. Riordan, SERI/TR-215-2436 (1984) and J. Climate Appl. Meteorol. 25 (1986)
 * 87–97, with the constants of NREL's C implementation as docs/PHYSICS.md §10
 * states them (they differ slightly from the report). 122 wavelengths,
 * 300–4000 nm; spectral irradiance in W m⁻² nm⁻¹.
 *
 * Tilted plane: beam by the angle of incidence, sky diffuse by Hay & Davies
 * (1980, anisotropy index A = I_d/(H₀D)), ground reflection isotropic.
 */
import { readFileSync } from 'node:fs';
import { csvParseSync } from '../io/csv-parse.js';
import { UserError } from '../errors.js';
import { fileURLToPath } from 'node:url';

export interface Spectrl2Tables {
  wavelengthNm: Float64Array;
  /** Extraterrestrial spectral irradiance at mean Earth–Sun distance [W m⁻² nm⁻¹]. */
  etrWm2Nm: Float64Array;
  /** Water-vapour absorption coefficient a_w [cm⁻¹]. */
  water: Float64Array;
  /** Ozone absorption coefficient a_o [(atm-cm)⁻¹]. */
  ozone: Float64Array;
  /** Uniformly mixed gas absorption coefficient a_u [km⁻¹]. */
  mixedGas: Float64Array;
}

let tablesCache: Spectrl2Tables | undefined;

/** The 122-wavelength tables shipped in spectra/spectrl2-coefficients.csv (see its provenance note). */
export function spectrl2Tables(): Spectrl2Tables {
  if (tablesCache) return tablesCache;
  const path = fileURLToPath(new URL('../../spectra/spectrl2-coefficients.csv', import.meta.url));
  const parse = csvParseSync();
  const rows = parse(readFileSync(path, 'utf8'), { comment: '#', from_line: 1, skip_empty_lines: true }) as string[][];
  const data = rows.slice(1).map((r) => r.map(Number));
  const col = (k: number) => Float64Array.from(data, (r) => r[k]);
  tablesCache = { wavelengthNm: col(0), etrWm2Nm: col(1), water: col(2), ozone: col(3), mixedGas: col(4) };
  return tablesCache;
}

/** Wavelength-only factors of the model, computed once from the tables. */
interface WavelengthFactors {
  /** 1 / (λ_µm⁴ (115.6406 − 1.3366/λ_µm²)): Rayleigh optical depth per unit pressure-corrected air mass. */
  rayleighDepth: Float64Array;
  /** ln(λ/500 nm), for the Ångström law. */
  lnOver500: Float64Array;
  /** (ln(λ/400 nm))², for the single-scattering albedo. */
  lnOver400Squared: Float64Array;
  /** C_s = ((λ + 550)/1000)^1.8 for λ ≤ 450 nm, else 1. */
  diffuseCorrection: Float64Array;
}

let factorsCache: WavelengthFactors | undefined;

function wavelengthFactors(): WavelengthFactors {
  if (factorsCache) return factorsCache;
  const wl = spectrl2Tables().wavelengthNm;
  const map = (f: (nm: number) => number) => Float64Array.from(wl, f);
  factorsCache = {
    rayleighDepth: map((nm) => {
      const um = nm / 1000;
      return 1 / (um ** 4 * (115.6406 - 1.3366 / (um * um)));
    }),
    lnOver500: map((nm) => Math.log(nm / 500)),
    lnOver400Squared: map((nm) => Math.log(nm / 400) ** 2),
    diffuseCorrection: map((nm) => (nm <= 450 ? ((nm + 550) / 1000) ** 1.8 : 1)),
  };
  return factorsCache;
}

export interface Spectrl2Inputs {
  /** Apparent (refracted) solar zenith angle Z [°], below 90. */
  zenithDeg: number;
  /** Relative optical air mass M [-]; default Kasten–Young of Z. */
  airMass: number;
  /** Surface pressure P [Pa]. */
  pressurePa: number;
  /** Precipitable water W [cm]. */
  waterCm: number;
  /** Total column ozone O₃ [atm-cm]. */
  ozoneAtmCm: number;
  /** Aerosol optical depth at 500 nm τ500 [-]. */
  aod500: number;
  /** Day of year, 1–366. */
  dayOfYear: number;
  /** Ground albedo ρ [-], one value for all wavelengths. */
  albedo: number;
  /** Ångström exponent α [-]; rural aerosol 1.14. */
  alpha: number;
  /** Single-scattering albedo at 400 nm ω₀ [-]; rural aerosol 0.945. */
  omega0: number;
  /** Wavelength variation of the single-scattering albedo ω' [-]; rural aerosol 0.095. */
  omegaPrime: number;
  /** Aerosol asymmetry factor g [-]; rural aerosol 0.65. */
  asymmetry: number;
}

export interface Plane {
  /** Angle of incidence of the beam on the plane θ [°]. */
  aoiDeg: number;
  /** Plane tilt from horizontal β [°]. */
  tiltDeg: number;
}

/** Rural-aerosol defaults of the model (docs/PHYSICS.md §10). */
export const SPECTRL2_RURAL = { alpha: 1.14, omega0: 0.945, omegaPrime: 0.095, asymmetry: 0.65 } as const;

export interface Spectrl2Result {
  wavelengthNm: Float64Array;
  /** Extraterrestrial at the day's Earth–Sun distance, H₀·D [W m⁻² nm⁻¹]. */
  etrWm2Nm: Float64Array;
  /** Direct normal I_d [W m⁻² nm⁻¹]. */
  dniWm2Nm: Float64Array;
  /** Diffuse horizontal I_s [W m⁻² nm⁻¹]. */
  dhiWm2Nm: Float64Array;
  /** Global horizontal I_d cos Z + I_s [W m⁻² nm⁻¹]. */
  ghiWm2Nm: Float64Array;
  /** Plane of array: beam, Hay–Davies sky diffuse and isotropic ground [W m⁻² nm⁻¹]. */
  poaWm2Nm: Float64Array;
  /** Per wavelength, the parts of the plane-of-array irradiance: beam, sky diffuse, ground reflected [W m⁻² nm⁻¹]. */
  poaBeamWm2Nm: Float64Array;
  poaSkyWm2Nm: Float64Array;
  poaGroundWm2Nm: Float64Array;
}

/** Earth–Sun distance factor (R₀/R)², Spencer, Search 2 (1971) 172; doy 1–366. */
export function earthSunFactor(dayOfYear: number): number {
  const b = (2 * Math.PI * (dayOfYear - 1)) / 365;
  return 1.00011 + 0.034221 * Math.cos(b) + 0.00128 * Math.sin(b) + 0.000719 * Math.cos(2 * b) + 0.000077 * Math.sin(2 * b);
}

const RAD = Math.PI / 180;

function check(name: string, x: number, lo: number, hi: number, unit: string): void {
  if (!Number.isFinite(x) || x < lo || x > hi) throw new UserError(`${name} must be a number within ${lo}–${hi}${unit ? ` ${unit}` : ''}, got ${x}`);
}

/** Validate the model inputs (UserError naming the parameter and its allowed range). */
export function checkSpectrl2Inputs(i: Spectrl2Inputs, p?: Plane): void {
  check('zenith', i.zenithDeg, 0, 90, '°');
  if (i.zenithDeg >= 90) throw new UserError(`zenith must be below 90° (the sun above the horizon), got ${i.zenithDeg}`);
  check('air mass', i.airMass, 1 - 1e-9, 40, '');
  check('pressure', i.pressurePa, 30_000, 110_000, 'Pa');
  check('precipitable water', i.waterCm, 0, 10, 'cm');
  check('ozone', i.ozoneAtmCm, 0, 1, 'atm-cm');
  check('aerosol optical depth at 500 nm', i.aod500, 0, 5, '');
  check('day of year', i.dayOfYear, 1, 366, '');
  check('albedo', i.albedo, 0, 1, '');
  check('Ångström exponent', i.alpha, -1, 4, '');
  check('single-scattering albedo', i.omega0, 0, 1, '');
  check("single-scattering albedo wavelength variation ω'", i.omegaPrime, 0, 1, '');
  check('asymmetry', i.asymmetry, 0, 0.99, '');
  if (p) {
    check('angle of incidence', p.aoiDeg, 0, 180, '°');
    check('tilt', p.tiltDeg, 0, 180, '°');
  }
}

/**
 * Clear-sky spectra by SPECTRL2 (docs/PHYSICS.md §10, every equation there in order).
 * @param i atmosphere and sun: Z [°], M [-], P [Pa], W [cm], O₃ [atm-cm], τ500, doy, ρ, α, ω₀, ω', g
 * @param plane receiving plane: angle of incidence θ [°], tilt β [°]; horizontal when omitted
 */
export function spectrl2(i: Spectrl2Inputs, plane: Plane = { aoiDeg: i.zenithDeg, tiltDeg: 0 }): Spectrl2Result {
  checkSpectrl2Inputs(i, plane);
  const t = spectrl2Tables();
  const c = wavelengthFactors();
  const n = t.wavelengthNm.length;
  const d = earthSunFactor(i.dayOfYear);
  const cosZ = Math.cos(i.zenithDeg * RAD);
  const m = i.airMass;
  const pRatio = i.pressurePa / 101300;
  const mP = m * pRatio;
  const mPrimed = 1.8;
  const mPPrimed = 1.8 * pRatio;
  const h = 22 / 6370;
  const mO = (1 + h) / Math.sqrt(cosZ * cosZ + 2 * h);
  const lg = Math.log(1 - i.asymmetry);
  const afs = lg * (1.459 + lg * (0.1595 + lg * 0.4129));
  const bfs = lg * (0.0783 + lg * (-0.3824 - lg * 0.5874));
  const fs = 1 - 0.5 * Math.exp((afs + bfs * cosZ) * cosZ);
  const fsPrimed = 1 - 0.5 * Math.exp((afs + bfs / 1.8) / 1.8);
  const cosAoi = Math.max(Math.cos(plane.aoiDeg * RAD), 0);
  const cosBeta = Math.cos(plane.tiltDeg * RAD);
  const rb = cosAoi / Math.max(cosZ, 0.01745);
  const w = i.waterCm;

  const out = {
    wavelengthNm: Float64Array.from(t.wavelengthNm),
    etrWm2Nm: new Float64Array(n),
    dniWm2Nm: new Float64Array(n),
    dhiWm2Nm: new Float64Array(n),
    ghiWm2Nm: new Float64Array(n),
    poaWm2Nm: new Float64Array(n),
    poaBeamWm2Nm: new Float64Array(n),
    poaSkyWm2Nm: new Float64Array(n),
    poaGroundWm2Nm: new Float64Array(n),
  };
  for (let k = 0; k < n; k++) {
    const h0d = t.etrWm2Nm[k] * d;
    const aw = t.water[k];
    const ao = t.ozone[k];
    const au = t.mixedGas[k];
    // Rayleigh, water and mixed-gas transmittances at the hour's M (M') and at M = 1.8 (M' = 1.8·P/101300);
    // the wavelength-only factors come from the cached tables.
    const rayleighDepth = c.rayleighDepth[k];
    const awW = aw * w;
    const tau = i.aod500 * Math.exp(-i.alpha * c.lnOver500[k]);
    const omega = i.omega0 * Math.exp(-i.omegaPrime * c.lnOver400Squared[k]);

    const lnTr = -mP * rayleighDepth;
    const tr = Math.exp(lnTr);
    const tw = awW === 0 ? 1 : Math.exp((-0.2385 * awW * m) / (1 + 20.07 * awW * m) ** 0.45);
    const to = Math.exp(-ao * i.ozoneAtmCm * mO);
    const tu = au === 0 ? 1 : Math.exp((-1.41 * au * mP) / (1 + 118.3 * au * mP) ** 0.45);
    const tas = Math.exp(-omega * tau * m);
    const taa = Math.exp(-(1 - omega) * tau * m);
    const ta = tas * taa; // exp(−τM) = exp(−ωτM)·exp(−(1 − ω)τM)

    const trP = Math.exp(-mPPrimed * rayleighDepth);
    const twP = awW === 0 ? 1 : Math.exp((-0.2385 * awW * mPrimed) / (1 + 20.07 * awW * mPrimed) ** 0.45);
    const tuP = au === 0 ? 1 : Math.exp((-1.41 * au * mPPrimed) / (1 + 118.3 * au * mPPrimed) ** 0.45);
    const tasP = Math.exp(-omega * tau * mPrimed);
    const taaP = Math.exp(-(1 - omega) * tau * mPrimed);
    const rs = tuP * twP * taaP * (0.5 * (1 - trP) + (1 - fsPrimed) * trP * (1 - tasP));

    const id = h0d * tr * ta * tw * to * tu;
    const kk = h0d * cosZ * to * tu * tw * taa;
    const ir = (kk * (1 - Math.exp(0.95 * lnTr))) / 2;
    const ia = kk * tr * Math.sqrt(tr) * (1 - tas) * fs;
    const ig = ((id * cosZ + ir + ia) * rs * i.albedo) / (1 - rs * i.albedo);
    const cs = c.diffuseCorrection[k];
    const is = (ir + ia + ig) * cs;
    const igh = id * cosZ + is;

    const { beam, sky, ground } = planeParts(id, is, h0d, cosZ, cosAoi, cosBeta, rb, i.albedo);
    out.etrWm2Nm[k] = h0d;
    out.dniWm2Nm[k] = id;
    out.dhiWm2Nm[k] = is;
    out.ghiWm2Nm[k] = igh;
    out.poaBeamWm2Nm[k] = beam;
    out.poaSkyWm2Nm[k] = sky;
    out.poaGroundWm2Nm[k] = ground;
    out.poaWm2Nm[k] = beam + sky + ground;
  }
  return out;
}

/**
 * Irradiance on a tilted plane from direct normal and diffuse horizontal at one
 * wavelength (docs/PHYSICS.md §10): beam I_d·max(cos θ, 0); sky diffuse by Hay &
 * Davies (1980), I_s·[A·R_b + (1 − A)(1 + cos β)/2] with A = I_d/(H₀D); ground
 * (I_d cos Z + I_s)·ρ·(1 − cos β)/2, isotropic. All in the same unit as the inputs.
 * @param id direct normal; @param is diffuse horizontal; @param h0d extraterrestrial at the day's distance
 * @param cosZ cosine of the zenith; @param cosAoi max(cos θ, 0); @param cosBeta cosine of the tilt
 * @param rb max(cos θ, 0)/max(cos Z, 0.01745); @param albedo ground albedo ρ [-]
 */
export function planeParts(id: number, is: number, h0d: number, cosZ: number, cosAoi: number, cosBeta: number, rb: number, albedo: number): { beam: number; sky: number; ground: number } {
  const anisotropy = h0d > 0 ? Math.min(1, id / h0d) : 0;
  return {
    beam: id * cosAoi,
    sky: is * (anisotropy * rb + ((1 - anisotropy) * (1 + cosBeta)) / 2),
    ground: ((id * cosZ + is) * albedo * (1 - cosBeta)) / 2,
  };
}

/** Trapezoid integral of a spectral column over the model's wavelengths [W/m²]. */
export function bandIntegralWm2(wavelengthNm: Float64Array, values: Float64Array): number {
  let s = 0;
  for (let k = 1; k < wavelengthNm.length; k++) s += 0.5 * (values[k] + values[k - 1]) * (wavelengthNm[k] - wavelengthNm[k - 1]);
  return s;
}
