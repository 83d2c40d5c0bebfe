"""What the site horizon costs over a year, plane by plane.

For the horizontal plane and each of the site's planes, :func:`horizon_loss`
gives the annual plane-of-array irradiation with an open horizon and with the
site's effective horizon (measured profile and obstacles merged), and the
difference split into beam and sky-diffuse parts, with each plane's sky-view
factor.

The year is the one :func:`tiltyard.engine.jobs.irradiance_year` computes: the
time-only terms come from :func:`tiltyard.engine.skyyear.sky_year` (evaluated
once for all planes) and each plane's components from
:func:`tiltyard.engine.plane.poa_components` with the plane's
:func:`tiltyard.engine.horizon.plane_shading`, exactly as the one-plane job
does, so the figures agree with it.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field, replace

from .horizon import plane_shading
from .site import Site
from .skyyear import IrradianceOptions, SkyYear, sky_year
from .tilt import Period, periods_poa

#: Interval length used when no options are given, minutes (an hourly year).
DEFAULT_STEP_MIN = 60


@dataclass(frozen=True)
class PlaneHorizonLoss:
    """Annual horizon loss on one plane.

    Irradiation values are annual sums in kWh/m². "Open" is an unobstructed
    horizon at 0° elevation; "site" uses the site's effective horizon.
    Ground-reflected light is the same in both (it is computed from the
    unobstructed GHI and the albedo). Percentages are of the plane's
    open-horizon total, so the beam and sky-diffuse shares add up to the total
    loss. A negative loss is a gain: a horizon below the horizontal (a site on
    high ground) lets a tilted plane see more sky than an open horizon does.

    The one horizon-loss type: for one plane, or for a schedule of planes (a
    seasonal tilt schedule, the two-axis ceiling), whose tilt, azimuth and
    sky-view factors are then None.
    """

    label: str
    surface_tilt: float | None
    surface_azimuth: float | None
    open_kwh_m2: float
    site_kwh_m2: float
    beam_open_kwh_m2: float
    beam_site_kwh_m2: float
    sky_diffuse_open_kwh_m2: float
    sky_diffuse_site_kwh_m2: float
    ground_kwh_m2: float
    sky_view_factor: float | None = None
    sky_view_factor_open: float | None = None

    @property
    def loss_kwh_m2(self) -> float:
        """Total annual loss, kWh/m²."""
        return self.open_kwh_m2 - self.site_kwh_m2

    @property
    def beam_loss_kwh_m2(self) -> float:
        """Beam lost while the sun is behind the horizon, kWh/m²."""
        return self.beam_open_kwh_m2 - self.beam_site_kwh_m2

    @property
    def sky_diffuse_loss_kwh_m2(self) -> float:
        """Sky diffuse lost (isotropic, circumsolar and horizon band), kWh/m²."""
        return self.sky_diffuse_open_kwh_m2 - self.sky_diffuse_site_kwh_m2

    def _pct(self, value: float) -> float:
        return 0.0 if self.open_kwh_m2 <= 0 else 100.0 * value / self.open_kwh_m2

    @property
    def loss_pct(self) -> float:
        """Total loss, percent of the open-horizon irradiation."""
        return self._pct(self.loss_kwh_m2)

    @property
    def beam_loss_pct(self) -> float:
        """Beam loss, percent of the open-horizon total irradiation."""
        return self._pct(self.beam_loss_kwh_m2)

    @property
    def sky_diffuse_loss_pct(self) -> float:
        """Sky-diffuse loss, percent of the open-horizon total irradiation."""
        return self._pct(self.sky_diffuse_loss_kwh_m2)

    def to_json_dict(self) -> dict:
        return {
            "label": self.label, "surface_tilt": self.surface_tilt,
            "surface_azimuth": self.surface_azimuth,
            "open_kwh_m2": round(self.open_kwh_m2, 4), "site_kwh_m2": round(self.site_kwh_m2, 4),
            "loss_kwh_m2": round(self.loss_kwh_m2, 4), "loss_pct": round(self.loss_pct, 4),
            "beam_loss_kwh_m2": round(self.beam_loss_kwh_m2, 4),
            "beam_loss_pct": round(self.beam_loss_pct, 4),
            "sky_diffuse_loss_kwh_m2": round(self.sky_diffuse_loss_kwh_m2, 4),
            "sky_diffuse_loss_pct": round(self.sky_diffuse_loss_pct, 4),
            "ground_kwh_m2": round(self.ground_kwh_m2, 4),
            "sky_view_factor": _round(self.sky_view_factor, 5),
            "sky_view_factor_open": _round(self.sky_view_factor_open, 5),
        }


def _round(v, digits):
    return None if v is None else round(float(v), digits)


@dataclass(frozen=True)
class HorizonLoss:
    """Annual horizon loss on the horizontal plane and each site plane.

    Attributes
    ----------
    site_name : str
        The site.
    options : IrradianceOptions
        Sky basis and models used.
    planes : tuple of PlaneHorizonLoss
        The horizontal plane first, then the site's planes in their order.
    turbidity_source : str
        Provenance of the clear-sky turbidity (or of the weather data).
    notes : tuple of str
        Caveats of the sky basis and of the method.
    """

    site_name: str
    options: IrradianceOptions
    planes: tuple
    turbidity_source: str
    notes: tuple = field(default_factory=tuple)

    @property
    def horizontal(self) -> PlaneHorizonLoss:
        """The horizontal plane's figures."""
        return self.planes[0]

    def to_json_dict(self) -> dict:
        return {"site": self.site_name, "model": self.options.model, "sky": self.options.sky,
                "year": self.options.year, "step_min": self.options.step_min,
                "turbidity_source": self.turbidity_source,
                "planes": [p.to_json_dict() for p in self.planes], "notes": list(self.notes)}


def horizon_loss(site: Site, options: IrradianceOptions | None = None,
                 progress: Callable[[float, str], None] | None = None) -> HorizonLoss:
    """Annual irradiation with an open and with the site horizon, per plane.

    For the horizontal plane and each plane in ``site.planes``: the annual
    plane-of-array irradiation with an open horizon and with the site's
    effective horizon (:func:`tiltyard.engine.horizon.site_horizon_deg`), its
    beam and sky-diffuse parts, and the isotropic sky-view factor. Beam and
    circumsolar light count only while the sun's centre is above the site
    horizon; the isotropic sky diffuse is scaled by the plane's sky-view
    factor; the Perez horizon band by its visible share; ground-reflected light
    is left unobstructed (see :mod:`tiltyard.engine.plane`).

    Parameters
    ----------
    site : Site
        Location, horizon, obstacles and planes.
    options : IrradianceOptions, optional
        Sky basis and models; default a clear-sky (Ineichen-Perez) year with
        the Perez transposition at hourly steps (``step_min=60``).
    progress : callable, optional
        ``progress(fraction, stage)``, called between planes (it may raise to
        cancel).

    Returns
    -------
    HorizonLoss

    References
    ----------
    Solar position: Reda, I. & Andreas, A. (2008). Solar Position Algorithm for
    Solar Radiation Applications. NREL/TP-560-34302.
    Clear sky: Ineichen, P. & Perez, R. (2002). A new airmass independent
    formulation for the Linke turbidity coefficient. Solar Energy 73(3),
    151-157 (or the model chosen in ``options``; see
    :func:`tiltyard.engine.jobs.model_references`).
    Transposition: Perez, R., Ineichen, P., Seals, R., Michalsky, J. &
    Stewart, R. (1990). Solar Energy 44(5), 271-289; Hay, J. E. & Davies, J. A.
    (1980); Liu, B. Y. H. & Jordan, R. C. (1963). Solar Energy 7(2), 53-74
    (isotropic sky and the open-horizon view factor ``(1 + cos tilt) / 2``).
    Obstructed sky-view factor: the cosine-weighted visible sky, Duffie, J. A.
    & Beckman, W. A. (2013). Solar Engineering of Thermal Processes, 4th ed.,
    sec. 2.15. Implementations in pvlib (Holmgren, W. F., Hansen, C. W. &
    Mikofski, M. A. (2018). JOSS 3(29), 884).
    """
    options = options or IrradianceOptions(step_min=DEFAULT_STEP_MIN)
    if progress is not None:
        progress(0.0, "sky over the year")
    return horizon_loss_of_sky(sky_year(site, options), progress)


def horizon_loss_of_sky(sky: SkyYear,
                        progress: Callable[[float, str], None] | None = None) -> HorizonLoss:
    """:func:`horizon_loss` on a sky year already evaluated (same arithmetic).

    Parameters
    ----------
    sky : SkyYear
        The year's sky at the site.
    progress : callable, optional
        As for :func:`horizon_loss`.

    Returns
    -------
    HorizonLoss

    References
    ----------
    As :func:`horizon_loss`.
    """
    site, options = sky.site, sky.options
    planes = [("horizontal", 0.0, site.equator_azimuth_deg)]
    planes += [(p.label, p.tilt_deg, p.azimuth_deg) for p in site.planes]
    out = []
    for i, (label, tilt, azimuth) in enumerate(planes):
        if progress is not None:
            progress(0.3 + 0.7 * i / len(planes), f"plane {label}")
        shading = plane_shading(site, float(tilt), float(azimuth))
        loss = schedule_horizon_loss(sky, label, (Period("01-01", "12-31", float(tilt),
                                                         float(azimuth)),))
        out.append(replace(loss, surface_tilt=float(tilt), surface_azimuth=float(azimuth),
                           sky_view_factor=shading.sky_view_factor,
                           sky_view_factor_open=shading.sky_view_factor_open))
    if progress is not None:
        progress(1.0, "done")
    notes = (sky.note,
             "ground-reflected irradiance from the unobstructed GHI and the albedo (no loss)",
             "percentages are of each plane's open-horizon annual irradiation",
             f"reference year {options.year}, {options.step_min}-minute steps")
    return HorizonLoss(site.name, options, tuple(out), sky.turbidity_source, notes)


def schedule_horizon_loss(sky: SkyYear, label: str, schedule) -> PlaneHorizonLoss:
    """What the site horizon costs a plane, or a schedule of planes, over a sky year.

    Sums the interval plane-of-array irradiance of
    :func:`tiltyard.engine.tilt.periods_poa` (the one primitive for a plane or a
    schedule of planes on a sky year) with the site's horizon and obstacles and
    with an open horizon (the sun counted as visible whenever it is up, each
    period's plane seeing the open-sky view factor ``(1 + cos tilt) / 2``).

    Parameters
    ----------
    sky : SkyYear
        The year's sky at the site.
    label : str
        What the figures are of.
    schedule : sequence of tiltyard.engine.tilt.Period or None
        Periods with a tilt and azimuth each; None is two-axis tracking.

    Returns
    -------
    PlaneHorizonLoss
        With tilt and azimuth when the schedule is one plane; sky-view factors
        are left None (:func:`horizon_loss_of_sky` adds them for its planes).

    Raises
    ------
    ValueError
        A period without a tilt, naming the period.

    References
    ----------
    Liu, B. Y. H. & Jordan, R. C. (1963), Solar Energy 7(2), 53-74 (open-sky
    view factor); Perez, R. et al. (1990), Solar Energy 44(5), 271-289 and Hay,
    J. E. & Davies, J. A. (1980) for the transposition, through pvlib; the
    obstructed view factor as in Duffie, J. A. & Beckman, W. A. (2013), Solar
    Engineering of Thermal Processes, 4th ed., sec. 2.15.
    """
    if schedule is not None:
        for i, p in enumerate(schedule):
            if p.tilt_deg is None or p.azimuth_deg is None:
                raise ValueError(f"schedule[{i}] ({p.start} to {p.end}): has no fixed tilt and "
                                 "azimuth (a tracking option); its plane changes all the time")
    poa = periods_poa(sky, sky.site, schedule)
    k = sky.grid.step_h / 1000.0

    def annual(col):
        return float(poa[col].sum()) * k

    one = schedule is not None and len(schedule) == 1
    return PlaneHorizonLoss(
        label=label, surface_tilt=float(schedule[0].tilt_deg) if one else None,
        surface_azimuth=float(schedule[0].azimuth_deg) if one else None,
        open_kwh_m2=annual("poa_global_open"), site_kwh_m2=annual("poa_global"),
        beam_open_kwh_m2=annual("poa_direct_open"), beam_site_kwh_m2=annual("poa_direct"),
        sky_diffuse_open_kwh_m2=annual("poa_sky_diffuse_open"),
        sky_diffuse_site_kwh_m2=annual("poa_sky_diffuse"),
        ground_kwh_m2=annual("poa_ground_diffuse"))


__all__ = ["DEFAULT_STEP_MIN", "HorizonLoss", "PlaneHorizonLoss", "horizon_loss",
           "horizon_loss_of_sky", "schedule_horizon_loss"]
