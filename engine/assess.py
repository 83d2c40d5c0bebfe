"""The one entry point of an assessment: :func:`assess` -> :class:`AssessmentResult`.

:func:`assess` chooses the sky basis (:func:`choose_basis`), reads and checks
the weather file when the basis is one (:func:`load_weather`,
:func:`weather_fit_warnings`), and evaluates the year's sky **once**
(:func:`tiltyard.engine.skyyear.sky_year`). Everything else is computed from
that sky on first use and kept: the tilt study, irradiance on any plane, the
horizon loss, one day's curves, the sun chart, the sheet's data and the clear-
sky upper bound beside a measured or monthly basis. The command line, every
view of the app and the sheet read this one result, so a figure is the same
number wherever it is shown.
"""

from __future__ import annotations

import math
from collections import OrderedDict
from collections.abc import Callable
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from .assessment import DEFAULT_INTERVAL_MIN, Assessment, assessment_to_dict, file_sha256
from .cautions import CAUTION
from .daycurves import compare_options, irradiance_day
from .exports import option_horizon_loss, sheet_data
from .horizon_loss import horizon_loss_of_sky
from .jobs import irradiance_on_plane
from .skyyear import IrradianceOptions, SkyYear, sky_year
from .sunchart import sun_chart
from .tilt import periods_poa, tilt_study
from .weather import WeatherData, finding_text, summary_text
from .weather_site import load_weather_for_site
from .words import basis_words

#: A weather file recorded further than this from the site is refused for the study, km.
WEATHER_DISTANCE_LIMIT_KM = 50.0
#: A weather file with more than this share of its GHI while the sun is down at the
#: site is refused (its clock or its site is not this one).
SUN_DOWN_GHI_LIMIT = 0.5
#: Mean Earth radius, km (IUGG mean radius R1, 6371.0088 km; from memory).
EARTH_RADIUS_KM = 6371.0088


class AssessmentError(ValueError):
    """An assessment that cannot be made as asked; the message says why and what to do."""


class WeatherFitError(AssessmentError):
    """A weather file that does not fit the site (too far away, light with the sun down)."""


class AssessmentCancelled(Exception):
    """Raised at the next stage once ``cancel()`` returns true."""


# -- the sky basis -------------------------------------------------------------------------------

@dataclass(frozen=True)
class Basis:
    """The sky basis an assessment used, and why.

    Attributes
    ----------
    kind : {"clear", "monthly", "file"}
        The basis used.
    requested : str
        What the assessment asked for (``auto`` or one of the kinds).
    reason : str
        Why this basis, in words.
    weather_name : str or None
        The weather file's name for the ``file`` basis.
    """

    kind: str
    requested: str
    reason: str
    weather_name: str | None = None

    @property
    def upper_bound(self) -> bool:
        """True for the clear sky: its figures are upper bounds, not expected values."""
        return self.kind == "clear"

    @property
    def words(self) -> str:
        """The basis as a header says it (:func:`tiltyard.engine.words.basis_words`)."""
        return basis_words(self.kind, self.weather_name)

    def to_json_dict(self) -> dict:
        return {"used": self.kind, "requested": self.requested, "reason": self.reason,
                "words": self.words, "upper_bound": self.upper_bound,
                "weather_file": self.weather_name}


def choose_basis(a: Assessment) -> Basis:
    """The sky basis for ``a``: the rule of ``auto``, or the basis asked for.

    ``auto`` takes the weather file if the assessment names one, else the
    site's twelve monthly GHI values if all are present, else the clear sky
    (common practice, no source: the most site-specific data first).

    Raises
    ------
    AssessmentError
        ``monthly`` asked for on a site without its twelve values, or
        ``file`` without a weather file.
    """
    site = a.site
    has_monthly = site.monthly_ghi_kwh_m2_day is not None
    if a.sky == "auto":
        if a.weather is not None:
            return Basis("file", "auto", "the assessment names a weather file", a.weather.name)
        if has_monthly:
            return Basis("monthly", "auto", "the site holds twelve monthly GHI values and no "
                                            "weather file is chosen")
        return Basis("clear", "auto", "no weather file and no monthly GHI values for the site")
    if a.sky == "monthly" and not has_monthly:
        raise AssessmentError("sky basis monthly: the site has no monthly GHI values; enter "
                              "the twelve monthly mean daily values or choose another basis")
    if a.sky == "file":
        return Basis("file", "file", "chosen", a.weather.name)
    return Basis(a.sky, a.sky, "chosen")


# -- the weather file -----------------------------------------------------------------------------

def load_weather(a: Assessment) -> tuple[WeatherData, str]:
    """Read the assessment's weather file for its site, after checking it is the one chosen.

    Returns
    -------
    tuple of (WeatherData, str)
        The series and the SHA-256 (hex) of the file's bytes as read (hashed once).

    Raises
    ------
    AssessmentError
        The file is missing, or its bytes differ from the SHA-256 recorded
        when it was chosen; both name the file.
    tiltyard.engine.weather.WeatherImportError, WeatherOptionError
        The file cannot be read as weather data (see
        :func:`tiltyard.engine.weather_site.load_weather_for_site`).
    """
    src = a.weather
    path = Path(src.path)
    if not path.is_file():
        raise AssessmentError(f"weather file {src.name}: not found at {path}; it was chosen for "
                              "this site: put it back, or choose another file or sky basis")
    sha = file_sha256(path)
    if src.sha256 and sha != src.sha256:
        raise AssessmentError(f"weather file {src.name}: has changed since it was chosen for "
                              "this site (its SHA-256 differs); choose it again to use the new "
                              "contents")
    weather = load_weather_for_site(path, a.site, columns=src.column_map,
                                    timestamp_label=src.timestamp_label, timezone=src.timezone)
    return weather, sha


def distance_km(lat1_deg, lon1_deg, lat2_deg, lon2_deg) -> float:
    """Great-circle distance on a sphere, km (haversine formula).

    References
    ----------
    Sinnott, R. W. (1984). Virtues of the haversine. Sky and Telescope 68(2), 159.
    """
    p1, p2 = math.radians(lat1_deg), math.radians(lat2_deg)
    dp, dl = p2 - p1, math.radians(lon2_deg - lon1_deg)
    h = math.sin(dp / 2) ** 2 + math.cos(p1) * math.cos(p2) * math.sin(dl / 2) ** 2
    return 2.0 * EARTH_RADIUS_KM * math.asin(min(1.0, math.sqrt(h)))


def weather_fit_warnings(weather: WeatherData, sky: SkyYear) -> tuple:
    """Reasons a weather file may not belong to the site of ``sky``.

    Two checks (limits: common practice, no source): the coordinates in the
    file's header more than :data:`WEATHER_DISTANCE_LIMIT_KM` from the site;
    more than :data:`SUN_DOWN_GHI_LIMIT` of its GHI recorded while the sun is
    down at the site (``sky.sun_down_ghi_share``, from
    :func:`tiltyard.engine.weather_grid.weather_sky`).

    Returns
    -------
    tuple of str
        One sentence per failed check; empty when the file fits.
    """
    site = sky.site
    out = []
    if weather.latitude_deg is not None and weather.longitude_deg is not None:
        d = distance_km(site.latitude_deg, site.longitude_deg, weather.latitude_deg,
                        weather.longitude_deg)
        if d > WEATHER_DISTANCE_LIMIT_KM:
            out.append(f"The weather file {weather.source} was recorded at "
                       f"{weather.latitude_deg:.2f}°, {weather.longitude_deg:.2f}°, {d:,.0f} km "
                       f"from the site (more than {WEATHER_DISTANCE_LIMIT_KM:.0f} km).")
    share = float(sky.sun_down_ghi_share)
    if share > SUN_DOWN_GHI_LIMIT:
        out.append(f"{100 * share:.0f} % of the GHI in the weather file {weather.source} falls "
                   "while the sun is down at the site: its timestamps or time zone are wrong, "
                   "or it was recorded elsewhere.")
    return tuple(out)


# -- assess ----------------------------------------------------------------------------------------

def _reporter(progress, cancel) -> Callable[[float, str], None]:
    def report(fraction: float, stage: str) -> None:
        if cancel is not None and cancel():
            raise AssessmentCancelled(stage)
        if progress is not None:
            progress(fraction, stage)
    return report


def irradiance_options(a: Assessment, basis: Basis,
                       weather: WeatherData | None) -> IrradianceOptions:
    """The sky year's options for ``a`` on ``basis``: the one builder of sky options.

    The interval is the weather file's own, else ``a.interval_min``, else
    :data:`tiltyard.engine.assessment.DEFAULT_INTERVAL_MIN`; an interval that
    differs from the weather file's is refused.
    """
    step = a.interval_min or DEFAULT_INTERVAL_MIN
    if weather is not None:
        if a.interval_min is not None and a.interval_min != weather.step_min:
            raise AssessmentError(f"interval {a.interval_min} min: the weather file "
                                  f"{weather.source} has {weather.step_min}-minute intervals, "
                                  "which are used as they are; leave the interval unset")
        step = int(weather.step_min)
    return IrradianceOptions(model=a.model, sky=basis.kind, clearsky_model=a.clearsky_model,
                             solar_constant_w_m2=a.solar_constant_w_m2, year=a.year,
                             step_min=step, weather=weather)


def assess(assessment: Assessment, progress: Callable[[float, str], None] | None = None,
           cancel: Callable[[], bool] | None = None) -> AssessmentResult:
    """Make the assessment: choose the basis, check the weather, evaluate the year's sky once.

    Parameters
    ----------
    assessment : Assessment
        The site and every setting.
    progress : callable, optional
        ``progress(fraction, stage)``; may raise to cancel.
    cancel : callable, optional
        ``cancel() -> bool``, asked at each stage; true raises
        :class:`AssessmentCancelled`.

    Returns
    -------
    AssessmentResult

    Raises
    ------
    AssessmentError
        The basis cannot be had (see :func:`choose_basis`, :func:`load_weather`).
    WeatherFitError
        The weather file does not fit the site (:func:`weather_fit_warnings`)
        and the assessment has not accepted that.

    References
    ----------
    The sky year: :func:`tiltyard.engine.skyyear.sky_year` (NREL SPA,
    Ineichen-Perez clear sky, Erbs split).
    """
    report = _reporter(progress, cancel)
    report(0.0, "sky basis")
    basis = choose_basis(assessment)
    weather, sha = load_weather(assessment) if basis.kind == "file" else (None, None)
    irr = irradiance_options(assessment, basis, weather)
    report(0.05, "sun and sky for the year")
    sky = sky_year(assessment.site, irr)
    warnings = weather_fit_warnings(weather, sky) if weather is not None else ()
    if warnings and not assessment.weather.accept_warnings:
        raise WeatherFitError(" ".join(warnings) + " The study refuses it: check the file, or "
                              "use it anyway with --accept-weather-warnings on the command line "
                              "(in the app: confirm when asked; in a script: "
                              "WeatherSource(..., accept_warnings=True)).")
    report(1.0, "sky ready")
    return AssessmentResult(assessment, basis, irr, sky, weather, warnings, sha)


@dataclass(frozen=True)
class AssessmentResult:
    """One assessment's figures: the sky year once, everything else from it on first use.

    Attributes
    ----------
    assessment : Assessment
    basis : Basis
        The sky basis used and why.
    irradiance_options : IrradianceOptions
        The sky year's options.
    sky : SkyYear
        The year's sky, evaluated once.
    weather : WeatherData or None
        The weather series for the ``file`` basis.
    weather_warnings : tuple of str
        Site-fit warnings the assessment accepted (shown wherever it is).
    weather_sha256 : str or None
        SHA-256 (hex) of the weather file's bytes as read.
    """

    assessment: Assessment
    basis: Basis
    irradiance_options: IrradianceOptions
    sky: SkyYear
    weather: WeatherData | None = field(default=None, repr=False)
    weather_warnings: tuple = ()
    weather_sha256: str | None = None
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    def _kept(self, key, build):
        if key not in self._cache:
            self._cache[key] = build()
        return self._cache[key]

    @property
    def site(self):
        return self.assessment.site

    @property
    def mounting(self) -> str:
        return self.assessment.mounting_kind

    @property
    def study_options(self):
        return self.assessment.study_options(self.irradiance_options)

    def study(self, progress: Callable[[float, str], None] | None = None):
        """The tilt study on this sky (:func:`tiltyard.engine.tilt.tilt_study`)."""
        return self._kept("study", lambda: tilt_study(self.site, self.study_options, progress,
                                                      sky=self.sky))

    def irradiance(self, surface_tilt: float, surface_azimuth: float):
        """A year on one plane (:func:`tiltyard.engine.jobs.irradiance_on_plane`)."""
        key = ("irradiance", float(surface_tilt), float(surface_azimuth) % 360.0)
        return self._kept(key, lambda: irradiance_on_plane(self.sky, surface_tilt,
                                                           surface_azimuth))

    def horizon_loss(self, progress: Callable[[float, str], None] | None = None):
        """Horizon loss on the horizontal and each site plane
        (:func:`tiltyard.engine.horizon_loss.horizon_loss_of_sky`)."""
        return self._kept("horizon loss", lambda: horizon_loss_of_sky(self.sky, progress))

    def option_horizon_loss(self, option):
        """What the site horizon costs a study option's schedule
        (:func:`tiltyard.engine.exports.option_horizon_loss`)."""
        return self._kept(("option loss", option.label, option.schedule),
                          lambda: option_horizon_loss(self.sky, self.site, option))

    def option_totals(self, progress: Callable[[float, str], None] | None = None):
        """Yearly figures of the planes and the study's options
        (:func:`tiltyard.engine.daycurves.compare_options`)."""
        return self._kept("totals", lambda: compare_options(
            self.site, self.irradiance_options, self.study(), progress, sky=self.sky))

    def day_curves(self, date, surface_tilt: float, surface_azimuth: float):
        """One day's curves on one plane (:func:`tiltyard.engine.daycurves.irradiance_day`)."""
        key = ("day", str(date), float(surface_tilt), float(surface_azimuth))
        return self._kept(key, lambda: irradiance_day(self.site, date, surface_tilt,
                                                      surface_azimuth, self.irradiance_options,
                                                      sky=self.sky))

    def sun_chart(self, date, basis: str = "clock", step_min: float = 5):
        """The sun-path chart's data (:func:`tiltyard.engine.sunchart.sun_chart`)."""
        return self._kept(("sun chart", str(date), basis, step_min),
                          lambda: sun_chart(self.site, date, basis=basis, step_min=step_min))

    def sheet_data(self, time_basis: str = "clock",
                   progress: Callable[[float, str], None] | None = None):
        """Everything the feasibility sheet prints (:func:`tiltyard.engine.exports.sheet_data`)."""
        return self._kept(("sheet", time_basis), lambda: sheet_data(
            self.site, self.study(progress), time_basis=time_basis, result=self))

    def clear_sky_bound(self) -> dict | None:
        """Annual clear-sky irradiation of each study option's schedule, kWh/m² (the upper
        bound beside a measured or monthly basis); None when the basis is the clear sky.

        The clear sky is evaluated at :data:`DEFAULT_INTERVAL_MIN` with the same
        models; the two-axis ceiling follows the sun.
        """
        if self.basis.upper_bound:
            return None

        def build():
            irr = replace(self.irradiance_options, sky="clear", weather=None,
                          step_min=DEFAULT_INTERVAL_MIN)
            clear = sky_year(self.site, irr)
            k = clear.grid.step_h / 1000.0
            out = {}
            for opt in self.study().options:
                sched = None if opt.kind == "two-axis" else opt.schedule
                poa = periods_poa(clear, self.site, sched)["poa_global"].to_numpy()
                out[opt.label] = float(np.sum(poa) * k)
            return out
        return self._kept("clear bound", build)

    def summary(self) -> AssessmentSummary:
        """What a view's header says about the basis (small: it crosses between processes)."""
        w = self.weather
        findings = () if w is None else tuple(finding_text(f) for f in w.findings)
        return AssessmentSummary(self.basis, self.mounting, self.irradiance_options.step_min,
                                 None if w is None else summary_text(w), findings,
                                 tuple(self.weather_warnings), self.sky.note)

    def header(self) -> dict:
        """What every output states about how its figures were made."""
        a = self.assessment
        return {
            "site": self.site.name,
            "basis": self.basis.to_json_dict(),
            "mounting": self.mounting,
            "model": a.model, "clearsky_model": a.clearsky_model,
            "solar_constant_w_m2": a.solar_constant_w_m2, "year": a.year,
            "interval_min": self.irradiance_options.step_min,
            "weather_sha256": self.weather_sha256,
            "weather_warnings": list(self.weather_warnings),
            "settings": assessment_to_dict(a),
            "caution": CAUTION,
        }


@dataclass(frozen=True)
class AssessmentSummary:
    """The basis of an assessment in words, for a view's header.

    Attributes
    ----------
    basis : Basis
    mounting : str
    interval_min : int
    weather : str or None
        One line on the weather series (source, interval, labelling, findings).
    findings : tuple of str
        Each import finding of the weather file.
    weather_warnings : tuple of str
        Accepted site-fit warnings.
    sky_note : str
        Provenance and caveats of the sky year.
    """

    basis: Basis
    mounting: str
    interval_min: int
    weather: str | None
    findings: tuple
    weather_warnings: tuple
    sky_note: str


# -- one result per assessment, kept in the process that computed it ----------------------------

_RECENT: OrderedDict = OrderedDict()
_KEEP = 2


def assessed(assessment: Assessment,
             progress: Callable[[float, str], None] | None = None) -> AssessmentResult:
    """:func:`assess`, kept for the last few assessments of this process.

    The app's worker processes answer many questions about one assessment
    (the study, a day's curves, the sheet); each builds the sky once.
    """
    result = _RECENT.get(assessment)
    if result is None:
        result = assess(assessment, progress)
        _RECENT[assessment] = result
        while len(_RECENT) > _KEEP:
            _RECENT.popitem(last=False)
    _RECENT.move_to_end(assessment)
    return result


def assessment_part(assessment: Assessment, part: str, *args,
                    progress: Callable[[float, str], None] | None = None):
    """One part of an assessment's result, e.g. ``assessment_part(a, "study")``.

    ``part`` names a method of :class:`AssessmentResult`; its arguments follow.
    A module-level function, so the app can send it to a worker process.
    """
    if part not in _PARTS:
        raise ValueError(f"part {part!r}: must be one of {', '.join(_PARTS)}")
    result = assessed(assessment, progress)
    if part == "result":
        return result
    method = getattr(result, part)
    if part in ("study", "horizon_loss", "option_totals", "sheet_data"):
        return method(*args, progress=progress)
    return method(*args)


_PARTS = ("result", "summary", "study", "irradiance", "horizon_loss", "option_totals", "day_curves",
          "sun_chart", "sheet_data", "clear_sky_bound")


__all__ = ["EARTH_RADIUS_KM", "SUN_DOWN_GHI_LIMIT", "WEATHER_DISTANCE_LIMIT_KM",
           "AssessmentCancelled", "AssessmentError", "AssessmentResult", "AssessmentSummary",
           "Basis",
           "WeatherFitError", "assess", "assessed", "assessment_part", "choose_basis",
           "distance_km", "irradiance_options", "load_weather", "weather_fit_warnings"]
