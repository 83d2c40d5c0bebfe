"""TMY2 files (Marion & Urban 1995), parsed by :func:`pvlib.iotools.read_tmy2`.

References
----------
Marion, W. & Urban, K. (1995). User's Manual for TMY2s. NREL.
doi:10.2172/87130
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pvlib

from .common import DATA_COLUMNS, DEFAULT_MISSING_VALUES, WeatherImportError, _header_zone

_TMY2_MISSING = {q: (DEFAULT_MISSING_VALUES, None) for q in DATA_COLUMNS}


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
    return raw, names, labels, lines, _header_zone(file, meta["TZ"]), site, _TMY2_MISSING, scale
