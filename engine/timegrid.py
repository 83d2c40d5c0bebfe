"""The year's timestamps, interval midpoints, and clock/standard/solar time.

Convention (stated in every output that shows totals): the year is cut into
equal intervals of ``step_min`` minutes, starting at local midnight on
1 January in the site's time zone; each interval's value is the irradiance
evaluated at the interval's **midpoint**, multiplied by the interval length.
In the intervals that contain sunrise or sunset, the value is evaluated at the
midpoint of the part of the interval with the sun up, and weighted by that
part's length, so those intervals are neither lost nor inflated.

All arithmetic is in UTC; local clock time (with daylight saving), local
standard time and apparent solar time are for display.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from datetime import timedelta
from zoneinfo import ZoneInfo

import numpy as np
import pandas as pd

from .choices import GRID_STEPS_MIN as GRID_STEPS_MIN
from .choices import REFERENCE_YEAR as REFERENCE_YEAR
from .choices import STEPS_MIN as STEPS_MIN
from .choices import TIME_BASES as TIME_BASES
from .choices import check_step_min as check_step_min

#: Words used in outputs to state the time convention.
MIDPOINT_CONVENTION = (
    "interval means over each interval's sun-up part (sunrise and sunset intervals "
    "weighted by its length): clear sky integrated at two Gauss-Legendre points, "
    "extraterrestrial in closed form, weather and monthly-mean data at the interval midpoint"
)


@dataclass(frozen=True)
class TimeGrid:
    """A year of equal intervals.

    Attributes
    ----------
    year : int
        Calendar year in the site's local time.
    step_min : int
        Interval length in minutes.
    timezone : str
        IANA zone of the site (for display).
    start_utc : pandas.DatetimeIndex
        Interval start times, UTC.
    """

    year: int
    step_min: int
    timezone: str
    start_utc: pd.DatetimeIndex

    @property
    def step_h(self) -> float:
        """Interval length in hours."""
        return self.step_min / 60.0

    @property
    def midpoint_utc(self) -> pd.DatetimeIndex:
        """Interval midpoints, UTC."""
        return self.start_utc + pd.Timedelta(minutes=self.step_min / 2.0)

    @property
    def boundaries_utc(self) -> pd.DatetimeIndex:
        """The ``n + 1`` interval boundaries, UTC."""
        return self.start_utc.append(
            pd.DatetimeIndex([self.start_utc[-1] + pd.Timedelta(minutes=self.step_min)]))

    @functools.cached_property
    def start_local(self) -> pd.DatetimeIndex:
        """Interval starts in local clock time (with daylight saving); computed once."""
        return self.start_utc.tz_convert(self.timezone)

    def __len__(self) -> int:
        return len(self.start_utc)


def year_grid(timezone: str, year: int = REFERENCE_YEAR, step_min: int = 60) -> TimeGrid:
    """Build the intervals of one local calendar year.

    Parameters
    ----------
    timezone : str
        IANA time zone name of the site.
    year : int, default :data:`REFERENCE_YEAR`
        Local calendar year.
    step_min : int, default 60
        Interval length, one of :data:`GRID_STEPS_MIN`.

    Returns
    -------
    TimeGrid
        Intervals from local midnight 1 January to local midnight 1 January of
        the next year (a daylight-saving change does not alter the count: a
        non-leap year has ``525600 / step_min`` intervals).

    Notes
    -----
    Convention of this project (common practice, no source): interval values
    are evaluated at the midpoint, see the module docstring.
    """
    step_min = check_step_min(step_min)
    if not 1900 <= int(year) <= 2100:
        raise ValueError(f"year = {year!r}: must be between 1900 and 2100")
    tz = ZoneInfo(timezone)
    start = pd.Timestamp(int(year), 1, 1).tz_localize(tz).tz_convert("UTC")
    end = pd.Timestamp(int(year) + 1, 1, 1).tz_localize(tz).tz_convert("UTC")
    idx = pd.date_range(start, end, freq=f"{step_min}min", inclusive="left")
    return TimeGrid(int(year), int(step_min), timezone, idx)


def standard_offset(timezone: str, year: int = REFERENCE_YEAR) -> timedelta:
    """The zone's standard-time offset from UTC (no daylight saving) in ``year``.

    Taken as ``utcoffset - dst`` at mid-January and mid-July; if they disagree
    (a zone that changed its standard offset during the year) the January value
    is used.
    """
    tz = ZoneInfo(timezone)
    offsets = []
    for month in (1, 7):
        t = pd.Timestamp(year, month, 15, 12).tz_localize(tz)
        offsets.append(t.utcoffset() - (t.dst() or timedelta(0)))
    return offsets[0]


def standard_timezone(timezone: str, year: int = REFERENCE_YEAR):
    """A fixed-offset ``datetime.timezone`` for the zone's local standard time."""
    from datetime import timezone as _tz

    off = standard_offset(timezone, year)
    total_min = int(off.total_seconds() // 60)
    sign = "+" if total_min >= 0 else "-"
    name = f"UTC{sign}{abs(total_min) // 60:02d}:{abs(total_min) % 60:02d} (standard)"
    return _tz(off, name)


def apparent_solar_time_h(times_utc: pd.DatetimeIndex, longitude_deg: float,
                          equation_of_time_min) -> np.ndarray:
    """Apparent (true) solar time as hours of the day, 0-24.

    Parameters
    ----------
    times_utc : pandas.DatetimeIndex
        Instants, timezone-aware.
    longitude_deg : float
        Site longitude, east positive.
    equation_of_time_min : array_like
        Equation of time at those instants, minutes (apparent minus mean solar
        time), for example from :func:`tiltyard.engine.solarpos.solar_position`.

    Returns
    -------
    numpy.ndarray
        Apparent solar time in hours; 12 is the sun on the local meridian.

    References
    ----------
    Duffie & Beckman (2013), Solar Engineering of Thermal Processes, eq. 1.5.2
    (solar time = standard time + 4 (L_st - L_loc) + E, written here from UTC).
    """
    t = pd.DatetimeIndex(times_utc).tz_convert("UTC")
    utc_h = (t.hour + t.minute / 60.0 + t.second / 3600.0 + t.microsecond / 3.6e9).to_numpy()
    return (utc_h + longitude_deg / 15.0 + np.asarray(equation_of_time_min) / 60.0) % 24.0


def to_display(times_utc: pd.DatetimeIndex, timezone: str, basis: str = "clock",
               year: int = REFERENCE_YEAR) -> pd.DatetimeIndex:
    """Times for display in local clock time or local standard time.

    Parameters
    ----------
    times_utc : pandas.DatetimeIndex
        Timezone-aware instants.
    timezone : str
        Site's IANA zone.
    basis : {"clock", "standard"}
        ``clock`` follows daylight saving; ``standard`` uses the zone's fixed
        standard offset all year. Apparent solar time is not a time zone: use
        :func:`apparent_solar_time_h`.
    """
    t = pd.DatetimeIndex(times_utc)
    if basis == "clock":
        return t.tz_convert(timezone)
    if basis == "standard":
        return t.tz_convert(standard_timezone(timezone, year))
    raise ValueError(f"basis = {basis!r}: must be 'clock' or 'standard' "
                     "(solar time is given by apparent_solar_time_h)")


def local_date(value, field: str = "date", example: str = "2023-06-21",
               timezone: str | None = None) -> pd.Timestamp:
    """A typed calendar date as a naive local midnight.

    Parameters
    ----------
    value : str, date, datetime or Timestamp
        What was given.
    field : str
        Name used in the error message.
    example : str
        A valid value shown in the error message.
    timezone : str, optional
        A timezone-aware value is first converted to this zone; without it
        its own wall-clock date is kept.

    Returns
    -------
    pandas.Timestamp
        Naive midnight of the date.

    Raises
    ------
    ValueError
        Naming ``field``, the value and an example.

    Notes
    -----
    Gregorian calendar dates (common practice, no source).
    """
    try:
        day = pd.Timestamp(value)
    except (TypeError, ValueError):
        raise ValueError(f"{field} = {value!r}: must be a calendar date such as "
                         f"'{example}'") from None
    if pd.isna(day):
        raise ValueError(f"{field} = {value!r}: must be a calendar date such as '{example}'")
    if day.tzinfo is not None:
        day = (day.tz_convert(timezone) if timezone else day).tz_localize(None)
    return day.normalize()
