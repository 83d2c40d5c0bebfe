"""Extraterrestrial and clear-sky irradiance.

Extraterrestrial normal irradiance is the solar constant scaled by the inverse
square of the SPA Earth-Sun distance. Clear-sky models are those of pvlib:
Ineichen-Perez (with the Linke turbidity climatology pvlib ships, or monthly
values from the site file), simplified Solis, and Haurwitz. Haurwitz gives
global horizontal irradiance only; where beam and diffuse are needed it is
split with the Erbs et al. (1982) correlation, and outputs say so.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
import pvlib

from .choices import CLEARSKY_MODELS as CLEARSKY_MODELS
from .choices import SOLAR_CONSTANT_W_M2 as SOLAR_CONSTANT_W_M2
from .geometry import (
    azimuth_north_to_south_based,
    declination_hour_angle,
    incidence_coefficients,
)
from .site import Site
from .solarpos import earth_sun_distance_au, site_pressure_pa
from .sun import daily_declination_eot
from .timegrid import REFERENCE_YEAR

#: Highest site the Ineichen-Perez clear sky is used for, m. Above it its altitude terms
#: (``cg1 = 5.09e-5 h + 0.868``, ``fh1 = exp(-h / 8000)``; Ineichen & Perez 2002) drive
#: clear-sky GHI towards, and past, the extraterrestrial irradiance (our own check: 94 %
#: of H0 at 4000 m, 99 % at 6000 m; pvlib issue #285 reports the same at 20 km).
INEICHEN_MAX_ELEVATION_M = 4000.0

CLEARSKY_REFERENCES = {
    "ineichen": "Ineichen, P. & Perez, R. (2002). A new airmass independent formulation for "
                "the Linke turbidity coefficient. Solar Energy 73(3), 151-157.",
    "simplified_solis": "Ineichen, P. (2008). A broadband simplified version of the Solis "
                        "clear sky model. Solar Energy 82(8), 758-762.",
    "haurwitz": "Haurwitz, B. (1945). Insolation in relation to cloudiness and cloud density. "
                "J. Meteorology 2, 154-166 (GHI only; beam and diffuse split by Erbs, Klein & "
                "Duffie 1982, Solar Energy 28(4), 293-302).",
}


def extraterrestrial_normal(times: pd.DatetimeIndex,
                            solar_constant_w_m2: float = SOLAR_CONSTANT_W_M2,
                            delta_t: float | None = None) -> np.ndarray:
    """Extraterrestrial irradiance on a plane normal to the sun, W/m².

    Parameters
    ----------
    times : pandas.DatetimeIndex
        Timezone-aware instants.
    solar_constant_w_m2 : float, default 1361
        Mean total solar irradiance at 1 AU.
    delta_t : float, optional
        TT - UT1 (s) of the positions already computed at ``times``, whose
        SPA distance is then reused
        (:func:`tiltyard.engine.solarpos.earth_sun_distance_au`).

    Returns
    -------
    numpy.ndarray
        ``solar_constant / R^2`` with ``R`` the Earth-Sun distance in AU.

    References
    ----------
    Inverse-square law; distance by Reda & Andreas (2008), NREL/TP-560-34302,
    sec. 3.2.8. Solar constant: Kopp & Lean (2011), GRL 38, L01706.
    """
    if not 1000.0 <= solar_constant_w_m2 <= 1500.0:
        raise ValueError(f"solar_constant_w_m2 = {solar_constant_w_m2!r}: must be between "
                         "1000 and 1500 W/m2")
    r = earth_sun_distance_au(times, delta_t)
    return solar_constant_w_m2 / r**2


def extraterrestrial_on_plane(dni_extra, zenith, aoi) -> np.ndarray:
    """Extraterrestrial irradiance on a plane, W/m².

    ``G_on max(cos(aoi), 0)`` while the sun is above the geometric horizon
    (``zenith < 90``). For a horizontal plane ``aoi == zenith``.

    Parameters
    ----------
    dni_extra : array_like
        Extraterrestrial normal irradiance, W/m².
    zenith : array_like
        Geometric (unrefracted) solar zenith, degrees.
    aoi : array_like
        Angle of incidence on the plane, degrees.

    References
    ----------
    Duffie & Beckman (2013), Solar Engineering of Thermal Processes, eq. 1.10.1.
    """
    g = np.asarray(dni_extra, dtype=float) * np.maximum(np.cos(np.radians(aoi)), 0.0)
    return np.where(np.asarray(zenith) < 90.0, g, 0.0)


#: Mean rate of the solar hour angle, rad/s (360° per mean solar day).
HOUR_ANGLE_RATE_RAD_S = 2.0 * np.pi / 86400.0


def _positive_part_integral(a, b, c, w1, w2):
    """Integral of ``max(a + b cos(w) + c sin(w), 0)`` over ``[w1, w2]`` (radians).

    Closed form: the antiderivative ``a w + b sin w - c cos w`` between the
    interval ends and the roots of ``a + R cos(w - psi) = 0`` inside it
    (``R = hypot(b, c)``, ``psi = atan2(c, b)``), keeping the parts where the
    integrand is positive. Vectorised; ``w2 - w1`` must be below ``pi``.

    References
    ----------
    Duffie & Beckman (2013), eq. 1.6.2 grouped as in Klein (1977), integrated
    term by term (the same integration that gives eq. 1.10.3).
    """
    a, b, c, w1, w2 = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (a, b, c, w1, w2)))
    r = np.hypot(b, c)
    psi = np.arctan2(c, b)
    with np.errstate(invalid="ignore", divide="ignore"):
        half = np.arccos(np.clip(-a / np.where(r > 0, r, 1.0), -1.0, 1.0))
    mid = 0.5 * (w1 + w2)
    r1, r2 = (np.clip(mid + (root - mid + np.pi) % (2.0 * np.pi) - np.pi, w1, w2)
              for root in (psi - half, psi + half))
    p = np.stack([w1, np.minimum(r1, r2), np.maximum(r1, r2), w2], axis=-1)

    def anti(w):
        return a[..., None] * w + b[..., None] * np.sin(w) - c[..., None] * np.cos(w)

    centre = 0.5 * (p[..., 1:] + p[..., :-1])
    positive = (a[..., None] + b[..., None] * np.cos(centre) + c[..., None] * np.sin(centre)) > 0
    seg = anti(p[..., 1:]) - anti(p[..., :-1])
    return np.sum(np.where(positive, seg, 0.0), axis=-1)


def extraterrestrial_interval_mean(dni_extra, zenith, azimuth, latitude_deg: float,
                                   surface_tilt, surface_azimuth, sun_up_fraction,
                                   step_min: float) -> np.ndarray:
    """Extraterrestrial irradiance on a plane, averaged exactly over each interval, W/m².

    The mean over the whole interval of ``G_on max(cos(theta), 0)`` while the
    sun's geometric centre is above the horizontal. Each interval's sun-up
    part (``sun_up_fraction`` of it, centred on the evaluation instant, as
    :func:`tiltyard.engine.sun.evaluation_points` places it) is integrated in
    closed form over the hour angle, with the declination and ``G_on`` held at
    their values at the evaluation instant (they change by under 0.02° and
    0.002 % in an hour). The declination and hour angle are those of the SPA
    topocentric geometric zenith and azimuth at that instant, so the result at
    the instant reproduces SPA, and the angle of incidence uses the true
    (geometric) sun, not the refracted one. A horizontal plane
    (``surface_tilt = 0``) gives the extraterrestrial horizontal irradiance.

    Against a 1-minute midpoint year the annual and monthly totals of a
    60-minute year agree to better than 0.01 % (tests/engine/test_sky.py);
    the plain midpoint rule is 0.1-0.3 % high at 60 minutes (the mean of a
    concave ``cos`` over 15° of hour angle is below its middle value).

    Parameters
    ----------
    dni_extra : array_like
        Extraterrestrial normal irradiance at the evaluation instants, W/m².
    zenith, azimuth : array_like
        SPA geometric zenith and azimuth (clockwise from north) there, degrees.
    latitude_deg : float
        Site latitude.
    surface_tilt, surface_azimuth : float or array_like
        Plane tilt and azimuth (clockwise from north), degrees.
    sun_up_fraction : array_like
        Sun-up share of each interval (0-1).
    step_min : float
        Interval length, minutes.

    Returns
    -------
    numpy.ndarray
        Interval-mean irradiance, W/m² (zero where the sun is down).

    References
    ----------
    Duffie & Beckman (2013), Solar Engineering of Thermal Processes, eqs.
    1.6.2 (angle of incidence by hour angle), 1.10.1 and the integration of
    1.10.3; positions by Reda & Andreas (2008), NREL/TP-560-34302.
    """
    frac = np.asarray(sun_up_fraction, dtype=float)
    out = np.zeros(frac.shape)
    up = frac > 0
    tilt, saz = (np.asarray(v, dtype=float) for v in (surface_tilt, surface_azimuth))
    tilt = tilt[up] if tilt.ndim else tilt
    saz = saz[up] if saz.ndim else saz
    frac = frac[up]
    phi = np.radians(latitude_deg)
    delta, omega = declination_hour_angle(phi, np.radians(np.asarray(zenith, dtype=float)[up]),
                                          np.radians(np.asarray(azimuth, dtype=float)[up]))
    a, b, c = incidence_coefficients(phi, delta, np.radians(tilt),
                                     np.radians(azimuth_north_to_south_based(saz)))
    half_w = 0.5 * frac * step_min * 60.0 * HOUR_ANGLE_RATE_RAD_S
    integral = _positive_part_integral(a, b, c, omega - half_w, omega + half_w)
    g_on = np.broadcast_to(np.asarray(dni_extra, dtype=float), out.shape)[up]
    out[up] = g_on * np.maximum(integral / (2.0 * half_w), 0.0) * frac
    return out


def daily_extraterrestrial_kwh_m2(site: Site, year: int = REFERENCE_YEAR,
                                  surface_tilt: float = 0.0, surface_azimuth: float | None = None,
                                  solar_constant_w_m2: float = SOLAR_CONSTANT_W_M2,
                                  n_hour_angle: int = 2880) -> pd.Series:
    """Daily extraterrestrial irradiation on any plane, by integration over the day.

    For each day the declination and Earth-Sun distance are taken from SPA at
    local solar noon; the product ``G_on max(cos(theta), 0)`` with the sun above
    the horizontal is integrated over the hour angle on ``n_hour_angle``
    midpoint samples (0.125° of hour angle, 30 s of time, by default). This is
    the numerical path needed for tilted planes (whose sunrise on the plane
    differs from the horizon's) and for polar day, where the sunset-hour-angle
    closed form does not apply to tilted surfaces.

    Parameters
    ----------
    site : Site
        Latitude (and longitude for local noon).
    year : int
        Calendar year.
    surface_tilt : float, default 0
        Plane tilt, degrees.
    surface_azimuth : float, optional
        Plane azimuth clockwise from north; defaults to the equator direction.
    solar_constant_w_m2 : float, default 1361
        Solar constant.
    n_hour_angle : int, default 2880
        Samples per day.

    Returns
    -------
    pandas.Series
        Irradiation in kWh/m² per day, indexed by date.

    References
    ----------
    Duffie & Beckman (2013), eqs. 1.6.2 (angle of incidence from declination,
    latitude, slope, surface azimuth and hour angle) and 1.10.1; declination
    and distance from Reda & Andreas (2008), NREL/TP-560-34302.
    """
    if surface_azimuth is None:
        surface_azimuth = site.equator_azimuth_deg
    de = daily_declination_eot(site, year)
    days = pd.to_datetime(pd.Index(de.index))
    noon = (days + pd.Timedelta(hours=12)
            - pd.Timedelta(hours=site.longitude_deg / 15.0)).tz_localize("UTC")
    e0 = extraterrestrial_normal(noon, solar_constant_w_m2)
    phi = np.radians(site.latitude_deg)
    delta = np.radians(de["declination_deg"].to_numpy())[:, None]
    w = np.radians(-180.0 + (np.arange(n_hour_angle) + 0.5) * 360.0 / n_hour_angle)[None, :]
    beta = np.radians(surface_tilt)
    gamma = np.radians(azimuth_north_to_south_based(surface_azimuth))
    az, bz, _ = incidence_coefficients(phi, delta, 0.0, 0.0)
    cos_z = az + bz * np.cos(w)
    at, bt, ct = incidence_coefficients(phi, delta, beta, gamma)
    cos_t = at + bt * np.cos(w) + ct * np.sin(w)
    integrand = np.where(cos_z > 0, np.maximum(cos_t, 0.0), 0.0)
    # dt = dw * 24 h / (2 pi)
    hours_per_sample = 24.0 / n_hour_angle
    kwh = e0 * integrand.sum(axis=1) * hours_per_sample / 1000.0
    return pd.Series(kwh, index=de.index, name="h0_kwh_m2_day")


# -- clear sky ------------------------------------------------------------------

def monthly_to_daily(values_by_month, times: pd.DatetimeIndex) -> np.ndarray:
    """Interpolate 12 monthly values to the given times, periodic over the year.

    Each month's value sits at the middle of the month (by day of year); days
    between are linearly interpolated, wrapping December to January.

    References
    ----------
    The mid-month interpolation pvlib applies to its Linke turbidity
    climatology (pvlib.clearsky.lookup_linke_turbidity, interp_turbidity=True);
    common practice, no source. Here each day counts at its midday, so a
    31-day month's value falls on its 16th; pvlib compares the 1-based day of
    year with the same month middles and so sits half a day earlier (a
    difference of half a day's change, below 0.01 in Linke turbidity for its
    climatology).
    """
    v = np.asarray(values_by_month, dtype=float)
    month_len = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31], dtype=float)
    mid = np.cumsum(month_len) - month_len / 2.0
    doy = pd.DatetimeIndex(times).day_of_year.to_numpy() - 0.5
    return np.interp(doy, mid, v, period=365.0)


@dataclass(frozen=True)
class ClearSky:
    """Clear-sky irradiance at a set of instants.

    Attributes
    ----------
    data : pandas.DataFrame
        ``ghi``, ``dni``, ``dhi`` in W/m², plus ``linke_turbidity`` for
        Ineichen-Perez.
    model : str
        Model name.
    turbidity_source : str
        Where the Linke turbidity came from (or "not used").
    note : str
        Caveat to show with the results (clear-sky is an upper bound; a GHI-only
        model's decomposition).
    """

    data: pd.DataFrame
    model: str
    turbidity_source: str
    note: str


def linke_turbidity(times: pd.DatetimeIndex, site: Site) -> tuple[np.ndarray, str]:
    """Linke turbidity at the given times and where it came from.

    Monthly values from the site file override pvlib's climatology.

    References
    ----------
    Remund, J., Wald, L., Lefevre, M., Ranchin, T. & Page, J. (2003).
    Worldwide Linke turbidity information. Proc. ISES Solar World Congress,
    Goteborg (the climatology shipped with pvlib as LinkeTurbidities.h5).
    """
    if site.linke_turbidity is not None:
        return monthly_to_daily(site.linke_turbidity, times), "monthly values from the site file"
    lt = pvlib.clearsky.lookup_linke_turbidity(pd.DatetimeIndex(times), site.latitude_deg,
                                               site.longitude_deg)
    return np.asarray(lt, dtype=float), "pvlib monthly climatology (Remund et al. 2003)"


def clear_sky(times: pd.DatetimeIndex, position: pd.DataFrame, site: Site,
              model: str = "ineichen", dni_extra=None, turbidity=None) -> ClearSky:
    """Clear-sky GHI, DNI and DHI at the given instants.

    Parameters
    ----------
    times : pandas.DatetimeIndex
        Instants (timezone-aware).
    position : pandas.DataFrame
        Sun position at ``times`` (:func:`tiltyard.engine.solarpos.solar_position`).
    site : Site
        Site; its elevation always enters (pressure, altitude).
    model : {"ineichen", "simplified_solis", "haurwitz"}
        Clear-sky model.
    dni_extra : array_like, optional
        Extraterrestrial normal irradiance, W/m²; by default
        :func:`extraterrestrial_normal` with the default solar constant.
    turbidity : (array_like, str), optional
        Linke turbidity at ``times`` and its source, when the caller has it
        (:func:`linke_turbidity`); looked up for ``times`` otherwise.

    Returns
    -------
    ClearSky

    Notes
    -----
    Ineichen-Perez is refused above :data:`INEICHEN_MAX_ELEVATION_M` (ValueError
    naming ``elevation_m``). Its output is bounded by the extraterrestrial irradiance
    (DNI by ``dni_extra``, GHI by ``dni_extra cos(z)``): at sites above about
    4000 m its altitude terms would otherwise exceed it. The note says when
    the bound was applied.

    References
    ----------
    See :data:`CLEARSKY_REFERENCES`; implementations from pvlib.clearsky.
    """
    times = pd.DatetimeIndex(times)
    if dni_extra is None:
        dni_extra = extraterrestrial_normal(times)
    dni_extra = np.asarray(dni_extra, dtype=float)
    app_zen = position["apparent_zenith"].to_numpy()
    pressure = site_pressure_pa(site.elevation_m)
    note = "clear-sky irradiance: an upper bound, not an expected yield"
    if model == "ineichen" and site.elevation_m > INEICHEN_MAX_ELEVATION_M:
        raise ValueError(
            f"elevation_m = {site.elevation_m:g} m: above {INEICHEN_MAX_ELEVATION_M:g} m the "
            "Ineichen-Perez clear sky is not physical (its altitude terms approach the "
            "extraterrestrial irradiance); choose the simplified Solis clear-sky model "
            "(--clearsky simplified_solis, or clearsky_model in the site file's assessment)")
    if model == "ineichen":
        lt, source = linke_turbidity(times, site) if turbidity is None else turbidity
        am_rel = pvlib.atmosphere.get_relative_airmass(app_zen)
        am_abs = pvlib.atmosphere.get_absolute_airmass(am_rel, pressure)
        with np.errstate(divide="ignore", invalid="ignore"):  # night rows give NaN, set to 0
            cs = pvlib.clearsky.ineichen(app_zen, am_abs, lt, altitude=site.elevation_m,
                                         dni_extra=dni_extra)
        data = pd.DataFrame({"ghi": cs["ghi"], "dni": cs["dni"], "dhi": cs["dhi"],
                             "linke_turbidity": lt}, index=times)
    elif model == "simplified_solis":
        cs = pvlib.clearsky.simplified_solis(90.0 - app_zen, pressure=pressure,
                                             dni_extra=dni_extra)
        data = pd.DataFrame({"ghi": cs["ghi"], "dni": cs["dni"], "dhi": cs["dhi"]}, index=times)
        source = "not used (aod700 = 0.1, precipitable water = 1 cm, pvlib defaults)"
    elif model == "haurwitz":
        ghi = np.asarray(pvlib.clearsky.haurwitz(pd.Series(app_zen, index=times))["ghi"],
                         dtype=float)
        parts = pvlib.irradiance.erbs(ghi, position["zenith"].to_numpy(), times.day_of_year)
        data = pd.DataFrame({"ghi": ghi, "dni": np.asarray(parts["dni"], dtype=float),
                             "dhi": np.asarray(parts["dhi"], dtype=float)}, index=times)
        source = "not used"
        note += "; Haurwitz gives GHI only: DNI and DHI split from it by Erbs et al. (1982)"
    else:
        raise ValueError(f"model = {model!r}: must be one of {', '.join(CLEARSKY_MODELS)}")
    data = data.fillna(0.0)
    for col in ("ghi", "dni", "dhi"):
        data[col] = np.maximum(data[col].to_numpy(dtype=float), 0.0)
    if model == "ineichen":
        n_capped = _cap_at_extraterrestrial(data, dni_extra, app_zen)
        if n_capped:
            note += (f"; Ineichen-Perez exceeds the extraterrestrial irradiance at "
                     f"{site.elevation_m:g} m elevation (its altitude terms grow without bound, "
                     f"above about 4000 m): capped to it at {n_capped} instants; the simplified "
                     "Solis model stays physical there")
    return ClearSky(data, model, source, note)


def _cap_at_extraterrestrial(data: pd.DataFrame, dni_extra, apparent_zenith) -> int:
    """Bound clear-sky irradiance by the extraterrestrial irradiance, in place.

    DNI is capped at ``dni_extra`` and GHI at ``dni_extra cos(z)``; DHI is then
    ``GHI - DNI cos(z)`` so the closure of the components still holds. Returns
    the number of instants changed.

    References
    ----------
    Energy conservation: the atmosphere cannot add to the extraterrestrial
    beam (Duffie & Beckman 2013, eq. 1.10.1, for the horizontal bound). The
    Ineichen & Perez (2002) altitude terms ``cg1 = 5.09e-5 h + 0.868`` and
    ``fh1 = exp(-h / 8000)`` exceed this bound above about 4000 m (pvlib
    issue #285 reports the same at 20 km).
    """
    cos_z = np.maximum(np.cos(np.radians(np.asarray(apparent_zenith, dtype=float))), 0.0)
    e0 = np.broadcast_to(np.asarray(dni_extra, dtype=float), cos_z.shape)
    ghi = data["ghi"].to_numpy(dtype=float)
    dni = data["dni"].to_numpy(dtype=float)
    over = (ghi > e0 * cos_z) | (dni > e0)
    if not over.any():
        return 0
    dni = np.minimum(dni, e0)
    ghi = np.minimum(ghi, e0 * cos_z)
    data["dni"] = dni
    data["ghi"] = ghi
    data["dhi"] = np.where(over, np.maximum(ghi - dni * cos_z, 0.0),
                           data["dhi"].to_numpy(dtype=float))
    return int(over.sum())
