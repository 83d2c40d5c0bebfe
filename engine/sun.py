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

from .horizon import site_horizon_deg
from .site import Site
from .timegrid import REFERENCE_YEAR, TimeGrid, standard_offset
from .words import day_month

#: Geometric (unrefracted) elevation of the sun's centre at sunrise and sunset:
#: -(34' standard refraction at the horizon + 16' solar semi-diameter) (Reda &
#: Andreas 2008, App. A.2). pvlib applies its refraction correction only above
#: this geometric elevation (-0.83337°), so the SPA apparent elevation crosses
#: the same value within 0.1 s of the same instant.
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


def _elevation_deg(unix_s, site: Site, delta_t) -> np.ndarray:
    """SPA topocentric geometric (unrefracted) elevation at UT seconds, degrees.

    The same SPA as :func:`solar_position` (Reda & Andreas 2008, through
    :func:`pvlib.spa.solar_position` on plain arrays, without the table), for
    the many small calls of the event and crossing searches.
    """
    t = np.atleast_1d(np.asarray(unix_s, dtype=float))
    dts = np.broadcast_to(np.asarray(delta_t, dtype=float), t.shape)
    out = _spa.solar_position(t, site.latitude_deg, site.longitude_deg, site.elevation_m,
                              site_pressure_pa(site.elevation_m) / 100.0,
                              REFRACTION_TEMPERATURE_C, dts, 0.5667)
    return np.asarray(out[3], dtype=float)


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
    return EvaluationPoints(times, frac, pos)


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


#: Sunrise and sunset inside a year's intervals are located to this, s.
CROSSING_TOLERANCE_S = 0.5

#: Spacing of the elevation samples that bracket sunrise and sunset, s.
EVENT_SAMPLE_S = 1800.0

#: Event times are refined until the bracket or the last step is below this, s.
EVENT_TOLERANCE_S = 1e-3

_SOLAR_DAY_S = 86400.0


def _slow_terms(unixtime: np.ndarray, delta_t) -> tuple[np.ndarray, ...]:
    """SPA's slowly varying terms: right ascension, declination, nutation, distance.

    Geocentric apparent right ascension and declination, nutation in
    longitude and the true obliquity (degrees), and the Earth-Sun distance
    (AU), by the steps of Reda & Andreas (2008), NREL/TP-560-34302, sections
    3.1-3.8, through the step functions of :mod:`pvlib.spa`. ``unixtime`` is
    UT in seconds since 1970; ``delta_t`` is TT - UT1 in seconds.
    """
    jd = _spa.julian_day(unixtime)
    jde = _spa.julian_ephemeris_day(jd, delta_t)
    jce = _spa.julian_ephemeris_century(jde)
    jme = _spa.julian_ephemeris_millennium(jce)
    big_r = _spa.heliocentric_radius_vector(jme)
    theta = _spa.geocentric_longitude(_spa.heliocentric_longitude(jme))
    beta = _spa.geocentric_latitude(_spa.heliocentric_latitude(jme))
    x = (_spa.mean_elongation(jce), _spa.mean_anomaly_sun(jce), _spa.mean_anomaly_moon(jce),
         _spa.moon_argument_latitude(jce), _spa.moon_ascending_longitude(jce))
    l_o = np.empty((2,) + np.shape(jce))
    _spa.longitude_obliquity_nutation(jce, *x, l_o)
    delta_psi, delta_eps = l_o[0], l_o[1]
    eps = _spa.true_ecliptic_obliquity(_spa.mean_ecliptic_obliquity(jme), delta_eps)
    lamd = _spa.apparent_sun_longitude(theta, delta_psi, _spa.aberration_correction(big_r))
    alpha = _spa.geocentric_sun_right_ascension(lamd, eps, beta)
    delta = _spa.geocentric_sun_declination(lamd, eps, beta)
    return tuple(np.asarray(v, dtype=float) for v in (alpha, delta, delta_psi, eps, big_r))


def _sidereal_deg(unixtime, delta_psi, eps) -> np.ndarray:
    """Apparent sidereal time at Greenwich, degrees (Reda & Andreas 2008, eqs. 12-15)."""
    jd = _spa.julian_day(unixtime)
    return np.asarray(_spa.apparent_sidereal_time(
        _spa.mean_sidereal_time(jd, _spa.julian_century(jd)), delta_psi, eps), dtype=float)


def _geocentric_sun(unixtime: np.ndarray, delta_t) -> tuple[np.ndarray, ...]:
    """Geocentric apparent right ascension, declination and sidereal time, degrees.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, sections 3.1-3.9.
    """
    alpha, delta, delta_psi, eps, _ = _slow_terms(unixtime, delta_t)
    return alpha, delta, _sidereal_deg(unixtime, delta_psi, eps)


class _DaySun:
    """SPA positions around given days from slow terms at three instants per day.

    The slowly varying SPA terms (right ascension, declination, nutation,
    obliquity, distance) are computed at ``centre - 1 day``, ``centre`` and
    ``centre + 1 day`` and interpolated by a parabola in time, the scheme of
    Reda & Andreas (2008), App. A.2, eqs. A7-A8, but at any instant and
    without wrapping times into a UT day; the Earth's rotation (sidereal time,
    hour angle) and the topocentric steps are exact at each instant. Within a
    day of the centre this reproduces the full SPA elevation to better than
    1e-5 deg (the rates of the slow terms change little over two days), and it
    costs one full SPA evaluation per three days instead of one per instant.
    """

    def __init__(self, centre_s: np.ndarray, delta_t: np.ndarray, site: Site):
        self.centre = np.asarray(centre_s, dtype=float)
        self.delta_t = np.asarray(delta_t, dtype=float)
        self.site = site
        nodes = self.centre[:, None] + np.array([-1.0, 0.0, 1.0]) * _SOLAR_DAY_S
        terms = _slow_terms(nodes.ravel(), np.repeat(self.delta_t, 3))
        terms = [t.reshape(-1, 3) for t in terms]
        terms[0] = np.degrees(np.unwrap(np.radians(terms[0]), axis=1))   # right ascension
        self.terms = terms

    def _interp(self, t, day):
        x = (t - self.centre[day]) / _SOLAR_DAY_S
        w = (0.5 * x * (x - 1.0), 1.0 - x * x, 0.5 * x * (x + 1.0))
        return [w[0] * v[day, 0] + w[1] * v[day, 1] + w[2] * v[day, 2] for v in self.terms]

    def hour_angle_deg(self, t, day):
        """Geocentric local hour angle (Reda & Andreas 2008, eq. 32), degrees."""
        alpha, _, dpsi, eps, _ = self._interp(t, day)
        return (_sidereal_deg(t, dpsi, eps) + self.site.longitude_deg - alpha) % 360.0

    def elevation_deg(self, t, day, apparent: bool = False):
        """Topocentric elevation, geometric or refracted (eqs. 33-43), degrees."""
        alpha, delta, dpsi, eps, big_r = self._interp(t, day)
        lat, elev = self.site.latitude_deg, self.site.elevation_m
        h = (_sidereal_deg(t, dpsi, eps) + self.site.longitude_deg - alpha) % 360.0
        xi = _spa.equatorial_horizontal_parallax(big_r)
        u = _spa.uterm(lat)
        x, y = _spa.xterm(u, lat, elev), _spa.yterm(u, lat, elev)
        d_alpha = _spa.parallax_sun_right_ascension(x, xi, h, delta)
        delta_p = _spa.topocentric_sun_declination(delta, x, y, xi, d_alpha, h)
        h_p = _spa.topocentric_local_hour_angle(h, d_alpha)
        e0 = np.asarray(_spa.topocentric_elevation_angle_without_atmosphere(lat, delta_p, h_p),
                        dtype=float)
        if not apparent:
            return e0
        de = _spa.atmospheric_refraction_correction(site_pressure_pa(elev) / 100.0,
                                                    REFRACTION_TEMPERATURE_C, e0, 0.5667)
        return np.asarray(_spa.topocentric_elevation_angle(e0, de), dtype=float)


def _transit_s(guess_s: np.ndarray, longitude_deg: float, delta_t, lower: bool = False):
    """The sun's upper (or lower) meridian transit nearest each guess, UT seconds.

    Solves ``H(t) = 0`` (``180`` for the lower transit) for the geocentric
    local hour angle ``H = nu + longitude - alpha`` (Reda & Andreas 2008,
    eq. 32) by fixed-point steps ``t -= H / (360 deg per day)``. The true rate
    of ``H`` (the sidereal rate less that of the sun's right ascension)
    differs from 360 deg per day by under 0.05 %, so each step cuts the error
    by a factor of at least 2000: three steps from a guess within 12 h are
    exact to well under a millisecond.
    """
    t = np.asarray(guess_s, dtype=float).copy()
    target = 180.0 if lower else 0.0
    for _ in range(3):
        alpha, _, nu = _geocentric_sun(t, delta_t)
        h = (nu + longitude_deg - alpha - target + 180.0) % 360.0 - 180.0
        t -= h / 360.0 * _SOLAR_DAY_S
    return t


def _find_roots(fun, a: np.ndarray, b: np.ndarray, fa: np.ndarray, fb: np.ndarray,
                tol: float = EVENT_TOLERANCE_S, max_iter: int = 40) -> np.ndarray:
    """Roots of ``fun`` in the brackets ``[a, b]`` (``fa``, ``fb`` of opposite sign).

    Vectorised Anderson-Bjorck (modified regula falsi) iteration: each step
    evaluates ``fun`` once for the brackets not yet converged (``fun`` takes
    an array of points and the indices of their brackets), keeps a sign
    change inside each bracket, and converges superlinearly for a smooth
    function. A bracket is done when it is narrower than ``tol`` or its last
    step moved less than ``tol``.

    References
    ----------
    Anderson, N. & Bjorck, A. (1973). A new high order method of regula falsi
    type for computing a root of an equation. BIT 13, 253-264.
    """
    a, b, fa, fb = (np.array(v, dtype=float) for v in (a, b, fa, fb))
    c = 0.5 * (a + b)
    active = np.arange(a.size)
    for _ in range(max_iter):
        if active.size == 0:
            break
        aa, bb, ffa, ffb = a[active], b[active], fa[active], fb[active]
        den = ffb - ffa
        c_new = np.where(den != 0, bb - ffb * (bb - aa) / np.where(den != 0, den, 1.0),
                         0.5 * (aa + bb))
        lo, hi = np.minimum(aa, bb), np.maximum(aa, bb)
        c_new = np.clip(c_new, lo, hi)
        done = (np.abs(c_new - c[active]) < tol) | (hi - lo < tol)
        c[active] = c_new
        active, aa, bb, ffa, ffb, c_new = (v[~done] for v in (active, aa, bb, ffa, ffb, c_new))
        if active.size == 0:
            break
        fc = fun(c_new, active)
        exact = fc == 0
        flip = np.sign(fc) != np.sign(ffb)
        m = np.where(ffb != 0, 1.0 - fc / np.where(ffb != 0, ffb, 1.0), 0.5)
        m = np.where(m > 0, m, 0.5)
        a[active] = np.where(exact, c_new, np.where(flip, bb, aa))
        fa[active] = np.where(exact, 0.0, np.where(flip, ffb, ffa * m))
        b[active], fb[active] = c_new, fc
    return c


def _event_samples(t0: np.ndarray, t1: np.ndarray, transit: np.ndarray, low_before,
                   low_after) -> np.ndarray:
    """Sample instants per local day: every half hour, the transits, the bounds.

    One row per day, sorted; instants outside ``[t0, t1]`` are clipped to it.
    """
    n = int(np.ceil(25.0 * 3600.0 / EVENT_SAMPLE_S)) + 1
    grid = t0[:, None] + np.arange(n)[None, :] * EVENT_SAMPLE_S
    extra = np.column_stack([t1, transit, low_before, low_after])
    pts = np.clip(np.concatenate([grid, extra], axis=1), t0[:, None], t1[:, None])
    return np.sort(pts, axis=1)


def _crossings(samples: np.ndarray, ds: _DaySun):
    """Where the geometric elevation crosses the rise/set line between samples.

    Returns the day index, the refined time (UT seconds) and whether the sun
    rises there, for each crossing, plus the sign of the first sample.
    """
    n_day, n_pt = samples.shape
    rows = np.repeat(np.arange(n_day), n_pt)
    e = (ds.elevation_deg(samples.ravel(), rows) - RISE_SET_ELEVATION_DEG).reshape(n_day, n_pt)
    up = e > 0
    day_i, seg_i = np.nonzero(up[:, :-1] != up[:, 1:])
    a, b = samples[day_i, seg_i], samples[day_i, seg_i + 1]
    t = _find_roots(lambda x, i: ds.elevation_deg(x, day_i[i]) - RISE_SET_ELEVATION_DEG,
                    a, b, e[day_i, seg_i], e[day_i, seg_i + 1])
    return day_i, t, ~up[day_i, seg_i], up[:, 0]


def _local_day_bounds(day: pd.DatetimeIndex, tz: str) -> tuple[np.ndarray, np.ndarray]:
    """UT seconds of local midnight at the start and end of each local date."""
    kw = {"ambiguous": True, "nonexistent": "shift_forward"}
    t0 = _unix_seconds(day.tz_localize(tz, **kw))
    t1 = _unix_seconds((day + pd.Timedelta(days=1)).tz_localize(tz, **kw))
    return t0, t1


def _transits(ds: _DaySun, guess_s, day, target_deg) -> np.ndarray:
    """Where the hour angle equals ``target_deg`` (0 upper, 180 lower transit), nearest each guess.

    Fixed-point steps ``t -= (H - target) / (360 deg per day)``; the rate of
    ``H`` (sidereal rate less the sun's right ascension rate) differs from
    360 deg per day by under 0.05 %, so three steps from a guess within 12 h
    are exact to well under a millisecond (Reda & Andreas 2008, eq. 32 for H).
    """
    t = np.asarray(guess_s, dtype=float).copy()
    for _ in range(3):
        h = (ds.hour_angle_deg(t, day) - target_deg + 180.0) % 360.0 - 180.0
        t -= h / 360.0 * _SOLAR_DAY_S
    return t


def _day_transits(t0, t1, ds: _DaySun) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The upper transit inside each local day ``[t0, t1)`` and the lower ones around it."""
    n = len(t0)
    days = np.arange(n)
    transit = _transits(ds, 0.5 * (t0 + t1), days, 0.0)
    for _ in range(2):   # a zone so far from its meridian that the transit left the day
        shift = np.where(transit < t0, _SOLAR_DAY_S, np.where(transit >= t1, -_SOLAR_DAY_S, 0))
        if not shift.any():
            break
        transit = np.where(shift != 0, _transits(ds, transit + shift, days, 0.0), transit)
    half = 0.5 * _SOLAR_DAY_S
    lows = _transits(ds, np.concatenate([transit - half, transit + half]),
                     np.concatenate([days, days]), 180.0)
    return transit, lows[:n], lows[n:]


def _local(seconds, tz) -> pd.DatetimeIndex:
    """UT seconds (NaN for none) as local aware times (NaT for none)."""
    s = np.asarray(seconds, dtype=float)
    us = np.where(np.isfinite(s), np.round(np.nan_to_num(s) * 1e6), 0).astype("int64")
    idx = pd.DatetimeIndex(pd.to_datetime(us, unit="us", utc=True)).tz_convert(tz)
    return idx.where(np.isfinite(s))


def sun_events(site: Site, dates) -> SunEvents:
    """Sunrise, sunset, solar noon, day length and noon elevation per local date.

    Method, for each local calendar date (local midnight to local midnight in
    the site's zone, so 23 or 25 hours on daylight-saving changes):

    1. Solar noon is the sun's upper meridian transit inside the date: the
       root of the SPA geocentric local hour angle (Reda & Andreas 2008,
       eq. 32, the quantity SPA App. A.2 interpolates), found from the middle
       of the date by fixed-point steps (exact to well under a millisecond).
       The lower transits before and after it are found the same way.
    2. The SPA topocentric geometric (unrefracted) elevation of the sun's
       centre is sampled every :data:`EVENT_SAMPLE_S` seconds across the date
       and at the three transits. Sunrise and sunset are where it crosses
       :data:`RISE_SET_ELEVATION_DEG` (-50': 34' of standard refraction at the
       horizon and 16' of solar semi-diameter, the almanac convention of SPA
       App. A.2); each sign change between samples is refined by a bracketed
       root search (Anderson-Bjorck, vectorised over all events) on the SPA
       elevation to :data:`EVENT_TOLERANCE_S`. This avoids the three-day
       interpolation of SPA App. A.2, whose implementation in pvlib (``spa.
       transit_sunrise_sunset``) wraps event times into the UT day before
       interpolating and so errs by minutes when an event falls on another UT
       day than the transit. The elevation is monotonic between a transit and
       the next sample or transit everywhere except within about half a degree
       of the poles, so no crossing is missed there; near the poles a pair of
       crossings less than half an hour apart (a grazing of the line by under
       about 0.001°) can be missed.
    3. Every event lies on the requested local date. Sunrise is the date's
       first rising and sunset its last setting; a date with no rising (or no
       setting) gives NaT for it, as happens around the first and last days
       of polar day and polar night. ``polar`` is ``"day"`` when the sun stays
       above the line all date, ``"night"`` when it stays below, else None.
    4. ``day_length_h`` is the time the sun's centre spends above the line
       during the date: ``sunset - sunrise`` on an ordinary day, the length of
       the date in polar day, 0 in polar night.

    Compared with the JPL DE421 ephemeris (through skyfield) the events agree
    within about 1 s wherever the sun crosses the line at more than 1 deg/h;
    slower crossings near the polar transitions are as accurate in elevation
    (SPA's +/-0.0003°) but less in time (see tests/engine/test_sun_events.py).

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
    Applications. NREL/TP-560-34302 (positions, hour angle; App. A.2 for the
    -0.8333° convention). Anderson & Bjorck (1973), BIT 13, 253-264 (root
    search).
    """
    tz = site.timezone
    day = pd.DatetimeIndex(pd.to_datetime(list(dates))).normalize()
    if day.tz is not None:
        day = day.tz_localize(None)
    t0, t1 = _local_day_bounds(day, tz)
    dts = delta_t_s(_utc_times(0.5 * (t0 + t1)))
    ds = _DaySun(0.5 * (t0 + t1), dts, site)
    transit, low_before, low_after = _day_transits(t0, t1, ds)
    samples = _event_samples(t0, t1, transit, low_before, low_after)
    day_i, t_cross, rising, up_at_start = _crossings(samples, ds)
    n = len(day)
    sunrise = np.full(n, np.nan)
    sunset = np.full(n, np.nan)
    length_s = np.where(up_at_start, t1 - t0, 0.0)
    for i in range(n):
        sel = day_i == i
        t_i, r_i = t_cross[sel], rising[sel]
        order = np.argsort(t_i)
        t_i, r_i = t_i[order], r_i[order]
        if r_i.any():
            sunrise[i] = t_i[r_i][0]
        if (~r_i).any():
            sunset[i] = t_i[~r_i][-1]
        # each crossing adds (rising) or removes (setting) the time to the day's end
        length_s[i] += float(np.sum(np.where(r_i, t1[i] - t_i, t_i - t1[i])))
    no_event = np.bincount(day_i, minlength=n) == 0
    polar = np.full(n, None, dtype=object)
    polar[no_event & up_at_start] = "day"
    polar[no_event & ~up_at_start] = "night"
    transit_local = _local(transit, tz)
    max_el = ds.elevation_deg(transit, np.arange(n), apparent=True)
    table = pd.DataFrame({
        "date": [d.date() for d in day],
        "sunrise": _local(sunrise, tz),
        "sunset": _local(sunset, tz),
        "solar_noon": transit_local,
        "day_length_h": length_s / 3600.0,
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
    return _geocentric_sun(_unix_seconds(t), delta_t_s(t))[1]


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
    "RISE_SET_ELEVATION_DEG", "EvaluationPoints", "SeasonDates", "SunEvents", "day_path",
    "daily_declination_eot", "declination_deg", "delta_t_s", "earth_sun_distance_au",
    "evaluation_points", "hour_lines", "season_dates", "site_pressure_pa", "solar_position",
    "standard_path_dates", "sun_events",
]

