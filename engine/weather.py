"""Import of measured or typical-year weather files for a site.

The rest of the engine computes all-sky irradiance from the series this module
returns, so the import is strict about *time*: every value is placed on the
interval it belongs to, and everything that had to be decided on the way is
recorded as a :class:`Finding` rather than guessed silently.

Conventions of the result (:class:`WeatherData`)
------------------------------------------------
* Each row is one interval of ``step_min`` minutes. The index holds the
  interval **start** times, timezone-aware, in UTC.
* Irradiance columns (``ghi``, ``dni``, ``dhi``) are **interval means** in
  W/m2, whatever the file stored (W/m2, Wh/m2 or kJ/m2 per interval).
  ``temp_air`` [degC] and ``wind_speed`` [m/s] are the file's values for the
  interval.
* The evaluation time of an interval, e.g. for the sun position that goes with
  its irradiance, is its **midpoint** (``WeatherData.midpoints``): the sun
  position at the midpoint is the usual approximation for an interval mean
  (Duffie & Beckman 2013, ch. 1-2, evaluate hourly quantities at the hour
  angle of the midpoint of the hour; from memory).
* Columns the file does not provide are absent, never filled with zeros.

Readers
-------
:func:`read_weather_csv`
    Any CSV file, with an explicit :class:`ColumnMap`, an explicit statement
    of what the timestamps label (interval start, end or centre) and of the
    time zone of naive timestamps.
:func:`read_weather_file`
    Public typical-year formats read offline by :mod:`pvlib.iotools`: TMY3
    CSV, TMY2 and EPW. Their labelling conventions are fixed by the format
    and documented there.

Checks
------
Units, gaps, duplicates (with daylight-saving fall-back detection), leap days,
non-monotonic timestamps, typical-year files whose months come from different
years or that start with December, negative irradiance, missing values and
sentinels, physical limits, and a labelling check that compares the daily
GHI-weighted centroid time with the cos(zenith)-weighted one
(:func:`timestamp_offset_min`).

References
----------
Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal Processes,
4th ed. Wiley.

Wilcox, S. & Marion, W. (2008). Users Manual for TMY3 Data Sets.
NREL/TP-581-43156. doi:10.2172/928611

Marion, W. & Urban, K. (1995). User's Manual for TMY2s. NREL.
doi:10.2172/87130

EnergyPlus Auxiliary Programs, "EnergyPlus Weather File (EPW) Data
Dictionary" (EnergyPlus documentation, v24.1).
"""

from __future__ import annotations

import dataclasses
import datetime
import re
import zoneinfo
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Literal

import numpy as np
import pandas as pd
import pvlib

__all__ = [
    "ColumnMap",
    "Finding",
    "WeatherData",
    "WeatherImportError",
    "read_weather_csv",
    "read_weather_file",
    "timestamp_offset_min",
    "DEFAULT_MISSING_VALUES",
    "EXTRATERRESTRIAL_MAX_W_M2",
]

TimestampLabel = Literal["start", "end", "centre"]
Severity = Literal["info", "warning", "error"]

#: Irradiance columns, interval means in W/m2 in the result.
IRRADIANCE_COLUMNS = ("ghi", "dni", "dhi")
#: Every column a :class:`WeatherData` may carry, in this order.
DATA_COLUMNS = IRRADIANCE_COLUMNS + ("temp_air", "wind_speed")

#: Solar constant, W/m2 (Kopp, G. & Lean, J. L. (2011). A new, lower value of
#: total solar irradiance: Evidence and climate significance. Geophys. Res.
#: Lett. 38, L01706: 1360.8 +/- 0.5 W/m2; from memory).
SOLAR_CONSTANT_W_M2 = 1361.0
#: Largest extraterrestrial normal irradiance of the year, W/m2: the solar
#: constant times the perihelion value of the eccentricity factor
#: 1 + 0.033 cos(360 n / 365) (Duffie & Beckman 2013, eq. 1.4.1a), about
#: 1406 W/m2. No interval mean of ghi or dni at the ground can exceed it.
EXTRATERRESTRIAL_MAX_W_M2 = SOLAR_CONSTANT_W_M2 * 1.033

#: Sentinels read as "missing" in generic CSV files.
#: common practice, no source (-999/-9999 and 9999/99999 are the usual fill values).
DEFAULT_MISSING_VALUES = (-999.0, -9999.0, -99999.0, 9999.0, 99999.0)

#: Valid ranges of the non-irradiance columns, from the EPW data dictionary
#: (EnergyPlus Auxiliary Programs, fields Dry Bulb Temperature: -70..70 degC;
#: Wind Speed: 0..40 m/s). Values outside are reported, not changed.
_VALID_RANGE = {"temp_air": (-70.0, 70.0), "wind_speed": (0.0, 40.0)}

#: A labelling offset at or beyond this many minutes is reported as a warning.
LABEL_OFFSET_WARNING_MIN = 20.0

#: Night-time thermal offsets of thermopile pyranometers are a few W/m2
#: negative (Dutton, E. G. et al. (2001). Measurement of broadband diffuse
#: solar irradiance using current commercial instrumentation with a correction
#: for thermal offset errors. J. Atmos. Oceanic Technol. 18, 297-314; values
#: of -5 to -10 W/m2, from memory). Anything more negative is reported as a
#: warning rather than as a night offset.
_NIGHT_OFFSET_LIMIT_W_M2 = -20.0

#: Plausible range of the 99th percentile of the interval clearness index
#: ghi / (E0 cos(zenith)) at sun elevations above ~17.5 deg (cos zenith > 0.3):
#: the clearest intervals of a record have k_t ~ 0.75-0.8 (Duffie & Beckman
#: 2013, sec. 2.9: hourly k_t distributions end near 0.8, from memory; pvlib's TMY3 samples
#: for Greensboro NC and Sand Point AK both give 0.77). The bounds leave room
#: for cloudy records and for timestamps off by an hour (which raises the
#: percentile to ~1.0); common practice, no source for the exact bounds.
_KT99_RANGE = (0.45, 1.2)
_KT_MIN_COS_ZENITH = 0.3
#: Without a site, the peak interval-mean irradiance of a record with any
#: clear sky is at least this (common practice, no source).
_PEAK_MIN_W_M2 = 300.0

#: Daily clearness index K_T above which a day counts as clear-ish for the
#: labelling check (common practice, no source).
_CLEAR_DAY_KT = 0.5
_MIN_CHECK_DAYS = 5

#: Reference years used when a typical-year file mixes years and no
#: ``reference_year`` is given. Arbitrary; chosen non-leap / leap to match the
#: presence of 29 February. The year only moves the sun position by the
#: fraction of a day the calendar drifts over a leap cycle.
TYPICAL_YEAR_DEFAULT = 1990
TYPICAL_LEAP_YEAR_DEFAULT = 1992

_UNIT_NAMES = {"w_m2": "W/m2 (interval mean)", "wh_m2": "Wh/m2 per interval",
               "kj_m2": "kJ/m2 per interval"}
_MAX_LISTED = 5


# --------------------------------------------------------------------------
# Result types
# --------------------------------------------------------------------------


@dataclasses.dataclass(frozen=True)
class Finding:
    """One observation made while importing a weather file.

    Parameters
    ----------
    kind : str
        Machine-readable category, e.g. ``'units'``, ``'gap'``,
        ``'duplicate'``, ``'dst_duplicate'``, ``'leap_day'``,
        ``'non_monotonic'``, ``'typical_year'``, ``'year_wrap'``,
        ``'negative'``, ``'missing'``, ``'irradiance_limit'``, ``'range'``,
        ``'labelling'``, ``'irregular'``, ``'site'``.
    severity : {'info', 'warning', 'error'}
        ``'error'`` marks values that are physically impossible but were kept;
        an unusable file raises :class:`WeatherImportError` instead.
    message : str
        Human-readable explanation, naming values and lines.
    line : int or None
        1-based line number in the file (as a text editor shows it) of the
        first row concerned, when there is one.
    """

    kind: str
    severity: Severity
    message: str
    line: int | None = None

    def __post_init__(self):
        if self.severity not in ("info", "warning", "error"):
            raise ValueError(
                f"Finding.severity must be 'info', 'warning' or 'error' (got {self.severity!r})"
            )


@dataclasses.dataclass(frozen=True, eq=False)
class WeatherData:
    """An imported weather series with the findings of its import.

    Parameters
    ----------
    data : pandas.DataFrame
        Index: interval **start** times, tz-aware UTC (nanosecond
        resolution), strictly increasing, unique, named ``'interval_start'``. Columns among ``ghi``, ``dni``,
        ``dhi`` (interval means, W/m2), ``temp_air`` (degC) and
        ``wind_speed`` (m/s); absent columns are absent, not zero. Missing
        values are NaN. Treat as read-only.
    step_min : int
        Interval length in minutes (divides 60).
    source : str
        File name and format, e.g. ``'723170TYA.CSV (TMY3)'``.
    timestamp_label : {'start', 'end', 'centre'}
        What the timestamps in the file labelled.
    findings : tuple of Finding
        Everything noticed or decided during import.
    timezone : str or None
        Time zone the file's naive timestamps were read in (IANA name or
        fixed offset such as ``'UTC-05:00'``), for display in local time.
    latitude_deg, longitude_deg, altitude_m : float or None
        Site coordinates stated in the file header, if any (north and east
        positive).

    Notes
    -----
    Values are interval means; the interval's evaluation time (for sun
    position, air mass, transposition) is its midpoint, see
    :attr:`midpoints`.
    """

    data: pd.DataFrame
    step_min: int
    source: str
    timestamp_label: TimestampLabel
    findings: tuple[Finding, ...]
    timezone: str | None = None
    latitude_deg: float | None = None
    longitude_deg: float | None = None
    altitude_m: float | None = None

    @property
    def midpoints(self) -> pd.DatetimeIndex:
        """Interval midpoints (UTC): the evaluation times of the interval means."""
        return self.data.index + pd.Timedelta(minutes=self.step_min / 2)

    def findings_of(self, kind: str) -> tuple[Finding, ...]:
        """Findings of one ``kind``."""
        return tuple(f for f in self.findings if f.kind == kind)

    @property
    def has_warnings(self) -> bool:
        """True if any finding is a warning or an error."""
        return any(f.severity != "info" for f in self.findings)


class WeatherImportError(ValueError):
    """A weather file could not be imported; nothing partial is returned.

    Parameters
    ----------
    file : str
        File name.
    line : int or None
        1-based line number (as a text editor shows it), if known.
    reason : str
        What is wrong, with the offending value and what was expected.
    """

    def __init__(self, file: str, line: int | None, reason: str):
        self.file = file
        self.line = line
        self.reason = reason
        where = f"{file}, line {line}" if line is not None else file
        super().__init__(f"{where}: {reason}")


@dataclasses.dataclass(frozen=True)
class ColumnMap:
    """Names of the CSV columns holding each quantity.

    Give either ``timestamp`` (one column with date and time) or ``date`` and
    ``time`` (two columns; ``time`` may be ``HH:MM[:SS]`` or a bare hour
    number, and ``24:00`` is read as midnight of the next day). Map at least
    one data column.

    Parameters
    ----------
    timestamp, date, time : str or None
        Time columns.
    ghi, dni, dhi : str or None
        Irradiance columns (global horizontal, direct normal, diffuse
        horizontal), in the unit given to :func:`read_weather_csv`.
    temp_air : str or None
        Air temperature column, degC.
    wind_speed : str or None
        Wind speed column, m/s.
    """

    timestamp: str | None = None
    date: str | None = None
    time: str | None = None
    ghi: str | None = None
    dni: str | None = None
    dhi: str | None = None
    temp_air: str | None = None
    wind_speed: str | None = None

    def __post_init__(self):
        if self.timestamp is not None and (self.date is not None or self.time is not None):
            raise ValueError("ColumnMap: give either 'timestamp' or 'date' and 'time', not both")
        if self.timestamp is None and (self.date is None or self.time is None):
            raise ValueError("ColumnMap: give 'timestamp', or both 'date' and 'time'")
        if not self.data_columns():
            raise ValueError(
                "ColumnMap: map at least one of " + ", ".join(DATA_COLUMNS)
            )

    def data_columns(self) -> dict[str, str]:
        """Mapping quantity -> file column, for the mapped data columns."""
        return {q: getattr(self, q) for q in DATA_COLUMNS if getattr(self, q) is not None}


# --------------------------------------------------------------------------
# Argument parsing
# --------------------------------------------------------------------------

_OFFSET_RE = re.compile(r"^(?:UTC|GMT)?\s*([+-])(\d{1,2})(?::?(\d{2}))?$", re.IGNORECASE)


def _fixed_zone(hours: float) -> datetime.timezone:
    if not -14.0 <= hours <= 14.0:
        raise ValueError(f"UTC offset must be within -14 h .. +14 h (got {hours} h)")
    return datetime.timezone(datetime.timedelta(minutes=round(hours * 60)))


def _zone_name(tz: datetime.tzinfo) -> str:
    if isinstance(tz, zoneinfo.ZoneInfo):
        return tz.key
    if isinstance(tz, datetime.timezone):
        off = tz.utcoffset(None)
        if off == datetime.timedelta(0):
            return "UTC"
        minutes = int(off.total_seconds() // 60)
        sign = "+" if minutes >= 0 else "-"
        return f"UTC{sign}{abs(minutes) // 60:02d}:{abs(minutes) % 60:02d}"
    return str(tz)


def _parse_timezone(timezone) -> datetime.tzinfo | None:
    """IANA name, fixed offset ('+01:00', 'UTC-5', -5.0) or tzinfo -> tzinfo."""
    if timezone is None or isinstance(timezone, datetime.tzinfo):
        return timezone
    if isinstance(timezone, bool):
        raise ValueError(f"timezone must be an IANA name or a UTC offset (got {timezone!r})")
    if isinstance(timezone, int | float):
        return _fixed_zone(float(timezone))
    if not isinstance(timezone, str):
        raise ValueError(f"timezone must be an IANA name or a UTC offset (got {timezone!r})")
    text = timezone.strip()
    if text.upper() in ("UTC", "GMT", "Z"):
        return datetime.UTC
    match = _OFFSET_RE.match(text)
    if match:
        sign = 1 if match.group(1) == "+" else -1
        hours = int(match.group(2)) + int(match.group(3) or 0) / 60
        return _fixed_zone(sign * hours)
    try:
        return zoneinfo.ZoneInfo(text)
    except (zoneinfo.ZoneInfoNotFoundError, ValueError):
        raise ValueError(
            f"timezone {timezone!r} is neither an IANA zone name (e.g. 'Europe/Berlin') "
            "nor a fixed UTC offset (e.g. '+01:00', 'UTC-05:00')"
        ) from None


def _normalise_label(label) -> TimestampLabel:
    if label == "center":
        return "centre"
    if label not in ("start", "end", "centre"):
        raise ValueError(
            "timestamp_label must be 'start', 'end' or 'centre' (what the file's "
            f"timestamps mark in each interval); got {label!r}"
        )
    return label


def _check_site(latitude_deg, longitude_deg):
    if (latitude_deg is None) != (longitude_deg is None):
        raise ValueError("give both latitude_deg and longitude_deg, or neither")
    if latitude_deg is not None:
        if not -90.0 <= float(latitude_deg) <= 90.0:
            raise ValueError(f"latitude_deg must be within -90..90 (got {latitude_deg})")
        if not -180.0 <= float(longitude_deg) <= 180.0:
            raise ValueError(f"longitude_deg must be within -180..180 (got {longitude_deg})")


def _check_step(step_min):
    if step_min is None:
        return
    if isinstance(step_min, bool) or not isinstance(step_min, int | np.integer) or step_min <= 0 \
            or 60 % int(step_min):
        raise ValueError(
            f"step_min must be a whole number of minutes dividing 60 (1, 2, ... 30, 60); "
            f"got {step_min!r}"
        )


def _check_reference_year(reference_year):
    if reference_year is None:
        return
    if isinstance(reference_year, bool) or not isinstance(reference_year, int | np.integer) \
            or not 1 <= reference_year <= 9998:
        raise ValueError(f"reference_year must be an integer year 1..9998 (got {reference_year!r})")


def _lines_text(lines: np.ndarray) -> str:
    shown = ", ".join(str(int(x)) for x in lines[:_MAX_LISTED])
    more = f" and {len(lines) - _MAX_LISTED} more" if len(lines) > _MAX_LISTED else ""
    return f"line{'s' if len(lines) > 1 else ''} {shown}{more}"


# --------------------------------------------------------------------------
# Parsing helpers (vectorised; line numbers kept beside the rows)
# --------------------------------------------------------------------------

_NA_TOKENS = {"", "nan", "na", "n/a", "null", "none"}
_HOUR24_RE = re.compile(r"(?:(?<=^)|(?<=[ T]))24:00(?::00)?(?=$|[Z+-])")
_OFFSET_SUFFIX_RE = r"(?:Z|[+-]\d{2}:?\d{2})$"


def _parse_timestamps(text: pd.Series, lines: np.ndarray, file: str, column: str,
                      timestamp_format: str | None, dayfirst: bool) -> pd.DatetimeIndex:
    """Parse timestamp strings; naive or (all) offset-carrying.

    ``24:00`` is read as midnight of the following day (the end-of-day
    convention of hour-ending files).
    """
    text = text.astype("str").str.strip()
    empty = (text == "").to_numpy()
    if empty.any():
        i = int(np.flatnonzero(empty)[0])
        raise WeatherImportError(file, int(lines[i]), f"column {column!r}: empty timestamp")
    has_offset = text.str.contains(_OFFSET_SUFFIX_RE, regex=True).to_numpy()
    if has_offset.any() and not has_offset.all():
        i = int(np.flatnonzero(has_offset != has_offset[0])[0])
        raise WeatherImportError(
            file, int(lines[i]),
            f"column {column!r}: timestamp {text.iloc[i]!r} "
            f"{'has no' if has_offset[0] else 'has a'} UTC offset, unlike line {int(lines[0])} "
            f"({text.iloc[0]!r}); a file must be all naive or all offset-carrying",
        )
    hour24 = text.str.contains(_HOUR24_RE, regex=True).to_numpy()
    if hour24.any():
        text = text.str.replace(_HOUR24_RE, "00:00", regex=True)
    kwargs = {"errors": "coerce"}
    if timestamp_format is not None:
        kwargs["format"] = timestamp_format
    if has_offset[0]:
        kwargs["utc"] = True
        kwargs.setdefault("format", "ISO8601")
    elif timestamp_format is None:
        kwargs["dayfirst"] = dayfirst
    parsed = pd.to_datetime(text, **kwargs)
    bad = parsed.isna().to_numpy()
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        fmt = f" with format {timestamp_format!r}" if timestamp_format else (
            f" (format inferred from line {int(lines[0])}: {text.iloc[0]!r})")
        raise WeatherImportError(
            file, int(lines[i]),
            f"column {column!r}: cannot parse timestamp {text.iloc[i]!r}{fmt}",
        )
    index = pd.DatetimeIndex(parsed)
    if hour24.any():
        index = index + pd.to_timedelta(hour24.astype(np.int64), unit="D")
    return index


def _to_numeric(raw: pd.Series, lines: np.ndarray, file: str, column: str,
                decimal: str = ".") -> np.ndarray:
    """Column to float array; non-numeric text raises with its line number."""
    if pd.api.types.is_numeric_dtype(raw.dtype) and not pd.api.types.is_bool_dtype(raw.dtype):
        return raw.to_numpy(dtype=float, na_value=np.nan)
    text = raw.astype("str").str.strip()
    if decimal != ".":
        text = text.str.replace(decimal, ".", regex=False)
    values = pd.to_numeric(text, errors="coerce").to_numpy(dtype=float, na_value=np.nan)
    na_token = text.str.lower().isin(_NA_TOKENS).to_numpy()
    bad = np.isnan(values) & ~na_token
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise WeatherImportError(
            file, int(lines[i]),
            f"column {column!r}: value {raw.iloc[i]!r} is not a number "
            "(expected a decimal number, or empty/NaN for missing)",
        )
    return values


def _infer_step_min(labels: pd.DatetimeIndex, lines: np.ndarray, file: str) -> int:
    """Most common positive difference between consecutive timestamps."""
    minutes = np.diff(((labels - labels[0]) / pd.Timedelta(minutes=1)).to_numpy(dtype=float))
    positive = minutes[minutes > 0]
    if positive.size == 0:
        raise WeatherImportError(file, int(lines[0]), "timestamps never increase; "
                                 "cannot tell the interval length")
    values, counts = np.unique(np.round(positive, 6), return_counts=True)
    step = float(values[np.argmax(counts)])
    if step != round(step) or 60 % int(round(step)):
        raise WeatherImportError(
            file, None,
            f"the usual difference between timestamps is {step:g} min; only hourly or "
            "sub-hourly intervals that divide 60 min are supported (pass step_min= to override)",
        )
    return int(round(step))


def _label_to_start(label: TimestampLabel, step_min: int) -> pd.Timedelta:
    """Offset added to a timestamp to get the start of its interval."""
    return {"start": pd.Timedelta(0), "centre": -pd.Timedelta(minutes=step_min / 2),
            "end": -pd.Timedelta(minutes=step_min)}[label]


def _midpoint_offset_min(label: TimestampLabel, step_min: int) -> float:
    """Minutes from a timestamp to the midpoint of its interval."""
    return {"start": step_min / 2, "centre": 0.0, "end": -step_min / 2}[label]


# --------------------------------------------------------------------------
# Calendar structure: typical years, wraps, ordering
# --------------------------------------------------------------------------


def _replace_year(wall: pd.DatetimeIndex, year: int) -> pd.DatetimeIndex:
    """Same month/day/time in ``year`` (rows on 29 Feb must be removed first)."""
    dates = pd.to_datetime(pd.DataFrame({"year": np.full(len(wall), year),
                                         "month": wall.month, "day": wall.day}))
    return pd.DatetimeIndex(dates) + (wall - wall.normalize())


def _is_leap(year: int) -> bool:
    return year % 4 == 0 and (year % 100 != 0 or year % 400 == 0)


def _month_years_text(wall: pd.DatetimeIndex) -> str:
    frame = pd.DataFrame({"m": wall.month, "y": wall.year})
    parts = []
    for month, years in frame.groupby("m")["y"]:
        ys = "/".join(str(y) for y in sorted(set(years)))
        parts.append(f"{pd.Timestamp(2001, month, 1):%b} {ys}")
    return ", ".join(parts)


def _map_years(starts_wall: pd.DatetimeIndex, lines: np.ndarray, reference_year: int | None,
               file: str, findings: list[Finding]):
    """Detect typical-year year mixing and map rows onto one reference year.

    Returns the (possibly mapped) wall-clock starts of the rows kept, and the
    mask of rows kept (29 February is dropped for a non-leap reference year).
    """
    keep = np.ones(len(starts_wall), dtype=bool)
    years = starts_wall.year
    distinct = np.unique(years)
    feb29 = ((starts_wall.month == 2) & (starts_wall.day == 29))
    feb29 = np.asarray(feb29)

    if reference_year is None:
        if distinct.size <= 1:
            return starts_wall, keep
        diffs = np.diff(starts_wall.asi8)
        span_ok = diffs.size and (diffs > 0).all() and (
            np.diff(starts_wall) <= pd.Timedelta(days=31)).all()
        if span_ok:
            return starts_wall, keep  # a genuine series spanning several years
        ref = TYPICAL_LEAP_YEAR_DEFAULT if feb29.any() else TYPICAL_YEAR_DEFAULT
        mapped = _replace_year(starts_wall, ref)
        unique = mapped.nunique()
        gaps_ok = (np.diff(mapped.sort_values()) <= pd.Timedelta(days=31)).all()
        if unique < 0.99 * len(mapped) or not gaps_ok:
            return starts_wall, keep  # years differ but it is not one typical year
        findings.append(Finding(
            "typical_year", "info",
            f"typical-year file: months come from different years ({_month_years_text(starts_wall)}); "
            f"all intervals mapped onto reference year {ref} (pass reference_year= to choose another)",
        ))
        return mapped, keep

    # explicit reference year
    if feb29.any() and not _is_leap(reference_year):
        keep = ~feb29
        first = lines[feb29]
        findings.append(Finding(
            "leap_day", "warning",
            f"{int(feb29.sum())} intervals on 29 February dropped: reference year "
            f"{reference_year} is not a leap year ({_lines_text(first)})", int(first[0]),
        ))
    mapped = _replace_year(starts_wall[keep], reference_year)
    n_dup = int(pd.DatetimeIndex(mapped).duplicated().sum())
    if n_dup > 0.01 * len(mapped):
        raise WeatherImportError(
            file, None,
            f"cannot map onto reference year {reference_year}: the data span more than one "
            f"year ({n_dup} intervals would coincide); reference_year is for typical-year files",
        )
    if distinct.size > 1:
        msg = (f"typical-year file: months come from different years "
               f"({_month_years_text(starts_wall)}); ")
    else:
        msg = f"data from {int(distinct[0])}; "
    findings.append(Finding("typical_year", "info",
                            msg + f"all intervals mapped onto reference year {reference_year}"))
    return mapped, keep


def _order_findings(key: pd.DatetimeIndex, wall: pd.DatetimeIndex, lines: np.ndarray,
                    findings: list[Finding]) -> None:
    """Report a December-first wrap and other backward steps (rows get sorted)."""
    steps_back = np.flatnonzero(np.diff(key.asi8) < 0) + 1  # row that goes backwards
    if steps_back.size == 0:
        return
    months = np.asarray(wall.month)
    k = int(steps_back[0])
    if (months[:k] == 12).all() and months[k] == 1:
        findings.append(Finding(
            "year_wrap", "warning",
            f"a year wrapped to the front: lines {int(lines[0])}-{int(lines[k - 1])} hold "
            f"December ({wall[0]:%Y-%m-%d %H:%M}) before January at line {int(lines[k])}; "
            "they were moved to the end of the year",
            int(lines[0]),
        ))
        steps_back = steps_back[1:]
    if steps_back.size:
        first = int(steps_back[0])
        findings.append(Finding(
            "non_monotonic", "warning",
            f"timestamps go backwards at {_lines_text(lines[steps_back])} "
            f"(first: {wall[first]:%Y-%m-%d %H:%M} after {wall[first - 1]:%Y-%m-%d %H:%M}); "
            "rows were sorted by time",
            int(lines[first]),
        ))


def _localize(labels_wall: pd.DatetimeIndex, tz: datetime.tzinfo, lines: np.ndarray,
              file: str, findings: list[Finding]) -> pd.DatetimeIndex:
    """Localize naive wall-clock timestamps, resolving daylight-saving changes.

    A wall-clock time repeated at the autumn fall-back is read as the repeated
    hour: first occurrence summer time, second standard time. A time inside
    the spring gap does not exist and raises.
    """
    if not isinstance(tz, zoneinfo.ZoneInfo):
        return labels_wall.tz_localize(tz)
    n = len(labels_wall)
    nonexistent = labels_wall.tz_localize(tz, ambiguous=np.ones(n, dtype=bool),
                                          nonexistent="NaT").isna()
    if nonexistent.any():
        i = int(np.flatnonzero(nonexistent)[0])
        year = labels_wall[i].year
        std = min(tz.utcoffset(datetime.datetime(year, 1, 1)),
                  tz.utcoffset(datetime.datetime(year, 7, 1)))
        std_name = _zone_name(datetime.timezone(std))
        raise WeatherImportError(
            file, int(lines[i]),
            f"timestamp {labels_wall[i]:%Y-%m-%d %H:%M} does not exist in {tz.key} (it falls "
            "in the spring daylight-saving gap); the file is probably in standard time: "
            f"pass timezone='{std_name}'",
        )
    ambiguous = labels_wall.tz_localize(tz, ambiguous="NaT", nonexistent="NaT").isna()
    if not ambiguous.any():
        return labels_wall.tz_localize(tz)
    rank = pd.Series(labels_wall).groupby(labels_wall).cumcount().to_numpy()
    is_dst = ~(ambiguous & (rank == 1))
    localized = labels_wall.tz_localize(tz, ambiguous=is_dst)
    counts = pd.Series(labels_wall).groupby(labels_wall).transform("size").to_numpy()
    repeated = ambiguous & (counts >= 2)
    single = ambiguous & (counts == 1)
    for mask, what in (
        (repeated, "duplicate wall-clock timestamps at the daylight-saving fall-back of {zone} "
                   "({when}, {lines}); read as the repeated hour: first occurrence summer "
                   "time, second standard time"),
        (single, "ambiguous timestamps at the daylight-saving fall-back of {zone} appear only "
                 "once ({when}, {lines}); taken as summer time, so the standard-time hour is "
                 "missing"),
    ):
        if mask.any():
            first = np.flatnonzero(mask)
            findings.append(Finding(
                "dst_duplicate", "warning",
                what.format(zone=tz.key, when=f"{labels_wall[first[0]]:%Y-%m-%d %H:%M}",
                            lines=_lines_text(lines[first])),
                int(lines[first[0]]),
            ))
    return localized


# --------------------------------------------------------------------------
# Values: missing, units, negatives, limits
# --------------------------------------------------------------------------


def _missing(values: dict[str, np.ndarray], lines: np.ndarray,
             rules: Mapping[str, tuple[Sequence[float], float | None]],
             findings: list[Finding]) -> None:
    """Replace sentinels by NaN and report missing values per column (in place)."""
    for col, arr in values.items():
        exact, at_least = rules.get(col, ((), None))
        nan = np.isnan(arr)
        sentinel = np.isin(arr, np.asarray(exact, dtype=float)) if len(exact) else np.zeros_like(nan)
        if at_least is not None:
            sentinel |= arr >= at_least
        found = np.unique(arr[sentinel])
        arr[sentinel] = np.nan
        missing = nan | sentinel
        if missing.any():
            idx = np.flatnonzero(missing)
            what = []
            if nan.any():
                what.append(f"{int(nan.sum())} empty/NaN")
            if sentinel.any():
                what.append(f"{int(sentinel.sum())} sentinel "
                            + "/".join(f"{v:g}" for v in found[:_MAX_LISTED]))
            findings.append(Finding(
                "missing", "warning",
                f"{col}: {int(missing.sum())} missing values ({', '.join(what)}) at "
                f"{_lines_text(lines[idx])}; kept as NaN",
                int(lines[idx[0]]),
            ))


def _unit_factors(step_min: int) -> dict[str, float]:
    """Multipliers from each supported unit to the interval-mean W/m2."""
    return {"w_m2": 1.0, "wh_m2": 60.0 / step_min, "kj_m2": 1000.0 / (60.0 * step_min)}


def _kt99(ghi_w_m2: np.ndarray, geometry: pd.DataFrame | None) -> float:
    """99th percentile of the interval clearness index at elevation > ~17.5 deg."""
    if geometry is None:
        return np.nan
    sunny = (geometry["cos_zenith"].to_numpy() > _KT_MIN_COS_ZENITH) & ~np.isnan(ghi_w_m2)
    if sunny.sum() < 24:
        return np.nan
    kt = ghi_w_m2[sunny] / geometry["etr_horizontal"].to_numpy()[sunny]
    return float(np.percentile(kt, 99))


def _decide_units(values: dict[str, np.ndarray], units: str, step_min: int,
                  geometry: pd.DataFrame | None, file: str, findings: list[Finding],
                  allowed: Sequence[str] = ("w_m2", "wh_m2", "kj_m2")) -> float:
    """Choose (or confirm) the irradiance unit; returns the multiplier to W/m2.

    Hourly data: a W/m2 mean and a Wh/m2 sum are numerically equal. Sub-hourly
    data: Wh/m2 = W/m2 * step/60, kJ/m2 = W/m2 * step * 60 / 1000.
    """
    factors = _unit_factors(step_min)
    irr = np.concatenate([values[c] for c in IRRADIANCE_COLUMNS if c in values])
    positive = irr[irr > 0]
    # robust peak: a few spikes must not decide the unit (they are flagged later)
    peak = (float(np.percentile(positive, 99.5)) if positive.size >= 200 else
            float(positive.max()) if positive.size else np.nan)
    hourly_note = (" (for hourly data a W/m2 mean and a Wh/m2 sum are numerically equal)"
                   if step_min == 60 else "")
    if units != "auto":
        findings.append(Finding(
            "units", "info",
            f"irradiance read as {_UNIT_NAMES[units]} over {step_min} min, multiplied by "
            f"{factors[units]:.6g} to W/m2{hourly_note}",
        ))
        return factors[units]
    if not np.isfinite(peak):
        findings.append(Finding("units", "info", "no irradiance values; unit not needed"))
        return 1.0
    candidates = [u for u in allowed if not (step_min == 60 and u == "wh_m2")] or ["w_m2"]
    ghi = values.get("ghi")
    if ghi is None and "dni" in values and "dhi" in values and geometry is not None:
        ghi = values["dhi"] + values["dni"] * geometry["cos_zenith"].to_numpy()
    peak_ok = {u: peak * factors[u] <= EXTRATERRESTRIAL_MAX_W_M2 for u in candidates}
    kt_raw = _kt99(ghi, geometry) if ghi is not None else np.nan
    if np.isfinite(kt_raw):
        shape_ok = {u: _KT99_RANGE[0] <= kt_raw * factors[u] <= _KT99_RANGE[1]
                    for u in candidates}
        basis = (f"99th-percentile clearness index {kt_raw:.2f} as W/m2 against the "
                 f"plausible {_KT99_RANGE[0]}-{_KT99_RANGE[1]}")
    else:
        shape_ok = {u: peak * factors[u] >= _PEAK_MIN_W_M2 for u in candidates}
        basis = f"peak {peak:g} against the limits {_PEAK_MIN_W_M2:g}-{EXTRATERRESTRIAL_MAX_W_M2:.0f} W/m2"
    ok = [u for u in candidates if peak_ok[u] and shape_ok[u]]
    if not any(peak_ok.values()):
        raise WeatherImportError(
            file, None,
            f"irradiance peak {peak:g} (99.5th percentile) exceeds the extraterrestrial limit "
            f"{EXTRATERRESTRIAL_MAX_W_M2:.0f} W/m2 in every supported unit "
            f"({', '.join(_UNIT_NAMES[u] for u in candidates)} over {step_min} min)",
        )
    if not ok:
        chosen = next((u for u in candidates if shape_ok[u]),
                      next(u for u in candidates if peak_ok[u]))
        findings.append(Finding(
            "units", "warning",
            f"irradiance unit unclear ({basis}): no unit fits; assumed {_UNIT_NAMES[chosen]}"
            f"{hourly_note}; pass units= to be explicit",
        ))
        return factors[chosen]
    chosen = ok[0]
    if len(ok) > 1:
        findings.append(Finding(
            "units", "warning",
            f"irradiance unit ambiguous ({basis}): plausible as "
            f"{' or '.join(_UNIT_NAMES[u] for u in ok)}; assumed {_UNIT_NAMES[chosen]}"
            f"{hourly_note}; pass units= to be explicit",
        ))
    else:
        severity = "info" if chosen == "w_m2" else "warning"
        findings.append(Finding(
            "units", severity,
            f"irradiance detected as {_UNIT_NAMES[chosen]} over {step_min} min ({basis}; robust "
            f"peak {peak:g} in the file, {peak * factors[chosen]:.0f} W/m2 after conversion)"
            f"{hourly_note}",
        ))
    return factors[chosen]


def _negatives_and_limits(values: dict[str, np.ndarray], lines: np.ndarray,
                          findings: list[Finding]) -> None:
    """Clip negative irradiance to 0 and flag values above the extraterrestrial limit."""
    for col in IRRADIANCE_COLUMNS:
        if col not in values:
            continue
        arr = values[col]
        with np.errstate(invalid="ignore"):
            neg = arr < 0
            high = arr > EXTRATERRESTRIAL_MAX_W_M2
        if neg.any():
            idx = np.flatnonzero(neg)
            low = float(arr[neg].min())
            severity = "info" if low >= _NIGHT_OFFSET_LIMIT_W_M2 else "warning"
            findings.append(Finding(
                "negative", severity,
                f"{col}: {int(neg.sum())} negative values (down to {low:.4g} W/m2, typically "
                f"night-time sensor offsets) clipped to 0 at {_lines_text(lines[idx])}",
                int(lines[idx[0]]),
            ))
            arr[neg] = 0.0
        if high.any():
            idx = np.flatnonzero(high)
            findings.append(Finding(
                "irradiance_limit", "error",
                f"{col}: {int(high.sum())} values above the extraterrestrial limit "
                f"{EXTRATERRESTRIAL_MAX_W_M2:.0f} W/m2 (up to {float(arr[high].max()):.0f} W/m2) "
                f"at {_lines_text(lines[idx])}; physically impossible, kept unchanged: check units",
                int(lines[idx[0]]),
            ))
    for col, (low, high) in _VALID_RANGE.items():
        if col not in values:
            continue
        arr = values[col]
        with np.errstate(invalid="ignore"):
            out = (arr < low) | (arr > high)
        if out.any():
            idx = np.flatnonzero(out)
            findings.append(Finding(
                "range", "warning",
                f"{col}: {int(out.sum())} values outside the valid range {low:g}..{high:g} "
                f"(first {arr[idx[0]]:g} at line {int(lines[idx[0]])}; {_lines_text(lines[idx])}); "
                "kept unchanged",
                int(lines[idx[0]]),
            ))


# --------------------------------------------------------------------------
# Sun geometry and the labelling check
# --------------------------------------------------------------------------


def _geometry(midpoints: pd.DatetimeIndex, latitude_deg: float,
              longitude_deg: float) -> pd.DataFrame:
    """cos(zenith) (clipped at 0) and extraterrestrial horizontal irradiance at midpoints.

    Sun position by NREL SPA (Reda & Andreas 2004) via
    :func:`pvlib.solarposition.get_solarposition`; extraterrestrial normal
    irradiance by :func:`pvlib.irradiance.get_extra_radiation` (Spencer 1971).
    """
    solpos = pvlib.solarposition.get_solarposition(midpoints, latitude_deg, longitude_deg)
    cos_zenith = np.clip(np.cos(np.radians(solpos["zenith"].to_numpy())), 0.0, None)
    e0 = np.asarray(pvlib.irradiance.get_extra_radiation(midpoints), dtype=float)
    return pd.DataFrame({"cos_zenith": cos_zenith, "etr_horizontal": e0 * cos_zenith},
                        index=midpoints)


def _daily_offsets(ghi: np.ndarray, midpoints: pd.DatetimeIndex, geometry: pd.DataFrame,
                   step_min: int, longitude_deg: float):
    """Per-solar-day centroid offsets (min) and daily clearness indices."""
    t_min = ((midpoints - pd.Timestamp("2000-01-01", tz="UTC")) /
             pd.Timedelta(minutes=1)).to_numpy(dtype=float)
    solar_t = t_min + 4.0 * longitude_deg  # local mean solar time, 4 min per degree
    day = np.floor(solar_t / 1440.0)
    codes, _ = pd.factorize(day)
    t_rel = solar_t - 1440.0 * day
    cz = geometry["cos_zenith"].to_numpy()
    etr = geometry["etr_horizontal"].to_numpy()
    bad = np.isnan(ghi)
    g = np.where(bad, 0.0, ghi)
    n = np.bincount(codes)
    nbad = np.bincount(codes, bad.astype(float))
    sum_g = np.bincount(codes, g)
    sum_gt = np.bincount(codes, g * t_rel)
    sum_c = np.bincount(codes, cz)
    sum_ct = np.bincount(codes, cz * t_rel)
    sum_etr = np.bincount(codes, etr)
    valid = (n == 1440 // step_min) & (nbad == 0) & (sum_c > 0) & (sum_g > 0)
    with np.errstate(invalid="ignore", divide="ignore"):
        offset = sum_gt / sum_g - sum_ct / sum_c
        kt = sum_g / sum_etr
    return offset[valid], kt[valid]


def timestamp_offset_min(ghi: pd.Series, step_min: int, latitude_deg: float,
                         longitude_deg: float) -> tuple[float, int]:
    """Median time offset of measured GHI against the sun, in minutes.

    For each complete solar day (local mean solar time) the GHI-weighted
    centroid of the interval midpoints is compared with the
    cos(zenith)-weighted centroid of the same midpoints. Both weightings are
    symmetric about solar noon when the timestamps are right, so their
    difference measures a labelling or time-zone error; the median over the
    clear-ish days (daily clearness index ``K_T >= 0.5``, else the clearest
    days) is robust against afternoon clouds. Days are cut at local mean
    solar midnight (UTC + 4 min per degree of longitude), so each daylight
    period is whole.

    Parameters
    ----------
    ghi : pandas.Series
        Interval-mean GHI, W/m2, indexed by tz-aware interval start times.
    step_min : int
        Interval length in minutes (divides 60).
    latitude_deg, longitude_deg : float
        Site, north and east positive.

    Returns
    -------
    offset_min : float
        Median offset, minutes; positive when the data appear *later* than
        the sun, i.e. the true interval is earlier than the labelling says.
        NaN when fewer than five complete days with sun are available.
    n_days : int
        Number of days the median was taken over.

    Notes
    -----
    If the labelling convention the midpoints were derived from is ``a``
    minutes from timestamp to midpoint, the true one is about
    ``a - offset_min``.

    References
    ----------
    Sun position: Reda, I. & Andreas, A. (2004). Solar position algorithm for
    solar radiation applications. Solar Energy 76(5), 577-589 (NREL SPA, via
    :func:`pvlib.solarposition.get_solarposition`). Daily clearness index
    ``K_T = H / H0``: Duffie & Beckman (2013), eq. 2.9.1. The centroid
    comparison itself is this module's construction (no published source).
    Duffie & Beckman (2013), eq. 2.9.1 number from memory.
    """
    _check_step(step_min)
    _check_site(latitude_deg, longitude_deg)
    index = pd.DatetimeIndex(ghi.index)
    if index.tz is None:
        raise ValueError("ghi must be indexed by tz-aware interval start times")
    midpoints = index.tz_convert("UTC") + pd.Timedelta(minutes=step_min / 2)
    geometry = _geometry(midpoints, latitude_deg, longitude_deg)
    return _offset_from_geometry(ghi.to_numpy(dtype=float), midpoints, geometry, step_min,
                                 longitude_deg)


def _offset_from_geometry(ghi, midpoints, geometry, step_min, longitude_deg):
    offset, kt = _daily_offsets(ghi, midpoints, geometry, step_min, longitude_deg)
    if offset.size < _MIN_CHECK_DAYS:
        return np.nan, 0
    clear = kt >= _CLEAR_DAY_KT
    if clear.sum() < _MIN_CHECK_DAYS:
        n_pick = max(_MIN_CHECK_DAYS, offset.size // 10)
        clear = np.zeros(offset.size, dtype=bool)
        clear[np.argsort(kt)[::-1][:n_pick]] = True
    return float(np.median(offset[clear])), int(clear.sum())


def _labelling_finding(offset: float, n_days: int, label: TimestampLabel, step_min: int,
                       tz: datetime.tzinfo | None) -> Finding:
    """Turn a measured offset into a finding with the likely cause."""
    if not np.isfinite(offset):
        return Finding("labelling", "info",
                       "labelling check skipped: fewer than five complete days with sun")
    text = (f"daily GHI centroid is {offset:+.1f} min from the sun's (cos-zenith) centroid "
            f"(median over {n_days} clear-ish days, midpoints from timestamp_label='{label}')")
    if abs(offset) < LABEL_OFFSET_WARNING_MIN:
        return Finding("labelling", "info", text + ": consistent")
    a_true = _midpoint_offset_min(label, step_min) - offset
    best = None
    for cand in ("start", "centre", "end"):
        residual = a_true - _midpoint_offset_min(cand, step_min)
        hours = round(residual / 60.0)
        score = abs(residual - 60.0 * hours) + (0.0 if hours == 0 else 1e-6)
        if best is None or score < best[0]:
            best = (score, cand, hours)
    score, cand, hours = best
    tolerance = max(10.0, step_min / 4)
    if score > tolerance:
        cause = "not explained by the timestamp labelling or a whole-hour zone error"
    else:
        parts = []
        if cand != label:
            parts.append(f"the timestamps probably label the interval {cand!r}, not {label!r}")
        if hours:
            # true midpoints |hours| later than assumed <=> true UTC offset smaller
            zone_h = -hours
            if isinstance(tz, datetime.timezone):
                given = tz.utcoffset(None)
                better = _zone_name(datetime.timezone(given + datetime.timedelta(hours=zone_h)))
                hint = f"timezone='{better}' instead of '{_zone_name(tz)}' would align the data"
            else:
                hint = (f"a UTC offset {abs(zone_h)} h {'larger' if zone_h > 0 else 'smaller'} "
                        "would align the data")
            parts.append(f"the time zone is probably off by {zone_h:+d} h ({hint}; e.g. "
                         "daylight-saving time, or local time read as UTC)")
        cause = "; ".join(parts)
    return Finding("labelling", "warning", f"{text}: {cause}")


# --------------------------------------------------------------------------
# Shared assembly
# --------------------------------------------------------------------------


def _assemble(raw: pd.DataFrame, file_columns: Mapping[str, str], labels: pd.DatetimeIndex,
              lines: np.ndarray, *, file: str, source: str, label: TimestampLabel,
              tz: datetime.tzinfo | None, units: str, step_min: int | None,
              reference_year: int | None, latitude_deg: float | None,
              longitude_deg: float | None, missing_rules, scale: Mapping[str, float] | None,
              check_labelling: bool, findings: list[Finding],
              header_site: tuple[float | None, float | None, float | None] = (None, None, None),
              decimal: str = ".",
              unit_candidates: Sequence[str] = ("w_m2", "wh_m2", "kj_m2")) -> WeatherData:
    """Common pipeline: values, calendar, time zone, checks -> WeatherData."""
    if len(raw) < 2:
        raise WeatherImportError(file, None, f"only {len(raw)} data rows; need at least two")
    lines = np.asarray(lines, dtype=np.int64)
    values = {q: _to_numeric(raw[q], lines, file, file_columns[q], decimal) for q in raw.columns}

    # --- wall clock and interval length
    aware = labels.tz is not None
    if aware:
        wall_tz = tz if tz is not None else labels.tz
        labels_wall = labels.tz_convert(wall_tz).tz_localize(None)
        if tz is not None:
            findings.append(Finding("timezone", "info",
                                    "timestamps carry UTC offsets; those are used, the timezone "
                                    "argument only sets the local calendar"))
    else:
        if tz is None:
            raise WeatherImportError(
                file, int(lines[0]),
                f"timestamp {labels[0]} has no UTC offset: give timezone= (IANA name such as "
                "'Europe/Berlin' or a fixed offset such as '+01:00')",
            )
        labels_wall = labels
    if step_min is None:
        step_min = _infer_step_min(labels if aware else labels_wall, lines, file)
    shift = _label_to_start(label, step_min)
    starts_wall = labels_wall + shift

    # --- typical years and reference-year mapping (on the wall clock)
    mapped, keep = _map_years(starts_wall, lines, reference_year, file, findings)
    if not keep.all():
        values = {q: v[keep] for q, v in values.items()}
        lines, labels, starts_wall = lines[keep], labels[keep], starts_wall[keep]
    delta = mapped - starts_wall  # zero unless years were mapped

    # --- order (wrap, backwards steps) in file order, then sort stably
    key = (labels.tz_convert("UTC") + delta) if aware else mapped
    _order_findings(pd.DatetimeIndex(key), mapped, lines, findings)
    order = np.argsort(pd.DatetimeIndex(key).asi8, kind="stable")
    values = {q: v[order] for q, v in values.items()}
    lines, mapped = lines[order], mapped[order]
    if aware:
        labels_utc = (labels.tz_convert("UTC") + delta)[order]
    else:
        labels_utc = _localize(mapped - shift, tz, lines, file, findings).tz_convert("UTC")
    starts = pd.DatetimeIndex(labels_utc + shift)
    order = np.argsort(starts.asi8, kind="stable")
    starts, lines, mapped = starts[order], lines[order], mapped[order]
    values = {q: v[order] for q, v in values.items()}

    # --- exact duplicates
    dup = starts.duplicated(keep="first")
    if dup.any():
        frame = pd.DataFrame(values, index=starts)
        same = frame[starts.isin(starts[dup])].groupby(level=0).nunique(dropna=False)
        identical = bool((same <= 1).all(axis=None))
        idx = np.flatnonzero(dup)
        findings.append(Finding(
            "duplicate", "warning",
            f"{int(dup.sum())} duplicate timestamps ({_lines_text(lines[idx])}; first "
            f"{starts[idx[0]]:%Y-%m-%d %H:%M} UTC) with "
            f"{'identical' if identical else 'different'} values; the first occurrence kept",
            int(lines[idx[0]]),
        ))
        keep2 = ~dup
        starts, lines, mapped = starts[keep2], lines[keep2], mapped[keep2]
        values = {q: v[keep2] for q, v in values.items()}

    # --- gaps and irregular steps
    ratio = np.diff(((starts - starts[0]) / pd.Timedelta(minutes=step_min)).to_numpy(dtype=float))
    irregular = np.abs(ratio - np.round(ratio)) > 1e-9
    if irregular.any():
        idx = np.flatnonzero(irregular) + 1
        findings.append(Finding(
            "irregular", "warning",
            f"{int(irregular.sum())} timestamps off the {step_min}-min grid "
            f"({_lines_text(lines[idx])})", int(lines[idx[0]]),
        ))
    gap = (ratio > 1.5) & ~irregular
    if gap.any():
        idx = np.flatnonzero(gap)
        n_missing = int(np.round(ratio[gap] - 1).sum())
        first = [f"{starts[i] + pd.Timedelta(minutes=step_min):%Y-%m-%d %H:%M} UTC "
                 f"({int(round(ratio[i] - 1))} missing, before line {int(lines[i + 1])})"
                 for i in idx[:3]]
        findings.append(Finding(
            "gap", "warning",
            f"{n_missing} missing intervals in {idx.size} gaps; first: " + "; ".join(first),
            int(lines[idx[0] + 1]),
        ))

    # --- leap day (wall-clock calendar of the file)
    leap = np.asarray((mapped.month == 2) & (mapped.day == 29))
    if leap.any():
        idx = np.flatnonzero(leap)
        findings.append(Finding(
            "leap_day", "info",
            f"29 February present ({int(leap.sum())} intervals from line {int(lines[idx[0]])})",
            int(lines[idx[0]]),
        ))

    # --- values
    if scale:
        for q, s in scale.items():
            if q in values:
                values[q] = values[q] * s
    _missing(values, lines, missing_rules, findings)
    midpoints = starts + pd.Timedelta(minutes=step_min / 2)
    if latitude_deg is not None:
        geometry = _geometry(midpoints, latitude_deg, longitude_deg)
    else:
        geometry = None
    if any(c in values for c in IRRADIANCE_COLUMNS):
        factor = _decide_units(values, units, step_min, geometry, file, findings,
                               unit_candidates)
        for c in IRRADIANCE_COLUMNS:
            if c in values:
                values[c] = values[c] * factor
    _negatives_and_limits(values, lines, findings)

    # --- labelling check
    if check_labelling and latitude_deg is not None and "ghi" in values:
        offset, n_days = _offset_from_geometry(values["ghi"], midpoints, geometry, step_min,
                                               longitude_deg)
        findings.append(_labelling_finding(offset, n_days, label, step_min, tz))
    elif check_labelling:
        why = "no site coordinates" if latitude_deg is None else "no ghi column"
        findings.append(Finding("labelling", "info", f"labelling check skipped: {why}"))

    data = pd.DataFrame({c: values[c] for c in DATA_COLUMNS if c in values},
                        index=pd.DatetimeIndex(starts, name="interval_start").as_unit("ns"))
    lat, lon, alt = header_site
    return WeatherData(
        data=data, step_min=int(step_min), source=source, timestamp_label=label,
        findings=tuple(findings), timezone=_zone_name(tz) if tz is not None else (
            _zone_name(labels.tz) if aware else None),
        latitude_deg=lat, longitude_deg=lon, altitude_m=alt,
    )


# --------------------------------------------------------------------------
# Generic CSV
# --------------------------------------------------------------------------


def read_weather_csv(path, columns: ColumnMap, *, timestamp_label: TimestampLabel,
                     timezone, units: Literal["auto", "w_m2", "wh_m2", "kj_m2"] = "auto",
                     step_min: int | None = None, reference_year: int | None = None,
                     latitude_deg: float | None = None, longitude_deg: float | None = None,
                     timestamp_format: str | None = None, dayfirst: bool = False,
                     sep: str = ",", decimal: str = ".", skiprows: int = 0,
                     encoding: str = "utf-8",
                     missing_values: Sequence[float] = DEFAULT_MISSING_VALUES,
                     check_labelling: bool = True) -> WeatherData:
    """Read a weather CSV file with an explicit column mapping.

    Parameters
    ----------
    path : str or path-like
        CSV file with one header row (after ``skiprows`` lines).
    columns : ColumnMap
        Which file columns hold the timestamp(s) and each quantity.
    timestamp_label : {'start', 'end', 'centre'}
        What each timestamp marks in its interval. Required: there is no
        safe default (TMY3/EPW label the end, many loggers the start, some
        data services the centre).
    timezone : str, float, tzinfo or None
        Zone of naive timestamps: an IANA name (``'Europe/Berlin'``, with its
        daylight-saving rules) or a fixed UTC offset (``'+01:00'``,
        ``'UTC-5'``, ``-5.0`` hours). Timestamps that carry their own offset
        are respected; ``None`` is then allowed.
    units : {'auto', 'w_m2', 'wh_m2', 'kj_m2'}
        Unit of the irradiance columns: W/m2 interval mean, Wh/m2 or kJ/m2
        per interval. ``'auto'`` decides from the values and reports how.
        For hourly data W/m2 and Wh/m2 are numerically equal; for a step of
        ``s`` minutes, ``W/m2 = Wh/m2 * 60 / s = kJ/m2 * 1000 / (60 s)``.
    step_min : int, optional
        Interval length in minutes; inferred (most common timestamp
        difference) if omitted. Must divide 60.
    reference_year : int, optional
        Map every interval onto this calendar year (typical-year files).
        Without it, a typical-year file whose months come from different
        years is mapped onto 1990 (1992 if 29 February is present), reported.
    latitude_deg, longitude_deg : float, optional
        Site, for the labelling check and the unit decision.
    timestamp_format : str, optional
        :func:`datetime.datetime.strptime` format; inferred if omitted.
    dayfirst : bool
        For inferred formats, read ``01/02`` as 1 February.
    sep, decimal, skiprows, encoding
        Passed to :func:`pandas.read_csv` (``decimal`` is applied to the
        mapped numeric columns).
    missing_values : sequence of float
        Sentinels read as missing in every mapped data column.
    check_labelling : bool
        Run the timestamp-labelling check when the site is known.

    Returns
    -------
    WeatherData

    Raises
    ------
    WeatherImportError
        File unreadable, mapped column missing (the message lists the columns
        found), unparseable timestamp or non-numeric value (with the line
        number), or irradiance impossible in every unit.
    ValueError
        Invalid arguments.

    Notes
    -----
    Line numbers count every physical line of the file, header included.
    Fields containing quoted line breaks would shift them.
    """
    label = _normalise_label(timestamp_label)
    tz = _parse_timezone(timezone)
    if units not in ("auto", "w_m2", "wh_m2", "kj_m2"):
        raise ValueError(f"units must be 'auto', 'w_m2', 'wh_m2' or 'kj_m2' (got {units!r})")
    _check_step(step_min)
    _check_reference_year(reference_year)
    _check_site(latitude_deg, longitude_deg)
    if not isinstance(skiprows, int) or skiprows < 0:
        raise ValueError(f"skiprows must be a non-negative integer (got {skiprows!r})")
    file = Path(path).name
    try:
        table = pd.read_csv(path, sep=sep, skiprows=skiprows, dtype=str, keep_default_na=False,
                            skip_blank_lines=False, encoding=encoding)
    except (OSError, UnicodeDecodeError, pd.errors.ParserError, pd.errors.EmptyDataError) as exc:
        raise WeatherImportError(file, None, f"cannot read as CSV: {exc}") from exc
    table.columns = [str(c).strip() for c in table.columns]
    lines = skiprows + 2 + np.arange(len(table))
    blank = (table == "").all(axis=1).to_numpy()
    table, lines = table.loc[~blank], lines[~blank]

    wanted = {"timestamp": columns.timestamp, "date": columns.date, "time": columns.time}
    wanted = {k: v for k, v in wanted.items() if v is not None} | columns.data_columns()
    absent = [v for v in wanted.values() if v.strip() not in table.columns]
    if absent:
        raise WeatherImportError(
            file, skiprows + 1,
            f"mapped column{'s' if len(absent) > 1 else ''} "
            f"{', '.join(repr(a) for a in absent)} not found; the header has: "
            + ", ".join(repr(c) for c in table.columns),
        )
    if columns.timestamp is not None:
        text = table[columns.timestamp.strip()]
        column = columns.timestamp
    else:
        time_text = table[columns.time.strip()].astype("str").str.strip()
        bare_hour = time_text.str.fullmatch(r"\d{1,2}")
        time_text = time_text.where(~bare_hour, time_text.str.zfill(2) + ":00")
        text = table[columns.date.strip()].astype("str").str.strip() + " " + time_text
        column = f"{columns.date}+{columns.time}"
    labels = _parse_timestamps(text, lines, file, column, timestamp_format, dayfirst)
    data_map = columns.data_columns()
    raw = pd.DataFrame({q: table[c.strip()].to_numpy() for q, c in data_map.items()})
    rules = {q: (tuple(missing_values), None) for q in data_map}
    return _assemble(
        raw, data_map, labels, lines, file=file, source=f"{file} (CSV)", label=label, tz=tz,
        units=units, step_min=step_min, reference_year=reference_year,
        latitude_deg=latitude_deg, longitude_deg=longitude_deg, missing_rules=rules,
        scale=None, check_labelling=check_labelling, findings=[], decimal=decimal,
    )


# --------------------------------------------------------------------------
# Typical-year formats via pvlib.iotools
# --------------------------------------------------------------------------

#: Missing-value rules of the EPW data dictionary (EnergyPlus Auxiliary
#: Programs): radiation fields >= 9999, dry bulb 99.9, wind speed 999.
_EPW_MISSING = {"ghi": ((), 9999.0), "dni": ((), 9999.0), "dhi": ((), 9999.0),
                "temp_air": ((99.9,), None), "wind_speed": ((), 999.0)}
#: TMY3 files mark missing values with -9900 (seen in pvlib's bundled
#: 703165TY.csv, e.g. the visibility column) besides the generic sentinels.
_TMY3_MISSING = {q: (DEFAULT_MISSING_VALUES + (-9900.0,), None) for q in DATA_COLUMNS}
_TMY2_MISSING = {q: (DEFAULT_MISSING_VALUES, None) for q in DATA_COLUMNS}


def _sniff_format(path: Path) -> str:
    suffix = path.suffix.lower()
    try:
        with open(path, encoding="utf-8", errors="replace") as handle:
            first = handle.readline()
            second = handle.readline()
    except OSError as exc:
        raise WeatherImportError(path.name, None, f"cannot open: {exc}") from exc
    if first.upper().startswith("LOCATION,"):
        return "epw"
    if second.startswith("Date (MM/DD/YYYY)"):
        return "tmy3"
    if suffix == ".tm2":
        return "tmy2"
    raise WeatherImportError(
        path.name, None,
        "format not recognised (expected EPW starting with 'LOCATION,', TMY3 CSV with "
        "'Date (MM/DD/YYYY)' on line 2, or TMY2 '.tm2'); read other CSV files with "
        "read_weather_csv and a ColumnMap",
    )


def _read_tmy3(path: Path):
    file = path.name
    try:
        table, meta = pvlib.iotools.read_tmy3(path, map_variables=True)
    except Exception as exc:  # pvlib raises various pandas errors
        # locate the first bad date/time with our own parser for a line number
        try:
            raw = pd.read_csv(path, skiprows=1, dtype=str, keep_default_na=False)
            lines = 3 + np.arange(len(raw))
            _parse_timestamps(raw["Date (MM/DD/YYYY)"] + " " + raw["Time (HH:MM)"], lines,
                              file, "Date (MM/DD/YYYY)+Time (HH:MM)", "%m/%d/%Y %H:%M", False)
        except WeatherImportError:
            raise
        except Exception:
            pass
        raise WeatherImportError(file, None, f"not a readable TMY3 file: {exc}") from exc
    lines = 3 + np.arange(len(table))  # line 1 site header, line 2 column header
    text = table["Date (MM/DD/YYYY)"].astype("str") + " " + table["Time (HH:MM)"].astype("str")
    labels = _parse_timestamps(text.reset_index(drop=True), lines, file,
                               "Date (MM/DD/YYYY)+Time (HH:MM)", "%m/%d/%Y %H:%M", False)
    names = {"ghi": "GHI (W/m^2)", "dni": "DNI (W/m^2)", "dhi": "DHI (W/m^2)",
             "temp_air": "Dry-bulb (C)", "wind_speed": "Wspd (m/s)"}
    raw = pd.DataFrame({q: table[q].to_numpy() for q in names if q in table.columns})
    site = (float(meta["latitude"]), float(meta["longitude"]), float(meta["altitude"]))
    return raw, names, labels, lines, _fixed_zone(float(meta["TZ"])), site, _TMY3_MISSING, None


def _read_epw(path: Path):
    file = path.name
    try:
        table, meta = pvlib.iotools.read_epw(path)
    except Exception as exc:
        raise WeatherImportError(file, None, f"not a readable EPW file: {exc}") from exc
    lines = 9 + np.arange(len(table))  # 8 header records
    records_per_hour = 1
    try:
        with open(path, encoding="utf-8", errors="replace") as handle:
            header = [handle.readline() for _ in range(8)]
        periods = next((h for h in header if h.upper().startswith("DATA PERIODS")), None)
        if periods is not None:
            records_per_hour = int(periods.split(",")[2])
    except (ValueError, IndexError):
        records_per_hour = 1
    fields = {}
    for name in ("year", "month", "day", "hour", "minute"):
        fields[name] = _to_numeric(table[name].reset_index(drop=True), lines, file, name)
    dates = pd.to_datetime(pd.DataFrame({k: fields[k] for k in ("year", "month", "day")}),
                           errors="coerce")
    bad = dates.isna().to_numpy() | ~np.isin(fields["hour"], np.arange(1, 25))
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise WeatherImportError(
            file, int(lines[i]),
            f"invalid date/hour {int(fields['year'][i])}-{int(fields['month'][i])}-"
            f"{int(fields['day'][i])} hour {fields['hour'][i]:g} (hour must be 1..24)",
        )
    # EPW: "Hour 1 is 00:01 to 01:00" - the hour field labels the END of the hour.
    if records_per_hour > 1:
        offset = pd.to_timedelta(fields["hour"] - 1, unit="h") + pd.to_timedelta(
            fields["minute"], unit="min")
    else:
        offset = pd.to_timedelta(fields["hour"], unit="h")
    labels = pd.DatetimeIndex(dates) + offset
    names = {"ghi": "Global Horizontal Radiation", "dni": "Direct Normal Radiation",
             "dhi": "Diffuse Horizontal Radiation", "temp_air": "Dry Bulb Temperature",
             "wind_speed": "Wind Speed"}
    raw = pd.DataFrame({q: table[q].to_numpy() for q in names})
    site = (float(meta["latitude"]), float(meta["longitude"]), float(meta["altitude"]))
    return raw, names, labels, lines, _fixed_zone(float(meta["TZ"])), site, _EPW_MISSING, \
        records_per_hour


def _read_tmy2(path: Path):
    file = path.name
    try:
        table, meta = pvlib.iotools.read_tmy2(str(path))
    except Exception as exc:
        raise WeatherImportError(file, None, f"not a readable TMY2 file: {exc}") from exc
    lines = 2 + np.arange(len(table))  # line 1 site header
    year = table["year"].to_numpy(dtype=float)
    year = np.where(year < 100, 1900 + year, year)
    dates = pd.to_datetime(pd.DataFrame({"year": year, "month": table["month"].to_numpy(),
                                         "day": table["day"].to_numpy()}), errors="coerce")
    if dates.isna().any():
        i = int(np.flatnonzero(dates.isna().to_numpy())[0])
        raise WeatherImportError(file, int(lines[i]), "invalid date")
    # TMY2: values are for "the 60 minutes preceding the hour indicated" (hour 1..24).
    labels = pd.DatetimeIndex(dates) + pd.to_timedelta(table["hour"].to_numpy(), unit="h")
    names = {"ghi": "GHI", "dni": "DNI", "dhi": "DHI", "temp_air": "DryBulb",
             "wind_speed": "Wspd"}
    raw = pd.DataFrame({q: table[c].to_numpy() for q, c in names.items()})
    site = (float(meta["latitude"]), float(meta["longitude"]), float(meta["altitude"]))
    # DryBulb in tenths of degC, Wspd in tenths of m/s (Marion & Urban 1995, Table 3-2,
    # as quoted in the pvlib read_tmy2 docstring)
    scale = {"temp_air": 0.1, "wind_speed": 0.1}
    return raw, names, labels, lines, _fixed_zone(float(meta["TZ"])), site, _TMY2_MISSING, scale


def read_weather_file(path, *, latitude_deg: float | None = None,
                      longitude_deg: float | None = None, reference_year: int | None = None,
                      file_format: Literal["tmy3", "tmy2", "epw"] | None = None,
                      check_labelling: bool = True) -> WeatherData:
    """Read a typical-year weather file in a public format.

    The file is parsed by :mod:`pvlib.iotools` (:func:`~pvlib.iotools.read_tmy3`,
    :func:`~pvlib.iotools.read_tmy2`, :func:`~pvlib.iotools.read_epw`); the
    timestamps are rebuilt from the file's own date and hour fields so that
    each value lands on its interval, with the format's labelling convention:

    ========  =======================================================  ==========
    format    convention                                               label
    ========  =======================================================  ==========
    TMY3      local standard time; radiation "received during the 60   ``'end'``
              minutes prior to timestamp", 01:00 .. 24:00 (Wilcox &
              Marion 2008; as quoted by pvlib ``read_tmy3``)
    TMY2      local standard time; "energy received during the 60       ``'end'``
              minutes preceding the hour indicated", hours 1..24
              (Marion & Urban 1995, section 3)
    EPW       "Hour 1 is 00:01 to 01:00"; radiation "during the number  ``'end'``
              of minutes preceding the time indicated" (EnergyPlus
              Auxiliary Programs, EPW Data Dictionary, field Hour)
    ========  =======================================================  ==========

    All three store radiation as Wh/m2 per hour, numerically equal to the
    hourly mean in W/m2. The time zone is the fixed offset in the file
    header.

    Parameters
    ----------
    path : str or path-like
        The file. Recognised by content (EPW: first record ``LOCATION``;
        TMY3: ``Date (MM/DD/YYYY)`` header on line 2) or the ``.tm2``
        extension.
    latitude_deg, longitude_deg : float, optional
        Site for the labelling check; defaults to the coordinates in the
        file header (reported if they differ by more than 1 degree).
    reference_year : int, optional
        Calendar year to map all intervals onto; typical-year files mixing
        years are mapped onto 1990 (1992 with 29 February) if omitted.
    file_format : {'tmy3', 'tmy2', 'epw'}, optional
        Skip format recognition.
    check_labelling : bool
        Run the timestamp-labelling check.

    Returns
    -------
    WeatherData
        ``timestamp_label`` is ``'end'`` for all three formats.

    Raises
    ------
    WeatherImportError
        Unrecognised or unreadable file, bad date or value (with line number).

    References
    ----------
    Wilcox, S. & Marion, W. (2008). Users Manual for TMY3 Data Sets.
    NREL/TP-581-43156. Marion, W. & Urban, K. (1995). User's Manual for
    TMY2s. NREL. EnergyPlus Auxiliary Programs, EPW Data Dictionary.
    """
    path = Path(path)
    _check_site(latitude_deg, longitude_deg)
    _check_reference_year(reference_year)
    fmt = file_format if file_format is not None else _sniff_format(path)
    readers = {"tmy3": _read_tmy3, "tmy2": _read_tmy2, "epw": _read_epw}
    if fmt not in readers:
        raise ValueError(f"file_format must be 'tmy3', 'tmy2' or 'epw' (got {fmt!r})")
    raw, names, labels, lines, tz, site, missing_rules, extra = readers[fmt](path)
    findings: list[Finding] = []
    units, scale, candidates = "wh_m2", None, ("w_m2", "wh_m2", "kj_m2")
    if fmt == "tmy2":
        scale = extra
    if fmt == "epw" and extra and extra > 1:
        # sub-hourly EPW: the dictionary says Wh/m2 per interval, W/m2 means also occur
        units, candidates = "auto", ("w_m2", "wh_m2")
    lat, lon = latitude_deg, longitude_deg
    if lat is None:
        lat, lon = site[0], site[1]
    elif abs(lat - site[0]) > 1.0 or abs(lon - site[1]) > 1.0:
        findings.append(Finding(
            "site", "warning",
            f"given site ({lat:.3f}, {lon:.3f}) differs from the file header "
            f"({site[0]:.3f}, {site[1]:.3f}) by more than 1 degree",
        ))
    return _assemble(
        raw, names, labels, lines, file=path.name, source=f"{path.name} ({fmt.upper()})",
        label="end", tz=tz, units=units, step_min=None, reference_year=reference_year,
        latitude_deg=lat, longitude_deg=lon, missing_rules=missing_rules, scale=scale,
        check_labelling=check_labelling, findings=findings, header_site=site,
        unit_candidates=candidates,
    )
