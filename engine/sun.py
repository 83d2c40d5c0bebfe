"""Solar position, daily sun events, sun-path curves.

Positions come from the NREL Solar Position Algorithm (Reda & Andreas 2004,
NREL/TP-560-34302) through :func:`pvlib.solarposition.get_solarposition`, with
atmospheric refraction from the pressure implied by the site elevation
(:func:`pvlib.atmosphere.alt2pres`) and an annual mean air temperature of 12 °C
(the SPA report's default). Azimuth is degrees clockwise from true north.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
import pvlib
from pvlib import spa as _spa

from .site import Site
from .timegrid import REFERENCE_YEAR, TimeGrid
from .words import day_month

#: Apparent elevation of the sun's centre at sunrise and sunset: refraction
#: (34') plus the solar semi-diameter (16') (Reda & Andreas 2008, App. A.2).
RISE_SET_ELEVATION_DEG = -0.8333

#: Annual mean air temperature assumed for refraction (SPA default), deg C.
REFRACTION_TEMPERATURE_C = 12.0


def site_pressure_pa(elevation_m: float) -> float:
    """Standard-atmosphere pressure at the site elevation, Pa.

    References
    ----------
    pvlib.atmosphere.alt2pres (Portland State University, standard atmosphere
    formula ``101325 (1 - 2.25577e-5 h)^5.25588``).
    """
    return float(pvlib.atmosphere.alt2pres(elevation_m))


def delta_t_s(times: pd.DatetimeIndex) -> np.ndarray:
    """Difference TT - UT1 in seconds for the given times.

    References
    ----------
    Espenak & Meeus polynomial expressions, as implemented in
    :func:`pvlib.spa.calculate_deltat`.
    """
    t = pd.DatetimeIndex(times)
    return np.asarray(_spa.calculate_deltat(t.year.to_numpy(), t.month.to_numpy()), dtype=float)


def solar_position(times: pd.DatetimeIndex, site: Site, delta_t: float | None = None,
                   pressure_pa: float | None = None,
                   temperature_c: float = REFRACTION_TEMPERATURE_C) -> pd.DataFrame:
    """Topocentric sun position by NREL SPA.

    Parameters
    ----------
    times : pandas.DatetimeIndex
        Timezone-aware instants.
    site : Site
        Location; its elevation gives the height above sea level and the
        refraction pressure.
    delta_t : float, optional
        TT - UT1 in seconds; by default from :func:`delta_t_s`.
    pressure_pa : float, optional
        Override of the refraction pressure, Pa.
    temperature_c : float, default 12
        Air temperature for refraction, deg C.

    Returns
    -------
    pandas.DataFrame
        Columns ``apparent_zenith``, ``zenith``, ``apparent_elevation``,
        ``elevation``, ``azimuth`` (degrees, clockwise from north) and
        ``equation_of_time`` (minutes), indexed like ``times``.

    References
    ----------
    Reda, I. & Andreas, A. (2004, revised 2008). Solar Position Algorithm for
    Solar Radiation Applications. NREL/TP-560-34302.
    """
    times = pd.DatetimeIndex(times)
    if times.tz is None:
        raise ValueError("times must be timezone-aware")
    if delta_t is None:
        delta_t = delta_t_s(times)
    if pressure_pa is None:
        pressure_pa = site_pressure_pa(site.elevation_m)
    return pvlib.solarposition.get_solarposition(
        times, site.latitude_deg, site.longitude_deg, altitude=site.elevation_m,
        pressure=pressure_pa, method="nrel_numpy", temperature=temperature_c, delta_t=delta_t)


def _unix_seconds(times) -> np.ndarray:
    """Seconds since 1970-01-01 UTC as floats, whatever the index's time unit."""
    t = pd.DatetimeIndex(times).tz_convert("UTC")
    return (t - pd.Timestamp(0, tz="UTC")).total_seconds().to_numpy()


def _utc_times(seconds) -> pd.DatetimeIndex:
    """UTC instants from seconds since 1970 (rounded to the microsecond)."""
    us = np.round(np.asarray(seconds, dtype=float) * 1e6).astype("int64")
    return pd.DatetimeIndex(pd.to_datetime(us, unit="us", utc=True))


# -- evaluation points for a year of intervals -------------------------------

@dataclass(frozen=True)
class EvaluationPoints:
    """Where each interval of a :class:`TimeGrid` is evaluated.

    Attributes
    ----------
    times_utc : pandas.DatetimeIndex
        One evaluation instant per interval: the midpoint, or the midpoint of
        the sun-up part for intervals containing sunrise or sunset.
    sun_up_fraction : numpy.ndarray
        Fraction of each interval with the sun's centre above the geometric
        horizon (0 to 1).
    position : pandas.DataFrame
        Sun position at ``times_utc`` (see :func:`solar_position`).
    """

    times_utc: pd.DatetimeIndex
    sun_up_fraction: np.ndarray
    position: pd.DataFrame


def evaluation_points(grid: TimeGrid, site: Site) -> EvaluationPoints:
    """Evaluation instants and sun-up fractions for every interval of ``grid``.

    The sun counts as up when its geometric (unrefracted) elevation is above
    0°, which is where extraterrestrial irradiance on a horizontal surface
    becomes positive. Crossings inside an interval are located by regula falsi
    on SPA elevations (three refinements, well under a second of time).

    Parameters
    ----------
    grid : TimeGrid
        The year's intervals.
    site : Site
        Location.

    Returns
    -------
    EvaluationPoints

    Notes
    -----
    An interval whose two ends both have the sun down is treated as dark even
    if the sun grazes the horizon inside it (possible only within a few days
    of the start or end of polar night); the energy missed is negligible.
    Midpoint convention: :data:`tiltyard.engine.timegrid.MIDPOINT_CONVENTION`.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, for the positions. The midpoint
    rule for interval means is common practice, no source.
    """
    bounds = grid.boundaries_utc
    dt_s = delta_t_s(bounds[:1])[0]
    el_b = solar_position(bounds, site, delta_t=dt_s)["elevation"].to_numpy()
    up0, up1 = el_b[:-1] > 0.0, el_b[1:] > 0.0
    step_s = grid.step_min * 60.0
    start_s = _unix_seconds(grid.start_utc)
    lo = np.zeros(len(grid))
    hi = np.ones(len(grid))
    # fraction of the interval with the sun up, by default all or nothing
    frac = np.where(up0 & up1, 1.0, 0.0)
    mid = start_s + 0.5 * step_s
    cross = up0 != up1
    if cross.any():
        idx = np.flatnonzero(cross)
        e_lo, e_hi = el_b[idx], el_b[idx + 1]
        a, b = lo[idx].copy(), hi[idx].copy()
        for _ in range(3):
            x = a + (b - a) * e_lo / (e_lo - e_hi)
            x = np.clip(x, a + 1e-9, b - 1e-9)
            tx = _utc_times(start_s[idx] + x * step_s)
            ex = solar_position(tx, site, delta_t=dt_s)["elevation"].to_numpy()
            same_as_lo = np.sign(ex) == np.sign(e_lo)
            a = np.where(same_as_lo, x, a)
            e_lo = np.where(same_as_lo, ex, e_lo)
            b = np.where(same_as_lo, b, x)
            e_hi = np.where(same_as_lo, e_hi, ex)
        x = a + (b - a) * e_lo / (e_lo - e_hi)
        rising = ~up0[idx]
        f = np.where(rising, 1.0 - x, x)
        frac[idx] = f
        mid[idx] = start_s[idx] + step_s * np.where(rising, x + (1.0 - x) / 2.0, x / 2.0)
    times = _utc_times(mid)
    pos = solar_position(times, site, delta_t=dt_s)
    return EvaluationPoints(times, frac, pos)


# -- daily events -------------------------------------------------------------

@dataclass(frozen=True)
class SunEvents:
    """Sun events for a run of local calendar dates.

    Attributes
    ----------
    table : pandas.DataFrame
        One row per date: ``date`` (datetime.date), ``sunrise``, ``sunset``,
        ``solar_noon`` (tz-aware local clock time, NaT where none),
        ``day_length_h``, ``max_elevation_deg``, ``polar`` (``"day"``,
        ``"night"`` or None).
    timezone : str
        Site's IANA zone.
    """

    table: pd.DataFrame
    timezone: str


def _as_local(col, tz) -> pd.DatetimeIndex:
    """A column of event times (aware, or all-NaN floats) as local aware times."""
    idx = pd.DatetimeIndex(pd.to_datetime(pd.Series(col).to_numpy(), utc=False))
    if idx.tz is None:
        idx = idx.tz_localize("UTC")
    return idx.tz_convert(tz)


def sun_events(site: Site, dates) -> SunEvents:
    """Sunrise, sunset, solar noon, day length and noon elevation per date.

    Uses the SPA rise/transit/set procedure (Reda & Andreas 2008, App. A.2)
    with the -0.8333° convention, through
    :func:`pvlib.solarposition.sun_rise_set_transit_spa`. Where the sun does not
    cross -0.8333° on that date the row says so in ``polar``: ``"day"`` when
    the sun stays above it, ``"night"`` when it stays below; sunrise and sunset
    are then NaT and the day length is 24 h or 0 h.

    Parameters
    ----------
    site : Site
        Location and time zone.
    dates : iterable of date-like
        Local calendar dates.

    Returns
    -------
    SunEvents

    References
    ----------
    Reda, I. & Andreas, A. (2008). Solar Position Algorithm for Solar Radiation
    Applications. NREL/TP-560-34302, Appendix A.2.
    """
    tz = site.timezone
    day = pd.DatetimeIndex(pd.to_datetime(list(dates))).normalize()
    local_noon = (day + pd.Timedelta(hours=12)).tz_localize(tz, ambiguous=True,
                                                            nonexistent="shift_forward")
    dts = delta_t_s(local_noon)
    ev = pvlib.solarposition.sun_rise_set_transit_spa(
        local_noon, site.latitude_deg, site.longitude_deg, delta_t=dts)
    transit = _as_local(ev["transit"], tz)
    sunrise = _as_local(ev["sunrise"], tz)
    sunset = _as_local(ev["sunset"], tz)
    # max elevation: the upper transit; the lowest point: the lower transit, 12 h away
    pos_hi = solar_position(transit, site)
    max_el = pos_hi["apparent_elevation"].to_numpy()
    low = transit + pd.Timedelta(hours=12)
    min_el = solar_position(low, site)["apparent_elevation"].to_numpy()
    no_event = sunrise.isna() | sunset.isna()
    polar = np.full(len(day), None, dtype=object)
    is_night = no_event & (max_el < RISE_SET_ELEVATION_DEG)
    is_day = no_event & ~is_night & (min_el > RISE_SET_ELEVATION_DEG)
    # a date without a crossing at all is day when the noon sun is up
    is_day = is_day | (no_event & ~is_night & ~is_day)
    polar[is_night] = "night"
    polar[is_day] = "day"
    length = (sunset - sunrise).total_seconds().to_numpy() / 3600.0
    length = np.where(is_day, 24.0, np.where(is_night, 0.0, length))
    sunrise = sunrise.where(~no_event)
    sunset = sunset.where(~no_event)
    table = pd.DataFrame({
        "date": [d.date() for d in day],
        "sunrise": sunrise,
        "sunset": sunset,
        "solar_noon": transit,
        "day_length_h": length,
        "max_elevation_deg": max_el,
        "polar": pd.Series(polar, dtype=object),
    })
    return SunEvents(table, tz)


# -- seasonal key dates, declination, equation of time --------------------------

def declination_deg(times: pd.DatetimeIndex) -> np.ndarray:
    """Geocentric apparent declination of the sun by the SPA steps.

    Parameters
    ----------
    times : pandas.DatetimeIndex
        Timezone-aware instants.

    Returns
    -------
    numpy.ndarray
        Declination in degrees.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, sections 3.1-3.8, through the
    step functions of :mod:`pvlib.spa`.
    """
    t = pd.DatetimeIndex(times).tz_convert("UTC")
    unixtime = _unix_seconds(t)
    jd = _spa.julian_day(unixtime)
    jde = _spa.julian_ephemeris_day(jd, delta_t_s(t))
    jce = _spa.julian_ephemeris_century(jde)
    jme = _spa.julian_ephemeris_millennium(jce)
    big_r = _spa.heliocentric_radius_vector(jme)
    big_l = _spa.heliocentric_longitude(jme)
    big_b = _spa.heliocentric_latitude(jme)
    theta = _spa.geocentric_longitude(big_l)
    beta = _spa.geocentric_latitude(big_b)
    x0 = _spa.mean_elongation(jce)
    x1 = _spa.mean_anomaly_sun(jce)
    x2 = _spa.mean_anomaly_moon(jce)
    x3 = _spa.moon_argument_latitude(jce)
    x4 = _spa.moon_ascending_longitude(jce)
    l_o = np.empty((2,) + np.shape(jce))
    _spa.longitude_obliquity_nutation(jce, x0, x1, x2, x3, x4, l_o)
    delta_psi, delta_eps = l_o[0], l_o[1]
    eps0 = _spa.mean_ecliptic_obliquity(jme)
    eps = _spa.true_ecliptic_obliquity(eps0, delta_eps)
    d_tau = _spa.aberration_correction(big_r)
    lamd = _spa.apparent_sun_longitude(theta, delta_psi, d_tau)
    return np.asarray(_spa.geocentric_sun_declination(lamd, eps, beta), dtype=float)


def earth_sun_distance_au(times: pd.DatetimeIndex) -> np.ndarray:
    """Earth-Sun distance in astronomical units by SPA.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, section 3.2.8, through
    :func:`pvlib.solarposition.nrel_earthsun_distance`.
    """
    t = pd.DatetimeIndex(times)
    return np.asarray(pvlib.solarposition.nrel_earthsun_distance(t, delta_t=delta_t_s(t)),
                      dtype=float)


def daily_declination_eot(site: Site, year: int = REFERENCE_YEAR) -> pd.DataFrame:
    """Declination and equation of time at local solar noon of every day.

    Returns
    -------
    pandas.DataFrame
        Indexed by local date, columns ``declination_deg`` and
        ``equation_of_time_min`` (apparent minus mean solar time).

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302 (SPA declination and equation of
    time, section A.1).
    """
    days = pd.date_range(f"{year}-01-01", f"{year}-12-31", freq="D")
    # local mean noon in UTC: 12:00 - longitude/15 h
    t = (days + pd.Timedelta(hours=12) - pd.Timedelta(hours=site.longitude_deg / 15.0))
    t = t.tz_localize("UTC")
    pos = solar_position(t, site)
    return pd.DataFrame({"declination_deg": declination_deg(t),
                         "equation_of_time_min": pos["equation_of_time"].to_numpy()},
                        index=pd.Index([d.date() for d in days], name="date"))


@dataclass(frozen=True)
class SeasonDates:
    """Solstice and equinox instants of one year (UTC), from the SPA declination."""

    march_equinox: pd.Timestamp
    june_solstice: pd.Timestamp
    september_equinox: pd.Timestamp
    december_solstice: pd.Timestamp


def season_dates(year: int = REFERENCE_YEAR) -> SeasonDates:
    """Equinoxes (declination crossing 0) and solstices (declination extremes).

    Found on an hourly grid of SPA declinations, refined by linear interpolation
    for the equinoxes and a parabola through the hourly extreme for the
    solstices (accuracy a few minutes, ample for choosing a sun-path date).

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, for the declination; the
    definitions of equinox and solstice are Meeus, Astronomical Algorithms
    (1998), ch. 27.
    """
    t = pd.date_range(f"{year}-01-01", f"{year + 1}-01-01", freq="h", tz="UTC",
                      inclusive="left")
    d = declination_deg(t)

    def crossing(mask_sign_change):
        i = int(np.flatnonzero(mask_sign_change)[0])
        frac = d[i] / (d[i] - d[i + 1])
        return t[i] + pd.Timedelta(hours=float(frac))

    sc = np.sign(d[:-1]) != np.sign(d[1:])
    up = sc & (d[1:] > d[:-1])
    down = sc & (d[1:] < d[:-1])

    def extreme(i):
        if 0 < i < len(d) - 1:
            y0, y1, y2 = d[i - 1], d[i], d[i + 1]
            den = y0 - 2 * y1 + y2
            off = 0.5 * (y0 - y2) / den if den != 0 else 0.0
        else:
            off = 0.0
        return t[i] + pd.Timedelta(hours=float(off))

    return SeasonDates(crossing(up), extreme(int(np.argmax(d))), crossing(down),
                       extreme(int(np.argmin(d))))


def standard_path_dates(site: Site, year: int = REFERENCE_YEAR) -> list[tuple[str, pd.Timestamp]]:
    """The dates drawn on a sun-path chart: solstices, equinoxes, 21st of each month.

    Returns
    -------
    list of (label, date)
        Local dates (tz-naive midnight), solstices and equinoxes first.
    """
    sd = season_dates(year)
    out = []
    for label, ts in (("March equinox", sd.march_equinox), ("June solstice", sd.june_solstice),
                      ("September equinox", sd.september_equinox),
                      ("December solstice", sd.december_solstice)):
        out.append((label, ts.tz_convert(site.timezone).tz_localize(None).normalize()))
    for m in range(1, 13):
        d = pd.Timestamp(year, m, 21)
        out.append((day_month(d), d))
    return out


# -- sun-path curves ------------------------------------------------------------

def day_path(site: Site, date, step_min: float = 5.0, horizon_deg=None) -> pd.DataFrame:
    """The sun's path across one local date.

    Parameters
    ----------
    site : Site
        Location.
    date : date-like
        Local calendar date.
    step_min : float, default 5
        Sampling step, minutes.
    horizon_deg : callable, optional
        ``horizon_deg(azimuth_deg) -> elevation_deg`` of the site horizon; by
        default the site's profile merged with its obstacles.

    Returns
    -------
    pandas.DataFrame
        Rows with the sun above the -0.8333° rise/set line: ``time`` (local,
        tz-aware), ``azimuth_deg``, ``elevation_deg`` (apparent, refracted) and
        ``visible`` (above the site horizon).

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302.
    """
    from .horizon import site_horizon_deg

    day = pd.Timestamp(date).normalize()
    start = day.tz_localize(site.timezone, ambiguous=True, nonexistent="shift_forward")
    end = (day + pd.Timedelta(days=1)).tz_localize(site.timezone, ambiguous=True,
                                                   nonexistent="shift_forward")
    t = pd.date_range(start, end, freq=pd.Timedelta(minutes=step_min), inclusive="left")
    pos = solar_position(t, site)
    el = pos["apparent_elevation"].to_numpy()
    az = pos["azimuth"].to_numpy()
    keep = el > RISE_SET_ELEVATION_DEG
    if horizon_deg is None:
        hz = site_horizon_deg(site, az)
    else:
        hz = np.asarray(horizon_deg(az), dtype=float)
    return pd.DataFrame({"time": t[keep], "azimuth_deg": az[keep], "elevation_deg": el[keep],
                         "visible": (el > hz)[keep]}).reset_index(drop=True)


def hour_lines(site: Site, year: int = REFERENCE_YEAR, basis: str = "standard",
               day_step: int = 3) -> pd.DataFrame:
    """Hour lines (analemmas): the sun at the same hour across the year.

    Parameters
    ----------
    site : Site
        Location.
    year : int
        Year.
    basis : {"standard", "clock", "solar"}
        ``standard``: each hour of local standard time (smooth figure-eights);
        ``clock``: local clock time, which jumps by an hour at the
        daylight-saving changes; ``solar``: apparent solar time, where each
        hour line is a single arc (no figure-eight).
    day_step : int, default 3
        Days between points.

    Returns
    -------
    pandas.DataFrame
        ``hour`` (0-23), ``date``, ``time_utc``, ``azimuth_deg``,
        ``elevation_deg``; only rows with the sun above the rise/set line.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302 (positions and equation of time).
    """
    from .timegrid import standard_offset

    days = pd.date_range(f"{year}-01-01", f"{year}-12-31", freq=f"{day_step}D")
    hours = np.arange(24)
    dd, hh = np.meshgrid(np.arange(len(days)), hours, indexing="ij")
    dd, hh = dd.ravel(), hh.ravel()
    naive = days[dd] + pd.to_timedelta(hh, unit="h")
    if basis == "clock":
        t = naive.tz_localize(site.timezone, ambiguous=True, nonexistent="shift_forward")
        t = t.tz_convert("UTC")
    elif basis == "standard":
        off = standard_offset(site.timezone, year)
        t = (naive - off).tz_localize("UTC")
    elif basis == "solar":
        # first guess from mean solar time, corrected by the equation of time
        t = (naive - pd.Timedelta(hours=site.longitude_deg / 15.0)).tz_localize("UTC")
        for _ in range(2):
            eot = solar_position(t, site)["equation_of_time"].to_numpy()
            t = (naive - pd.Timedelta(hours=site.longitude_deg / 15.0)
                 - pd.to_timedelta(eot, unit="min")).tz_localize("UTC")
    else:
        raise ValueError(f"basis = {basis!r}: must be 'standard', 'clock' or 'solar'")
    pos = solar_position(pd.DatetimeIndex(t), site)
    el = pos["apparent_elevation"].to_numpy()
    keep = el > RISE_SET_ELEVATION_DEG
    return pd.DataFrame({"hour": hh[keep], "date": days[dd][keep],
                         "time_utc": pd.DatetimeIndex(t)[keep],
                         "azimuth_deg": pos["azimuth"].to_numpy()[keep],
                         "elevation_deg": el[keep]}).reset_index(drop=True)


__all__ = [
    "RISE_SET_ELEVATION_DEG", "EvaluationPoints", "SeasonDates", "SunEvents", "day_path",
    "daily_declination_eot", "declination_deg", "delta_t_s", "earth_sun_distance_au",
    "evaluation_points", "hour_lines", "season_dates", "site_pressure_pa", "solar_position",
    "standard_path_dates", "sun_events",
]

