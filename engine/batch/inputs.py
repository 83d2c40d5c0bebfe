"""A portfolio's sites: a CSV of sites, a folder of site files or a GeoJSON FeatureCollection
of points, read into one :class:`~tiltyard.engine.assessment.Assessment` per row.

A row that cannot be a site is a :class:`RowError` (its line, the column or property in the
user's words, the value and the reason), in the words the site file's checks use
(:class:`tiltyard.engine.site.SiteError`): the site is built by
:func:`tiltyard.engine.site.site_from_dict`, so a bad latitude in a CSV row and in a site file
give the same reason. An input that cannot be read at all is a :class:`PortfolioError`.

CSV columns (a header row; names as in the site file, units in the name):

``name``, ``latitude_deg``, ``longitude_deg`` (required); ``id``, ``elevation_m``,
``timezone`` (an IANA name; when empty it is looked up from the coordinates), ``albedo``,
``ghi_jan_kwh_m2_day`` ... ``ghi_dec_kwh_m2_day`` (monthly mean daily GHI, all twelve or none),
``plane1_label``, ``plane1_tilt_deg``, ``plane1_azimuth_deg``, ``plane1_mounting`` (and
``plane2_...`` for more planes), ``client``, ``address``, ``reference``.

A GeoJSON feature is a Point (``[longitude, latitude]`` or with the elevation third) whose
properties take the same names; ``monthly_ghi_kwh_m2_day`` (a list of twelve) and ``planes``
(a list of plane objects, as in a site file) are taken too.
"""

from __future__ import annotations

import csv
import json
import math
import re
from dataclasses import dataclass, field
from pathlib import Path

from ..assessment import Assessment, load_assessment
from ..site import SiteError
from ..site_file import FORMAT_NAME, FORMAT_VERSION, site_from_dict
from ..words import MONTH_ABBR

#: Months as the monthly GHI columns name them.
_MONTH_KEYS = tuple(m.lower() for m in MONTH_ABBR)
GHI_COLUMNS = tuple(f"ghi_{m}_kwh_m2_day" for m in _MONTH_KEYS)
REQUIRED_COLUMNS = ("name", "latitude_deg", "longitude_deg")
SITE_COLUMNS = ("id", "name", "latitude_deg", "longitude_deg", "elevation_m", "timezone",
                "albedo", "client", "address", "reference") + GHI_COLUMNS
PLANE_FIELDS = ("label", "tilt_deg", "azimuth_deg", "mounting")
_PLANE_RE = re.compile(r"^plane([1-9][0-9]?)_(label|tilt_deg|azimuth_deg|mounting)$")
#: Numeric columns: a text that reads as a number is passed on as one.
_NUMERIC = {"latitude_deg", "longitude_deg", "elevation_m", "albedo", "tilt_deg",
            "azimuth_deg"} | set(GHI_COLUMNS)
#: Largest portfolio input read, bytes (a CSV of 100,000 sites is about 30 MB).
MAX_INPUT_BYTES = 200 * 1024 * 1024


class PortfolioError(ValueError):
    """The input cannot be read as a portfolio; the message names the file and why."""


@dataclass(frozen=True)
class RowError:
    """One row that is not a site: where, which column, the value and why.

    ``line`` is the CSV line (the header is line 1), the GeoJSON feature's number (from 1)
    or the site file's number in the folder (from 1, in name order); ``source`` names the
    file (and the feature).
    """

    line: int
    source: str
    field: str
    value: str
    reason: str

    def to_dict(self) -> dict:
        return {"line": self.line, "source": self.source, "field": self.field,
                "value": self.value, "reason": self.reason}


@dataclass(frozen=True)
class BatchRow:
    """One site of the portfolio: where it came from, its key columns and its assessment."""

    line: int
    source: str
    key: dict
    assessment: Assessment
    notes: tuple = ()


@dataclass(frozen=True)
class Portfolio:
    """The readable rows of an input, and the rows that are not sites."""

    path: str
    kind: str
    rows: tuple
    errors: tuple = ()
    max_planes: int = 0
    has_id: bool = False

    @property
    def count(self) -> int:
        return len(self.rows) + len(self.errors)


@dataclass
class _Reader:
    """Builds rows and errors from plain dicts in the site file's shape."""

    path: Path
    rows: list = field(default_factory=list)
    errors: list = field(default_factory=list)

    def error(self, line, source, column, value, reason):
        shown = "" if value is None else (value if isinstance(value, str) else repr(value))
        self.errors.append(RowError(line, source, column, shown, reason))

    def add(self, line: int, source: str, d: dict, column_of, key_id, raw=None):
        notes = ()
        tz = d.get("timezone")
        if tz is None or (isinstance(tz, str) and not tz.strip()):
            tz, notes = _looked_up_zone(d)
            if tz is None:
                if notes:
                    self.error(line, source, column_of("timezone"), "", notes[0])
                    return
                tz = "UTC"      # the coordinates are refused first, in the site's words
            d["timezone"] = tz
        try:
            site = site_from_dict(d)
            a = Assessment(site)
        except SiteError as err:
            column = column_of(err.field)
            shown = (raw or {}).get(column)            # the cell as typed
            self.error(line, source, column, err.value if shown is None else shown,
                       err.reason)
            return
        self.rows.append(BatchRow(line, source, _key(key_id, site), a, notes))


def _key(key_id, site) -> dict:
    return {"id": "" if key_id is None else str(key_id), "name": site.name,
            "latitude_deg": site.latitude_deg, "longitude_deg": site.longitude_deg,
            "elevation_m": site.elevation_m, "timezone": site.timezone}


def _looked_up_zone(d: dict) -> tuple:
    """(zone, notes) from the coordinates; (None, (reason,)) at sea; (None, ()) when the
    coordinates themselves are not usable (the site's checks then say why)."""
    lat, lon = d.get("latitude_deg"), d.get("longitude_deg")
    if not all(isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v)
               for v in (lat, lon)) or not (-90 <= lat <= 90 and -180 <= lon <= 180):
        return None, ()
    from ..zones import timezone_at

    zone = timezone_at(lat, lon)
    if zone is None:
        return None, ("is empty and no time zone is known at these coordinates (at sea?); "
                      "give an IANA time zone name, for example 'Europe/London'",)
    return zone, (f"time zone {zone} looked up from the coordinates",)


def _value(column: str, text):
    """A cell's value: None when empty, a float when the column is numeric and the text
    reads as a number, else the text as given (the site's checks refuse it in their words)."""
    if text is None:
        return None
    if not isinstance(text, str):
        return text
    text = text.strip()
    if text == "":
        return None
    base = column.split("_", 1)[1] if _PLANE_RE.match(column) else column
    if base in _NUMERIC:
        try:
            return float(text)
        except ValueError:
            return text
    return text


def _site_dict(values: dict) -> dict:
    """A site file's dict from flat columns (plane columns gathered into ``planes``)."""
    d = {"format": FORMAT_NAME, "format_version": FORMAT_VERSION}
    for k in ("name", "latitude_deg", "longitude_deg", "elevation_m", "timezone", "albedo"):
        if values.get(k) is not None:
            d[k] = values[k]
    ghi = [values.get(c) for c in GHI_COLUMNS]
    if any(v is not None for v in ghi):
        d["monthly_ghi_kwh_m2_day"] = ghi
    if isinstance(values.get("monthly_ghi_kwh_m2_day"), list):
        d["monthly_ghi_kwh_m2_day"] = values["monthly_ghi_kwh_m2_day"]
    planes = {}
    for k, v in values.items():
        m = _PLANE_RE.match(k)
        if m and v is not None:
            planes.setdefault(int(m.group(1)), {})[m.group(2)] = v
    if planes:
        d["planes"] = [planes[n] for n in sorted(planes)]
    if isinstance(values.get("planes"), list):
        d["planes"] = values["planes"]
    client = {k: values[k] for k in ("client", "address", "reference")
              if values.get(k) is not None}
    if client:
        d["prepared_for"] = client
    return d


def _column_of_field(site_field: str, plane_numbers: list, prefix: str = "") -> str:
    """The CSV column (or GeoJSON property) a site field came from."""
    m = re.match(r"^monthly_ghi_kwh_m2_day\[(\d+)\]$", site_field)
    if m and not prefix:
        return GHI_COLUMNS[int(m.group(1))]
    m = re.match(r"^planes\[(\d+)\]\.?(.*)$", site_field)
    if m and not prefix and int(m.group(1)) < len(plane_numbers):
        n = plane_numbers[int(m.group(1))]
        return f"plane{n}_{m.group(2) or 'tilt_deg'}"
    if site_field.startswith("prepared_for."):
        return prefix + site_field.split(".", 1)[1]
    return prefix + site_field


# -- CSV -----------------------------------------------------------------------------------------

def _check_header(path: Path, header: list) -> tuple:
    if not header or all(not h.strip() for h in header):
        raise PortfolioError(f"{path}: no header row; the first line must name the columns "
                             f"({', '.join(REQUIRED_COLUMNS)}, ...)")
    names = [h.strip() for h in header]
    seen = set()
    for n in names:
        if n in seen:
            raise PortfolioError(f"{path}: column {n!r} is given twice")
        seen.add(n)
        if n not in SITE_COLUMNS and not _PLANE_RE.match(n):
            raise PortfolioError(f"{path}: column {n!r} is not one Tiltyard knows; columns: "
                                 f"{', '.join(SITE_COLUMNS[:7])}, ghi_jan_kwh_m2_day ... "
                                 "ghi_dec_kwh_m2_day, planeN_label, planeN_tilt_deg, "
                                 "planeN_azimuth_deg, planeN_mounting, client, address, "
                                 "reference")
    missing = [c for c in REQUIRED_COLUMNS if c not in seen]
    if missing:
        raise PortfolioError(f"{path}: column {missing[0]!r} is required (a header row "
                             f"naming {', '.join(REQUIRED_COLUMNS)}, ...)")
    ghi = [c for c in GHI_COLUMNS if c in seen]
    if ghi and len(ghi) != 12:
        absent = next(c for c in GHI_COLUMNS if c not in seen)
        raise PortfolioError(f"{path}: column {absent!r} is missing; give all twelve monthly "
                             "GHI columns or none")
    planes = sorted({int(_PLANE_RE.match(n).group(1)) for n in names if _PLANE_RE.match(n)})
    return names, planes


def read_csv(path: Path) -> Portfolio:
    """Read a CSV of sites (UTF-8, a header row, comma separated)."""
    reader_out = _Reader(path)
    try:
        with open(path, encoding="utf-8-sig", newline="") as fh:
            rows = csv.reader(fh)
            header = next(rows, None)
            names, planes = _check_header(path, header or [])
            width = len(names)
            line = rows.line_num + 1
            for cells in rows:
                start, line = line, rows.line_num + 1
                if not cells or all(not c.strip() for c in cells):
                    continue
                if len(cells) > width:
                    reader_out.error(start, path.name, "(row)", f"{len(cells)} cells",
                                     f"has more cells than the header's {width} columns")
                    continue
                values = {n: _value(n, cells[i] if i < len(cells) else None)
                          for i, n in enumerate(names)}
                raw = {n: cells[i].strip() for i, n in enumerate(names) if i < len(cells)}
                reader_out.add(start, path.name, _site_dict(values),
                               lambda f, planes=planes: _column_of_field(f, planes),
                               values.get("id"), raw)
    except UnicodeDecodeError as err:
        raise PortfolioError(f"{path}: not UTF-8 text ({err.reason} at byte {err.start}); "
                             "save the CSV as UTF-8") from None
    except csv.Error as err:
        raise PortfolioError(f"{path}: not a readable CSV file ({err})") from None
    return Portfolio(str(path), "csv", tuple(reader_out.rows), tuple(reader_out.errors),
                     max(planes, default=0), "id" in names)


# -- GeoJSON -------------------------------------------------------------------------------------

def read_geojson(path: Path) -> Portfolio:
    """Read a GeoJSON FeatureCollection of Point features with site properties."""
    try:
        doc = json.loads(path.read_text(encoding="utf-8-sig"))
    except UnicodeDecodeError:
        raise PortfolioError(f"{path}: not UTF-8 text") from None
    except json.JSONDecodeError as err:
        raise PortfolioError(f"{path}: not valid JSON (line {err.lineno}, column {err.colno}: "
                             f"{err.msg})") from None
    if not isinstance(doc, dict) or doc.get("type") != "FeatureCollection" \
            or not isinstance(doc.get("features"), list):
        raise PortfolioError(f"{path}: not a GeoJSON FeatureCollection (an object with "
                             "\"type\": \"FeatureCollection\" and a list of \"features\")")
    out = _Reader(path)
    max_planes, has_id = 0, False
    for i, feat in enumerate(doc["features"]):
        source, n = f"{path.name} feature {i + 1}", i + 1
        geom = feat.get("geometry") if isinstance(feat, dict) else None
        props = feat.get("properties") if isinstance(feat, dict) else None
        coords = geom.get("coordinates") if isinstance(geom, dict) else None
        if not isinstance(geom, dict) or geom.get("type") != "Point" \
                or not isinstance(coords, list) or len(coords) not in (2, 3):
            out.error(n, source, "geometry", None, "must be a Point with [longitude, "
                                                   "latitude] or [longitude, latitude, elevation]")
            continue
        if props is None:
            props = {}
        if not isinstance(props, dict):
            out.error(n, source, "properties", None, "must be an object")
            continue
        unknown = [k for k in props if k not in SITE_COLUMNS and not _PLANE_RE.match(k)
                   and k not in ("monthly_ghi_kwh_m2_day", "planes", "latitude_deg",
                                 "longitude_deg")]
        if unknown:
            out.error(n, source, f"properties.{unknown[0]}", props[unknown[0]],
                      "is not a property Tiltyard knows")
            continue
        values = {k: _value(k, v) for k, v in props.items()}
        values["longitude_deg"], values["latitude_deg"] = coords[0], coords[1]
        if len(coords) == 3 and values.get("elevation_m") is None:
            values["elevation_m"] = coords[2]
        planes = sorted({int(_PLANE_RE.match(k).group(1)) for k in values
                         if _PLANE_RE.match(k)})
        max_planes = max(max_planes, len(planes), len(values.get("planes") or []))
        has_id = has_id or values.get("id") is not None

        def column_of(f, planes=planes):
            if f in ("latitude_deg", "longitude_deg"):
                return "geometry.coordinates"
            col = _column_of_field(f, planes)
            return f"properties.{col}"
        out.add(n, source, _site_dict(values), column_of, values.get("id"))
    return Portfolio(str(path), "geojson", tuple(out.rows), tuple(out.errors), max_planes,
                     has_id)


# -- a folder of site files ---------------------------------------------------------------------

def read_folder(path: Path) -> Portfolio:
    """Read every site file (``*.json``) of a folder, in name order (not its subfolders).

    Each file keeps its own saved settings (its ``assessment`` section); the batch's flags
    apply on top, as on ``tiltyard study``.
    """
    files = sorted(p for p in path.iterdir() if p.suffix.lower() == ".json" and p.is_file())
    if not files:
        raise PortfolioError(f"{path}: the folder holds no site files (*.json)")
    rows, errors, max_planes = [], [], 0
    for i, f in enumerate(files):
        try:
            a = load_assessment(f)
        except SiteError as err:
            errors.append(RowError(i + 1, f.name, err.field, _shown(err.value), err.reason))
            continue
        max_planes = max(max_planes, len(a.site.planes))
        rows.append(BatchRow(i + 1, f.name, _key(f.stem, a.site), a))
    return Portfolio(str(path), "folder", tuple(rows), tuple(errors), max_planes, True)


def _shown(value) -> str:
    return "" if value is None else (value if isinstance(value, str) else repr(value))


def read_portfolio(path) -> Portfolio:
    """Read a portfolio: a ``.csv`` file, a ``.geojson`` (or ``.json`` FeatureCollection)
    file, or a folder of site files.

    Raises
    ------
    PortfolioError
        The input cannot be read (missing, of another kind, no header, an unknown or
        missing column); the message names the file.
    """
    p = Path(path)
    if p.is_dir():
        return read_folder(p)
    if not p.exists():
        raise PortfolioError(f"{p}: no such file or folder")
    try:
        size = p.stat().st_size
    except OSError as err:
        raise PortfolioError(f"{p}: cannot be read ({err.strerror or err})") from None
    if size > MAX_INPUT_BYTES:
        raise PortfolioError(f"{p}: is {size / 1e6:.0f} MB; a portfolio may be at most "
                             f"{MAX_INPUT_BYTES / 1e6:.0f} MB: split it")
    suffix = p.suffix.lower()
    try:
        if suffix == ".csv":
            return read_csv(p)
        if suffix in (".geojson", ".json"):
            return read_geojson(p)
    except OSError as err:
        raise PortfolioError(f"{p}: cannot be read ({err.strerror or err})") from None
    raise PortfolioError(f"{p}: not a portfolio; give a .csv file of sites, a .geojson "
                         "FeatureCollection or a folder of site files")


__all__ = ["GHI_COLUMNS", "PLANE_FIELDS", "REQUIRED_COLUMNS", "SITE_COLUMNS", "BatchRow",
           "Portfolio", "PortfolioError", "RowError", "read_csv", "read_folder",
           "read_geojson", "read_portfolio"]
