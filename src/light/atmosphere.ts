/** Small published models of the atmosphere and the module that the hourly site year needs. */

/**
 * Saturation water-vapour pressure over water [hPa], Gueymard, J. Appl. Meteorol.
 * 32 (1993) 1294, Eq. 1: e_s = exp(22.330 − 49.140·(100/T) − 10.922·(100/T)² − 0.39015·T/100).
 * @param tempK temperature [K]
 */
export function saturationVapourPressureHpa(tempK: number): number {
  const x = 100 / tempK;
  return Math.exp(22.33 - 49.14 * x - 10.922 * x * x - 0.39015 * (tempK / 100));
}

/**
 * Precipitable water [cm] from surface air temperature and dew point, Gueymard,
 * Sol. Energy 53 (1994) 57, Eqs. 1, 2 and 4: w = 0.1·H_v·ρ_v with the apparent
 * scale height H_v = 0.4976 + 1.5265·θ + exp(13.6897·θ − 14.9188·θ³), θ = T/273.15 [km],
 * and the vapour density ρ_v = 216.7·e/T [g/m³], here with the actual vapour
 * pressure e = e_s(T_dew) (Gueymard 1993). Floored at 0.1 cm (stated accuracy
 * ≈ 20 % at 1–3 cm; below 0.1 cm the fit is not meant to be used).
 * @param airTempC dry-bulb temperature [°C]; @param dewPointC dew point [°C]
 */
export function precipitableWaterFromDewPointCm(airTempC: number, dewPointC: number): number {
  const t = airTempC + 273.15;
  const theta = t / 273.15;
  const hv = 0.4976 + 1.5265 * theta + Math.exp(13.6897 * theta - 14.9188 * theta ** 3);
  const rhoV = (216.7 * saturationVapourPressureHpa(Math.min(dewPointC, airTempC) + 273.15)) / t;
  return Math.max(0.1, 0.1 * hv * rhoV);
}

/**
 * Pressure of the ISO 2533 standard atmosphere at an elevation [hPa]:
 * P = 1013.25·(1 − 2.25577e-5·h)^5.25588 (common practice).
 * @param elevationM elevation above sea level [m]
 */
export function standardPressureHpa(elevationM: number): number {
  return 1013.25 * (1 - 2.25577e-5 * elevationM) ** 5.25588;
}

/** Faiman heat-loss coefficients: U₀ [W m⁻² K⁻¹], U₁ [W m⁻³ s K⁻¹]. */
export interface FaimanCoefficients {
  u0: number;
  u1: number;
}

/**
 * U₀ = 25 W m⁻² K⁻¹, U₁ = 6.84 W s m⁻³ K⁻¹: Faiman's fit for seven silicon modules on an open rack
 * (Prog. Photovolt. 16 (2008) 307), the defaults pvlib documents for temperature.faiman
 * (pvlib-python, a general-purpose PV modelling library); user-settable.
 */
export const FAIMAN_DEFAULT: FaimanCoefficients = { u0: 25, u1: 6.84 };

/**
 * Steady-state module temperature [°C], Faiman, Prog. Photovolt. 16 (2008) 307:
 * T_c = T_amb + G_poa / (U₀ + U₁·v).
 * @param airTempC ambient temperature [°C]; @param poaWm2 plane-of-array irradiance [W/m²]; @param windMs wind speed [m/s]
 */
export function faimanCellTempC(airTempC: number, poaWm2: number, windMs: number, c: FaimanCoefficients = FAIMAN_DEFAULT): number {
  return airTempC + poaWm2 / (c.u0 + c.u1 * Math.max(0, windMs));
}
