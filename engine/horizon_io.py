"""Horizon profiles as two-column CSV text: azimuth and elevation in degrees.

The file holds one measured point per line, azimuth first (degrees clockwise
from true north) and elevation second (degrees above the horizontal, negative
below it):

.. code-block:: text

    azimuth_deg,elevation_deg
    0,3
    90,2.5
    180,11

- The header line is optional. A header naming the columns in the other order
  (``elevation_deg,azimuth_deg``) is honoured.
- The separator is a comma or a semicolon (whichever the first line uses);
  numbers use a decimal point, or a decimal comma in a semicolon-separated file
  (``90;3,25``). Quoting follows the usual CSV rules (Python's
  :mod:`csv` module).
- Blank lines and lines starting with ``#`` are skipped.
- Each azimuth may appear once; 0 and 360 are the same direction.

Every problem is reported as a :class:`HorizonFileError` naming the file, the
line number, the column, the value and what is allowed. Writing is atomic
(:func:`tiltyard.engine.site_file.atomic_write_text`).
"""

from __future__ import annotations

import csv
import io
import math
import os
from pathlib import Path

from .site import HorizonProfile, SiteError
from .site_file import atomic_write_text

#: Column names written to (and recognised in) the header line.
COLUMNS = ("azimuth_deg", "elevation_deg")

#: Largest file read, bytes (a horizon has hundreds of points, not millions).
MAX_BYTES = 5 * 2**20


class HorizonFileError(SiteError):
    """A horizon CSV file cannot be read.

    Attributes
    ----------
    line : int or None
        1-based line number of the offending line (None for whole-file
        problems such as a missing file or no data).
    """

    def __init__(self, field: str, value, reason: str, file: str | None = None,
                 line: int | None = None):
        self.line = line
        super().__init__(field, value, reason, file)

    def in_file(self, file: str | os.PathLike) -> HorizonFileError:
        return HorizonFileError(self.field, self.value, self.reason, str(file), self.line)


def _read_text(path: Path) -> str:
    try:
        size = path.stat().st_size
    except FileNotFoundError:
        raise HorizonFileError("(file)", str(path), "does not exist", str(path)) from None
    except OSError as err:
        raise HorizonFileError("(file)", str(path), f"cannot be read ({err.strerror})",
                               str(path)) from None
    if size > MAX_BYTES:
        raise HorizonFileError("(file)", str(path), f"is {size} bytes; a horizon file must be "
                               f"at most {MAX_BYTES} bytes", str(path))
    try:
        return path.read_text(encoding="utf-8-sig")
    except UnicodeDecodeError as err:
        raise HorizonFileError("(file)", str(path), f"is not UTF-8 text ({err.reason})",
                               str(path)) from None
    except OSError as err:
        raise HorizonFileError("(file)", str(path), f"cannot be read ({err.strerror})",
                               str(path)) from None


def _is_number(text: str) -> bool:
    try:
        float(text.replace(",", "."))
    except ValueError:
        return False
    return True


def _header_order(cells: list[str]) -> tuple[int, int] | None:
    """Column indices (azimuth, elevation) if ``cells`` is a header line, else None."""
    if any(_is_number(c) for c in cells):
        return None
    low = [c.strip().lower() for c in cells]
    if len(low) == 2 and low[0].startswith("elev") and low[1].startswith("az"):
        return 1, 0
    return 0, 1


def _parse_value(text: str, column: str, line: int, decimal_comma: bool = False) -> float:
    """One cell in degrees; with ``decimal_comma`` (a ";"-separated file, as spreadsheets
    in many locales write it) "2,5" is 2.5."""
    t = text.strip()
    if decimal_comma:
        t = t.replace(",", ".")
    if not t:
        raise HorizonFileError(f"line {line}, {column}", text, "is empty; every line needs an "
                               "azimuth and an elevation in degrees", line=line)
    try:
        value = float(t)
    except ValueError:
        hint = (" (write decimals with a point, not a comma)"
                if "," in t and _is_number(t.replace(",", ".")) else "")
        raise HorizonFileError(f"line {line}, {column}", text,
                               f"is not a number in degrees{hint}", line=line) from None
    if not math.isfinite(value):
        raise HorizonFileError(f"line {line}, {column}", text, "must be a finite number",
                               line=line)
    return value


def parse_horizon_csv(text: str, file: str | None = None) -> HorizonProfile:
    """Parse the text of a horizon CSV file (see the module notes for the format).

    Parameters
    ----------
    text : str
        File content.
    file : str, optional
        File name for the messages.

    Returns
    -------
    HorizonProfile
        Sorted by azimuth.

    Raises
    ------
    HorizonFileError
        Naming the line number, the column, the value and the allowed range
        (azimuth 0 to 360°, elevation as :class:`~tiltyard.engine.site.HorizonProfile`
        allows), for a line without two values, a value that is not a number,
        an out-of-range value, a repeated azimuth, or a file without data.

    Notes
    -----
    A plain data format; no published source applies (common practice, no source).
    """
    try:
        return _parse(text)
    except HorizonFileError as err:
        raise (err.in_file(file) if file else err) from None


def _parse(text: str) -> HorizonProfile:
    lines = text.splitlines()
    first = next((ln for ln in lines if ln.strip() and not ln.lstrip().startswith("#")), None)
    if first is None:
        raise HorizonFileError("(file)", "", "holds no horizon points; expected lines of an "
                               "azimuth and an elevation in degrees, such as '180,12'")
    delimiter = ";" if ";" in first else ","
    order = (0, 1)
    azimuths: list[float] = []
    elevations: list[float] = []
    seen: dict[float, int] = {}
    data_started = False
    # one csv.reader per physical line keeps line numbers exact (a horizon
    # file has no quoted line breaks)
    for number, raw in enumerate(lines, start=1):
        if not raw.strip() or raw.lstrip().startswith("#"):
            continue
        try:
            cells = next(csv.reader([raw], delimiter=delimiter, skipinitialspace=True))
        except csv.Error as err:
            raise HorizonFileError(f"line {number}", raw.strip()[:40],
                                   f"is not valid CSV ({err})", line=number) from None
        while cells and not cells[-1].strip():      # trailing separators from spreadsheets
            cells.pop()
        if not data_started:
            data_started = True
            header = _header_order(cells)
            if header is not None:
                if len(cells) != 2:
                    raise HorizonFileError(f"line {number}", raw.strip()[:40],
                                           "header must name two columns: "
                                           "azimuth_deg and elevation_deg", line=number)
                order = header
                continue
        if len(cells) != 2:
            sep = "semicolon" if delimiter == ";" else "comma"
            hint = ("; decimals are written with a point" if delimiter == "," and len(cells) > 2
                    else "")
            raise HorizonFileError(f"line {number}", raw.strip()[:40],
                                   f"has {len(cells)} value(s); expected 2 (azimuth and "
                                   f"elevation in degrees, separated by a {sep}){hint}",
                                   line=number)
        az = _parse_value(cells[order[0]], "azimuth_deg", number, delimiter == ";")
        el = _parse_value(cells[order[1]], "elevation_deg", number, delimiter == ";")
        if not 0.0 <= az <= 360.0:
            raise HorizonFileError(f"line {number}, azimuth_deg", cells[order[0]],
                                   "must be between 0 and 360 deg (clockwise from true north)",
                                   line=number)
        try:                                   # the profile's own range check for elevation
            HorizonProfile((az,), (el,))
        except SiteError as err:
            raise HorizonFileError(f"line {number}, elevation_deg", cells[order[1]],
                                   err.reason, line=number) from None
        key = az % 360.0
        if key in seen:
            raise HorizonFileError(f"line {number}, azimuth_deg", cells[order[0]],
                                   f"repeats the azimuth of line {seen[key]} (each direction "
                                   "once; 0 and 360 are the same)", line=number)
        seen[key] = number
        azimuths.append(az)
        elevations.append(el)
    if not azimuths:
        raise HorizonFileError("(file)", "", "holds a header but no horizon points")
    return HorizonProfile(tuple(azimuths), tuple(elevations))


def read_horizon_csv(path: str | os.PathLike) -> HorizonProfile:
    """Read a horizon profile from a two-column CSV file.

    Parameters
    ----------
    path : path-like
        The file (UTF-8, with or without a byte-order mark).

    Returns
    -------
    HorizonProfile

    Raises
    ------
    HorizonFileError
        With ``file`` and ``line`` set; see :func:`parse_horizon_csv`.
    """
    path = Path(path)
    return parse_horizon_csv(_read_text(path), str(path))


def format_horizon_csv(profile: HorizonProfile) -> str:
    """The CSV text of ``profile``: a header line, then one point per line.

    Values are written with Python's shortest round-trip float repr, so
    reading the text back gives the same profile exactly.
    """
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(COLUMNS)
    for az, el in zip(profile.azimuth_deg, profile.elevation_deg, strict=True):
        writer.writerow((_short(az), _short(el)))
    return buf.getvalue()


def _short(value: float) -> str:
    v = float(value)
    return str(int(v)) if v.is_integer() and abs(v) < 1e15 else repr(v)


def write_horizon_csv(profile: HorizonProfile, path: str | os.PathLike) -> Path:
    """Write ``profile`` to ``path`` as CSV, atomically.

    Parameters
    ----------
    profile : HorizonProfile
        The points.
    path : path-like
        Target file; replaced only once the new content is safely on disk.

    Returns
    -------
    pathlib.Path
        The path written.
    """
    path = Path(path)
    atomic_write_text(path, format_horizon_csv(profile))
    return path


__all__ = ["COLUMNS", "HorizonFileError", "format_horizon_csv", "parse_horizon_csv",
           "read_horizon_csv", "write_horizon_csv"]
