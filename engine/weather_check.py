"""Read a weather file for a site and check it can serve as the site's year.

:func:`read_weather_for_site` is what the weather-file dialog runs in a worker
process: it reads the file (:func:`tiltyard.engine.weather_site.load_weather_for_site`),
places it on the site's year (:func:`tiltyard.engine.skyyear.sky_year`) to run
the checks that come with that, and returns one of the picklable outcomes of
:mod:`tiltyard.engine.weather.preview` instead of raising for a bad file.

Why a module of its own, beside the package rather than in it: the sky-year
code sits above the weather package (``skyyear`` imports ``weather_grid``,
which imports ``weather``). A module inside the package that imported
``skyyear`` would make the package depend on its own users, and the package's
``__init__`` could not re-export it without a real import cycle. Here all
imports are at the top level and run one way: this module -> skyyear ->
weather_grid -> weather, and this module -> weather_site -> weather.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from .assess import Basis, irradiance_options, weather_fit_warnings
from .assessment import Assessment, file_sha256
from .site import Site
from .skyyear import sky_year
from .timegrid import GRID_STEPS_MIN
from .weather import (
    CsvHeader,
    Loaded,
    LoadFailure,
    WeatherData,
    WeatherImportError,
    guess_columns,
    read_header,
)
from .weather_site import WeatherOptionError, load_weather_for_site

#: The weather dialog's label of each reading option (a message names the option by it).
OPTION_WORDS = {"timezone": "Time zone of the timestamps",
                "timestamp_label": "Each timestamp marks", "columns": "Columns"}

#: Text of :func:`~tiltyard.engine.weather_site.load_weather_for_site`'s message for a file in
#: no typical-year format read without a column mapping.
_NEEDS_MAPPING = "not a TMY3, TMY2 or EPW file"


def grid_step_problem(weather: WeatherData) -> str | None:
    """Why the site's year cannot be computed on the weather's interval, or None.

    The one place that decides which weather intervals the year accepts: the
    interval lengths of the time grid
    (:data:`tiltyard.engine.timegrid.GRID_STEPS_MIN`: every whole-minute
    interval that divides an hour).

    Parameters
    ----------
    weather : WeatherData
        An imported series.

    Returns
    -------
    str or None
        The reason, naming the interval and those allowed, without the file name.
    """
    if weather.step_min in GRID_STEPS_MIN:
        return None
    return (f"{weather.step_min}-minute intervals; the year is computed on intervals of "
            f"{', '.join(map(str, GRID_STEPS_MIN))} minutes: resample the file")


def read_weather_for_site(path, site: Site, columns: dict | None = None,
                          timestamp_label: str | None = None, timezone: str | None = None,
                          progress: Callable | None = None):
    """Read a weather file for ``site`` and check it can serve as the year's sky.

    Returns :class:`Loaded`, :class:`CsvHeader` (a CSV file read without a
    column mapping) or :class:`LoadFailure`; nothing is raised for a bad
    file, so the dialog can show the message where the user is looking.

    Parameters
    ----------
    path : str or path-like
        The file.
    site : Site
        The site whose year the series must serve.
    columns : dict, optional
        Our column names to the file's header names, for a CSV file; see
        :func:`tiltyard.engine.weather_site.load_weather_for_site`.
    timestamp_label : {'start', 'end', 'centre'}, optional
        What each timestamp of a CSV file marks in its interval.
    timezone : str, optional
        Zone of a CSV file's naive timestamps.
    progress : callable, optional
        ``progress(fraction, stage)``, called between reading and checking;
        it may raise to cancel.

    Returns
    -------
    Loaded, CsvHeader or LoadFailure
        All picklable (they come back from a worker process).
    """
    p = Path(path)
    try:
        weather = load_weather_for_site(p, site, columns=columns,
                                        timestamp_label=timestamp_label, timezone=timezone)
    except WeatherImportError as exc:
        if columns is None and _NEEDS_MAPPING in exc.reason:
            return _csv_header(p)
        return LoadFailure(str(exc), exc.line)
    except WeatherOptionError as exc:
        # the dialog's own words: the option by its label, the reason without the file twice
        reason = exc.reason.removeprefix(f"{p.name}: ")
        reason = reason.removeprefix(f"{p.name} ")
        label = OPTION_WORDS.get(exc.option, exc.option)
        return LoadFailure(f"{p.name}: {label}: {reason}")
    except (OSError, ValueError) as exc:
        return LoadFailure(f"{p.name}: {exc}")
    problem = grid_step_problem(weather)
    if problem is not None:
        return LoadFailure(f"{weather.source}: {problem}")
    if progress is not None:
        progress(0.5, "checking against the site's year")
    try:  # the checks that come with placing the data on the year's intervals
        irr = irradiance_options(Assessment(site), Basis("file", "file", "checked"), weather)
        sky = sky_year(site, irr)
    except ValueError as exc:
        return LoadFailure(f"read, but it cannot serve as this site's year: {exc}")
    return Loaded(p, weather, weather_fit_warnings(weather, sky), file_sha256(p))


def _csv_header(path: Path) -> CsvHeader | LoadFailure:
    """The header and a column guess of a CSV file that needs a mapping."""
    try:
        header = read_header(path)
    except WeatherImportError as inner:
        return LoadFailure(str(inner), inner.line)
    return CsvHeader(path, header, guess_columns(header))


__all__ = ["CsvHeader", "LoadFailure", "Loaded", "grid_step_problem", "read_weather_for_site"]
