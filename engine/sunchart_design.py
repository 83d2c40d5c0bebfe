"""The design decisions of the sun-path charts that are data, shared by app and sheet.

- :func:`chart_centre_deg`: which direction a flat (elevation against azimuth)
  chart is centred on, chosen from the sun's own azimuths over the year, so
  that no day path is cut where it is high in the sky;
- :func:`lead_chart`: which of the two charts leads (the from-above chart
  where the sun crosses both the equator's and the pole's meridian);
- :data:`ARC_GROUPS` and :func:`date_arcs`: which date arcs are drawn (the
  solstices, the equinoxes, the chosen date; the other months on request,
  two months that share a sun path sharing one arc) and where each is
  labelled;
- :func:`hour_band`: the band above every path where the hour labels go, and
  which hours are labelled so that no two labels meet.

Nothing here imports Qt; distances are in degrees of azimuth or elevation.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .words import MONTH_ABBR

#: Candidate chart centres: the eight compass points, degrees clockwise from north.
CENTRE_CANDIDATES_DEG = tuple(float(a) for a in range(0, 360, 45))

#: Obliquity of the ecliptic, degrees (Meeus 1998, Astronomical Algorithms, 2nd ed.,
#: eq. 22.2 at J2000, rounded).
OBLIQUITY_DEG = 23.44

#: The arcs of a chart: (months, kind). A pair of months whose 21sts have nearly
#: the same declination (within about 0.5°) share one arc, drawn on the first
#: month's 21st; the solstices and the equinoxes are drawn on their own dates.
ARC_GROUPS = (
    ((12,), "solstice"), ((1, 11), "month"), ((2, 10), "month"), ((3, 9), "equinox"),
    ((4, 8), "month"), ((5, 7), "month"), ((6,), "solstice"),
)

#: Hour labels closer than this in azimuth share the band badly; the less
#: important of the two is left out, degrees.
HOUR_LABEL_MIN_SEP_DEG = 11.0

#: Gap between the highest path and the hour band, and the band's height, degrees.
HOUR_BAND_GAP_DEG = 3.0
HOUR_BAND_HEIGHT_DEG = 8.0


def chart_x(azimuth_deg, centre_deg: float) -> np.ndarray:
    """Horizontal coordinate of an azimuth on a flat chart centred on ``centre_deg``.

    The coordinate runs from ``centre_deg - 180`` to ``centre_deg + 180``, so the
    centre sits in the middle and the opposite direction at both edges. Centred
    on 180° the coordinate is the azimuth itself (east on the left); centred on
    0° it is the azimuth folded to -180..180 (east on the right).
    """
    az = np.asarray(azimuth_deg, dtype=float)
    return np.mod(az - centre_deg + 180.0, 360.0) - 180.0 + centre_deg


def _sun_directions(latitude_deg: float, n_days: int = 73, n_hours: int = 720):
    """Sun azimuth and elevation over a year of declinations and a day of hour angles.

    References
    ----------
    Duffie & Beckman (2013), Solar Engineering of Thermal Processes, 4th ed.,
    eq. 1.6.5 (zenith angle) and eq. 1.6.6 (azimuth), written as the sun's
    east/north/up direction; declination by Cooper (1969), their eq. 1.6.1a.
    No refraction: this only chooses a chart's centre.
    """
    day = np.linspace(1.0, 365.0, n_days)
    delta = np.radians(23.45 * np.sin(np.radians(360.0 * (284.0 + day) / 365.0)))
    omega = np.radians(np.linspace(-180.0, 180.0, n_hours))
    phi = np.radians(latitude_deg)
    d, w = np.meshgrid(delta, omega, indexing="ij")
    east = -np.cos(d) * np.sin(w)
    north = np.sin(d) * np.cos(phi) - np.cos(d) * np.sin(phi) * np.cos(w)
    up = np.cos(d) * np.cos(phi) * np.cos(w) + np.sin(d) * np.sin(phi)
    az = np.mod(np.degrees(np.arctan2(east, north)), 360.0)
    el = np.degrees(np.arcsin(np.clip(up, -1.0, 1.0)))
    return az, el


def edge_cost(latitude_deg: float, centre_deg: float, directions=None) -> float:
    """How badly a chart centred on ``centre_deg`` cuts the year's day paths.

    The sum, over a year of days (every fifth), of the elevation (degrees) at
    which each day's path crosses the chart's edge (the direction opposite the
    centre) with the sun up; 0 when no path crosses it. A cut at the horizon
    costs nothing, a cut through a high noon sun costs most. ``directions`` is
    :func:`_sun_directions`'s result for the latitude, when already at hand.

    References
    ----------
    Sun directions as in Duffie & Beckman (2013), eq. 1.6.5-1.6.6.
    """
    az, el = _sun_directions(latitude_deg) if directions is None else directions
    x = chart_x(az, centre_deg)
    up = (el[:, 1:] > 0.0) & (el[:, :-1] > 0.0)
    jump = np.abs(np.diff(x, axis=1)) > 180.0
    cut = up & jump
    return float(np.sum(np.where(cut, 0.5 * (el[:, 1:] + el[:, :-1]), 0.0)))


def chart_centre_deg(latitude_deg: float) -> float:
    return _centre(round(float(latitude_deg), 2))


@lru_cache(maxsize=64)
def _centre(latitude_deg: float) -> float:
    """The azimuth a flat sun-path chart faces, degrees clockwise from north.

    Beyond the tropics this is the direction of the equator (180° in the north,
    0° in the south): the sun never crosses the pole's meridian high in the
    sky there. Within the tropics the noon sun is north of the zenith part of
    the year and south of it the rest, so a chart centred on either cuts some
    paths at their highest point; the eight compass points are compared by
    :func:`edge_cost` and the cheapest taken, the equator's direction first on
    a tie, then the direction nearest to it (east before west).
    """
    equator = 0.0 if latitude_deg < 0 else 180.0
    order = sorted(CENTRE_CANDIDATES_DEG,
                   key=lambda c: (abs(((c - equator + 180.0) % 360.0) - 180.0), c))
    directions = _sun_directions(latitude_deg)
    costs = [edge_cost(latitude_deg, c, directions) for c in order]
    best = min(costs)
    # equal within a degree-day: prefer the earlier (nearer the equator) candidate
    return next(c for c, k in zip(order, costs, strict=True) if k <= best + 1.0)


def lead_chart(latitude_deg: float) -> str:
    """``"flat"`` where the flat chart faces the equator, ``"above"`` where it cannot.

    Where the sun crosses both meridians high in the sky (the tropics), the
    from-above chart shows every path whole and leads.
    """
    equator = 0.0 if latitude_deg < 0 else 180.0
    return "flat" if chart_centre_deg(latitude_deg) == equator else "above"


@dataclass(frozen=True, eq=False)
class DateArc:
    """One arc of the chart: a path drawn once for one or two months.

    Attributes
    ----------
    label : str
        Written on the arc: ``"21 Jun"``, ``"Mar · Sep"``, ``"Jan · Nov"``.
    months : tuple of int
        The months the arc stands for (1-12).
    kind : str
        ``"solstice"``, ``"equinox"`` or ``"month"``.
    default : bool
        Shown without asking (solstices and equinoxes).
    curve : DayCurve
        The path drawn.
    label_index : int
        Sample of ``curve`` the label is written at (-1: none, the sun never up).
    label_candidates : tuple of int
        Further samples to try, best first, where the first is taken by another
        label (:func:`arc_label_candidates`); empty for an empty path.
    """

    label: str
    months: tuple
    kind: str
    default: bool
    curve: object
    label_index: int
    label_candidates: tuple = ()


#: Heights along a path (fractions of its highest elevation) where its label may go,
#: best first: clear of the noon hour line and of the horizon, then higher or lower.
LABEL_FRACTIONS = (0.55, 0.35, 0.75, 0.2, 0.9)


def arc_label_candidates(azimuth_deg, elevation_deg, centre_deg: float,
                         fractions=LABEL_FRACTIONS) -> tuple:
    """Where along a path its label may go, best first: for each of ``fractions`` of
    the path's highest elevation, the nearest sample on the side of the path
    (morning or afternoon) that keeps it further from the flat chart's edges, then
    the other side. Empty for an empty path.

    A chart places each arc's label at the first candidate whose box is free, so
    arcs that crowd each other at one height still get their names.
    """
    el = np.asarray(elevation_deg, dtype=float)
    if len(el) == 0:
        return ()
    az = np.asarray(azimuth_deg, dtype=float)
    top = int(np.argmax(el))
    out: list[int] = []
    for f in fractions:
        after = top + int(np.argmin(np.abs(el[top:] - f * el[top])))
        before = int(np.argmin(np.abs(el[:top + 1] - f * el[top])))
        x = chart_x(az[[after, before]], centre_deg)
        room = 180.0 - np.abs(x - centre_deg)
        pair = (after, before) if room[0] >= min(room[1], 45.0) else (before, after)
        out += [j for j in pair if j not in out]
    return tuple(out)


def arc_label_index(azimuth_deg, elevation_deg, centre_deg: float,
                    fraction: float = 0.55) -> int:
    """Where along a path its label goes: the sample nearest ``fraction`` of the
    path's highest elevation (clear of the noon hour line and of the horizon), on
    the side of the path (morning or afternoon) that keeps it further from the
    flat chart's edges; -1 for an empty path."""
    found = arc_label_candidates(azimuth_deg, elevation_deg, centre_deg, (fraction,))
    return found[0] if found else -1


def date_arcs(paths, centre_deg: float) -> tuple:
    """The chart's arcs from its day paths (see :data:`ARC_GROUPS`).

    ``paths`` are :class:`~tiltyard.engine.sunchart.DayCurve` objects: the
    solstices and equinoxes (kind ``"solstice"``/``"equinox"``) and the 21st of
    every month (kind ``"month"``).
    """
    by_label = {p.label: p for p in paths}
    by_month = {p.month: p for p in paths if p.kind == "month"}
    season = {3: "March equinox", 6: "June solstice", 9: "September equinox",
              12: "December solstice"}
    out = []
    for months, kind in ARC_GROUPS:
        curve = by_label.get(season.get(months[0], ""), by_month.get(months[0]))
        if kind == "solstice":
            label = f"{curve.date.day} {MONTH_ABBR[curve.date.month - 1]}"
        else:
            label = " · ".join(MONTH_ABBR[m - 1] for m in months)
        out.append(DateArc(label=label, months=months, kind=kind, default=kind != "month",
                           curve=curve,
                           label_index=arc_label_index(curve.azimuth_deg, curve.elevation_deg,
                                                       centre_deg),
                           label_candidates=arc_label_candidates(
                               curve.azimuth_deg, curve.elevation_deg, centre_deg)[1:]))
    return tuple(out)


def polar_xy(azimuth_deg, elevation_deg):
    """Map x/y of the from-above chart: north up, east right, radius = 90° - elevation.

    An azimuthal equidistant sky map centred on the zenith (common practice, no
    source); elevations below 0° are drawn on the horizon ring. Units: degrees of
    zenith angle (the horizon ring has radius 90).
    """
    az = np.radians(np.asarray(azimuth_deg, dtype=float))
    r = 90.0 - np.clip(np.asarray(elevation_deg, dtype=float), 0.0, 90.0)
    return r * np.sin(az), r * np.cos(az)


def skyline_peaks(azimuth_deg, elevation_deg, n: int = 3, min_sep_deg: float = 40.0,
                  min_elevation_deg: float = 2.0) -> tuple:
    """Where the from-above chart ticks its skyline: the indices of the highest
    points, at most ``n``, at least ``min_sep_deg`` of azimuth apart and at least
    ``min_elevation_deg`` high (a tick on a flat skyline says nothing), highest first.
    """
    az = np.asarray(azimuth_deg, dtype=float)
    el = np.asarray(elevation_deg, dtype=float)
    picks: list[int] = []
    for i in np.argsort(-np.nan_to_num(el, nan=-np.inf), kind="stable"):
        if not el[i] >= min_elevation_deg or len(picks) == n:
            break
        if all(abs(((az[i] - az[j]) + 180.0) % 360.0 - 180.0) >= min_sep_deg for j in picks):
            picks.append(int(i))
    return tuple(picks)


#: Which hours keep their label first when two would meet: noon, 6 and 18, every
#: third hour, even hours, the rest.
def _hour_rank(hour: int) -> int:
    if hour == 12:
        return 0
    if hour in (6, 18):
        return 1
    if hour % 3 == 0:
        return 2
    return 3 if hour % 2 == 0 else 4


@dataclass(frozen=True)
class HourBand:
    """The band above every path where the flat chart's hour labels sit.

    Attributes
    ----------
    low_deg, high_deg : float
        Elevation of the band's lower and upper edge.
    hours : tuple of int
        Hours labelled, each at its line's highest point's azimuth.
    azimuth_deg : tuple of float
        Where each of ``hours`` is written.
    """

    low_deg: float
    high_deg: float
    hours: tuple
    azimuth_deg: tuple


def hour_band(hour_lines, paths, centre_deg: float,
              min_sep_deg: float = HOUR_LABEL_MIN_SEP_DEG) -> HourBand:
    """The hour band: above the highest path, one label per hour line where room allows.

    Each hour is written above its line's highest point; where two labels
    would be closer than ``min_sep_deg`` (in chart coordinates), the hour of
    lower rank (:func:`_hour_rank`) is left out, so labels never meet.
    """
    tops = [float(np.nanmax(p.elevation_deg)) for p in paths if len(p)]
    low = (max(tops) if tops else 10.0) + HOUR_BAND_GAP_DEG
    cands = []
    for line in hour_lines:
        el = np.asarray(line.elevation_deg, dtype=float)
        if not np.isfinite(el).any():
            continue
        j = int(np.nanargmax(el))
        cands.append((_hour_rank(line.hour), line.hour,
                      float(chart_x(line.azimuth_deg[j], centre_deg))))
    kept: list[tuple[int, float]] = []
    edge_lo, edge_hi = centre_deg - 180.0, centre_deg + 180.0
    for _rank, hour, x in sorted(cands):
        if x - edge_lo < 0.5 * min_sep_deg or edge_hi - x < 0.5 * min_sep_deg:
            continue
        if all(abs(x - kx) >= min_sep_deg for _, kx in kept):
            kept.append((hour, x))
    kept.sort(key=lambda t: t[1])
    return HourBand(low_deg=low, high_deg=low + HOUR_BAND_HEIGHT_DEG,
                    hours=tuple(h for h, _ in kept), azimuth_deg=tuple(x for _, x in kept))


__all__ = ["ARC_GROUPS", "CENTRE_CANDIDATES_DEG", "HOUR_LABEL_MIN_SEP_DEG", "LABEL_FRACTIONS",
           "DateArc", "HourBand", "arc_label_candidates", "arc_label_index", "chart_centre_deg",
           "chart_x", "date_arcs", "edge_cost", "hour_band", "lead_chart", "polar_xy",
           "skyline_peaks"]
