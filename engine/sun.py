"""Evaluation instants of a year of intervals, season dates, day paths, hour lines.

Positions by NREL SPA (Reda & Andreas 2004, NREL/TP-560-34302) through
:mod:`tiltyard.engine.solarpos`; daily events (sunrise, sunset, solar noon) are in
:mod:`tiltyard.engine.sunevents`. Azimuth is degrees clockwise from true north.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from .horizon import site_horizon_deg
from .site import Site
from .solarpos import (
    RISE_SET_ELEVATION_DEG,
    _elevation_deg,
    _find_roots,
    _transit_s,
    _unix_seconds,
    _utc_times,
    declination_deg,
    delta_t_s,
    solar_position,
)
from .timegrid import REFERENCE_YEAR, TimeGrid, standard_offset
from .words import day_month

#: Sunrise and sunset inside a year's intervals are located to this, s.
CROSSING_TOLERANCE_S = 0.5


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
    delta_t : float
        TT - UT1 (s) the positions were computed with (the value at the
        grid's first instant).
    """

    times_utc: pd.DatetimeIndex
    sun_up_fraction: np.ndarray
    position: pd.DataFrame
    delta_t: float = 0.0


def evaluation_points(grid: TimeGrid, site: Site) -> EvaluationPoints:
    """Evaluation instants and sun-up fractions for every interval of ``grid``.

    The sun counts as up when its geometric (unrefracted) elevation is above
    0°, which is where extraterrestrial irradiance on a horizontal surface
    becomes positive. Crossings inside an interval are located by a bracketed
    Anderson-Bjorck search on SPA elevations (:func:`_find_roots`) to
    :data:`CROSSING_TOLERANCE_S`, also where the sun only grazes the horizon
    and its elevation is far from linear in time.

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
    An interval whose two ends both have the sun down but whose middle has it
    up (the sun grazing the horizon near its upper transit, within a few days
    of polar night) gets the sun-up part between its two crossings
    (:func:`_grazing_intervals`). An interval whose two ends have the sun up
    counts as all up even if the sun dips below the horizon near its lower
    transit inside it (the first and last days of polar day); the sun is then
    within a fraction of a degree of the horizon and the energy counted is
    below 0.001 % of the day's.
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
    # crossings: Anderson-Bjorck search in the interval's fraction (see _find_roots)
    # fraction of the interval with the sun up, by default all or nothing
    frac = np.where(up0 & up1, 1.0, 0.0)
    mid = start_s + 0.5 * step_s
    cross = up0 != up1
    if cross.any():
        idx = np.flatnonzero(cross)

        def elev(x, i):
            return _elevation_deg(start_s[idx[i]] + x * step_s, site, dt_s)

        x = _find_roots(elev, lo[idx], hi[idx], el_b[idx], el_b[idx + 1],
                        tol=CROSSING_TOLERANCE_S / step_s)
        rising = ~up0[idx]
        f = np.where(rising, 1.0 - x, x)
        frac[idx] = f
        mid[idx] = start_s[idx] + step_s * np.where(rising, x + (1.0 - x) / 2.0, x / 2.0)
    _grazing_intervals(el_b, start_s, step_s, site, dt_s, frac, mid)
    times = _utc_times(mid)
    pos = solar_position(times, site, delta_t=dt_s)
    return EvaluationPoints(times, frac, pos, float(dt_s))


def _grazing_intervals(el_b, start_s, step_s, site: Site, dt_s, frac, mid) -> None:
    """Sun-up part of intervals with the sun down at both ends but up inside, in place.

    Candidates have a local maximum of the boundary elevations inside them;
    the sun's upper transit there (:func:`_transit_s`) is the highest point,
    and where it is above the horizon the two crossings on either side are
    found by :func:`_find_roots` on the SPA geometric elevation.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, for the positions.
    """
    if len(el_b) < 4:
        return
    e0, e1 = el_b[1:-2], el_b[2:-1]
    cand = (e0 <= 0) & (e1 <= 0) & (e0 > el_b[:-3]) & (e1 > el_b[3:]) & (np.maximum(e0, e1) > -3)
    idx = np.flatnonzero(cand) + 1
    if idx.size == 0:
        return
    t0, t1 = start_s[idx], start_s[idx] + step_s
    peak = _transit_s(0.5 * (t0 + t1), site.longitude_deg, dt_s)

    def elev(t, _=None):
        return _elevation_deg(t, site, dt_s)

    e_peak = elev(peak)
    ok = (peak > t0) & (peak < t1) & (e_peak > 0)
    if not ok.any():
        return
    idx, t0, t1, peak, e_peak = idx[ok], t0[ok], t1[ok], peak[ok], e_peak[ok]
    rise = _find_roots(elev, t0, peak, el_b[idx], e_peak, tol=0.01)
    sset = _find_roots(elev, peak, t1, e_peak, el_b[idx + 1], tol=0.01)
    frac[idx] = (sset - rise) / step_s
    mid[idx] = 0.5 * (rise + sset)



# -- season dates, declination and equation of time -------------------------------

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
    "CROSSING_TOLERANCE_S", "EvaluationPoints", "SeasonDates", "day_path",
    "daily_declination_eot", "evaluation_points", "hour_lines", "season_dates",
    "standard_path_dates",
]
