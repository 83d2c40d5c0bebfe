"""Solar position by NREL SPA, and its time-only terms.

Positions come from the NREL Solar Position Algorithm (Reda & Andreas 2004,
NREL/TP-560-34302) through the step functions of :mod:`pvlib.spa`, the same
steps in the same order as :func:`pvlib.solarposition.get_solarposition`
(``method="nrel_numpy"``), with atmospheric refraction from the pressure implied
by the site elevation (:func:`pvlib.atmosphere.alt2pres`) and an annual mean air
temperature of 12 °C (the SPA report's default). Azimuth is degrees clockwise
from true north.

SPA splits into terms that depend on time only (the Julian days, the Earth's
heliocentric position and distance, nutation, obliquity, the sun's geocentric
right ascension and declination, sidereal time, the equation of time: about
80 % of the cost) and the topocentric steps of one site. :class:`TimeTerms`
holds the first kind for a set of instants; :func:`time_terms` computes them and
keeps the last few sets in a per-process cache keyed by the instants and delta
T, so every site of a batch with the same year, interval and time zone reuses
them.
"""

from __future__ import annotations

import hashlib
import threading
from dataclasses import dataclass

import numpy as np
import pandas as pd
import pvlib
from pvlib import spa as _spa

from .site import Site

#: Geometric (unrefracted) elevation of the sun's centre at sunrise and sunset:
#: -(34' standard refraction at the horizon + 16' solar semi-diameter) (Reda &
#: Andreas 2008, App. A.2). pvlib applies its refraction correction only above
#: this geometric elevation (-0.83337°), so the SPA apparent elevation crosses
#: the same value within 0.1 s of the same instant.
RISE_SET_ELEVATION_DEG = -0.8333

#: Annual mean air temperature assumed for refraction (SPA default), deg C.
REFRACTION_TEMPERATURE_C = 12.0


#: One day, s.
_SOLAR_DAY_S = 86400.0


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


# -- SPA in two parts: time-only terms, then one site ---------------------------

@dataclass(frozen=True, eq=False)
class TimeTerms:
    """SPA's time-only terms at a set of instants (the same for every site).

    Attributes
    ----------
    unixtime : numpy.ndarray
        UT seconds since 1970, as :func:`pvlib.solarposition.spa_python` makes them.
    delta_t : numpy.ndarray
        TT - UT1 per instant, s.
    sidereal_deg, right_ascension_deg, declination_deg : numpy.ndarray
        Apparent sidereal time at Greenwich and the sun's geocentric apparent
        right ascension and declination (Reda & Andreas 2008, eqs. 12-15, 19-20).
    radius_au : numpy.ndarray
        Earth-Sun distance (sec. 3.2.8).
    equation_of_time_min : numpy.ndarray
        Equation of time, minutes (App. A.1).
    """

    unixtime: np.ndarray
    delta_t: np.ndarray
    sidereal_deg: np.ndarray
    right_ascension_deg: np.ndarray
    declination_deg: np.ndarray
    radius_au: np.ndarray
    equation_of_time_min: np.ndarray

    def __len__(self) -> int:
        return self.unixtime.size


_TERM_FIELDS = ("sidereal_deg", "right_ascension_deg", "declination_deg", "radius_au",
                "equation_of_time_min")

#: Sets of instants kept by :func:`time_terms` per process.
TIME_TERMS_CACHE_SIZE = 12

#: Larger sets of instants are computed but not kept (a year at 5-minute intervals fits).
TIME_TERMS_CACHE_MAX = 110_000

#: Smaller sets are computed but not kept either: they are cheap, belong to one site (a
#: day's path, a root search, a row layout's window) and would push a year's terms out.
TIME_TERMS_CACHE_MIN = 256

_cache: dict = {}
_radius_cache: dict = {}         # earth_sun_distance_au's sets, kept the same way
_cache_lock = threading.Lock()   # engine calls may run in threads


#: Below this many instants the periodic series of SPA are summed over the table rows
#: at once (:func:`_series`); from it on, pvlib's loop over the rows is faster.
SMALL_SET = 256


def _series(table: np.ndarray, x: np.ndarray) -> np.ndarray:
    """``sum_i A_i cos(B_i + C_i x)`` over a table's rows, for a few instants at once.

    The rows are evaluated together and added one after another in row order
    (``np.add.accumulate``), which is what :func:`pvlib.spa.sum_mult_cos_add_mult`
    does one row at a time, so each value is the same number; it is about ten
    times faster for a single instant (the root searches and the row layouts).

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, eqs. 9-10 and Table A4.2 (the
    tables as shipped in :mod:`pvlib.spa`).
    """
    terms = table[:, 0:1] * np.cos(table[:, 1:2] + table[:, 2:3] * x[None, :])
    return np.add.accumulate(terms, axis=0)[-1]


def _few_heliocentric(jme: np.ndarray) -> tuple[np.ndarray, ...]:
    """Heliocentric longitude and latitude (degrees) and radius (AU), as
    :func:`pvlib.spa.heliocentric_longitude`, ``_latitude`` and ``_radius_vector``
    compute them, for a few instants (Reda & Andreas 2008, eqs. 9-12)."""
    l0, l1, l2, l3, l4, l5 = (_series(t, jme) for t in (_spa.L0, _spa.L1, _spa.L2, _spa.L3,
                                                        _spa.L4, _spa.L5))
    l_rad = (l0 + l1 * jme + l2 * jme**2 + l3 * jme**3 + l4 * jme**4 + l5 * jme**5) / 10**8
    b0, b1 = _series(_spa.B0, jme), _series(_spa.B1, jme)
    r0, r1, r2, r3, r4 = (_series(t, jme) for t in (_spa.R0, _spa.R1, _spa.R2, _spa.R3,
                                                    _spa.R4))
    big_r = (r0 + r1 * jme + r2 * jme**2 + r3 * jme**3 + r4 * jme**4) / 10**8
    return np.rad2deg(l_rad) % 360, np.rad2deg((b0 + b1 * jme) / 10**8), big_r


def _few_nutation(jce, x0, x1, x2, x3, x4, out) -> None:
    """Nutation in longitude and obliquity into ``out``, as
    :func:`pvlib.spa.longitude_obliquity_nutation` computes them (the rows added in
    order), for a few instants (Reda & Andreas 2008, eqs. 20-23, Table A4.3)."""
    y, abcd = _spa.NUTATION_YTERM_ARRAY, _spa.NUTATION_ABCD_ARRAY
    arg = np.radians(y[:, 0:1] * x0[None] + y[:, 1:2] * x1[None] + y[:, 2:3] * x2[None]
                     + y[:, 3:4] * x3[None] + y[:, 4:5] * x4[None])
    psi = np.add.accumulate((abcd[:, 0:1] + abcd[:, 1:2] * jce[None]) * np.sin(arg), axis=0)
    eps = np.add.accumulate((abcd[:, 2:3] + abcd[:, 3:4] * jce[None]) * np.cos(arg), axis=0)
    out[0] = psi[-1] * 1.0 / 36000000
    out[1] = eps[-1] * 1.0 / 36000000


def _geocentric_chain(unixtime: np.ndarray, delta_t) -> tuple[np.ndarray, ...]:
    """SPA from the Julian day to the sun's geocentric apparent position, in the order of
    :func:`pvlib.spa.solar_position_numpy`: ``(jd, jc, jme, radius_au, delta_psi, epsilon,
    right_ascension, declination)`` (Reda & Andreas 2008, sections 3.1-3.8). Sets of
    fewer than :data:`SMALL_SET` instants sum the periodic series over the table rows at
    once, to the same numbers."""
    shape = np.shape(unixtime)
    t = np.atleast_1d(np.asarray(unixtime, dtype=float)).ravel()
    dt = np.broadcast_to(np.asarray(delta_t, dtype=float), shape).ravel() \
        if np.ndim(delta_t) else delta_t
    jd = _spa.julian_day(t)
    jde = _spa.julian_ephemeris_day(jd, dt)
    jc = _spa.julian_century(jd)
    jce = _spa.julian_ephemeris_century(jde)
    jme = _spa.julian_ephemeris_millennium(jce)
    few = jme.size < SMALL_SET
    if few:
        helio_l, helio_b, big_r = _few_heliocentric(jme)
    else:
        big_r = _spa.heliocentric_radius_vector(jme)
        helio_l, helio_b = _spa.heliocentric_longitude(jme), _spa.heliocentric_latitude(jme)
    theta = _spa.geocentric_longitude(helio_l)
    beta = _spa.geocentric_latitude(helio_b)
    x = (_spa.mean_elongation(jce), _spa.mean_anomaly_sun(jce), _spa.mean_anomaly_moon(jce),
         _spa.moon_argument_latitude(jce), _spa.moon_ascending_longitude(jce))
    l_o = np.empty((2, jce.size))
    (_few_nutation if few else _spa.longitude_obliquity_nutation)(jce, *x, l_o)
    delta_psi, delta_eps = l_o[0], l_o[1]
    eps = _spa.true_ecliptic_obliquity(_spa.mean_ecliptic_obliquity(jme), delta_eps)
    lamd = _spa.apparent_sun_longitude(theta, delta_psi, _spa.aberration_correction(big_r))
    alpha = _spa.geocentric_sun_right_ascension(lamd, eps, beta)
    delta = _spa.geocentric_sun_declination(lamd, eps, beta)
    return tuple(np.asarray(v, dtype=float).reshape(shape)
                 for v in (jd, jc, jme, big_r, delta_psi, eps, alpha, delta))


def _compute_time_terms(unixtime: np.ndarray, delta_t: np.ndarray) -> tuple:
    """The time-only steps of :func:`pvlib.spa.solar_position_numpy`, in its order:
    sidereal time, right ascension, declination, distance, equation of time
    (Reda & Andreas 2008, sections 3.1-3.8, App. A.1)."""
    jd, jc, jme, big_r, delta_psi, eps, alpha, delta = _geocentric_chain(unixtime, delta_t)
    nu = _spa.apparent_sidereal_time(_spa.mean_sidereal_time(jd, jc), delta_psi, eps)
    eot = _spa.equation_of_time(_spa.sun_mean_longitude(jme), alpha, delta_psi, eps)
    return tuple(np.asarray(v, dtype=float) for v in (nu, alpha, delta, big_r, eot))


def time_terms(unixtime, delta_t) -> TimeTerms:
    """SPA's time-only terms at ``unixtime``, from the per-process cache when it can.

    A set of instants and delta T seen before (the same year, interval and time
    zone, for any site) comes from the cache. A set of the same length that
    differs from a kept one in some instants (a year's evaluation instants: the
    midpoints of the intervals, moved where the sun rises or sets inside one)
    takes the kept terms where the instants agree and computes the rest. Every
    value equals a fresh computation bit for bit: the steps are elementwise.

    Parameters
    ----------
    unixtime : array_like
        UT seconds since 1970.
    delta_t : float or array_like
        TT - UT1, s.

    Returns
    -------
    TimeTerms

    References
    ----------
    Reda, I. & Andreas, A. (2008). Solar Position Algorithm for Solar Radiation
    Applications. NREL/TP-560-34302, sections 3.1-3.8 and App. A.1, through the
    step functions of :mod:`pvlib.spa`.
    """
    t = np.atleast_1d(np.asarray(unixtime, dtype=float))
    dt = np.broadcast_to(np.asarray(delta_t, dtype=float), t.shape)

    def build(values):
        out = TimeTerms(t.copy(), np.array(dt), *values)
        for f in ("unixtime", "delta_t", *_TERM_FIELDS):
            getattr(out, f).setflags(write=False)
        return out

    return _kept_per_process(_cache, t, dt, _compute_time_terms, _TERM_FIELDS, build)


def _kept_per_process(store: dict, t: np.ndarray, dt: np.ndarray, compute, fields, build):
    """``build(values)`` for the instants ``t`` with delta T ``dt``, kept in ``store``.

    ``compute(t, dt)`` gives the tuple of elementwise values named ``fields``
    (attributes of what ``build`` makes, along with ``unixtime`` and ``delta_t``).
    A set seen before comes back as it is; a set of the same length agreeing with
    a kept one in at least half its instants takes the kept values there and
    computes the rest (two or more instants at once, as a whole set is computed),
    and is kept in its place.
    The last :data:`TIME_TERMS_CACHE_SIZE` sets of :data:`TIME_TERMS_CACHE_MIN` to
    :data:`TIME_TERMS_CACHE_MAX` instants are kept. Common practice, no source.
    """
    keep = TIME_TERMS_CACHE_MIN <= t.size <= TIME_TERMS_CACHE_MAX
    key = None
    if keep:
        key = (t.size, hashlib.blake2b(t.tobytes() + dt.tobytes(), digest_size=16).digest())
        with _cache_lock:
            hit = store.pop(key, None)
            if hit is not None:
                store[key] = hit                   # most recently used last
                return hit
            kept = list(store.items())
    values = base = None
    if keep:
        for old_key, old in reversed(kept):
            if len(old.unixtime) != t.size:
                continue
            same = (old.unixtime == t) & (old.delta_t == dt)
            if same.mean() < 0.5:
                continue
            base, values = old_key, [getattr(old, f).copy() for f in fields]
            new = np.flatnonzero(~same)
            if new.size:
                pick = new if new.size > 1 else np.repeat(new, 2)
                fresh = compute(t[pick], dt[pick])
                for v, f in zip(values, fresh, strict=True):
                    v[new] = f[: new.size]
            break
    if values is None:
        values = compute(t, dt)
    out = build(values)
    if keep:
        with _cache_lock:
            # the new set takes the place of the one it was made from: the next site of
            # the zone starts from either as well, and each zone keeps one set of its kind
            store.pop(base, None)
            store[key] = out
            while len(store) > TIME_TERMS_CACHE_SIZE:
                store.pop(next(iter(store)))
    return out


def clear_time_terms_cache() -> None:
    """Forget the kept :class:`TimeTerms` and Earth-Sun distances (tests; a worker that
    moves to another year)."""
    with _cache_lock:
        _cache.clear()
        _radius_cache.clear()


def site_positions(terms: TimeTerms, site: Site, pressure_pa: float | None = None,
                   temperature_c: float = REFRACTION_TEMPERATURE_C,
                   atmos_refract_deg: float = 0.5667) -> tuple[np.ndarray, ...]:
    """SPA's topocentric steps for one site on precomputed :class:`TimeTerms`.

    Returns ``(apparent_zenith, zenith, apparent_elevation, elevation, azimuth)``
    in degrees, azimuth clockwise from north: the site part of
    :func:`pvlib.spa.solar_position_numpy`, step for step.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, sections 3.9-3.15 (hour angle,
    parallax, topocentric elevation, refraction, azimuth), through
    :mod:`pvlib.spa`.
    """
    lat, lon, elev = site.latitude_deg, site.longitude_deg, site.elevation_m
    if pressure_pa is None:
        pressure_pa = site_pressure_pa(elev)
    delta = terms.declination_deg
    h = _spa.local_hour_angle(terms.sidereal_deg, lon, terms.right_ascension_deg)
    xi = _spa.equatorial_horizontal_parallax(terms.radius_au)
    u = _spa.uterm(lat)
    x, y = _spa.xterm(u, lat, elev), _spa.yterm(u, lat, elev)
    d_alpha = _spa.parallax_sun_right_ascension(x, xi, h, delta)
    delta_p = _spa.topocentric_sun_declination(delta, x, y, xi, d_alpha, h)
    h_p = _spa.topocentric_local_hour_angle(h, d_alpha)
    e0 = _spa.topocentric_elevation_angle_without_atmosphere(lat, delta_p, h_p)
    de = _spa.atmospheric_refraction_correction(pressure_pa / 100, temperature_c, e0,
                                                atmos_refract_deg)
    e = _spa.topocentric_elevation_angle(e0, de)
    phi = _spa.topocentric_azimuth_angle(_spa.topocentric_astronomers_azimuth(h_p, delta_p, lat))
    return tuple(np.asarray(v, dtype=float) for v in (
        _spa.topocentric_zenith_angle(e), _spa.topocentric_zenith_angle(e0), e, e0, phi))


def refracted_elevation_deg(elevation_deg, site: Site, pressure_pa: float | None = None,
                            temperature_c: float = REFRACTION_TEMPERATURE_C,
                            atmos_refract_deg: float = 0.5667) -> np.ndarray:
    """Apparent (refracted) solar elevation from the geometric one, degrees.

    The refraction step of :func:`site_positions` on its own, with the same
    pressure and temperature, for sun positions found without SPA's earlier
    steps (:mod:`tiltyard.engine.skynodes`).

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, eqs. 42-43, through
    :mod:`pvlib.spa`.
    """
    if pressure_pa is None:
        pressure_pa = site_pressure_pa(site.elevation_m)
    e0 = np.asarray(elevation_deg, dtype=float)
    de = _spa.atmospheric_refraction_correction(pressure_pa / 100, temperature_c, e0,
                                                atmos_refract_deg)
    return np.asarray(_spa.topocentric_elevation_angle(e0, de), dtype=float)


def _spa_unixtime(times: pd.DatetimeIndex) -> np.ndarray:
    """Seconds since 1970 as :func:`pvlib.solarposition.spa_python` computes them."""
    epoch = pd.Timestamp("1970-01-01", tz="UTC").tz_convert(times.tz)
    return np.array((times - epoch) / pd.Timedelta("1s"))


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

    Notes
    -----
    The time-only terms come from :func:`time_terms` (kept per process), the
    site's steps from :func:`site_positions`: the same numbers as
    :func:`pvlib.solarposition.spa_python` with these inputs.

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
    terms = time_terms(_spa_unixtime(times), delta_t)
    zen_app, zen, el_app, el, az = site_positions(terms, site, pressure_pa, temperature_c)
    return pd.DataFrame({"apparent_zenith": zen_app, "zenith": zen, "apparent_elevation": el_app,
                         "elevation": el, "azimuth": az,
                         "equation_of_time": np.array(terms.equation_of_time_min)}, index=times)


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
    terms = TimeTerms(t, dts, *_compute_time_terms(t, dts))
    return site_positions(terms, site)[3]


def _slow_terms(unixtime: np.ndarray, delta_t) -> tuple[np.ndarray, ...]:
    """SPA's slowly varying terms: right ascension, declination, nutation, distance.

    Geocentric apparent right ascension and declination, nutation in
    longitude and the true obliquity (degrees), and the Earth-Sun distance
    (AU), by the steps of Reda & Andreas (2008), NREL/TP-560-34302, sections
    3.1-3.8, through the step functions of :mod:`pvlib.spa`. ``unixtime`` is
    UT in seconds since 1970; ``delta_t`` is TT - UT1 in seconds.
    """
    _, _, _, big_r, delta_psi, eps, alpha, delta = _geocentric_chain(unixtime, delta_t)
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
                tol: float, max_iter: int = 40) -> np.ndarray:
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


def earth_sun_distance_au(times: pd.DatetimeIndex, delta_t: float | None = None) -> np.ndarray:
    """Earth-Sun distance in astronomical units by SPA.

    A year's evaluation instants are the same for every site of a time zone but
    where the sun rises or sets inside an interval, so the distances are kept per
    process as :func:`time_terms` keeps its terms (the same numbers as computed
    afresh).

    Parameters
    ----------
    times : pandas.DatetimeIndex
        Instants.
    delta_t : float, optional
        TT - UT1, s. Given, the distance comes from :func:`time_terms` (the
        per-process cache, so instants whose positions were just computed with
        the same delta T cost nothing); by default from :func:`delta_t_s`, kept
        per process as said above.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, section 3.2.8, through
    :func:`pvlib.solarposition.nrel_earthsun_distance` or the same steps of
    :mod:`pvlib.spa` in :func:`time_terms`.
    """
    t = pd.DatetimeIndex(times)
    if delta_t is not None:
        return np.asarray(time_terms(_spa_unixtime(t), delta_t).radius_au, dtype=float)
    unixtime = np.atleast_1d(_spa_unixtime(t).astype(float))
    dt = np.broadcast_to(np.asarray(delta_t_s(t), dtype=float), unixtime.shape)
    kept = _kept_per_process(_radius_cache, unixtime, dt, _radius_au, ("radius_au",),
                             lambda values: _Radius(unixtime.copy(), np.array(dt), values[0]))
    return kept.radius_au.copy()


@dataclass(frozen=True, eq=False)
class _Radius:
    """Earth-Sun distances at a set of instants, as :func:`earth_sun_distance_au` keeps them."""

    unixtime: np.ndarray
    delta_t: np.ndarray
    radius_au: np.ndarray


def _radius_au(unixtime: np.ndarray, delta_t: np.ndarray) -> tuple[np.ndarray]:
    """SPA's Earth-Sun distance, AU: :func:`pvlib.spa.earthsun_distance`, which
    :func:`pvlib.solarposition.nrel_earthsun_distance` calls (Reda & Andreas 2008,
    sec. 3.2.8)."""
    return (np.asarray(_spa.earthsun_distance(unixtime, delta_t, 1), dtype=float),)


