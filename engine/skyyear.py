"""The sky over one year at one site: the time-only terms every plane shares.

:func:`sky_year` evaluates the year's intervals once — sun position at the
evaluation instants, extraterrestrial irradiance, horizontal irradiance
components for the chosen sky basis, sun visibility against the site horizon,
albedo, and the nodes at which planes are transposed
(:mod:`tiltyard.engine.skynodes`: Gauss-Legendre nodes for the clear sky, the
evaluation instant for a series of interval means) — so that one plane
(:func:`tiltyard.engine.jobs.irradiance_year`) and thousands of planes
(:mod:`tiltyard.engine.manyplane`) see exactly the same sky.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .allsky import monthly_sky
from .choices import REFERENCE_YEAR, SOLAR_CONSTANT_W_M2, check_sky_choices
from .choices import SKY_BASES as SKY_BASES
from .horizon import sun_visible
from .site import Site
from .sky import clear_sky, extraterrestrial_normal
from .skynodes import SkyNodes, clear_sky_nodes, instant_nodes
from .sun import evaluation_points
from .timegrid import TimeGrid, year_grid
from .weather import WeatherData
from .weather_grid import check_weather_step, weather_sky


@dataclass(frozen=True)
class IrradianceOptions:
    """Choices for a year of irradiance (sky basis and models).

    Attributes
    ----------
    model : {"isotropic", "haydavies", "perez"}
        Sky diffuse transposition model.
    sky : {"clear", "monthly", "file"}
        Sky basis: clear sky; synthetic year scaled to the site's
        ``monthly_ghi_kwh_m2_day``; the weather series in ``weather``.
    clearsky_model : {"ineichen", "simplified_solis", "haurwitz"}
        Clear-sky model for the clear basis.
    solar_constant_w_m2 : float
        Solar constant.
    year : int
        Year (non-leap reference year by default).
    step_min : int
        Interval length, minutes.
    weather : WeatherData, optional
        The weather series for ``sky = "file"`` (required there, refused
        otherwise); its interval must equal ``step_min``.
    """

    model: str = "perez"
    sky: str = "clear"
    clearsky_model: str = "ineichen"
    solar_constant_w_m2: float = SOLAR_CONSTANT_W_M2
    year: int = REFERENCE_YEAR
    step_min: int = 60
    weather: WeatherData | None = field(default=None, repr=False)

    def __post_init__(self):
        check_sky_choices(self.model, self.sky, self.clearsky_model, self.solar_constant_w_m2,
                          self.year, self.step_min)
        if self.sky == "file":
            if not isinstance(self.weather, WeatherData):
                raise ValueError(f"weather = {self.weather!r}: sky = 'file' needs the weather "
                                 "data (a WeatherData, e.g. from load_weather_for_site)")
            check_weather_step(self.weather, self.step_min)
        elif self.weather is not None:
            raise ValueError(f"weather is given but sky = {self.sky!r}: weather data are used "
                             "only with sky = 'file'")


@dataclass(frozen=True)
class SkyYear:
    """Time-only terms of a year of intervals (arrays of one value per interval).

    Irradiance values (``ghi``, ``dni``, ``dhi``) are means over each
    interval's sun-up part, W/m², zero while the sun is down (for the clear
    sky, over its nodes; for a series, its value); multiply by
    ``sun_up_fraction`` for interval means. ``dni_extra`` is the value at the
    evaluation instant. Planes are transposed at ``nodes``.

    Attributes
    ----------
    site, options : Site, IrradianceOptions
        What was computed.
    grid : TimeGrid
        The intervals.
    times_utc : pandas.DatetimeIndex
        Evaluation instants.
    sun_up_fraction : numpy.ndarray
        Sun-up share of each interval.
    position : pandas.DataFrame
        Sun position at ``times_utc``.
    ghi, dni, dhi, dni_extra : numpy.ndarray
        Irradiance, W/m².
    sun_visible : numpy.ndarray of bool
        Sun above the site horizon (and up).
    albedo : numpy.ndarray
        Ground albedo per interval (monthly values expanded).
    month : numpy.ndarray of int
        Local calendar month (1-12) of each interval's start.
    day_index : numpy.ndarray of int
        Local day of the year, 0-based, of each interval's start.
    turbidity_source, note : str
        Provenance and caveat of the sky basis.
    temp_air, wind_speed : numpy.ndarray or None
        Air temperature (°C) and wind speed (m/s) per interval from the
        weather data (NaN where missing); None if the basis has none.
    sun_down_ghi_share : float
        Share of a weather series' GHI recorded while the sun is down at the
        site (0 for the clear and monthly bases).
    nodes : SkyNodes
        Where planes are transposed (:mod:`tiltyard.engine.skynodes`).
    """

    site: Site
    options: IrradianceOptions
    grid: TimeGrid
    times_utc: pd.DatetimeIndex
    sun_up_fraction: np.ndarray
    position: pd.DataFrame
    ghi: np.ndarray
    dni: np.ndarray
    dhi: np.ndarray
    dni_extra: np.ndarray
    sun_visible: np.ndarray
    albedo: np.ndarray
    month: np.ndarray
    day_index: np.ndarray
    turbidity_source: str
    note: str
    temp_air: np.ndarray | None = None
    wind_speed: np.ndarray | None = None
    sun_down_ghi_share: float = 0.0
    nodes: SkyNodes | None = None

    @property
    def n_days(self) -> int:
        """Days in the year (365 or 366)."""
        return int(self.day_index.max()) + 1

    @property
    def kwh_weight(self) -> np.ndarray:
        """kWh/m² per W/m² of sun-up mean irradiance, per interval
        (sun-up fraction times interval length in hours, over 1000)."""
        return self.sun_up_fraction * self.grid.step_h / 1000.0


def sky_year(site: Site, options: IrradianceOptions | None = None) -> SkyYear:
    """Evaluate the time-only terms of a year for ``site``.

    Parameters
    ----------
    site : Site
        The site.
    options : IrradianceOptions, optional
        Sky basis, clear-sky model, solar constant, year and step.

    Returns
    -------
    SkyYear

    References
    ----------
    NREL SPA (Reda & Andreas 2008) for positions; Ineichen & Perez (2002),
    Ineichen (2008) or Haurwitz (1945) for the clear sky (see
    :mod:`tiltyard.engine.sky`); Erbs, Klein & Duffie (1982), Solar Energy
    28(4), 293-302, for the beam/diffuse split of the ``monthly`` basis and
    of GHI-only weather data (see :mod:`tiltyard.engine.allsky` and
    :mod:`tiltyard.engine.weather_grid`).
    """
    options = options or IrradianceOptions()
    grid = year_grid(site.timezone, options.year, options.step_min)
    ep = evaluation_points(grid, site)
    pos = ep.position
    frac = ep.sun_up_fraction
    up = frac > 0
    dni_extra = np.asarray(extraterrestrial_normal(ep.times_utc, options.solar_constant_w_m2,
                                                   ep.delta_t), dtype=float)
    zenith = pos["zenith"].to_numpy()
    local = grid.start_local
    month = local.month.to_numpy()
    day_index = local.day_of_year.to_numpy() - 1
    temp_air = wind_speed = None
    sun_down = 0.0
    vis = sun_visible(site, pos["azimuth"].to_numpy(),
                      pos["apparent_elevation"].to_numpy()) & up
    albedo = np.asarray(site.albedo_by_month(), dtype=float)[month - 1]
    if options.sky == "file":
        sky = weather_sky(options.weather, grid, frac, zenith, dni_extra)
        ghi, dni, dhi = sky.ghi, sky.dni, sky.dhi
        temp_air, wind_speed = sky.temp_air, sky.wind_speed
        sun_down = sky.sun_down_ghi_share
        turbidity_source, note = "not used (measured weather)", sky.note
    elif options.sky == "clear":
        nodes, cs = clear_sky_nodes(site, ep.times_utc, pos, frac, grid.step_min,
                                    options.clearsky_model, dni_extra, albedo, day_index)
        n = len(grid)
        ghi, dni, dhi = (np.where(up, nodes.interval_sums(v, n) / np.where(up, frac, 1.0), 0.0)
                         for v in (nodes.ghi, nodes.dni, nodes.dhi))
        turbidity_source, note = cs.turbidity_source, cs.note
    else:
        cs = clear_sky(ep.times_utc, pos, site, options.clearsky_model, dni_extra)
        ghi = np.where(up, cs.data["ghi"].to_numpy(), 0.0)
        kwh_weight = frac * grid.step_h / 1000.0
        sky = monthly_sky(site, ghi, zenith, dni_extra, month, kwh_weight, options.year)
        ghi, dni, dhi = sky.ghi, sky.dni, sky.dhi
        turbidity_source = (f"shape from the {options.clearsky_model} clear sky: "
                            f"{cs.turbidity_source}")
        note = sky.note
    if options.sky != "clear":
        nodes = instant_nodes(frac, pos, ghi, dni, dhi, dni_extra, albedo, vis, day_index)
    return SkyYear(site, options, grid, ep.times_utc, frac, pos, ghi, dni, dhi,
                   dni_extra, vis, albedo, month, day_index,
                   turbidity_source, note, temp_air, wind_speed, sun_down, nodes)
