"""A weather file read for a site: typical-year formats, or a CSV with a column mapping.

:func:`load_weather_for_site` recognises TMY3, TMY2 and EPW files by content and
reads any other CSV file with the caller's column mapping, timestamp labelling
and time zone; a bad option is a :class:`WeatherOptionError` naming it, and a
reader's unforeseen failure on a bad file a
:class:`~tiltyard.engine.weather.WeatherImportError`. :func:`weather_json_dict`
is the ``weather`` document of the command line's ``--json`` output.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from pathlib import Path

from .site import Site
from .weather import (
    ColumnMap,
    WeatherData,
    WeatherImportError,
    read_weather_csv,
    read_weather_file,
)


class WeatherOptionError(ValueError):
    """A bad option for reading a weather file, naming the option.

    Parameters
    ----------
    option : {'columns', 'timestamp_label', 'timezone'}
        The keyword argument of :func:`load_weather_for_site` at fault.
    value : object
        Its value.
    reason : str
        What is wrong and what is allowed.
    """

    def __init__(self, option: str, value, reason: str):
        self.option = option
        self.value = value
        self.reason = reason
        super().__init__(f"{option} = {value!r}: {reason}")

    def __reduce__(self):                # crosses from a worker process intact
        return (type(self), (self.option, self.value, self.reason))


#: Keys of a column mapping (the fields of ColumnMap): our names for the columns.
COLUMN_KEYS = tuple(f.name for f in dataclasses.fields(ColumnMap))


def column_map(mapping) -> ColumnMap:
    """A :class:`~tiltyard.engine.weather.ColumnMap` from ``{our name: file column}``.

    Parameters
    ----------
    mapping : ColumnMap or mapping of str to str
        Keys among :data:`COLUMN_KEYS` (``timestamp``, or ``date`` and
        ``time``; ``ghi``, ``dni``, ``dhi``, ``temp_air``, ``wind_speed``),
        values the header names in the file.

    Returns
    -------
    ColumnMap

    Raises
    ------
    WeatherOptionError
        ``option = 'columns'``: an unknown key (named, with the allowed keys),
        an empty column name, or a mapping ColumnMap refuses (no time column,
        no data column).
    """
    if isinstance(mapping, ColumnMap):
        return mapping
    if not isinstance(mapping, Mapping):
        raise WeatherOptionError("columns", mapping, "must map our column names to the file's "
                                 f"header names; keys: {', '.join(COLUMN_KEYS)}")
    clean = {}
    for key, name in mapping.items():
        if key not in COLUMN_KEYS:
            raise WeatherOptionError("columns", dict(mapping),
                                     f"unknown key {key!r}; allowed keys: "
                                     f"{', '.join(COLUMN_KEYS)}")
        if not isinstance(name, str) or not name.strip():
            raise WeatherOptionError("columns", dict(mapping),
                                     f"key {key!r} needs a column name of the file (got "
                                     f"{name!r})")
        clean[key] = name.strip()
    try:
        return ColumnMap(**clean)
    except ValueError as exc:
        raise WeatherOptionError("columns", dict(mapping),
                                 str(exc).removeprefix("ColumnMap: ")) from None


def load_weather_for_site(path, site: Site, *, columns=None, timestamp_label=None,
                          timezone=None) -> WeatherData:
    """Read a weather file for ``site``: a typical-year format, or a CSV with a mapping.

    A TMY3, TMY2 or EPW file (recognised by content,
    :func:`tiltyard.engine.weather.read_weather_file`) defines its own
    columns, timestamp labelling and time zone, so ``columns``,
    ``timestamp_label`` and ``timezone`` must not be given for it. Any other
    file is read as a CSV (:func:`tiltyard.engine.weather.read_weather_csv`,
    units decided from the values, interval length from the timestamps) and
    needs ``columns`` and ``timestamp_label``, and ``timezone`` unless the
    timestamps carry their UTC offset. The site's coordinates serve for the
    labelling check and the header comparison; what was noticed on the way is
    in the result's ``findings``.

    Parameters
    ----------
    path : str or path-like
        The file.
    site : Site
        The site.
    columns : ColumnMap or mapping of str to str, optional
        Our column names (:data:`COLUMN_KEYS`) to the file's header names,
        e.g. ``{"timestamp": "Time", "ghi": "GHI"}``; see :func:`column_map`.
    timestamp_label : {'start', 'end', 'centre'}, optional
        What each timestamp of a CSV file marks in its interval.
    timezone : str or float, optional
        Zone of a CSV file's naive timestamps: IANA name
        (``'Europe/London'``) or fixed UTC offset (``'+01:00'``, ``'UTC-5'``).

    Returns
    -------
    WeatherData

    Raises
    ------
    WeatherOptionError
        A bad or missing option (``option`` names it): unknown column key,
        bad label or zone, an option given for a typical-year format, a CSV
        file without ``timestamp_label`` or, with naive timestamps, without
        ``timezone``.
    WeatherImportError
        Unreadable file; a file in no known format without ``columns`` (the
        message asks for a column mapping).

    References
    ----------
    Wilcox & Marion (2008), NREL/TP-581-43156; Marion & Urban (1995);
    EnergyPlus Auxiliary Programs, EPW Data Dictionary.
    """
    p = Path(path)
    cmap = None if columns is None else column_map(columns)
    if timestamp_label is not None and timestamp_label not in ("start", "end", "centre",
                                                               "center"):
        raise WeatherOptionError("timestamp_label", timestamp_label,
                                 "must be 'start', 'end' or 'centre' (what the file's "
                                 "timestamps mark in each interval)")
    given = {k: v for k, v in (("columns", columns), ("timestamp_label", timestamp_label),
                               ("timezone", timezone)) if v is not None}
    try:
        weather = read_weather_file(p, latitude_deg=site.latitude_deg,
                                    longitude_deg=site.longitude_deg)
    except _UNFORESEEN_BAD_FILE as exc:      # a header or field no reader check foresaw
        if not isinstance(exc, WeatherImportError):
            raise _as_import_error(p, exc) from None
        if "format not recognised" not in exc.reason:
            raise
        if cmap is None:
            raise WeatherImportError(
                exc.file, None,
                "not a TMY3, TMY2 or EPW file; for any other file give a CSV column mapping "
                "(which columns hold the timestamp, ghi, dni, dhi, temp_air, wind_speed), what "
                "the timestamps label (interval start, end or centre) and their time zone"
            ) from exc
        return _read_csv_for_site(p, site, cmap, timestamp_label, timezone)
    if given:
        option, value = next(iter(given.items()))
        raise WeatherOptionError(
            option, value,
            f"{weather.source} defines its own columns, timestamp labelling (interval "
            f"{weather.timestamp_label}) and time zone ({weather.timezone}); a column "
            "mapping, timestamp label and time zone are for other CSV files only")
    return weather


def _read_csv_for_site(path: Path, site: Site, cmap: ColumnMap, timestamp_label,
                       timezone) -> WeatherData:
    """read_weather_csv with the site's coordinates; option errors named."""
    if timestamp_label is None:
        raise WeatherOptionError(
            "timestamp_label", None,
            f"{path.name} is read as a CSV file: say what its timestamps mark in each "
            "interval, 'start', 'end' or 'centre'")
    try:
        return read_weather_csv(path, cmap, timestamp_label=timestamp_label, timezone=timezone,
                                latitude_deg=site.latitude_deg,
                                longitude_deg=site.longitude_deg)
    except WeatherImportError as exc:
        if timezone is None and "has no UTC offset" in exc.reason:
            raise WeatherOptionError(
                "timezone", None,
                f"{path.name}: the timestamps have no UTC offset (e.g. line {exc.line}); give "
                "their time zone, an IANA name such as 'Europe/London' or a fixed offset such "
                "as '+01:00'") from None
        raise
    except ValueError as exc:
        text = str(exc)
        if text.startswith(("timezone", "UTC offset")):
            raise WeatherOptionError("timezone", timezone, text.removeprefix(
                f"timezone {timezone!r} is ")) from None
        raise _as_import_error(path, exc) from None
    except (IndexError, KeyError, TypeError, OverflowError) as exc:
        raise _as_import_error(path, exc) from None


#: Failures of a reader on a file no check of its own foresaw: bad input, reported as such.
_UNFORESEEN_BAD_FILE = (ValueError, IndexError, KeyError, TypeError, OverflowError)


def _as_import_error(path: Path, exc: Exception) -> WeatherImportError:
    text = " ".join(str(exc).split())[:200]
    return WeatherImportError(path.name, None, f"cannot be read ({type(exc).__name__}: {text})")


def weather_json_dict(weather: WeatherData) -> dict:
    """The ``weather`` document of the command line's ``--json`` output.

    Source, interval, labelling, zone and every import finding (kind,
    severity, message, 1-based line of the file or None).
    """
    return {
        "source": weather.source,
        "step_min": int(weather.step_min),
        "timestamp_label": weather.timestamp_label,
        "timezone": weather.timezone,
        "findings": [{"kind": f.kind, "severity": f.severity, "message": f.message,
                      "line": f.line} for f in weather.findings],
    }



__all__ = ["COLUMN_KEYS", "WeatherOptionError", "column_map", "load_weather_for_site",
           "weather_json_dict"]
