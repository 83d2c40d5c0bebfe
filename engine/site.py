"""The site model: one place, its horizon, obstacles and candidate planes.

A :class:`Site` is a frozen dataclass validated on construction. Every
validation failure raises :class:`SiteError`, which names the field, the value
and the allowed range, so the app can show the message next to the field and
the command line can print it as one line. Typed coordinates
(:func:`parse_coordinate`) and the albedo presets live here too.

Site files (JSON) are read and written by :mod:`tiltyard.engine.site_file`;
the bundled demo sites are found by :mod:`tiltyard.engine.demo_sites`.
"""

from __future__ import annotations

import math
import numbers
import os
import re
from dataclasses import dataclass, field, replace
from typing import Any
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

from . import site_limits as _limits
from .choices import MOUNTINGS as MOUNTINGS
from .words import figure

#: Who a sheet is prepared for: the site's optional ``prepared_for`` object (format 2; a
#: reader that does not know it ignores it, and it decides no figure).
CLIENT_FIELDS = ("client", "address", "reference")
#: The site-file keys of :data:`CLIENT_FIELDS` (left out of the inputs digest).
CLIENT_KEYS = ("prepared_for",)
#: Longest client, address or reference, characters.
CLIENT_FIELD_MAX = 300


class SiteError(ValueError):
    """A site value or site file is not acceptable.

    Attributes
    ----------
    field : str
        Dotted path of the offending field (``"obstacles[1].distance_m"``).
    value : object
        The value that was refused.
    reason : str
        What is wrong and what is allowed.
    file : str or None
        The file being read, if any.
    """

    def __init__(self, field: str, value: Any, reason: str, file: str | None = None):
        self.field = field
        self.value = value
        self.reason = reason
        self.file = file
        super().__init__(self._text())

    def __reduce__(self):
        # picklable with its fields (the app runs engine calls in worker processes)
        return (type(self), (self.field, self.value, self.reason, self.file))

    def _text(self) -> str:
        where = f"{self.file}: " if self.file else ""
        shown = _short_repr(self.value)
        return f"{where}{self.field} = {shown}: {self.reason}"

    def in_file(self, file: str | os.PathLike) -> SiteError:
        """Return the same error attributed to ``file``."""
        return SiteError(self.field, self.value, self.reason, str(file))


def _short_repr(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _number(field_name: str, value: Any, lo: float | None = None, hi: float | None = None,
            unit: str = "") -> float:
    """Validate one finite number within [lo, hi] and return it as float."""
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise SiteError(field_name, value, "must be a number")
    try:
        value_f = float(value)
    except OverflowError:           # an int too large for a float
        value_f = math.inf
    if not math.isfinite(value_f):
        raise SiteError(field_name, value, "must be a finite number")
    rng = _range_text(lo, hi, unit)
    if lo is not None and value_f < lo:
        raise SiteError(field_name, value, f"must be {rng}")
    if hi is not None and value_f > hi:
        raise SiteError(field_name, value, f"must be {rng}")
    return value_f


def _range_text(lo, hi, unit):
    # degrees follow the number ("360°"); other units after a space ("100 m")
    u = "" if not unit else ("°" if unit in ("°", "deg") else f" {unit}")
    # thousands separated as every figure is (words.figure: "100,000 m")
    if lo is not None and hi is not None:
        return f"between {figure(lo)} and {figure(hi)}{u}"
    if lo is not None:
        return f"at least {figure(lo)}{u}"
    return f"at most {figure(hi)}{u}"


def _first_dark_daylight_month(latitude_deg: float, ghi_kwh_m2_day) -> int | None:
    """:func:`tiltyard.engine.monthly.first_dark_daylight_month`, loaded (with numpy)
    only when a month has no irradiation at all: a site opens before numpy loads."""
    if all(v > 0.0 for v in ghi_kwh_m2_day):
        return None
    from .monthly import first_dark_daylight_month
    return first_dark_daylight_month(latitude_deg, ghi_kwh_m2_day)


def _text(field_name: str, value: Any, limit: int) -> str:
    """Validate a text field: a str of at most ``limit`` characters, storable as UTF-8."""
    if not isinstance(value, str):
        raise SiteError(field_name, value, "must be text")
    if len(value) > limit:
        raise SiteError(field_name, value, f"must be at most {limit} characters")
    bad = _limits.check_text(value)
    if bad:
        raise SiteError(field_name, value, bad)
    return value


def _twelve(field_name: str, values: Any, lo: float, hi: float, unit: str = "") -> tuple:
    if not isinstance(values, (list, tuple)) or len(values) != 12:
        raise SiteError(field_name, values, "must be a list of 12 monthly values, January first")
    return tuple(_number(f"{field_name}[{i}]", v, lo, hi, unit) for i, v in enumerate(values))


@dataclass(frozen=True)
class Obstacle:
    """A nearby obstacle measured on site (tree, building, mast).

    ``height_m`` is the obstacle's height above the panels, ``distance_m`` the
    horizontal distance from the panels, ``bearing_deg`` the direction of its
    centre (clockwise from true north) and ``width_deg`` its angular width as
    seen from the panels.
    """

    label: str
    bearing_deg: float
    width_deg: float
    distance_m: float
    height_m: float

    def __post_init__(self):
        object.__setattr__(self, "bearing_deg",
                           _number("bearing_deg", self.bearing_deg, 0, 360, "deg") % 360.0)
        object.__setattr__(self, "width_deg", _number("width_deg", self.width_deg, 0.1, 180, "deg"))
        object.__setattr__(self, "distance_m",
                           _number("distance_m", self.distance_m, 0.1, 100000, "m"))
        object.__setattr__(self, "height_m", _number("height_m", self.height_m, 0, 10000, "m"))

    @classmethod
    def from_bearing_range(cls, label: str, start_deg: float, end_deg: float,
                           distance_m: float, height_m: float) -> Obstacle:
        """Build an obstacle from the bearings of its left and right edges.

        The obstacle spans clockwise from ``start_deg`` to ``end_deg`` (so
        350 -> 10 is a 20° obstacle across north).
        """
        start = _number("bearing_start_deg", start_deg, 0, 360, "deg")
        end = _number("bearing_end_deg", end_deg, 0, 360, "deg")
        width = (end - start) % 360.0
        if width == 0:
            raise SiteError("bearing_end_deg", end_deg, "must differ from the start bearing")
        return cls(label, (start + width / 2.0) % 360.0, width, distance_m, height_m)

    @property
    def elevation_deg(self) -> float:
        """Elevation angle of the obstacle's top seen from the panels, degrees."""
        return math.degrees(math.atan2(self.height_m, self.distance_m))


@dataclass(frozen=True)
class Plane:
    """A candidate or existing panel plane.

    ``mounting`` is how panels on it are held (one of :data:`MOUNTINGS`); a
    site's own planes are roof planes with the panels ``flush`` on them unless
    the file says otherwise.
    """

    label: str
    tilt_deg: float
    azimuth_deg: float
    mounting: str = "flush"

    def __post_init__(self):
        object.__setattr__(self, "tilt_deg", _number("tilt_deg", self.tilt_deg, 0, 90, "deg"))
        object.__setattr__(self, "azimuth_deg",
                           _number("azimuth_deg", self.azimuth_deg, 0, 360, "deg") % 360.0)
        if self.mounting not in MOUNTINGS:
            raise SiteError("mounting", self.mounting, "must be one of " + ", ".join(MOUNTINGS))


@dataclass(frozen=True)
class HorizonProfile:
    """Horizon elevation against azimuth, azimuth clockwise from true north.

    Azimuths are stored sorted in [0, 360); interpolation wraps around north.
    Elevations may be negative (a site on high ground sees below the
    horizontal). An empty profile is a flat horizon at 0°.
    """

    azimuth_deg: tuple = ()
    elevation_deg: tuple = ()

    def __post_init__(self):
        az, el = self.azimuth_deg, self.elevation_deg
        if not isinstance(az, (list, tuple)) or not isinstance(el, (list, tuple)):
            raise SiteError("horizon", (az, el), "azimuth_deg and elevation_deg must be lists")
        if len(az) != len(el):
            raise SiteError("horizon.elevation_deg", el,
                            f"must have as many values as azimuth_deg ({len(az)})")
        azs = [_number(f"horizon.azimuth_deg[{i}]", a, 0, 360, "deg") % 360.0
               for i, a in enumerate(az)]
        els = [_number(f"horizon.elevation_deg[{i}]", e, -30, 90, "deg") for i, e in enumerate(el)]
        if len(set(azs)) != len(azs):
            raise SiteError("horizon.azimuth_deg", az, "azimuths must be distinct (0 and 360 are "
                            "the same direction)")
        pairs = sorted(zip(azs, els, strict=True))
        object.__setattr__(self, "azimuth_deg", tuple(p[0] for p in pairs))
        object.__setattr__(self, "elevation_deg", tuple(p[1] for p in pairs))

    @property
    def is_empty(self) -> bool:
        return len(self.azimuth_deg) == 0


@dataclass(frozen=True)
class Site:
    """One site: location, time zone, ground, horizon, obstacles and planes.

    Construction validates every field and raises :class:`SiteError` naming
    the field, the value and the allowed range.
    """

    name: str
    latitude_deg: float
    longitude_deg: float
    elevation_m: float = 0.0
    timezone: str = "UTC"
    albedo: float | tuple = 0.2
    horizon: HorizonProfile = field(default_factory=HorizonProfile)
    obstacles: tuple = ()
    planes: tuple = ()
    linke_turbidity: tuple | None = None
    monthly_ghi_kwh_m2_day: tuple | None = None
    notes: str = ""
    client: str = ""
    address: str = ""
    reference: str = ""

    def __post_init__(self):
        if not isinstance(self.name, str) or not self.name.strip():
            raise SiteError("name", self.name, "must be a non-empty text")
        _text("name", self.name, 200)
        object.__setattr__(self, "latitude_deg",
                           _number("latitude_deg", self.latitude_deg, -90, 90, "deg"))
        object.__setattr__(self, "longitude_deg",
                           _number("longitude_deg", self.longitude_deg, -180, 180, "deg"))
        object.__setattr__(self, "elevation_m",
                           _number("elevation_m", self.elevation_m, -500, 9000, "m"))
        if not isinstance(self.timezone, str) or not self.timezone:
            raise SiteError("timezone", self.timezone, "must be an IANA time zone name")
        try:
            ZoneInfo(self.timezone)
        except (ZoneInfoNotFoundError, ValueError, OSError):   # OSError: "America" is a folder
            raise SiteError("timezone", self.timezone,
                            "is not a known IANA time zone (for example 'Europe/London')") from None
        if isinstance(self.albedo, (list, tuple)):
            object.__setattr__(self, "albedo", _twelve("albedo", self.albedo, 0, 1))
        else:
            object.__setattr__(self, "albedo", _number("albedo", self.albedo, 0, 1))
        if isinstance(self.horizon, dict):
            object.__setattr__(self, "horizon", HorizonProfile(
                tuple(self.horizon.get("azimuth_deg", ())),
                tuple(self.horizon.get("elevation_deg", ()))))
        elif not isinstance(self.horizon, HorizonProfile):
            raise SiteError("horizon", self.horizon, "must be a horizon profile")
        object.__setattr__(self, "obstacles", tuple(self.obstacles))
        object.__setattr__(self, "planes", tuple(self.planes))
        for i, ob in enumerate(self.obstacles):
            if not isinstance(ob, Obstacle):
                raise SiteError(f"obstacles[{i}]", ob, "must be an obstacle")
        for i, pl in enumerate(self.planes):
            if not isinstance(pl, Plane):
                raise SiteError(f"planes[{i}]", pl, "must be a plane")
        if self.linke_turbidity is not None:
            object.__setattr__(self, "linke_turbidity",
                               _twelve("linke_turbidity", self.linke_turbidity, 1, 10))
        if self.monthly_ghi_kwh_m2_day is not None:
            object.__setattr__(self, "monthly_ghi_kwh_m2_day",
                               _twelve("monthly_ghi_kwh_m2_day", self.monthly_ghi_kwh_m2_day,
                                       0, 12, "kWh/m2/day"))
            i = _first_dark_daylight_month(self.latitude_deg, self.monthly_ghi_kwh_m2_day)
            if i is not None:     # decided once, here, for every sky basis and command
                raise SiteError(f"monthly_ghi_kwh_m2_day[{i}]", self.monthly_ghi_kwh_m2_day[i],
                                "must be more than 0 in a month with daylight (every month "
                                "but those of polar night)")
        _text("notes", self.notes, _limits.MAX_NOTES_CHARS)
        for what, items, limit in (("horizon.azimuth_deg", self.horizon.azimuth_deg,
                                    _limits.MAX_HORIZON_POINTS),
                                   ("obstacles", self.obstacles, _limits.MAX_OBSTACLES),
                                   ("planes", self.planes, _limits.MAX_PLANES)):
            if len(items) > limit:
                raise SiteError(what, f"{len(items)} items", f"may hold at most {limit}")
        for key in CLIENT_FIELDS:
            value = getattr(self, key)
            if not isinstance(value, str):
                raise SiteError(f"prepared_for.{key}", value, "must be text")
            if len(value) > CLIENT_FIELD_MAX:
                raise SiteError(f"prepared_for.{key}", value,
                                f"must be at most {CLIENT_FIELD_MAX} characters")

    # -- conveniences -------------------------------------------------------
    @property
    def hemisphere(self) -> str:
        """``"north"`` or ``"south"`` (the equator counts as north)."""
        return "south" if self.latitude_deg < 0 else "north"

    @property
    def equator_azimuth_deg(self) -> float:
        """Azimuth of the direction facing the equator: 180 in the north, 0 in the south."""
        return 0.0 if self.latitude_deg < 0 else 180.0

    def albedo_by_month(self) -> tuple:
        """Albedo for each month, January first (12 values)."""
        if isinstance(self.albedo, tuple):
            return self.albedo
        return (self.albedo,) * 12

    def with_changes(self, **changes) -> Site:
        """Return a validated copy with some fields changed."""
        return replace(self, **changes)


# -- typed coordinates --------------------------------------------------------
_DMS_RE = re.compile(
    r"""^\s*(?P<h1>[NSEW])?\s*
        (?P<deg>[+-]?\d+(?:[.,]\d+)?)\s*(?:°|deg|d|\s)?\s*
        (?:(?P<min>\d+(?:[.,]\d+)?)\s*(?:'|′|m|min|\s)?\s*)?
        (?:(?P<sec>\d+(?:[.,]\d+)?)\s*(?:"|″|''|s|sec)?\s*)?
        (?P<h2>[NSEW])?\s*$""",
    re.IGNORECASE | re.VERBOSE,
)

#: Ground albedo presets shown by the app, from pvlib's table of surface
#: albedos (pvlib.albedo.SURFACE_ALBEDOS, which cites Marion (2021) and
#: Myers (2013)); the value is always shown next to the name.
ALBEDO_PRESETS = {
    "grass": 0.20,
    "fresh grass": 0.26,
    "concrete": 0.30,
    "asphalt": 0.12,
    "soil": 0.17,
    "sand": 0.40,
    "snow": 0.65,
    "fresh snow": 0.75,
}


def parse_coordinate(text: str, axis: str) -> float:
    """Parse a typed latitude or longitude into signed decimal degrees.

    Accepts decimal degrees (``53.71``, ``-2.48``, ``53,71``) and degrees,
    minutes and seconds with a hemisphere letter before or after
    (``53°42'36"N``, ``N 53 42 36``, ``2 28.8 W``, ``2d28m48sW``); "º" and "˚"
    count as the degree sign.

    Parameters
    ----------
    text : str
        What the user typed.
    axis : {"latitude", "longitude"}
        Which coordinate; decides the allowed letters (N/S or E/W) and range
        (±90 or ±180 degrees).

    Returns
    -------
    float
        Degrees, north and east positive.

    Raises
    ------
    SiteError
        Naming ``latitude_deg`` or ``longitude_deg``, the text and the
        accepted forms or range.

    Notes
    -----
    Sexagesimal notation: 1° = 60′ = 3600″ (common practice, no source).
    """
    if axis not in ("latitude", "longitude"):
        raise ValueError(f"axis must be 'latitude' or 'longitude', not {axis!r}")
    field_name = f"{axis}_deg"
    letters, limit = ("NS", 90.0) if axis == "latitude" else ("EW", 180.0)
    # the masculine ordinal "º" and the ring "˚" look like a degree sign and are
    # what many keyboards and phones give for one
    text = (text or "").replace("º", "°").replace("˚", "°")
    m = _DMS_RE.match(text)
    if not m or (m.group("h1") and m.group("h2")):
        raise SiteError(field_name, text, "is not a coordinate; type decimal degrees "
                        f"(e.g. {'53.71' if axis == 'latitude' else '-2.48'}) or degrees "
                        f"minutes seconds with {letters[0]}/{letters[1]}")
    hemi = (m.group("h1") or m.group("h2") or "").upper()
    if hemi and hemi not in letters:
        raise SiteError(field_name, text, f"uses '{hemi}'; a {axis} takes {letters[0]} or "
                        f"{letters[1]}")
    deg = float(m.group("deg").replace(",", "."))
    minutes = float((m.group("min") or "0").replace(",", "."))
    seconds = float((m.group("sec") or "0").replace(",", "."))
    if minutes >= 60 or seconds >= 60:
        raise SiteError(field_name, text, "minutes and seconds must be below 60")
    if (m.group("min") or m.group("sec")) and m.group("deg").strip().lstrip("+-") != \
            m.group("deg").strip().lstrip("+-").split(".")[0]:
        raise SiteError(field_name, text, "decimal degrees cannot be followed by minutes")
    sign = -1.0 if deg < 0 or m.group("deg").startswith("-") else 1.0
    value = abs(deg) + minutes / 60.0 + seconds / 3600.0
    if hemi:
        if sign < 0:
            raise SiteError(field_name, text, "use either a minus sign or a hemisphere letter")
        sign = -1.0 if hemi in "SW" else 1.0
    value *= sign
    if not -limit <= value <= limit:
        raise SiteError(field_name, text, f"must be between -{limit:g}° and {limit:g}°")
    return value
