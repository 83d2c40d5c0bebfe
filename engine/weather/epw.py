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


def _check_dates(path: Path, file: str) -> None:
    """Refuse a data record with an impossible date or hour, naming its line, before the
    file is parsed (the parser would only say that a date did not convert).

    EPW data dictionary (EnergyPlus Auxiliary Programs): fields 1-4 are year, month,
    day and hour 1..24 of each record, after 8 header records.
    """
    try:
        raw = pd.read_csv(path, header=None, skiprows=8, usecols=range(4), dtype=str,
                          skip_blank_lines=False, encoding="utf-8", encoding_errors="replace")
    except (ValueError, pd.errors.ParserError, OSError):
        return                                  # the parser's own message says what is wrong
    lines = 9 + np.arange(len(raw))
    fields = {name: _to_numeric(raw[i], lines, file, name)
              for i, name in enumerate(("year", "month", "day", "hour"))}
    dates = pd.to_datetime(pd.DataFrame({k: fields[k] for k in ("year", "month", "day")}),
                           errors="coerce")
    bad = dates.isna().to_numpy() | ~np.isin(fields["hour"], np.arange(1, 25))
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise WeatherImportError(
            file, int(lines[i]),
            f"invalid date/hour {fields['year'][i]:g}-{fields['month'][i]:g}-"
            f"{fields['day'][i]:g} hour {fields['hour'][i]:g} (a real date, hour 1..24)")


def _read_epw(path: Path):
    file = path.name
    _check_dates(path, file)
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
    dates = pd.to_datetime(pd.DataFrame({k: fields[k] for k in ("year", "month", "day")}))
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
