"""The sheet's words: how each engine figure is written on paper.

Formatting only: every number comes from
:class:`tiltyard.engine.exports.SheetFigures` (the study's JSON document) and
is rounded here for reading; schedules, months, compass points and the other
shared words come from :mod:`tiltyard.engine.words`.
"""

from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass, field

from tiltyard.engine.words import NO_VALUE, TIME_BASIS_WORDS, day_month, number

#: Paper sizes in points (ISO 216 A4 is 210 x 297 mm; US Letter 8.5 x 11 in).
PAPERS = {"a4": ("A4", 595.0, 842.0), "letter": ("US Letter", 612.0, 792.0)}

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
        if self.time_basis not in TIME_BASIS_WORDS:
            raise ValueError(f"time_basis = {self.time_basis!r}: must be one of "
                             f"{', '.join(TIME_BASIS_WORDS)}")


def kwh(v) -> str:
    """kWh/m² to the unit (annual and monthly irradiation)."""
    return number(v)


def pct(v, signed: bool = True) -> str:
    """A percentage to a tenth, signed; an en dash for None."""
    if v is None:
        return NO_VALUE
    v = float(v)
    if abs(v) < 0.05:
        return "0.0"
    return f"{v:+.1f}" if signed else f"{v:.1f}"


def coordinates(site) -> str:
    lat, lon = site.latitude_deg, site.longitude_deg
    return (f"{abs(lat):.4f}° {'N' if lat >= 0 else 'S'}, "
            f"{abs(lon):.4f}° {'E' if lon >= 0 else 'W'}")


def location_line(site) -> str:
    return (f"{coordinates(site)} · elevation {number(site.elevation_m)} m · time zone "
            f"{site.timezone}")


def long_date(d: _dt.date) -> str:
    return f"{day_month(d, full=True)} {d.year}"


def prepared_line(meta: SheetMeta) -> str:
    who = ", ".join(x for x in (meta.preparer.strip(), meta.organisation.strip()) if x)
    return f"Prepared {long_date(meta.prepared)}" + (f" by {who}" if who else "")


__all__ = ["PAPERS", "SCOPE", "SheetMeta", "coordinates", "kwh", "location_line", "long_date",
           "pct", "prepared_line"]
