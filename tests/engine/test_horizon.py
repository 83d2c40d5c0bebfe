"""Tests for horizon profiles, obstacles and sky-view factors (tiltyard.engine.horizon)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from pvlib import irradiance

from tiltyard.engine import horizon
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.horizon import (
    HORIZON_BAND_DEG,
    horizon_band_fraction,
    merged_profile,
    obstacle_elevation_deg,
    plane_shading,
    profile_elevation_deg,
    site_horizon_deg,
    sky_view_factor,
    sun_visible,
)
from tiltyard.engine.site import HorizonProfile, Obstacle, Site

PROFILE_AZ = tuple(range(0, 360, 30))  # 12 measured directions for generated horizons

tilts = st.floats(0.0, 90.0, allow_nan=False)
azimuths = st.floats(0.0, 360.0, allow_nan=False)
horizons = st.lists(st.floats(-30.0, 60.0, allow_nan=False), min_size=12, max_size=12)


def _profile_fn(elevations):
    """h(A) of a measured profile at PROFILE_AZ, interpolated across north."""
    prof = HorizonProfile(PROFILE_AZ, tuple(elevations))
    return lambda a: profile_elevation_deg(prof, a)


def _open_svf(tilt_deg):
    return (1.0 + np.cos(np.radians(tilt_deg))) / 2.0


def _svf_brute_force(tilt_deg, azimuth_deg, h_fn, n_e=3600, n_a=720):
    """The defining integral done the slow way, independently of the closed form.

    F = (1/pi) * sum over sky cells above h(A) of max(cos theta, 0) dOmega, with
    dOmega = cos(e) de dA, theta the angle between the cell's direction and the
    plane normal (Duffie & Beckman 2013, sec. 2.15; isotropic sky of Liu & Jordan 1963).
    Midpoint cells of 0.05 deg in elevation and 0.5 deg in azimuth.
    """
    e = np.radians(-90.0 + (np.arange(n_e) + 0.5) * 180.0 / n_e)[:, None]
    a = np.radians((np.arange(n_a) + 0.5) * 360.0 / n_a)[None, :]
    b, g = math.radians(tilt_deg), math.radians(azimuth_deg)
    # direction (east, north, up) dotted with the plane normal
    cos_t = (np.cos(e) * np.sin(a) * math.sin(b) * math.sin(g)
             + np.cos(e) * np.cos(a) * math.sin(b) * math.cos(g)
             + np.sin(e) * math.cos(b))
    above = e > np.radians(np.asarray(h_fn(np.degrees(a)), dtype=float))
    cell = (math.pi / n_e) * (2.0 * math.pi / n_a)
    return float((np.maximum(cos_t, 0.0) * np.cos(e) * above).sum() * cell / math.pi)


# -- profile interpolation -----------------------------------------------------------

def test_profile_interpolates_across_north():
    prof = HorizonProfile((10, 180, 350), (8.0, 20.0, 4.0))
    # linear interpolation on the circle: 0 deg lies halfway between 350 and 10 deg
    # (common practice, no source; exact arithmetic, 1e-12 deg)
    assert profile_elevation_deg(prof, 0.0) == pytest.approx(6.0, abs=1e-12)
    assert profile_elevation_deg(prof, 360.0) == pytest.approx(6.0, abs=1e-12)
    assert profile_elevation_deg(prof, -360.0) == pytest.approx(6.0, abs=1e-12)
    assert profile_elevation_deg(prof, 355.0) == pytest.approx(5.0, abs=1e-12)
    assert profile_elevation_deg(prof, 5.0) == pytest.approx(7.0, abs=1e-12)
    assert profile_elevation_deg(prof, 95.0) == pytest.approx(14.0, abs=1e-12)
    # the measured points themselves come back unchanged
    np.testing.assert_allclose(profile_elevation_deg(prof, [10, 180, 350]), [8, 20, 4],
                               atol=1e-12)


def test_profile_is_stored_sorted_and_wraps_360():
    prof = HorizonProfile((270, 360, 90), (3.0, 1.0, 2.0))
    assert prof.azimuth_deg == (0.0, 90.0, 270.0)
    assert prof.elevation_deg == (1.0, 2.0, 3.0)


def test_empty_and_single_point_profiles():
    assert np.all(profile_elevation_deg(HorizonProfile(), [0, 90, 359.9]) == 0.0)
    np.testing.assert_array_equal(profile_elevation_deg(HorizonProfile((120,), (7,)), [0, 200]),
                                  [7.0, 7.0])


def test_negative_horizon_elevations_are_allowed():
    # a site on high ground sees below the horizontal (DESIGN.md)
    prof = HorizonProfile((0, 180), (-2.0, -6.0))
    assert profile_elevation_deg(prof, 90.0) == pytest.approx(-4.0, abs=1e-12)
    hut = load_demo("high-pass-hut")  # its profile dips to -3 deg due south
    assert site_horizon_deg(hut, 180.0) == pytest.approx(-3.0, abs=1e-12)


# -- obstacles ---------------------------------------------------------------------

def test_obstacle_10m_high_10m_away_is_45_deg_within_its_span_only():
    ob = Obstacle("shed", bearing_deg=200, width_deg=20, distance_m=10, height_m=10)
    inside = [190.0, 195.0, 200.0, 209.9, 210.0]
    outside = [189.0, 211.0, 20.0, 0.0]
    # atan(10 m / 10 m) = 45 deg (plane trigonometry, common practice, no source; 1e-12 deg)
    np.testing.assert_allclose(obstacle_elevation_deg([ob], inside), 45.0, atol=1e-12)
    np.testing.assert_array_equal(obstacle_elevation_deg([ob], outside), -90.0)
    site = Site("x", 50, 0, horizon=HorizonProfile((0,), (3.0,)), obstacles=(ob,))
    np.testing.assert_allclose(site_horizon_deg(site, inside), 45.0, atol=1e-12)
    np.testing.assert_allclose(site_horizon_deg(site, outside), 3.0, atol=1e-12)


def test_obstacle_across_north():
    ob = Obstacle.from_bearing_range("hedge", 350, 10, distance_m=10, height_m=10)
    np.testing.assert_allclose(obstacle_elevation_deg([ob], [350, 355, 0, 5, 10, 360]), 45.0,
                               atol=1e-12)  # plane trigonometry, 1e-12 deg
    np.testing.assert_array_equal(obstacle_elevation_deg([ob], [340, 20, 180]), -90.0)


def test_overlapping_obstacles_take_the_higher():
    low = Obstacle("fence", 100, 40, 10, 1)
    high = Obstacle("mast", 110, 4, 10, 10)
    el = obstacle_elevation_deg([low, high], [85.0, 110.0, 119.0])
    # atan(1/10) and atan(10/10) (plane trigonometry, 1e-12 deg)
    np.testing.assert_allclose(el, [math.degrees(math.atan(0.1)), 45.0,
                                    math.degrees(math.atan(0.1))], atol=1e-12)


def test_site_horizon_is_the_upper_envelope():
    prof = HorizonProfile((0, 90, 180, 270), (10.0, 50.0, 10.0, 5.0))
    ob = Obstacle("barn", 135, 90, 10, 10)  # 45 deg from 90 to 180
    site = Site("x", 45, 0, horizon=prof, obstacles=(ob,))
    az = np.arange(0.0, 360.0, 0.5)
    np.testing.assert_array_equal(
        site_horizon_deg(site, az),
        np.maximum(profile_elevation_deg(prof, az), obstacle_elevation_deg([ob], az)))
    assert site_horizon_deg(site, 90.0) == pytest.approx(50.0)   # profile above the obstacle
    assert site_horizon_deg(site, 150.0) == pytest.approx(45.0)  # obstacle above the profile
    assert site_horizon_deg(site, 200.0) == pytest.approx(profile_elevation_deg(prof, 200.0))


def test_demo_tree_raises_the_horizon():
    lark = load_demo("larkmoor-dairy")  # ash tree: 9.5 m above the panels at 18 m, 193-207 deg
    # atan(9.5 / 18) = 27.82 deg (plane trigonometry, common practice, no source; 1e-9 deg)
    assert site_horizon_deg(lark, 200.0) == pytest.approx(math.degrees(math.atan2(9.5, 18)),
                                                          abs=1e-9)


def test_merged_profile_keeps_obstacle_edges():
    # an obstacle whose edges fall between the 1-deg samples, and one narrower than a step
    wide = Obstacle("barn", 118.3, 7.7, 10, 10)
    thin = Obstacle("pole", 250.5, 0.4, 10, 10)
    site = Site("x", 45, 0, horizon=HorizonProfile((0,), (2.0,)), obstacles=(wide, thin))
    prof = merged_profile(site)
    az = np.asarray(prof.azimuth_deg)
    el = np.asarray(prof.elevation_deg)
    assert np.all(np.diff(az) > 0) and az[0] == 0.0 and az[-1] < 360.0
    for ob in (wide, thin):
        for edge in (ob.bearing_deg - ob.width_deg / 2, ob.bearing_deg + ob.width_deg / 2):
            i = int(np.argmin(np.abs(az - edge)))
            assert az[i] == pytest.approx(edge, abs=1e-6)
            assert el[i] == pytest.approx(45.0, abs=1e-4)  # plane trigonometry; 4-decimal output
    assert el[az == 114.0][0] == pytest.approx(2.0)  # just outside the barn: the profile
    assert el[az == 123.0][0] == pytest.approx(2.0)
    assert el[az == 250.0][0] == pytest.approx(2.0)  # the pole lies between 250 and 251


def test_sun_visible_against_obstacle_and_negative_horizon():
    site = Site("x", 45, 0, horizon=HorizonProfile((0, 180), (5.0, -3.0)),
                obstacles=(Obstacle("wall", 90, 20, 10, 10),))
    vis = sun_visible(site, [90.0, 90.0, 180.0, 180.0], [40.0, 50.0, -2.0, -4.0])
    np.testing.assert_array_equal(vis, [False, True, True, False])


# -- sky-view factor -----------------------------------------------------------------

@pytest.mark.parametrize("surface_azimuth", [0.0, 90.0, 180.0, 222.5])
def test_open_horizon_is_liu_jordan(surface_azimuth):
    tilt = np.arange(0.0, 90.0 + 1e-9, 2.5)
    svf = sky_view_factor(tilt, surface_azimuth, 0.0)
    # Liu & Jordan (1963), Solar Energy 7(2) 53-74: isotropic view factor (1 + cos tilt) / 2;
    # same as pvlib.irradiance.isotropic with dhi = 1 (pvlib 0.16). Tolerance 1e-6.
    np.testing.assert_allclose(svf, _open_svf(tilt), atol=1e-6)
    np.testing.assert_allclose(svf, irradiance.isotropic(tilt, 1.0), atol=1e-6)


def test_sky_view_factor_broadcasts():
    tilt = np.array([[0.0], [30.0], [90.0]])
    az = np.array([90.0, 180.0])
    svf = sky_view_factor(tilt, az, 0.0)
    assert svf.shape == (3, 2)
    np.testing.assert_allclose(svf, np.broadcast_to(_open_svf(tilt), (3, 2)), atol=1e-6)


@pytest.mark.parametrize("h_deg", [0.0, 5.0, 15.0, 30.0, 45.0, 60.0, 80.0])
def test_uniform_horizon_horizontal_plane_is_cos_squared(h_deg):
    # Horizontal plane, cos(theta) = sin(e), dOmega = cos(e) de dA:
    #   F = (1/pi) * int_0^{2 pi} dA int_h^{pi/2} sin(e) cos(e) de
    #     = (1/pi) * 2 pi * [sin^2(e) / 2]_h^{pi/2} = 1 - sin^2(h) = cos^2(h).
    # (closed form of the view-factor integral, Duffie & Beckman 2013 sec. 2.15; 1e-6)
    assert float(sky_view_factor(0.0, 180.0, h_deg)) == pytest.approx(
        math.cos(math.radians(h_deg)) ** 2, abs=1e-6)


@pytest.mark.parametrize(("tilt", "h_deg"), [(20.0, 20.0), (30.0, 40.0), (60.0, 75.0)])
def test_uniform_horizon_above_the_plane_tilt(tilt, h_deg):
    # With a horizon zenith angle H(A) = 90 - h(A), the view factor is
    #   F = (1/2pi) int [cos(b) sin^2 H + sin(b) cos(A - g) (H - sin H cos H)] dA
    # (Dozier, J. & Frew, J. 1990, IEEE Trans. Geosci. Remote Sens. 28(5) 963-969; from
    # memory), valid where the horizon is above the plane's own back edge, h >= tilt for a
    # uniform horizon. The cos(A - g) term then integrates to zero: F = cos(b) cos^2(h).
    # Tolerance 1e-6.
    expected = math.cos(math.radians(tilt)) * math.cos(math.radians(h_deg)) ** 2
    assert float(sky_view_factor(tilt, 135.0, h_deg)) == pytest.approx(expected, abs=1e-6)


@pytest.mark.parametrize(("tilt", "azimuth", "h_fn"), [
    (30.0, 180.0, lambda a: 10.0 + 5.0 * np.cos(np.radians(a))),
    (60.0, 90.0, lambda a: np.full_like(a, -10.0)),
    (90.0, 200.0, lambda a: 20.0 * np.sin(np.radians(a)) ** 2 - 5.0),
    (45.0, 0.0, lambda a: np.where((a > 150) & (a < 210), 40.0, -20.0)),
    (75.0, 300.0, lambda a: np.full_like(a, 30.0)),
])
def test_sky_view_factor_matches_brute_force_integral(tilt, azimuth, h_fn):
    # the definition integrated cell by cell (see _svf_brute_force); tolerance 1e-4,
    # the discretisation error of 0.05 x 0.5 deg cells
    assert float(sky_view_factor(tilt, azimuth, h_fn)) == pytest.approx(
        _svf_brute_force(tilt, azimuth, h_fn), abs=1e-4)


@settings(max_examples=60, deadline=None)
@given(tilt=tilts, azimuth=azimuths, elevations=horizons)
def test_sky_view_factor_within_0_and_1(tilt, azimuth, elevations):
    svf = float(sky_view_factor(tilt, azimuth, _profile_fn(elevations)))
    assert 0.0 <= svf <= 1.0  # a view factor is a fraction (definition)


@settings(max_examples=40, deadline=None)
@given(elevations=st.lists(st.floats(-30.0, -1e-6, allow_nan=False), min_size=12, max_size=12),
       azimuth=azimuths)
def test_horizontal_plane_with_horizon_below_zero_sees_whole_sky(elevations, azimuth):
    # a horizontal plane sees only the upper hemisphere, so a horizon below the horizontal
    # hides nothing: F = 1 (definition of the view factor; 1e-12)
    assert float(sky_view_factor(0.0, azimuth, _profile_fn(elevations))) == pytest.approx(
        1.0, abs=1e-12)


@settings(max_examples=60, deadline=None)
@given(tilt=tilts, azimuth=azimuths, elevations=horizons,
       raise_by=st.lists(st.floats(0.0, 30.0, allow_nan=False), min_size=12, max_size=12))
def test_higher_horizon_never_increases_the_view_factor(tilt, azimuth, elevations, raise_by):
    higher = [e + r for e, r in zip(elevations, raise_by, strict=True)]
    lo = float(sky_view_factor(tilt, azimuth, _profile_fn(elevations)))
    hi = float(sky_view_factor(tilt, azimuth, _profile_fn(higher)))
    assert hi <= lo + 1e-12  # hiding more sky cannot add radiance (definition)


@pytest.mark.parametrize("tilt", [0.0, 15.0, 40.0, 75.0, 90.0])
def test_east_west_mirror_symmetry(tilt):
    # a horizon symmetric about the north-south line, h(A) = h(360 - A)
    prof = HorizonProfile((0, 60, 120, 180, 240, 300), (3.0, 8.0, 12.0, 6.0, 12.0, 8.0))
    x = np.array([0.0, 10.0, 37.5, 90.0, 135.0, 180.0])
    east = sky_view_factor(tilt, 180.0 - x, lambda a: profile_elevation_deg(prof, a))
    west = sky_view_factor(tilt, 180.0 + x, lambda a: profile_elevation_deg(prof, a))
    np.testing.assert_allclose(east, west, rtol=0, atol=1e-9)  # geometry, 1e-9


def test_many_planes_on_the_azimuth_grid_match_one_at_a_time():
    # many planes whose azimuths fall on the sample grid take a tabulated path; it must
    # give the same numbers as the direct integral one plane at a time (1e-12)
    prof = HorizonProfile((0, 45, 120, 170, 200, 260, 300), (6.0, 12.0, -4.0, 18.0, 2.0, 35.0, 0.0))

    def h_fn(a):
        return profile_elevation_deg(prof, a)

    tilt = np.repeat([0.0, 10.0, 35.0, 62.5, 90.0], 8)
    azim = np.tile([0.0, 45.0, 90.25, 135.0, 180.0, 225.5, 270.0, 359.75], 5)
    together = sky_view_factor(tilt, azim, h_fn)
    one_by_one = np.array([float(sky_view_factor(t, a, h_fn)) for t, a in zip(tilt, azim,
                                                                                strict=True)])
    np.testing.assert_allclose(together, one_by_one, rtol=0, atol=1e-12)


@pytest.mark.parametrize("tilts", [np.arange(0.0, 91.0, 7.5), np.array([3.0, 41.0, 89.5])])
def test_tilt_azimuth_grid_matches_one_at_a_time(tilts):
    # a tilt x azimuth grid on the sample grid (evenly spaced tilts take arithmetic
    # threshold counts, others a binary search); the horizon dips below the horizontal,
    # rises steeply and stands above some of the tilts. Same numbers as the direct
    # integral one plane at a time (1e-12)
    prof = HorizonProfile((0, 40, 95, 150, 200, 250, 310), (-25.0, 60.0, 5.0, 0.0, 33.0, -8.0, 12.0))

    def h_fn(a):
        return profile_elevation_deg(prof, a)

    tilt, azim = np.meshgrid(tilts, np.arange(0.0, 360.0, 22.5), indexing="ij")
    together = sky_view_factor(tilt, azim, h_fn)
    one_by_one = np.array([float(sky_view_factor(t, a, h_fn))
                           for t, a in zip(tilt.ravel(), azim.ravel(), strict=True)])
    np.testing.assert_allclose(together.ravel(), one_by_one, rtol=0, atol=1e-12)


@pytest.mark.parametrize("planes", [(np.arange(0.0, 91.0, 1.0), np.arange(0.0, 360.0, 5.0)),
                                    (np.arange(10.0, 90.5, 1.0), np.arange(175.0, 186.0, 1.0))])
@pytest.mark.parametrize("h_deg", [0.0, 4.5, -3.0])
def test_level_horizon_grid_is_the_full_product_bit_for_bit(h_deg, planes):
    # a level horizon takes one azimuth column of the product for all: the same numbers
    # as the product over every azimuth (regression, bit for bit), and Liu & Jordan's
    # (1 + cos b) / 2 for h = 0 (Liu & Jordan 1963)
    tilt, azim = np.meshgrid(*planes, indexing="ij")
    level = sky_view_factor(tilt, azim, np.full(1440, h_deg))
    full = horizon._svf_product(planes[0], np.round(planes[1] / 0.25).astype(int),
                                np.radians(np.full(1440, h_deg)), 1440)
    assert level.tobytes() == np.clip(full, 0.0, 1.0).tobytes()
    if h_deg == 0.0:
        # midpoint rule on 1440 azimuths: within 1e-6 of the closed form
        np.testing.assert_allclose(level, (1 + np.cos(np.radians(tilt))) / 2, rtol=0, atol=1e-6)


@pytest.mark.parametrize("values", [np.arange(0.0, 91.0, 1.0), np.array([0.0, 10.0, 35.0, 62.5]),
                                    np.array([45.0])])
def test_threshold_counts_match_binary_search(values):
    from tiltyard.engine.horizon import _count_below

    x = np.concatenate([np.linspace(-5.0, 100.0, 211), values])
    # definition of the count of values below x (or at most x): numpy.searchsorted; exact
    # away from the values themselves, which may fall either way (they split at zero)
    off = ~np.isin(x, values)
    np.testing.assert_array_equal(_count_below(values, x)[off],
                                  np.searchsorted(values, x, side="left")[off])
    np.testing.assert_array_equal(_count_below(values, x, inclusive=True)[off],
                                  np.searchsorted(values, x, side="right")[off])
    inclusive = np.arange(x.size) % 2 == 0
    np.testing.assert_array_equal(
        _count_below(values, x, inclusive=inclusive)[off],
        np.where(inclusive, np.searchsorted(values, x, side="right"),
                 np.searchsorted(values, x, side="left"))[off])


def test_sky_view_factor_accepts_sample_values():
    n_az = 360
    az = (np.arange(n_az) + 0.5) * 360.0 / n_az
    h = 10.0 + 5.0 * np.cos(np.radians(az))
    from_values = float(sky_view_factor(30.0, 180.0, h, n_az=n_az))
    from_fn = float(sky_view_factor(30.0, 180.0, lambda a: 10.0 + 5.0 * np.cos(np.radians(a)),
                                    n_az=n_az))
    assert from_values == pytest.approx(from_fn, abs=1e-15)


# -- horizon band -----------------------------------------------------------------------

@settings(max_examples=60, deadline=None)
@given(tilt=tilts, azimuth=azimuths, elevations=horizons)
def test_horizon_band_fraction_within_0_and_1(tilt, azimuth, elevations):
    frac = float(horizon_band_fraction(tilt, azimuth, _profile_fn(elevations)))
    assert 0.0 <= frac <= 1.0


@pytest.mark.parametrize("h_deg", [0.0, -5.0])
def test_horizon_band_fully_visible_with_open_horizon(h_deg):
    tilt = np.array([0.0, 10.0, 45.0, 90.0])
    np.testing.assert_allclose(horizon_band_fraction(tilt, 180.0, h_deg), 1.0, atol=1e-12)


def test_horizon_band_hidden_share():
    # by the function's definition: a uniform horizon at half the band hides half of it,
    # one at the band's top hides all of it (common practice, no source)
    assert float(horizon_band_fraction(30.0, 180.0, HORIZON_BAND_DEG / 2)) == pytest.approx(0.5)
    assert float(horizon_band_fraction(30.0, 180.0, HORIZON_BAND_DEG)) == pytest.approx(0.0)
    # behind a vertical south wall the band to the north does not count
    north_only = float(horizon_band_fraction(
        90.0, 180.0, lambda a: np.where(np.cos(np.radians(a)) > 0, 30.0, 0.0)))
    assert north_only == pytest.approx(1.0, abs=1e-12)


def test_plane_shading_open_site():
    site = Site("open", 45, 0)
    shade = plane_shading(site, 35.0, 180.0)
    # Liu & Jordan (1963): (1 + cos 35 deg) / 2; tolerance 1e-6
    assert shade.sky_view_factor == pytest.approx(_open_svf(35.0), abs=1e-6)
    assert shade.sky_view_factor_open == pytest.approx(_open_svf(35.0), abs=1e-12)
    assert shade.isotropic_ratio == pytest.approx(1.0, abs=1e-5)
    assert shade.horizon_band_fraction == pytest.approx(1.0, abs=1e-12)


def test_plane_shading_demo_site_loses_sky():
    lark = load_demo("larkmoor-dairy")
    shade = plane_shading(lark, 22.0, 196.0)
    assert shade.sky_view_factor < shade.sky_view_factor_open
    assert 0.0 < shade.horizon_band_fraction < 1.0
