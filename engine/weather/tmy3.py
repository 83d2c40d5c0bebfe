"""TMY3 CSV files (Wilcox & Marion 2008), parsed by :func:`pvlib.iotools.read_tmy3`.

References
----------
Wilcox, S. & Marion, W. (2008). Users Manual for TMY3 Data Sets.
NREL/TP-581-43156. doi:10.2172/928611
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pvlib

from .common import (
    DATA_COLUMNS,
    DEFAULT_MISSING_VALUES,
    WeatherImportError,
    _header_zone,
    _parse_timestamps,
)

#: TMY3 files mark missing values with -9900 (seen in pvlib's bundled
#: 703165TY.csv, e.g. the visibility column) besides the generic sentinels.
_TMY3_MISSING = {q: (DEFAULT_MISSING_VALUES + (-9900.0,), None) for q in DATA_COLUMNS}


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
    return raw, names, labels, lines, _header_zone(file, meta["TZ"]), site, _TMY3_MISSING, None
