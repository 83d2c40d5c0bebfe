"""Horizon profiles, obstacles, sun visibility and sky-view factors.

One stored convention: azimuth in degrees clockwise from true north, horizon
elevation in degrees above the horizontal (negative below it, for sites on high
ground). The site's effective horizon is the upper envelope of its measured
profile and its obstacles.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from .site import HorizonProfile, Obstacle, Site

#: Width of the Perez horizon-brightening band above the horizon, degrees.
#: Perez, R. et al. (1987), Solar Energy 39(3), 221-231: a 6.5° band (from memory).
HORIZON_BAND_DEG = 6.5

#: Planes whose tilts and sample-grid azimuths pair up into a product at most this
#: many times larger than their number are evaluated on that product.
_PRODUCT_RATIO = 4


def profile_elevation_deg(profile: HorizonProfile, azimuth_deg) -> np.ndarray:
    """Horizon elevation of a measured profile, interpolated with wrap-around.

    Linear interpolation in azimuth between the measured points, continuing
    across north (the last point joins the first). An empty profile is 0°
    everywhere; a single point is a constant horizon.

    Parameters
    ----------
    profile : HorizonProfile
        Measured points.
    azimuth_deg : array_like
        Directions, degrees clockwise from north (any real values).

    Returns
    -------
    numpy.ndarray
        Elevation in degrees.

    References
    ----------
    Linear interpolation on a circle, common practice, no source.
    """
    az = np.mod(np.asarray(azimuth_deg, dtype=float), 360.0)
    if profile.is_empty:
        return np.zeros_like(az)
    xp = np.asarray(profile.azimuth_deg, dtype=float)
    fp = np.asarray(profile.elevation_deg, dtype=float)
    if len(xp) == 1:
        return np.full_like(az, fp[0])
    return np.interp(az, xp, fp, period=360.0)


def obstacle_elevation_deg(obstacles, azimuth_deg) -> np.ndarray:
    """Horizon elevation due to obstacles measured on site.

    Each obstacle raises the horizon to ``atan(height_m / distance_m)`` across
    its angular span ``bearing_deg +/- width_deg / 2``; outside every span the
    value is -90° (no obstruction).

    Parameters
    ----------
    obstacles : sequence of Obstacle
        Obstacles with bearing, width, distance and height above the panels.
    azimuth_deg : array_like
        Directions, degrees clockwise from north.

    Returns
    -------
    numpy.ndarray
        Elevation in degrees.

    References
    ----------
    Plane trigonometry: elevation angle of a top at height h over distance d is
    ``atan(h / d)`` (common practice, no source). The obstacle is treated as
    equally high across its width, a conservative simplification.
    """
    az = np.mod(np.asarray(azimuth_deg, dtype=float), 360.0)
    out = np.full(az.size, -90.0)
    if not len(obstacles) or not az.size:
        return out.reshape(az.shape)
    flat = az.ravel()
    order = np.argsort(flat, kind="stable")
    sorted_az = flat[order]
    bearing = np.array([ob.bearing_deg for ob in obstacles], dtype=float)
    half = np.array([ob.width_deg for ob in obstacles], dtype=float) / 2.0
    elev = np.array([ob.elevation_deg for ob in obstacles], dtype=float)
    # candidates: the sorted samples within each span widened by a hair (spans that cross
    # north are split in two); the exact test below decides, as for one obstacle at a time
    eps = 1e-9
    lo, hi = bearing - half - eps, bearing + half + eps
    pieces = [(lo, hi)]
    pieces.append((np.where(lo < 0, lo + 360.0, np.inf), np.where(lo < 0, 360.0, -np.inf)))
    pieces.append((np.where(hi >= 360.0, 0.0, np.inf), np.where(hi >= 360.0, hi - 360.0, -np.inf)))
    for a, b in pieces:
        start = np.searchsorted(sorted_az, a, side="left")
        stop = np.searchsorted(sorted_az, b, side="right")
        _raise_spans(out, order, sorted_az, start, np.maximum(stop, start), bearing, half, elev)
    return out.reshape(az.shape)


def _raise_spans(out, order, sorted_az, start, stop, bearing, half, elev,
                 chunk: int = 4_000_000) -> None:
    """``out[order[start_i:stop_i]]`` raised to ``elev_i`` where the sample lies within
    obstacle i's span, for every obstacle at once (in chunks of at most ``chunk`` samples)."""
    counts = stop - start
    first = 0
    while first < counts.size:
        total = np.cumsum(counts[first:])
        last = first + max(int(np.searchsorted(total, chunk, side="right")), 1)
        n = counts[first:last]
        if n.sum():
            which = np.repeat(np.arange(first, last), n)
            offset = np.arange(n.sum()) - np.repeat(np.cumsum(n) - n, n)
            pos = start[which] + offset
            delta = np.abs((sorted_az[pos] - bearing[which] + 180.0) % 360.0 - 180.0)
            keep = delta <= half[which]
            np.maximum.at(out, order[pos[keep]], elev[which[keep]])
        first = last


def site_horizon_deg(site: Site, azimuth_deg) -> np.ndarray:
    """The site's effective horizon: profile and obstacles merged (upper envelope).

    Parameters
    ----------
    site : Site
        Site with ``horizon`` and ``obstacles``.
    azimuth_deg : array_like
        Directions, degrees clockwise from north.

    Returns
    -------
    numpy.ndarray
        Elevation in degrees.

    References
    ----------
    Upper envelope of obstructions, common practice, no source.
    """
    return np.maximum(profile_elevation_deg(site.horizon, azimuth_deg),
                      obstacle_elevation_deg(site.obstacles, azimuth_deg))


def merged_profile(site: Site, step_deg: float = 1.0) -> HorizonProfile:
    """The effective horizon sampled every ``step_deg`` as a profile.

    Obstacle edges are sampled too, so a narrow obstacle is never lost between
    samples. Useful for display and for exporting the horizon.
    """
    grid = np.arange(0.0, 360.0, step_deg)
    edges, edge_el = [], []
    for ob in site.obstacles:
        half = ob.width_deg / 2.0
        edges += [(ob.bearing_deg - half) % 360.0, (ob.bearing_deg + half) % 360.0]
        edge_el += [ob.elevation_deg] * 2
    edges = np.round(np.asarray(edges, dtype=float), 6) % 360.0
    az = np.unique(np.concatenate([np.round(grid, 6) % 360.0, edges]))
    el = site_horizon_deg(site, az)
    # rounding can move an edge a hair outside its obstacle's span; the edge
    # sample carries the obstacle by construction
    np.maximum.at(el, np.searchsorted(az, edges), np.asarray(edge_el, dtype=float))
    return HorizonProfile(tuple(az.tolist()), tuple(np.round(el, 4).tolist()))


def sun_visible(site: Site, azimuth_deg, apparent_elevation_deg) -> np.ndarray:
    """True where the sun's centre is above the site's effective horizon.

    References
    ----------
    Common practice, no source: the sun is taken as a point at its centre.
    With a horizon below the horizontal the sun can be visible at negative
    elevations.
    """
    el = np.asarray(apparent_elevation_deg, dtype=float)
    return el > site_horizon_deg(site, azimuth_deg)


def _azimuth_samples(n_az: int) -> np.ndarray:
    return (np.arange(n_az) + 0.5) * (360.0 / n_az)


def _prim(a, b, e):
    """Primitive of ``(a sin e + b cos e) cos e`` in ``e``."""
    return a * np.sin(e) ** 2 / 2.0 + b * (e / 2.0 + np.sin(2.0 * e) / 4.0)


def _svf_on_grid(tilt_deg, shift_idx, h, n_az):
    """Sky-view factors of planes whose azimuths sit on the azimuth sample grid.

    The same closed-form elevation integral as :func:`sky_view_factor`, with the
    horizon-independent parts tabulated once per tilt over the relative azimuth
    ``A - azimuth`` (which falls on the sample grid), so each plane costs table
    look-ups instead of transcendental functions.
    """
    rel = np.radians((np.arange(n_az) + 0.5) * (360.0 / n_az))   # relative azimuth samples
    s1 = np.sin(h) ** 2 / 2.0                                    # a-part of prim(h)
    s2 = h / 2.0 + np.sin(2.0 * h) / 4.0                         # b-part of prim(h)
    out = np.empty(tilt_deg.size)
    k = np.arange(n_az)
    for tilt in np.unique(tilt_deg):
        sel = np.flatnonzero(tilt_deg == tilt)
        beta = np.radians(tilt)
        a = np.cos(beta)
        b = np.sin(beta) * np.cos(rel)                           # per relative azimuth
        e_pos = -np.arctan2(b, a)
        prim_e = _prim(a, b, e_pos)
        prim_top = _prim(a, b, np.pi / 2.0)
        m = (k[None, :] - shift_idx[sel][:, None]) % n_az        # relative index per sample
        bm = b[m]
        cond = h[None, :] >= e_pos[m]
        prim_lo = np.where(cond, a * s1[None, :] + bm * s2[None, :], prim_e[m])
        g = prim_top[m] - prim_lo
        out[sel] = g.sum(axis=1) * (2.0 / n_az)
    return out


def _count_below(sorted_values, x, inclusive=False) -> np.ndarray:
    """How many of the ascending ``sorted_values`` lie below ``x`` (or at most ``x``).

    ``inclusive`` (a bool or a boolean array broadcasting with ``x``) counts
    the values equal to ``x`` too. Evenly spaced values are counted
    arithmetically, others by binary search. A value equal to ``x`` within
    rounding may fall either way; every caller counts thresholds where the
    quantity being split is zero, so that is harmless.

    References
    ----------
    Common practice, no source.
    """
    v = np.asarray(sorted_values, dtype=float)
    x = np.asarray(x, dtype=float)
    inclusive = np.asarray(inclusive, dtype=bool)
    step = v[1] - v[0] if v.size > 1 else 0.0
    if step > 0 and np.all(np.abs(np.diff(v) - step) <= 1e-12 * step):
        q = (x - v[0]) / step
        n = np.ceil(q)
        if inclusive.any():
            n += inclusive & (n == q)
        np.clip(n, 0, v.size, out=n)
        return n.astype(np.intp)
    n = np.searchsorted(v, x, side="left")
    if inclusive.any():
        n = n + (np.searchsorted(v, x, side="right") - n) * inclusive
    return n


@functools.lru_cache(maxsize=8)
def _svf_tilt_terms(tilts: tuple, n_az: int) -> tuple:
    """The horizon-free parts of :func:`_svf_product` for a set of tilts (read-only):
    the relative azimuth samples' cosines ``u``, ``cos b``, ``sin b``, ``prim(e_m)``
    at each plane's own horizon and each tilt's open-sky sum. A study meets the same
    tilts several times (its map and tilt curve, its candidates' months and days).

    References
    ----------
    As :func:`_svf_product`.
    """
    rel = np.radians((np.arange(n_az) + 0.5) * (360.0 / n_az))   # relative azimuth samples
    u = np.cos(rel)
    beta = np.radians(np.asarray(tilts, dtype=float))
    cosb, sinb = np.cos(beta), np.sin(beta)
    b = sinb[:, None] * u[None, :]                               # (T, n)
    # at the plane's own horizon e_m, a sin(e) + b cos(e) = 0, so prim(e_m) = b e_m / 2;
    # prim(pi/2) = a/2 + b pi/4
    prim_e = b * (-np.arctan2(b, cosb[:, None])) / 2.0
    total = (cosb / 2.0) * n_az + (b * (np.pi / 4.0) - prim_e).sum(axis=1)
    out = (u, cosb, sinb, prim_e, total)
    for a in out:
        a.setflags(write=False)
    return out


def _svf_product(tilt_deg, shift_idx, h, n_az):
    """Sky-view factors ``(T, U)`` of every pairing of tilts with sample-grid azimuths.

    ``tilt_deg`` holds ascending tilts in [0, 90] degrees, ``shift_idx`` the plane
    azimuths as whole sample steps. The sum is the midpoint rule of
    :func:`sky_view_factor` (closed-form elevation integral per azimuth sample),
    rearranged: with ``m`` the sample's azimuth relative to the plane and
    ``e_m`` the plane's own horizon there, each sample contributes
    ``prim(pi/2) - prim(max(h, e_m))``; that is ``prim(pi/2) - prim(e_m)`` plus,
    where ``h >= e_m``, ``prim(e_m) - a sin^2(h)/2 - b_m (h/2 + sin(2h)/4)``.
    Whether ``h >= e_m`` holds changes at most once as the tilt grows, at
    ``tan(tilt) = -tan(h)/cos(m)``, so the terms linear in the plane factors are
    summed over tilts with one difference array and a running sum. Only the
    ``prim(e_m)`` term of samples whose condition differs between the planes'
    azimuths at one tilt needs per-plane work.

    References
    ----------
    Liu & Jordan (1963) and Duffie & Beckman (2013, sec. 2.15) as in
    :func:`sky_view_factor`; the rearrangement is exact algebra (common
    practice, no source).
    """
    n_t, n_u = tilt_deg.size, shift_idx.size
    u, cosb, sinb, prim_e, total = _svf_tilt_terms(tuple(np.asarray(tilt_deg).tolist()), n_az)
    k = (np.arange(n_az)[:, None] + shift_idx[None, :]) % n_az  # sample seen by cell (m, j)
    hk = h[k]
    front = u > 0.0
    # tilt at which h = e_m: tan(tilt) = -tan(h) / cos(m); below it the condition holds
    # on the back half (cos m < 0), above it on the front half
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        tilt_star = np.degrees(np.arctan(-np.tan(hk) / u[:, None]))
    # front half: first tilt where the condition holds; back half: first where it fails
    p = _count_below(tilt_deg, tilt_star, inclusive=~front[:, None])
    # sums over the cells where h >= e_m of sin^2(h)/2 and cos(m) (h/2 + sin(2h)/4)
    s1 = np.sin(h) ** 2 / 2.0
    s2 = h / 2.0 + np.sin(2.0 * h) / 4.0
    w1 = s1[k]
    w2 = u[:, None] * s2[k]
    sign = np.where(front, 1.0, -1.0)[:, None]
    idx = (p * n_u + np.arange(n_u)[None, :]).ravel()
    size = (n_t + 1) * n_u
    lin = []
    for w in (w1, w2):
        acc = np.bincount(idx, weights=(w * sign).ravel(), minlength=size)[:n_t * n_u]
        acc = acc.reshape(n_t, n_u)
        acc[0] += w[~front].sum(axis=0)
        lin.append(np.cumsum(acc, axis=0))
    # the prim(e_m) term: columns where every plane agrees, then the mixed ones
    pmin, pmax = p.min(axis=1), p.max(axis=1)
    it = np.arange(n_t)[:, None]
    agree = np.where(front[None, :], it >= pmax[None, :], it < pmin[None, :])
    pe = np.broadcast_to(np.where(agree, prim_e, 0.0).sum(axis=1)[:, None], (n_t, n_u)).copy()
    mixed = (it >= pmin[None, :]) & (it < pmax[None, :])
    p_small = p.astype(np.int32)
    for i in np.flatnonzero(mixed.any(axis=1)):
        cols = np.flatnonzero(mixed[i])
        holds = (p_small[cols] > i) != front[cols][:, None]
        pe[i] += np.einsum("m,mj->j", prim_e[i, cols], holds)
    g = total[:, None] + pe - cosb[:, None] * lin[0] - sinb[:, None] * lin[1]
    return g * (2.0 / n_az)


def sky_view_factor(surface_tilt, surface_azimuth, horizon_elevation_deg, n_az: int = 1440):
    """Isotropic sky-view factor of a plane with a horizon.

    The fraction of isotropic sky radiance a plane receives compared with a
    horizontal plane under a full, unobstructed sky:

    ``F = (1/pi) * integral over visible sky of max(cos(theta), 0) dOmega``

    where ``theta`` is the angle between the sky direction and the plane's
    normal and the visible sky lies above the horizon elevation ``h(A)`` at each
    azimuth ``A`` (which may be negative). With ``h = 0`` everywhere this is
    the classical ``(1 + cos(tilt)) / 2``. The elevation integral is done in
    closed form per azimuth, the azimuth integral by the midpoint rule on
    ``n_az`` samples.

    Parameters
    ----------
    surface_tilt : array_like
        Plane tilt from horizontal, degrees (broadcasts with surface_azimuth).
    surface_azimuth : array_like
        Plane azimuth, degrees clockwise from north.
    horizon_elevation_deg : callable or array_like
        ``h(A)`` as a function of azimuth (degrees), or its values at the
        ``n_az`` midpoint azimuths ``(k + 0.5) * 360 / n_az``.
    n_az : int, default 1440
        Number of azimuth samples (0.25° apart).

    Returns
    -------
    numpy.ndarray
        Sky-view factor in [0, 1], shaped like the broadcast tilt/azimuth.

    References
    ----------
    Liu, B. Y. H. & Jordan, R. C. (1963). The long-term average performance of
    flat-plate solar energy collectors. Solar Energy 7(2), 53-74 (isotropic
    sky, view factor ``(1 + cos beta) / 2``). The obstructed form integrates
    the same cosine-weighted radiance over the visible part of the sky
    (Duffie & Beckman 2013, sec. 2.15; common practice).
    """
    az = _azimuth_samples(n_az)
    if callable(horizon_elevation_deg):
        h_deg = np.asarray(horizon_elevation_deg(az), dtype=float)
    else:
        h_deg = np.broadcast_to(np.asarray(horizon_elevation_deg, dtype=float), az.shape)
    h = np.radians(np.clip(h_deg, -90.0, 90.0))
    tilt_deg, azim_deg = np.broadcast_arrays(np.asarray(surface_tilt, dtype=float),
                                             np.asarray(surface_azimuth, dtype=float))
    shape = tilt_deg.shape
    tilt_deg, azim_deg = tilt_deg.ravel(), np.mod(azim_deg.ravel(), 360.0)
    step = 360.0 / n_az
    shift = azim_deg / step
    if tilt_deg.size > 8 and np.allclose(shift, np.round(shift), atol=1e-9):
        shift_idx = np.round(shift).astype(int) % n_az
        tilt_u, tilt_inv = np.unique(tilt_deg, return_inverse=True)
        shift_u, shift_inv = np.unique(shift_idx, return_inverse=True)
        if (tilt_u[0] >= 0.0 and tilt_u[-1] <= 90.0
                and tilt_u.size * shift_u.size <= _PRODUCT_RATIO * tilt_deg.size):
            if shift_u.size > 2 and np.all(h == h[0]):
                # a level horizon (an open site): every azimuth's column is the same sums
                # of the same numbers, so one column serves them all, bit for bit (two
                # are computed: numpy adds a lone column's rows pairwise, several in turn)
                f = _svf_product(tilt_u, shift_u[:2], h, n_az)[tilt_inv, 0]
            else:
                f = _svf_product(tilt_u, shift_u, h, n_az)[tilt_inv, shift_inv]
        else:
            f = _svf_on_grid(tilt_deg, shift_idx, h, n_az)
    else:
        beta = np.radians(tilt_deg).reshape(-1, 1)
        gamma = np.radians(azim_deg).reshape(-1, 1)
        a = np.cos(beta)                                    # weight of sin(e)
        b = np.sin(beta) * np.cos(np.radians(az)[None, :] - gamma)   # weight of cos(e)
        # integrand (a sin e + b cos e) cos e is positive for e > -atan2(b, a)
        e_pos = -np.arctan2(b, a)
        lo = np.maximum(h[None, :], e_pos)
        g = _prim(a, b, np.pi / 2.0) - _prim(a, b, np.minimum(lo, np.pi / 2.0))
        f = g.sum(axis=1) * (2.0 * np.pi / n_az) / np.pi
    return np.clip(f, 0.0, 1.0).reshape(shape)


def horizon_band_fraction(surface_tilt, surface_azimuth, horizon_elevation_deg,
                          n_az: int = 1440, band_deg: float = HORIZON_BAND_DEG):
    """Visible share of the horizon-brightening band, as the plane sees it.

    At each azimuth the band from 0° to ``band_deg`` is partly hidden by the
    horizon; the hidden share is weighted by how squarely the plane faces that
    azimuth (``max(sin(tilt) cos(A - azimuth), 0)``, the plane's view of a
    horizontal direction). A horizontal plane gets 1 (the Perez horizon term
    is zero there anyway).

    Parameters
    ----------
    surface_tilt, surface_azimuth : array_like
        Plane orientation, degrees (azimuth clockwise from north).
    horizon_elevation_deg : callable or array_like
        Horizon as in :func:`sky_view_factor`.
    n_az : int
        Azimuth samples.
    band_deg : float
        Band height, degrees.

    Returns
    -------
    numpy.ndarray
        Fraction in [0, 1].

    References
    ----------
    Perez, R., Seals, R., Ineichen, P., Stewart, R. & Menicucci, D. (1987). A
    new simplified version of the Perez diffuse irradiance model for tilted
    surfaces. Solar Energy 39(3), 221-231 (the horizon band). Treating an
    obstruction as hiding the band it covers is common practice, no source.
    """
    az = _azimuth_samples(n_az)
    if callable(horizon_elevation_deg):
        h_deg = np.asarray(horizon_elevation_deg(az), dtype=float)
    else:
        h_deg = np.broadcast_to(np.asarray(horizon_elevation_deg, dtype=float), az.shape)
    vis = np.clip((band_deg - np.maximum(h_deg, 0.0)) / band_deg, 0.0, 1.0)
    tilt, azim = np.broadcast_arrays(np.asarray(surface_tilt, dtype=float),
                                     np.asarray(surface_azimuth, dtype=float))
    shape = tilt.shape
    tilt, azim = tilt.ravel(), azim.ravel()
    # the weight sin(tilt) max(cos(A - azimuth), 0) has its tilt factor cancel
    # in the ratio, so the share depends on the azimuth alone
    uaz, inv = np.unique(np.mod(azim, 360.0), return_inverse=True)
    w = np.maximum(np.cos(np.radians(az)[None, :] - np.radians(uaz)[:, None]), 0.0)
    share = (w * vis[None, :]).sum(axis=1) / w.sum(axis=1)
    frac = np.where(tilt > 0, share[inv], 1.0)
    return frac.reshape(shape)


@dataclass(frozen=True)
class HorizonShading:
    """Horizon effects for one plane, ready to apply to irradiance components.

    Attributes
    ----------
    sky_view_factor : float
        Isotropic sky-view factor with the horizon.
    sky_view_factor_open : float
        The same for an open horizon, ``(1 + cos tilt) / 2``.
    horizon_band_fraction : float
        Visible share of the horizon-brightening band.
    """

    sky_view_factor: float
    sky_view_factor_open: float
    horizon_band_fraction: float

    @property
    def isotropic_ratio(self) -> float:
        """Factor applied to the isotropic sky diffuse (may exceed 1 for a
        horizon below the horizontal)."""
        if self.sky_view_factor_open <= 0:
            return 1.0
        return self.sky_view_factor / self.sky_view_factor_open


def plane_shading(site: Site, surface_tilt: float, surface_azimuth: float) -> HorizonShading:
    """Horizon effects of ``site``'s effective horizon on one plane.

    Kept for the last planes asked for (a study's schedules meet the same planes
    again and again).

    References
    ----------
    See :func:`sky_view_factor` and :func:`horizon_band_fraction`.
    """
    return _plane_shading(site, float(surface_tilt), float(surface_azimuth))


@functools.lru_cache(maxsize=64)
def _plane_shading(site: Site, surface_tilt: float, surface_azimuth: float) -> HorizonShading:
    def hz(a):
        return site_horizon_deg(site, a)

    svf = float(sky_view_factor(surface_tilt, surface_azimuth, hz))
    open_svf = (1.0 + np.cos(np.radians(surface_tilt))) / 2.0
    band = float(horizon_band_fraction(surface_tilt, surface_azimuth, hz))
    return HorizonShading(svf, float(open_svf), band)


__all__ = [
    "HORIZON_BAND_DEG", "HorizonShading", "Obstacle", "horizon_band_fraction", "merged_profile",
    "obstacle_elevation_deg", "plane_shading", "profile_elevation_deg", "site_horizon_deg",
    "sky_view_factor", "sun_visible",
]
