"""Tiltyard's public scripting API: everything a script needs, in one import.

::

    from tiltyard.api import assess, demo_assessment

    result = assess(demo_assessment("larkmoor-dairy"))
    print(result.basis.words, result.study().recommended.label)

The layers
----------
**Site** (:class:`Site`, with its :class:`HorizonProfile`, :class:`Obstacle`
and :class:`Plane`) is the place: coordinates, time zone, ground albedo,
horizon, obstacles, the roof planes, and optionally twelve monthly GHI
values. Every field is checked when it is built (:class:`SiteError` names the
field, the value and the allowed range).

**Assessment** (:class:`Assessment`) is everything that decides a site's
figures: the site, the sky basis (``auto``, ``clear``, ``monthly`` or a
weather file given as a :class:`WeatherSource`), the transposition and
clear-sky models, the solar constant, the year and interval, the study
settings (:class:`StudySettings`), the mounting (:class:`Mounting`) and the
row settings (:class:`RowSettings`). It is frozen: change it with
:func:`dataclasses.replace`. A site file of format 2 stores it
(:func:`save_assessment`, :func:`load_assessment`); a bundled demo site opens
as one with :func:`demo_assessment`.

**assess()** (:func:`assess`) chooses the sky basis (``auto``: the weather
file if one is named, else the site's monthly values, else the clear sky),
reads and checks the weather file, and builds the year's sky **once**. The
:class:`AssessmentResult` it returns computes everything else from that sky
on first use and keeps it: the tilt study (``study()`` ->
:class:`TiltStudy`), irradiance on any plane (``irradiance(tilt, azimuth)``
-> :class:`IrradianceResult`), the horizon loss (``horizon_loss()`` ->
:class:`HorizonLoss`), one day's curves (``day_curves()`` ->
:class:`DayCurves`), the sun chart, the sheet's data, and the clear-sky upper
bound beside a measured or monthly basis (``clear_sky_bound()``).
``result.basis`` (:class:`Basis`) says which sky was used and why. The app,
the command line and the feasibility sheet read the same result, so a script
gets the numbers they show.

Beside it: :func:`sun_day` (the sun on one date), the weather import
(:func:`read_weather_file`, :func:`read_weather_csv`, :class:`ColumnMap`,
:func:`load_weather_for_site`), the demo sites (:func:`demo_site_names`,
:func:`load_demo`) and a portfolio (:func:`read_portfolio`, :func:`plan_jobs`,
:func:`run_batch`, :func:`read_results`: what ``tiltyard batch`` runs).

Units are in the names (``poa_kwh_m2``, ``tilt_deg``); azimuths are degrees
clockwise from true north (south = 180). Every figure is a preliminary
feasibility estimate, not a design (:data:`CAUTION`): structural, electrical
and fire safety and the sizing of any installation belong to local codes and
licensed installers.

This module imports only the engine (numpy, pandas, pvlib), never the app or
Qt. Worked examples: ``docs/scripting.md``.
"""

from __future__ import annotations

from tiltyard.engine.assess import (
    AssessmentError,
    AssessmentResult,
    Basis,
    WeatherFitError,
    assess,
)
from tiltyard.engine.assessment import (
    Assessment,
    Mounting,
    RowSettings,
    StudySettings,
    WeatherSource,
    demo_assessment,
    file_sha256,
    load_assessment,
    resolve_assessment,
    save_assessment,
)
from tiltyard.engine.batch.inputs import Portfolio, PortfolioError, read_portfolio
from tiltyard.engine.batch.results import read_results
from tiltyard.engine.batch.run import BatchSummary, plan_jobs, run_batch
from tiltyard.engine.cautions import CAUTION
from tiltyard.engine.daycurves import DayCurves
from tiltyard.engine.demo_sites import demo_site_names, load_demo
from tiltyard.engine.horizon_loss import HorizonLoss
from tiltyard.engine.jobs import IrradianceResult, SunDay, sun_day
from tiltyard.engine.site import MOUNTINGS, HorizonProfile, Obstacle, Plane, Site, SiteError
from tiltyard.engine.site_file import load_site, save_site
from tiltyard.engine.skyyear import SkyYear
from tiltyard.engine.tilt import Period, StudyOption, TiltStudy
from tiltyard.engine.weather import (
    ColumnMap,
    WeatherData,
    WeatherImportError,
    read_weather_csv,
    read_weather_file,
)
from tiltyard.engine.weather_site import WeatherOptionError, load_weather_for_site

__all__ = [
    # the site
    "Site", "Plane", "Obstacle", "HorizonProfile", "MOUNTINGS", "SiteError",
    "load_site", "save_site", "demo_site_names", "load_demo",
    # the assessment
    "Assessment", "StudySettings", "RowSettings", "Mounting", "WeatherSource",
    "load_assessment", "save_assessment", "demo_assessment", "resolve_assessment",
    "file_sha256",
    # assess and its result
    "assess", "AssessmentResult", "Basis", "AssessmentError", "WeatherFitError",
    # the result types a script meets
    "TiltStudy", "StudyOption", "Period", "IrradianceResult", "HorizonLoss", "DayCurves",
    "SkyYear", "SunDay", "sun_day",
    # weather files
    "read_weather_file", "read_weather_csv", "WeatherData", "WeatherImportError",
    "WeatherOptionError", "ColumnMap", "load_weather_for_site",
    # a portfolio (tiltyard batch)
    "read_portfolio", "Portfolio", "PortfolioError", "plan_jobs", "run_batch", "BatchSummary",
    "read_results",
    # the standing caution
    "CAUTION",
]
