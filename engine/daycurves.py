"""One day of irradiance on one plane, and yearly totals of compared options.

:func:`irradiance_day` gives the curves of a single local date: the
extraterrestrial normal irradiance, the horizontal components of the chosen
sky basis (with the clear-sky GHI beside them), and the plane-of-array
irradiance with its beam, sky-diffuse and ground-reflected parts after the
site horizon, plus the day's totals. The arithmetic is that of the year
(:func:`tiltyard.engine.jobs.irradiance_year`): intervals from local midnight,
each with its evaluation instant at its midpoint (of its sun-up part around
sunrise and sunset), the clear sky integrated at the nodes of
:mod:`tiltyard.engine.skynodes` (:data:`tiltyard.engine.timegrid.MIDPOINT_CONVENTION`),
so a day's total here is the same number as that day's share of the year.

- Clear sky: the day is computed on its own intervals (10 min by default).
- Monthly values or a weather file: those bases only exist as a whole year
  (the monthly scaling acts on whole months; a weather file is placed on the
  year's intervals), so the year is built by :func:`tiltyard.engine.skyyear.sky_year`
  at the basis' own interval and the date's intervals are taken out of it.

:func:`compare_options` gives the yearly figures the Irradiance view puts side
by side: the horizontal and every existing plane of the site, and the options
of a tilt study, with their horizon loss.
"""

from __future__ import annotations

import calendar
from collections.abc import Callable
from dataclasses import dataclass
from zoneinfo import ZoneInfo

import numpy as np
import pandas as pd

from .horizon import HorizonShading, plane_shading, sun_visible
from .horizon_loss import schedule_horizon_loss
from .jobs import irradiance_on_plane
from .plane import angle_of_incidence, poa_interval_means
from .site import Site
from .sky import clear_sky, extraterrestrial_interval_mean, extraterrestrial_normal
from .skynodes import SkyNodes, clear_sky_nodes
from .skyyear import IrradianceOptions, SkyYear, sky_year
from .sun import evaluation_points
from .timegrid import MIDPOINT_CONVENTION, TimeGrid, check_step_min, local_date
from .words import basis_label, plane_words, schedule_summary

#: Interval of a clear-sky day, minutes (smooth curves; 144 points a day).
DAY_STEP_MIN = 10

#: Plane-of-array and horizontal columns of :attr:`DayCurves.series`, W/m².
IRRADIANCE_COLUMNS = ("dni_extra", "extraterrestrial_horizontal", "extraterrestrial_poa",
                      "ghi", "dni", "dhi", "ghi_clear", "poa_global", "poa_direct",
                      "poa_sky_diffuse", "poa_ground_diffuse", "poa_global_open")

#: Day totals (kWh/m²) and the column each one integrates; the names are those of
#: :data:`tiltyard.engine.jobs.MONTHLY_KEYS` where the quantity is the same.
TOTAL_KEYS = {
    "extraterrestrial_normal_kwh_m2": "dni_extra",
    "extraterrestrial_horizontal_kwh_m2": "extraterrestrial_horizontal",
    "extraterrestrial_poa_kwh_m2": "extraterrestrial_poa",
    "ghi_kwh_m2": "ghi",
    "dni_kwh_m2": "dni",
    "dhi_kwh_m2": "dhi",
    "ghi_clear_kwh_m2": "ghi_clear",
    "poa_kwh_m2": "poa_global",
    "poa_beam_kwh_m2": "poa_direct",
    "poa_sky_diffuse_kwh_m2": "poa_sky_diffuse",
    "poa_ground_kwh_m2": "poa_ground_diffuse",
    "poa_open_kwh_m2": "poa_global_open",
}


def sky_basis_label(options: IrradianceOptions) -> str:
    """Plain words for the sky basis of ``options`` (clear sky says it is an upper bound).

    :func:`tiltyard.engine.words.basis_label` of the options' sky.
    """
    return basis_label(options.sky, options.weather.source if options.sky == "file" else None)


# -- one day ------------------------------------------------------------------------

@dataclass(frozen=True)
class DayCurves:
    """Irradiance through one local date on one plane.

    Attributes
    ----------
    site : Site
        The site.
    date : pandas.Timestamp
        The local calendar date (midnight, no time zone).
    surface_tilt, surface_azimuth : float
        The plane, degrees (azimuth clockwise from north).
    options : IrradianceOptions
        Sky basis and models.
    step_min : int
        Interval length of the curves, minutes.
    series : pandas.DataFrame
        One row per interval of the date, indexed by the interval's
        evaluation instant in local clock time (tz-aware, the site's zone).
        Irradiance columns (:data:`IRRADIANCE_COLUMNS`) are means over each
        interval's sun-up part in W/m² (the clear sky over its nodes,
        :mod:`tiltyard.engine.skynodes`; the extraterrestrial in closed form;
        ``dni_extra`` at the instant), zero while the sun is down;
        ``ghi_clear`` is the clear-sky GHI whatever the basis (for the
        monthly and weather bases, at the instant). Also ``interval_start`` (local),
        ``sun_up_fraction``, ``apparent_zenith``, ``zenith``, ``azimuth``,
        ``apparent_elevation`` (degrees), ``aoi`` (degrees) and
        ``sun_visible`` (sun above the site horizon).
    totals_kwh_m2 : dict
        The day's irradiation per :data:`TOTAL_KEYS`, plus
        ``horizon_loss_kwh_m2`` (open-horizon minus actual plane irradiation).
    shading : HorizonShading
        The plane's sky-view factor and horizon-band share.
    sky_label, note : str
        The sky basis in words and its caveats.
    """

    site: Site
    date: pd.Timestamp
    surface_tilt: float
    surface_azimuth: float
    options: IrradianceOptions
    step_min: int
    series: pd.DataFrame
    totals_kwh_m2: dict
    shading: HorizonShading
    sky_label: str
    note: str

    @property
    def clock_hours(self) -> np.ndarray:
        """Local clock time of each evaluation instant, hours after midnight (0-24)."""
        t = pd.DatetimeIndex(self.series.index)
        return (t.hour + t.minute / 60.0 + t.second / 3600.0
                + t.microsecond / 3.6e9).to_numpy(dtype=float)

    @property
    def sun_up(self) -> np.ndarray:
        """True for the intervals with the sun above the geometric horizon."""
        return self.series["sun_up_fraction"].to_numpy() > 0


def _check_plane(surface_tilt, surface_azimuth) -> float:
    if not 0.0 <= float(surface_tilt) <= 90.0:
        raise ValueError(f"surface_tilt = {surface_tilt!r}: must be between 0 and 90 deg")
    if not 0.0 <= float(surface_azimuth) <= 360.0:
        raise ValueError(f"surface_azimuth = {surface_azimuth!r}: must be between 0 and 360 deg")
    return float(surface_azimuth) % 360.0


def _local_midnight_utc(day: pd.Timestamp, tz: ZoneInfo) -> pd.Timestamp:
    # a zone whose clocks jump at midnight has no 00:00 that day: start at the jump
    return day.tz_localize(tz, nonexistent="shift_forward", ambiguous=True).tz_convert("UTC")


def day_grid(site: Site, date, step_min: int = DAY_STEP_MIN) -> TimeGrid:
    """The intervals of one local date: local midnight to the next local midnight.

    Parameters
    ----------
    site : Site
        Gives the time zone.
    date : date-like
        Local calendar date.
    step_min : int, default 10
        Interval length, one of :data:`tiltyard.engine.timegrid.GRID_STEPS_MIN`.

    Returns
    -------
    TimeGrid
        23, 24 or 25 hours of intervals (daylight-saving days included).

    Notes
    -----
    The same cut as :func:`tiltyard.engine.timegrid.year_grid` restricted to
    one date (common practice, no source).
    """
    step_min = check_step_min(step_min)
    day = local_date(date)
    tz = ZoneInfo(site.timezone)
    start = _local_midnight_utc(day, tz)
    end = _local_midnight_utc(day + pd.Timedelta(days=1), tz)
    idx = pd.date_range(start, end, freq=f"{step_min}min", inclusive="left")
    return TimeGrid(int(day.year), int(step_min), site.timezone, idx)


@dataclass(frozen=True)
class _Sky:
    """Time-only terms of some intervals (a slice of a SkyYear, or a computed day)."""

    start_utc: pd.DatetimeIndex
    times_utc: pd.DatetimeIndex
    frac: np.ndarray
    position: pd.DataFrame
    ghi: np.ndarray
    dni: np.ndarray
    dhi: np.ndarray
    dni_extra: np.ndarray
    visible: np.ndarray
    albedo: np.ndarray
    step_h: float
    note: str
    nodes: SkyNodes


def _clear_day(site: Site, grid: TimeGrid, options: IrradianceOptions) -> _Sky:
    """The clear-sky terms of one day's intervals, as :func:`sky_year` computes them."""
    ep = evaluation_points(grid, site)
    pos, frac = ep.position, ep.sun_up_fraction
    up = frac > 0
    dni_extra = np.asarray(extraterrestrial_normal(ep.times_utc, options.solar_constant_w_m2,
                                                   ep.delta_t), dtype=float)
    vis = sun_visible(site, pos["azimuth"].to_numpy(),
                      pos["apparent_elevation"].to_numpy()) & up
    month = grid.start_local.month.to_numpy()
    albedo = np.asarray(site.albedo_by_month(), dtype=float)[month - 1]
    nodes, cs = clear_sky_nodes(site, ep.times_utc, pos, frac, grid.step_min,
                                options.clearsky_model, dni_extra, albedo, np.zeros(len(frac), int))
    ghi, dni, dhi = (_sun_up_mean(nodes.interval_sums(v, len(frac)), frac)
                     for v in (nodes.ghi, nodes.dni, nodes.dhi))
    return _Sky(grid.start_utc, ep.times_utc, frac, pos, ghi, dni, dhi, dni_extra, vis,
                albedo, grid.step_h, cs.note, nodes)


def _sun_up_mean(interval_mean, frac):
    """An interval mean over the interval's sun-up share (0 with the sun down)."""
    return np.where(frac > 0, interval_mean / np.where(frac > 0, frac, 1.0), 0.0)


def _slice_year(sky: SkyYear, rows: np.ndarray) -> _Sky:
    return _Sky(sky.grid.start_utc[rows], sky.times_utc[rows], sky.sun_up_fraction[rows],
                sky.position.iloc[rows], sky.ghi[rows], sky.dni[rows], sky.dhi[rows],
                sky.dni_extra[rows], sky.sun_visible[rows], sky.albedo[rows], sky.grid.step_h,
                sky.note, sky.nodes.take(rows))


def _et_sun_up_mean(sky, site: Site, zenith, surface_tilt, surface_azimuth, step_min):
    """Extraterrestrial irradiance on the plane, mean over each interval's sun-up part, W/m².

    Closed-form interval mean over the geometric sun
    (:func:`tiltyard.engine.sky.extraterrestrial_interval_mean`, Duffie &
    Beckman 2013, eqs. 1.6.2 and 1.10.1) divided by the sun-up share, so that
    ``value x sun_up_fraction x interval`` is the exact irradiation.
    """
    mean = extraterrestrial_interval_mean(sky.dni_extra, zenith, sky.position["azimuth"].to_numpy(),
                                          site.latitude_deg, surface_tilt, surface_azimuth,
                                          sky.frac, step_min)
    return np.where(sky.frac > 0, mean / np.where(sky.frac > 0, sky.frac, 1.0), 0.0)


def _poa(sky: _Sky, surface_tilt: float, surface_azimuth: float, model: str,
         shading: HorizonShading) -> dict:
    """Plane-of-array components over each interval's sun-up part, as irradiance_year
    computes them (at the sky's nodes), and the angle of incidence at the instants."""
    cols = ("poa_global", "poa_direct", "poa_sky_diffuse", "poa_ground_diffuse",
            "poa_global_open")
    means = poa_interval_means(sky.nodes, len(sky.frac), float(surface_tilt), surface_azimuth,
                               model, shading, columns=cols)
    out = {c: _sun_up_mean(v, sky.frac) for c, v in means.items()}
    pos = sky.position
    aoi = np.asarray(angle_of_incidence(float(surface_tilt), surface_azimuth,
                                        pos["apparent_zenith"].to_numpy(),
                                        pos["azimuth"].to_numpy()), dtype=float)
    out["aoi"] = aoi
    return out


def irradiance_day(site: Site, date, surface_tilt: float, surface_azimuth: float,
                   options: IrradianceOptions | None = None,
                   step_min: int | None = None, *, sky: SkyYear | None = None) -> DayCurves:
    """Irradiance curves and totals for one local date on one plane.

    Parameters
    ----------
    site : Site
        The site, with its horizon and albedo.
    date : date-like
        Local calendar date. With the ``monthly`` or ``file`` basis it must
        fall in ``options.year`` (the year those bases are built for).
    surface_tilt : float
        Plane tilt, degrees from horizontal (0-90).
    surface_azimuth : float
        Plane azimuth, degrees clockwise from north (0-360).
    options : IrradianceOptions, optional
        Sky basis, transposition and clear-sky models, solar constant.
    step_min : int, optional
        Interval of a clear-sky day, minutes (:data:`DAY_STEP_MIN` by
        default). The ``monthly`` and ``file`` bases have the interval of
        their year (``options.step_min``); another value is refused.
    sky : SkyYear, optional
        The year's sky for ``site`` under ``options`` when the caller has it
        (the ``monthly`` and ``file`` bases slice their day from it).

    Returns
    -------
    DayCurves

    Notes
    -----
    Totals sum ``value x sun-up fraction x interval length`` over the date's
    intervals, which is how :func:`tiltyard.engine.jobs.irradiance_year`
    builds its monthly table; at the same interval the two agree to rounding
    (clear sky: up to the TT-UT1 value, taken at the first instant of the
    day here and of the year there, < 0.1 s). Ground-reflected light uses
    the unobstructed GHI and the albedo.

    References
    ----------
    Positions: Reda, I. & Andreas, A. (2008), Solar Position Algorithm for
    Solar Radiation Applications, NREL/TP-560-34302. Extraterrestrial normal
    irradiance: solar constant (Kopp, G. & Lean, J. L. (2011), GRL 38,
    L01706) over the SPA Earth-Sun distance squared. Clear sky: Ineichen, P.
    & Perez, R. (2002), A new airmass independent formulation for the Linke
    turbidity coefficient, Solar Energy 73(3), 151-157 (or the model in
    ``options``, :data:`tiltyard.engine.sky.CLEARSKY_REFERENCES`). Monthly
    basis: Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982), Solar Energy
    28(4), 293-302. Transposition: Perez, R. et al. (1990), Solar Energy
    44(5), 271-289; Hay, J. E. & Davies, J. A. (1980); Liu, B. Y. H. &
    Jordan, R. C. (1963), Solar Energy 7(2), 53-74, as implemented in pvlib
    (Holmgren, Hansen & Mikofski 2018, JOSS 3(29), 884). Extraterrestrial
    irradiance on a plane: Duffie & Beckman (2013), Solar Engineering of
    Thermal Processes, eq. 1.10.1.
    """
    options = options or IrradianceOptions()
    surface_azimuth = _check_plane(surface_tilt, surface_azimuth)
    day = local_date(date)
    if options.sky == "clear":
        step = DAY_STEP_MIN if step_min is None else step_min
        sky = _clear_day(site, day_grid(site, day, step), options)
    else:
        if step_min is not None and int(step_min) != options.step_min:
            raise ValueError(f"step_min = {step_min!r}: the {options.sky!r} basis has the "
                             f"interval of its year (options.step_min = {options.step_min}); "
                             "leave step_min unset")
        if day.year != options.year:
            raise ValueError(f"date = {day.date().isoformat()}: the {options.sky!r} basis is "
                             f"built for the year {options.year}; choose a date in that year")
        year = sky if sky is not None else sky_year(site, options)
        rows = np.flatnonzero(year.day_index == day.day_of_year - 1)
        sky = _slice_year(year, rows)
        step = options.step_min
    shading = plane_shading(site, float(surface_tilt), surface_azimuth)
    poa = _poa(sky, float(surface_tilt), surface_azimuth, options.model, shading)
    pos = sky.position
    zen = pos["zenith"].to_numpy()
    up = sky.frac > 0
    if options.sky == "clear":
        ghi_clear = sky.ghi
    else:
        cs = clear_sky(sky.times_utc, pos, site, options.clearsky_model, sky.dni_extra)
        ghi_clear = np.where(up, cs.data["ghi"].to_numpy(), 0.0)
    aoi = poa["aoi"]
    index = pd.DatetimeIndex(sky.times_utc).tz_convert(site.timezone)
    index.name = "eval_time_local"
    series = pd.DataFrame({
        "interval_start": pd.DatetimeIndex(sky.start_utc).tz_convert(site.timezone),
        "sun_up_fraction": sky.frac,
        "apparent_zenith": pos["apparent_zenith"].to_numpy(),
        "zenith": zen,
        "azimuth": pos["azimuth"].to_numpy(),
        "apparent_elevation": pos["apparent_elevation"].to_numpy(),
        "aoi": aoi,
        "sun_visible": sky.visible,
        "dni_extra": np.where(up, sky.dni_extra, 0.0),
        "extraterrestrial_horizontal": _et_sun_up_mean(sky, site, zen, 0.0, 180.0, step),
        "extraterrestrial_poa": _et_sun_up_mean(sky, site, zen, float(surface_tilt),
                                                surface_azimuth, step),
        "ghi": sky.ghi, "dni": sky.dni, "dhi": sky.dhi, "ghi_clear": ghi_clear,
        "poa_global": poa["poa_global"],
        "poa_direct": poa["poa_direct"],
        "poa_sky_diffuse": poa["poa_sky_diffuse"],
        "poa_ground_diffuse": poa["poa_ground_diffuse"],
        "poa_global_open": poa["poa_global_open"],
    }, index=index)
    weight = sky.frac * sky.step_h / 1000.0
    totals = {key: float(np.sum(series[col].to_numpy() * weight))
              for key, col in TOTAL_KEYS.items()}
    totals["horizon_loss_kwh_m2"] = float(np.sum(
        (series["poa_global_open"].to_numpy() - series["poa_global"].to_numpy()) * weight))
    note = f"{sky.note}; time convention: {MIDPOINT_CONVENTION}"
    return DayCurves(site, day, float(surface_tilt), surface_azimuth, options, int(step),
                     series, totals, shading, sky_basis_label(options), note)


# -- yearly totals of compared options -------------------------------------------------

@dataclass(frozen=True)
class OptionTotals:
    """Yearly figures of one compared option.

    Attributes
    ----------
    label, kind : str
        The option's name and kind (``horizontal``, ``plane`` or a tilt-study
        kind, :data:`tiltyard.engine.tilt.OPTION_KINDS`).
    monthly_kwh_m2 : numpy.ndarray
        12 monthly totals, kWh/m².
    annual_kwh_m2 : float
        Their sum, kWh/m².
    horizon_loss_pct : float or None
        Annual horizon loss, % of the open-horizon irradiation (None where it
        is not defined: a tracking ceiling).
    sky_label : str
        The sky basis the figures were computed on.
    year : int
        The year (for the month lengths).
    from_study : bool
        True for the options of a tilt study.
    plane_text : str
        The plane or schedule in words (tilt / azimuth in degrees).
    """

    label: str
    kind: str
    monthly_kwh_m2: np.ndarray
    annual_kwh_m2: float
    horizon_loss_pct: float | None
    sky_label: str
    year: int
    from_study: bool = False
    plane_text: str = ""

    @property
    def mean_daily_kwh_m2_day(self) -> np.ndarray:
        """Monthly mean daily irradiation, kWh/m²/day (monthly total over the month's days)."""
        days = np.array([calendar.monthrange(self.year, m)[1] for m in range(1, 13)],
                        dtype=float)
        return np.asarray(self.monthly_kwh_m2, dtype=float) / days


#: Study kinds already covered by the site's own horizontal and planes.
_SITE_KINDS = ("horizontal", "plane")


def compare_options(site: Site, options: IrradianceOptions | None = None, study=None,
                    progress: Callable[[float, str], None] | None = None, *,
                    sky: SkyYear | None = None) -> tuple:
    """Yearly figures of the horizontal, the site's planes and a tilt study's options.

    Parameters
    ----------
    site : Site
        The site.
    options : IrradianceOptions, optional
        Sky basis and models for the horizontal and the site's planes.
    study : tiltyard.engine.tilt.TiltStudy, optional
        A study of ``site``; its options other than the horizontal and the
        existing planes are added with the study's own figures (on the sky
        basis the study used), their horizon loss evaluated on the study's sky.
    progress : callable, optional
        ``progress(fraction, stage)``, may raise to cancel.
    sky : SkyYear, optional
        The year's sky for ``site`` under ``options``, when the caller has it.

    Returns
    -------
    tuple of OptionTotals
        Horizontal first, then the site's planes in file order, then the
        study's options in the study's order.

    References
    ----------
    :func:`tiltyard.engine.jobs.irradiance_year` for the planes (Perez et al.
    1990, Hay & Davies 1980, Liu & Jordan 1963; Ineichen & Perez 2002);
    :func:`tiltyard.engine.horizon_loss.schedule_horizon_loss` for the horizon loss of
    schedules.
    """
    options = options or IrradianceOptions()
    report = progress or (lambda fraction, stage: None)
    if sky is None:
        sky = sky_year(site, options)
    label = sky_basis_label(options)
    planes = [("Horizontal", "horizontal", 0.0, site.equator_azimuth_deg)]
    planes += [(pl.label, "plane", pl.tilt_deg, pl.azimuth_deg) for pl in site.planes]
    out = []
    for i, (name, kind, tilt, az) in enumerate(planes):
        report(0.8 * i / len(planes), f"year on {name}")
        r = irradiance_on_plane(sky, tilt, az)
        monthly = r.monthly["poa_kwh_m2"].to_numpy(dtype=float)
        out.append(OptionTotals(name, kind, monthly, float(monthly.sum()),
                                float(r.horizon_loss_pct), label, options.year, False,
                                plane_words(tilt, az)))
    if study is not None:
        report(0.8, "tilt study options")
        s_opts = study.options_used.irradiance
        s_label = sky_basis_label(s_opts)
        s_sky = study.sky if study.sky is not None else sky_year(study.site, s_opts)
        for opt in study.options:
            if opt.kind in _SITE_KINDS:
                continue
            loss = None
            if all(p.tilt_deg is not None for p in opt.schedule):
                loss = schedule_horizon_loss(s_sky, opt.label, opt.schedule).loss_pct
            monthly = np.asarray(opt.monthly_kwh_m2, dtype=float)
            out.append(OptionTotals(opt.label, opt.kind, monthly, float(opt.annual_kwh_m2), loss,
                                    s_label, s_opts.year, True, schedule_summary(opt.schedule)))
    report(1.0, "done")
    return tuple(out)


__all__ = ["DAY_STEP_MIN", "DayCurves", "IRRADIANCE_COLUMNS", "OptionTotals",
           "TOTAL_KEYS", "compare_options", "day_grid", "irradiance_day", "sky_basis_label"]
