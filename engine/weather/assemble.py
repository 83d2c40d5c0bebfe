"""The pipeline every reader ends in: values, calendar, time zone and checks -> WeatherData."""

from __future__ import annotations

import datetime
from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd

from .checks import (
    _decide_units,
    _geometry,
    _labelling_finding,
    _missing,
    _negatives_and_limits,
    _offset_from_geometry,
)
from .common import (
    DATA_COLUMNS,
    IRRADIANCE_COLUMNS,
    Finding,
    TimestampLabel,
    WeatherData,
    WeatherImportError,
    _infer_step_min,
    _label_to_start,
    _lines_text,
    _to_numeric,
    _zone_name,
)
from .timeline import _localize, _map_years, _order_findings

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
    labels_wall = _wall_clock(labels, tz, lines, file, findings)
    if step_min is None:
        step_min = _infer_step_min(labels if aware else labels_wall, lines, file)
    shift = _label_to_start(label, step_min)
    values, lines, mapped, starts = _utc_starts(values, lines, labels, labels_wall + shift,
                                                shift, tz, reference_year, file, findings)
    values, lines, mapped, starts = _drop_duplicates(values, lines, mapped, starts, findings)
    _grid_findings(starts, lines, step_min, findings)
    _leap_finding(mapped, lines, findings)

    # --- values
    midpoints, geometry = _convert_values(
        values, lines, starts, step_min, units=units, scale=scale, missing_rules=missing_rules,
        latitude_deg=latitude_deg, longitude_deg=longitude_deg, file=file, findings=findings,
        unit_candidates=unit_candidates)

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


def _wall_clock(labels: pd.DatetimeIndex, tz: datetime.tzinfo | None, lines: np.ndarray,
                file: str, findings: list[Finding]) -> pd.DatetimeIndex:
    """The timestamps as naive wall-clock times (in ``tz`` if given, else their own offset)."""
    if labels.tz is not None:
        wall_tz = tz if tz is not None else labels.tz
        if tz is not None:
            findings.append(Finding("timezone", "info",
                                    "timestamps carry UTC offsets; those are used, the timezone "
                                    "argument only sets the local calendar"))
        return labels.tz_convert(wall_tz).tz_localize(None)
    if tz is None:
        raise WeatherImportError(
            file, int(lines[0]),
            f"timestamp {labels[0]} has no UTC offset: give timezone= (IANA name such as "
            "'Europe/Berlin' or a fixed offset such as '+01:00')",
        )
    return labels


def _utc_starts(values: dict[str, np.ndarray], lines: np.ndarray, labels: pd.DatetimeIndex,
                starts_wall: pd.DatetimeIndex, shift: pd.Timedelta, tz: datetime.tzinfo | None,
                reference_year: int | None, file: str, findings: list[Finding]):
    """Map years, report and sort the order, localize: rows sorted by UTC interval start.

    Returns ``(values, lines, mapped, starts)``: the rows kept in time order,
    ``mapped`` their wall-clock starts (reference year applied) and ``starts``
    their UTC interval starts.
    """
    aware = labels.tz is not None
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
    return values, lines, mapped, starts


def _drop_duplicates(values: dict[str, np.ndarray], lines: np.ndarray,
                     mapped: pd.DatetimeIndex, starts: pd.DatetimeIndex,
                     findings: list[Finding]):
    """Keep the first of rows with the same interval start; returns the rows kept."""
    dup = starts.duplicated(keep="first")
    if not dup.any():
        return values, lines, mapped, starts
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
    values = {q: v[keep2] for q, v in values.items()}
    return values, lines[keep2], mapped[keep2], starts[keep2]


def _grid_findings(starts: pd.DatetimeIndex, lines: np.ndarray, step_min: int,
                   findings: list[Finding]) -> None:
    """Report timestamps off the interval grid and gaps in it."""
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


def _leap_finding(mapped: pd.DatetimeIndex, lines: np.ndarray,
                  findings: list[Finding]) -> None:
    """Report 29 February (wall-clock calendar of the file)."""
    leap = np.asarray((mapped.month == 2) & (mapped.day == 29))
    if leap.any():
        idx = np.flatnonzero(leap)
        findings.append(Finding(
            "leap_day", "info",
            f"29 February present ({int(leap.sum())} intervals from line {int(lines[idx[0]])})",
            int(lines[idx[0]]),
        ))


def _convert_values(values: dict[str, np.ndarray], lines: np.ndarray,
                    starts: pd.DatetimeIndex, step_min: int, *, units: str,
                    scale: Mapping[str, float] | None, missing_rules,
                    latitude_deg: float | None, longitude_deg: float | None, file: str,
                    findings: list[Finding], unit_candidates: Sequence[str]):
    """Scale, mark missing values, convert irradiance to W/m2 and check it (``values`` in place).

    Returns the interval midpoints and, with a site, their sun geometry (else None).
    """
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
    return midpoints, geometry
