"""The study's vocabulary: option kinds, mountings, :class:`StudyOptions`, a schedule's
:class:`Period`, one compared :class:`StudyOption`, and the objective's scoring of
monthly totals.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields

import numpy as np
import pandas as pd

from ...choices import OPTION_KINDS  # noqa: F401 (its home is ...choices)
from ..manyplane import sum_by_month
from ..site import MOUNTINGS
from ..skyyear import IrradianceOptions
from ..words import MIN_TILT_DEFAULT_DEG

#: How the panels are held, and so which options a study may list and recommend:
#: ``flush`` on the roof (the roof's own tilt and azimuth; no seasonal option),
#: ``fixed-rack`` (tilt free within limits, azimuth free or fixed), ``adjustable``
#: (seasonal schedules, up to ``max_positions`` positions a year), ``ground-rows`` and
#: ``flat-roof-rows`` (fixed racks in rows, with pitch and ground coverage).

#: Option kinds each mounting allows besides the references (horizontal, the site's
#: planes as they are, the fixed optimum as the best plane, the two-axis ceiling).
SEASONAL_KINDS = (("two-season", 2), ("four-season", 4), ("monthly", 12))

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
            days.append(pd.Timestamp(f"2023-{text}").day_of_year)
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
                pd.Timestamp(f"2023-{self.row_design_date}")
            except ValueError:
                raise ValueError(f"row_design_date = {self.row_design_date!r}: must be a date "
                                 "MM-DD") from None
        if not 0.0 < self.row_half_width_h <= 6.0:
            raise ValueError(f"row_half_width_h = {self.row_half_width_h!r}: must be more than 0 "
                             "and at most 6 h")
        if not 0.0 <= self.loss_fraction <= 0.9:
            raise ValueError(f"loss_fraction = {self.loss_fraction!r}: must be between 0 and 0.9")


@dataclass(frozen=True)
class StudyOptions(StudySettings, RowSettings):
    """Everything one tilt study needs: its settings (:class:`StudySettings`), the rows
    (:class:`RowSettings`), the sky and the mounting.

    Attributes
    ----------
    irradiance : IrradianceOptions
        Sky basis and models.
    mounting : str
        One of :data:`MOUNTINGS`: which options are listed and recommended.
    max_positions : int
        Most tilt positions a year of an ``adjustable`` mounting (2, 4 or 12
        allow the two-season, four-season and monthly schedules).

    The other attributes are those of :class:`StudySettings` and :class:`RowSettings`.
    """

    irradiance: IrradianceOptions = field(default_factory=IrradianceOptions)
    mounting: str = "adjustable"
    max_positions: int = 12

    def __post_init__(self):
        StudySettings.__post_init__(self)
        RowSettings.__post_init__(self)
        if self.mounting not in MOUNTINGS:
            raise ValueError(f"mounting = {self.mounting!r}: must be one of "
                             f"{', '.join(MOUNTINGS)}")
        if isinstance(self.max_positions, bool) or not isinstance(self.max_positions, int) \
                or not 1 <= self.max_positions <= 12:
            raise ValueError(f"max_positions = {self.max_positions!r}: must be a whole number "
                             "from 1 to 12")

    @property
    def settings(self) -> StudySettings:
        """The study settings alone (as an assessment keeps them)."""
        return StudySettings(**{f.name: getattr(self, f.name) for f in fields(StudySettings)})

    def allows(self, kind: str) -> bool:
        """Whether the mounting allows an option of ``kind`` to be recommended and listed.

        The references (horizontal, the site's planes, the fixed optimum as the
        best plane for the site, the two-axis ceiling) are always listed; the
        rule of thumb needs a rack; a seasonal schedule needs an ``adjustable``
        mounting with at least as many positions as the schedule has periods.
        """
        if kind in ("horizontal", "plane", "fixed-optimal", "two-axis"):
            return True
        if kind == "rule-of-thumb":
            return self.mounting != "flush"
        need = dict(SEASONAL_KINDS).get(kind)
        if need is None:
            raise ValueError(f"option kind {kind!r}: must be one of {', '.join(OPTION_KINDS)}")
        return self.mounting == "adjustable" and self.max_positions >= need

    def candidate_tilts(self) -> np.ndarray:
        """The tilts the optimiser may choose, degrees."""
        n = int(np.floor((self.tilt_max_deg - self.tilt_min_deg) / self.tilt_step_deg + 1e-9))
        return np.round(self.tilt_min_deg + self.tilt_step_deg * np.arange(n + 1), 6)

    @property
    def objective_label(self) -> str:
        if self.objective == "months":
            return "months=" + ",".join(str(int(m)) for m in self.months)
        return self.objective


@dataclass(frozen=True)
class Period:
    """One period of a schedule: from ``start`` to ``end`` inclusive ("MM-DD")."""

    start: str
    end: str
    tilt_deg: float | None
    azimuth_deg: float | None


@dataclass(frozen=True)
class StudyOption:
    """One compared option."""

    label: str
    kind: str
    schedule: tuple
    monthly_kwh_m2: np.ndarray
    annual_kwh_m2: float
    note: str = ""

    @property
    def adjustments_per_year(self) -> int:
        return 0 if len(self.schedule) <= 1 else len(self.schedule)


# -- scoring ------------------------------------------------------------------

def _score_monthly(monthly: np.ndarray, opts: StudyOptions, active=None) -> np.ndarray:
    """Objective value of each column of a (12, n) monthly table, kWh/m².

    ``worst-month`` takes the smallest total among the ``active`` months (those
    with daylight: a month of polar night cannot be improved by any tilt), with
    the annual total as a tie-break worth 1e-6 of it.
    """
    if opts.objective == "annual":
        return monthly.sum(axis=0)
    if opts.objective == "worst-month":
        act = np.ones(12, dtype=bool) if active is None else np.asarray(active, dtype=bool)
        return monthly[act].min(axis=0) + 1e-6 * monthly.sum(axis=0)
    idx = np.asarray(sorted({int(m) for m in opts.months})) - 1
    return monthly[idx].sum(axis=0)


#: Monthly totals of daily values (``(n_days, ...)`` -> ``(12, ...)``).
_monthly_from_daily = sum_by_month
