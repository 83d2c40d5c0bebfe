"""Daily sun events: sunrise, sunset, solar noon, day length, with polar day and night.

Positions by NREL SPA (Reda & Andreas 2008, NREL/TP-560-34302) through
:mod:`tiltyard.engine.solarpos`; see :func:`sun_events` for the method.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
from pvlib import spa as _spa

from .site import Site
from .solarpos import (
    _SOLAR_DAY_S,
    REFRACTION_TEMPERATURE_C,
    RISE_SET_ELEVATION_DEG,
    _find_roots,
    _sidereal_deg,
    _slow_terms,
    _unix_seconds,
    _utc_times,
    delta_t_s,
    site_pressure_pa,
)

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



#: Spacing of the elevation samples that bracket sunrise and sunset, s.
EVENT_SAMPLE_S = 1800.0

#: Event times are refined until the bracket or the last step is below this, s.
EVENT_TOLERANCE_S = 1e-3


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
                    a, b, e[day_i, seg_i], e[day_i, seg_i + 1], tol=EVENT_TOLERANCE_S)
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
    finite = np.isfinite(s)
    us = np.where(finite, np.round(np.nan_to_num(s) * 1e6), 0).astype("int64")
    idx = pd.DatetimeIndex(pd.to_datetime(us, unit="us", utc=True)).tz_convert(tz)
    return idx if finite.all() else idx.where(finite)


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


__all__ = ["EVENT_SAMPLE_S", "EVENT_TOLERANCE_S", "SunEvents", "sun_events"]
