"""Tilt study: fixed, seasonal and monthly tilt schedules, optimised for an objective.

Every option is a *schedule*: one or more periods of the year, each with a tilt
and an azimuth. Daily plane-of-array irradiation for all candidate planes comes
from the many-plane engine in one pass, so every option is scored on the same
sky and the same horizon.

Optimisation is exact on the stated grid: candidate tilts are the tilt range at
the tilt step (a rack with notches every 5° is optimised over the notches, not
rounded afterwards); fixed-azimuth or free-azimuth (1° after a 5° search);
switch dates to the day. The two-period search is exhaustive over every pair of
switch days; the four-period search is exhaustive on a 14-day lattice, then
refined to the day by coordinate search (stated on the option). Objectives:
the annual total, the worst month, or a chosen set of months.
"""

from __future__ import annotations

import itertools
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .manyplane import many_plane_daily, many_plane_terms
from .plane import poa_components
from .site import MOUNTINGS, Site
from .skyyear import IrradianceOptions, SkyYear, sky_year

OPTION_KINDS = ("horizontal", "plane", "rule-of-thumb", "fixed-optimal", "two-season",
                "four-season", "monthly", "two-axis")

#: How the panels are held, and so which options a study may list and recommend:
#: ``flush`` on the roof (the roof's own tilt and azimuth; no seasonal option),
#: ``fixed-rack`` (tilt free within limits, azimuth free or fixed), ``adjustable``
#: (seasonal schedules, up to ``max_positions`` positions a year), ``ground-rows`` and
#: ``flat-roof-rows`` (fixed racks in rows, with pitch and ground coverage).

#: Option kinds each mounting allows besides the references (horizontal, the site's
#: planes as they are, the fixed optimum as the best plane, the two-axis ceiling).
SEASONAL_KINDS = (("two-season", 2), ("four-season", 4), ("monthly", 12))

MONTH_NAMES = ("January", "February", "March", "April", "May", "June", "July", "August",
               "September", "October", "November", "December")


@dataclass(frozen=True)
class StudyOptions:
    """What to optimise and under which constraints.

    Attributes
    ----------
    irradiance : IrradianceOptions
        Sky basis and models.
    objective : {"annual", "worst-month", "months"}
        Maximise the annual total, the smallest monthly total, or the total over
        ``months``.
    months : tuple of int
        Months (1-12) for the ``months`` objective.
    tilt_min_deg, tilt_max_deg, tilt_step_deg : float
        Candidate tilts: ``tilt_min_deg`` to ``tilt_max_deg`` by ``tilt_step_deg``.
    azimuth_deg : float or None
        Fixed azimuth for every optimised option (the roof faces where it
        faces); None lets the fixed optimum choose its azimuth, and schedules
        then use the fixed optimum's azimuth.
    min_days_between : int
        Minimum length of a schedule period, days.
    switch_dates : tuple of str or None
        Fixed switch dates ("MM-DD") for the two-period schedule instead of
        optimised ones (two dates).
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
    mounting : str
        One of :data:`MOUNTINGS`: which options are listed and recommended.
    max_positions : int
        Most tilt positions a year of an ``adjustable`` mounting (2, 4 or 12
        allow the two-season, four-season and monthly schedules).
    """

    irradiance: IrradianceOptions = field(default_factory=IrradianceOptions)
    objective: str = "annual"
    months: tuple = ()
    tilt_min_deg: float = 0.0
    tilt_max_deg: float = 90.0
    tilt_step_deg: float = 1.0
    azimuth_deg: float | None = None
    min_days_between: int = 30
    switch_dates: tuple | None = None
    row_tilt_deg: float | None = None
    collector_length_m: float = 1.0
    row_design_date: str | None = None
    row_half_width_h: float = 3.0
    loss_fraction: float = 0.14
    mounting: str = "adjustable"
    max_positions: int = 12

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
        if self.switch_dates is not None and len(self.switch_dates) != 2:
            raise ValueError(f"switch_dates = {self.switch_dates!r}: give two dates MM-DD")
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
        if self.mounting not in MOUNTINGS:
            raise ValueError(f"mounting = {self.mounting!r}: must be one of "
                             f"{', '.join(MOUNTINGS)}")
        if isinstance(self.max_positions, bool) or not isinstance(self.max_positions, int) \
                or not 1 <= self.max_positions <= 12:
            raise ValueError(f"max_positions = {self.max_positions!r}: must be a whole number "
                             "from 1 to 12")

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


@dataclass(frozen=True)
class TiltStudy:
    """The result of :func:`tilt_study`.

    Every comparison is in the units of the study's objective (kWh/m² of the
    year, of the weakest month, or of the chosen months); annual totals are
    kept beside it.

    Attributes
    ----------
    options : tuple of StudyOption
        In the order of :data:`OPTION_KINDS` (site planes in file order); only
        the kinds the mounting allows (:meth:`StudyOptions.allows`).
    tilt_curve : pandas.DataFrame
        Objective value (``objective_kwh_m2``) and annual irradiation
        (``annual_kwh_m2``) against tilt (0-90° by 1°) at ``curve_azimuth_deg``.
    grid_pct : pandas.DataFrame
        The objective on the tilt x azimuth grid as % of the grid optimum
        (index tilt_deg, columns azimuth_deg).
    grid_optimum : tuple
        (tilt_deg, azimuth_deg, objective value in kWh/m²) of the grid's best plane.
    warnings : tuple of str
        Things a practitioner should look at.
    sky : SkyYear
        The sky the study was scored on (not compared, not shown in repr).
    """

    site: Site
    options_used: StudyOptions
    options: tuple
    tilt_curve: pd.DataFrame
    curve_azimuth_deg: float
    grid_pct: pd.DataFrame
    grid_optimum: tuple
    warnings: tuple
    sky_note: str
    active_months: tuple = tuple(range(1, 13))
    worth_pct: float = 3.0
    monthly_method: tuple | None = None
    rows: tuple = ()
    row_layout: object | None = None
    row_note: str = ""
    yields: tuple = ()
    sky: SkyYear | None = field(default=None, repr=False, compare=False)

    def option(self, kind: str) -> StudyOption:
        return next(o for o in self.options if o.kind == kind)

    def has_option(self, kind: str) -> bool:
        return any(o.kind == kind for o in self.options)

    def score(self, opt: StudyOption) -> float:
        """The option's objective value, kWh/m²."""
        return _score_monthly(opt.monthly_kwh_m2[:, None], self.options_used,
                              self._active_mask)[0]

    @property
    def _active_mask(self):
        return np.isin(np.arange(1, 13), self.active_months)

    @property
    def mounting(self) -> str:
        return self.options_used.mounting

    @property
    def recommended(self) -> StudyOption:
        """The option to recommend under the objective and the mounting.

        A ``flush`` mounting keeps the roof as it is: the best of the site's
        planes. Otherwise start from the fixed optimum and move to two, four,
        then twelve adjustments a year, as far as the mounting allows, only
        while each step raises the objective by at least ``worth_pct`` percent
        (3 % by default: common practice, no source; each adjustment costs a
        site visit).
        """
        if self.mounting == "flush":
            planes = [o for o in self.options if o.kind == "plane"]
            if planes:
                return max(planes, key=self.score)
            return self.option("fixed-optimal")
        ladder = [self.option(k) for k in ("fixed-optimal", "two-season", "four-season",
                                            "monthly") if self.has_option(k)]
        best = ladder[0]
        for nxt in ladder[1:]:
            if self.score(nxt) >= self.score(best) * (1.0 + self.worth_pct / 100.0):
                best = nxt
            else:
                break
        return best

    @property
    def recommendation_rule(self) -> str:
        o = self.options_used
        if o.mounting == "flush":
            return ("flush on the roof: the roof plane as it is (the best of the site's planes "
                    f"on the {o.objective_label} objective); the best plane for the site is a "
                    "reference")
        if not any(self.has_option(k) for k, _ in SEASONAL_KINDS):
            return (f"{o.mounting} mounting: the fixed optimum on the {o.objective_label} "
                    "objective (no seasonal adjustment)")
        return (f"fixed optimum unless more adjustments raise the {o.objective_label}"
                f" objective by at least {self.worth_pct:g} % per step")

    def gain_pct(self, opt: StudyOption, kind: str) -> float | None:
        """Gain of ``opt`` over the option of ``kind`` on the objective, percent."""
        base = self.score(self.option(kind))
        return None if base <= 0 else 100.0 * (self.score(opt) / base - 1.0)

    def annual_gain_pct(self, opt: StudyOption, kind: str) -> float | None:
        """Gain of ``opt`` over the option of ``kind`` in annual totals, percent."""
        base = self.option(kind).annual_kwh_m2
        return None if base <= 0 else 100.0 * (opt.annual_kwh_m2 / base - 1.0)

    def share_pct(self, opt: StudyOption, kind: str) -> float | None:
        """``opt``'s objective value as a share of the option of ``kind``'s, percent."""
        base = self.score(self.option(kind))
        return None if base <= 0 else 100.0 * self.score(opt) / base

    def to_json_dict(self) -> dict:
        """The ``study`` document of the command line's ``--json`` output."""
        o = self.options_used
        rows = []
        for opt in self.options:
            rows.append({
                "label": opt.label, "kind": opt.kind,
                "schedule": [{"start": p.start, "end": p.end, "tilt_deg": p.tilt_deg,
                              "azimuth_deg": p.azimuth_deg} for p in opt.schedule],
                "annual_kwh_m2": round(opt.annual_kwh_m2, 3),
                "monthly_kwh_m2": [round(float(v), 3) for v in opt.monthly_kwh_m2],
                "objective_value_kwh_m2": round(float(self.score(opt)), 3),
                "gain_vs_horizontal_pct": _r(self.gain_pct(opt, "horizontal")),
                "gain_vs_fixed_optimal_pct": _r(self.gain_pct(opt, "fixed-optimal")),
                "share_of_tracking_pct": _r(self.share_pct(opt, "two-axis")),
                "share_of_best_plane_pct": _r(self.share_pct(opt, "fixed-optimal")),
                "annual_gain_vs_horizontal_pct": _r(self.annual_gain_pct(opt, "horizontal")),
                "annual_gain_vs_fixed_optimal_pct": _r(self.annual_gain_pct(opt,
                                                                            "fixed-optimal")),
                "adjustments_per_year": opt.adjustments_per_year,
                "note": opt.note,
            })
        return {
            "site": self.site.name, "year": o.irradiance.year, "sky": o.irradiance.sky,
            "model": o.irradiance.model, "objective": o.objective_label,
            "objective_units": _OBJECTIVE_UNITS[o.objective],
            "mounting": {"kind": o.mounting, "max_positions": o.max_positions
                         if o.mounting == "adjustable" else 1},
            "step_min": o.irradiance.step_min,
            "constraints": {"tilt_range_deg": [o.tilt_min_deg, o.tilt_max_deg],
                            "tilt_step_deg": o.tilt_step_deg,
                            "azimuth": "free" if o.azimuth_deg is None else o.azimuth_deg,
                            "min_days_between": o.min_days_between},
            "recommended": self.recommended.label,
            "recommended_kind": self.recommended.kind,
            "recommendation_rule": self.recommendation_rule,
            "active_months": list(self.active_months),
            "options": rows,
            "tilt_curve": {"azimuth_deg": self.curve_azimuth_deg,
                           "tilt_deg": self.tilt_curve.index.tolist(),
                           "objective_kwh_m2": [round(v, 3) for v in
                                                self.tilt_curve["objective_kwh_m2"]],
                           "annual_kwh_m2": [round(v, 3) for v in
                                             self.tilt_curve["annual_kwh_m2"]]},
            "grid_optimum": {"tilt_deg": self.grid_optimum[0],
                             "azimuth_deg": self.grid_optimum[1],
                             "objective_kwh_m2": round(self.grid_optimum[2], 3)},
            "warnings": list(self.warnings),
            "sky_note": self.sky_note,
            "rows": _rows_json(self),
            "specific_yield": _yields_json(self),
            "monthly_method": None if self.monthly_method is None else {
                "method": KLEIN_METHOD,
                "options": [{"label": c.label, "kind": c.kind,
                             "annual_kwh_m2": round(c.annual_kwh_m2, 3),
                             "monthly_kwh_m2": [round(float(v), 3) for v in c.monthly_kwh_m2],
                             "difference_vs_hourly_pct": _r(c.difference_pct)}
                            for c in self.monthly_method]},
        }


#: What an objective value measures.
_OBJECTIVE_UNITS = {"annual": "kWh/m2 in the year", "worst-month": "kWh/m2 in the weakest month",
                    "months": "kWh/m2 in the chosen months"}


def _r(v):
    return None if v is None else round(float(v), 3)


# -- scoring ------------------------------------------------------------------

def _month_of_day(sky: SkyYear) -> np.ndarray:
    days = pd.date_range(f"{sky.options.year}-01-01", periods=sky.n_days, freq="D")
    return days.month.to_numpy()


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


def _monthly_from_daily(daily: np.ndarray, month_of_day: np.ndarray) -> np.ndarray:
    out = np.zeros((12,) + daily.shape[1:])
    np.add.at(out, month_of_day - 1, daily)
    return out


def _mmdd(year: int, day_index: int) -> str:
    return (pd.Timestamp(year, 1, 1) + pd.Timedelta(days=int(day_index))).strftime("%m-%d")


def _day_from_mmdd(year: int, text: str) -> int:
    try:
        ts = pd.Timestamp(f"{year}-{text}")
    except ValueError:
        raise ValueError(f"switch date {text!r}: expected MM-DD") from None
    return int(ts.day_of_year) - 1


# -- schedule search --------------------------------------------------------------

def _periods_from_switches(switches, n_days):
    """Cyclic periods [s_i, s_{i+1}) from sorted switch days."""
    s = list(switches)
    return [(s[i], s[(i + 1) % len(s)]) for i in range(len(s))]


def _period_days(a, b, n_days):
    return np.arange(a, b) if b > a else np.r_[np.arange(a, n_days), np.arange(0, b)]


def _schedule_daily(daily: np.ndarray, switches, tilt_idx, n_days) -> np.ndarray:
    """Daily irradiation of a schedule (tilt column per period)."""
    out = np.empty(n_days)
    for (a, b), t in zip(_periods_from_switches(switches, n_days), tilt_idx, strict=True):
        d = _period_days(a, b, n_days)
        out[d] = daily[d, t]
    return out


def _best_tilts_separable(cum, switches, n_days):
    """Best tilt per period and the total, for a separable (weighted-sum) objective."""
    total = 0.0
    tilts = []
    for a, b in _periods_from_switches(switches, n_days):
        seg = cum[b] - cum[a] if b > a else (cum[n_days] - cum[a]) + cum[b]
        t = int(np.argmax(seg))
        tilts.append(t)
        total += float(seg[t])
    return tilts, total


def _two_period_exhaustive(cum, n_days, min_days):
    """Exhaustive search of two switch days and their best tilts.

    A two-period split is one period ``[s1, s1 + length)`` (cyclic) and the
    rest; a length and its complement give the same splits, so lengths up to
    half the year cover every split once.
    """
    total_all = cum[n_days]
    cum2 = np.vstack([cum, total_all[None, :] + cum[1:]])   # cumulative over two years
    s1 = np.arange(n_days)
    best_total, best_sw = -np.inf, None
    for length in range(min_days, n_days // 2 + 1):
        seg_a = cum2[s1 + length] - cum2[s1]
        seg_b = total_all[None, :] - seg_a
        tot = seg_a.max(axis=1) + seg_b.max(axis=1)
        i = int(np.argmax(tot))
        if tot[i] > best_total:
            best_total = float(tot[i])
            best_sw = sorted([int(s1[i]), int((s1[i] + length) % n_days)])
    tilts, total = _best_tilts_separable(cum, best_sw, n_days)
    return best_sw, tilts, total


def _k_period_search(cum, n_days, k, min_days, lattice=14):
    """K switch days: exhaustive on a lattice, then refined to the day."""
    grid = np.arange(0, n_days, lattice)
    best_total, best_sw = -np.inf, None
    for combo in itertools.combinations(grid.tolist(), k):
        gaps = np.diff(list(combo) + [combo[0] + n_days])
        if gaps.min() < min_days:
            continue
        _, tot = _best_tilts_separable(cum, combo, n_days)
        if tot > best_total:
            best_total, best_sw = tot, list(combo)
    improved = True
    while improved:
        improved = False
        for i in range(k):
            for delta in range(-lattice, lattice + 1):
                if delta == 0:
                    continue
                trial = best_sw.copy()
                trial[i] = (trial[i] + delta) % n_days
                if len(set(trial)) < k:
                    continue
                srt = sorted(trial)
                gaps = np.diff(srt + [srt[0] + n_days])
                if gaps.min() < min_days:
                    continue
                _, tot = _best_tilts_separable(cum, srt, n_days)
                if tot > best_total + 1e-12:
                    best_total, best_sw, improved = tot, srt, True
    tilts, total = _best_tilts_separable(cum, best_sw, n_days)
    return best_sw, tilts, total


def _improve_for_objective(daily, switches, tilts, month_of_day, opts, n_days, min_days,
                           active=None):
    """Local search on tilts and switch days for a non-separable objective."""
    def score(sw, tl):
        d = _schedule_daily(daily, sw, tl, n_days)
        return float(_score_monthly(_monthly_from_daily(d[:, None], month_of_day), opts,
                                    active)[0])

    best = score(switches, tilts)
    sw, tl = list(switches), list(tilts)
    improved = True
    n_t = daily.shape[1]
    while improved:
        improved = False
        for p in range(len(tl)):
            for t in range(n_t):
                if t == tl[p]:
                    continue
                trial = tl.copy()
                trial[p] = t
                v = score(sw, trial)
                if v > best + 1e-12:
                    best, tl, improved = v, trial, True
        for i in range(len(sw)):
            for delta in (-7, -3, -1, 1, 3, 7):
                trial = sw.copy()
                trial[i] = (trial[i] + delta) % n_days
                srt = sorted(trial)
                if len(set(srt)) < len(srt):
                    continue
                if np.diff(srt + [srt[0] + n_days]).min() < min_days:
                    continue
                order = np.argsort(trial)
                v = score(srt, [tl[j] for j in order])
                if v > best + 1e-12:
                    best, sw, tl, improved = v, srt, [tl[j] for j in order], True
    return sw, tl


# -- the study ----------------------------------------------------------------------

def tilt_study(site: Site, opts: StudyOptions | None = None,
               progress: Callable[[float, str], None] | None = None, *,
               sky: SkyYear | None = None) -> TiltStudy:
    """Compare tilt options for ``site`` under ``opts``.

    Parameters
    ----------
    site : Site
        The site, with its horizon and existing planes.
    opts : StudyOptions, optional
        Objective, constraints, mounting, sky basis.
    progress : callable, optional
        Called as ``progress(fraction, stage)`` between stages; a caller that
        wants to cancel raises from it and the exception propagates.
    sky : SkyYear, optional
        The year's sky for ``site`` under ``opts.irradiance``, when the caller
        has it already (:func:`tiltyard.engine.assessment.assess` builds it
        once); computed otherwise. The study carries it (``TiltStudy.sky``).

    Returns
    -------
    TiltStudy

    References
    ----------
    Transposition as in :mod:`tiltyard.engine.manyplane` (Perez et al. 1990;
    Hay & Davies 1980; Liu & Jordan 1963). The rule of thumb (tilt equal to the
    latitude, facing the equator) is common practice, no source.
    """
    opts = opts or StudyOptions()
    report = progress or (lambda fraction, stage: None)
    if opts.mounting == "flush" and not site.planes:
        raise ValueError("mounting = 'flush': panels flush on a roof need the roof's plane; "
                         "add the roof plane (tilt and azimuth) to the site, or choose a rack")
    report(0.0, "sun and sky for the year")
    if sky is None:
        sky = sky_year(site, opts.irradiance)
    elif sky.site != site or sky.options != opts.irradiance:
        raise ValueError("the sky given is of another site or sky basis than the study's")
    report(0.25, "transposition terms")
    st = _Scorer(site, opts, sky, many_plane_terms(sky))
    options = [st.fixed("Horizontal", "horizontal", 0.0, site.equator_azimuth_deg,
                        "baseline for every gain")]
    st.set_active(options[0].monthly_kwh_m2)
    for pl in site.planes:
        options.append(st.fixed(pl.label, "plane", pl.tilt_deg, pl.azimuth_deg,
                                "existing plane as it is"))
    if opts.allows("rule-of-thumb"):
        rot_tilt = min(abs(site.latitude_deg), 90.0)
        options.append(st.fixed(f"Rule of thumb: tilt = latitude ({rot_tilt:.0f} deg)",
                                "rule-of-thumb", rot_tilt, site.equator_azimuth_deg,
                                "rule of thumb, not an optimum: tilt equal to |latitude|, "
                                "facing the equator"))
    report(0.35, "tilt and azimuth grid")
    grid_pct, grid_opt = st.grid()
    fixed_opt = st.fixed_optimum()
    options.append(fixed_opt)
    warnings = st.azimuth_warnings(fixed_opt)
    report(0.6, "seasonal schedules")
    options.extend(st.seasonal())
    report(0.85, "two-axis ceiling")
    options.append(_two_axis(sky, site, st.mod))
    curve_az = fixed_opt.schedule[0].azimuth_deg
    tilt_curve = st.curve(curve_az)
    if opts.irradiance.sky == "clear":
        warnings.append("Clear-sky basis: every figure is an upper bound, not an expected "
                        "yield; cloudier months favour flatter tilts.")
    inactive = [MONTH_NAMES[m][:3] for m in range(12) if not st.active[m]]
    if inactive:
        warnings.append("No useful daylight in " + ", ".join(inactive) + " (polar night or "
                        "near it): those months are left out of the worst-month objective.")
    report(0.9, "rows and indicative yield")
    layouts = _RowLayouts(site, opts)     # options sharing a plane share its layout
    rows = tuple(_option_rows(o, layouts) for o in options)
    fixed_p = fixed_opt.schedule[0]
    row_tilt = fixed_p.tilt_deg if opts.row_tilt_deg is None else opts.row_tilt_deg
    chosen_rows, row_note = layouts.get(row_tilt, fixed_p.azimuth_deg)
    yields = tuple(_option_yield(sky, site, o, opts) for o in options)
    monthly_method = None
    if opts.irradiance.sky == "monthly":
        monthly_method = monthly_method_comparison(site, options, opts.irradiance.year,
                                                   opts.irradiance.solar_constant_w_m2)
    return TiltStudy(site, opts, tuple(options), tilt_curve, curve_az, grid_pct, grid_opt,
                     tuple(warnings), sky.note, st.active_months,
                     monthly_method=monthly_method, rows=rows, row_layout=chosen_rows,
                     row_note=row_note, yields=yields, sky=sky)


class _Scorer:
    """The pieces of one study that share its sky, terms and objective."""

    def __init__(self, site: Site, opts: StudyOptions, sky: SkyYear, terms):
        self.site, self.opts, self.sky, self.terms = site, opts, sky, terms
        self.n_days = sky.n_days
        self.mod = _month_of_day(sky)
        self.year = opts.irradiance.year
        self.active = np.ones(12, dtype=bool)
        self.active_months = tuple(range(1, 13))

    def set_active(self, horizontal_monthly: np.ndarray) -> None:
        """Months with useful daylight (more than 1 % of the best month on the horizontal)."""
        self.active = horizontal_monthly > 0.01 * horizontal_monthly.max()
        self.active_months = tuple(int(m) for m in np.flatnonzero(self.active) + 1)

    def score_cols(self, monthly: np.ndarray) -> np.ndarray:
        return _score_monthly(monthly, self.opts, self.active)

    def monthly(self, tilts, azimuths) -> np.ndarray:
        """(12, n) monthly kWh/m² of planes (any matching shapes, flattened)."""
        r = many_plane_daily(self.terms, tilts, azimuths, site=self.site)
        return _monthly_from_daily(r.daily_kwh_m2, self.mod), r

    def fixed(self, label, kind, tilt, az, note="") -> StudyOption:
        m = self.monthly([tilt], [az])[0][:, 0]
        sched = (Period("01-01", "12-31", round(float(tilt), 3), round(float(az) % 360.0, 3)),)
        return StudyOption(label, kind, sched, m, float(m.sum()), note)

    def grid(self) -> tuple:
        """The tilt x azimuth map in objective units (% of its best) and its best plane."""
        g_t, g_a = np.meshgrid(np.arange(0.0, 91.0, 1.0), np.arange(0.0, 360.0, 5.0),
                               indexing="ij")
        g_month, _ = self.monthly(g_t, g_a)
        g_score = self.score_cols(g_month).reshape(g_t.shape)
        gi = np.unravel_index(int(np.argmax(g_score)), g_score.shape)
        self.grid_tilts, self.grid_azimuths = g_t, g_a
        self.grid_best_azimuth = float(g_a[gi])
        best = float(g_score[gi])
        pct = 100.0 * g_score / best if best > 0 else np.zeros_like(g_score)
        grid_pct = pd.DataFrame(pct, index=pd.Index(g_t[:, 0], name="tilt_deg"),
                                columns=pd.Index(g_a[0], name="azimuth_deg"))
        return grid_pct, (float(g_t[gi]), float(g_a[gi]), best)

    def fixed_optimum(self) -> StudyOption:
        """The best fixed plane on the constrained tilt candidates (azimuth 1° near the map's)."""
        opts = self.opts
        tilts = opts.candidate_tilts()
        if opts.azimuth_deg is not None:
            azimuths = np.array([float(opts.azimuth_deg) % 360.0])
        else:
            azimuths = np.mod(self.grid_best_azimuth + np.arange(-5.0, 5.5, 1.0), 360.0)
        c_t, c_a = np.meshgrid(tilts, azimuths, indexing="ij")
        c_month, cand = self.monthly(c_t, c_a)
        ci = int(np.argmax(self.score_cols(c_month)))
        opt_tilt, opt_az = float(c_t.ravel()[ci]), float(c_a.ravel()[ci])
        ai = int(np.flatnonzero(azimuths == opt_az)[0])
        # the candidates' daily columns at the optimum's azimuth feed the schedules
        self.sched_daily = cand.daily_kwh_m2.reshape(self.n_days, len(tilts),
                                                     len(azimuths))[:, :, ai]
        self.sched_tilts, self.sched_az = tilts, opt_az
        label = ("Best plane for the site" if opts.mounting == "flush" else "Optimal fixed")
        note = (f"optimum over tilts {tilts[0]:g}-{tilts[-1]:g} by {opts.tilt_step_deg:g} deg"
                + (", azimuth fixed" if opts.azimuth_deg is not None
                   else ", azimuth free (1 deg)"))
        if opts.mounting == "flush":
            note += "; a reference for the roof planes, which the panels follow"
        return self.fixed(f"{label} ({opt_tilt:g} deg, azimuth {opt_az:g} deg)",
                          "fixed-optimal", opt_tilt, opt_az, note)

    def azimuth_warnings(self, fixed_opt: StudyOption) -> list:
        """On a clear sky, an optimum far off the equator direction is the horizon's or a clock's."""
        site, opts, sky = self.site, self.opts, self.sky
        opt_az = fixed_opt.schedule[0].azimuth_deg
        equator = site.equator_azimuth_deg
        off = abs((opt_az - equator + 180.0) % 360.0 - 180.0)
        if opts.irradiance.sky != "clear" or off <= 5.0 or opts.azimuth_deg is not None:
            return []
        open_site = site.with_changes(horizon=type(site.horizon)(), obstacles=())
        g_t, g_a = self.grid_tilts, self.grid_azimuths
        og = many_plane_daily(many_plane_terms(_open_sky(sky, open_site)), g_t, g_a,
                              site=open_site)
        og_ann = og.daily_kwh_m2.sum(axis=0).reshape(g_t.shape)
        oa = float(g_a[np.unravel_index(int(np.argmax(og_ann)), og_ann.shape)])
        if abs((oa - equator + 180.0) % 360.0 - 180.0) > 5.0:
            return [f"The clear-sky optimum azimuth ({oa:g} deg) is more than 5 deg from the "
                    f"equator direction ({equator:g} deg) even with the horizon removed: check "
                    "the time zone and timestamps upstream."]
        return [f"The optimum azimuth ({opt_az:g} deg) is {off:.0f} deg off the equator "
                "direction because of the site horizon."]

    def curve(self, azimuth_deg: float) -> pd.DataFrame:
        """Objective and annual irradiation against tilt (0-90° by 1°) at one azimuth."""
        tilts = np.arange(0.0, 91.0)
        m, _ = self.monthly(tilts, np.full(91, azimuth_deg))
        return pd.DataFrame({"objective_kwh_m2": self.score_cols(m), "annual_kwh_m2": m.sum(0)},
                            index=pd.Index(tilts, name="tilt_deg"))

    def seasonal(self) -> list:
        """The seasonal schedules the mounting allows, at the fixed optimum's azimuth."""
        opts, n_days, year = self.opts, self.n_days, self.year
        wanted = [k for k, _ in SEASONAL_KINDS if opts.allows(k)]
        if not wanted:
            return []
        sd, s_t, mod = self.sched_daily, self.sched_tilts, self.mod
        weights = np.ones(n_days)
        if opts.objective == "months":
            # other days weigh almost nothing: they only break ties in unweighted periods
            weights = np.where(np.isin(mod, [int(m) for m in opts.months]), 1.0, 1e-6)
        cum = np.vstack([np.zeros(len(s_t)), np.cumsum(sd * weights[:, None], axis=0)])
        min_days = int(opts.min_days_between)
        separable = opts.objective != "worst-month"
        local = "; worst-month objective by local search from the annual optimum"
        out = []
        if "two-season" in wanted:
            if opts.switch_dates is not None:
                sw2 = sorted(_day_from_mmdd(year, x) for x in opts.switch_dates)
                t2, _ = _best_tilts_separable(cum, sw2, n_days)
                note2 = "switch dates fixed by the user"
            else:
                sw2, t2, _ = _two_period_exhaustive(cum, n_days, min_days)
                note2 = "switch dates optimised to the day (exhaustive)"
            if not separable:
                if opts.switch_dates is None:
                    sw2, t2 = _improve_for_objective(sd, sw2, t2, mod, opts, n_days, min_days,
                                                    self.active)
                note2 += local
            out.append(self._schedule("Two-season schedule", "two-season", sw2, t2, note2))
        if "four-season" in wanted:
            sw4, t4, _ = _k_period_search(cum, n_days, 4, min_days)
            note4 = "switch dates optimised to the day (14-day lattice, refined)"
            if not separable:
                sw4, t4 = _improve_for_objective(sd, sw4, t4, mod, opts, n_days, min_days,
                                                self.active)
                note4 += local
            out.append(self._schedule("Four-season schedule", "four-season", sw4, t4, note4))
        if "monthly" in wanted:
            starts = [int(pd.Timestamp(year, m, 1).day_of_year) - 1 for m in range(1, 13)]
            cols = _monthly_from_daily(sd, mod)
            tm = [int(np.argmax(cols[m] if self.active[m] else cols.sum(axis=0)))
                  for m in range(12)]
            out.append(self._schedule("Monthly schedule", "monthly", starts, tm,
                                      "best tilt for each calendar month"))
        return out

    def _schedule(self, label, kind, switches, tilt_idx, note) -> StudyOption:
        n_days, year = self.n_days, self.year
        dd = _schedule_daily(self.sched_daily, switches, tilt_idx, n_days)
        m = _monthly_from_daily(dd[:, None], self.mod)[:, 0]
        periods = [Period(_mmdd(year, a), _mmdd(year, (b - 1) % n_days),
                          float(self.sched_tilts[t]), round(self.sched_az, 3))
                   for (a, b), t in zip(_periods_from_switches(switches, n_days), tilt_idx,
                                        strict=True)]
        periods.sort(key=lambda p: p.start)
        return StudyOption(label, kind, tuple(periods), m, float(m.sum()), note)


KLEIN_METHOD = ("Klein (1977) monthly-mean method with the Erbs et al. (1982) monthly diffuse "
                "fraction and an isotropic sky (Duffie & Beckman 2013, sec. 2.19); open "
                "horizon, so the difference also contains the horizon loss")


@dataclass(frozen=True)
class MonthlyMethodOption:
    """An option's schedule evaluated with Klein's monthly-mean method."""

    label: str
    kind: str
    monthly_kwh_m2: np.ndarray
    annual_kwh_m2: float
    difference_pct: float | None     # hourly synthetic-year result vs this, %


def _days_in_period_by_month(period: Period, year: int) -> np.ndarray:
    """Number of days of each calendar month that fall in ``period`` (start..end inclusive)."""
    days = pd.date_range(f"{year}-01-01", f"{year}-12-31", freq="D")
    a, b = _day_from_mmdd(year, period.start), _day_from_mmdd(year, period.end)
    idx = np.arange(len(days))
    inside = (idx >= a) & (idx <= b) if a <= b else (idx >= a) | (idx <= b)
    return np.bincount(days.month.to_numpy()[inside] - 1, minlength=12).astype(float)


def monthly_method_comparison(site: Site, options, year: int,
                              solar_constant_w_m2: float) -> tuple:
    """Evaluate each option's schedule with Klein's monthly-mean method.

    For every period of a schedule the monthly mean daily irradiation on the
    period's plane comes from :func:`tiltyard.engine.monthly.klein_monthly_tilted`
    (Klein 1977; Erbs, Klein & Duffie 1982; isotropic sky, Liu & Jordan 1963);
    each month's total is the mean daily value times the days of that month in
    the period. The site horizon is not part of the monthly method.

    Parameters
    ----------
    site : Site
        Must carry ``monthly_ghi_kwh_m2_day`` (12 values).
    options : sequence of StudyOption
        Options with tilts (the two-axis ceiling is skipped).
    year : int
        Year whose calendar splits the periods.
    solar_constant_w_m2 : float
        Solar constant for the extraterrestrial irradiation.

    Returns
    -------
    tuple of MonthlyMethodOption
    """
    from .monthly import klein_monthly_tilted

    ghi = np.asarray(site.monthly_ghi_kwh_m2_day, dtype=float)
    albedo = np.asarray(site.albedo_by_month(), dtype=float)
    cache = {}
    out = []
    for opt in options:
        if opt.kind == "two-axis":
            continue
        monthly = np.zeros(12)
        for period in opt.schedule:
            key = (period.tilt_deg, period.azimuth_deg)
            if key not in cache:
                cache[key] = klein_monthly_tilted(site.latitude_deg, ghi, period.tilt_deg,
                                                  period.azimuth_deg, albedo=albedo,
                                                  solar_constant_w_m2=solar_constant_w_m2)
            daily = np.asarray(cache[key].poa_global_kwh_m2_day, dtype=float)
            monthly += daily * _days_in_period_by_month(period, year)
        annual = float(monthly.sum())
        diff = None if annual <= 0 else 100.0 * (opt.annual_kwh_m2 / annual - 1.0)
        out.append(MonthlyMethodOption(opt.label, opt.kind, monthly, annual, diff))
    return tuple(out)


@dataclass(frozen=True)
class OptionRows:
    """Rows laid out for an option on flat ground: spaced for its steepest period."""

    label: str
    kind: str
    layout: object | None             # rows.RowLayout, None when no design window exists
    per_ground_kwh_m2: float | None   # annual irradiation per m² of ground
    note: str = ""


@dataclass(frozen=True)
class OptionYield:
    """An option's indicative specific yield (not a system design)."""

    label: str
    kind: str
    result: object                    # specific_yield.SpecificYield


def _period_mask(day_index: np.ndarray, period: Period, year: int) -> np.ndarray:
    a, b = _day_from_mmdd(year, period.start), _day_from_mmdd(year, period.end)
    return (day_index >= a) & (day_index <= b) if a <= b else (day_index >= a) | (day_index <= b)


def schedule_poa(sky: SkyYear, site: Site, option: StudyOption) -> pd.DataFrame:
    """Interval plane-of-array irradiance of an option's schedule, W/m².

    Each period's plane gets its own horizon shading; the two-axis ceiling
    follows the sun. Values are interval means (the instantaneous value at the
    interval's evaluation point times its sun-up fraction), so
    ``poa_global * step_h / 1000`` summed over the year is the option's annual
    irradiation in kWh/m² (tested against the many-plane engine).

    Parameters
    ----------
    sky : SkyYear
        The study's sky.
    site : Site
        The site (horizon).
    option : StudyOption
        The option whose schedule is evaluated.

    Returns
    -------
    pandas.DataFrame
        Indexed by interval start in the site's time zone; columns
        ``surface_tilt``, ``surface_azimuth``, ``poa_global``, ``poa_direct``,
        ``poa_sky_diffuse``, ``poa_ground_diffuse`` and ``poa_global_open``
        (the same plane with an open horizon).

    References
    ----------
    Transposition as :func:`tiltyard.engine.plane.poa_components` (pvlib;
    Perez et al. 1990, Hay & Davies 1980, Liu & Jordan 1963).
    """
    return periods_poa(sky, site, None if option.kind == "two-axis" else option.schedule)


def periods_poa(sky: SkyYear, site: Site, schedule) -> pd.DataFrame:
    """Interval plane-of-array irradiance of a schedule of periods, W/m².

    The arithmetic of :func:`schedule_poa`: each day counts on the plane of
    the period it falls in (``start``..``end`` inclusive, "MM-DD", a period
    may run over the new year; days outside every period count 0), with that
    plane's horizon shading. ``schedule=None`` is two-axis tracking.

    Parameters
    ----------
    sky : SkyYear
        A sky year for ``site``.
    site : Site
        The site (horizon).
    schedule : sequence of Period or None
        Periods with ``tilt_deg`` and ``azimuth_deg``; None follows the sun.

    Returns
    -------
    pandas.DataFrame
        As :func:`schedule_poa`.

    References
    ----------
    Transposition as :func:`tiltyard.engine.plane.poa_components` (pvlib;
    Perez et al. 1990, Hay & Davies 1980, Liu & Jordan 1963).
    """
    from .horizon import plane_shading

    pos = sky.position
    frac = sky.sun_up_fraction
    zen = pos["apparent_zenith"].to_numpy()
    saz = pos["azimuth"].to_numpy()
    n = len(frac)
    cols = ("poa_global", "poa_direct", "poa_sky_diffuse", "poa_ground_diffuse",
            "poa_global_open")
    out = {c: np.zeros(n) for c in cols}
    tilt = np.zeros(n)
    azim = np.zeros(n)
    albedo = np.broadcast_to(np.asarray(sky.albedo, dtype=float), (n,))
    if schedule is None:
        masks = [(np.ones(n, dtype=bool), None)]
    else:
        masks = [(_period_mask(sky.day_index, p, sky.options.year), p) for p in schedule]
    for mask, period in masks:
        m = mask & (frac > 0)
        if not m.any():
            continue
        if period is None:
            t = np.clip(zen[m], 0.0, 90.0)
            a = saz[m]
            shading = None
        else:
            t = float(period.tilt_deg)
            a = float(period.azimuth_deg)
            shading = plane_shading(site, t, a)
        poa = poa_components(t, a, zen[m], saz[m], sky.ghi[m], sky.dni[m], sky.dhi[m],
                             sky.dni_extra[m], albedo[m], sky.options.model,
                             sun_visible=sky.sun_visible[m], shading=shading)
        for c in cols:
            out[c][m] = poa[c].to_numpy() * frac[m]
        tilt[m] = t
        azim[m] = a
    index = sky.grid.start_utc.tz_convert(site.timezone)
    df = pd.DataFrame({"surface_tilt": tilt, "surface_azimuth": azim, **out}, index=index)
    df.index.name = "interval_start"
    return df


def _row_kw(opts: StudyOptions) -> dict:
    kw = {"collector_length_m": opts.collector_length_m, "half_width_h": opts.row_half_width_h}
    if opts.row_design_date is not None:
        kw["design_date"] = pd.Timestamp(f"{opts.irradiance.year}-{opts.row_design_date}")
    return kw


class _RowLayouts:
    """Row layouts of one study by plane, each computed once: (layout or None, message)."""

    def __init__(self, site: Site, opts: StudyOptions):
        self._site, self._kw, self._done = site, _row_kw(opts), {}

    def get(self, tilt_deg: float, azimuth_deg: float) -> tuple:
        from .rows import row_layout

        key = (float(tilt_deg), float(azimuth_deg))
        if key not in self._done:
            try:
                self._done[key] = (row_layout(self._site, *key, **self._kw), "")
            except ValueError as exc:
                self._done[key] = (None, str(exc))
        return self._done[key]


def _option_rows(opt: StudyOption, layouts: _RowLayouts) -> OptionRows:
    from .rows import irradiation_per_ground_m2

    if opt.kind == "two-axis":
        return OptionRows(opt.label, opt.kind, None, None,
                          "trackers need their own spacing study; not laid out")
    steep = max(opt.schedule, key=lambda p: p.tilt_deg)
    layout, message = layouts.get(steep.tilt_deg, steep.azimuth_deg)
    if layout is None:
        return OptionRows(opt.label, opt.kind, None, None, message)
    per_ground = float(irradiation_per_ground_m2(opt.annual_kwh_m2, layout.gcr))
    note = ("spaced for the steepest period of the schedule"
            if len(opt.schedule) > 1 else "")
    return OptionRows(opt.label, opt.kind, layout, per_ground, note)


def _option_yield(sky: SkyYear, site: Site, opt: StudyOption, opts: StudyOptions) -> OptionYield:
    from .specific_yield import specific_yield

    poa = schedule_poa(sky, site, opt)["poa_global"]
    temp = wind = None
    if sky.temp_air is not None:
        temp = np.asarray(sky.temp_air, dtype=float)
        if sky.wind_speed is not None:
            wind = np.asarray(sky.wind_speed, dtype=float)
    result = specific_yield(poa, sky.grid.step_h, temp_air=temp, wind_speed=wind,
                            loss_fraction=opts.loss_fraction)
    return OptionYield(opt.label, opt.kind, result)


def _rows_json(study) -> dict | None:
    from .rows import GCR_DEFINITIONS, LIMITATION

    if not study.rows:
        return None

    def layout(lay):
        if lay is None:
            return None
        return {"tilt_deg": lay.tilt_deg, "azimuth_deg": round(lay.azimuth_deg, 3),
                "collector_length_m": lay.collector_length_m,
                "pitch_m": round(lay.pitch_m, 3), "row_gap_m": round(lay.row_gap_m, 3),
                "gcr": round(lay.gcr, 4), "ground_cover_fraction": round(lay.ground_cover_fraction, 4),
                "design_date": lay.design_date.strftime("%m-%d"),
                "window_start": lay.window_start.isoformat(),
                "window_end": lay.window_end.isoformat(),
                "limiting_elevation_deg": round(lay.limiting_elevation_deg, 2)}
    return {
        "definitions": GCR_DEFINITIONS if isinstance(GCR_DEFINITIONS, str)
        else " ".join(GCR_DEFINITIONS),
        "limitation": LIMITATION,
        "chosen": layout(study.row_layout), "chosen_note": study.row_note,
        "options": [{"label": r.label, "kind": r.kind, "layout": layout(r.layout),
                     "per_ground_kwh_m2": _r(r.per_ground_kwh_m2), "note": r.note}
                    for r in study.rows],
    }


def _yields_json(study) -> dict | None:
    from .specific_yield import LABEL

    if not study.yields:
        return None
    first = study.yields[0].result
    return {
        "label": LABEL, "loss_fraction": first.loss_fraction, "gamma_pdc": first.gamma_pdc,
        "temperature_model": first.temperature_model, "notes": list(first.notes),
        "options": [{"label": y.label, "kind": y.kind,
                     "annual_kwh_kwp": round(y.result.annual_kwh_kwp, 2),
                     "monthly_kwh_kwp": [round(float(v), 2) for v in y.result.monthly_kwh_kwp],
                     "temperature_loss_pct": round(y.result.temperature_loss_pct, 2)}
                    for y in study.yields],
    }


def _open_sky(sky: SkyYear, open_site: Site) -> SkyYear:
    """The same sky with the sun never hidden (for the timestamp sanity check)."""
    from dataclasses import replace

    up = sky.sun_up_fraction > 0
    return replace(sky, site=open_site, sun_visible=up.copy())


def _two_axis(sky: SkyYear, site: Site, month_of_day: np.ndarray) -> StudyOption:
    """Two-axis tracking: the plane faces the sun at every instant (the ceiling).

    Beam is blocked behind the site horizon; sky diffuse uses the open-sky view
    factor of the tracking plane, a slight overestimate that suits a ceiling.

    References
    ----------
    pvlib transposition as in :func:`tiltyard.engine.plane.poa_components`.
    """
    pos = sky.position
    up = sky.sun_up_fraction > 0
    tilt = np.where(up, np.clip(pos["apparent_zenith"].to_numpy(), 0.0, 90.0), 0.0)
    az = pos["azimuth"].to_numpy()
    poa = poa_components(tilt, az, pos["apparent_zenith"].to_numpy(), az, sky.ghi, sky.dni,
                         sky.dhi, sky.dni_extra, sky.albedo, sky.options.model,
                         sun_visible=sky.sun_visible, shading=None)
    e = np.where(up, poa["poa_global"].to_numpy(), 0.0) * sky.kwh_weight
    daily = np.bincount(sky.day_index, weights=e, minlength=sky.n_days)
    m = _monthly_from_daily(daily[:, None], month_of_day)[:, 0]
    return StudyOption("Two-axis tracking (ceiling, not a recommendation)", "two-axis",
                       (Period("01-01", "12-31", None, None),), m,
                       float(m.sum()),
                       "upper limit: the plane follows the sun; shown only to judge the others")


__all__ = ["KLEIN_METHOD", "OPTION_KINDS", "MonthlyMethodOption", "OptionRows", "OptionYield",
           "Period", "StudyOption", "StudyOptions", "TiltStudy", "monthly_method_comparison",
           "periods_poa", "schedule_poa", "tilt_study"]

