"""Settings for the whole test suite, applied before any test module loads Qt.

No test may reach a print server. Creating a ``QPrinter`` (the print and
print-preview tests do) makes Qt's CUPS support ask the local print server for
its printers; on a machine where the print port accepts a connection and never
answers, that call blocks for good and the suite hangs. Pointing libcups at a
socket that does not exist makes the question fail at once, so Qt falls back
to its built-in paper sizes, which is all the tests need. Subprocesses started
by the command-line tests inherit the setting.
"""

from __future__ import annotations

import os
import tempfile

import pytest

os.environ["CUPS_SERVER"] = os.path.join(tempfile.gettempdir(), "tiltyard-tests-no-print-server.sock")
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def write_quarter_hour_weather(path, site) -> float:
    """Write a year of 15-minute pvlib clear-sky GHI/DNI/DHI for ``site`` as a plain CSV
    (timestamps ``time`` in UTC marking the interval start, values at the midpoints).

    Invented demo data for plumbing tests: the checks compare what comes back with what
    was written. Returns the written annual GHI, kWh/m2.
    """
    import pandas as pd
    import pvlib

    starts = pd.date_range("2023-01-01", periods=4 * 8760, freq="15min", tz="UTC")
    loc = pvlib.location.Location(site.latitude_deg, site.longitude_deg, "UTC",
                                  site.elevation_m)
    cs = loc.get_clearsky(starts + pd.Timedelta(minutes=7.5), model="ineichen")
    pd.DataFrame({"time": starts.strftime("%Y-%m-%d %H:%M"), "ghi": cs["ghi"].round(4),
                  "dni": cs["dni"].round(4), "dhi": cs["dhi"].round(4)}).to_csv(path,
                                                                                index=False)
    return float(cs["ghi"].round(4).sum()) * 0.25 / 1000.0


#: The column mapping of :func:`write_quarter_hour_weather`'s files.
QUARTER_HOUR_COLUMNS = (("timestamp", "time"), ("ghi", "ghi"), ("dni", "dni"), ("dhi", "dhi"))


@pytest.fixture(scope="session")
def quarter_hour_weather(tmp_path_factory):
    """``(path, written annual GHI kWh/m2, column mapping)`` of a 15-minute year at
    larkmoor-dairy."""
    from tiltyard.engine.demo_sites import load_demo

    path = tmp_path_factory.mktemp("weather") / "quarter-hours.csv"
    return (path, write_quarter_hour_weather(path, load_demo("larkmoor-dairy")),
            QUARTER_HOUR_COLUMNS)


def _write_epw(path, tmy3_frame, meta):
    """EPW file with the TMY3 sample's values (EnergyPlus EPW data dictionary layout).

    ``tmy3_frame`` holds pvlib's TMY3 columns (``Date (MM/DD/YYYY)``, ``Time (HH:MM)``,
    ``ghi``, ``dni``, ``dhi``, ``temp_air``, ``wind_speed``), ``meta`` its header
    (``latitude``, ``longitude``, ``TZ``, ``altitude``)."""
    import numpy as np
    import pandas as pd

    date = pd.to_datetime(tmy3_frame["Date (MM/DD/YYYY)"], format="%m/%d/%Y")
    hour = tmy3_frame["Time (HH:MM)"].str[:2].astype(int)  # 1..24, like EPW's hour field
    n = len(tmy3_frame)
    zeros = np.zeros(n)
    body = pd.DataFrame({
        "year": date.dt.year.to_numpy(), "month": date.dt.month.to_numpy(),
        "day": date.dt.day.to_numpy(), "hour": hour.to_numpy(), "minute": np.full(n, 60),
        "flags": "?9?9?9?9E0?9?9?9?9?9?9?9?9?9?9?9?9?9?9?9*9*9?9?9?9",
        "temp_air": tmy3_frame["temp_air"].to_numpy(), "temp_dew": zeros,
        "relative_humidity": zeros, "pressure": np.full(n, 101325.0), "etr": zeros,
        "etrn": zeros, "ir": zeros, "ghi": tmy3_frame["ghi"].to_numpy(),
        "dni": tmy3_frame["dni"].to_numpy(), "dhi": tmy3_frame["dhi"].to_numpy(),
        "gh_illum": zeros, "dn_illum": zeros, "dh_illum": zeros, "zenith_lum": zeros,
        "wind_dir": zeros, "wind_speed": tmy3_frame["wind_speed"].to_numpy(),
        "total_sky": zeros, "opaque_sky": zeros, "visibility": zeros, "ceiling": zeros,
        "pw_obs": np.full(n, 9), "pw_codes": np.full(n, 999999999), "pwat": zeros,
        "aod": zeros, "snow": zeros, "days_snow": np.full(n, 88), "albedo": zeros,
        "liq_depth": zeros, "liq_qty": zeros,
    })
    header = [
        f"LOCATION,GREENSBORO,NC,USA,TMY3,723170,{meta['latitude']},{meta['longitude']},"
        f"{meta['TZ']},{meta['altitude']}",
        "DESIGN CONDITIONS,0", "TYPICAL/EXTREME PERIODS,0", "GROUND TEMPERATURES,0",
        "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0", "COMMENTS 1,test file", "COMMENTS 2,test file",
        "DATA PERIODS,1,1,Data,Sunday, 1/ 1,12/31",
    ]
    with open(path, "w", newline="") as handle:
        handle.write("\n".join(header) + "\n")
        body.to_csv(handle, header=False, index=False, lineterminator="\n")
    return path


@pytest.fixture(scope="session")
def write_epw():
    """The EPW writer (:func:`_write_epw`): ``write_epw(path, tmy3_frame, meta) -> path``."""
    return _write_epw
