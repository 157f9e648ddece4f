/** One hourly weather record as the readers hand it on: SI-like units, NaN where the file says "missing". */
export interface WeatherHour {
  /** 1-based line of the record in its file (for messages). */
  line: number;
  /** End of the averaging interval, as a UTC instant [ms since the Unix epoch] (the files' stamps are hour-ending, local standard time). */
  endUtcMs: number;
  /** Local standard time stamp as written (ISO-like text, for labels). */
  localLabel: string;
  month: number;
  /** Global horizontal irradiance [W/m²]. */
  ghiWm2: number;
  /** Direct normal irradiance [W/m²]. */
  dniWm2: number;
  /** Diffuse horizontal irradiance [W/m²]. */
  dhiWm2: number;
  /** Dry-bulb air temperature [°C]. */
  airTempC: number;
  /** Dew-point temperature [°C]. */
  dewPointC: number;
  /** Relative humidity [%]. */
  relHumidityPct: number;
  /** Station pressure [hPa]. */
  pressureHpa: number;
  /** Wind speed [m/s]. */
  windMs: number;
  /** Precipitable water [cm]. */
  waterCm: number;
  /** Broadband aerosol optical depth [-]. */
  aodBroadband: number;
  /** Ground albedo [-]. */
  albedo: number;
}

export interface WeatherSite {
  name: string;
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  /** Offset of local standard time from UTC [h]. */
  utcOffsetHours: number;
}

export interface WeatherFile {
  format: 'epw' | 'tmy3';
  path: string;
  /** SHA-256 of the file bytes (hex). */
  sha256: string;
  site: WeatherSite;
  hours: WeatherHour[];
}
