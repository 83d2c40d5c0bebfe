"""Accuracy, not speed: clear-sky plane-of-array totals of the 60-minute year against a
1-minute year, month by month and per component.

The reference is computed with pvlib only, at the midpoint of every minute of the local
year: ``solarposition.get_solarposition`` (NREL SPA, Reda & Andreas 2008),
``clearsky.ineichen`` with pvlib's Linke turbidity climatology (Ineichen & Perez 2002;
Remund et al. 2003), ``irradiance.get_extra_radiation`` (solar constant 1361 W/m2, SPA
distance) and ``irradiance.get_total_irradiance`` with Perez et al. (1990); a minute
counts while the sun's geometric centre is above the horizontal (the engine's
convention). Prints, for each site and plane, the error of each month's total (global,
and the beam, sky-diffuse and ground parts, each as % of the month's global total).
About 5 s per case. Never fails.

Run: python tests/benchmarks/accuracy_clear_sky.py [--step MIN]
"""

from __future__ import annotations

import sys
import time

import numpy as np
import pandas as pd
import pvlib

from tiltyard.engine.jobs import IrradianceOptions, irradiance_year
from tiltyard.engine.site import Site

CASES = [
    (Site("45 N", 45.0, 7.0, 300.0, "Europe/Rome"), 45.0, 180.0),
    (Site("equator", 0.0, 0.0, 0.0, "UTC"), 20.0, 0.0),
    (Site("33.9 S", -33.9, 151.2, 50.0, "Australia/Sydney"), 34.0, 0.0),
    (Site("70 N", 70.0, 20.0, 0.0, "Europe/Oslo"), 60.0, 180.0),
    (Site("45 N", 45.0, 7.0, 300.0, "Europe/Rome"), 90.0, 90.0),
]
PARTS = (("global", "poa_global", "poa_kwh_m2"), ("beam", "poa_direct", "poa_beam_kwh_m2"),
         ("sky", "poa_sky_diffuse", "poa_sky_diffuse_kwh_m2"),
         ("ground", "poa_ground_diffuse", "poa_ground_kwh_m2"))


def one_minute_year(site: Site, tilt: float, azimuth: float) -> pd.DataFrame:
    """Monthly kWh/m2 of each part from the independent 1-minute pvlib year."""
    start = pd.Timestamp(2023, 1, 1).tz_localize(site.timezone)
    end = pd.Timestamp(2024, 1, 1).tz_localize(site.timezone)
    t = pd.date_range(start, end, freq="1min", inclusive="left") + pd.Timedelta(seconds=30)
    pressure = pvlib.atmosphere.alt2pres(site.elevation_m)
    sp = pvlib.solarposition.get_solarposition(t, site.latitude_deg, site.longitude_deg,
                                               site.elevation_m, pressure=pressure,
                                               temperature=12.0)
    up = sp["elevation"].to_numpy() > 0.0
    dni_extra = pvlib.irradiance.get_extra_radiation(t, solar_constant=1361.0, method="nrel")
    zen = sp["apparent_zenith"]
    am = pvlib.atmosphere.get_absolute_airmass(pvlib.atmosphere.get_relative_airmass(zen),
                                               pressure)
    lt = pvlib.clearsky.lookup_linke_turbidity(t, site.latitude_deg, site.longitude_deg)
    cs = pvlib.clearsky.ineichen(zen, am, lt, altitude=site.elevation_m,
                                 dni_extra=dni_extra).fillna(0.0)
    month = (t - pd.Timedelta(seconds=30)).month.to_numpy()
    albedo = np.asarray(site.albedo_by_month(), dtype=float)[month - 1]
    poa = pvlib.irradiance.get_total_irradiance(tilt, azimuth, zen, sp["azimuth"], cs["dni"],
                                                cs["ghi"], cs["dhi"], dni_extra=dni_extra,
                                                albedo=albedo, model="perez").fillna(0.0)
    return pd.DataFrame({name: np.bincount(month, np.where(up, poa[col], 0.0), 13)[1:] / 6e4
                         for name, col, _ in PARTS}, index=range(1, 13))


def main(step_min: int = 60):
    for site, tilt, azimuth in CASES:
        t0 = time.perf_counter()
        ref = one_minute_year(site, tilt, azimuth)
        m = irradiance_year(site, tilt, azimuth, IrradianceOptions(step_min=step_min)).monthly
        ours = pd.DataFrame({name: m[key].to_numpy() for name, _, key in PARTS},
                            index=range(1, 13))
        lit = ref["global"] > 0
        err = ((ours - ref).div(ref["global"], axis=0) * 100.0)[lit]
        worst = err["global"].abs().idxmax()
        print(f"{site.name}, {tilt:g} deg tilt, azimuth {azimuth:g}: year "
              f"{100 * (ours['global'].sum() / ref['global'].sum() - 1):+.3f} %, worst month "
              f"{worst} {err['global'][worst]:+.3f} %  ({time.perf_counter() - t0:.0f} s)")
        print("  month  " + "  ".join(f"{name:>7s}" for name, _, _ in PARTS) + "   (% of the "
              "month's global total)")
        for month, row in err.iterrows():
            print(f"  {month:5d}  " + "  ".join(f"{row[name]:+7.3f}" for name, _, _ in PARTS))


if __name__ == "__main__":
    main(int(sys.argv[sys.argv.index("--step") + 1]) if "--step" in sys.argv else 60)
