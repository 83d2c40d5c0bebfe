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
