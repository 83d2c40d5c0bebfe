"""Tests of the many-plane engine (:mod:`tiltyard.engine.manyplane`).

Reference library: pvlib (Holmgren, W. F., Hansen, C. W. & Mikofski, M. A.
(2018). pvlib python: a python package for modeling solar energy systems.
JOSS 3(29), 884), ``pvlib.irradiance.get_total_irradiance`` called once per
plane on the same sky (at its nodes, :attr:`SkyYear.nodes`, each weighted by
its share of its interval), and the one-plane job
:func:`tiltyard.engine.jobs.irradiance_year` for the site horizon.
"""

from __future__ import annotations

import dataclasses
import tracemalloc

import numpy as np
import pandas as pd
import pvlib
import pytest

from tiltyard.engine import manyplane
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.horizon import plane_shading
from tiltyard.engine.jobs import irradiance_year
from tiltyard.engine.manyplane import (
    many_plane_daily,
    many_plane_monthly,
    many_plane_terms,
    sum_by_month,
)
from tiltyard.engine.plane import poa_components
from tiltyard.engine.site import Site
from tiltyard.engine.skyyear import IrradianceOptions, sky_year

MODELS = ("isotropic", "haydavies", "perez")
OPEN_SITE = Site("open", 47.0, 8.0, 500.0, "Europe/Zurich")
TILTS = np.arange(0.0, 91.0, 1.0)
AZIMUTHS = np.arange(0.0, 360.0, 5.0)
# (tilt, azimuth) on the full grid: flat, vertical, north, 355, equator-facing, east, west
ON_GRID = ((0.0, 0.0), (0.0, 180.0), (90.0, 0.0), (90.0, 355.0), (90.0, 180.0), (35.0, 180.0),
           (12.0, 90.0), (60.0, 270.0), (45.0, 355.0), (1.0, 5.0), (89.0, 135.0), (20.0, 0.0))
OFF_GRID = ((33.3, 201.7), (7.25, 12.9), (89.9, 311.1))


def _grid():
    return np.meshgrid(TILTS, AZIMUTHS, indexing="ij")


def _plane_column(result, tilt, azimuth):
    hit = np.flatnonzero((result.surface_tilt == tilt) & (result.surface_azimuth == azimuth))
    assert hit.size == 1, (tilt, azimuth)
    return int(hit[0])


def _pvlib_daily(sky, tilt, azimuth, model):
    """Daily kWh/m2 from pvlib.irradiance.get_total_irradiance at the sky's nodes."""
    nd = sky.nodes
    out = pvlib.irradiance.get_total_irradiance(
        tilt, azimuth, nd.apparent_zenith, nd.azimuth, nd.dni, nd.ghi, nd.dhi,
        dni_extra=nd.dni_extra, albedo=nd.albedo, model=model)
    poa = np.asarray(out["poa_global"], dtype=float)
    assert np.isfinite(poa).all()
    return np.bincount(nd.day_index, weights=poa * _node_kwh(sky), minlength=sky.n_days)


def _node_kwh(sky):
    """kWh/m2 per W/m2 at each node (its weight times the interval in hours, over 1000)."""
    return sky.nodes.weight * sky.grid.step_h / 1000.0


def _month_of_day(sky):
    days = pd.date_range(f"{sky.options.year}-01-01", periods=sky.n_days, freq="D")
    return days.month.to_numpy()


@pytest.fixture(scope="module", params=MODELS)
def open_case(request):
    sky = sky_year(OPEN_SITE, IrradianceOptions(model=request.param))
    terms = many_plane_terms(sky)
    tilt, azim = _grid()
    return sky, terms, many_plane_daily(terms, tilt, azim)


def test_open_grid_matches_pvlib(open_case):
    sky, terms, result = open_case
    assert result.daily_kwh_m2.shape == (sky.n_days, TILTS.size * AZIMUTHS.size)
    assert result.daily_open_kwh_m2 is None
    for tilt, azimuth in ON_GRID:
        ref = _pvlib_daily(sky, tilt, azimuth, terms.model)
        j = _plane_column(result, tilt, azimuth)
        # pvlib get_total_irradiance (Holmgren et al. 2018, JOSS 3(29) 884) on the same
        # sky; tolerance 1e-9 relative (about 1e-6 kWh/m2 on an annual total)
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)
        np.testing.assert_allclose(result.annual_kwh_m2[j], ref.sum(), rtol=1e-9)


def test_open_off_grid_planes_match_pvlib(open_case):
    sky, terms, _ = open_case
    tilt = np.array([p[0] for p in OFF_GRID])
    azim = np.array([p[1] for p in OFF_GRID])
    result = many_plane_daily(terms, tilt, azim)
    for j, (t, a) in enumerate(OFF_GRID):
        ref = _pvlib_daily(sky, t, a, terms.model)
        # pvlib get_total_irradiance (Holmgren et al. 2018); 1e-9 relative
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)
        np.testing.assert_allclose(result.annual_kwh_m2[j], ref.sum(), rtol=1e-9)


def test_open_flat_plane_sees_ghi_isotropic():
    sky = sky_year(OPEN_SITE, IrradianceOptions(model="isotropic"))
    result = many_plane_daily(many_plane_terms(sky), 0.0, 180.0)
    up = sky.sun_up_fraction > 0
    ghi_daily = np.bincount(sky.day_index[up], weights=sky.ghi[up] * sky.kwh_weight[up],
                            minlength=sky.n_days)
    # a horizontal plane under the isotropic sky receives dni cos z + dhi = GHI
    # (Liu & Jordan 1963; Duffie & Beckman 2013, eq. 2.15.1 at tilt 0); the clear-sky
    # closure holds to rounding, tolerance 1e-9 relative. (Hay-Davies and Perez differ
    # from GHI below 1 deg and 5 deg elevation by their cos z floors, as pvlib does.)
    np.testing.assert_allclose(result.daily_kwh_m2[:, 0], ghi_daily, rtol=1e-9)


HORIZON_PLANES = ((35.0, 180.0), (90.0, 200.0), (60.0, 118.0), (20.0, 0.0), (47.5, 163.3))


@pytest.mark.parametrize("demo", ["larkmoor-dairy", "high-pass-hut"])
@pytest.mark.parametrize("model", MODELS)
def test_site_horizon_matches_irradiance_year(demo, model):
    site = load_demo(demo)
    options = IrradianceOptions(model=model)
    sky = sky_year(site, options)
    terms = many_plane_terms(sky)
    planes = HORIZON_PLANES if model == "perez" else HORIZON_PLANES[:2]
    tilt = np.array([p[0] for p in planes])
    azim = np.array([p[1] for p in planes])
    result = many_plane_daily(terms, tilt, azim, site=site, with_open=True)
    assert result.daily_open_kwh_m2 is not None
    monthly = result.monthly_kwh_m2(_month_of_day(sky))
    open_annual = result.daily_open_kwh_m2.sum(axis=0)
    for j, (t, a) in enumerate(planes):
        ref = irradiance_year(site, t, a, options)
        # consistency with the one-plane job, itself tested against pvlib
        # get_total_irradiance (Holmgren et al. 2018) for an open horizon; 1e-9 relative
        np.testing.assert_allclose(result.annual_kwh_m2[j], ref.annual["poa_kwh_m2"],
                                   rtol=1e-9)
        np.testing.assert_allclose(open_annual[j], ref.annual["poa_open_kwh_m2"], rtol=1e-9)
        np.testing.assert_allclose(monthly[:, j], ref.monthly["poa_kwh_m2"].to_numpy(),
                                   rtol=1e-9)
        np.testing.assert_allclose(result.sky_view_factor[j], ref.shading.sky_view_factor,
                                   rtol=1e-9)
    if demo == "larkmoor-dairy":
        # obstacles and a raised horizon cost irradiation on every plane
        assert (result.annual_kwh_m2 < open_annual).all()


def test_site_horizon_full_grid_sample():
    """Full grid with the site horizon, a few planes checked against the one-plane job."""
    site = load_demo("high-pass-hut")
    options = IrradianceOptions(model="perez")
    terms = many_plane_terms(sky_year(site, options))
    tilt, azim = _grid()
    result = many_plane_daily(terms, tilt, azim, site=site, with_open=True)
    for t, a in ((0.0, 0.0), (90.0, 355.0), (40.0, 170.0)):
        j = _plane_column(result, t, a)
        ref = irradiance_year(site, t, a, options)
        # consistency with irradiance_year (pvlib-based, Holmgren et al. 2018); 1e-9 relative
        np.testing.assert_allclose(result.annual_kwh_m2[j], ref.annual["poa_kwh_m2"],
                                   rtol=1e-9)
        np.testing.assert_allclose(result.daily_open_kwh_m2[:, j].sum(),
                                   ref.annual["poa_open_kwh_m2"], rtol=1e-9)


# -- Perez clipping -----------------------------------------------------------------

def _clipping_sky(site, brightness=1.0):
    """A real sky whose low-sun intervals are replaced by a strongly negative-F2 sky.

    Below 5 deg apparent elevation the diffuse is set so that Perez's brightness
    parameter is ``brightness`` and the clearness falls in bin 7 (4.5-6.2), where
    F2 = 0.264 - 1.127 delta + 0.131 z. With delta = 1.0 it is below
    -(1 - F1) / 2 and pvlib's max(sky diffuse, 0) acts on steep planes facing
    away from the sun; with delta = 0.67 (F2 near -0.3, F1 clipped to 0) it acts
    only on planes tilted beyond vertical. These are stress inputs (far brighter
    than any real sky that low), not data.
    """
    sky = sky_year(site, IrradianceOptions(model="perez"))
    nd = sky.nodes
    zen = nd.apparent_zenith
    low = zen > 85.0
    am = np.nan_to_num(np.asarray(pvlib.atmosphere.get_relative_airmass(zen), dtype=float))
    dhi = nd.dhi.copy()
    dni = nd.dni.copy()
    dhi[low] = brightness * nd.dni_extra[low] / am[low]
    kz3 = 1.041 * np.radians(zen[low]) ** 3
    eps_target = 5.0
    dni[low] = dhi[low] * (eps_target * (1 + kz3) - kz3 - 1.0)
    ghi = dni * np.cos(np.radians(zen)) + dhi
    return dataclasses.replace(sky, nodes=dataclasses.replace(nd, dhi=dhi, dni=dni, ghi=ghi)), low


def test_perez_clipping_matches_pvlib():
    sky, low = _clipping_sky(OPEN_SITE)
    terms = many_plane_terms(sky)
    assert terms.clip_rows.any()
    assert terms.clip_rows[low].mean() > 0.5
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 10.0), np.arange(0.0, 360.0, 15.0),
                             indexing="ij")
    result = many_plane_daily(terms, tilt, azim)
    nd = sky.nodes
    bites = 0
    for t, a in ((90.0, 0.0), (90.0, 180.0), (80.0, 345.0), (40.0, 0.0), (0.0, 0.0),
                 (90.0, 90.0), (70.0, 270.0)):
        diffuse = pvlib.irradiance.get_sky_diffuse(
            t, a, nd.apparent_zenith, nd.azimuth, nd.dni, nd.ghi, nd.dhi,
            dni_extra=nd.dni_extra, model="perez")
        bites += int((np.asarray(diffuse) == 0).sum())
        ref = _pvlib_daily(sky, t, a, "perez")
        j = _plane_column(result, t, a)
        # pvlib get_total_irradiance (Holmgren et al. 2018) including its clip of the
        # Perez sky diffuse at 0; 1e-9 relative
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)
    assert bites > 100                     # the clip really acted in the reference


def test_perez_clipping_with_horizon_matches_poa_components():
    site = load_demo("larkmoor-dairy")
    sky, _ = _clipping_sky(site)
    terms = many_plane_terms(sky)
    assert terms.clip_rows.any()
    planes = ((90.0, 0.0), (90.0, 200.0), (75.0, 330.0), (30.0, 118.0))
    result = many_plane_daily(terms, [p[0] for p in planes], [p[1] for p in planes],
                              site=site, with_open=True)
    nd = sky.nodes
    k = _node_kwh(sky)
    for j, (t, a) in enumerate(planes):
        poa = poa_components(t, a, nd.apparent_zenith, nd.azimuth, nd.ghi, nd.dni, nd.dhi,
                             nd.dni_extra, nd.albedo, "perez", sun_visible=nd.sun_visible,
                             shading=plane_shading(site, t, a))
        ref = np.bincount(nd.day_index, weights=poa["poa_global"].to_numpy() * k)
        ref_open = np.bincount(nd.day_index, weights=poa["poa_global_open"].to_numpy() * k)
        # consistency with plane.poa_components (pvlib perez components, Holmgren et al.
        # 2018, with the horizon applied per component); 1e-9 relative
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)
        np.testing.assert_allclose(result.daily_open_kwh_m2[:, j], ref_open, rtol=1e-9,
                                   atol=1e-12)


# -- chunking -----------------------------------------------------------------------

def test_chunk_size_does_not_change_results(monkeypatch):
    site = load_demo("larkmoor-dairy")
    sky, _ = _clipping_sky(site)
    terms = many_plane_terms(sky)
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 15.0), np.arange(0.0, 360.0, 45.0),
                             indexing="ij")
    ref = many_plane_daily(terms, tilt, azim, site=site, with_open=True)
    # CHUNK_BYTES = 1 forces the 64-row minimum chunk: chunks split days and clipped rows
    monkeypatch.setattr(manyplane, "CHUNK_BYTES", 1)
    small = many_plane_daily(terms, tilt, azim, site=site, with_open=True)
    # regression: same sums in a different grouping, 1e-12 relative
    np.testing.assert_allclose(small.daily_kwh_m2, ref.daily_kwh_m2, rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(small.daily_open_kwh_m2, ref.daily_open_kwh_m2, rtol=1e-12,
                               atol=1e-15)


@pytest.mark.parametrize("budget", [4 * 2**20, manyplane.CHUNK_BYTES])
def test_chunk_bytes_bounds_working_set(monkeypatch, budget):
    site = load_demo("larkmoor-dairy")
    terms = many_plane_terms(sky_year(site, IrradianceOptions(model="perez")))
    tilt, azim = _grid()
    n_out = terms.n_days * tilt.size * 8          # bytes of one (n_days, n_planes) array
    monkeypatch.setattr(manyplane, "CHUNK_BYTES", budget)
    tracemalloc.start()
    try:
        many_plane_daily(terms, tilt, azim, site=site, with_open=True)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    # the two outputs are (n_days, n_planes) arrays; the grid pass works on chunks of
    # days of at most CHUNK_BYTES plus per-interval arrays of a chunk, the horizon
    # factors need a few MiB. Bound of the design, common practice, no source; without
    # chunking the full grid peaks near 375 MiB, above this bound.
    assert peak < 5 * n_out + 3 * budget, (peak, n_out, budget)


# -- evaluation paths ---------------------------------------------------------------

def _all_pairs(monkeypatch, terms, tilt, azim, **kw):
    """The same call with the grid evaluation switched off (every pair visited)."""
    with monkeypatch.context() as m:
        m.setattr(manyplane, "PRODUCT_RATIO", -1)
        return many_plane_daily(terms, tilt, azim, **kw)


def test_grid_and_all_pairs_agree(monkeypatch):
    site = load_demo("larkmoor-dairy")
    sky, _ = _clipping_sky(site)
    terms = many_plane_terms(sky)
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 7.5), np.arange(0.0, 360.0, 20.0),
                             indexing="ij")
    grid = many_plane_daily(terms, tilt, azim, site=site, with_open=True)
    pairs = _all_pairs(monkeypatch, terms, tilt, azim, site=site, with_open=True)
    # regression: the same sums in two evaluation orders (the grid's sign-change
    # difference array against max(cos aoi, 0) on every pair), 1e-12 relative
    np.testing.assert_allclose(grid.daily_kwh_m2, pairs.daily_kwh_m2, rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(grid.daily_open_kwh_m2, pairs.daily_open_kwh_m2, rtol=1e-12,
                               atol=1e-15)
    np.testing.assert_allclose(grid.sky_view_factor, pairs.sky_view_factor, rtol=1e-12)


def test_planes_in_any_order_with_repeats(open_case):
    sky, terms, result = open_case
    # azimuth-major order, a repeated plane, azimuths given as 360 and -5 (= 0 and 355)
    tilt = np.array([10.0, 20.0, 10.0, 20.0, 35.0, 35.0, 90.0, 90.0])
    azim = np.array([180.0, 180.0, 360.0, 360.0, -5.0, 180.0, 270.0, 270.0])
    picked = many_plane_daily(terms, tilt, azim)
    for k, (t, a) in enumerate(zip(tilt, azim, strict=True)):
        j = _plane_column(result, t, a % 360.0)
        # regression: the same plane from the full grid, 1e-12 relative
        np.testing.assert_allclose(picked.daily_kwh_m2[:, k], result.daily_kwh_m2[:, j],
                                   rtol=1e-12, atol=1e-15)
    ref = _pvlib_daily(sky, 35.0, -5.0, terms.model)
    # pvlib get_total_irradiance (Holmgren et al. 2018), 1e-9 relative
    np.testing.assert_allclose(picked.daily_kwh_m2[:, 4], ref, rtol=1e-9, atol=1e-12)


def test_scattered_planes_match_pvlib(open_case):
    sky, terms, _ = open_case
    rng = np.random.default_rng(7)
    tilt = rng.uniform(0.0, 90.0, 40)
    azim = rng.uniform(0.0, 360.0, 40)
    assert manyplane._product_layout(tilt, azim) is None    # every pair is visited
    result = many_plane_daily(terms, tilt, azim)
    for j in (0, 13, 27, 39):
        ref = _pvlib_daily(sky, tilt[j], azim[j], terms.model)
        # pvlib get_total_irradiance (Holmgren et al. 2018), 1e-9 relative
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)


def test_sun_just_below_the_horizontal_matches_pvlib():
    """Sun-up intervals whose evaluation instant has the sun below the horizontal.

    The zenith of the low-sun intervals is pushed past 90 deg (stress input, not
    data): there the beam reaches only planes tilted towards the sun beyond the
    sun's depression angle, the other branch of the grid's sign analysis.
    """
    sky = sky_year(OPEN_SITE, IrradianceOptions(model="isotropic"))
    zen = sky.nodes.apparent_zenith.copy()
    zen[zen > 80.0] += 14.0
    sky = dataclasses.replace(sky, nodes=dataclasses.replace(sky.nodes, apparent_zenith=zen))
    terms = many_plane_terms(sky)
    assert (terms.sun_vec[:, 0] < 0).sum() > 100
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 10.0), np.arange(0.0, 360.0, 30.0),
                             indexing="ij")
    result = many_plane_daily(terms, tilt, azim)
    for t, a in ((90.0, 90.0), (90.0, 270.0), (60.0, 60.0), (10.0, 300.0), (0.0, 0.0)):
        ref = _pvlib_daily(sky, t, a, "isotropic")
        j = _plane_column(result, t, a)
        # pvlib get_total_irradiance (Holmgren et al. 2018) with beam max(dni cos aoi, 0);
        # 1e-9 relative
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)


@pytest.mark.parametrize("brightness", [1.0, 0.67])
def test_planes_beyond_vertical_match_pvlib(brightness):
    sky, low = _clipping_sky(OPEN_SITE, brightness)
    terms = many_plane_terms(sky)
    if brightness < 1.0:
        # the clip acts only beyond vertical here, outside what clip_rows covers
        assert not terms.clip_rows[low].any()
    planes = ((100.0, 0.0), (120.0, 180.0), (150.0, 90.0), (45.0, 200.0))
    result = many_plane_daily(terms, [p[0] for p in planes], [p[1] for p in planes])
    nd = sky.nodes
    diffuse = pvlib.irradiance.get_sky_diffuse(
        150.0, 90.0, nd.apparent_zenith, nd.azimuth, nd.dni, nd.ghi, nd.dhi,
        dni_extra=nd.dni_extra, model="perez")
    assert (np.asarray(diffuse) == 0).sum() > 100       # the clip acts in the reference
    for j, (t, a) in enumerate(planes):
        ref = _pvlib_daily(sky, t, a, "perez")
        # pvlib get_total_irradiance (Holmgren et al. 2018) including its clip of the
        # Perez sky diffuse at 0; 1e-9 relative
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)


def test_polar_site_narrow_azimuth_fan_matches_pvlib(monkeypatch):
    # near the polar night the sun stays near the south, so on some days no plane of a
    # narrow fan around south ever turns away from it; one-day chunks meet such days
    site = Site("polar", 69.65, 18.96, 10.0, "Europe/Oslo")
    sky = sky_year(site, IrradianceOptions(model="perez"))
    terms = many_plane_terms(sky)
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 15.0), [175.0, 180.0, 185.0], indexing="ij")
    monkeypatch.setattr(manyplane, "CHUNK_BYTES", 1)
    result = many_plane_daily(terms, tilt, azim)
    assert (result.daily_kwh_m2[:, 0] == 0).sum() > 20          # polar night
    for t, a in ((90.0, 180.0), (45.0, 175.0), (0.0, 185.0)):
        ref = _pvlib_daily(sky, t, a, "perez")
        j = _plane_column(result, t, a)
        # pvlib get_total_irradiance (Holmgren et al. 2018), 1e-9 relative
        np.testing.assert_allclose(result.daily_kwh_m2[:, j], ref, rtol=1e-9, atol=1e-12)


# -- monthly totals without the daily table -------------------------------------------

@pytest.mark.parametrize("planes", ["grid", "pairs"])
def test_monthly_equals_the_daily_table_summed(monkeypatch, planes):
    site = load_demo("larkmoor-dairy")
    sky, _ = _clipping_sky(site)          # Perez clipping acts on some rows
    terms = many_plane_terms(sky)
    mod = _month_of_day(sky)
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 5.0), np.arange(0.0, 360.0, 15.0),
                             indexing="ij")
    if planes == "pairs":
        monkeypatch.setattr(manyplane, "PRODUCT_RATIO", -1)
    ref = sum_by_month(many_plane_daily(terms, tilt, azim, site=site).daily_kwh_m2, mod)
    got = many_plane_monthly(terms, tilt, azim, mod, site=site)
    assert got.shape == (12, tilt.size)
    # regression: the same sums grouped by month first, 1e-12 relative
    np.testing.assert_allclose(got, ref, rtol=1e-12, atol=1e-15)


def test_monthly_grid_matches_pvlib():
    site = load_demo("larkmoor-dairy")
    sky = sky_year(site, IrradianceOptions(model="perez"))
    terms = many_plane_terms(sky)
    mod = _month_of_day(sky)
    tilt, azim = _grid()
    got = many_plane_monthly(terms, tilt, azim, mod, site=site)
    for t, a in ON_GRID[:6]:
        j = int(np.flatnonzero((tilt.ravel() == t) & (azim.ravel() == a))[0])
        poa = irradiance_year(site, t, a, IrradianceOptions(model="perez"))
        # pvlib transposition with the horizon applied, through the one-plane job
        # (Holmgren et al. 2018), 1e-9 relative
        np.testing.assert_allclose(got[:, j], poa.monthly["poa_kwh_m2"].to_numpy(), rtol=1e-9)


def test_monthly_refuses_a_wrong_month_table():
    sky = sky_year(OPEN_SITE, IrradianceOptions(model="isotropic"))
    with pytest.raises(ValueError, match="month_of_day"):
        many_plane_monthly(many_plane_terms(sky), 30.0, 180.0, np.ones(10))


# -- a second grid pass taking the first pass's beam clip parts ----------------------

@pytest.mark.parametrize("demo", ["coral-lane-clinic", "larkmoor-dairy"])
def test_open_grid_after_site_grid_reuses_clip_parts(demo):
    from tiltyard.engine.beam_clip import ClipReuse

    site = load_demo(demo)
    sky = sky_year(site, IrradianceOptions(model="perez", sky="clear"))
    terms = many_plane_terms(sky)
    open_terms = dataclasses.replace(terms, visible=np.ones_like(terms.visible))
    open_site = site.with_changes(horizon=type(site.horizon)(), obstacles=())
    mod = _month_of_day(sky)
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 1.0), np.arange(0.0, 360.0, 5.0),
                             indexing="ij")
    reuse = ClipReuse()
    site_grid = many_plane_monthly(terms, tilt, azim, mod, site=site, reuse=reuse)
    assert reuse.parts                    # the site pass kept its parts
    # the site pass itself is the plain pass, bit for bit
    assert site_grid.tobytes() == many_plane_monthly(terms, tilt, azim, mod,
                                                     site=site).tobytes()
    got = many_plane_monthly(open_terms, tilt, azim, mod, site=open_site, reuse=reuse)
    ref = many_plane_monthly(open_terms, tilt, azim, mod, site=open_site)
    # regression: the same sums grouped as kept nodes plus added nodes, 1e-12 relative
    np.testing.assert_allclose(got, ref, rtol=1e-12, atol=1e-15)
    # a pass whose weights differ on the kept nodes computes every node itself
    other = dataclasses.replace(terms, sun_w=terms.sun_w * 1.5)
    assert (many_plane_monthly(other, tilt, azim, mod, site=site, reuse=reuse).tobytes()
            == many_plane_monthly(other, tilt, azim, mod, site=site).tobytes())
