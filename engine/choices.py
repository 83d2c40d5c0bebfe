"""The choices an assessment keeps, and their checks: sky and clear-sky model names,
the solar constant, the reference year and intervals, the study's settings
(:class:`StudySettings`) and the rows (:class:`RowSettings`).

Standard library only, so the app opens a site (and shows its first view) before
numpy's numerical stack, pandas and pvlib are loaded; the modules that compute
(``plane``, ``sky``, ``skyyear``, ``timegrid``, ``tilt``) take these names from here.
"""

from __future__ import annotations

import numbers
from dataclasses import dataclass
from datetime import date

from .words import MIN_TILT_DEFAULT_DEG

#: Sky diffuse transposition models (pvlib's names).
TRANSPOSITION_MODELS = ("isotropic", "haydavies", "perez")

#: Default solar constant, W/m². Kopp, G. & Lean, J. L. (2011). A new, lower
#: value of total solar irradiance: Evidence and climate significance.
#: Geophys. Res. Lett. 38, L01706 (1360.8 +/- 0.5 W/m², rounded).
SOLAR_CONSTANT_W_M2 = 1361.0

CLEARSKY_MODELS = ("ineichen", "simplified_solis", "haurwitz")

#: Sky bases: the clear sky; a synthetic year from the site's monthly mean
#: daily GHI (:func:`tiltyard.engine.allsky.monthly_sky`); a weather series
#: (:func:`tiltyard.engine.weather_grid.weather_sky`).
SKY_BASES = ("clear", "monthly", "file")

#: The default year: a fixed, non-leap reference year, shown in every output.
REFERENCE_YEAR = 2023

#: How panels are held (a :class:`tiltyard.engine.site.Plane`'s ``mounting``).
MOUNTINGS = ("flush", "fixed-rack", "adjustable", "ground-rows", "flat-roof-rows")

#: Time bases of displayed times: local clock time, local standard time, apparent
#: solar time (:mod:`tiltyard.engine.timegrid`).
TIME_BASES = ("clock", "standard", "solar")

#: Kinds of tilt-study option, in the order a study lists them (:mod:`tiltyard.engine.tilt`).
OPTION_KINDS = ("horizontal", "plane", "rule-of-thumb", "fixed-optimal", "two-season",
                "four-season", "monthly", "two-axis")

#: Interval lengths offered for resampling a clear or monthly sky, minutes.
STEPS_MIN = (60, 30, 15, 10, 5, 1)

#: Every interval length the year's grid accepts, minutes: the whole minutes that
#: divide an hour (a weather file's own interval is used as it is).
GRID_STEPS_MIN = tuple(m for m in range(60, 0, -1) if 60 % m == 0)


def check_step_min(step_min) -> int:
    """Return ``step_min`` as an int, or raise ValueError unless it is in :data:`GRID_STEPS_MIN`."""
    if isinstance(step_min, bool) or not isinstance(step_min, numbers.Integral) \
            or int(step_min) not in GRID_STEPS_MIN:
        raise ValueError(f"interval = {step_min!r} min: must be a whole number of minutes that "
                         f"divides an hour ({', '.join(map(str, GRID_STEPS_MIN))})")
    return int(step_min)


def check_sky_choices(model, sky, clearsky_model, solar_constant_w_m2, year, step_min) -> None:
    """The checks of a year of irradiance's choices that need no weather data
    (:class:`tiltyard.engine.skyyear.IrradianceOptions` adds the weather's)."""
    if model not in TRANSPOSITION_MODELS:
        raise ValueError(f"model = {model!r}: must be one of {', '.join(TRANSPOSITION_MODELS)}")
    if sky not in SKY_BASES:
        raise ValueError(f"sky = {sky!r}: must be one of {', '.join(SKY_BASES)}")
    if clearsky_model not in CLEARSKY_MODELS:
        raise ValueError(f"clearsky_model = {clearsky_model!r}: must be one of "
                         f"{', '.join(CLEARSKY_MODELS)}")
    if not 1000.0 <= float(solar_constant_w_m2) <= 1500.0:
        raise ValueError(f"solar_constant_w_m2 = {solar_constant_w_m2!r}: must be "
                         "between 1000 and 1500 W/m2")
    check_step_min(step_min)
    if not 1900 <= int(year) <= 2100:
        raise ValueError(f"year = {year!r}: must be between 1900 and 2100")


def check_positions(mounting: str, max_positions, mountings) -> None:
    """A mounting kind among ``mountings`` and its positions a year (1-12)."""
    if mounting not in mountings:
        raise ValueError(f"mounting = {mounting!r}: must be one of {', '.join(mountings)}")
    if isinstance(max_positions, bool) or not isinstance(max_positions, int) \
            or not 1 <= max_positions <= 12:
        raise ValueError(f"max_positions = {max_positions!r}: must be a whole number "
                         "from 1 to 12")


def _day_of_year(text: str) -> int:
    """Day of the reference year (non-leap) of a date "MM-DD"; ValueError if there is none."""
    return date.fromisoformat(f"{REFERENCE_YEAR}-{text}").timetuple().tm_yday


@dataclass(frozen=True)
class StudySettings:
    """What the tilt study optimises, within which limits (the settings an assessment keeps).

    Attributes
    ----------
    objective : {"annual", "worst-month", "months"}
        Maximise the annual total, the smallest monthly total, or the total over
        ``months``.
    months : tuple of int
        Months (1-12) for the ``months`` objective.
    tilt_min_deg, tilt_max_deg, tilt_step_deg : float
        Candidate tilts: ``tilt_min_deg`` to ``tilt_max_deg`` by ``tilt_step_deg``.
        The lowest defaults to 10° (:data:`tiltyard.engine.words.MIN_TILT_DEFAULT_DEG`):
        rain rinses panels and water runs off from about there (common practice, no
        source). It bounds every optimised option; the horizontal reference, the site's
        planes as they are, the rule of thumb and the two-axis ceiling keep their tilts.
    azimuth_deg : float or None
        Fixed azimuth for every optimised option (the roof faces where it
        faces); None lets the fixed optimum choose its azimuth, and schedules
        then use the fixed optimum's azimuth.
    min_days_between : int
        Minimum length of a schedule period, days.
    switch_dates : tuple of str or None
        Fixed switch dates ("MM-DD") for the two-period schedule instead of
        optimised ones (two dates).
    """

    objective: str = "annual"
    months: tuple = ()
    tilt_min_deg: float = MIN_TILT_DEFAULT_DEG   # run-off: common practice, no source
    tilt_max_deg: float = 90.0
    tilt_step_deg: float = 1.0
    azimuth_deg: float | None = None
    min_days_between: int = 30
    switch_dates: tuple | None = None

    def __post_init__(self):
        if self.objective not in ("annual", "worst-month", "months"):
            raise ValueError(f"objective = {self.objective!r}: must be annual, worst-month or "
                             "months=M,M,...")
        if self.objective == "months":
            if not self.months or any(not 1 <= int(m) <= 12 for m in self.months):
                raise ValueError(f"months = {self.months!r}: must be month numbers 1-12")
        if not 0.0 <= self.tilt_min_deg <= self.tilt_max_deg <= 90.0:
            raise ValueError(f"tilt range = {self.tilt_min_deg:g}:{self.tilt_max_deg:g}: must "
                             "satisfy 0 <= min <= max <= 90 deg")
        if not 0.1 <= self.tilt_step_deg <= 90.0:
            raise ValueError(f"tilt_step_deg = {self.tilt_step_deg!r}: must be between 0.1 and "
                             "90 deg")
        if self.azimuth_deg is not None and not 0.0 <= self.azimuth_deg <= 360.0:
            raise ValueError(f"azimuth_deg = {self.azimuth_deg!r}: must be between 0 and 360 deg")
        if not 1 <= int(self.min_days_between) <= 120:
            raise ValueError(f"min_days_between = {self.min_days_between!r}: must be between 1 "
                             "and 120 days")
        if self.switch_dates is not None:
            _check_switch_dates(self.switch_dates, int(self.min_days_between))


def _check_switch_dates(dates, min_days: int) -> None:
    """Two distinct MM-DD dates at least ``min_days`` apart both ways round the year
    (a non-leap year of 365 days, as the study's reference year)."""
    if isinstance(dates, str) or len(dates) != 2:
        raise ValueError(f"switch_dates = {dates!r}: give two dates MM-DD")
    days = []
    for text in dates:
        try:
            if not isinstance(text, str) or len(text) != 5 or text[2] != "-":
                raise ValueError
            days.append(_day_of_year(text))
        except ValueError:
            raise ValueError(f"switch_dates = {dates!r}: {text!r} is not a date MM-DD") from None
    gap = abs(days[1] - days[0])
    shorter = min(gap, 365 - gap)
    if shorter < min_days:
        raise ValueError(f"switch_dates = {','.join(dates)}: the seasons between them must "
                         f"each be at least {min_days} days (min_days_between); the shorter "
                         f"is {shorter}")


@dataclass(frozen=True)
class RowSettings:
    """Rows on a flat roof or field, and the indicative yield.

    Attributes
    ----------
    row_tilt_deg : float or None
        Tilt of the rows laid out for a flat roof or field (pitch and ground
        coverage for the default design window); None uses the fixed optimum.
    collector_length_m : float
        Slant length of one row's collector, m (row pitch scales with it).
    row_design_date : str or None
        Design day ("MM-DD") for the row spacing; None uses the winter solstice
        rule of :func:`tiltyard.engine.rows.default_design_date`.
    row_half_width_h : float
        Half-width of the design window around apparent solar noon, hours.
    loss_fraction : float
        System loss fraction for the indicative specific yield (default 0.14,
        common practice, no source).
    """

    row_tilt_deg: float | None = None
    collector_length_m: float = 1.0
    row_design_date: str | None = None
    row_half_width_h: float = 3.0
    loss_fraction: float = 0.14

    def __post_init__(self):
        if self.row_tilt_deg is not None and not 0.0 <= self.row_tilt_deg <= 90.0:
            raise ValueError(f"row_tilt_deg = {self.row_tilt_deg!r}: must be between 0 and 90 "
                             "deg")
        if not 0.05 <= self.collector_length_m <= 20.0:
            raise ValueError(f"collector_length_m = {self.collector_length_m!r}: must be between "
                             "0.05 and 20 m")
        if self.row_design_date is not None:
            try:
                _day_of_year(self.row_design_date)
            except ValueError:
                raise ValueError(f"row_design_date = {self.row_design_date!r}: must be a date "
                                 "MM-DD") from None
        if not 0.0 < self.row_half_width_h <= 6.0:
            raise ValueError(f"row_half_width_h = {self.row_half_width_h!r}: must be more than 0 "
                             "and at most 6 h")
        if not 0.0 <= self.loss_fraction <= 0.9:
            raise ValueError(f"loss_fraction = {self.loss_fraction!r}: must be between 0 and 0.9")


__all__ = ["CLEARSKY_MODELS", "GRID_STEPS_MIN", "REFERENCE_YEAR", "SKY_BASES",
           "SOLAR_CONSTANT_W_M2", "STEPS_MIN", "TRANSPOSITION_MODELS", "RowSettings",
           "StudySettings", "check_positions", "check_sky_choices", "check_step_min"]
