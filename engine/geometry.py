"""Classical day-level solar geometry in closed form.

These are the textbook formulas (Duffie & Beckman, *Solar Engineering of
Thermal Processes*, ch. 1) that monthly-mean methods are built on. The precise
position of the sun at an instant comes from NREL SPA in :mod:`tiltyard.engine.solarpos`;
the formulas here are what a handbook calculation uses and what its worked
examples check.

Angles are in degrees, hour angles negative in the morning. Azimuth follows the
project convention (clockwise from true north); conversion to the textbook's
"surface azimuth from south, west positive" happens only inside the functions
that need it.
"""

from __future__ import annotations

import numpy as np

#: Recommended average day of each month, day of year (Klein 1977, Table 1;
#: Duffie & Beckman 2013, Table 1.6.1). The day whose extraterrestrial
#: radiation is closest to the month's mean.
MEAN_DAY_OF_MONTH = np.array([17, 47, 75, 105, 135, 162, 198, 228, 258, 288, 318, 344])

#: Days in each month of a non-leap year.
DAYS_IN_MONTH = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])


def declination_cooper_deg(day_of_year):
    """Solar declination by Cooper's formula.

    Parameters
    ----------
    day_of_year : array_like
        Day of the year, 1 = 1 January.

    Returns
    -------
    numpy.ndarray
        Declination in degrees.

    References
    ----------
    Cooper, P. I. (1969). The absorption of radiation in solar stills.
    Solar Energy 12(3), 333-346. As Duffie & Beckman (2013), eq. 1.6.1a:
    ``delta = 23.45 sin(360 (284 + n) / 365)``.
    """
    n = np.asarray(day_of_year, dtype=float)
    return 23.45 * np.sin(np.radians(360.0 * (284.0 + n) / 365.0))


def eccentricity_factor_db(day_of_year):
    """Earth-Sun distance correction ``(r0/r)^2`` in its simplest textbook form.

    Parameters
    ----------
    day_of_year : array_like
        Day of the year, 1 = 1 January.

    Returns
    -------
    numpy.ndarray
        Dimensionless factor, about 1.033 early in January and 0.967 early in July.

    References
    ----------
    Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal
    Processes, 4th ed., eq. 1.4.1a: ``1 + 0.033 cos(360 n / 365)``.
    """
    n = np.asarray(day_of_year, dtype=float)
    return 1.0 + 0.033 * np.cos(np.radians(360.0 * n / 365.0))


def sunset_hour_angle_deg(latitude_deg, declination_deg):
    """Sunset hour angle on a horizontal surface, with polar cases clipped.

    Parameters
    ----------
    latitude_deg : array_like
        Latitude, degrees north positive.
    declination_deg : array_like
        Solar declination, degrees.

    Returns
    -------
    numpy.ndarray
        Sunset hour angle in degrees: 0 in polar night, 180 in polar day.

    References
    ----------
    Duffie & Beckman (2013), eq. 1.6.10: ``cos(ws) = -tan(phi) tan(delta)``.
    """
    phi = np.radians(np.asarray(latitude_deg, dtype=float))
    delta = np.radians(np.asarray(declination_deg, dtype=float))
    cos_ws = np.clip(-np.tan(phi) * np.tan(delta), -1.0, 1.0)
    return np.degrees(np.arccos(cos_ws))


def daily_h0_horizontal_closed_form_j_m2(
    latitude_deg, declination_deg, eccentricity_factor, solar_constant_w_m2=1361.0
):
    """Daily extraterrestrial irradiation on a horizontal surface, closed form.

    Integrates ``G_on cos(theta_z)`` from sunrise to sunset with the declination
    and Earth-Sun distance held constant over the day. Valid in polar day and
    polar night through the clipped sunset hour angle.

    Parameters
    ----------
    latitude_deg : array_like
        Latitude, degrees north positive.
    declination_deg : array_like
        Solar declination for the day, degrees.
    eccentricity_factor : array_like
        ``(r0/r)^2`` for the day.
    solar_constant_w_m2 : float, default 1361
        Solar constant (Kopp & Lean 2011 give 1360.8 +/- 0.5 W/m^2).

    Returns
    -------
    numpy.ndarray
        Daily irradiation in J/m^2.

    References
    ----------
    Duffie & Beckman (2013), eq. 1.10.3.
    Kopp, G. & Lean, J. L. (2011). A new, lower value of total solar
    irradiance. Geophys. Res. Lett. 38, L01706.
    """
    phi = np.radians(np.asarray(latitude_deg, dtype=float))
    delta = np.radians(np.asarray(declination_deg, dtype=float))
    ws = np.radians(sunset_hour_angle_deg(latitude_deg, declination_deg))
    return (
        24.0 * 3600.0 * solar_constant_w_m2 / np.pi * np.asarray(eccentricity_factor, dtype=float)
        * (np.cos(phi) * np.cos(delta) * np.sin(ws) + ws * np.sin(phi) * np.sin(delta))
    )


def incidence_coefficients(phi, delta, beta, gamma):
    """Coefficients of ``cos(theta) = a + b cos(w) + c sin(w)`` over the hour angle ``w``.

    Parameters
    ----------
    phi, delta, beta, gamma : array_like
        Latitude, declination, surface slope and surface azimuth (from south,
        west positive), all in radians. ``beta = gamma = 0`` gives the solar
        zenith angle.

    Returns
    -------
    (a, b, c) : tuple of numpy.ndarray

    References
    ----------
    Duffie & Beckman (2013), eq. 1.6.2, grouped by powers of the hour angle
    (the grouping Klein 1977 integrates).
    """
    a = np.sin(delta) * (np.sin(phi) * np.cos(beta) - np.cos(phi) * np.sin(beta) * np.cos(gamma))
    b = np.cos(delta) * (np.cos(phi) * np.cos(beta) + np.sin(phi) * np.sin(beta) * np.cos(gamma))
    c = np.cos(delta) * np.sin(beta) * np.sin(gamma)
    return a, b, c


def azimuth_north_to_south_based(azimuth_deg):
    """Convert azimuth clockwise from north to the textbook's surface azimuth.

    Parameters
    ----------
    azimuth_deg : array_like
        Degrees clockwise from true north (south = 180).

    Returns
    -------
    numpy.ndarray
        Degrees from south, west positive, in (-180, 180] (Duffie & Beckman
        2013, sec. 1.6, angle gamma).

    References
    ----------
    Duffie & Beckman (2013), sec. 1.6 (definition of the surface azimuth angle).
    """
    a = np.asarray(azimuth_deg, dtype=float) - 180.0
    return (a + 180.0) % 360.0 - 180.0


def declination_hour_angle(phi, zenith, azimuth):
    """Declination and hour angle of the sun seen at a zenith and azimuth, radians.

    Parameters
    ----------
    phi : float or array_like
        Latitude, radians.
    zenith, azimuth : array_like
        Solar zenith and azimuth (clockwise from north), radians.

    Returns
    -------
    (delta, omega) : tuple of numpy.ndarray
        Declination and hour angle (negative before noon).

    References
    ----------
    Duffie & Beckman (2013), eqs. 1.6.5 and 1.6.6 solved for the declination
    and hour angle (spherical astronomy of the horizon and equator frames).
    """
    sin_d = np.clip(np.sin(phi) * np.cos(zenith) + np.cos(phi) * np.sin(zenith) * np.cos(azimuth),
                    -1.0, 1.0)
    omega = np.arctan2(-np.sin(azimuth) * np.sin(zenith),
                       np.cos(phi) * np.cos(zenith) - np.sin(phi) * np.sin(zenith) * np.cos(azimuth))
    return np.arcsin(sin_d), omega


def zenith_azimuth(phi, delta, omega):
    """Solar zenith and azimuth (clockwise from north) from declination and hour angle, radians.

    The inverse of :func:`declination_hour_angle`.

    References
    ----------
    Duffie & Beckman (2013), eqs. 1.6.5 and 1.6.6.
    """
    up = np.sin(phi) * np.sin(delta) + np.cos(phi) * np.cos(delta) * np.cos(omega)
    east = -np.cos(delta) * np.sin(omega)
    north = np.cos(phi) * np.sin(delta) - np.sin(phi) * np.cos(delta) * np.cos(omega)
    return np.arccos(np.clip(up, -1.0, 1.0)), np.arctan2(east, north) % (2.0 * np.pi)
