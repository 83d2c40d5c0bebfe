"""Rows of panels on flat roofs and fields: the row pitch that keeps beam light unshaded.

For rows of equal tilted collectors on flat, level ground (or a flat roof),
one row shades the next when the shadow of its top edge reaches past the
bottom edge of the row behind. Projected onto the vertical plane through the
facing direction of the rows, the top edge of slant length ``L`` at tilt
``beta`` is ``L sin beta`` high and ``L cos beta`` behind the bottom edge; the
sun at elevation ``alpha_s`` and azimuth ``gamma_s`` throws its shadow a
further ``L sin beta cos(gamma_s - gamma) / tan alpha_s`` back, so the rows
are clear of each other's beam shadow when the pitch (bottom edge to bottom
edge, horizontally, along the facing direction) is at least

    ``p = L cos beta + L sin beta cos(gamma_s - gamma) / tan alpha_s``

(``gamma`` the facing azimuth). ``cos(gamma_s - gamma) / tan alpha_s`` is
``1 / tan alpha_p`` with ``alpha_p`` the profile angle of Duffie & Beckman
(2013), section 1.9. The same pitch applies whatever the height of the rows'
bottom edges above the ground, provided all rows are at the same height.

:func:`row_layout` takes the largest such pitch over a design window, by
default apparent solar noon +/- 3 h on the winter solstice of the site's
hemisphere (see :func:`default_design_date` for the rule, also in the tropics).

Stated limitation (:data:`LIMITATION`): only beam shading during the design
window is prevented; the loss of sky view and of ground-reflected light
between rows is neglected.
"""

from __future__ import annotations

import functools
import math
import numbers
from dataclasses import dataclass

import numpy as np
import pandas as pd
from scipy.optimize import brentq, minimize_scalar

from .site import Site
from .solarpos import (
    RISE_SET_ELEVATION_DEG,
    _spa_unixtime,
    delta_t_s,
    site_positions,
    site_pressure_pa,
    solar_position,
    time_terms,
)
from .sunevents import sun_events
from .timegrid import REFERENCE_YEAR, local_date
from .words import day_month

#: Latitude of the tropics, degrees: the obliquity of the ecliptic, about
#: 23 deg 26' (Meeus, Astronomical Algorithms, 1998, ch. 22). Between the
#: tropics the noon sun can stand on either side of the zenith.
TROPIC_LATITUDE_DEG = 23.44

#: Lowest sun elevation the layout protects by default, degrees. Below it the
#: shadows become too long to be worth designing for (at 1 deg a 1 m high edge
#: throws a 57 m shadow); those minutes are reported as not protected.
DEFAULT_MIN_ELEVATION_DEG = 1.0

#: The two ground-coverage definitions reported by :class:`RowLayout`.
GCR_DEFINITIONS = (
    "gcr: collector slant length / row pitch (the ground coverage ratio as pvlib defines it, "
    "'ratio of row slant length to row spacing'); it can exceed 1 for steep rows set close. "
    "ground_cover_fraction: horizontal projection of the collector (slant length x cos tilt) "
    "/ row pitch, the fraction of the ground covered seen from above (at most 1)."
)

#: What the row layout does not account for.
LIMITATION = (
    "Only beam (direct) shading during the design window is prevented. The loss of sky view "
    "(diffuse shading) from the row in front and the shading of ground-reflected light between "
    "rows are neglected, and so is beam shading outside the design window or with the sun "
    "below the minimum design elevation."
)


def _num(name: str, value, lo: float | None = None, hi: float | None = None, unit: str = "",
         lo_open: bool = False) -> float:
    """One finite number within its range, or ``ValueError('name = value: must be ...')``."""
    u = f" {unit}" if unit else ""
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise ValueError(f"{name} = {value!r}: must be a number")
    v = float(value)
    if not math.isfinite(v):
        raise ValueError(f"{name} = {value!r}: must be a finite number")
    if lo is not None and hi is not None:
        rng = (f"greater than {lo:g} and at most {hi:g}{u}" if lo_open
               else f"between {lo:g} and {hi:g}{u}")
    elif lo is not None:
        rng = f"greater than {lo:g}{u}" if lo_open else f"at least {lo:g}{u}"
    else:
        rng = f"at most {hi:g}{u}"
    if lo is not None and (v < lo or (lo_open and v == lo)):
        raise ValueError(f"{name} = {value!r}: must be {rng}")
    if hi is not None and v > hi:
        raise ValueError(f"{name} = {value!r}: must be {rng}")
    return v


# -- the shadow geometry --------------------------------------------------------

def shadow_pitch_m(tilt_deg, azimuth_deg, sun_elevation_deg, sun_azimuth_deg,
                   collector_length_m=1.0):
    """Row pitch at which the shadow of one row just reaches the next, metres.

    ``p = L cos(beta) + L sin(beta) cos(gamma_s - gamma) / tan(alpha_s)``: the
    horizontal depth of the collector plus the length of its top edge's shadow
    projected onto the rows' facing direction on flat, level ground.

    Parameters
    ----------
    tilt_deg : array_like
        Collector tilt ``beta`` from horizontal, degrees.
    azimuth_deg : array_like
        Direction the collectors face ``gamma``, degrees clockwise from north.
    sun_elevation_deg : array_like
        Sun elevation ``alpha_s`` (apparent, refracted), degrees.
    sun_azimuth_deg : array_like
        Sun azimuth ``gamma_s``, degrees clockwise from north.
    collector_length_m : array_like, default 1
        Slant length ``L`` of the collector across the row, metres.

    Returns
    -------
    numpy.ndarray
        Pitch in metres; NaN where the sun is not above the horizon or is
        behind the rows (``cos(gamma_s - gamma) < 0``), where the front rows
        cast no shadow on the lit faces behind them.

    Notes
    -----
    With ``k = cos(gamma_s - gamma) / tan(alpha_s)``, the pitch grows with
    tilt only while ``tan(beta) < k``, where its derivative
    ``L (k cos(beta) - sin(beta))`` changes sign; steeper than that the
    shrinking horizontal depth wins and the pitch falls again, to ``L k`` at
    90 deg.

    References
    ----------
    Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal
    Processes, 4th ed., section 1.9 (shading; the profile angle
    ``tan alpha_p = tan alpha_s / cos(gamma_s - gamma)``, eq. 1.9.12, the
    equation number from memory):
    the shadow of a height ``h`` reaches ``h / tan alpha_p`` in the plane
    normal to the rows.
    """
    beta = np.radians(np.asarray(tilt_deg, dtype=float))
    el = np.asarray(sun_elevation_deg, dtype=float)
    cos_d = np.cos(np.radians(np.asarray(sun_azimuth_deg, dtype=float)
                              - np.asarray(azimuth_deg, dtype=float)))
    length = np.asarray(collector_length_m, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        p = length * np.cos(beta) + length * np.sin(beta) * cos_d / np.tan(np.radians(el))
    return np.where((el > 0.0) & (cos_d >= 0.0), p, np.nan)


def irradiation_per_ground_m2(poa_kwh_m2, gcr):
    """Irradiation per square metre of ground from irradiation per square metre of panel.

    ``poa_kwh_m2 * gcr``: with ``gcr`` the collector slant length over the row
    pitch, one square metre of ground carries ``gcr`` square metres of panel.

    Parameters
    ----------
    poa_kwh_m2 : float or array_like
        Plane-of-array irradiation per m² of panel (any period), kWh/m²; at
        least 0.
    gcr : float
        Ground coverage ratio, collector slant length / pitch (pvlib's
        definition), greater than 0 (a ratio, not a percentage).

    Returns
    -------
    float or numpy.ndarray
        Irradiation on the panels per m² of ground, kWh/m².

    Notes
    -----
    The panel irradiation is used as given: the loss of sky view and of
    ground-reflected light between rows is neglected (:data:`LIMITATION`),
    so this is an upper bound for closely spaced rows.

    References
    ----------
    The ground coverage ratio as in pvlib.shading.ground_angle ("ratio of row
    slant length to row spacing"), pvlib 0.16; the product itself is the
    definition of the ratio (area of panel per area of ground).
    """
    g = _num("gcr", gcr, 0.0, None, lo_open=True)
    e = np.asarray(poa_kwh_m2, dtype=float)
    bad = ~np.isfinite(e) | (e < 0.0)
    if bad.any():
        first = float(e.ravel()[int(np.flatnonzero(bad.ravel())[0])])
        raise ValueError(f"poa_kwh_m2 = {first!r}: must be a finite number, at least 0 kWh/m2")
    out = e * g
    return float(out) if out.ndim == 0 else out


# -- the design date ------------------------------------------------------------

@functools.lru_cache(maxsize=16)
def _date_events(site: Site, date: pd.Timestamp) -> pd.Series:
    """The sun events of one local date (:func:`tiltyard.engine.sunevents.sun_events`),
    once per site and date: the design date's rule and its window both read them."""
    return sun_events(site, [date]).table.iloc[0]


@functools.lru_cache(maxsize=16)
def _noon_sun(site: Site, date: pd.Timestamp) -> tuple[float, float]:
    """Apparent elevation and azimuth of the sun at solar noon on a local date, degrees
    (Reda & Andreas 2008, NREL/TP-560-34302, App. A.2, through pvlib); once per site
    and date, whatever the rows' azimuth."""
    noon = _date_events(site, date)["solar_noon"]
    pos = solar_position(pd.DatetimeIndex([noon]), site)
    return float(pos["apparent_elevation"].iloc[0]), float(pos["azimuth"].iloc[0])


def _noon_front_term(site: Site, date: pd.Timestamp, azimuth_deg: float) -> float:
    """``cos(gamma_s - gamma) / tan(alpha_s)`` of the noon sun; 0 when it is behind or down."""
    el, sun_az = _noon_sun(site, date)
    cos_d = math.cos(math.radians(sun_az - azimuth_deg))
    # down, behind, or along the rows (within 0.06 deg: the SPA transit azimuth
    # is 0 or 180 deg only to a few thousandths of a degree)
    if el <= 0.0 or cos_d <= 1e-3:
        return 0.0
    return cos_d / math.tan(math.radians(el))


def default_design_date(site: Site, azimuth_deg: float,
                        year: int = REFERENCE_YEAR) -> tuple[pd.Timestamp, str]:
    """The default design date of a row layout and the rule that chose it.

    Rule (a convention of this project; the winter solstice as the design day
    is common practice, no source):

    - outside the tropics (``|latitude| >= 23.44 deg``): the winter solstice of
      the site's hemisphere, 21 December north of the equator (the equator
      counts as north) and 21 June south of it;
    - in the tropics, where the noon sun stands north of the zenith part of
      the year and south of it the rest: of 21 June and 21 December, the date
      whose noon sun is lower *as seen in front of the rows*, that is, has the
      larger ``cos(gamma_s - gamma) / tan(alpha_s)`` (the smaller profile
      angle, Duffie & Beckman 2013, section 1.9); a noon sun behind the rows
      counts as no sun in front. If both dates tie (for example rows facing
      due east or west, where the noon sun is never in front), the
      hemisphere's winter solstice is used.

    Parameters
    ----------
    site : Site
        Location.
    azimuth_deg : float
        Direction the rows face, degrees clockwise from north.
    year : int, default :data:`tiltyard.engine.timegrid.REFERENCE_YEAR`
        Year of the date.

    Returns
    -------
    (pandas.Timestamp, str)
        The local date (tz-naive midnight) and a sentence stating the rule.

    References
    ----------
    Solar noon positions: Reda & Andreas (2008), NREL/TP-560-34302, App. A.2.
    """
    june, december = pd.Timestamp(year, 6, 21), pd.Timestamp(year, 12, 21)
    winter = june if site.latitude_deg < 0 else december
    hemi = "south" if site.latitude_deg < 0 else "north"
    if abs(site.latitude_deg) >= TROPIC_LATITUDE_DEG:
        return winter, (f"winter solstice of the {hemi}ern hemisphere "
                        f"({day_month(winter, full=True)})")
    k_june = _noon_front_term(site, june, azimuth_deg)
    k_december = _noon_front_term(site, december, azimuth_deg)
    if math.isclose(k_june, k_december, rel_tol=1e-9, abs_tol=1e-12):
        return winter, (f"tropical site, noon sun equally low in front of the rows at both "
                        f"solstices: winter solstice of the {hemi}ern hemisphere "
                        f"({day_month(winter, full=True)})")
    pick = june if k_june > k_december else december
    return pick, ("tropical site: the solstice with the lower noon sun in front of the rows "
                  f"({day_month(pick, full=True)})")


# -- the layout -------------------------------------------------------------------

@dataclass(frozen=True)
class RowLayout:
    """Minimum row pitch for a design window, with both ground-coverage figures.

    Attributes
    ----------
    site_name : str
        Name of the site.
    latitude_deg : float
        Site latitude.
    tilt_deg, azimuth_deg : float
        Row tilt and facing direction (clockwise from north), degrees.
    collector_length_m : float
        Collector slant length across the row, m (1 m gives results per metre).
    pitch_m : float
        Minimum pitch, bottom edge to bottom edge, horizontally along the
        facing direction, m.
    row_gap_m : float
        Clear ground between rows, ``pitch_m - L cos(tilt)``, m.
    gcr : float
        ``L / pitch_m`` (pvlib's ground coverage ratio).
    ground_cover_fraction : float
        ``L cos(tilt) / pitch_m``, the ground covered seen from above.
    design_date : pandas.Timestamp
        Local design date (tz-naive midnight).
    design_date_rule : str
        How the date was chosen.
    solar_noon, window_start, window_end : pandas.Timestamp
        Apparent solar noon and the design window, local tz-aware.
    half_width_h, step_min, min_elevation_deg : float
        Window half-width, sampling step and the lowest protected sun elevation.
    limiting_time : pandas.Timestamp
        When the longest shadow falls (local, tz-aware).
    limiting_elevation_deg, limiting_azimuth_deg : float
        Sun position at that time (apparent elevation).
    protected_h : float
        Hours of the window with the sun in front of the rows and at least
        ``min_elevation_deg`` high, which the pitch protects.
    notes : tuple of str
        Statements about this result.
    definitions : str
        :data:`GCR_DEFINITIONS`.
    limitation : str
        :data:`LIMITATION`.
    """

    site_name: str
    latitude_deg: float
    tilt_deg: float
    azimuth_deg: float
    collector_length_m: float
    pitch_m: float
    row_gap_m: float
    gcr: float
    ground_cover_fraction: float
    design_date: pd.Timestamp
    design_date_rule: str
    solar_noon: pd.Timestamp
    window_start: pd.Timestamp
    window_end: pd.Timestamp
    half_width_h: float
    step_min: float
    min_elevation_deg: float
    limiting_time: pd.Timestamp
    limiting_elevation_deg: float
    limiting_azimuth_deg: float
    protected_h: float
    notes: tuple = ()
    definitions: str = GCR_DEFINITIONS
    limitation: str = LIMITATION


class _Sun:
    """Sun positions at offsets (seconds) from one instant, with a fixed delta T."""

    def __init__(self, site: Site, noon_utc: pd.Timestamp):
        self.site = site
        self.noon_utc = noon_utc
        self.delta_t = float(delta_t_s(pd.DatetimeIndex([noon_utc]))[0])
        self.pressure_pa = site_pressure_pa(site.elevation_m)

    def times(self, offsets_s) -> pd.DatetimeIndex:
        us = np.round(np.asarray(offsets_s, dtype=float) * 1e6).astype("int64")
        return pd.DatetimeIndex(self.noon_utc + pd.to_timedelta(us, unit="us"))

    def __call__(self, offsets_s):
        # solar_position's steps without its table (this is called many times per layout)
        terms = time_terms(_spa_unixtime(self.times(offsets_s)), self.delta_t)
        _, _, el_app, _, az = site_positions(terms, self.site, self.pressure_pa)
        return el_app, az


@dataclass(frozen=True)
class _DesignWindow:
    """The sun through one design window, the same for every row tilt and azimuth."""

    events: pd.Series          # the date's sun events (sun_events)
    noon: pd.Timestamp         # apparent solar noon, local
    sun: _Sun
    grid: np.ndarray           # sample offsets from noon, s
    el: np.ndarray             # apparent elevation at the samples, deg
    saz: np.ndarray            # azimuth at the samples, deg
    offsets: np.ndarray        # the samples and the min-elevation crossings, sorted
    el_offsets: np.ndarray
    saz_offsets: np.ndarray


@functools.lru_cache(maxsize=16)
def _design_window(site: Site, day: pd.Timestamp, half: float, step: float,
                   min_el: float) -> _DesignWindow:
    """Sun positions over the design window, computed once per site, date and window.

    The study lays out rows for several option planes on the same design day;
    the solar noon, the samples and the exact crossings of ``min_el`` do not
    depend on the rows' tilt or azimuth (Reda & Andreas 2008, NREL/TP-560-34302,
    for the positions and the noon, through pvlib).
    """
    ev = _date_events(site, day)
    noon = pd.Timestamp(ev["solar_noon"]).tz_convert(site.timezone)
    sun = _Sun(site, noon.tz_convert("UTC"))
    half_s = half * 3600.0
    n = max(int(math.ceil(2.0 * half * 60.0 / step)), 2) + 1
    grid = np.linspace(-half_s, half_s, n)
    el, saz = sun(grid)

    # exact crossings of the minimum elevation between samples
    def above(s):
        return float(sun([s])[0][0]) - min_el

    g = el - min_el
    crossings = [brentq(above, grid[i], grid[i + 1], xtol=1e-3)
                 for i in np.flatnonzero(np.sign(g[:-1]) * np.sign(g[1:]) < 0)]
    offs = np.sort(np.concatenate([grid, np.asarray(crossings, dtype=float)]))
    el_o, saz_o = sun(offs) if crossings else (el, saz)
    for a in (grid, el, saz, offs, el_o, saz_o):
        a.setflags(write=False)
    return _DesignWindow(ev, noon, sun, grid, el, saz, offs, el_o, saz_o)


def row_layout(site: Site, tilt_deg: float, azimuth_deg: float | None = None, *,
               collector_length_m: float = 1.0, design_date=None, half_width_h: float = 3.0,
               step_min: float = 5.0,
               min_elevation_deg: float = DEFAULT_MIN_ELEVATION_DEG) -> RowLayout:
    """Minimum row pitch so that no row shades the next with beam light in the design window.

    The window runs from apparent solar noon minus ``half_width_h`` to plus
    ``half_width_h`` on ``design_date``. The sun is sampled every ``step_min``
    minutes (NREL SPA, apparent elevation); the times where it crosses
    ``min_elevation_deg`` are located exactly, and an interior maximum is
    refined to the second. Of these sun positions, those in front of the
    rows (``cos(gamma_s - gamma) > 0``) and at least ``min_elevation_deg``
    high are protected; the pitch is the largest :func:`shadow_pitch_m` among
    them. Sun positions behind the rows or lower are not protected; the
    result says for how long (``protected_h``, ``notes``).

    Parameters
    ----------
    site : Site
        Location and time zone.
    tilt_deg : float
        Row tilt from horizontal, 0 to 90 degrees. Tilt 0 gives pitch = L.
    azimuth_deg : float, optional
        Direction the panels face, degrees clockwise from north (0 to 360);
        by default facing the equator (180 in the north, 0 in the south).
    collector_length_m : float, default 1
        Collector slant length across the row, m, greater than 0. With 1 m
        the lengths are per metre of slant length.
    design_date : date-like, optional
        Local design date; by default :func:`default_design_date`.
    half_width_h : float, default 3
        Half-width of the window around apparent solar noon, hours,
        greater than 0 and at most 6.
    step_min : float, default 5
        Sampling step, minutes (0.5 to 30).
    min_elevation_deg : float, default 1
        Lowest sun elevation protected, degrees (0.5 to 45).

    Returns
    -------
    RowLayout

    Raises
    ------
    ValueError
        For an input out of range (naming it, its value and the range), and
        when no sun position in the window is usable: polar night, the sun
        below ``min_elevation_deg`` all through the window, or the sun never
        in front of the rows. No finite pitch answers those cases, so a
        message is raised instead of returning an infinite or huge pitch.

    References
    ----------
    Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal
    Processes, 4th ed., section 1.9 (shading by rows, profile angle), for the
    geometry (:func:`shadow_pitch_m`); Reda, I. & Andreas, A. (2008), Solar
    Position Algorithm for Solar Radiation Applications, NREL/TP-560-34302,
    for the sun positions and the solar noon (App. A.2), through pvlib.
    """
    tilt = _num("tilt_deg", tilt_deg, 0.0, 90.0, "deg")
    if azimuth_deg is None:
        az = site.equator_azimuth_deg
    else:
        az = _num("azimuth_deg", azimuth_deg, 0.0, 360.0, "deg") % 360.0
    length = _num("collector_length_m", collector_length_m, 0.0, None, "m", lo_open=True)
    half = _num("half_width_h", half_width_h, 0.0, 6.0, "h", lo_open=True)
    step = _num("step_min", step_min, 0.5, 30.0, "min")
    min_el = _num("min_elevation_deg", min_elevation_deg, 0.5, 45.0, "deg")

    if design_date is None:
        day, rule = default_design_date(site, az)
    else:
        day = local_date(design_date, "design_date", "2023-12-21", site.timezone)
        rule = "given by the user"

    win = _design_window(site, day, half, step, min_el)
    ev, noon, sun, el, saz = win.events, win.noon, win.sun, win.el, win.saz
    grid = win.grid
    half_s = half * 3600.0
    start, end = noon - pd.Timedelta(seconds=half_s), noon + pd.Timedelta(seconds=half_s)
    where = (f"design window {day.date().isoformat()} {start.strftime('%H:%M')}-"
             f"{end.strftime('%H:%M')} ({site.timezone}) at latitude {site.latitude_deg:g} deg")

    def front(azimuths):
        return np.cos(np.radians(np.asarray(azimuths) - az)) > 0.0

    if not (el >= min_el).any():
        if ev["polar"] == "night" or float(np.max(el)) < RISE_SET_ELEVATION_DEG:
            raise ValueError(f"{where}: polar night, the sun does not rise on this date, so "
                             "there is no beam light to protect and no row pitch can be "
                             "designed for it; choose a design_date when the sun is up "
                             "(for example an equinox)")
        raise ValueError(f"{where}: the sun stays below {min_el:g} deg elevation all through "
                         f"the window (highest {float(np.max(el)):.2f} deg), where shadows are "
                         "too long for any practical row pitch; choose a design_date with the "
                         "sun higher (for example an equinox) or a lower min_elevation_deg")
    if not ((el >= min_el) & front(saz)).any():
        raise ValueError(f"{where}: the sun is never in front of rows facing azimuth {az:g} "
                         f"deg while at least {min_el:g} deg high, so the rows cast no beam "
                         "shadow on each other's lit faces; choose another design_date")
    offs, el, saz = win.offsets, win.el_offsets, win.saz_offsets
    # the crossings are found to 1 ms, where the elevation changes by < 1e-5 deg
    usable = (el >= min_el - 1e-5) & front(saz)
    pitch = np.where(usable, shadow_pitch_m(tilt, az, el, saz, length), -np.inf)
    i = int(np.argmax(pitch))
    best_s, best_p, best_el, best_az = offs[i], float(pitch[i]), float(el[i]), float(saz[i])
    if 0 < i < len(offs) - 1 and usable[i - 1] and usable[i + 1] and tilt > 0.0:
        def neg_pitch(s):
            e, a = sun([s])
            if e[0] < min_el or not front(a)[0]:
                return np.inf
            return -float(shadow_pitch_m(tilt, az, e[0], a[0], length))

        res = minimize_scalar(neg_pitch, bounds=(offs[i - 1], offs[i + 1]), method="bounded",
                              options={"xatol": 0.5})
        if np.isfinite(res.fun) and -res.fun > best_p:
            best_s, best_p = float(res.x), float(-res.fun)
            e, a = sun([best_s])
            best_el, best_az = float(e[0]), float(a[0])

    on_grid = (np.isin(offs, grid))
    protected_h = 2.0 * half * float(usable[on_grid].mean())
    notes = []
    if protected_h < 2.0 * half - 1e-9:
        notes.append(f"the sun is below {min_el:g} deg or behind the rows for about "
                     f"{2.0 * half - protected_h:.2f} h of the {2.0 * half:g} h window; beam "
                     "shading is not prevented then")
    notes.append("rows of equal collectors on flat, level ground; pitch measured horizontally "
                 "along the facing direction, bottom edge to bottom edge")
    cos_b = math.cos(math.radians(tilt))
    return RowLayout(
        site_name=site.name, latitude_deg=site.latitude_deg, tilt_deg=tilt, azimuth_deg=az,
        collector_length_m=length, pitch_m=best_p, row_gap_m=best_p - length * cos_b,
        gcr=length / best_p, ground_cover_fraction=length * cos_b / best_p,
        design_date=day, design_date_rule=rule, solar_noon=noon, window_start=start,
        window_end=end, half_width_h=half, step_min=step, min_elevation_deg=min_el,
        limiting_time=sun.times([best_s])[0].tz_convert(site.timezone),
        limiting_elevation_deg=best_el, limiting_azimuth_deg=best_az,
        protected_h=protected_h, notes=tuple(notes))


__all__ = [
    "DEFAULT_MIN_ELEVATION_DEG", "GCR_DEFINITIONS", "LIMITATION", "TROPIC_LATITUDE_DEG",
    "RowLayout", "default_design_date", "irradiation_per_ground_m2", "row_layout",
    "shadow_pitch_m",
]
