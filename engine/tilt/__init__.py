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

The package, in reading order: ``options`` (option kinds, mountings,
:class:`StudyOptions`, :class:`Period`, :class:`StudyOption`, scoring of monthly
totals), ``search`` (the schedule search on arrays), ``study``
(:func:`tilt_study`, the two-axis ceiling, :func:`schedule_poa`, rows and
yields per option), ``monthly_check`` (the Klein monthly-mean cross-check) and
``result`` (:class:`TiltStudy` and its JSON).
"""

from .monthly_check import KLEIN_METHOD, MonthlyMethodOption, monthly_method_comparison
from .monthly_check import _days_in_period_by_month as _days_in_period_by_month
from .options import (
    MOUNTINGS,
    OPTION_KINDS,
    SEASONAL_KINDS,
    Period,
    RowSettings,
    StudyOption,
    StudyOptions,
    StudySettings,
)
from .options import _score_monthly as _score_monthly
from .result import TiltStudy
from .study import (
    ALL_POA_COLUMNS,
    PERIOD_COLUMNS,
    OptionRows,
    OptionYield,
    periods_poa,
    schedule_poa,
    tilt_study,
)

# the two private names above stay importable here for the tests
__all__ = ["ALL_POA_COLUMNS", "KLEIN_METHOD", "MOUNTINGS", "OPTION_KINDS", "PERIOD_COLUMNS",
           "SEASONAL_KINDS", "MonthlyMethodOption", "OptionRows", "OptionYield", "Period",
           "RowSettings", "StudyOption", "StudyOptions", "StudySettings", "TiltStudy",
           "monthly_method_comparison", "periods_poa",
           "schedule_poa", "tilt_study"]
