/**
 * Physical constants, 2019 SI exact values (CODATA 2018).
 * Engine units: photon energy [eV], wavelength [nm], current density [A/m²],
 * power [W/m²], temperature [K].
 */

/** Planck constant [J s] (exact). */
export const PLANCK_J_S = 6.62607015e-34;
/** Speed of light in vacuum [m/s] (exact). */
export const LIGHT_SPEED_M_S = 299792458;
/** Elementary charge [C] (exact); also joules per electronvolt. */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
/** Boltzmann constant [J/K] (exact). */
export const BOLTZMANN_J_K = 1.380649e-23;
/** Stefan–Boltzmann constant [W m⁻² K⁻⁴], derived from the exact constants. */
export const STEFAN_BOLTZMANN = (2 * Math.PI ** 5 * BOLTZMANN_J_K ** 4) / (15 * PLANCK_J_S ** 3 * LIGHT_SPEED_M_S ** 2);
/** h·c [eV nm] = 1239.841984… */
export const HC_EV_NM = (PLANCK_J_S * LIGHT_SPEED_M_S) / ELEMENTARY_CHARGE_C * 1e9;
/** h·c [J nm] */
export const HC_J_NM = PLANCK_J_S * LIGHT_SPEED_M_S * 1e9;
/** Boltzmann constant [eV/K]. */
export const BOLTZMANN_EV_K = BOLTZMANN_J_K / ELEMENTARY_CHARGE_C;
/**
 * Blackbody photon-flux prefactor 2π/(h³c²) with energies in eV: photons
 * m⁻² s⁻¹ per eV³ (Planck's law integrated over a hemisphere; used for both
 * the sun and the cell's own emission).
 */
export const BLACKBODY_PREFACTOR_EV = (2 * Math.PI * ELEMENTARY_CHARGE_C ** 3) / (PLANCK_J_S ** 3 * LIGHT_SPEED_M_S ** 2);

/** IAU 2015 nominal solar radius [m]. */
export const SUN_RADIUS_M = 6.957e8;
/** Astronomical unit [m] (IAU 2012, exact). */
export const AU_M = 1.495978707e11;
/** Geometric dilution of sunlight at 1 au, (R_sun/D)² [-] ≈ 2.1627e-5. */
export const DILUTION_ONE_SUN = (SUN_RADIUS_M / AU_M) ** 2;
/** Full concentration C_max = 1/dilution ≈ 46 240 [-]. */
export const MAX_CONCENTRATION = 1 / DILUTION_ONE_SUN;

/** Thermal voltage kT/q [V] at a cell temperature [K]. */
export function thermalVoltageV(tempK: number): number {
  return (BOLTZMANN_J_K * tempK) / ELEMENTARY_CHARGE_C;
}

/** Photon energy [eV] of a wavelength [nm]. */
export function energyEvFromNm(wavelengthNm: number): number {
  return HC_EV_NM / wavelengthNm;
}

/** Convert a current density [A/m²] to the display unit [mA/cm²]. */
export function toMaCm2(jAm2: number): number {
  return jAm2 / 10;
}
