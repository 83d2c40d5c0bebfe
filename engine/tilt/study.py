""":func:`tilt_study` and what it builds per option: the scorer sharing one sky, the
two-axis ceiling, interval plane-of-array values of a schedule, rows and indicative
yields.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..beam_clip import ClipReuse
from ..horizon import plane_shading
from ..manyplane import many_plane_daily, many_plane_monthly, many_plane_terms
from ..plane import angle_of_incidence, poa_interval_means
from ..rows import irradiation_per_ground_m2, row_layout
from ..site import Site
from ..skyyear import SkyYear, sky_year
from ..specific_yield import specific_yield
from ..words import MONTH_ABBR
from .monthly_check import monthly_method_comparison
from .options import (
    SEASONAL_KINDS,
    Period,
    StudyOption,
    StudyOptions,
    _monthly_from_daily,
    _score_monthly,
)
from .result import TiltStudy
from .search import (
    _best_tilts_separable,
    _day_from_mmdd,
    _improve_for_objective,
    _k_period_search,
    _mmdd,
    _periods_from_switches,
    _schedule_daily,
    _two_period_exhaustive,
)


def _month_of_day(sky: SkyYear) -> np.ndarray:
    days = pd.date_range(f"{sky.options.year}-01-01", periods=sky.n_days, freq="D")
    return days.month.to_numpy()


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
                                "rule of thumb, not an optimum: tilt equal to the latitude, north or south, "
                                "facing the equator"))
    report(0.35, "tilt and azimuth grid")
    grid_pct, grid_opt = st.grid()
    fixed_opt = st.fixed_optimum()
    options.append(fixed_opt)
    warnings = st.azimuth_warnings(fixed_opt)
    report(0.6, "seasonal schedules")
    options.extend(st.seasonal())
    report(0.85, "two-axis ceiling")
    tracking_poa = _periods_arrays(sky, site, None, ("poa_global",))[2]["poa_global"]
    options.append(_two_axis(sky, st.mod, tracking_poa))
    curve_az = fixed_opt.schedule[0].azimuth_deg
    tilt_curve = st.curve(curve_az)
    if opts.irradiance.sky == "clear":
        warnings.append("Clear-sky basis: every figure is an upper bound, not an expected "
                        "yield; cloudier months favour flatter tilts.")
    inactive = [MONTH_ABBR[m] for m in range(12) if not st.active[m]]
    if inactive:
        warnings.append("No useful daylight in " + ", ".join(inactive) + " (polar night or "
                        "near it): those months are left out of the worst-month objective.")
    report(0.9, "rows and indicative yield")
    layouts = _RowLayouts(site, opts)     # options sharing a plane share its layout
    rows = tuple(_option_rows(o, layouts) for o in options)
    fixed_p = fixed_opt.schedule[0]
    row_tilt = fixed_p.tilt_deg if opts.row_tilt_deg is None else opts.row_tilt_deg
    chosen_rows, row_note = layouts.get(row_tilt, fixed_p.azimuth_deg)
    yields = tuple(_option_yield(sky, site, o, opts,
                                 tracking_poa if o.kind == "two-axis" else None)
                   for o in options)
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
        self.grid_clip = ClipReuse()
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
        # monthly totals straight from the year (the map needs no daily table)
        g_month = many_plane_monthly(self.terms, g_t, g_a, self.mod, site=self.site,
                                     reuse=self.grid_clip)
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
        seasonal = any(opts.allows(k) for k, _ in SEASONAL_KINDS)
        # the candidates' months straight from the year (the map's arithmetic)
        c_month = many_plane_monthly(self.terms, c_t, c_a, self.mod, site=self.site)
        ci = int(np.argmax(self.score_cols(c_month)))
        opt_tilt, opt_az = float(c_t.ravel()[ci]), float(c_a.ravel()[ci])
        # the schedules search the daily columns of the candidate tilts at its azimuth
        self.sched_daily = (many_plane_daily(self.terms, tilts, np.full(len(tilts), opt_az),
                                             site=self.site).daily_kwh_m2
                            if seasonal else None)
        self.sched_tilts, self.sched_az = tilts, opt_az
        label = ("Best plane for the site" if opts.mounting == "flush" else "Optimal fixed")
        note = (f"optimum over tilts from {tilts[0]:g} deg to {tilts[-1]:g} deg in steps of "
                f"{opts.tilt_step_deg:g} deg"
                + (", azimuth fixed" if opts.azimuth_deg is not None
                   else ", azimuth free (in steps of 1 deg)"))
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
        # the site grid's beam clip parts serve the nodes the horizon leaves visible
        og = many_plane_monthly(many_plane_terms(_open_sky(sky, open_site)), g_t, g_a,
                                self.mod, site=open_site, reuse=self.grid_clip)
        og_ann = og.sum(axis=0).reshape(g_t.shape)
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
        m = many_plane_monthly(self.terms, tilts, np.full(91, azimuth_deg), self.mod,
                               site=self.site)
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


def schedule_poa(sky: SkyYear, site: Site, option: StudyOption,
                 columns=None) -> pd.DataFrame:
    """Interval plane-of-array irradiance of an option's schedule, W/m².

    Each period's plane gets its own horizon shading; the two-axis ceiling
    follows the sun. Values are interval means (the plane's irradiance at the
    sky's nodes, :mod:`tiltyard.engine.skynodes`, times their weights), so
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
    columns : sequence of str, optional
        Some of :data:`PERIOD_COLUMNS` only (all by default).

    Returns
    -------
    pandas.DataFrame
        Indexed by interval start in the site's time zone; columns
        ``surface_tilt``, ``surface_azimuth``, ``poa_global``, ``poa_direct``,
        ``poa_sky_diffuse``, ``poa_ground_diffuse``, and ``poa_global_open``,
        ``poa_direct_open``, ``poa_sky_diffuse_open`` (the same plane with an
        open horizon): :data:`PERIOD_COLUMNS`.

    References
    ----------
    Transposition as :func:`tiltyard.engine.plane.poa_components` (pvlib;
    Perez et al. 1990, Hay & Davies 1980, Liu & Jordan 1963).
    """
    return periods_poa(sky, site, None if option.kind == "two-axis" else option.schedule,
                       PERIOD_COLUMNS if columns is None else columns)


#: Columns :func:`periods_poa` gives besides the plane's tilt and azimuth.
PERIOD_COLUMNS = ("poa_global", "poa_direct", "poa_sky_diffuse", "poa_ground_diffuse",
                  "poa_global_open", "poa_direct_open", "poa_sky_diffuse_open")


#: Every column :func:`periods_poa` can give: :data:`PERIOD_COLUMNS`, the Perez components
#: after and before the horizon, and the angle of incidence (degrees, NaN with the sun down).
ALL_POA_COLUMNS = PERIOD_COLUMNS + (
    "poa_isotropic", "poa_circumsolar", "poa_horizon",
    "poa_isotropic_open", "poa_circumsolar_open", "poa_horizon_open", "aoi")


def periods_poa(sky: SkyYear, site: Site, schedule, columns=PERIOD_COLUMNS) -> pd.DataFrame:
    """Interval plane-of-array irradiance of a schedule of periods, W/m².

    The arithmetic of :func:`schedule_poa`: each day counts on the plane of
    the period it falls in (``start``..``end`` inclusive, "MM-DD", a period
    may run over the new year; days outside every period count 0), with that
    plane's horizon shading. ``schedule=None`` is two-axis tracking (the plane
    faces the sun at each node). Irradiance is transposed at the sky's nodes
    and summed per interval (:func:`tiltyard.engine.plane.poa_interval_means`).

    Parameters
    ----------
    sky : SkyYear
        A sky year for ``site``.
    site : Site
        The site (horizon).
    schedule : sequence of Period or None
        Periods with ``tilt_deg`` and ``azimuth_deg``; None follows the sun.
    columns : sequence of str, default :data:`PERIOD_COLUMNS`
        Which of :data:`ALL_POA_COLUMNS` to give.

    Returns
    -------
    pandas.DataFrame
        As :func:`schedule_poa`, with ``columns``: irradiance as interval means
        (W/m²), ``aoi`` in degrees at the evaluation instant.

    References
    ----------
    Transposition as :func:`tiltyard.engine.plane.poa_components` (pvlib;
    Perez et al. 1990, Hay & Davies 1980, Liu & Jordan 1963).
    """
    tilt, azim, out = _periods_arrays(sky, site, schedule, columns)
    return pd.DataFrame({"surface_tilt": tilt, "surface_azimuth": azim, **out},
                        index=_interval_index(sky))


def _interval_index(sky: SkyYear) -> pd.DatetimeIndex:
    """The intervals' starts in the site's zone, named ``interval_start`` (a renamed copy:
    the grid's own index is shared)."""
    return sky.grid.start_local.rename("interval_start")


def _periods_arrays(sky: SkyYear, site: Site, schedule, columns) -> tuple:
    """:func:`periods_poa` as arrays: ``(surface_tilt, surface_azimuth, {column: values})``."""
    pos = sky.position
    frac = sky.sun_up_fraction
    zen = pos["apparent_zenith"].to_numpy()
    saz = pos["azimuth"].to_numpy()
    nodes = sky.nodes
    n = len(frac)
    cols = tuple(columns)
    unknown = sorted(set(cols) - set(ALL_POA_COLUMNS))
    if unknown:
        raise ValueError(f"columns: {', '.join(unknown)} not among {', '.join(ALL_POA_COLUMNS)}")
    out = {c: (np.full(n, np.nan) if c == "aoi" else np.zeros(n)) for c in cols}
    sums = tuple(c for c in cols if c != "aoi")
    tilt = np.zeros(n)
    azim = np.zeros(n)
    if schedule is None:
        m = frac > 0
        node_t, node_a = np.clip(nodes.apparent_zenith, 0.0, 90.0), nodes.azimuth
        planes = [(m, np.ones(len(nodes), dtype=bool), np.clip(zen[m], 0.0, 90.0), saz[m],
                   None)] if m.any() else []
        shading = None
    else:
        planes = []
        for period in schedule:
            m = _period_mask(sky.day_index, period, sky.options.year) & (frac > 0)
            if not m.any():
                continue
            t, a = float(period.tilt_deg), float(period.azimuth_deg)
            planes.append((m, _period_mask(nodes.day_index, period, sky.options.year), t, a,
                           plane_shading(site, t, a)))
        # every period's nodes in one transposition, each node with its period's plane
        # and horizon factors (the same numbers node by node as one call per period)
        node_t, node_a = np.zeros(len(nodes)), np.zeros(len(nodes))
        iso_ratio, band = np.ones(len(nodes)), np.ones(len(nodes))
        for _, node_m, t, a, sh in planes:
            node_t[node_m], node_a[node_m] = t, a
            iso_ratio[node_m] = sh.isotropic_ratio
            band[node_m] = sh.horizon_band_fraction
    if planes and sums:
        node_all = np.logical_or.reduce([p[1] for p in planes])
        if schedule is not None:
            shading = _NodeShading(iso_ratio[node_all], band[node_all])
        means = poa_interval_means(nodes, n, node_t, node_a, sky.options.model, shading,
                                   node_all, sums)
    for m, _, t, a, _ in planes:
        if sums:
            for c in sums:
                out[c][m] = means[c][m]
        if "aoi" in cols:
            out["aoi"][m] = angle_of_incidence(t, a, zen[m], saz[m])
        tilt[m] = t
        azim[m] = a
    return tilt, azim, out


@dataclass(frozen=True)
class _NodeShading:
    """A schedule's horizon factors node by node (as ``HorizonShading`` gives them for
    one plane), for :func:`tiltyard.engine.plane.poa_interval_means` on the nodes it
    counts."""

    isotropic_ratio: np.ndarray
    horizon_band_fraction: np.ndarray


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
        key = (float(tilt_deg), float(azimuth_deg))
        if key not in self._done:
            try:
                self._done[key] = (row_layout(self._site, *key, **self._kw), "")
            except ValueError as exc:
                self._done[key] = (None, str(exc))
        return self._done[key]


def _option_rows(opt: StudyOption, layouts: _RowLayouts) -> OptionRows:
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


def _option_yield(sky: SkyYear, site: Site, opt: StudyOption, opts: StudyOptions,
                  poa_global=None) -> OptionYield:
    """``opt``'s indicative yield; ``poa_global`` its interval values when known already."""
    if poa_global is None:
        schedule = None if opt.kind == "two-axis" else opt.schedule
        poa_global = _periods_arrays(sky, site, schedule, ("poa_global",))[2]["poa_global"]
    poa = pd.Series(poa_global, index=_interval_index(sky), name="poa_global")
    temp = wind = None
    if sky.temp_air is not None:
        temp = np.asarray(sky.temp_air, dtype=float)
        if sky.wind_speed is not None:
            wind = np.asarray(sky.wind_speed, dtype=float)
    result = specific_yield(poa, sky.grid.step_h, temp_air=temp, wind_speed=wind,
                            loss_fraction=opts.loss_fraction, month=sky.month)
    return OptionYield(opt.label, opt.kind, result)


def _open_sky(sky: SkyYear, open_site: Site) -> SkyYear:
    """The same sky with the sun never hidden (for the timestamp sanity check)."""
    from dataclasses import replace

    up = sky.sun_up_fraction > 0
    return replace(sky, site=open_site, sun_visible=up.copy(),
                   nodes=sky.nodes.with_open_horizon())


def _two_axis(sky: SkyYear, month_of_day: np.ndarray, poa_global: np.ndarray) -> StudyOption:
    """Two-axis tracking: the plane faces the sun at every instant (the ceiling), from its
    interval ``poa_global`` (``periods_poa(sky, site, None)``).

    Beam is blocked behind the site horizon; sky diffuse uses the open-sky view
    factor of the tracking plane, a slight overestimate that suits a ceiling.

    References
    ----------
    pvlib transposition as in :func:`tiltyard.engine.plane.poa_components`.
    """
    # periods_poa gives interval means (value x sun-up fraction): x hours / 1000 = kWh/m2
    e = poa_global * (sky.grid.step_h / 1000.0)
    daily = np.bincount(sky.day_index, weights=e, minlength=sky.n_days)
    m = _monthly_from_daily(daily[:, None], month_of_day)[:, 0]
    return StudyOption("Two-axis tracking (ceiling, not a recommendation)", "two-axis",
                       (Period("01-01", "12-31", None, None),), m,
                       float(m.sum()),
                       "upper limit: the plane follows the sun; shown only to judge the others")
