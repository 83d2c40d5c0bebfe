"""Entry points: one function per job, returning a result object.

The app, the command line and the sheet all call these, so a figure on
screen, in JSON and on paper is the same number.

- :func:`sun_day` -> :class:`SunDay`: events and path of the sun on one date.
- :func:`irradiance_year` -> :class:`IrradianceResult`: a year of irradiance on
  one plane, with monthly and annual irradiation and the horizon loss.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .cautions import CAUTION
from .horizon import HorizonShading, plane_shading
from .plane import TRANSPOSITION_REFERENCES
from .site import Site
from .sky import CLEARSKY_REFERENCES, extraterrestrial_interval_mean
from .skyyear import IrradianceOptions, SkyYear, sky_year
from .sun import day_path
from .sunevents import sun_events
from .tilt import ALL_POA_COLUMNS, Period, periods_poa
from .timegrid import MIDPOINT_CONVENTION


def _iso(ts) -> str | None:
    if ts is None or (isinstance(ts, float) and math.isnan(ts)) or pd.isna(ts):
        return None
    return pd.Timestamp(ts).isoformat()


# -- sun ----------------------------------------------------------------------

@dataclass(frozen=True)
class SunDay:
    """The sun on one local date at one site."""

    site_name: str
    date: pd.Timestamp
    timezone: str
    sunrise: pd.Timestamp | None
    sunset: pd.Timestamp | None
    solar_noon: pd.Timestamp
    day_length_h: float
    max_elevation_deg: float
    polar: str | None
    path: pd.DataFrame

    def to_json_dict(self) -> dict:
        """The ``sun`` document of the command line's ``--json`` output."""
        return {
            "site": self.site_name,
            "date": self.date.date().isoformat(),
            "timezone": self.timezone,
            "sunrise": _iso(self.sunrise),
            "sunset": _iso(self.sunset),
            "solar_noon": _iso(self.solar_noon),
            "day_length_h": round(float(self.day_length_h), 4),
            "max_elevation_deg": round(float(self.max_elevation_deg), 4),
            "polar": self.polar,
            "rise_set_convention": "sun centre at -0.8333 deg apparent elevation (SPA App. A.2)",
            "path": [{"time": t.isoformat(), "azimuth_deg": round(float(a), 3),
                      "elevation_deg": round(float(e), 3), "visible": bool(v)}
                     for t, a, e, v in zip(self.path["time"], self.path["azimuth_deg"],
                                           self.path["elevation_deg"], self.path["visible"],
                                           strict=True)],
        }


def sun_day(site: Site, date, step_min: float = 10.0) -> SunDay:
    """Sun events and the sun's path for one local date.

    Parameters
    ----------
    site : Site
        Location, time zone and horizon.
    date : date-like
        Local calendar date.
    step_min : float, default 10
        Path sampling step, minutes.

    Returns
    -------
    SunDay

    References
    ----------
    Reda & Andreas (2008), NREL/TP-560-34302 (positions and App. A.2 events).
    """
    day = pd.Timestamp(date).normalize()
    ev = sun_events(site, [day]).table.iloc[0]
    path = day_path(site, day, step_min=step_min)
    return SunDay(
        site_name=site.name, date=day, timezone=site.timezone,
        sunrise=None if pd.isna(ev["sunrise"]) else ev["sunrise"],
        sunset=None if pd.isna(ev["sunset"]) else ev["sunset"],
        solar_noon=ev["solar_noon"], day_length_h=float(ev["day_length_h"]),
        max_elevation_deg=float(ev["max_elevation_deg"]), polar=ev["polar"], path=path)


# -- irradiance -------------------------------------------------------------------

MONTHLY_KEYS = ("extraterrestrial_horizontal_kwh_m2", "extraterrestrial_poa_kwh_m2", "ghi_kwh_m2",
                "dni_kwh_m2", "dhi_kwh_m2", "poa_kwh_m2", "poa_beam_kwh_m2",
                "poa_sky_diffuse_kwh_m2", "poa_ground_kwh_m2", "poa_open_kwh_m2",
                "horizon_loss_kwh_m2", "horizon_loss_beam_kwh_m2",
                "horizon_loss_circumsolar_kwh_m2", "horizon_loss_isotropic_kwh_m2",
                "horizon_loss_horizon_band_kwh_m2")


@dataclass(frozen=True)
class IrradianceResult:
    """A year of irradiance on one plane.

    Attributes
    ----------
    series : pandas.DataFrame
        One row per interval, indexed by interval start (UTC). Irradiance
        columns are interval means in W/m² (``ghi``, ``dni``, ``dhi``,
        ``dni_extra``, ``extraterrestrial_horizontal``, ``extraterrestrial_poa``,
        ``poa_*`` as in :func:`tiltyard.engine.plane.poa_components`), with
        ``eval_time_utc``, ``sun_up_fraction``, ``sun_visible``.
    monthly : pandas.DataFrame
        12 rows (index 1-12) of irradiation in kWh/m² (:data:`MONTHLY_KEYS`).
    annual : dict
        The monthly columns summed.
    """

    site: Site
    surface_tilt: float
    surface_azimuth: float
    options: IrradianceOptions
    series: pd.DataFrame
    monthly: pd.DataFrame
    annual: dict
    shading: HorizonShading
    turbidity_source: str
    notes: tuple = field(default_factory=tuple)

    @property
    def horizon_loss_pct(self) -> float:
        """Annual horizon loss as a percentage of the open-horizon plane irradiation."""
        open_ = self.annual["poa_open_kwh_m2"]
        return 0.0 if open_ <= 0 else 100.0 * self.annual["horizon_loss_kwh_m2"] / open_

    def to_json_dict(self) -> dict:
        """The ``irradiance`` document of the command line's ``--json`` output."""
        def row(d):
            return {k: round(float(d[k]), 4) for k in MONTHLY_KEYS}

        return {
            "site": self.site.name,
            "year": self.options.year,
            "model": self.options.model,
            "sky": self.options.sky,
            "clearsky_model": self.options.clearsky_model,
            "solar_constant_w_m2": self.options.solar_constant_w_m2,
            "step_min": self.options.step_min,
            "surface_tilt": self.surface_tilt,
            "surface_azimuth": self.surface_azimuth,
            "albedo": self.site.albedo if not isinstance(self.site.albedo, tuple)
            else list(self.site.albedo),
            "turbidity_source": self.turbidity_source,
            "time_convention": MIDPOINT_CONVENTION,
            "sky_view_factor": round(self.shading.sky_view_factor, 5),
            "horizon_loss_pct": round(self.horizon_loss_pct, 3),
            "monthly": [{"month": int(m), **row(self.monthly.loc[m])} for m in self.monthly.index],
            "annual": row(self.annual),
            "notes": list(self.notes),
            "caution": CAUTION,
        }


def irradiance_year(site: Site, surface_tilt: float, surface_azimuth: float,
                    options: IrradianceOptions | None = None) -> IrradianceResult:
    """A year of irradiance on one plane at one site.

    Steps: the year's intervals (:func:`tiltyard.engine.timegrid.year_grid`);
    their evaluation instants with sunrise/sunset handling
    (:func:`tiltyard.engine.sun.evaluation_points`); extraterrestrial and
    clear-sky irradiance; sun visibility against the site horizon; the plane's
    sky-view factor; transposition with components kept apart.

    Parameters
    ----------
    site : Site
        The site.
    surface_tilt : float
        Plane tilt, degrees from horizontal (0-90).
    surface_azimuth : float
        Plane azimuth, degrees clockwise from north.
    options : IrradianceOptions, optional
        Model choices.

    Returns
    -------
    IrradianceResult

    References
    ----------
    NREL SPA (Reda & Andreas 2008); Ineichen & Perez (2002); Perez et al.
    (1990); Hay & Davies (1980); Liu & Jordan (1963); implementations in pvlib
    (Holmgren, Hansen & Mikofski 2018, JOSS 3(29), 884).
    """
    return irradiance_on_plane(sky_year(site, options or IrradianceOptions()), surface_tilt,
                               surface_azimuth)


def irradiance_on_plane(sky: SkyYear, surface_tilt: float,
                        surface_azimuth: float) -> IrradianceResult:
    """A year of irradiance on one plane, on a sky year already evaluated.

    The arithmetic of :func:`irradiance_year` (which evaluates the sky first):
    transposition with components kept apart and the site horizon applied,
    extraterrestrial irradiance on the plane, monthly and annual sums.

    Parameters
    ----------
    sky : SkyYear
        The year's sky at the site (:func:`tiltyard.engine.skyyear.sky_year`).
    surface_tilt, surface_azimuth : float
        Plane tilt (0-90°) and azimuth (clockwise from north).

    Returns
    -------
    IrradianceResult

    References
    ----------
    As :func:`irradiance_year`.
    """
    site, options = sky.site, sky.options
    if not 0.0 <= float(surface_tilt) <= 90.0:
        raise ValueError(f"surface_tilt = {surface_tilt!r}: must be between 0 and 90 deg")
    if not 0.0 <= float(surface_azimuth) <= 360.0:
        raise ValueError(f"surface_azimuth = {surface_azimuth!r}: must be between 0 and 360 deg")
    surface_azimuth = float(surface_azimuth) % 360.0
    grid, pos, frac = sky.grid, sky.position, sky.sun_up_fraction
    ghi, dni, dhi, dni_extra = sky.ghi, sky.dni, sky.dhi, sky.dni_extra
    zen = pos["zenith"].to_numpy()
    saz = pos["azimuth"].to_numpy()
    vis = sky.sun_visible              # already false while the sun is down
    shading = plane_shading(site, float(surface_tilt), surface_azimuth)
    months = sky.month
    # the one primitive for a plane over a sky year, with every component kept
    poa = periods_poa(sky, site, (Period("01-01", "12-31", float(surface_tilt),
                                         surface_azimuth),), columns=ALL_POA_COLUMNS)
    series = pd.DataFrame(index=grid.start_utc)
    series.index.name = "interval_start_utc"
    series["eval_time_utc"] = sky.times_utc
    series["sun_up_fraction"] = frac
    series["sun_visible"] = vis
    series["dni_extra"] = dni_extra
    # exact interval means, true (geometric) sun: sky.extraterrestrial_interval_mean
    up_frac = frac
    series["extraterrestrial_horizontal"] = extraterrestrial_interval_mean(
        dni_extra, zen, saz, site.latitude_deg, 0.0, 180.0, up_frac, grid.step_min)
    series["extraterrestrial_poa"] = extraterrestrial_interval_mean(
        dni_extra, zen, saz, site.latitude_deg, float(surface_tilt), surface_azimuth, up_frac,
        grid.step_min)
    series["ghi"] = ghi * frac
    series["dni"] = dni * frac
    series["dhi"] = dhi * frac
    for col in ALL_POA_COLUMNS:            # interval means already (aoi: degrees)
        series[col] = poa[col].to_numpy()
    monthly = _monthly_table(series, months, grid.step_h)
    annual = {k: float(monthly[k].sum()) for k in MONTHLY_KEYS}
    notes = (sky.note,
             "ground-reflected irradiance from the unobstructed GHI and the albedo",
             "time convention: " + MIDPOINT_CONVENTION,
             f"reference year {options.year}" + (" (non-leap)" if options.year % 4 else ""))
    return IrradianceResult(site, float(surface_tilt), surface_azimuth, options, series, monthly,
                            annual, shading, sky.turbidity_source, notes)


def _monthly_table(series: pd.DataFrame, months: np.ndarray, step_h: float) -> pd.DataFrame:
    k = step_h / 1000.0
    s = series
    cols = {
        "extraterrestrial_horizontal_kwh_m2": s["extraterrestrial_horizontal"],
        "extraterrestrial_poa_kwh_m2": s["extraterrestrial_poa"],
        "ghi_kwh_m2": s["ghi"], "dni_kwh_m2": s["dni"], "dhi_kwh_m2": s["dhi"],
        "poa_kwh_m2": s["poa_global"], "poa_beam_kwh_m2": s["poa_direct"],
        "poa_sky_diffuse_kwh_m2": s["poa_sky_diffuse"],
        "poa_ground_kwh_m2": s["poa_ground_diffuse"], "poa_open_kwh_m2": s["poa_global_open"],
        "horizon_loss_kwh_m2": s["poa_global_open"] - s["poa_global"],
        "horizon_loss_beam_kwh_m2": s["poa_direct_open"] - s["poa_direct"],
        "horizon_loss_circumsolar_kwh_m2": s["poa_circumsolar_open"] - s["poa_circumsolar"],
        "horizon_loss_isotropic_kwh_m2": s["poa_isotropic_open"] - s["poa_isotropic"],
        "horizon_loss_horizon_band_kwh_m2": s["poa_horizon_open"] - s["poa_horizon"],
    }
    df = pd.DataFrame({name: np.bincount(months, weights=np.asarray(v, dtype=float),
                                         minlength=13)[1:] * k for name, v in cols.items()},
                      index=pd.Index(range(1, 13), name="month"))
    return df


def model_references() -> dict:
    """Every model the engine uses with its published reference."""
    refs = {"solar position": "Reda, I. & Andreas, A. (2008). Solar Position Algorithm for "
                              "Solar Radiation Applications. NREL/TP-560-34302.",
            "solar constant": "Kopp, G. & Lean, J. L. (2011). GRL 38, L01706."}
    refs.update({f"clear sky: {k}": v for k, v in CLEARSKY_REFERENCES.items()})
    refs.update({f"transposition: {k}": v for k, v in TRANSPOSITION_REFERENCES.items()})
    return refs


__all__ = ["CAUTION", "IrradianceOptions", "IrradianceResult", "SunDay", "irradiance_on_plane",
           "irradiance_year",
           "model_references", "sun_day"]

