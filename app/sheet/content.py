"""The sheet's words: how each engine figure is written on paper.

Formatting only: every number comes from
:class:`tiltyard.engine.exports.SheetFigures` (the study's JSON document) and
is rounded here for reading.
"""

from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass, field

from ..study_model import (
    MONTH_ABBR,
    TABLE_NAMES,
    _whole_month,
    compass,
    day_words,
    degree_text,
    schedule_words,
)

#: Paper sizes in points (ISO 216 A4 is 210 x 297 mm; US Letter 8.5 x 11 in).
PAPERS = {"a4": ("A4", 595.0, 842.0), "letter": ("US Letter", 612.0, 792.0)}

BASIS_WORDS = {"clock": "local clock time (with daylight saving)",
               "standard": "local standard time", "solar": "apparent solar time"}

OBJECTIVE_WORDS = {"annual": "the annual total", "worst-month": "the weakest month",
                   "months": "the chosen months"}

SCOPE = ("Scope: where the sun goes over this site and what its horizon hides; how much "
         "sunlight reaches panels at the tilts and tilt schedules compared, on the sky basis "
         "stated under Assumptions. For discussing the site before any design work.")


@dataclass(frozen=True)
class SheetMeta:
    """Who prepared the sheet and when, and how its times are shown."""

    preparer: str = ""
    organisation: str = ""
    prepared: _dt.date = field(default_factory=_dt.date.today)
    time_basis: str = "clock"

    def __post_init__(self):
        if self.time_basis not in BASIS_WORDS:
            raise ValueError(f"time_basis = {self.time_basis!r}: must be one of "
                             f"{', '.join(BASIS_WORDS)}")


def kwh(v) -> str:
    """kWh/m² to the unit (annual and monthly irradiation)."""
    return "–" if v is None else f"{float(v):.0f}"


def pct(v, signed: bool = True) -> str:
    """A percentage to a tenth, signed; an en dash for None."""
    if v is None:
        return "–"
    v = float(v)
    if abs(v) < 0.05:
        return "0.0"
    return f"{v:+.1f}" if signed else f"{v:.1f}"


def coordinates(site) -> str:
    lat, lon = site.latitude_deg, site.longitude_deg
    return (f"{abs(lat):.4f}° {'N' if lat >= 0 else 'S'}, "
            f"{abs(lon):.4f}° {'E' if lon >= 0 else 'W'}")


def location_line(site) -> str:
    return (f"{coordinates(site)} · elevation {site.elevation_m:.0f} m · time zone "
            f"{site.timezone}")


def long_date(d: _dt.date) -> str:
    return f"{d.day} {d.strftime('%B')} {d.year}"


def prepared_line(meta: SheetMeta) -> str:
    who = ", ".join(x for x in (meta.preparer.strip(), meta.organisation.strip()) if x)
    return f"Prepared {long_date(meta.prepared)}" + (f" by {who}" if who else "")


def option_name(opt) -> str:
    """Short name of an option (a site plane keeps its own label)."""
    return TABLE_NAMES.get(opt.kind, opt.label)


def _tilt(v: float) -> str:
    return f"{v:.0f}°" if abs(v - round(v)) < 0.05 else f"{v:.1f}°"


def schedule_sentence(opt, year: int) -> str:
    """A schedule in words: ``"30° from 1 Oct to 31 Mar, 10° from 1 Apr to 30 Sep;
    facing 180° (S)"``; whole calendar months as ``"Jan 62°, Feb 55°, …"``."""
    if opt.kind == "two-axis" or len(opt.schedule) == 1:
        return schedule_words(opt, year)
    if all(_whole_month(p, year) is not None for p in opt.schedule):
        return schedule_words(opt, year)
    az = opt.schedule[0].azimuth_deg
    parts = [f"{_tilt(p.tilt_deg)} from {day_words(p.start, year)} to {day_words(p.end, year)}"
             for p in opt.schedule]
    return ", ".join(parts) + f"; facing {az:.0f}° ({compass(az)})"


def objective_words(opts) -> str:
    if opts.objective == "months":
        return "the total of " + ", ".join(MONTH_ABBR[int(m) - 1] for m in opts.months)
    return OBJECTIVE_WORDS[opts.objective]


__all__ = ["BASIS_WORDS", "PAPERS", "SCOPE", "SheetMeta", "coordinates", "degree_text",
           "kwh", "location_line", "long_date", "objective_words", "option_name", "pct",
           "prepared_line", "schedule_sentence"]
