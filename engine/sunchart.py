"""Everything a sun-path chart draws, in one result object.

:func:`sun_chart` gathers, for one site and one chosen date:

- the day paths of the solstices, the equinoxes and the 21st of every month;
- the hour lines (analemmas) of every whole hour in a chosen time basis
  (local clock time with daylight saving, local standard time, apparent solar
  time);
- the site's effective horizon (profile and obstacles) on a 1° azimuth grid;
- the chosen date's path with its sunrise, sunset, solar noon, day length and
  highest elevation (polar day and polar night flagged) and the times the sun
  clears and drops behind the site horizon;
- a table of those events on the 21st of each month.

Positions come from the NREL Solar Position Algorithm (Reda & Andreas 2008,
NREL/TP-560-34302) through :mod:`tiltyard.engine.solarpos`. Azimuth is degrees
clockwise from true north in both hemispheres. Every timestamp is timezone-aware
in the site's zone (local clock time); each also comes as an hour of the day in
the chosen basis, for display.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd

from .horizon import (
    merged_profile,
    obstacle_elevation_deg,
    profile_elevation_deg,
    site_horizon_deg,
)
from .site import Site
from .solarpos import RISE_SET_ELEVATION_DEG, solar_position
from .sun import day_path, hour_lines, standard_path_dates
from .sunchart_design import (
    DateArc,
    HourBand,
    chart_centre_deg,
    chart_x,
    date_arcs,
    hour_band,
    lead_chart,
)
from .sunevents import sun_events
from .timegrid import TIME_BASES, apparent_solar_time_h, local_date, standard_timezone
from .words import day_month

#: Days between the points of an hour line.
HOUR_LINE_DAY_STEP = 3

#: Sampling step for locating when the sun clears or drops behind the horizon, minutes;
#: each crossing is then refined by bisection to about a second.
VISIBILITY_STEP_MIN = 2.0

#: A horizon crossing closer than this to sunrise/sunset counts as the same event, s.
SAME_EVENT_S = 120.0

#: Apparent semi-diameter of the sun, degrees (16'; Reda & Andreas 2008, App. A.2).
SUN_SEMI_DIAMETER_DEG = 0.2667

#: An hour line whose azimuth turns by more than this between two samples passes
#: by the zenith there and is broken, degrees.
ZENITH_SWING_DEG = 90.0

#: Obliquity of the ecliptic used to choose where hour lines are labelled, degrees.
_OBLIQUITY_DEG = 23.44


# -- result objects -------------------------------------------------------------

@dataclass(frozen=True, eq=False)
class DayCurve:
    """The sun's path across one local date.

    Attributes
    ----------
    label : str
        ``"June solstice"``, ``"21 Mar"`` or, for the chosen date, ``"10 May 2023"``.
    date : datetime.date
        Local calendar date.
    month : int
        1-12, for the colour.
    kind : str
        ``"solstice"``, ``"equinox"``, ``"month"`` (a 21st) or ``"chosen"``.
    time : pandas.DatetimeIndex
        Sample instants, tz-aware local clock time, sun above the rise/set line.
    hour : numpy.ndarray
        The same instants as hours of the day (0-24) in the chart's time basis.
    azimuth_deg, elevation_deg : numpy.ndarray
        Apparent (refracted) position, degrees.
    visible : numpy.ndarray of bool
        Sun above the site horizon.
    """

    label: str
    date: _dt.date
    month: int
    kind: str
    time: pd.DatetimeIndex
    hour: np.ndarray
    azimuth_deg: np.ndarray
    elevation_deg: np.ndarray
    visible: np.ndarray

    def __len__(self) -> int:
        return len(self.azimuth_deg)


@dataclass(frozen=True, eq=False)
class HourLine:
    """The sun at one whole hour (in the chart's basis) through the year.

    Attributes
    ----------
    hour : int
        0-23.
    day_of_year, azimuth_deg, elevation_deg : numpy.ndarray
        Points every :data:`HOUR_LINE_DAY_STEP` days; NaN separates the pieces
        of a line (the sun below the rise/set line in part of the year, or the
        jump of clock time at a daylight-saving change). A line present all
        year is closed (its first point repeated at the end).
    label_azimuth_deg, label_elevation_deg : float
        Where to write the hour: the point nearest the solstice whose noon sun
        is on the equator side of the zenith (the June solstice north of the
        tropic, the December solstice south of it and in the tropics between).
    label_on_top : bool
        True when the labelling solstice carries the highest day paths (sites
        beyond the tropics), so the label belongs above the point; in the
        tropics the labelling solstice is the lowest path and the label goes
        below it.
    """

    hour: int
    day_of_year: np.ndarray
    azimuth_deg: np.ndarray
    elevation_deg: np.ndarray
    label_azimuth_deg: float
    label_elevation_deg: float
    label_on_top: bool


@dataclass(frozen=True)
class DaySummary:
    """Events of the chosen date.

    Times are tz-aware local clock time (None where there is none); the ``*_h``
    fields are the same instants as hours of the day in the chart's basis (NaN
    where there is none).
    """

    date: _dt.date
    sunrise: pd.Timestamp | None
    sunset: pd.Timestamp | None
    solar_noon: pd.Timestamp
    sunrise_h: float
    sunset_h: float
    solar_noon_h: float
    day_length_h: float
    max_elevation_deg: float
    polar: str | None
    clears_horizon: pd.Timestamp | None
    behind_horizon: pd.Timestamp | None
    clears_horizon_h: float
    behind_horizon_h: float
    direct_sun_h: float


@dataclass(frozen=True, eq=False)
class SunChart:
    """Everything the sun-path view draws for one site, date and time basis.

    Attributes
    ----------
    site_name, timezone : str
    latitude_deg, longitude_deg : float
    year : int
        Year of the chosen date; the standard paths and hour lines are for it.
    basis : str
        ``"clock"``, ``"standard"`` or ``"solar"``.
    equator_azimuth_deg : float
        180 for sites north of the equator (and on it), 0 south of it.
    centre_azimuth_deg : float
        What the flat chart faces (:func:`~.sunchart_design.chart_centre_deg`):
        the equator's direction beyond the tropics, east or west within them.
    lead : str
        ``"flat"`` or ``"above"``: which chart leads (:func:`~.sunchart_design.lead_chart`).
    arcs : tuple of DateArc
        The date arcs (:func:`~.sunchart_design.date_arcs`).
    hour_band : HourBand
        Where the flat chart's hour labels go.
    paths : tuple of DayCurve
        Solstices and equinoxes first, then the 21st of each month.
    hour_lines : tuple of HourLine
        Only hours at which the sun is up on some day of the year.
    horizon_azimuth_deg, horizon_elevation_deg : numpy.ndarray
        Site horizon (profile and obstacles merged) every 1° from 0° to 360°
        inclusive, plus the obstacle edges.
    profile_elevation_deg, obstacle_elevation_deg : numpy.ndarray
        The measured profile alone and the obstacles alone (NaN where there is
        none) at ``horizon_azimuth_deg``, so charts can tell terrain and
        obstacles apart.
    day : DayCurve
        The chosen date's path (empty in polar night).
    summary : DaySummary
        The chosen date's events.
    events : pandas.DataFrame
        One row per 21st of the month, see :func:`monthly_events`.
    """

    site_name: str
    latitude_deg: float
    longitude_deg: float
    timezone: str
    year: int
    basis: str
    equator_azimuth_deg: float
    centre_azimuth_deg: float
    lead: str
    arcs: tuple
    hour_band: HourBand
    paths: tuple
    hour_lines: tuple
    horizon_azimuth_deg: np.ndarray
    horizon_elevation_deg: np.ndarray
    profile_elevation_deg: np.ndarray
    obstacle_elevation_deg: np.ndarray
    day: DayCurve
    summary: DaySummary
    events: pd.DataFrame


# -- time basis -------------------------------------------------------------------

def _check_basis(basis: str) -> str:
    if basis not in TIME_BASES:
        raise ValueError(f"basis = {basis!r}: must be one of {', '.join(TIME_BASES)}")
    return basis


def basis_hours(times, site: Site, basis: str, equation_of_time_min=None) -> np.ndarray:
    """Instants as hours of the day (0-24) in local clock, standard or solar time.

    Parameters
    ----------
    times : pandas.DatetimeIndex or sequence of Timestamp
        Timezone-aware instants; NaT gives NaN.
    site : Site
        Time zone and longitude.
    basis : {"clock", "standard", "solar"}
        ``clock``: the zone's civil time with daylight saving; ``standard``: the
        zone's standard offset all year; ``solar``: apparent solar time.
    equation_of_time_min : array_like, optional
        Equation of time at ``times`` (minutes, apparent minus mean solar
        time); computed by SPA when needed and not given.

    Returns
    -------
    numpy.ndarray
        Hours, NaN where ``times`` is NaT.

    References
    ----------
    Duffie & Beckman (2013), Solar Engineering of Thermal Processes, 4th ed.,
    eq. 1.5.2 (apparent solar time from standard time, the longitude and the
    equation of time), through
    :func:`tiltyard.engine.timegrid.apparent_solar_time_h`; the equation of time
    from Reda & Andreas (2008), NREL/TP-560-34302, App. A.1.
    """
    _check_basis(basis)
    t = pd.DatetimeIndex(pd.to_datetime(pd.Series(list(times), dtype=object), utc=True))
    out = np.full(len(t), np.nan)
    ok = ~t.isna()
    if not ok.any():
        return out
    tu = t[ok]
    if basis == "solar":
        if equation_of_time_min is None:
            eot = solar_position(tu, site)["equation_of_time"].to_numpy()
        else:
            eot = np.asarray(equation_of_time_min, dtype=float)[np.asarray(ok)]
        out[np.asarray(ok)] = apparent_solar_time_h(tu, site.longitude_deg, eot)
        return out
    zone = site.timezone if basis == "clock" else standard_timezone(site.timezone, tu[0].year)
    loc = tu.tz_convert(zone)
    out[np.asarray(ok)] = (loc.hour + loc.minute / 60.0 + loc.second / 3600.0
                           + loc.microsecond / 3.6e9).to_numpy()
    return out


# -- horizon crossings ------------------------------------------------------------

def _sun_clear(site: Site, times) -> np.ndarray:
    """True where the sun is up (past sunrise) and its upper limb is above the site horizon."""
    pos = solar_position(pd.DatetimeIndex(times), site)
    el = pos["apparent_elevation"].to_numpy()
    hz = site_horizon_deg(site, pos["azimuth"].to_numpy())
    return (el > RISE_SET_ELEVATION_DEG) & (el + SUN_SEMI_DIAMETER_DEG > hz)


def horizon_crossings(site: Site, dates) -> pd.DataFrame:
    """When the sun first clears and last drops behind the site horizon, per date.

    The sun counts as clear when it is up (its centre above the -0.8333°
    rise/set line, which pvlib's refracted elevation passes exactly at the SPA
    sunrise) and its upper limb, the apparent centre plus
    :data:`SUN_SEMI_DIAMETER_DEG`, is above the site's effective horizon
    (profile and obstacles): the same limb convention as sunrise, so on a flat
    0° horizon the sun clears at sunrise. The day is sampled every :data:`VISIBILITY_STEP_MIN` minutes and
    each change refined by bisection to about one second.

    Parameters
    ----------
    site : Site
        Location, time zone, horizon and obstacles.
    dates : iterable of date-like
        Local calendar dates.

    Returns
    -------
    pandas.DataFrame
        ``date``; ``first_clear`` (the first moment the sun comes clear on the
        date, NaT when it is clear at midnight or never); ``last_clear`` (the
        last moment it drops behind, NaT when it is clear at the next midnight or
        never); ``direct_sun_h`` (hours with the sun clear).

    Notes
    -----
    The path samples' ``visible`` flag (:func:`tiltyard.engine.sun.day_path`)
    compares the sun's centre instead, a minute or two later at a low sun. A
    spell of sun or shade shorter than the sampling step may be missed, which
    does not affect the first and last crossing unless the whole visible spell
    is that short.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, for the positions and the
    rise/set convention (App. A.2: refraction 34', semi-diameter 16').
    """
    day = pd.DatetimeIndex(pd.to_datetime(list(dates))).normalize()
    if len(day) == 0:
        return pd.DataFrame({"date": [], "first_clear": pd.DatetimeIndex([], tz=site.timezone),
                             "last_clear": pd.DatetimeIndex([], tz=site.timezone),
                             "direct_sun_h": []})
    starts = day.tz_localize(site.timezone, ambiguous=True, nonexistent="shift_forward")
    ends = (day + pd.Timedelta(days=1)).tz_localize(site.timezone, ambiguous=True,
                                                     nonexistent="shift_forward")
    step_s = VISIBILITY_STEP_MIN * 60.0
    s0 = (starts.tz_convert("UTC") - pd.Timestamp(0, tz="UTC")).total_seconds().to_numpy()
    s1 = (ends.tz_convert("UTC") - pd.Timestamp(0, tz="UTC")).total_seconds().to_numpy()
    grids = [np.append(np.arange(a, b, step_s), b) for a, b in zip(s0, s1, strict=True)]
    owner = np.concatenate([np.full(len(g), i) for i, g in enumerate(grids)])
    secs = np.concatenate(grids)
    clear = _sun_clear(site, pd.to_datetime(secs, unit="s", utc=True))
    # changes between neighbouring samples of the same date
    same = owner[1:] == owner[:-1]
    change = same & (clear[1:] != clear[:-1])
    idx = np.flatnonzero(change)
    lo, hi = secs[idx].copy(), secs[idx + 1].copy()
    lo_state = clear[idx].copy()
    for _ in range(int(math.ceil(math.log2(step_s)))):
        mid = 0.5 * (lo + hi)
        st = _sun_clear(site, pd.to_datetime(mid, unit="s", utc=True)) if len(mid) else mid
        like_lo = st == lo_state
        lo = np.where(like_lo, mid, lo)
        hi = np.where(like_lo, hi, mid)
    cross_s = 0.5 * (lo + hi)
    rising = ~lo_state
    first, last, sun_h = [], [], []
    for i in range(len(day)):
        sel = owner[idx] == i
        t_i, up_i = cross_s[sel], rising[sel]
        g = clear[owner == i]
        first.append(t_i[up_i][0] if (not g[0]) and up_i.any() else np.nan)
        last.append(t_i[~up_i][-1] if (not g[-1]) and (~up_i).any() else np.nan)
        # visible time: sum of (drop - rise) with the day's bounds where clear
        edges = np.concatenate([[s0[i]] if g[0] else [], t_i, [s1[i]] if g[-1] else []])
        sun_h.append(float(np.sum(edges[1::2] - edges[0::2]) / 3600.0) if len(edges) else 0.0)

    def local(values):
        return pd.DatetimeIndex(pd.to_datetime(np.asarray(values, dtype=float), unit="s",
                                               utc=True)).tz_convert(site.timezone)

    return pd.DataFrame({"date": [d.date() for d in day], "first_clear": local(first),
                         "last_clear": local(last), "direct_sun_h": sun_h})


# -- monthly table --------------------------------------------------------------

def _event_table(site: Site, dates, basis: str) -> pd.DataFrame:
    """Sun events and horizon crossings for ``dates`` (see :func:`monthly_events`)."""
    ev = sun_events(site, dates).table
    cr = horizon_crossings(site, dates)
    rise = pd.DatetimeIndex(ev["sunrise"])
    sset = pd.DatetimeIndex(ev["sunset"])
    first = pd.DatetimeIndex(cr["first_clear"])
    last = pd.DatetimeIndex(cr["last_clear"])
    same_rise = (~rise.isna()) & (~first.isna()) & (
        np.abs((first - rise).total_seconds().to_numpy()) <= SAME_EVENT_S)
    same_set = (~sset.isna()) & (~last.isna()) & (
        np.abs((last - sset).total_seconds().to_numpy()) <= SAME_EVENT_S)
    clears = first.where(~same_rise)
    behind = last.where(~same_set)
    cols = {"sunrise": rise, "solar_noon": pd.DatetimeIndex(ev["solar_noon"]), "sunset": sset,
            "clears_horizon": clears, "behind_horizon": behind}
    out = pd.DataFrame({"date": ev["date"]})
    for name, values in cols.items():
        out[name] = values
    for name, values in cols.items():
        out[f"{name}_h"] = basis_hours(values, site, basis)
    out["day_length_h"] = ev["day_length_h"].to_numpy(dtype=float)
    out["noon_elevation_deg"] = ev["max_elevation_deg"].to_numpy(dtype=float)
    out["polar"] = pd.Series([p if isinstance(p, str) else None for p in ev["polar"]],
                             dtype=object)
    out["direct_sun_h"] = cr["direct_sun_h"].to_numpy(dtype=float)
    return out


def monthly_events(site: Site, year: int, basis: str = "clock") -> pd.DataFrame:
    """Sun events on the 21st of each month.

    Parameters
    ----------
    site : Site
        Location, time zone and horizon.
    year : int
        Year.
    basis : {"clock", "standard", "solar"}
        Time basis of the ``*_h`` columns.

    Returns
    -------
    pandas.DataFrame
        One row per month: ``date``; ``sunrise``, ``solar_noon``, ``sunset``
        (tz-aware local clock time, NaT in polar day/night); ``clears_horizon``
        and ``behind_horizon``: when the sun first clears and last drops behind
        the site horizon, NaT when that is at sunrise/sunset (within
        :data:`SAME_EVENT_S`), when the sun is clear across midnight, or when it
        never clears; the same five as hours of the day in ``basis``
        (``sunrise_h`` ...); ``day_length_h``; ``noon_elevation_deg`` (apparent
        elevation at the upper transit); ``polar`` (``"day"``, ``"night"`` or
        None); ``direct_sun_h`` (hours with the sun above the site horizon).

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, App. A.2 (sunrise, transit,
    sunset with the sun's centre at -0.8333°), through
    :func:`tiltyard.engine.sunevents.sun_events`.
    """
    _check_basis(basis)
    dates = [pd.Timestamp(int(year), m, 21) for m in range(1, 13)]
    return _event_table(site, dates, basis)


# -- curves -----------------------------------------------------------------------

def _curves(site: Site, entries, basis: str, step_min: float) -> list[DayCurve]:
    """Day paths for (label, date, kind) entries, hours in ``basis``."""
    frames = [day_path(site, d, step_min=step_min) for _, d, _ in entries]
    hours = [np.array([])] * len(frames)
    if basis == "solar":
        times = [f["time"] for f in frames]
        n = [len(t) for t in times]
        if sum(n):
            allt = pd.DatetimeIndex(pd.concat([pd.Series(t) for t in times if len(t)]))
            eot = solar_position(allt, site)["equation_of_time"].to_numpy()
            h = apparent_solar_time_h(allt, site.longitude_deg, eot)
            hours = np.split(h, np.cumsum(n)[:-1])
    else:
        hours = [basis_hours(pd.DatetimeIndex(f["time"]), site, basis) for f in frames]
    out = []
    for (label, d, kind), f, h in zip(entries, frames, hours, strict=True):
        d = pd.Timestamp(d)
        out.append(DayCurve(label=label, date=d.date(), month=int(d.month), kind=kind,
                            time=pd.DatetimeIndex(f["time"]), hour=np.asarray(h, dtype=float),
                            azimuth_deg=f["azimuth_deg"].to_numpy(dtype=float),
                            elevation_deg=f["elevation_deg"].to_numpy(dtype=float),
                            visible=f["visible"].to_numpy(dtype=bool)))
    return out


def _label_day_of_year(latitude_deg: float) -> int:
    """Day of year of the solstice whose noon sun is on the equator side of the zenith."""
    june, december = 172, 355
    if latitude_deg >= 0:
        return june if latitude_deg >= _OBLIQUITY_DEG else december
    return december if latitude_deg <= -_OBLIQUITY_DEG else june


def _hour_line_curves(site: Site, year: int, basis: str) -> list[HourLine]:
    """Hour lines split into pieces, closed over the year end, with label points.

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302, through
    :func:`tiltyard.engine.sun.hour_lines`.
    """
    hl = hour_lines(site, year, basis=basis, day_step=HOUR_LINE_DAY_STEP)
    first_day = pd.Timestamp(year, 1, 1)
    n_days = len(pd.date_range(first_day, pd.Timestamp(year, 12, 31),
                               freq=f"{HOUR_LINE_DAY_STEP}D"))
    target = _label_day_of_year(site.latitude_deg)
    # beyond the tropics the labelling solstice carries the highest paths
    on_top = abs(site.latitude_deg) >= _OBLIQUITY_DEG
    out = []
    for hour, g in hl.groupby("hour", sort=True):
        k = ((pd.DatetimeIndex(g["date"]) - first_day).days // HOUR_LINE_DAY_STEP).to_numpy()
        az = g["azimuth_deg"].to_numpy(dtype=float)
        el = g["elevation_deg"].to_numpy(dtype=float)
        doy = (pd.DatetimeIndex(g["date"]).day_of_year).to_numpy(dtype=float)
        brk = np.diff(k) != 1
        # a line passing (nearly) through the zenith swings across the sky between two
        # samples; joining them would draw a line across the top of a flat chart
        brk |= np.abs(np.mod(np.diff(az) + 180.0, 360.0) - 180.0) > ZENITH_SWING_DEG
        if basis == "clock":
            off = pd.DatetimeIndex(g["time_utc"]).tz_convert(site.timezone)
            off_min = np.array([o.utcoffset().total_seconds() / 60.0 for o in off])
            brk |= np.diff(off_min) != 0
        cuts = np.flatnonzero(brk) + 1
        pieces = np.split(np.arange(len(k)), cuts)
        wraps = k[0] == 0 and k[-1] == n_days - 1 and (
            basis != "clock" or off_min[0] == off_min[-1])
        if wraps and len(pieces) == 1:
            pieces = [np.append(pieces[0], pieces[0][0])]
        elif wraps:
            pieces = [np.concatenate([pieces[-1], pieces[0]])] + pieces[1:-1]
        sel = np.concatenate([np.append(p, -1) for p in pieces])[:-1]
        gap = sel < 0
        pick = np.where(gap, 0, sel)

        def with_gaps(a, gap=gap, pick=pick):
            return np.where(gap, np.nan, a[pick])

        # label point: the sample nearest (around the year) the labelling solstice
        dist = np.abs(doy - target)
        dist = np.minimum(dist, 365.0 - dist)
        j = int(np.argmin(dist))
        out.append(HourLine(hour=int(hour), day_of_year=with_gaps(doy),
                            azimuth_deg=with_gaps(az), elevation_deg=with_gaps(el),
                            label_azimuth_deg=float(az[j]), label_elevation_deg=float(el[j]),
                            label_on_top=on_top))
    return out


def _summary(row: pd.Series) -> DaySummary:
    def ts(v):
        return None if pd.isna(v) else pd.Timestamp(v)

    return DaySummary(
        date=row["date"], sunrise=ts(row["sunrise"]), sunset=ts(row["sunset"]),
        solar_noon=pd.Timestamp(row["solar_noon"]), sunrise_h=float(row["sunrise_h"]),
        sunset_h=float(row["sunset_h"]), solar_noon_h=float(row["solar_noon_h"]),
        day_length_h=float(row["day_length_h"]),
        max_elevation_deg=float(row["noon_elevation_deg"]), polar=row["polar"],
        clears_horizon=ts(row["clears_horizon"]), behind_horizon=ts(row["behind_horizon"]),
        clears_horizon_h=float(row["clears_horizon_h"]),
        behind_horizon_h=float(row["behind_horizon_h"]),
        direct_sun_h=float(row["direct_sun_h"]))


def _parse_date(date) -> pd.Timestamp:
    d = local_date(date)
    if not 1900 <= d.year <= 2100:
        raise ValueError(f"date = {date!r}: the year must be between 1900 and 2100")
    return d


# -- entry point --------------------------------------------------------------------

def sun_chart(site: Site, date, basis: str = "clock", step_min: float = 5,
              progress: Callable[[float, str], None] | None = None) -> SunChart:
    """Build everything a sun-path chart shows for one site and date.

    Parameters
    ----------
    site : Site
        Location, time zone, horizon profile and obstacles.
    date : date-like
        The chosen local date (drawn bold); its year sets the year of the
        standard paths and hour lines.
    basis : {"clock", "standard", "solar"}, default "clock"
        Time basis of the hour lines and of every ``*_h`` hour: local clock time
        (with daylight saving), local standard time, apparent solar time.
    step_min : float, default 5
        Sampling step of the day paths, minutes (0 < step_min <= 60).
    progress : callable, optional
        ``progress(fraction, stage)``, called between stages (it may raise to
        cancel).

    Returns
    -------
    SunChart

    Raises
    ------
    ValueError
        Unknown basis, a step out of range or a date that cannot be read.

    References
    ----------
    Reda, I. & Andreas, A. (2008). Solar Position Algorithm for Solar Radiation
    Applications. NREL/TP-560-34302 (positions, App. A.2 rise/transit/set);
    Duffie & Beckman (2013), Solar Engineering of Thermal Processes, 4th ed.,
    eq. 1.5.2 (apparent solar time).
    """
    _check_basis(basis)
    try:
        step = float(step_min)
    except (TypeError, ValueError):
        raise ValueError(f"step_min = {step_min!r}: must be a number of minutes") from None
    if not 0.0 < step <= 60.0 or not math.isfinite(step):
        raise ValueError(f"step_min = {step_min!r}: must be more than 0 and at most 60 minutes")
    day = _parse_date(date)
    year = int(day.year)

    def report(fraction, stage):
        if progress is not None:
            progress(fraction, stage)

    report(0.0, "day paths")
    kinds = {"March equinox": "equinox", "September equinox": "equinox",
             "June solstice": "solstice", "December solstice": "solstice"}
    entries = [(label, d, kinds.get(label, "month"))
               for label, d in standard_path_dates(site, year)]
    entries.append((f"{day_month(day)} {day.year}", day, "chosen"))
    curves = _curves(site, entries, basis, step)
    report(0.4, "hour lines")
    lines = _hour_line_curves(site, year, basis)
    report(0.6, "sun events")
    table = _event_table(site, [pd.Timestamp(year, m, 21) for m in range(1, 13)] + [day], basis)
    report(0.9, "horizon")
    prof = merged_profile(site, 1.0)
    hz_az = np.append(np.asarray(prof.azimuth_deg, dtype=float), 360.0)
    hz_el = np.append(np.asarray(prof.elevation_deg, dtype=float), prof.elevation_deg[0])
    terrain = profile_elevation_deg(site.horizon, hz_az)
    objects = obstacle_elevation_deg(site.obstacles, hz_az)
    objects = np.where(np.isfinite(objects) & (objects > terrain + 1e-9), objects, np.nan)
    centre = chart_centre_deg(site.latitude_deg)
    paths = tuple(curves[:-1])
    report(1.0, "done")
    return SunChart(
        site_name=site.name, latitude_deg=site.latitude_deg, longitude_deg=site.longitude_deg,
        timezone=site.timezone, year=year, basis=basis,
        equator_azimuth_deg=site.equator_azimuth_deg, centre_azimuth_deg=centre,
        lead=lead_chart(site.latitude_deg), arcs=date_arcs(paths, centre),
        hour_band=hour_band(lines, list(paths) + [curves[-1]], centre), paths=paths,
        hour_lines=tuple(lines), horizon_azimuth_deg=hz_az, horizon_elevation_deg=hz_el,
        profile_elevation_deg=terrain, obstacle_elevation_deg=objects,
        day=curves[-1], summary=_summary(table.iloc[-1]),
        events=table.iloc[:-1].reset_index(drop=True))


__all__ = [
    "HOUR_LINE_DAY_STEP", "SAME_EVENT_S", "ZENITH_SWING_DEG", "DateArc", "HourBand", "chart_x", "SUN_SEMI_DIAMETER_DEG", "VISIBILITY_STEP_MIN", "DayCurve", "DaySummary",
    "HourLine", "SunChart", "basis_hours", "horizon_crossings", "monthly_events", "sun_chart",
]
