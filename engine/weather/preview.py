"""What a caller shows about a weather file around its import, without any GUI.

A CSV file in no typical-year format needs a column mapping before it can be
read: :func:`read_header` gives its column names and :func:`guess_columns` a
first guess of which holds what (for the user to check). The outcome of
reading a file for a site is one of three picklable results, so it can come
back from a worker process: :class:`Loaded`, :class:`CsvHeader` (a mapping is
needed) or :class:`LoadFailure` (the importer's message). The reading and the
check against the site's year live in :mod:`tiltyard.engine.weather_check`,
which may import the sky-year code that itself imports this package.
:func:`finding_text` and :func:`summary_text` put findings and a loaded series
into words.
"""

from __future__ import annotations

import csv
from dataclasses import dataclass, field
from pathlib import Path

from .common import Finding, WeatherData, WeatherImportError

#: Our column names with the words shown for them, in the order of the form.
MAPPED_COLUMNS = (("timestamp", "Timestamp"), ("ghi", "GHI (global horizontal)"),
                  ("dni", "DNI (direct normal)"), ("dhi", "DHI (diffuse horizontal)"),
                  ("temp_air", "Air temperature (°C)"), ("wind_speed", "Wind speed (m/s)"))

#: What a CSV file's timestamps may mark in their interval.
LABELS = (("start", "the start of each interval"), ("end", "the end of each interval"),
          ("centre", "the centre of each interval"))

#: Header words that suggest a column, by our name (a first guess the user checks).
_HINTS = {
    "timestamp": ("timestamp", "datetime", "date_time", "time", "date"),
    "ghi": ("ghi", "global"),
    "dni": ("dni", "direct", "beam"),
    "dhi": ("dhi", "diffuse"),
    "temp_air": ("temp_air", "tamb", "t_air", "temperature", "temp", "dry"),
    "wind_speed": ("wind_speed", "windspeed", "wind", "ws"),
}


@dataclass(frozen=True)
class CsvHeader:
    """A CSV file that needs a column mapping: its header and a first guess.

    Parameters
    ----------
    path : pathlib.Path
        The file.
    columns : tuple of str
        The column names on its first line.
    guess : dict
        Our column names (:data:`MAPPED_COLUMNS`) to header names, from
        :func:`guess_columns`.
    """

    path: Path
    columns: tuple
    guess: dict = field(default_factory=dict)


@dataclass(frozen=True)
class LoadFailure:
    """A file that could not be used: the importer's message and line (1-based) if known.

    Parameters
    ----------
    message : str
        One line naming the file and what is wrong.
    line : int or None
        1-based line number in the file (as a text editor shows it), if known.
    """

    message: str
    line: int | None = None


@dataclass(frozen=True)
class Loaded:
    """A weather series read and checked against the site's year.

    Parameters
    ----------
    path : pathlib.Path
        The file.
    weather : WeatherData
        The imported series with its findings.
    fit_warnings : tuple of str
        Reasons the series may not belong to the site (recorded far away,
        light with the sun down; see
        :func:`tiltyard.engine.assess.weather_fit_warnings`): the user must
        confirm before the series is used.
    sha256 : str or None
        SHA-256 (hex) of the file's bytes as read, kept with the site.
    """

    path: Path
    weather: WeatherData
    fit_warnings: tuple = ()
    sha256: str | None = None


def guess_columns(header) -> dict:
    """Our column names to header names, by common words in the header (a guess to check).

    Parameters
    ----------
    header : sequence of str
        Column names of a CSV file.

    Returns
    -------
    dict
        Our name (``'timestamp'``, ``'ghi'``, ...) to a header name. For
        each of its hint words in turn (:data:`_HINTS`), the first header
        name not taken yet that is the word, starts with it followed by a
        space, ``_`` or ``(``, or holds it as a separate word; a hint longer
        than three letters also matches inside a name. Names without a match
        are absent.
    """
    low = {c: c.strip().lower() for c in header}
    out = {}
    for key, words in _HINTS.items():
        for word in words:
            hit = next((c for c, lc in low.items() if c not in out.values()
                        and (lc == word or lc.startswith(word + " ") or lc.startswith(word + "_")
                             or lc.startswith(word + "(") or word in lc.split())), None)
            if hit is None and len(word) > 3:
                hit = next((c for c, lc in low.items() if c not in out.values() and word in lc),
                           None)
            if hit is not None:
                out[key] = hit
                break
    return out


def read_header(path: Path) -> tuple:
    """The column names on the first line of a CSV file.

    Parameters
    ----------
    path : pathlib.Path
        The file (UTF-8, a byte-order mark allowed).

    Returns
    -------
    tuple of str
        The non-empty names, stripped, in file order.

    Raises
    ------
    WeatherImportError
        The file cannot be read, or its first line holds no names (line 1).
    """
    try:
        with open(path, newline="", encoding="utf-8-sig") as handle:
            row = next(csv.reader(handle), [])
    except (OSError, UnicodeDecodeError) as exc:
        raise WeatherImportError(path.name, None, f"cannot read: {exc}") from exc
    names = tuple(c.strip() for c in row if c.strip())
    if not names:
        raise WeatherImportError(path.name, 1, "the first line holds no column names")
    return names


def finding_text(f: Finding) -> str:
    """One finding as one line: severity, the line it concerns (if any) and its message."""
    where = f"line {f.line}: " if f.line is not None else ""
    return f"{f.severity}: {where}{f.message}"


def summary_text(weather: WeatherData) -> str:
    """One line on a loaded weather series: source, interval, labelling, zone, findings."""
    n = len(weather.findings)
    warn = sum(1 for f in weather.findings if f.severity != "info")
    found = (f"{n} finding{'s' if n != 1 else ''}" + (f", {warn} to look at" if warn else "")
             if n else "no findings")
    return (f"{weather.source}: {len(weather.data)} intervals of {weather.step_min} min, "
            f"timestamps at the interval {weather.timestamp_label}, "
            f"time zone {weather.timezone or 'from the file'}; {found}")
