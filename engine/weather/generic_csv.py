"""Any CSV weather file, read with an explicit column mapping: :func:`read_weather_csv`."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import Literal

import numpy as np
import pandas as pd

from .assemble import _assemble
from .common import (
    DEFAULT_MISSING_VALUES,
    ColumnMap,
    TimestampLabel,
    WeatherData,
    WeatherImportError,
    _check_reference_year,
    _check_site,
    _check_step,
    _normalise_label,
    _parse_timestamps,
    _parse_timezone,
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
