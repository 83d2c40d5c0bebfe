"""Plane-of-array irradiation for many planes at once.

The time-only terms of a year (sun position, horizontal components, Perez F1
and F2 or the Hay-Davies anisotropy index, sun visibility) are computed once by
:func:`tiltyard.engine.skyyear.sky_year` at the sky's nodes (its instants of
transposition, :mod:`tiltyard.engine.skynodes`: two per interval for the clear
sky, one for a series); each plane contributes only its orientation. The
cosine of the angle of incidence for a (node, plane) pair is

``cos(aoi) = [cos z, sin z cos A, sin z sin A] . [cos b, sin b cos g, sin b sin g]``

and beam plus circumsolar light is a weighted sum of ``max(cos aoi, 0)``; the
isotropic, horizon-band and ground terms are separable products of a per-day
time sum and a plane factor.

Planes that pair a set of tilts in [0, 90] degrees with a set of azimuths (a
tilt x azimuth grid) are summed without visiting every (node, plane) pair:
for one node and one azimuth, ``cos z cos b + v sin b`` (``v`` the sun's
horizontal component towards the azimuth) changes sign at most once as the
tilt grows, at ``tan b = -cos z / v``. So each day's beam sum is the unclipped
sum, a product of per-day sums and plane factors, minus the parts past each
(node, azimuth) pair's sign change, gathered with one difference array over
the tilts and a running sum. Other sets of planes take a chunked pass over all
pairs, with daily sums from segment sums over each day's nodes. The same
passes give monthly totals directly (:func:`many_plane_monthly`) when the days
are gathered into months from the start: the per-day sums become per-month
sums and the difference array is binned by month, so no daily table is made.

The arithmetic is that of pvlib's ``get_total_irradiance`` (isotropic,
``haydavies``, ``perez``) and of :func:`tiltyard.engine.plane.poa_components`
for the horizon at the same nodes, and is tested against both to 1e-9 relative.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pvlib

from .beam_clip import ClipReuse, clip_parts
from .horizon import horizon_band_fraction, site_horizon_deg, sky_view_factor
from .plane import perez_f1_f2
from .skyyear import SkyYear

#: Upper bound on the float64 working set of one chunk (of intervals, or of days
#: on a tilt x azimuth grid), bytes.
CHUNK_BYTES = 48 * 2**20

#: A tilt x azimuth product at most this many times larger than the number of
#: planes asked for is evaluated as a grid (then the wanted planes are picked).
PRODUCT_RATIO = 8

#: Working set of one chunk of days on a tilt x azimuth grid, bytes (cache-sized).
_GRID_CHUNK_BYTES = 4 * 2**20

#: Products of at most this many multiply-adds stay on one BLAS thread (OpenBLAS).
_SMALL_BLAS = 2**18


@dataclass(frozen=True)
class ManyPlaneTerms:
    """Time-only transposition terms for the nodes of a :class:`SkyYear`.

    All arrays have one value per node (:attr:`SkyYear.nodes`: one per sun-up
    interval for a series, Gauss-Legendre nodes for the clear sky). ``sun_w`` multiplies
    ``max(cos aoi, 0)`` for beam plus circumsolar light (open horizon; multiply
    by ``visible`` for the site horizon); ``iso_w`` multiplies the plane's isotropic factor
    ``(1 + cos b) / 2``; ``hor_w`` multiplies ``sin b``; ``ground_w`` multiplies
    ``(1 - cos b) / 2``. All weights are already in kWh/m² (interval length and
    sun-up fraction included). ``clip_rows`` marks the rows where pvlib's clip of
    the Perez sky diffuse at 0 can act on some tilt in [0, 90] degrees.
    """

    model: str
    rows: np.ndarray           # the year's interval of each node
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
    nodes = sky.nodes
    rows = nodes.interval
    k = nodes.weight * sky.grid.step_h / 1000.0
    zen = nodes.apparent_zenith
    saz = nodes.azimuth
    cz, sz = np.cos(np.radians(zen)), np.sin(np.radians(zen))
    sun_vec = np.stack([cz, sz * np.cos(np.radians(saz)), sz * np.sin(np.radians(saz))], axis=1)
    ghi, dni, dhi = nodes.ghi, nodes.dni, nodes.dhi
    dni_extra = nodes.dni_extra
    vis = nodes.sun_visible.astype(float)
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
    # phi(b) = (1 - F1)(1 + cos b)/2 + F2 sin b can be negative for some tilt b in
    # [0, 90] deg (the circumsolar term is never negative). A stationary point of phi
    # has phi'' = -(1 - F1) / (2 cos b), a minimum only when 1 - F1 < 0 = phi(0) is
    # already negative, so the least value is at an end: 1 - F1 or (1 - F1)/2 + F2.
    if model == "perez":
        lower = np.minimum(one_minus, one_minus / 2.0 + f2)
        clip_rows = (lower < 1e-12) & (dhi > 0)
    else:
        clip_rows = np.zeros(len(k), dtype=bool)
    return ManyPlaneTerms(
        model=model, rows=rows, day_index=nodes.day_index, n_days=sky.n_days,
        sun_vec=sun_vec, sun_w=(dni + circ_coef) * k,
        iso_w=dhi * one_minus * k, hor_w=dhi * f2 * k, ground_w=ghi * nodes.albedo * k,
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
        ``(n_days, n_planes)`` daily plane-of-array irradiation, kWh/m². It may
        be stored plane by plane (Fortran order), so that each plane's column
        is contiguous.
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
        return sum_by_month(self.daily_kwh_m2, month_of_day)


def sum_by_month(daily: np.ndarray, month_of_day: np.ndarray) -> np.ndarray:
    """``(12, ...)`` monthly totals of daily values (the first axis is the day).

    The same sums as ``np.add.at(zeros, month_of_day - 1, daily)``, bit for
    bit: each month's days are added one by one in day order (a single column
    through ``np.bincount``, several columns one row at a time), which is what
    ``np.add.at`` does, only without its per-element overhead (about 10x
    faster on a year of a full tilt x azimuth grid).

    Parameters
    ----------
    daily : numpy.ndarray
        ``(n_days,)`` or ``(n_days, n)`` daily values.
    month_of_day : numpy.ndarray
        Each day's month, 1-12.

    References
    ----------
    Plain summation, no source needed (common practice, no source).
    """
    daily = np.asarray(daily, dtype=float)
    month = np.asarray(month_of_day, dtype=np.intp) - 1
    if daily.ndim == 1:
        return np.bincount(month, weights=daily, minlength=12)
    if daily.shape[1] == 1:
        return np.bincount(month, weights=daily[:, 0], minlength=12)[:, None]
    out = np.zeros((12,) + daily.shape[1:])
    for i, m in enumerate(month.tolist()):
        out[m] += daily[i]
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

    Notes
    -----
    When the tilts (all within [0, 90] degrees) and azimuths pair up into a
    product at most :data:`PRODUCT_RATIO` times larger than the number of
    planes, the product is evaluated as a grid (see the module docstring) and
    the wanted planes are picked from it; otherwise every (interval, plane)
    pair is visited. Both give the same sums to rounding.

    References
    ----------
    Same arithmetic as pvlib.irradiance.get_total_irradiance (Holmgren et al.
    2018) and :func:`tiltyard.engine.plane.poa_components`; horizon factors
    from :func:`tiltyard.engine.horizon.sky_view_factor` (Liu & Jordan 1963)
    and :func:`tiltyard.engine.horizon.horizon_band_fraction` (Perez et al. 1987).
    """
    return _many_plane(terms, surface_tilt, surface_azimuth, site, with_open,
                       terms.day_index, terms.n_days)


def many_plane_monthly(terms: ManyPlaneTerms, surface_tilt, surface_azimuth,
                       month_of_day, site=None, reuse: ClipReuse | None = None) -> np.ndarray:
    """Monthly plane-of-array irradiation for many planes, without the daily table.

    The arithmetic of :func:`many_plane_daily` with the days gathered into
    their months from the start: the per-day time sums become per-month sums
    and the beam's sign-change corrections are binned by month. The totals
    are those of ``sum_by_month(many_plane_daily(...).daily_kwh_m2,
    month_of_day)`` up to rounding (the additions are grouped differently; tested
    to 1e-12 relative), in a fraction of the time on a tilt x azimuth grid,
    whose daily table is most of the cost.

    Parameters
    ----------
    terms : ManyPlaneTerms
        From :func:`many_plane_terms`.
    surface_tilt, surface_azimuth : array_like
        Plane orientations, degrees, as for :func:`many_plane_daily`.
    month_of_day : array_like
        Each day's month, 1-12 (``terms.n_days`` values).
    site : Site, optional
        The horizon, as for :func:`many_plane_daily`.
    reuse : ClipReuse, optional
        On a tilt x azimuth grid: keeps this pass's beam clip parts, or takes
        those of an earlier pass over the same grid whose nodes this pass has
        with the same weights (:mod:`tiltyard.engine.beam_clip`).

    Returns
    -------
    numpy.ndarray
        ``(12, n_planes)`` monthly plane-of-array irradiation, kWh/m² (a month
        without days is 0).

    References
    ----------
    As :func:`many_plane_daily`.
    """
    month = np.asarray(month_of_day, dtype=np.intp) - 1
    if month.shape != (terms.n_days,) or month.min() < 0 or month.max() > 11:
        raise ValueError(f"month_of_day: must hold {terms.n_days} months, 1-12")
    return _many_plane(terms, surface_tilt, surface_azimuth, site, False,
                       month[terms.day_index], 12, reuse).daily_kwh_m2


def _many_plane(terms: ManyPlaneTerms, surface_tilt, surface_azimuth, site, with_open: bool,
                bucket: np.ndarray, n_b: int, reuse=None) -> ManyPlaneResult:
    """Totals over ``n_b`` periods (``bucket``: each sun-up row's period, non-decreasing
    in time): days for :func:`many_plane_daily`, months for :func:`many_plane_monthly`."""
    tilt, azim = np.broadcast_arrays(np.asarray(surface_tilt, dtype=float),
                                     np.asarray(surface_azimuth, dtype=float))
    tilt, azim = tilt.ravel(), azim.ravel()
    layout = _product_layout(tilt, azim)
    if layout is None:
        planes_t, planes_a = tilt, azim
    else:
        tilt_u, azim_u, cell = layout
        planes_t, planes_a = np.repeat(tilt_u, azim_u.size), np.tile(azim_u, tilt_u.size)
    fac = _plane_factors(planes_t, planes_a, site)
    # separable terms: per-period time sums times plane factors
    sums = [np.bincount(bucket, weights=w, minlength=n_b)
            for w in (terms.iso_w, terms.hor_w, terms.ground_w)]
    diffuse = [fac.iso_factor * fac.iso_ratio, fac.sinb * fac.band, fac.ground_factor]
    diffuse_open = [fac.iso_factor, fac.sinb, fac.ground_factor]
    w_vis = terms.sun_w * terms.visible
    if layout is None:
        daily = _small_matmul(np.column_stack(sums), np.stack(diffuse),
                              np.empty((n_b, planes_t.size)))
        daily_open = (_small_matmul(np.column_stack(sums), np.stack(diffuse_open),
                                    np.empty((n_b, planes_t.size))) if with_open else None)
        _beam_all_pairs(terms, fac.pv, w_vis, daily, daily_open, bucket)
    else:
        by_plane, by_plane_open = _beam_grid(terms, tilt_u, azim_u, fac, sums, diffuse,
                                             diffuse_open, w_vis, with_open, bucket, n_b,
                                             reuse)
        daily = by_plane.T
        daily_open = by_plane_open.T if with_open else None
    clip = terms.clip_rows
    if terms.model == "perez" and planes_t.size and planes_t.max() > 90.0:
        # clip_rows covers tilts up to 90 deg; check the steeper ones asked for too
        tb = np.radians(np.unique(planes_t[planes_t > 90.0]))
        lower = (terms.one_minus_f1[:, None] * (1.0 + np.cos(tb))[None, :] / 2.0
                 + terms.f2[:, None] * np.sin(tb)[None, :]).min(axis=1)
        clip = clip | ((lower < 1e-12) & (terms.dhi_w > 0))
    if clip.any():
        _correct_clipped(terms, np.flatnonzero(clip), fac, daily, daily_open, bucket)
    svf = fac.svf
    if layout is not None and not (cell.size == planes_t.size
                                   and np.array_equal(cell, np.arange(cell.size))):
        # pick the planes asked for (rows of the plane-major arrays)
        daily = by_plane[cell].T
        daily_open = by_plane_open[cell].T if with_open else None
        svf = svf[cell]
    return ManyPlaneResult(tilt, azim, daily, daily_open if with_open else None, svf)


@dataclass(frozen=True)
class _PlaneFactors:
    """Orientation factors of the planes being evaluated (one value per plane)."""

    pv: np.ndarray             # (3, P) from plane_vectors
    cosb: np.ndarray
    sinb: np.ndarray
    iso_factor: np.ndarray     # (1 + cos b) / 2
    ground_factor: np.ndarray  # (1 - cos b) / 2
    svf: np.ndarray            # isotropic sky-view factor with the horizon
    iso_ratio: np.ndarray      # svf / iso_factor
    band: np.ndarray           # visible share of the horizon band


def _plane_factors(tilt, azim, site) -> _PlaneFactors:
    """Plane factors for ``tilt``/``azim`` (flat arrays) under ``site``'s horizon.

    References
    ----------
    Liu & Jordan (1963) for ``(1 +/- cos b) / 2``; the horizon factors of
    :func:`tiltyard.engine.horizon.sky_view_factor` and
    :func:`tiltyard.engine.horizon.horizon_band_fraction`.
    """
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
        iso_ratio = np.ones(tilt.size)
        band = np.ones(tilt.size)
    return _PlaneFactors(pv, cosb, sinb, iso_factor, ground_factor, svf, iso_ratio, band)


def _product_layout(tilt, azim):
    """``(tilts, azimuths, cell)`` when the planes are best evaluated as a grid.

    ``tilts`` and ``azimuths`` are the sorted distinct values; plane ``k`` is
    grid cell ``cell[k]`` of the tilt-major ``tilts x azimuths`` product. None
    when a tilt lies outside [0, 90] degrees or the product would be more than
    :data:`PRODUCT_RATIO` times larger than the number of planes.

    References
    ----------
    Common practice, no source.
    """
    if tilt.size == 0 or not (np.all(tilt >= 0.0) and np.all(tilt <= 90.0)):
        return None
    if not np.all(np.isfinite(azim)):
        return None
    tilt_u, tilt_inv = np.unique(tilt, return_inverse=True)
    azim_u, azim_inv = np.unique(azim, return_inverse=True)
    if tilt_u.size * azim_u.size > PRODUCT_RATIO * tilt.size:
        return None
    return tilt_u, azim_u, tilt_inv.ravel() * azim_u.size + azim_inv.ravel()


def _beam_grid(terms, tilt_u, azim_u, fac, sums, diffuse, diffuse_open, w_vis, with_open,
               bucket, n_b, reuse=None):
    """Totals per period on the tilt-major ``tilt_u x azim_u`` grid (tilts ascending in
    [0, 90]); ``bucket`` gives each sun-up row's period (a day, or a month), ``n_b``
    the number of periods.

    Returns ``(P, n_b)`` arrays (plane-major), for the site and, when asked
    for, the open horizon.

    For an interval with weight ``w`` and an azimuth ``g``, the beam weight is
    ``w max(cos z cos b + v sin b, 0)`` with ``v = sin z cos(A - g)``. With the
    sun above the horizontal (cos z > 0) it is positive at b = 0 and, when
    ``v < 0``, turns negative beyond ``tan b* = cos z / -v``; with the sun below
    it (a sun-up interval whose evaluation instant is just past sunset) it is
    positive only beyond ``tan b* = -cos z / v`` when ``v > 0``. The first part
    is summed without the clip as per-day sums times plane factors, together
    with the separable diffuse terms (one matrix product); the parts past b* are
    placed in a difference array over the tilts, ``(tilt, azimuth, day)``, whose
    running sum over the tilts is combined with ``cos b`` and ``sin b``. Days
    (or months) are taken in chunks small enough to stay in cache.

    References
    ----------
    pvlib.irradiance.beam_component and aoi_projection (Holmgren et al. 2018):
    the beam is ``dni max(cos aoi, 0)``; the sign analysis is plane
    trigonometry (common practice, no source).
    """
    n_days, n_t, n_u = n_b, tilt_u.size, azim_u.size
    cosb_u, sinb_u = np.cos(np.radians(tilt_u)), np.sin(np.radians(tilt_u))
    g = np.radians(azim_u)
    cg, sg = np.cos(g), np.sin(g)
    sun = terms.sun_vec
    day = bucket
    up = sun[:, 0] > 0.0
    weights = [w_vis, terms.sun_w] if with_open else [w_vis]
    beam_f = [fac.cosb, fac.sinb * np.tile(cg, n_t), fac.sinb * np.tile(sg, n_t)]
    factors, xs = [], []
    for w, diff in zip(weights, [diffuse, diffuse_open], strict=False):
        wu, du = w[up], day[up]
        xs.append(np.vstack(sums + [np.bincount(du, weights=wu * sun[up, c], minlength=n_days)
                                    for c in range(3)]))
        factors.append(np.stack(diff + beam_f).T)
    outs = [np.empty((n_t * n_u, n_days)) for _ in weights]
    # (interval, azimuth) pairs whose beam weight changes sign within the tilt range,
    # a chunk of days at a time: vs = -v with the sun above the horizontal, v with it
    # below, is positive where it does
    rows_all = np.flatnonzero((terms.sun_w if with_open else w_vis) != 0.0)
    n_c = 2 * len(weights)
    per_day = (n_t + 1) * n_c * n_u
    # cache-sized chunks of days, but not so many that the per-chunk overhead shows
    nd = max(int(_GRID_CHUNK_BYTES // (8 * per_day)), -(-n_days // 32))
    nd = max(1, min(n_days, nd, int(CHUNK_BYTES // (8 * per_day))))
    key = (tilt_u, azim_u, bucket, nd, n_days)
    kept = (reuse.kept_rows(key, sun, weights, rows_all) if reuse is not None
            else np.zeros(rows_all.size, dtype=bool))
    held = reuse.parts if kept.any() else {}
    keeping = reuse is not None and not kept.any() and reuse.start(key, sun, weights, rows_all)
    bounds = np.searchsorted(day[rows_all], np.arange(0, n_days + nd, nd))
    for c0, d0 in enumerate(range(0, n_days, nd)):
        m = min(nd, n_days - d0)
        # this chunk's days of the unclipped sums, corrected below while in cache
        blocks = [_small_matmul(f, x[:, d0:d0 + m], np.empty((n_t * n_u, m)))
                  for f, x in zip(factors, xs, strict=True)]
        chunk = slice(bounds[c0], bounds[c0 + 1])
        if c0 in held:
            blocks[0] += held[c0]
        rows = rows_all[chunk][~kept[chunk]]
        parts = (clip_parts(sun[rows], day[rows] - d0, [w[rows] for w in weights], tilt_u,
                            cg, sg, cosb_u, sinb_u, m) if rows.size else None)
        if parts is not None:
            if keeping:
                reuse.parts[c0] = parts[0]
            for block, part in zip(blocks, parts, strict=True):
                block += part
        for out, block in zip(outs, blocks, strict=True):
            out[:, d0:d0 + m] = block
    return outs[0], (outs[1] if with_open else None)


def _small_matmul(a, b, out):
    """``out = a @ b`` in row blocks small enough for BLAS to run on the calling thread.

    These products have an inner dimension of a few and are memory-bound; a
    multithreaded BLAS gains nothing on them, and its spinning worker threads
    slow the numpy work that follows. Common practice, no source.
    """
    rows = max(1, _SMALL_BLAS // max(1, a.shape[1] * b.shape[1]))
    for s in range(0, a.shape[0], rows):
        np.matmul(a[s:s + rows], b, out=out[s:s + rows])
    return out


def _beam_all_pairs(terms, pv, w_vis, daily, daily_open, bucket):
    """Add beam plus circumsolar to ``daily`` visiting every (interval, plane) pair.

    ``max(cos aoi, 0)`` for a chunk of intervals is one matrix product; the
    rows are sorted in time, so each day's (``bucket``'s) weighted rows are summed
    with one segment sum (``np.add.reduceat``).

    References
    ----------
    pvlib.irradiance.beam_component (Holmgren et al. 2018).
    """
    n_planes = pv.shape[1]
    day = bucket
    n = len(terms.rows)
    chunk = max(64, int(CHUNK_BYTES // (8 * 2 * max(n_planes, 1))))
    pairs = [(w_vis, daily)] + ([(terms.sun_w, daily_open)] if daily_open is not None else [])
    for s in range(0, n, chunk):
        e = min(n, s + chunk)
        cosaoi = _small_matmul(terms.sun_vec[s:e], pv, np.empty((e - s, n_planes)))
        np.maximum(cosaoi, 0.0, out=cosaoi)
        d = day[s:e]
        starts = np.flatnonzero(np.diff(d, prepend=-1))
        weighted = np.empty_like(cosaoi)
        for w, out in pairs:
            np.multiply(cosaoi, w[s:e, None], out=weighted)
            out[d[starts]] += np.add.reduceat(weighted, starts, axis=0)


def _correct_clipped(terms, rows, fac, daily, daily_open, bucket):
    """Apply pvlib's ``max(total sky diffuse, 0)`` on the rows where it can act.

    References
    ----------
    pvlib.irradiance.perez (Holmgren et al. 2018): ``sky_diffuse = max(dhi
    (term1 + term2 + term3), 0)``, all parts set to 0 where it clips.
    """
    n_planes = fac.pv.shape[1]
    chunk = max(1, int(CHUNK_BYTES // (8 * 4 * max(n_planes, 1))))
    iso = fac.iso_factor[None, :]
    iso_vis = (fac.iso_factor * fac.iso_ratio)[None, :]
    sinb = fac.sinb[None, :]
    band = fac.band[None, :]
    for s in range(0, rows.size, chunk):
        idx = rows[s:s + chunk]
        ca = np.maximum(terms.sun_vec[idx] @ fac.pv, 0.0)             # (r, P)
        dhi_w = terms.dhi_w[idx][:, None]
        t1 = terms.one_minus_f1[idx][:, None] * iso
        t2 = terms.f1_over_b[idx][:, None] * ca
        t3 = terms.f2[idx][:, None] * sinb
        open_total = t1 + t2 + t3
        dead = open_total <= 0                                     # pvlib sets all parts to 0
        if not dead.any():
            continue
        d = bucket[idx]
        # what the linear pass added for these rows, removed where dead
        added = dhi_w * (terms.one_minus_f1[idx][:, None] * iso_vis
                         + t2 * terms.visible[idx][:, None] + t3 * band)
        np.add.at(daily, d, -np.where(dead, added, 0.0))
        if daily_open is not None:
            np.add.at(daily_open, d, -np.where(dead, dhi_w * open_total, 0.0))
