"""Monthly-mean irradiation on a tilted surface from 12 monthly mean daily GHI values.

This is the handbook route for a site where all that is known is a table of
monthly mean daily global irradiation on the horizontal (for instance from a
local meteorological yearbook):

1. extraterrestrial horizontal irradiation ``H0`` on the recommended mean day
   of each month (Klein 1977; Duffie & Beckman 2013, Table 1.6.1, eq. 1.10.3),
   giving the monthly clearness index ``K_T = H / H0``;
2. the monthly diffuse fraction ``Hd/H`` from the Erbs et al. (1982) monthly
   correlation (Duffie & Beckman 2013, eq. 2.12.2);
3. Klein's (1977) monthly mean beam ratio ``R_b`` for a surface of any
   tilt and azimuth;
4. the isotropic-sky (Liu-Jordan) sum of beam, sky-diffuse and ground-reflected
   parts (Duffie & Beckman 2013, eq. 2.19.1).

Azimuths follow the project convention (degrees clockwise from true north,
south = 180, in both hemispheres); they are converted to the textbook's
surface azimuth (from south, west positive) once, inside
:func:`klein_monthly_beam_ratio`. Irradiation is in kWh/m^2 per day unless a
name says otherwise.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tiltyard.engine.geometry import (
    DAYS_IN_MONTH,
    MEAN_DAY_OF_MONTH,
    azimuth_north_to_south_based,
    daily_h0_horizontal_closed_form_j_m2,
    declination_cooper_deg,
    eccentricity_factor_db,
    incidence_coefficients,
    sunset_hour_angle_deg,
)
from tiltyard.engine.words import MONTH_ABBR

#: Range of monthly clearness index over which Erbs et al. (1982) fitted their
#: monthly correlation (Duffie & Beckman 2013, sec. 2.12).
ERBS_MONTHLY_KT_RANGE = (0.3, 0.8)

#: Sunset hour angle (degrees) that separates the two seasonal branches of the
#: Erbs et al. (1982) monthly correlation (Duffie & Beckman 2013, eq. 2.12.2).
ERBS_SUNSET_HOUR_ANGLE_SPLIT_DEG = 81.4

_J_PER_KWH = 3.6e6


# ---------------------------------------------------------------------------
# Building blocks
# ---------------------------------------------------------------------------


def erbs_monthly_diffuse_fraction(kt_bar, sunset_hour_angle_deg):
    """Monthly mean diffuse fraction ``Hd/H`` by the Erbs et al. (1982) correlation.

    Two cubic polynomials in the monthly clearness index, chosen by the
    sunset hour angle of the month's mean day::

        ws <= 81.4 deg:  Hd/H = 1.391 - 3.560 K + 4.189 K^2 - 2.137 K^3
        ws >  81.4 deg:  Hd/H = 1.311 - 3.022 K + 3.427 K^2 - 1.821 K^3

    The correlation was fitted for ``0.3 <= K <= 0.8``. Outside that range the
    polynomials turn unphysical (above 1 for a dark month), so ``K`` is held at
    the nearest end of the range before evaluation (common practice, no source).
    Callers that accept such months must tell the user; :func:`klein_monthly_tilted`
    records a note for each.

    Parameters
    ----------
    kt_bar : array_like
        Monthly mean clearness index ``H / H0``, dimensionless, within [0, 1].
    sunset_hour_angle_deg : array_like
        Sunset hour angle of the month's mean day on a horizontal surface,
        degrees, within [0, 180]. Broadcast against ``kt_bar``.

    Returns
    -------
    numpy.ndarray
        Monthly mean diffuse fraction ``Hd/H``, dimensionless.

    Raises
    ------
    ValueError
        If ``kt_bar`` or ``sunset_hour_angle_deg`` is not finite or out of range.

    References
    ----------
    Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Estimation of the diffuse
    radiation fraction for hourly, daily and monthly-average global radiation.
    Solar Energy 28(4), 293-302.
    Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal
    Processes, 4th ed., eq. 2.12.2.
    """
    kt = np.asarray(kt_bar, dtype=float)
    ws = np.asarray(sunset_hour_angle_deg, dtype=float)
    _check_range("kt_bar", kt, 0.0, 1.0)
    _check_range("sunset_hour_angle_deg", ws, 0.0, 180.0)
    k = np.clip(kt, *ERBS_MONTHLY_KT_RANGE)
    winter = 1.391 - 3.560 * k + 4.189 * k**2 - 2.137 * k**3
    summer = 1.311 - 3.022 * k + 3.427 * k**2 - 1.821 * k**3
    return np.where(ws <= ERBS_SUNSET_HOUR_ANGLE_SPLIT_DEG, winter, summer)


def first_dark_daylight_month(latitude_deg: float, ghi_kwh_m2_day):
    """Index (0 = January) of the first month with daylight but no global irradiation.

    Parameters
    ----------
    latitude_deg : float
        Site latitude.
    ghi_kwh_m2_day : sequence of 12 float
        Monthly mean daily global horizontal irradiation, January first.

    Returns
    -------
    int or None
        The month's index, or None if every month with daylight has some.

    References
    ----------
    A month whose mean day has daylight (H0 > 0, Duffie & Beckman 2013, eq. 1.10.3)
    always receives some global irradiation (common practice, no source).
    """
    h0 = monthly_mean_extraterrestrial_kwh_m2_day(latitude_deg)
    for i, (value, top) in enumerate(zip(ghi_kwh_m2_day, h0, strict=True)):
        if value <= 0.0 < top:
            return i
    return None


def monthly_mean_extraterrestrial_kwh_m2_day(latitude_deg, solar_constant_w_m2=1361.0):
    """Extraterrestrial horizontal irradiation on the mean day of each month.

    Evaluates the closed-form daily integral on Klein's recommended mean day of
    each month, whose value is within about 1 % of the month's mean.

    Parameters
    ----------
    latitude_deg : float
        Latitude, degrees north positive, within [-90, 90].
    solar_constant_w_m2 : float, default 1361
        Solar constant. Duffie & Beckman (2013) use 1367 W/m^2; 1361 follows
        Kopp & Lean (2011).

    Returns
    -------
    numpy.ndarray
        Twelve values ``H0`` in kWh/m^2 per day, January first.

    References
    ----------
    Klein, S. A. (1977). Calculation of monthly average insolation on tilted
    surfaces. Solar Energy 19, 325-329, Table 1 (mean days).
    Duffie & Beckman (2013), Table 1.6.1 and eq. 1.10.3.
    """
    lat = _scalar("latitude_deg", latitude_deg, -90.0, 90.0)
    sc = _scalar("solar_constant_w_m2", solar_constant_w_m2, 1300.0, 1450.0)
    declination = declination_cooper_deg(MEAN_DAY_OF_MONTH)
    eccentricity = eccentricity_factor_db(MEAN_DAY_OF_MONTH)
    h0_j = daily_h0_horizontal_closed_form_j_m2(lat, declination, eccentricity, sc)
    return np.maximum(h0_j, 0.0) / _J_PER_KWH


def klein_monthly_beam_ratio(latitude_deg, declination_deg, surface_tilt, surface_azimuth):
    """Klein's monthly mean beam ratio ``R_b`` for a surface of any orientation.

    ``R_b`` is the ratio of the daily extraterrestrial beam irradiation on the
    tilted surface to that on the horizontal, evaluated on the month's mean day::

        R_b = integral(cos theta, w_sr .. w_ss) / integral(cos theta_z, -w_s .. w_s)

    with ``cos theta = a + b cos w + c sin w`` (Duffie & Beckman 2013, eq. 1.6.2)
    and ``w_sr, w_ss`` the hour angles at which the sun rises and sets *on the
    surface*: where ``cos theta`` crosses zero, clipped to the horizontal
    sunrise and sunset ``-w_s, w_s``. The integrand has the antiderivative
    ``a w + b sin w - c cos w``, so the ratio is closed form (Klein 1977).

    The limits are found as the intersection of the arc of hour angles where
    ``cos theta > 0`` with the horizontal day. For surfaces sunlit in one period
    this gives Klein's ``w_sr`` and ``w_ss``; a surface sunlit in two periods
    (a steep poleward-facing surface near midsummer sees the sun early and
    late) gets both periods, the case Klein & Theilacker (1981) point out.
    For equator-facing surfaces the result equals Duffie & Beckman (2013)
    eq. 2.19.3 (and its southern-hemisphere form, phi + beta for phi - beta).

    Parameters
    ----------
    latitude_deg : array_like
        Latitude, degrees north positive.
    declination_deg : array_like
        Solar declination of the mean day, degrees.
    surface_tilt : array_like
        Surface tilt from horizontal, degrees, within [0, 180].
    surface_azimuth : array_like
        Azimuth of the surface normal, degrees clockwise from north (south = 180).

    Returns
    -------
    numpy.ndarray
        ``R_b``, dimensionless, >= 0; 0 where the horizontal day has no sun
        (polar night). Inputs broadcast against each other.

    Raises
    ------
    ValueError
        If an input is not finite or out of range (latitude [-90, 90],
        declination [-24, 24], tilt [0, 180], azimuth [0, 360]).

    References
    ----------
    Klein, S. A. (1977). Calculation of monthly average insolation on tilted
    surfaces. Solar Energy 19, 325-329.
    Klein, S. A. & Theilacker, J. C. (1981). An algorithm for calculating
    monthly-average radiation on inclined surfaces. J. Solar Energy Eng.
    103(1), 29-33.
    Duffie & Beckman (2013), eq. 1.6.2, eq. 2.19.3, sec. 2.19-2.20.
    """
    lat = np.asarray(latitude_deg, dtype=float)
    dec = np.asarray(declination_deg, dtype=float)
    tilt = np.asarray(surface_tilt, dtype=float)
    azimuth = np.asarray(surface_azimuth, dtype=float)
    _check_range("latitude_deg", lat, -90.0, 90.0)
    _check_range("declination_deg", dec, -24.0, 24.0)
    _check_range("surface_tilt", tilt, 0.0, 180.0)
    _check_range("surface_azimuth", azimuth, 0.0, 360.0)
    phi = np.radians(lat)
    delta = np.radians(dec)
    beta = np.radians(tilt)
    gamma = np.radians(azimuth_north_to_south_based(azimuth))
    ws = np.radians(sunset_hour_angle_deg(lat, dec))

    tilted = _daily_positive_cos_integral(*incidence_coefficients(phi, delta, beta, gamma), ws)
    # The horizontal integral goes through the same arithmetic (tilt 0), so a
    # horizontal surface gets R_b == 1 to the last bit.
    zero = np.zeros_like(beta)
    horizontal = _daily_positive_cos_integral(*incidence_coefficients(phi, delta, zero, zero), ws)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = tilted / horizontal
    return np.where(horizontal > 0.0, ratio, 0.0)


def isotropic_tilted_ratio(diffuse_fraction, rb_bar, surface_tilt, albedo):
    """Ratio ``R = H_T / H`` of the isotropic-sky (Liu-Jordan) monthly method.

    ``R = (1 - Hd/H) R_b + (Hd/H) (1 + cos beta)/2 + rho (1 - cos beta)/2``,
    evaluated as ``R_b + (Hd/H) (F_sky - R_b) + rho F_ground`` (same value),
    which is exactly 1 for a horizontal surface.

    Parameters
    ----------
    diffuse_fraction : array_like
        Monthly mean diffuse fraction ``Hd/H``.
    rb_bar : array_like
        Monthly mean beam ratio ``R_b``.
    surface_tilt : array_like
        Surface tilt from horizontal, degrees.
    albedo : array_like
        Ground reflectance ``rho``, dimensionless.

    Returns
    -------
    numpy.ndarray
        ``R``, dimensionless.

    References
    ----------
    Liu, B. Y. H. & Jordan, R. C. (1962). Daily insolation on surfaces tilted
    toward the equator. ASHRAE Journal 3(10), 53-59.
    Duffie & Beckman (2013), eq. 2.19.1-2.19.2.
    """
    fd = np.asarray(diffuse_fraction, dtype=float)
    rb = np.asarray(rb_bar, dtype=float)
    f_sky, f_ground = _view_factors(surface_tilt)
    return rb + fd * (f_sky - rb) + np.asarray(albedo, dtype=float) * f_ground


# ---------------------------------------------------------------------------
# Entry point
# ---------------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class MonthlyTiltedIrradiation:
    """Monthly-mean irradiation on a tilted surface, one value per month (Jan first).

    Daily values are monthly means of daily irradiation in kWh/m^2 per day;
    ``*_month`` values are the month's total in kWh/m^2 (daily mean times the
    days of a non-leap month). ``notes`` lists every month computed outside
    the validity range of a correlation, in plain words. Arrays are read-only.
    """

    latitude_deg: float
    surface_tilt: float
    surface_azimuth: float
    solar_constant_w_m2: float
    albedo: np.ndarray
    declination_deg: np.ndarray
    sunset_hour_angle_deg: np.ndarray
    ghi_kwh_m2_day: np.ndarray
    h0_kwh_m2_day: np.ndarray
    kt_bar: np.ndarray
    diffuse_fraction: np.ndarray
    rb_bar: np.ndarray
    r_bar: np.ndarray
    poa_global_kwh_m2_day: np.ndarray
    poa_direct_kwh_m2_day: np.ndarray
    poa_sky_diffuse_kwh_m2_day: np.ndarray
    poa_ground_diffuse_kwh_m2_day: np.ndarray
    poa_global_kwh_m2_month: np.ndarray
    ghi_kwh_m2_month: np.ndarray
    erbs_out_of_range: np.ndarray
    notes: tuple[str, ...]

    @property
    def poa_global_kwh_m2_year(self) -> float:
        """Annual irradiation on the surface, kWh/m^2 (sum of the monthly totals)."""
        return float(self.poa_global_kwh_m2_month.sum())

    @property
    def ghi_kwh_m2_year(self) -> float:
        """Annual irradiation on the horizontal, kWh/m^2 (sum of the monthly totals)."""
        return float(self.ghi_kwh_m2_month.sum())


def klein_monthly_tilted(
    latitude_deg,
    ghi_kwh_m2_day,
    surface_tilt,
    surface_azimuth,
    albedo=0.2,
    solar_constant_w_m2=1361.0,
) -> MonthlyTiltedIrradiation:
    """Monthly mean daily irradiation on a tilted surface from 12 monthly GHI values.

    Chains the mean-day extraterrestrial irradiation, the Erbs et al. (1982)
    monthly diffuse fraction, Klein's (1977) beam ratio for any azimuth and the
    isotropic-sky sum (Duffie & Beckman 2013, sec. 2.19, Example 2.19.1 is
    this calculation for Madison, WI). Each part::

        beam   = H (1 - Hd/H) R_b
        sky    = H (Hd/H) (1 + cos beta) / 2
        ground = H rho (1 - cos beta) / 2

    Months whose clearness index lies outside the 0.3-0.8 fitting range of the
    Erbs correlation are computed with the index held at the range end and
    listed in ``notes`` (and ``erbs_out_of_range``). A polar-night month
    (no extraterrestrial irradiation) must have GHI 0; it gives zeros (also for
    ``r_bar``) and a note. Close to polar night the mean day's ``H0`` tends to
    zero and ``R_b`` grows without bound (values near 100 occur for
    equator-facing slopes just outside the polar circle in December), so such
    months are very sensitive to the input and best read with care.

    Parameters
    ----------
    latitude_deg : float
        Latitude, degrees north positive, within [-90, 90].
    ghi_kwh_m2_day : array_like
        Twelve monthly mean daily global horizontal irradiation values,
        kWh/m^2 per day, January first; each within (0, H0) of its month.
    surface_tilt : float
        Surface tilt from horizontal, degrees, within [0, 180].
    surface_azimuth : float
        Azimuth of the surface normal, degrees clockwise from north, within
        [0, 360]. Equator-facing is 180 in the northern hemisphere, 0 in the
        southern.
    albedo : float or array_like, default 0.2
        Ground reflectance, a scalar or twelve monthly values, within [0, 1].
    solar_constant_w_m2 : float, default 1361
        Solar constant, within [1300, 1450]. Pass 1367 to reproduce Duffie &
        Beckman's worked examples.

    Returns
    -------
    MonthlyTiltedIrradiation

    Raises
    ------
    ValueError
        For a wrong number of values, a value that is not finite, or a value
        out of its range; the message names the field, the month, the value
        and the allowed range.

    References
    ----------
    Klein, S. A. (1977). Calculation of monthly average insolation on tilted
    surfaces. Solar Energy 19, 325-329.
    Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Solar Energy 28(4), 293-302.
    Liu, B. Y. H. & Jordan, R. C. (1962). ASHRAE Journal 3(10), 53-59.
    Duffie & Beckman (2013), eq. 1.10.3, 2.12.2, 2.19.1-2.19.3, Example 2.19.1.
    """
    lat = _scalar("latitude_deg", latitude_deg, -90.0, 90.0)
    tilt = _scalar("surface_tilt", surface_tilt, 0.0, 180.0)
    azimuth = _scalar("surface_azimuth", surface_azimuth, 0.0, 360.0)
    sc = _scalar("solar_constant_w_m2", solar_constant_w_m2, 1300.0, 1450.0)
    ghi = _twelve("ghi_kwh_m2_day", ghi_kwh_m2_day)
    rho = _twelve("albedo", albedo, allow_scalar=True)
    for i, value in enumerate(rho):
        if not 0.0 <= value <= 1.0:
            raise ValueError(
                f"albedo[{MONTH_ABBR[i]}] = {float(value)!r} is outside the allowed "
                "range 0 <= value <= 1"
            )

    declination = declination_cooper_deg(MEAN_DAY_OF_MONTH)
    ws = sunset_hour_angle_deg(lat, declination)
    h0 = monthly_mean_extraterrestrial_kwh_m2_day(lat, sc)
    polar_night = h0 <= 0.0
    for i in range(12):
        month = MONTH_ABBR[i]
        if polar_night[i]:
            if ghi[i] != 0.0:
                raise ValueError(
                    f"ghi_kwh_m2_day[{month}] = {float(ghi[i])!r} must be 0: at latitude "
                    f"{lat:.2f} deg the month's mean day is in polar night (H0 = 0)"
                )
        elif not 0.0 < ghi[i] < h0[i]:
            raise ValueError(
                f"ghi_kwh_m2_day[{month}] = {float(ghi[i])!r} is outside the allowed range "
                f"0 < value < {h0[i]:.3f} kWh/m2/day (extraterrestrial horizontal "
                f"irradiation H0 at latitude {lat:.2f} deg on the month's mean day)"
            )

    kt = np.where(polar_night, 0.0, ghi / np.where(polar_night, 1.0, h0))
    low, high = ERBS_MONTHLY_KT_RANGE
    out_of_range = ~polar_night & ((kt < low) | (kt > high))
    fd = np.where(polar_night, 1.0, erbs_monthly_diffuse_fraction(kt, ws))
    rb = klein_monthly_beam_ratio(lat, declination, tilt, azimuth)
    r = np.where(polar_night, 0.0, isotropic_tilted_ratio(fd, rb, tilt, rho))

    f_sky, f_ground = _view_factors(tilt)
    poa = ghi * r
    beam = ghi * (1.0 - fd) * rb
    sky = ghi * fd * f_sky
    ground = ghi * rho * f_ground

    notes = []
    for i, month in enumerate(MONTH_ABBR):
        if polar_night[i]:
            notes.append(
                f"{month}: polar night at latitude {lat:.2f} deg; no irradiation on any surface."
            )
        elif out_of_range[i]:
            held = min(max(kt[i], low), high)
            notes.append(
                f"{month}: clearness index K_T = {kt[i]:.3f} is outside the {low}-{high} range "
                "of the Erbs et al. (1982) monthly diffuse correlation; the diffuse fraction "
                f"was evaluated at K_T = {held:.2f}."
            )

    return MonthlyTiltedIrradiation(
        latitude_deg=lat,
        surface_tilt=tilt,
        surface_azimuth=azimuth,
        solar_constant_w_m2=sc,
        albedo=_frozen(rho),
        declination_deg=_frozen(declination),
        sunset_hour_angle_deg=_frozen(ws),
        ghi_kwh_m2_day=_frozen(ghi),
        h0_kwh_m2_day=_frozen(h0),
        kt_bar=_frozen(kt),
        diffuse_fraction=_frozen(fd),
        rb_bar=_frozen(rb),
        r_bar=_frozen(r),
        poa_global_kwh_m2_day=_frozen(poa),
        poa_direct_kwh_m2_day=_frozen(beam),
        poa_sky_diffuse_kwh_m2_day=_frozen(sky),
        poa_ground_diffuse_kwh_m2_day=_frozen(ground),
        poa_global_kwh_m2_month=_frozen(poa * DAYS_IN_MONTH),
        ghi_kwh_m2_month=_frozen(ghi * DAYS_IN_MONTH),
        erbs_out_of_range=_frozen(out_of_range),
        notes=tuple(notes),
    )


# ---------------------------------------------------------------------------
# Internals
# ---------------------------------------------------------------------------


def _daily_positive_cos_integral(a, b, c, ws):
    """Integral of ``max(a + b cos w + c sin w, 0)`` over ``-ws <= w <= ws`` (radians).

    Writes the integrand as ``a + m cos(w - psi)``; it is positive on the arc
    ``|w - psi| < alpha`` with ``cos(alpha) = -a/m``. That arc, repeated every
    2 pi, is clipped to the day and the antiderivative ``a w + b sin w - c cos w``
    summed over the pieces (at most two lie inside a day of length <= 2 pi).

    References
    ----------
    Klein (1977), integration of D&B eq. 1.6.2 between the sunrise and sunset
    hour angles on the surface; Klein & Theilacker (1981) for the two-period case.
    """
    a, b, c, ws = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (a, b, c, ws)))
    m = np.hypot(b, c)
    psi = np.arctan2(c, b)
    with np.errstate(divide="ignore", invalid="ignore"):
        cos_alpha = np.where(m > 0.0, -a / m, np.where(a > 0.0, -np.inf, np.inf))
    alpha = np.arccos(np.clip(cos_alpha, -1.0, 1.0))

    def antiderivative(w):
        return a * w + b * np.sin(w) - c * np.cos(w)

    total = np.zeros_like(a)
    for k in (-1, 0, 1):
        lo = np.maximum(-ws, psi - alpha + 2.0 * np.pi * k)
        hi = np.minimum(ws, psi + alpha + 2.0 * np.pi * k)
        total = total + np.where(hi > lo, antiderivative(hi) - antiderivative(lo), 0.0)
    return np.maximum(total, 0.0)


def _view_factors(surface_tilt):
    """Isotropic view factors to sky and ground, ``(1 + cos b)/2`` and ``(1 - cos b)/2``.

    References
    ----------
    Duffie & Beckman (2013), eq. 2.19.1 (isotropic sky).
    """
    cos_beta = np.cos(np.radians(np.asarray(surface_tilt, dtype=float)))
    return (1.0 + cos_beta) / 2.0, (1.0 - cos_beta) / 2.0


def _scalar(name, value, low, high):
    """Validate a finite real scalar within ``[low, high]`` and return it as float."""
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise ValueError(
            f"{name} = {value!r} is not a number; allowed range {low} to {high}"
        ) from None
    if not np.isfinite(x) or not low <= x <= high:
        raise ValueError(f"{name} = {float(value)!r} is outside the allowed range {low} to {high}")
    return x


def _twelve(name, value, allow_scalar=False):
    """Validate twelve finite monthly values (or one, repeated, if allowed)."""
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be 12 numbers (Jan..Dec), got {value!r}") from None
    if allow_scalar and arr.ndim == 0:
        arr = np.full(12, float(arr))
    if arr.shape != (12,):
        expected = "a number or 12 monthly values" if allow_scalar else "12 monthly values"
        raise ValueError(f"{name} must be {expected} (Jan..Dec), got shape {arr.shape}")
    bad = np.flatnonzero(~np.isfinite(arr))
    if bad.size:
        i = int(bad[0])
        raise ValueError(
            f"{name}[{MONTH_ABBR[i]}] = {float(arr[i])!r} is not a finite number"
        )
    return arr.copy()


def _check_range(name, arr, low, high):
    """Raise ValueError naming the first value of ``arr`` that is not finite or out of range."""
    bad = ~np.isfinite(arr) | (arr < low) | (arr > high)
    if np.any(bad):
        value = arr[bad].flat[0]
        raise ValueError(f"{name} = {float(value)!r} is outside the allowed range {low} to {high}")


def _frozen(arr):
    """Return a read-only copy of ``arr``."""
    out = np.array(arr, copy=True)
    out.setflags(write=False)
    return out
