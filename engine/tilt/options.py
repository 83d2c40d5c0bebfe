"""The study's vocabulary: option kinds, mountings, :class:`StudyOptions`, a schedule's
:class:`Period`, one compared :class:`StudyOption`, and the objective's scoring of
monthly totals.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields

import numpy as np

from ..choices import OPTION_KINDS as OPTION_KINDS
from ..choices import RowSettings, StudySettings, check_positions
from ..choices import _check_switch_dates as _check_switch_dates
from ..manyplane import sum_by_month
from ..site import MOUNTINGS
from ..skyyear import IrradianceOptions

#: How the panels are held, and so which options a study may list and recommend:
#: ``flush`` on the roof (the roof's own tilt and azimuth; no seasonal option),
#: ``fixed-rack`` (tilt free within limits, azimuth free or fixed), ``adjustable``
#: (seasonal schedules, up to ``max_positions`` positions a year), ``ground-rows`` and
#: ``flat-roof-rows`` (fixed racks in rows, with pitch and ground coverage).

#: Option kinds each mounting allows besides the references (horizontal, the site's
#: planes as they are, the fixed optimum as the best plane, the two-axis ceiling).
SEASONAL_KINDS = (("two-season", 2), ("four-season", 4), ("monthly", 12))

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
        check_positions(self.mounting, self.max_positions, MOUNTINGS)

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
