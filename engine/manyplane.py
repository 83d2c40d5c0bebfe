"""Plane-of-array irradiation for many planes at once.

The time-only terms of a year (sun position, horizontal components, Perez F1
and F2 or the Hay-Davies anisotropy index, sun visibility) are computed once by
:func:`tiltyard.engine.skyyear.sky_year`; each plane contributes only its
orientation. The cosine of the angle of incidence for every (interval, plane)
pair is one matrix product

``cos(aoi) = [cos z, sin z cos A, sin z sin A] @ [cos b, sin b cos g, sin b sin g]^T``

over the sun-up intervals only; beam and circumsolar light are then a weighted
sum of ``max(cos aoi, 0)`` and the isotropic, horizon-band and ground terms
are separable products of a time sum and a plane factor. Work is chunked over
time so memory stays bounded, and daily sums come out of ``np.add.reduceat``.

The arithmetic is that of pvlib's ``get_total_irradiance`` (isotropic,
``haydavies``, ``perez``) and of :func:`tiltyard.engine.plane.poa_components`
for the horizon, and is tested against both to 1e-9 relative.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pvlib

from .horizon import horizon_band_fraction, site_horizon_deg, sky_view_factor
from .skyyear import SkyYear

#: Upper bound on the float64 working set of one time chunk, bytes.
CHUNK_BYTES = 48 * 2**20


@dataclass(frozen=True)
class ManyPlaneTerms:
    """Time-only transposition terms for the sun-up intervals of a :class:`SkyYear`.

    All arrays have one value per sun-up interval. ``beam_w`` multiplies
    ``max(cos aoi, 0)`` for beam plus circumsolar light (open horizon; multiply
    by ``visible`` for the site horizon); ``iso_w`` multiplies the plane's isotropic factor
    ``(1 + cos b) / 2``; ``hor_w`` multiplies ``sin b``; ``ground_w`` multiplies
    ``(1 - cos b) / 2``. All weights are already in kWh/m² (interval length and
    sun-up fraction included).
    """

    model: str
    rows: np.ndarray           # indices of the sun-up intervals in the year
    day_index: np.ndarray
    n_days: int
    sun_vec: np.ndarray        # (n, 3): cos z, sin z cos A, sin z sin A (apparent zenith)
    sun_w: np.ndarray
    iso_w: np.ndarray
    hor_w: np.ndarray
    ground_w: np.ndarray
    visible: np.ndarray        # float 0/1
    clip_rows: np.ndarray      # boolean mask: rows where pvlib's clip of the diffuse can bite
    dhi_w: np.ndarray          # dhi * kwh weight (for the clipped rows)
    f1_over_b: np.ndarray      # Perez F1 / max(cos z, cos 85) (0 for other models)
    one_minus_f1: np.ndarray   # Perez 1 - F1 (1 for isotropic, 1 - AI for Hay-Davies)
    f2: np.ndarray             # Perez F2 (0 for other models)


def perez_f1_f2(dhi, dni, dni_extra, solar_zenith, airmass):
    """Perez 1990 circumsolar and horizon brightening coefficients F1, F2.

    Parameters
    ----------
    dhi, dni, dni_extra : array_like
        W/m².
    solar_zenith : array_like
        Apparent zenith, degrees.
    airmass : array_like
        Relative airmass.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        F1 (clipped at 0, as pvlib does) and F2.

    References
    ----------
    Perez, R., Ineichen, P., Seals, R., Michalsky, J. & Stewart, R. (1990).
    Solar Energy 44(5), 271-289, with the 'allsitescomposite1990' coefficients
    and the bins and kappa = 1.041 of pvlib.irradiance.perez.
    """
    dhi = np.asarray(dhi, dtype=float)
    dni = np.asarray(dni, dtype=float)
    kappa = 1.041
    z = np.radians(np.asarray(solar_zenith, dtype=float))
    delta = dhi * np.asarray(airmass, dtype=float) / np.asarray(dni_extra, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        eps = (np.divide(dhi + dni, dhi) + kappa * z**3) / (1 + kappa * z**3)
    ebin = np.digitize(eps, (0.0, 1.065, 1.23, 1.5, 1.95, 2.8, 4.5, 6.2))
    ebin = np.array(ebin)
    ebin[np.isnan(eps)] = 0
    ebin -= 1
    f1c, f2c = pvlib.irradiance._get_perez_coefficients("allsitescomposite1990")
    nans = np.array([np.nan, np.nan, np.nan])
    f1c = np.vstack((f1c, nans))
    f2c = np.vstack((f2c, nans))
    f1 = np.maximum(f1c[ebin, 0] + f1c[ebin, 1] * delta + f1c[ebin, 2] * z, 0)
    f2 = f2c[ebin, 0] + f2c[ebin, 1] * delta + f2c[ebin, 2] * z
    return f1, f2


def many_plane_terms(sky: SkyYear, model: str | None = None) -> ManyPlaneTerms:
    """Precompute the time-only transposition terms for ``sky``.

    Parameters
    ----------
    sky : SkyYear
        The year's sky.
    model : {"isotropic", "haydavies", "perez"}, optional
        Defaults to ``sky.options.model``.

    Returns
    -------
    ManyPlaneTerms

    References
    ----------
    Liu & Jordan (1963); Hay & Davies (1980); Perez et al. (1990); the
    formulation of pvlib.irradiance (Holmgren et al. 2018, JOSS 3(29), 884).
    """
    model = model or sky.options.model
    up = sky.sun_up_fraction > 0
    rows = np.flatnonzero(up)
    k = sky.kwh_weight[rows]
    pos = sky.position
    zen = pos["apparent_zenith"].to_numpy()[rows]
    saz = pos["azimuth"].to_numpy()[rows]
    cz, sz = np.cos(np.radians(zen)), np.sin(np.radians(zen))
    sun_vec = np.stack([cz, sz * np.cos(np.radians(saz)), sz * np.sin(np.radians(saz))], axis=1)
    ghi, dni, dhi = sky.ghi[rows], sky.dni[rows], sky.dhi[rows]
    dni_extra = sky.dni_extra[rows]
    vis = sky.sun_visible[rows].astype(float)
    zeros = np.zeros_like(k)
    f1_over_b, f2 = zeros, zeros
    if model == "isotropic":
        one_minus = np.ones_like(k)
        circ_coef = zeros
    elif model == "haydavies":
        ai = dni / dni_extra
        one_minus = np.maximum(1.0 - ai, 0.0)
        circ_coef = dhi * ai / np.maximum(cz, 0.01745)
    elif model == "perez":
        am = pvlib.atmosphere.get_relative_airmass(zen)
        f1, f2 = perez_f1_f2(dhi, dni, dni_extra, zen, am)
        f1 = np.nan_to_num(f1)
        f2 = np.nan_to_num(f2)
        b = np.maximum(cz, np.cos(np.radians(85.0)))
        f1_over_b = f1 / b
        one_minus = 1.0 - f1
        circ_coef = dhi * f1_over_b
    else:
        raise ValueError(f"model = {model!r}: must be isotropic, haydavies or perez")
    # where can pvlib's clip of the total Perez diffuse at 0 act? Only where
    # (1 - F1)(1 + cos b)/2 + F2 sin b can be negative for some tilt b.
    if model == "perez":
        tilts = np.radians(np.linspace(0.0, 90.0, 181))
        lower = (one_minus[:, None] * (1 + np.cos(tilts))[None, :] / 2.0
                 + f2[:, None] * np.sin(tilts)[None, :])
        clip_rows = (lower.min(axis=1) < 1e-12) & (dhi > 0)
    else:
        clip_rows = np.zeros(len(k), dtype=bool)
    return ManyPlaneTerms(
        model=model, rows=rows, day_index=sky.day_index[rows], n_days=sky.n_days,
        sun_vec=sun_vec, sun_w=(dni + circ_coef) * k,
        iso_w=dhi * one_minus * k, hor_w=dhi * f2 * k, ground_w=ghi * sky.albedo[rows] * k,
        visible=vis, clip_rows=clip_rows, dhi_w=dhi * k, f1_over_b=f1_over_b,
        one_minus_f1=one_minus, f2=f2)


@dataclass(frozen=True)
class ManyPlaneResult:
    """Daily irradiation on many planes.

    Attributes
    ----------
    surface_tilt, surface_azimuth : numpy.ndarray
        Plane orientations (flattened), degrees.
    daily_kwh_m2 : numpy.ndarray
        ``(n_days, n_planes)`` daily plane-of-array irradiation, kWh/m².
    daily_open_kwh_m2 : numpy.ndarray or None
        The same for an open horizon, when asked for.
    sky_view_factor : numpy.ndarray
        Per plane.
    """

    surface_tilt: np.ndarray
    surface_azimuth: np.ndarray
    daily_kwh_m2: np.ndarray
    daily_open_kwh_m2: np.ndarray | None
    sky_view_factor: np.ndarray

    @property
    def annual_kwh_m2(self) -> np.ndarray:
        return self.daily_kwh_m2.sum(axis=0)

    def monthly_kwh_m2(self, month_of_day: np.ndarray) -> np.ndarray:
        """``(12, n_planes)`` monthly totals, given each day's month (1-12)."""
        out = np.zeros((12, self.daily_kwh_m2.shape[1]))
        np.add.at(out, np.asarray(month_of_day) - 1, self.daily_kwh_m2)
        return out


def plane_vectors(surface_tilt, surface_azimuth) -> np.ndarray:
    """``(3, n)`` plane normal components matching ``ManyPlaneTerms.sun_vec``."""
    b = np.radians(np.asarray(surface_tilt, dtype=float))
    g = np.radians(np.asarray(surface_azimuth, dtype=float))
    return np.stack([np.cos(b), np.sin(b) * np.cos(g), np.sin(b) * np.sin(g)], axis=0)


def many_plane_daily(terms: ManyPlaneTerms, surface_tilt, surface_azimuth, site=None,
                     with_open: bool = False) -> ManyPlaneResult:
    """Daily plane-of-array irradiation for many planes in one vectorised pass.

    Parameters
    ----------
    terms : ManyPlaneTerms
        From :func:`many_plane_terms`.
    surface_tilt, surface_azimuth : array_like
        Plane orientations (broadcast together, then flattened), degrees,
        azimuth clockwise from north.
    site : Site, optional
        Its horizon sets each plane's sky-view factor and horizon-band share;
        None means an open horizon (and then ``terms`` should come from a sky
        whose sun is never hidden).
    with_open : bool
        Also return the open-horizon totals.

    Returns
    -------
    ManyPlaneResult

    References
    ----------
    Same arithmetic as pvlib.irradiance.get_total_irradiance (Holmgren et al.
    2018) and :func:`tiltyard.engine.plane.poa_components`; horizon factors
    from :func:`tiltyard.engine.horizon.sky_view_factor` (Liu & Jordan 1963)
    and :func:`tiltyard.engine.horizon.horizon_band_fraction` (Perez et al. 1987).
    """
    tilt, azim = np.broadcast_arrays(np.asarray(surface_tilt, dtype=float),
                                     np.asarray(surface_azimuth, dtype=float))
    tilt, azim = tilt.ravel(), azim.ravel()
    n_planes = tilt.size
    pv = plane_vectors(tilt, azim)
    cosb = np.cos(np.radians(tilt))
    sinb = np.sin(np.radians(tilt))
    iso_factor = (1.0 + cosb) / 2.0
    ground_factor = (1.0 - cosb) / 2.0
    if site is not None:
        def hz(a):
            return site_horizon_deg(site, a)
        svf = sky_view_factor(tilt, azim, hz)
        iso_ratio = np.where(iso_factor > 0, svf / iso_factor, 1.0)
        band = horizon_band_fraction(tilt, azim, hz)
    else:
        svf = iso_factor.copy()
        iso_ratio = np.ones(n_planes)
        band = np.ones(n_planes)
    n_days = terms.n_days
    # separable terms: per-day time sums times plane factors
    day = terms.day_index
    daily_iso = np.bincount(day, weights=terms.iso_w, minlength=n_days)
    daily_hor = np.bincount(day, weights=terms.hor_w, minlength=n_days)
    daily_ground = np.bincount(day, weights=terms.ground_w, minlength=n_days)
    base_open = (daily_iso[:, None] * iso_factor[None, :] + daily_hor[:, None] * sinb[None, :]
                 + daily_ground[:, None] * ground_factor[None, :])
    base = (daily_iso[:, None] * (iso_factor * iso_ratio)[None, :]
            + daily_hor[:, None] * (sinb * band)[None, :]
            + daily_ground[:, None] * ground_factor[None, :])
    # beam + circumsolar: a weighted sum of max(cos aoi, 0), chunked over time
    w_open = terms.sun_w
    w_vis = terms.sun_w * terms.visible
    daily = base.copy()
    daily_open = base_open.copy() if with_open else None
    n = len(terms.rows)
    chunk = max(64, int(CHUNK_BYTES // (8 * max(n_planes, 1))))
    for s in range(0, n, chunk):
        e = min(n, s + chunk)
        cosaoi = terms.sun_vec[s:e] @ pv
        np.maximum(cosaoi, 0.0, out=cosaoi)
        # rows are sorted in time, so a chunk covers a run of days: one matrix
        # product with the day-by-row weight matrix sums each day
        d = day[s:e]
        d0 = int(d[0])
        n_d = int(d[-1]) - d0 + 1
        cols = np.arange(e - s)
        weights = np.zeros((2 * n_d if with_open else n_d, e - s))
        weights[d - d0, cols] = w_vis[s:e]
        if with_open:
            weights[n_d + d - d0, cols] = w_open[s:e]
        sums = weights @ cosaoi
        daily[d0:d0 + n_d] += sums[:n_d]
        if with_open:
            daily_open[d0:d0 + n_d] += sums[n_d:]
        clip = terms.clip_rows[s:e]
        if clip.any():
            _correct_clipped(terms, s, e, clip, cosaoi, cosb, sinb, iso_factor, iso_ratio, band,
                             daily, daily_open)
    return ManyPlaneResult(tilt, azim, daily, daily_open if with_open else None, svf)


def _correct_clipped(terms, s, e, clip, cosaoi, cosb, sinb, iso_factor, iso_ratio, band,
                     daily, daily_open):
    """Apply pvlib's ``max(total diffuse, 0)`` on the few rows where it can act."""
    idx = np.flatnonzero(clip)
    ca = cosaoi[idx]                                          # (r, P)
    dhi_w = terms.dhi_w[s:e][idx][:, None]
    om = terms.one_minus_f1[s:e][idx][:, None]
    f1b = terms.f1_over_b[s:e][idx][:, None]
    f2 = terms.f2[s:e][idx][:, None]
    vis = terms.visible[s:e][idx][:, None]
    t1 = om * iso_factor[None, :]
    t2 = f1b * ca
    t3 = f2 * sinb[None, :]
    total_open = dhi_w * (t1 + t2 + t3)
    dead = total_open <= 0                                     # pvlib sets all parts to 0
    if not dead.any():
        return
    # what the linear pass added for these rows, to be removed where dead
    added = dhi_w * (t1 * iso_ratio[None, :] + t2 * vis + t3 * band[None, :])
    added_open = dhi_w * (t1 + t2 + t3)
    d = terms.day_index[s:e][idx]
    np.add.at(daily, d, -np.where(dead, added, 0.0))
    if daily_open is not None:
        np.add.at(daily_open, d, -np.where(dead, added_open, 0.0))
