"""Site files: the JSON structure of a :class:`~tiltyard.engine.site.Site`, read and written.

Site files are JSON (``"format": "tiltyard-site"``); see DESIGN.md. Reading is
hardened (size limit, nesting depth, UTF-8 with or without a BOM, every field
validated by the site model). Saving is atomic: the new content is written to a
temporary file in the same folder, flushed and fsynced, then moved over the old
file with :func:`os.replace` (:mod:`tiltyard.engine.atomic_files`).
"""

from __future__ import annotations

import json
import os
from pathlib import Path

from . import site_limits as _limits
from .atomic_files import write_bytes_atomically
from .site import CLIENT_FIELDS, HorizonProfile, Obstacle, Plane, Site, SiteError, _text

FORMAT_NAME = "tiltyard-site"
#: Version 2 added a plane's ``mounting`` and the ``assessment`` section (sky basis,
#: weather file, models, study settings, mounting; see :mod:`tiltyard.engine.assessment`).
#: Version 1 files load as they are and are written as version 2.
FORMAT_VERSION = 2


def _label(d: dict, default: str) -> str:
    label = d.get("label")
    if label is None:
        label = default
    if isinstance(label, (int, float)) and not isinstance(label, bool):
        label = str(label)
    return _text("label", label, _limits.MAX_LABEL_CHARS)


def _obstacle_from_dict(d: dict, i: int) -> Obstacle:
    prefix = f"obstacles[{i}]"
    if not isinstance(d, dict):
        raise SiteError(prefix, d, "must be an object")
    try:
        label = _label(d, f"obstacle {i + 1}")
        for key in ("distance_m", "height_m"):
            if key not in d:
                raise SiteError(f"{prefix}.{key}", None, "is required")
        if "bearing_start_deg" in d or "bearing_end_deg" in d:
            return Obstacle.from_bearing_range(label, d.get("bearing_start_deg"),
                                               d.get("bearing_end_deg"), d["distance_m"],
                                               d["height_m"])
        for key in ("bearing_deg", "width_deg"):
            if key not in d:
                raise SiteError(f"{prefix}.{key}", None,
                                "is required (or give bearing_start_deg and bearing_end_deg)")
        return Obstacle(label, d["bearing_deg"], d["width_deg"], d["distance_m"], d["height_m"])
    except SiteError as err:
        if err.field.startswith(prefix):
            raise
        raise SiteError(f"{prefix}.{err.field}", err.value, err.reason) from None


def _plane_from_dict(d: dict, i: int) -> Plane:
    prefix = f"planes[{i}]"
    if not isinstance(d, dict):
        raise SiteError(prefix, d, "must be an object")
    for key in ("tilt_deg", "azimuth_deg"):
        if key not in d:
            raise SiteError(f"{prefix}.{key}", None, "is required")
    try:
        return Plane(_label(d, f"plane {i + 1}"), d["tilt_deg"], d["azimuth_deg"],
                     d.get("mounting", "flush"))
    except SiteError as err:
        raise SiteError(f"{prefix}.{err.field}", err.value, err.reason) from None


def site_from_dict(d: dict) -> Site:
    """Build a :class:`Site` from the JSON structure of a site file.

    Raises
    ------
    SiteError
        If the format is not a Tiltyard site, the version is newer than this
        program understands, or any field is invalid.
    """
    if not isinstance(d, dict):
        raise SiteError("(top level)", type(d).__name__, "must be a JSON object")
    fmt = d.get("format")
    if fmt != FORMAT_NAME:
        raise SiteError("format", fmt, f"must be {FORMAT_NAME!r}; this is not a Tiltyard site file")
    version = d.get("format_version")
    if isinstance(version, bool) or not isinstance(version, int) or version < 1:
        raise SiteError("format_version", version, "must be a whole number, 1 or more")
    if version > FORMAT_VERSION:
        raise SiteError("format_version", version,
                        f"is newer than this Tiltyard understands (up to {FORMAT_VERSION}); "
                        "update Tiltyard to open this file")
    for key in ("name", "latitude_deg", "longitude_deg"):
        if key not in d:
            raise SiteError(key, None, "is required")
    horizon = d.get("horizon") or {}
    if not isinstance(horizon, dict):
        raise SiteError("horizon", horizon, "must be an object with azimuth_deg and elevation_deg")
    for key in ("azimuth_deg", "elevation_deg"):
        if horizon.get(key) is not None and not isinstance(horizon[key], list):
            raise SiteError(f"horizon.{key}", horizon[key], "must be a list of numbers in degrees")
    obstacles = d.get("obstacles") or []
    planes = d.get("planes") or []
    if not isinstance(obstacles, list):
        raise SiteError("obstacles", obstacles, "must be a list")
    if not isinstance(planes, list):
        raise SiteError("planes", planes, "must be a list")
    for what, items, limit in (("obstacles", obstacles, _limits.MAX_OBSTACLES),
                               ("planes", planes, _limits.MAX_PLANES),
                               ("horizon.azimuth_deg", horizon.get("azimuth_deg") or [],
                                _limits.MAX_HORIZON_POINTS)):
        if len(items) > limit:
            raise SiteError(what, f"{len(items)} items", f"may hold at most {limit}")
    albedo = d.get("albedo", 0.2)
    if isinstance(albedo, list):
        albedo = tuple(albedo)
    lt = d.get("linke_turbidity")
    ghi = d.get("monthly_ghi_kwh_m2_day")
    return Site(
        name=d["name"],
        latitude_deg=d["latitude_deg"],
        longitude_deg=d["longitude_deg"],
        elevation_m=d.get("elevation_m", 0.0),
        timezone=d.get("timezone", "UTC"),
        albedo=albedo,
        horizon=HorizonProfile(tuple(horizon.get("azimuth_deg", ()) or ()),
                               tuple(horizon.get("elevation_deg", ()) or ())),
        obstacles=tuple(_obstacle_from_dict(o, i) for i, o in enumerate(obstacles)),
        planes=tuple(_plane_from_dict(p, i) for i, p in enumerate(planes)),
        linke_turbidity=tuple(lt) if isinstance(lt, list) else lt,
        monthly_ghi_kwh_m2_day=tuple(ghi) if isinstance(ghi, list) else ghi,
        notes=d.get("notes", "") or "",
        **_client_from_dict(d.get("prepared_for")),
    )


def _client_from_dict(d) -> dict:
    """The optional ``prepared_for`` object: who the sheet is for (absent or null: nobody)."""
    if d is None:
        return {}
    if not isinstance(d, dict):
        raise SiteError("prepared_for", d, "must be an object with client, address, reference")
    unknown = sorted(set(d) - set(CLIENT_FIELDS))
    if unknown:
        raise SiteError(f"prepared_for.{unknown[0]}", d[unknown[0]],
                        "is not a field this Tiltyard knows (client, address, reference)")
    return {k: (d.get(k) if d.get(k) is not None else "") for k in CLIENT_FIELDS}


def site_to_dict(site: Site) -> dict:
    """The JSON structure of a site file for ``site`` (current format version)."""
    d = {
        "format": FORMAT_NAME,
        "format_version": FORMAT_VERSION,
        "name": site.name,
        "latitude_deg": site.latitude_deg,
        "longitude_deg": site.longitude_deg,
        "elevation_m": site.elevation_m,
        "timezone": site.timezone,
        "albedo": list(site.albedo) if isinstance(site.albedo, tuple) else site.albedo,
        "horizon": {"azimuth_deg": list(site.horizon.azimuth_deg),
                    "elevation_deg": list(site.horizon.elevation_deg)},
        "obstacles": [{"label": o.label, "bearing_deg": o.bearing_deg, "width_deg": o.width_deg,
                       "distance_m": o.distance_m, "height_m": o.height_m}
                      for o in site.obstacles],
        "planes": [{"label": p.label, "tilt_deg": p.tilt_deg, "azimuth_deg": p.azimuth_deg,
                    "mounting": p.mounting} for p in site.planes],
        "linke_turbidity": list(site.linke_turbidity) if site.linke_turbidity else None,
        "notes": site.notes,
    }
    if site.monthly_ghi_kwh_m2_day is not None:
        d["monthly_ghi_kwh_m2_day"] = list(site.monthly_ghi_kwh_m2_day)
    if any(getattr(site, k) for k in CLIENT_FIELDS):
        d["prepared_for"] = {k: getattr(site, k) for k in CLIENT_FIELDS}
    return d


def load_site_document(path: str | os.PathLike) -> dict:
    """Read a site file's JSON document (not yet validated).

    Raises
    ------
    SiteError
        With ``file`` set, for unreadable files and malformed JSON (the field
        is the line and column).
    """
    path = Path(path)
    try:
        _limits.check_file_size(path)
        text = path.read_text(encoding="utf-8")
    except _limits.SiteFileTooLarge as err:
        raise SiteError("(file)", str(path), str(err), str(path)) from None
    except FileNotFoundError:
        raise SiteError("(file)", str(path), "does not exist", str(path)) from None
    except UnicodeDecodeError as err:
        raise SiteError("(file)", str(path), f"is not UTF-8 text ({err.reason})", str(path)) from None
    except OSError as err:
        raise SiteError("(file)", str(path), f"cannot be read ({err.strerror})", str(path)) from None
    try:
        return _limits.parse_site_json(text)
    except json.JSONDecodeError as err:
        lines = text.splitlines()
        # the error may sit just past the last line (a file cut short)
        shown = lines[err.lineno - 1].strip()[:40] if 0 < err.lineno <= len(lines) else ""
        raise SiteError(f"line {err.lineno}, column {err.colno}", shown,
                        f"is not valid JSON ({err.msg})", str(path)) from None
    except ValueError as err:       # nested too deep
        raise SiteError("(file)", str(path), str(err), str(path)) from None


def load_site(path: str | os.PathLike) -> Site:
    """Read a site file (its ``assessment`` section, if any, is read by
    :func:`tiltyard.engine.assessment.load_assessment`).

    Raises
    ------
    SiteError
        With ``file`` set, naming the field and the reason (also for unreadable
        files and malformed JSON, where the field is the line and column).
    """
    data = load_site_document(path)
    try:
        return site_from_dict(data)
    except SiteError as err:
        raise err.in_file(Path(path)) from None


def atomic_write_text(path: str | os.PathLike, text: str) -> None:
    """Write ``text`` to ``path`` atomically.

    The text goes to a temporary file in the same folder, is flushed and
    fsynced, then replaces ``path`` with :func:`os.replace`. A crash at any
    point leaves either the old file or the new one, never a truncated file.
    """
    write_bytes_atomically(path, text.encode("utf-8"))


def save_site(site: Site, path: str | os.PathLike) -> None:
    """Save ``site`` as a site file, atomically."""
    atomic_write_text(path, json.dumps(site_to_dict(site), indent=2, ensure_ascii=False) + "\n")
