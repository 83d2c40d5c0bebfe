"""Checks of the values of an import: missing values, units, negatives, limits, labelling.

The unit decision, the clipping of night-time offsets, the physical limits and
the timestamp-labelling check (:func:`timestamp_offset_min`), which compares
the daily GHI-weighted centroid time with the cos(zenith)-weighted one.

References
----------
Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal Processes,
4th ed. Wiley.
"""

from __future__ import annotations

import datetime
from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd
import pvlib

from .common import (
    _CLEAR_DAY_KT,
    _KT99_RANGE,
    _KT_MIN_COS_ZENITH,
    _MAX_LISTED,
    _MIN_CHECK_DAYS,
    _NIGHT_OFFSET_LIMIT_W_M2,
    _PEAK_MIN_W_M2,
    _UNIT_NAMES,
    _VALID_RANGE,
    EXTRATERRESTRIAL_MAX_W_M2,
    IRRADIANCE_COLUMNS,
    LABEL_OFFSET_WARNING_MIN,
    Finding,
    TimestampLabel,
    WeatherImportError,
    _check_site,
    _check_step,
    _lines_text,
    _midpoint_offset_min,
    _zone_name,
)

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
                what.append(f"{int(nan.sum())} empty or not a number")
            if sentinel.any():
                what.append(f"{int(sentinel.sum())} sentinel "
                            + "/".join(f"{v:g}" for v in found[:_MAX_LISTED]))
            findings.append(Finding(
                "missing", "warning",
                f"{col}: {int(missing.sum())} missing values ({', '.join(what)}) at "
                f"{_lines_text(lines[idx])}; treated as missing",
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
