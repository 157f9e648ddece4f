#!/usr/bin/env python3
"""Write a dozen invented typical-year weather files (EPW layout) for demos.

Every site here is invented: its name, and its weather, which is a simple
clear-sky envelope times an invented cloudiness, with invented temperatures,
dew points, wind and pressure. None of it is a measurement of any place.

Layout: the public EnergyPlus weather file format (8 header lines, then 8760
hourly rows of 35 comma-separated fields, hour-ending local standard time).
Fields that the format allows to be missing are written with its missing-value
codes (illuminances, ceiling, visibility, precipitable water, AOD, snow).

Deterministic: one seed per site, derived from the site's index; rerunning
writes byte-identical files.

    python3 examples/sites/generate.py [OUT_DIR]   # default: this script's folder

Models (all simple published forms, each cited below):
* sun position: Spencer (1971) Fourier series for declination and equation of
  time (from memory); hour angle at mid-interval of each hour-ending row.
* clear sky: direct normal 1361 W/m² x E0 x 0.7^(AM^0.678) (Meinel & Meinel
  1976, from memory), air mass by Kasten & Young (1989), scaled by station
  pressure; clear-sky diffuse 10 % of the horizontal direct part (common
  practice).
* clouds: global horizontal = clear-sky x (1 - 0.75 C^3.4) for cloud cover C
  in [0, 1] (Kasten & Czeplak 1980, from memory); diffuse fraction from the
  hourly clearness index by Erbs, Klein & Duffie (1982) (from memory); direct
  normal = (global - diffuse) / cos(zenith).
* relative humidity from temperature and dew point by the Magnus formula with
  Alduchov & Eskridge (1996) constants (from memory); pressure from elevation
  by the standard-atmosphere barometric formula (common practice).
"""
import math
import os
import sys

import numpy as np

SOLAR_CONSTANT = 1361.0  # [W/m²], common practice (Kopp & Lean 2011, from memory)
DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]
YEAR = 2001  # a non-leap year written on every row; the weather is invented

# Invented sites: (file stem, name, region, country, lat [deg N], lon [deg E],
# elevation [m], climate). Climate parameters:
#   cloud_mean  mean cloud cover [0..1]          cloud_season  its summer-winter swing (+ = cloudier in summer)
#   t_mean      annual mean temperature [°C]     t_season      half the summer-winter swing [K]
#   t_day       half the diurnal swing [K]       dew_dep       mean dew-point depression [K]
#   wind        mean wind speed [m/s]            albedo        ground albedo
#   haze        clear-sky beam transmittance relative to the Meinel envelope (humid and dusty air < 1)
SITES = [
    ('dunmere-flats', 'Dunmere Flats', 'Inland Basin', 'Invented', 24.6, 8.4, 520, dict(cloud_mean=0.06, cloud_season=0.02, t_mean=27.0, t_season=9.0, t_day=8.0, dew_dep=20.0, wind=4.0, albedo=0.32, haze=0.93)),
    ('harrowgate-mesa', 'Harrowgate Mesa', 'High Plateau', 'Invented', 33.9, -111.2, 1480, dict(cloud_mean=0.15, cloud_season=0.08, t_mean=16.0, t_season=10.0, t_day=9.0, dew_dep=15.0, wind=3.5, albedo=0.25, haze=0.97)),
    ('saltreach', 'Saltreach', 'Coastal Desert', 'Invented', -22.8, -69.6, 1150, dict(cloud_mean=0.05, cloud_season=0.01, t_mean=17.0, t_season=4.0, t_day=7.0, dew_dep=14.0, wind=5.0, albedo=0.30, haze=1.00)),
    ('kelvara-bay', 'Kelvara Bay', 'Southern Delta', 'Invented', 23.1, 113.6, 12, dict(cloud_mean=0.62, cloud_season=0.15, t_mean=22.5, t_season=7.0, t_day=3.5, dew_dep=4.0, wind=2.5, albedo=0.18, haze=0.78)),
    ('marsh-end', 'Marsh End', 'Gulf Lowlands', 'Invented', 29.9, -90.4, 4, dict(cloud_mean=0.48, cloud_season=0.10, t_mean=20.5, t_season=8.0, t_day=5.0, dew_dep=4.5, wind=3.0, albedo=0.17, haze=0.82)),
    ('orvale', 'Orvale', 'Monsoon Coast', 'Invented', 13.2, 80.1, 20, dict(cloud_mean=0.50, cloud_season=0.25, t_mean=28.5, t_season=3.0, t_day=4.5, dew_dep=5.0, wind=3.2, albedo=0.18, haze=0.80)),
    ('fenwick-moor', 'Fenwick Moor', 'Northern Uplands', 'Invented', 56.4, -3.9, 210, dict(cloud_mean=0.74, cloud_season=-0.05, t_mean=8.0, t_season=6.0, t_day=3.5, dew_dep=2.5, wind=5.5, albedo=0.20, haze=0.92)),
    ('skarholm', 'Skarholm', 'Fjord Coast', 'Invented', 60.6, 5.6, 35, dict(cloud_mean=0.78, cloud_season=-0.06, t_mean=7.0, t_season=7.0, t_day=3.0, dew_dep=2.5, wind=4.5, albedo=0.22, haze=0.94)),
    ('tallow-point', 'Tallow Point', 'Cold Littoral', 'Invented', -45.9, -67.5, 60, dict(cloud_mean=0.45, cloud_season=-0.05, t_mean=12.0, t_season=6.5, t_day=5.0, dew_dep=8.0, wind=8.0, albedo=0.20, haze=0.95)),
    ('verdance', 'Verdance', 'River Plain', 'Invented', 48.2, 11.3, 480, dict(cloud_mean=0.60, cloud_season=-0.10, t_mean=9.5, t_season=9.5, t_day=5.0, dew_dep=4.0, wind=3.0, albedo=0.20, haze=0.90)),
    ('amberlake', 'Amberlake', 'Highland Savanna', 'Invented', -1.4, 36.7, 1700, dict(cloud_mean=0.42, cloud_season=0.05, t_mean=18.5, t_season=1.5, t_day=6.0, dew_dep=7.0, wind=3.5, albedo=0.20, haze=0.84)),
    ('cinder-reach', 'Cinder Reach', 'Mediterranean Shore', 'Invented', 37.3, -5.8, 90, dict(cloud_mean=0.25, cloud_season=-0.20, t_mean=18.5, t_season=8.0, t_day=7.5, dew_dep=9.0, wind=3.0, albedo=0.22, haze=0.90)),
]


def day_of_year_and_hour():
    """[day of year 1..365], [month], [day of month], [hour 1..24] for the 8760 hour-ending rows."""
    doy, month, dom, hour = [], [], [], []
    n = 0
    for m, days in enumerate(DAYS_IN_MONTH, start=1):
        for d in range(1, days + 1):
            n += 1
            for h in range(1, 25):
                doy.append(n)
                month.append(m)
                dom.append(d)
                hour.append(h)
    return np.array(doy), np.array(month), np.array(dom), np.array(hour)


def sun_geometry(doy, hour, lat_deg, lon_deg, tz_hours):
    """cos(zenith) at each hour's mid-interval, and E0 the Earth-Sun distance factor [-]."""
    gamma = 2 * np.pi * (doy - 1) / 365.0
    decl = (0.006918 - 0.399912 * np.cos(gamma) + 0.070257 * np.sin(gamma) - 0.006758 * np.cos(2 * gamma)
            + 0.000907 * np.sin(2 * gamma) - 0.002697 * np.cos(3 * gamma) + 0.00148 * np.sin(3 * gamma))
    eot_min = 229.18 * (0.000075 + 0.001868 * np.cos(gamma) - 0.032077 * np.sin(gamma)
                        - 0.014615 * np.cos(2 * gamma) - 0.040849 * np.sin(2 * gamma))
    e0 = (1.000110 + 0.034221 * np.cos(gamma) + 0.001280 * np.sin(gamma)
          + 0.000719 * np.cos(2 * gamma) + 0.000077 * np.sin(2 * gamma))
    clock = hour - 0.5  # mid-interval of an hour-ending row [h, local standard time]
    solar_time = clock + (eot_min + 4.0 * (lon_deg - 15.0 * tz_hours)) / 60.0
    omega = np.radians(15.0 * (solar_time - 12.0))
    phi = math.radians(lat_deg)
    cosz = np.sin(phi) * np.sin(decl) + np.cos(phi) * np.cos(decl) * np.cos(omega)
    return cosz, e0


def kasten_young_air_mass(cosz):
    """Relative optical air mass [-] (Kasten & Young 1989); inf below the horizon."""
    zen = np.degrees(np.arccos(np.clip(cosz, -1.0, 1.0)))
    am = np.full_like(cosz, np.inf)
    up = zen < 90.0
    am[up] = 1.0 / (cosz[up] + 0.50572 * (96.07995 - zen[up]) ** -1.6364)
    return am


def erbs_diffuse_fraction(kt):
    """Diffuse fraction of global horizontal from the clearness index (Erbs et al. 1982)."""
    return np.where(kt <= 0.22, 1.0 - 0.09 * kt,
                    np.where(kt <= 0.80, 0.9511 - 0.1604 * kt + 4.388 * kt ** 2 - 16.638 * kt ** 3 + 12.336 * kt ** 4,
                             0.165))


def ar1(rng, n, rho, sigma):
    """A stationary first-order autoregressive series of length n, zero mean, standard deviation sigma."""
    out = np.empty(n)
    x = rng.normal(0.0, sigma)
    innov = rng.normal(0.0, sigma * math.sqrt(1 - rho * rho), n)
    for i in range(n):
        x = rho * x + innov[i]
        out[i] = x
    return out


def magnus_rh(t_c, dew_c):
    """Relative humidity [%] from temperature and dew point [°C] (Magnus form)."""
    a, b = 17.625, 243.04
    return 100.0 * np.exp(a * dew_c / (b + dew_c) - a * t_c / (b + t_c))


def site_rows(index, site):
    stem, name, region, country, lat, lon, elev, c = site
    rng = np.random.default_rng(20261203 + 7919 * index)
    tz = round(lon / 15.0)
    doy, month, dom, hour = day_of_year_and_hour()
    n = doy.size
    cosz, e0 = sun_geometry(doy, hour, lat, lon, tz)
    up = cosz > 0.0
    pressure_pa = 101325.0 * (1 - 2.25577e-5 * elev) ** 5.25588

    # Season: +1 at local midsummer (day 172 north, day 355 south).
    summer = np.cos(2 * np.pi * (doy - (172 if lat >= 0 else 355)) / 365.0)

    # Cloud cover: a daily weather regime plus hourly jitter, clipped to [0, 1].
    days = 365
    daily = ar1(rng, days, 0.7, 0.30)
    cloud_mean_day = c['cloud_mean'] + c['cloud_season'] * summer[::24]
    # A logistic map keeps the mean near cloud_mean while allowing clear and overcast days.
    logit = np.log(np.clip(cloud_mean_day, 0.02, 0.98) / (1 - np.clip(cloud_mean_day, 0.02, 0.98)))
    day_cover = 1.0 / (1.0 + np.exp(-(logit + 3.0 * daily)))
    cover = np.clip(np.repeat(day_cover, 24) + rng.normal(0.0, 0.08, n), 0.0, 1.0)

    # Clear-sky envelope and cloudy global, diffuse, direct [W/m², = Wh/m² over the hour].
    am = kasten_young_air_mass(cosz) * (pressure_pa / 101325.0)
    dni_clear = np.where(up, SOLAR_CONSTANT * e0 * c['haze'] * 0.7 ** (np.where(up, am, 1.0) ** 0.678), 0.0)
    ghi_clear = np.where(up, dni_clear * cosz * 1.1, 0.0)
    ghi = ghi_clear * (1.0 - 0.75 * cover ** 3.4)
    etr_h = np.where(up, SOLAR_CONSTANT * e0 * cosz, 0.0)
    kt = np.where(etr_h > 1.0, ghi / np.maximum(etr_h, 1e-9), 0.0)
    kt = np.clip(kt, 0.0, 1.0)
    dhi = np.where(up, ghi * erbs_diffuse_fraction(kt), 0.0)
    dni = np.where(cosz > 0.0174, (ghi - dhi) / np.maximum(cosz, 0.0174), 0.0)  # no beam within 1° of the horizon
    dhi = np.where(cosz > 0.0174, dhi, ghi)  # near the horizon, all of it diffuse
    dni = np.maximum(dni, 0.0)

    # Temperature: annual and diurnal waves (warmest mid-afternoon), cooled by clouds, plus weather noise.
    t_noise = ar1(rng, n, 0.97, 1.8)
    diurnal = np.cos(2 * np.pi * (hour - 0.5 - 15.0) / 24.0)
    t_air = c['t_mean'] + c['t_season'] * summer + c['t_day'] * (1.0 - 0.6 * cover) * diurnal + t_noise
    dew_dep = np.clip(c['dew_dep'] * (1.0 - 0.6 * cover) + 0.3 * c['t_day'] * (diurnal + 1.0) + rng.normal(0.0, 1.0, n), 0.3, None)
    dew = t_air - dew_dep
    rh = np.clip(magnus_rh(t_air, dew), 1.0, 100.0)
    p_station = pressure_pa + ar1(rng, n, 0.995, 600.0)

    # Wind: Weibull (shape 2) speed, a prevailing direction with wander.
    wind = c['wind'] * rng.weibull(2.0, n) / 0.8862
    wind_dir = np.mod(np.rint(240.0 + ar1(rng, n, 0.98, 50.0)), 360.0)  # whole degrees in [0, 360)

    sky_tenths = np.rint(cover * 10).astype(int)
    opaque_tenths = np.minimum(sky_tenths, np.rint(cover ** 1.5 * 10).astype(int))

    header = [
        f'LOCATION,{name},{region},{country},invented by examples/sites/generate.py,000000,{lat:.4f},{lon:.4f},{tz:.1f},{elev:.1f}',
        'DESIGN CONDITIONS,0',
        'TYPICAL/EXTREME PERIODS,0',
        'GROUND TEMPERATURES,0',
        'HOLIDAYS/DAYLIGHT SAVING,No,0,0,0',
        'COMMENTS 1,Invented site and weather for gapstack demos: not a measurement of any place',
        f'COMMENTS 2,Climate: cloud cover mean {c["cloud_mean"]:.2f}; annual mean temperature {c["t_mean"]:.1f} C; seed {20261203 + 7919 * index}',
        'DATA PERIODS,1,1,Data,Monday, 1/ 1,12/31',
    ]
    rows = []
    for i in range(n):
        fields = [
            str(YEAR), str(month[i]), str(dom[i]), str(hour[i]), '0',
            '?9?9?9?9E0?9?9?9?9?9?9?9?9?9?9?9?9?9?9?9*9*9?9?9?9',
            f'{t_air[i]:.1f}', f'{dew[i]:.1f}', f'{rh[i]:.0f}', f'{p_station[i]:.0f}',
            f'{etr_h[i]:.0f}', f'{(SOLAR_CONSTANT * e0[i]) if up[i] else 0.0:.0f}', '9999',
            f'{ghi[i]:.0f}', f'{dni[i]:.0f}', f'{dhi[i]:.0f}',
            '999999', '999999', '999999', '9999',
            f'{wind_dir[i]:.0f}', f'{wind[i]:.1f}', str(sky_tenths[i]), str(opaque_tenths[i]),
            '9999', '99999', '9', '999999999',
            '999', '.999', '999', '99', f'{c["albedo"]:.2f}', '999', '99',
        ]
        rows.append(','.join(fields))
    return stem, '\n'.join(header + rows) + '\n'


def main():
    out_dir = sys.argv[1] if len(sys.argv) > 1 else os.path.dirname(os.path.abspath(__file__))
    os.makedirs(out_dir, exist_ok=True)
    for index, site in enumerate(SITES):
        stem, text = site_rows(index, site)
        with open(os.path.join(out_dir, f'{stem}.epw'), 'w', newline='') as f:
            f.write(text)


if __name__ == '__main__':
    main()
