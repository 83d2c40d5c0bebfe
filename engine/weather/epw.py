"""EnergyPlus weather (EPW) files, parsed by :func:`pvlib.iotools.read_epw`.

References
----------
EnergyPlus Auxiliary Programs, "EnergyPlus Weather File (EPW) Data
Dictionary" (EnergyPlus documentation, v24.1).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pvlib

from .common import WeatherImportError, _header_zone, _to_numeric

#: Missing-value rules of the EPW data dictionary (EnergyPlus Auxiliary
#: Programs): radiation fields >= 9999, dry bulb 99.9, wind speed 999.
_EPW_MISSING = {"ghi": ((), 9999.0), "dni": ((), 9999.0), "dhi": ((), 9999.0),
                "temp_air": ((99.9,), None), "wind_speed": ((), 999.0)}


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
    return raw, names, labels, lines, _header_zone(file, meta["TZ"]), site, _EPW_MISSING, \
        records_per_hour
