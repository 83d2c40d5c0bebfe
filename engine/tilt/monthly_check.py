"""The Klein (1977) monthly-mean cross-check of each option's schedule (when the sky
basis is the site's monthly values).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..monthly import klein_monthly_tilted
from ..site import Site
from .options import Period
from .search import _day_from_mmdd

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
