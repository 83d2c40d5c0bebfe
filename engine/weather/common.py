"""What every weather reader shares: result types, constants, argument checks, parsing.

:class:`Finding`, :class:`WeatherData`, :class:`WeatherImportError` and
:class:`ColumnMap`; the limits and sentinels the checks use; time-zone, label,
step and site argument checks; and the vectorised parsers of timestamps and
numbers that keep each row's line number beside it. The conventions of the
result are described in :mod:`tiltyard.engine.weather`.
"""

from __future__ import annotations

import dataclasses
import datetime
import re
import zoneinfo
from typing import Literal

import numpy as np
import pandas as pd

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

    def __reduce__(self):
        # picklable with its fields (the app runs engine calls in worker processes)
        return (type(self), (self.file, self.line, self.reason))


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


def _header_zone(file: str, hours) -> datetime.timezone:
    """The fixed zone of a TMY3, TMY2 or EPW header (line 1), or an import error naming it."""
    try:
        return _fixed_zone(float(hours))
    except (TypeError, ValueError) as exc:
        raise WeatherImportError(file, 1, f"time zone {hours!r} h in the header: "
                                 f"{str(exc).removeprefix('UTC offset ')}") from None


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
    except (zoneinfo.ZoneInfoNotFoundError, ValueError, OSError):   # OSError: a folder
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
    if len(text) == 0:
        raise WeatherImportError(file, None, "holds no data rows after its header")
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
    try:
        parsed = pd.to_datetime(text, **kwargs)
    except (pd.errors.OutOfBoundsDatetime, OverflowError):
        i = _first_out_of_bounds(text, kwargs)
        raise WeatherImportError(
            file, int(lines[i]), f"column {column!r}: timestamp {text.iloc[i]!r} is outside "
            f"the years {pd.Timestamp.min.year + 1} to {pd.Timestamp.max.year - 1} that can "
            "be read") from None
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


def _first_out_of_bounds(text: pd.Series, kwargs: dict) -> int:
    """Index of the first timestamp text that pandas cannot hold (0 if none is found)."""
    for i, item in enumerate(text):
        try:
            pd.to_datetime(pd.Series([item]), **kwargs)
        except (pd.errors.OutOfBoundsDatetime, OverflowError):
            return i
    return 0


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
            "(expected a decimal number, or empty or 'NaN' for a missing value)",
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
