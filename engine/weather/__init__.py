"""Import of measured or typical-year weather files for a site.

The rest of the engine computes all-sky irradiance from the series this module
returns, so the import is strict about *time*: every value is placed on the
interval it belongs to, and everything that had to be decided on the way is
recorded as a :class:`Finding` rather than guessed silently.

Conventions of the result (:class:`WeatherData`)
------------------------------------------------
* Each row is one interval of ``step_min`` minutes. The index holds the
  interval **start** times, timezone-aware, in UTC.
* Irradiance columns (``ghi``, ``dni``, ``dhi``) are **interval means** in
  W/m2, whatever the file stored (W/m2, Wh/m2 or kJ/m2 per interval).
  ``temp_air`` [degC] and ``wind_speed`` [m/s] are the file's values for the
  interval.
* The evaluation time of an interval, e.g. for the sun position that goes with
  its irradiance, is its **midpoint** (``WeatherData.midpoints``): the sun
  position at the midpoint is the usual approximation for an interval mean
  (Duffie & Beckman 2013, ch. 1-2, evaluate hourly quantities at the hour
  angle of the midpoint of the hour; from memory).
* Columns the file does not provide are absent, never filled with zeros.

Readers
-------
:func:`read_weather_csv`
    Any CSV file, with an explicit :class:`ColumnMap`, an explicit statement
    of what the timestamps label (interval start, end or centre) and of the
    time zone of naive timestamps.
:func:`read_weather_file`
    Public typical-year formats read offline by :mod:`pvlib.iotools`: TMY3
    CSV, TMY2 and EPW. Their labelling conventions are fixed by the format
    and documented there.

Checks
------
Units, gaps, duplicates (with daylight-saving fall-back detection), leap days,
non-monotonic timestamps, typical-year files whose months come from different
years or that start with December, negative irradiance, missing values and
sentinels, physical limits, and a labelling check that compares the daily
GHI-weighted centroid time with the cos(zenith)-weighted one
(:func:`timestamp_offset_min`).

Modules
-------
``common``
    The result types, constants, argument checks and parsers every reader
    shares.
``timeline``, ``checks``, ``assemble``
    Calendar and ordering; value checks and the labelling check; the pipeline
    every reader ends in.
``generic_csv``, ``tmy3``, ``tmy2``, ``epw``, ``files``
    One reader per format; ``files`` recognises a typical-year format.
``preview``
    Header reading, column guesses, the outcomes of reading a file for a site
    and their texts, for a caller without a GUI. Reading a file *for a site*
    (with the check against the site's year) is
    :func:`tiltyard.engine.weather_check.read_weather_for_site`, outside this
    package because it uses the sky-year code that imports this package.

References
----------
Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal Processes,
4th ed. Wiley.

Wilcox, S. & Marion, W. (2008). Users Manual for TMY3 Data Sets.
NREL/TP-581-43156. doi:10.2172/928611

Marion, W. & Urban, K. (1995). User's Manual for TMY2s. NREL.
doi:10.2172/87130

EnergyPlus Auxiliary Programs, "EnergyPlus Weather File (EPW) Data
Dictionary" (EnergyPlus documentation, v24.1).
"""

from __future__ import annotations

from .checks import timestamp_offset_min
from .common import (
    DATA_COLUMNS,
    DEFAULT_MISSING_VALUES,
    EXTRATERRESTRIAL_MAX_W_M2,
    IRRADIANCE_COLUMNS,
    LABEL_OFFSET_WARNING_MIN,
    SOLAR_CONSTANT_W_M2,
    TYPICAL_LEAP_YEAR_DEFAULT,
    TYPICAL_YEAR_DEFAULT,
    ColumnMap,
    Finding,
    Severity,
    TimestampLabel,
    WeatherData,
    WeatherImportError,
)
from .files import read_weather_file
from .generic_csv import read_weather_csv
from .preview import (
    LABELS,
    MAPPED_COLUMNS,
    CsvHeader,
    Loaded,
    LoadFailure,
    finding_text,
    guess_columns,
    read_header,
    summary_text,
)

__all__ = [
    "ColumnMap",
    "Finding",
    "WeatherData",
    "WeatherImportError",
    "read_weather_csv",
    "read_weather_file",
    "timestamp_offset_min",
    "DEFAULT_MISSING_VALUES",
    "EXTRATERRESTRIAL_MAX_W_M2",
    # around an import, for a caller without a GUI (preview.py)
    "CsvHeader",
    "LoadFailure",
    "Loaded",
    "LABELS",
    "MAPPED_COLUMNS",
    "finding_text",
    "guess_columns",
    "read_header",
    "summary_text",
    # module-level names of the former single module, kept importable
    "DATA_COLUMNS",
    "IRRADIANCE_COLUMNS",
    "LABEL_OFFSET_WARNING_MIN",
    "SOLAR_CONSTANT_W_M2",
    "TYPICAL_LEAP_YEAR_DEFAULT",
    "TYPICAL_YEAR_DEFAULT",
    "Severity",
    "TimestampLabel",
]
