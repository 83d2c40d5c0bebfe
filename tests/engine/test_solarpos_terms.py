"""SPA split into time-only terms and one site's steps, with the per-process cache.

Checked against pvlib.solarposition.spa_python (Holmgren, Hansen & Mikofski 2018,
JOSS 3(29), 884; the NREL SPA of Reda & Andreas 2008, NREL/TP-560-34302): the split
runs the same steps in the same order, so the positions are the same numbers.
"""

import numpy as np
import pandas as pd
import pvlib
import pytest

from tiltyard.engine import solarpos
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.solarpos import (
    clear_time_terms_cache,
    site_positions,
    site_pressure_pa,
    solar_position,
    time_terms,
)
from tiltyard.engine.sun import evaluation_points
from tiltyard.engine.timegrid import year_grid

COLUMNS = ["apparent_zenith", "zenith", "apparent_elevation", "elevation", "azimuth",
           "equation_of_time"]


def _pvlib(times, site, delta_t):
    return pvlib.solarposition.spa_python(
        times, site.latitude_deg, site.longitude_deg, altitude=site.elevation_m,
        pressure=site_pressure_pa(site.elevation_m), temperature=12.0, delta_t=delta_t)


@pytest.mark.parametrize("name", ["larkmoor-dairy", "tarnvik-cabin", "coral-lane-clinic"])
def test_positions_equal_pvlib_spa_python(name):
    site = load_demo(name)
    times = pd.date_range("2023-01-01", periods=24 * 40, freq="9h", tz="UTC") \
        + pd.to_timedelta(np.arange(960) * 1.37, unit="s")
    clear_time_terms_cache()
    for delta_t in (69.2, np.linspace(69.0, 69.4, times.size)):
        ours = solar_position(times, site, delta_t=delta_t)
        ref = _pvlib(times, site, delta_t)
        # the same SPA steps on the same inputs give the same numbers, bit for bit
        np.testing.assert_array_equal(ours[COLUMNS].to_numpy(), ref[COLUMNS].to_numpy())
        assert ours.index.equals(ref.index)


def test_terms_are_shared_between_sites():
    clear_time_terms_cache()
    times = pd.date_range("2023-03-01", periods=500, freq="h", tz="UTC")
    unix = solarpos._spa_unixtime(times)
    a = time_terms(unix, 69.0)
    assert time_terms(unix, 69.0) is a                       # the same set, from the cache
    assert time_terms(unix, 68.0) is not a                   # another delta T
    for name in ("larkmoor-dairy", "gorkha-terrace"):
        site = load_demo(name)
        ref = _pvlib(times, site, 69.0)
        np.testing.assert_array_equal(site_positions(a, site)[4], ref["azimuth"].to_numpy())


def test_partly_new_instants_take_the_kept_terms_and_compute_the_rest():
    clear_time_terms_cache()
    times = pd.date_range("2023-06-01", periods=400, freq="h", tz="UTC")
    unix = solarpos._spa_unixtime(times)
    time_terms(unix, 69.0)
    for moved in ([7], [3, 250, 399]):            # one instant alone, and several
        shifted = unix.copy()
        shifted[moved] += 1234.5
        got = time_terms(shifted, 69.0)
        fresh = solarpos.TimeTerms(shifted, np.full(shifted.size, 69.0),
                                   *solarpos._compute_time_terms(shifted,
                                                                 np.full(shifted.size, 69.0)))
        for f in solarpos._TERM_FIELDS:
            np.testing.assert_array_equal(getattr(got, f), getattr(fresh, f))
        # the partly new set takes the place of the one it came from
        assert len(solarpos._cache) == 1


def test_cache_is_bounded():
    clear_time_terms_cache()
    n_min = solarpos.TIME_TERMS_CACHE_MIN
    for k in range(solarpos.TIME_TERMS_CACHE_SIZE + 3):
        time_terms(np.arange(float(n_min)) + 1e6 * k, 69.0)
    assert len(solarpos._cache) == solarpos.TIME_TERMS_CACHE_SIZE
    big = np.arange(solarpos.TIME_TERMS_CACHE_MAX + 1, dtype=float)
    time_terms(big[:n_min], 69.0)
    n = len(solarpos._cache)
    time_terms(big, 69.0)                                     # too large to keep
    assert len(solarpos._cache) == n
    kept = list(solarpos._cache)
    for k in range(20):                                       # small sets: never kept
        small = time_terms(np.arange(3.0) + 7e5 * k, 69.0)
    assert list(solarpos._cache) == kept
    fresh = solarpos._compute_time_terms(np.arange(3.0) + 7e5 * 19, np.full(3, 69.0))
    np.testing.assert_array_equal(small.declination_deg, fresh[2])


def test_evaluation_points_same_with_cold_and_warm_terms():
    site = load_demo("tarnvik-cabin")
    grid = year_grid(site.timezone, 2023, 30)
    clear_time_terms_cache()
    cold = evaluation_points(grid, site)
    warm_other = evaluation_points(grid, load_demo("gorkha-terrace").with_changes(
        timezone=site.timezone))
    warm = evaluation_points(grid, site)
    assert warm_other.times_utc.size == cold.times_utc.size
    assert warm.times_utc.equals(cold.times_utc)
    np.testing.assert_array_equal(warm.sun_up_fraction, cold.sun_up_fraction)
    pd.testing.assert_frame_equal(warm.position, cold.position, check_exact=True)


@pytest.mark.parametrize("n", [1, 2, 7, solarpos.SMALL_SET - 1])
def test_few_instants_equal_pvlib_spa_python(n):
    # fewer than SMALL_SET instants take the row-wise sums of the periodic series;
    # still the same numbers as pvlib's row-by-row loop
    site = load_demo("high-pass-hut")
    rng = np.random.default_rng(n)
    times = pd.DatetimeIndex(pd.Timestamp("2023-01-01", tz="UTC")
                             + pd.to_timedelta(np.sort(rng.uniform(0, 3.15e7, n)), unit="s"))
    clear_time_terms_cache()
    ours = solar_position(times, site, delta_t=69.1)
    np.testing.assert_array_equal(ours[COLUMNS].to_numpy(),
                                  _pvlib(times, site, 69.1)[COLUMNS].to_numpy())


def test_earth_sun_distance_equals_pvlib_cold_and_kept():
    # pvlib.solarposition.nrel_earthsun_distance with the same delta T, bit for bit:
    # computed afresh, taken whole from the per-process store, and partly new
    site = load_demo("larkmoor-dairy")
    grid = year_grid(site.timezone, 2023, 60)
    times = evaluation_points(grid, site).times_utc
    clear_time_terms_cache()

    def ref(t):
        return np.asarray(pvlib.solarposition.nrel_earthsun_distance(
            t, delta_t=solarpos.delta_t_s(t)), dtype=float)

    cold = solarpos.earth_sun_distance_au(times)
    np.testing.assert_array_equal(cold, ref(times))
    np.testing.assert_array_equal(solarpos.earth_sun_distance_au(times), cold)
    assert len(solarpos._radius_cache) == 1
    moved = times.delete([5, 4000]).insert(5, times[5] + pd.Timedelta(seconds=77)) \
        .insert(4000, times[4000] - pd.Timedelta(seconds=3))
    np.testing.assert_array_equal(solarpos.earth_sun_distance_au(moved), ref(moved))
    clear_time_terms_cache()
    assert len(solarpos._radius_cache) == 0
