"""All-sky bases of the sky year: the shared result type, the Erbs split and the monthly year.

Two ways to replace the clear sky of :func:`tiltyard.engine.skyyear.sky_year`
with an all-sky one, each giving an :class:`AllSky`:

``monthly``
    A synthetic year from the site's 12 monthly mean daily GHI values: the
    clear-sky GHI of the year is scaled, month by month, so that each month's
    mean daily irradiation equals the given value (GHI never above the
    extraterrestrial horizontal), split into beam and diffuse by the Erbs et
    al. (1982) hourly correlation, and the diffuse rescaled per month to the
    Erbs et al. (1982) monthly-mean diffuse fraction (:func:`monthly_sky`).
    It has the right monthly totals and monthly diffuse fractions but no
    day-to-day weather variability. This module.
``file``
    A measured or typical-year weather series, read for a site by
    :func:`tiltyard.engine.weather_site.load_weather_for_site` and mapped onto
    the year's intervals by :func:`tiltyard.engine.weather_grid.weather_sky`.

The functions work on plain arrays; :mod:`tiltyard.engine.skyyear` calls them
and builds the :class:`~tiltyard.engine.skyyear.SkyYear`.

References
----------
Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Estimation of the diffuse
radiation fraction for hourly, daily and monthly-average global radiation.
Solar Energy 28(4), 293-302, eq. 1 (hourly correlation) and the
monthly-average correlation (Duffie & Beckman, Solar Engineering of Thermal
Processes, sec. 2.12).
"""

from __future__ import annotations

import calendar
from dataclasses import dataclass

import numpy as np
import pvlib

from .geometry import MEAN_DAY_OF_MONTH, declination_cooper_deg, sunset_hour_angle_deg
from .monthly import ERBS_MONTHLY_KT_RANGE, erbs_monthly_diffuse_fraction
from .site import Site, SiteError
from .sky import extraterrestrial_on_plane
from .words import MONTH_ABBR, MONTH_NAMES

#: Note attached to results of the ``monthly`` basis.
MONTHLY_NOTE = ("synthetic hourly year from monthly GHI: clear-sky shape scaled per month, "
                "Erbs hourly split with the diffuse rescaled per month to the Erbs "
                "monthly-mean diffuse fraction; no day-to-day weather variability")

#: What the Erbs split in this module does differently from pvlib.irradiance.erbs.
ERBS_NOTE = ("Erbs et al. (1982) hourly correlation, clearness index from this project's "
             "extraterrestrial irradiance")


@dataclass(frozen=True)
class AllSky:
    """Horizontal irradiance of an all-sky basis, one value per interval.

    Attributes
    ----------
    ghi, dni, dhi : numpy.ndarray
        Instantaneous irradiance at the evaluation instants, W/m², zero while
        the sun is down.
    note : str
        Provenance and caveats, for the result's notes.
    temp_air, wind_speed : numpy.ndarray or None
        Air temperature (°C) and wind speed (m/s) per interval, NaN where the
        data have none; None when the basis has none at all.
    sun_down_ghi_share : float
        Share (0-1) of a weather series' GHI that falls in intervals with the
        sun down at the site (a sign of wrong timestamps or another site).
    """

    ghi: np.ndarray
    dni: np.ndarray
    dhi: np.ndarray
    note: str
    temp_air: np.ndarray | None = None
    wind_speed: np.ndarray | None = None
    sun_down_ghi_share: float = 0.0


# -- Erbs split -------------------------------------------------------------------

def erbs_split(ghi, zenith, dni_extra, min_cos_zenith: float = 0.065,
               max_zenith: float = 87.0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Split GHI into DNI and DHI with the Erbs et al. (1982) hourly correlation.

    The same steps as :func:`pvlib.irradiance.erbs`, but with the clearness
    index ``kt = GHI / (G_on max(cos z, min_cos_zenith))`` computed from the
    caller's extraterrestrial normal irradiance (:func:`pvlib.irradiance.clearness_index`,
    ``kt`` at most 1). ``pvlib.irradiance.erbs`` computes its own ``G_on``
    from the day of year with a solar constant of 1366.1 W/m²; using ours
    keeps ``kt`` consistent with the extraterrestrial irradiance, and with
    the cap on GHI, used everywhere else in the project.

    Parameters
    ----------
    ghi : array_like
        Global horizontal irradiance, W/m².
    zenith : array_like
        True (not refraction-corrected) solar zenith, degrees.
    dni_extra : array_like
        Extraterrestrial normal irradiance, W/m².
    min_cos_zenith : float, default 0.065
        Lower bound of ``cos z`` in the clearness index (pvlib's default).
    max_zenith : float, default 87
        Above this zenith DNI is set to 0 and DHI to GHI (pvlib's default).

    Returns
    -------
    dni, dhi, kt : numpy.ndarray
        ``GHI = DHI + DNI cos z`` holds exactly.

    References
    ----------
    Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Estimation of the
    diffuse radiation fraction for hourly, daily and monthly-average global
    radiation. Solar Energy 28(4), 293-302, eq. 1:
    ``DF = 1 - 0.09 kt`` (kt <= 0.22),
    ``0.9511 - 0.1604 kt + 4.388 kt^2 - 16.638 kt^3 + 12.336 kt^4`` (0.22 < kt <= 0.8),
    ``0.165`` (kt > 0.8). Implementation after pvlib.irradiance.erbs.
    """
    ghi = np.asarray(ghi, dtype=float)
    zenith = np.asarray(zenith, dtype=float)
    kt = np.asarray(pvlib.irradiance.clearness_index(
        ghi, zenith, np.asarray(dni_extra, dtype=float), min_cos_zenith=min_cos_zenith,
        max_clearness_index=1.0), dtype=float)
    df = np.where(kt <= 0.22, 1.0 - 0.09 * kt,
                  np.where(kt <= 0.8,
                           0.9511 - 0.1604 * kt + 4.388 * kt**2 - 16.638 * kt**3
                           + 12.336 * kt**4,
                           0.165))
    dhi = df * ghi
    cos_z = np.cos(np.radians(zenith))
    with np.errstate(divide="ignore", invalid="ignore"):
        dni = (ghi - dhi) / cos_z
    bad = (zenith > max_zenith) | (ghi < 0) | ~(dni >= 0)
    dni = np.where(bad, 0.0, dni)
    dhi = np.where(bad, ghi, dhi)
    return dni, dhi, kt


# -- monthly basis ----------------------------------------------------------------

def _days_in_month(year: int) -> np.ndarray:
    return np.array([calendar.monthrange(int(year), m)[1] for m in range(1, 13)], dtype=float)


def scale_to_monthly_ghi(ghi_shape, month, kwh_weight, monthly_ghi_kwh_m2_day, year: int,
                         cap_w_m2) -> np.ndarray:
    """Scale a GHI shape month by month to given monthly mean daily irradiation.

    In each local month the shape is multiplied by one factor so that
    ``sum(ghi * kwh_weight) / days_in_month`` equals the month's value; where
    the scaled value would exceed ``cap_w_m2`` it is held at the cap and the
    rest of the month is scaled further (repeated until no new value reaches
    the cap), so the monthly mean is still met exactly.

    Parameters
    ----------
    ghi_shape : array_like
        Instantaneous GHI of the shape (the clear sky), W/m².
    month : array_like of int
        Local month (1-12) of each interval.
    kwh_weight : array_like
        kWh/m² per W/m² of each interval (sun-up fraction x hours / 1000).
    monthly_ghi_kwh_m2_day : sequence of 12 float
        Target monthly mean daily GHI, kWh/m²/day, January first.
    year : int
        Calendar year (days per month).
    cap_w_m2 : array_like
        Upper bound per interval (extraterrestrial horizontal irradiance).

    Returns
    -------
    numpy.ndarray
        Scaled GHI, W/m².

    Raises
    ------
    ValueError
        A month asks for more than its extraterrestrial irradiation, or for
        irradiation in a month without daylight, naming
        ``monthly_ghi_kwh_m2_day``, the month, the value and the allowed range.

    References
    ----------
    Monthly scaling of a clear-sky profile: common practice, no source. The
    bound is energy conservation (Duffie & Beckman 2013, eq. 1.10.1).
    """
    shape = np.maximum(np.asarray(ghi_shape, dtype=float), 0.0)
    month = np.asarray(month)
    w = np.asarray(kwh_weight, dtype=float)
    cap = np.maximum(np.asarray(cap_w_m2, dtype=float), 0.0)
    shape = np.minimum(shape, cap)
    target = np.asarray(monthly_ghi_kwh_m2_day, dtype=float)
    days = _days_in_month(year)
    out = np.zeros_like(shape)
    for m in range(1, 13):
        sel = np.flatnonzero(month == m)
        want = target[m - 1] * days[m - 1]  # kWh/m2 in the month
        g, c, wm = shape[sel], cap[sel], w[sel]
        most = float((c * wm).sum())
        if want > most * (1.0 + 1e-12):
            raise ValueError(
                f"monthly_ghi_kwh_m2_day[{m - 1}] ({MONTH_NAMES[m - 1]}) = "
                f"{target[m - 1]:g} kWh/m2/day: must be at most the month's extraterrestrial "
                f"horizontal irradiation, {most / days[m - 1]:.4g} kWh/m2/day here")
        if want == 0.0:
            continue
        if float((g * wm).sum()) <= 0.0:
            raise ValueError(
                f"monthly_ghi_kwh_m2_day[{m - 1}] ({MONTH_NAMES[m - 1]}) = "
                f"{target[m - 1]:g} kWh/m2/day: the sun does not rise in this month here, "
                "so it must be 0")
        out[sel] = _scale_with_cap(g, c, wm, want)
    return out


def _scale_with_cap(shape, cap, weight, want) -> np.ndarray:
    """``shape`` times one factor, held at ``cap``, so that ``sum(out * weight) == want``.

    Values that the common factor would take above their cap are held at the
    cap and the factor of the others is raised to make up the difference,
    repeated until no new value reaches its cap; when every value is capped
    the result is ``cap`` (and the total is short of ``want``). ``want`` must
    be >= 0 and ``shape``, ``cap``, ``weight`` >= 0.

    References
    ----------
    Common practice, no source (a capped proportional scaling).
    """
    capped = np.zeros(shape.size, dtype=bool)
    res = shape
    for _ in range(shape.size + 1):
        free = (shape * weight)[~capped].sum()
        rest = want - (cap * weight)[capped].sum()
        s = rest / free if free > 0 else 0.0
        res = np.where(capped, cap, s * shape)
        new = ~capped & (res > cap)
        if not new.any():
            break
        capped |= new
    return res


def rescale_monthly_diffuse(ghi, dhi, zenith, month, kwh_weight, diffuse_fraction,
                            max_zenith: float = 87.0):
    """Rescale DHI month by month to given monthly diffuse fractions, GHI unchanged.

    In each local month the diffuse irradiance of the intervals with the sun
    higher than ``90 - max_zenith`` degrees is multiplied by one factor (held
    at ``DHI <= GHI`` where it would exceed it, the rest scaled further, as in
    :func:`scale_to_monthly_ghi`) so that the month's diffuse fraction
    ``sum(DHI w) / sum(GHI w)`` equals ``diffuse_fraction``; intervals with
    the sun lower than that stay all diffuse (``DHI = GHI``, ``DNI = 0``), as
    in :func:`erbs_split`. DNI follows from the closure
    ``DNI = (GHI - DHI) / cos z``, so ``GHI = DHI + DNI cos z`` still holds,
    ``DNI >= 0`` and, with ``GHI <= G_on cos z``, ``DNI <= G_on``.

    A month cannot reach its fraction when the low-sun intervals alone carry
    more diffuse than it allows (all other DHI is then 0, all DNI as large as
    GHI permits), or when it asks for more diffuse than all its GHI (all DHI
    is then GHI); ``reached`` is False for such a month.

    Parameters
    ----------
    ghi, dhi : array_like
        Instantaneous GHI and DHI (the starting shape of the diffuse), W/m².
    zenith : array_like
        True solar zenith, degrees.
    month : array_like of int
        Local month (1-12) of each interval.
    kwh_weight : array_like
        kWh/m² per W/m² of each interval.
    diffuse_fraction : sequence of 12 float
        Target monthly diffuse fraction, January first, within [0, 1].
    max_zenith : float, default 87
        Above this zenith the interval stays all diffuse (pvlib's Erbs default).

    Returns
    -------
    dni, dhi : numpy.ndarray
        W/m².
    reached : numpy.ndarray of bool
        Per month (January first): the month's diffuse fraction equals the
        target (True also for months without GHI, which have none to split).

    References
    ----------
    Closure ``GHI = DHI + DNI cos z``: Duffie & Beckman (2013), Solar
    Engineering of Thermal Processes, 4th ed., sec. 2.8 (from memory). The
    per-month rescaling is this module's construction (common practice, no
    source).
    """
    ghi = np.asarray(ghi, dtype=float)
    zenith = np.asarray(zenith, dtype=float)
    month = np.asarray(month)
    w = np.asarray(kwh_weight, dtype=float)
    fd = np.asarray(diffuse_fraction, dtype=float)
    if fd.shape != (12,) or not np.all((fd >= 0.0) & (fd <= 1.0)):
        raise ValueError(f"diffuse_fraction = {diffuse_fraction!r}: must be 12 values "
                         "(January first) within 0 to 1")
    dhi = np.minimum(np.asarray(dhi, dtype=float), ghi)
    low = (zenith > max_zenith) | (ghi <= 0.0)
    dhi = np.where(low, np.maximum(ghi, 0.0), np.maximum(dhi, 0.0))
    reached = np.ones(12, dtype=bool)
    for m in range(1, 13):
        sel = month == m
        g_m = float((ghi * w)[sel].sum())
        if g_m <= 0.0:
            continue
        free = np.flatnonzero(sel & ~low)
        want = fd[m - 1] * g_m - float((dhi * w)[sel & low].sum())
        if want <= 0.0:
            dhi[free] = 0.0
            reached[m - 1] = want == 0.0
            continue
        g, wf = ghi[free], w[free]
        shape = np.where(dhi[free] > 0.0, dhi[free], g)  # g > 0 here
        dhi[free] = _scale_with_cap(shape, g, wf, want)
        reached[m - 1] = bool(np.isclose(float((dhi[free] * wf).sum()), want,
                                         rtol=1e-9, atol=0.0))
    cos_z = np.cos(np.radians(zenith))
    with np.errstate(divide="ignore", invalid="ignore"):
        dni = np.where(low, 0.0, (ghi - dhi) / np.where(low, 1.0, cos_z))
    return np.maximum(dni, 0.0), dhi, reached


def monthly_sky(site: Site, ghi_clear, zenith, dni_extra, month, kwh_weight,
                year: int) -> AllSky:
    """Synthetic all-sky year from the site's monthly mean daily GHI.

    Steps:

    1. the clear-sky GHI is scaled per local month to
       ``site.monthly_ghi_kwh_m2_day`` (:func:`scale_to_monthly_ghi`, bounded
       by the extraterrestrial horizontal irradiance);
    2. each interval is split into DNI and DHI by the Erbs et al. (1982)
       hourly correlation (:func:`erbs_split`);
    3. the diffuse is rescaled per month (:func:`rescale_monthly_diffuse`) so
       that the month's diffuse fraction ``sum(DHI) / sum(GHI)`` equals the
       Erbs et al. (1982) *monthly-mean* correlation
       (:func:`tiltyard.engine.monthly.erbs_monthly_diffuse_fraction`) at the
       month's clearness index ``K_T = sum(GHI) / sum(G_on cos z)`` (the
       year's own extraterrestrial irradiation over the month's intervals)
       and the sunset hour angle of Klein's (1977) mean day of the month
       (Cooper declination, :data:`tiltyard.engine.geometry.MEAN_DAY_OF_MONTH`).
       GHI is unchanged and ``DNI = (GHI - DHI) / cos z``.

    Step 3 is needed because every interval of a month has about the same
    hourly clearness index (the clear-sky shape times one factor): applied to
    that uniform index the hourly correlation gives a month far more diffuse
    than a real month of the same mean, whose clear and overcast days the
    monthly correlation averages (e.g. about 0.8 against 0.5 at ``K_T`` 0.43).
    The hourly split is kept as the hour-by-hour shape of the diffuse.

    The monthly correlation was fitted for ``0.3 <= K_T <= 0.8``; outside it
    the index is held at the range end (as in
    :func:`tiltyard.engine.monthly.klein_monthly_tilted`) and the months are
    named in the note. A month whose diffuse fraction cannot be reached
    within ``0 <= DHI <= GHI`` (see :func:`rescale_monthly_diffuse`; not seen
    with the bundled demo sites) is named in the note too.

    Parameters
    ----------
    site : Site
        Needs ``monthly_ghi_kwh_m2_day``.
    ghi_clear : array_like
        Clear-sky GHI at the evaluation instants, W/m² (zero with the sun down).
    zenith : array_like
        True solar zenith at the evaluation instants, degrees.
    dni_extra : array_like
        Extraterrestrial normal irradiance, W/m².
    month : array_like of int
        Local month of each interval.
    kwh_weight : array_like
        kWh/m² per W/m², per interval.
    year : int
        Calendar year.

    Returns
    -------
    AllSky

    Raises
    ------
    SiteError
        ``monthly_ghi_kwh_m2_day`` is not given.

    References
    ----------
    Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Estimation of the
    diffuse radiation fraction for hourly, daily and monthly-average global
    radiation. Solar Energy 28(4), 293-302: eq. 1 (hourly correlation) and
    the monthly-average correlation, two cubics in ``K_T`` split at a sunset
    hour angle of 81.4 deg, given as Duffie & Beckman, Solar Engineering of
    Thermal Processes, sec. 2.12, eq. 2.12.1 (hourly: sec. 2.10, eq. 2.10.1;
    numbering of the 5th ed., 2020, as quoted in a public implementation).
    Klein, S. A. (1977). Calculation of monthly average insolation on tilted
    surfaces. Solar Energy 19, 325-329 (mean day of the month).
    Extraterrestrial bound: Duffie & Beckman (2013), eq. 1.10.1.
    """
    if site.monthly_ghi_kwh_m2_day is None:
        raise SiteError("monthly_ghi_kwh_m2_day", None,
                        "sky = 'monthly' needs 12 monthly mean daily GHI values in "
                        "kWh/m2/day (0 to 12), January first")
    zenith = np.asarray(zenith, dtype=float)
    month = np.asarray(month)
    w = np.asarray(kwh_weight, dtype=float)
    cap = extraterrestrial_on_plane(dni_extra, zenith, zenith)
    ghi = scale_to_monthly_ghi(ghi_clear, month, w, site.monthly_ghi_kwh_m2_day, year, cap)
    _, dhi_hourly, _ = erbs_split(ghi, zenith, dni_extra)
    kt = monthly_clearness_index(ghi, cap, month, w)
    ws = sunset_hour_angle_deg(site.latitude_deg, declination_cooper_deg(MEAN_DAY_OF_MONTH))
    fd = erbs_monthly_diffuse_fraction(kt, ws)
    dni, dhi, reached = rescale_monthly_diffuse(ghi, dhi_hourly, zenith, month, w, fd)
    notes = [MONTHLY_NOTE]
    lo, hi = ERBS_MONTHLY_KT_RANGE
    has_sun = np.bincount(month, weights=ghi * w, minlength=13)[1:] > 0
    held = has_sun & ((kt < lo) | (kt > hi))
    if held.any():
        notes.append(f"monthly clearness index outside the range of the Erbs monthly "
                     f"correlation ({lo} to {hi}) in {_month_list(held)}: diffuse fraction "
                     "taken at the range end")
    if not reached.all():
        notes.append(f"monthly diffuse fraction not reached with the diffuse part between "
                     f"none and all of the global irradiance in "
                     f"{_month_list(~reached)}")
    return AllSky(ghi, dni, dhi, "; ".join(notes))


def monthly_clearness_index(ghi, extraterrestrial_horizontal, month, kwh_weight) -> np.ndarray:
    """Monthly clearness index ``K_T = sum(GHI w) / sum(G_0 w)`` of a year of intervals.

    Parameters
    ----------
    ghi, extraterrestrial_horizontal : array_like
        Instantaneous GHI and extraterrestrial horizontal irradiance, W/m².
    month : array_like of int
        Local month (1-12) of each interval.
    kwh_weight : array_like
        kWh/m² per W/m² of each interval.

    Returns
    -------
    numpy.ndarray
        Twelve values, January first, within [0, 1]; 0 for a month without
        extraterrestrial irradiation.

    References
    ----------
    Duffie & Beckman (2013), Solar Engineering of Thermal Processes, 4th ed.,
    eq. 2.9.1 (``K_T = H / H_0``, from memory).
    """
    w = np.asarray(kwh_weight, dtype=float)
    month = np.asarray(month)
    g = np.bincount(month, weights=np.asarray(ghi, dtype=float) * w, minlength=13)[1:]
    h0 = np.bincount(month, weights=np.asarray(extraterrestrial_horizontal, dtype=float) * w,
                     minlength=13)[1:]
    kt = np.divide(g, h0, out=np.zeros(12), where=h0 > 0)
    return np.clip(kt, 0.0, 1.0)


def _month_list(mask) -> str:
    return ", ".join(MONTH_ABBR[i] for i in np.flatnonzero(mask))


__all__ = ["AllSky", "ERBS_NOTE", "MONTHLY_NOTE", "erbs_split", "monthly_clearness_index",
           "monthly_sky", "rescale_monthly_diffuse", "scale_to_monthly_ghi"]
