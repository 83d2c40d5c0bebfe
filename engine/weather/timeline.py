"""The calendar of an import: typical-year year mixing, year wraps, ordering, daylight saving.

All functions work on wall-clock interval starts and record what they decide
as :class:`~tiltyard.engine.weather.common.Finding` objects.
"""

from __future__ import annotations

import datetime
import zoneinfo

import numpy as np
import pandas as pd

from ..words import MONTH_ABBR
from .common import (
    TYPICAL_LEAP_YEAR_DEFAULT,
    TYPICAL_YEAR_DEFAULT,
    Finding,
    WeatherImportError,
    _lines_text,
    _zone_name,
)

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
        parts.append(f"{MONTH_ABBR[month - 1]} {ys}")
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
