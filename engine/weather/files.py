"""Typical-year files in a public format: recognise the format, then read it.

:func:`read_weather_file` recognises TMY3, TMY2 and EPW files by content (or
the ``.tm2`` extension) and hands them to their reader in :mod:`.tmy3`,
:mod:`.tmy2` or :mod:`.epw`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Literal

from .assemble import _assemble
from .common import (
    Finding,
    WeatherData,
    WeatherImportError,
    _check_reference_year,
    _check_site,
)
from .epw import _read_epw
from .tmy2 import _read_tmy2
from .tmy3 import _read_tmy3


def _sniff_format(path: Path) -> str:
    suffix = path.suffix.lower()
    try:
        with open(path, encoding="utf-8", errors="replace") as handle:
            first = handle.readline()
            second = handle.readline()
    except OSError as exc:
        raise WeatherImportError(path.name, None, f"cannot open: {exc}") from exc
    if first.upper().startswith("LOCATION,"):
        return "epw"
    if second.startswith("Date (MM/DD/YYYY)"):
        return "tmy3"
    if suffix == ".tm2":
        return "tmy2"
    raise WeatherImportError(
        path.name, None,
        "format not recognised (expected EPW starting with 'LOCATION,', TMY3 CSV with "
        "'Date (MM/DD/YYYY)' on line 2, or TMY2 '.tm2'); read other CSV files with "
        "read_weather_csv and a ColumnMap",
    )


def read_weather_file(path, *, latitude_deg: float | None = None,
                      longitude_deg: float | None = None, reference_year: int | None = None,
                      file_format: Literal["tmy3", "tmy2", "epw"] | None = None,
                      check_labelling: bool = True) -> WeatherData:
    """Read a typical-year weather file in a public format.

    The file is parsed by :mod:`pvlib.iotools` (:func:`~pvlib.iotools.read_tmy3`,
    :func:`~pvlib.iotools.read_tmy2`, :func:`~pvlib.iotools.read_epw`); the
    timestamps are rebuilt from the file's own date and hour fields so that
    each value lands on its interval, with the format's labelling convention:

    ========  =======================================================  ==========
    format    convention                                               label
    ========  =======================================================  ==========
    TMY3      local standard time; radiation "received during the 60   ``'end'``
              minutes prior to timestamp", 01:00 .. 24:00 (Wilcox &
              Marion 2008; as quoted by pvlib ``read_tmy3``)
    TMY2      local standard time; "energy received during the 60       ``'end'``
              minutes preceding the hour indicated", hours 1..24
              (Marion & Urban 1995, section 3)
    EPW       "Hour 1 is 00:01 to 01:00"; radiation "during the number  ``'end'``
              of minutes preceding the time indicated" (EnergyPlus
              Auxiliary Programs, EPW Data Dictionary, field Hour)
    ========  =======================================================  ==========

    All three store radiation as Wh/m2 per hour, numerically equal to the
    hourly mean in W/m2. The time zone is the fixed offset in the file
    header.

    Parameters
    ----------
    path : str or path-like
        The file. Recognised by content (EPW: first record ``LOCATION``;
        TMY3: ``Date (MM/DD/YYYY)`` header on line 2) or the ``.tm2``
        extension.
    latitude_deg, longitude_deg : float, optional
        Site for the labelling check; defaults to the coordinates in the
        file header (reported if they differ by more than 1 degree).
    reference_year : int, optional
        Calendar year to map all intervals onto; typical-year files mixing
        years are mapped onto 1990 (1992 with 29 February) if omitted.
    file_format : {'tmy3', 'tmy2', 'epw'}, optional
        Skip format recognition.
    check_labelling : bool
        Run the timestamp-labelling check.

    Returns
    -------
    WeatherData
        ``timestamp_label`` is ``'end'`` for all three formats.

    Raises
    ------
    WeatherImportError
        Unrecognised or unreadable file, bad date or value (with line number).

    References
    ----------
    Wilcox, S. & Marion, W. (2008). Users Manual for TMY3 Data Sets.
    NREL/TP-581-43156. Marion, W. & Urban, K. (1995). User's Manual for
    TMY2s. NREL. EnergyPlus Auxiliary Programs, EPW Data Dictionary.
    """
    path = Path(path)
    _check_site(latitude_deg, longitude_deg)
    _check_reference_year(reference_year)
    fmt = file_format if file_format is not None else _sniff_format(path)
    readers = {"tmy3": _read_tmy3, "tmy2": _read_tmy2, "epw": _read_epw}
    if fmt not in readers:
        raise ValueError(f"file_format must be 'tmy3', 'tmy2' or 'epw' (got {fmt!r})")
    raw, names, labels, lines, tz, site, missing_rules, extra = readers[fmt](path)
    findings: list[Finding] = []
    units, scale, candidates = "wh_m2", None, ("w_m2", "wh_m2", "kj_m2")
    if fmt == "tmy2":
        scale = extra
    if fmt == "epw" and extra and extra > 1:
        # sub-hourly EPW: the dictionary says Wh/m2 per interval, W/m2 means also occur
        units, candidates = "auto", ("w_m2", "wh_m2")
    lat, lon = latitude_deg, longitude_deg
    if lat is None:
        lat, lon = site[0], site[1]
    elif abs(lat - site[0]) > 1.0 or abs(lon - site[1]) > 1.0:
        findings.append(Finding(
            "site", "warning",
            f"given site ({lat:.3f}, {lon:.3f}) differs from the file header "
            f"({site[0]:.3f}, {site[1]:.3f}) by more than 1 degree",
        ))
    return _assemble(
        raw, names, labels, lines, file=path.name, source=f"{path.name} ({fmt.upper()})",
        label="end", tz=tz, units=units, step_min=None, reference_year=reference_year,
        latitude_deg=lat, longitude_deg=lon, missing_rules=missing_rules, scale=scale,
        check_labelling=check_labelling, findings=findings, header_site=site,
        unit_candidates=candidates,
    )
