"""The study's result, :class:`TiltStudy`: the options compared, the recommendation,
gains and shares on the objective, and its ``--json`` document.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..rows import GCR_DEFINITIONS, LIMITATION
from ..site import Site
from ..skyyear import SkyYear
from ..specific_yield import LABEL
from ..words import mounting_words
from .monthly_check import KLEIN_METHOD
from .options import SEASONAL_KINDS, StudyOption, StudyOptions, _score_monthly


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
            return (f"{mounting_words(o.mounting)}: the fixed optimum on the {o.objective_label} "
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


def _rows_json(study) -> dict | None:
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
