"""Benchmark: one whole tilt study in plane-years, and the grid against the pvlib loop.

The unit, a *plane-year*, is one call of pvlib ``irradiance.get_total_irradiance``
(Holmgren, Hansen & Mikofski 2018, JOSS 3(29), 884) for one plane on the arrays of
an hourly Perez year of the site (the sun-up intervals), timed in the same run. A
whole study is ``assess(demo_assessment(name)).study()`` from a fresh assessment:
the sky year, the tilt x azimuth grid, the schedule searches, the row layouts and
the monthly cross-check. The study is timed for every demo site with its own
settings and, for the headline figure, for larkmoor-dairy (hourly, Perez, flush
roof plane) and tarnvik-cabin (adjustable mounting: the two- and four-season and
monthly schedule searches). The grid figure repeats bench_manyplane.py's ratio:
the full 91 x 73 grid against a per-plane pvlib loop scaled from a subset.
Prints figures; never fails on time. Target: a study at most 200 plane-years, the
grid at least 150x the loop (for monthly totals, the map the study draws, and for
daily totals).

Run: python tests/benchmarks/bench_study.py [--quick]
(``PYTHONPATH=DIR`` with DIR holding a ``tiltyard`` package of another revision
measures that revision in the same conditions.)
"""

from __future__ import annotations

import statistics
import sys
import time

import numpy as np
import pvlib
from timing import median_time

from tiltyard.engine import horizon, rows
from tiltyard.engine.assess import assess
from tiltyard.engine.assessment import demo_assessment
from tiltyard.engine.demo_sites import demo_site_names, load_demo
from tiltyard.engine.manyplane import many_plane_daily, many_plane_terms
from tiltyard.engine.skyyear import IrradianceOptions, sky_year

try:
    from tiltyard.engine.manyplane import many_plane_monthly
except ImportError:      # a revision without monthly grid totals (run with PYTHONPATH)
    many_plane_monthly = None
try:
    from tiltyard.engine.solarpos import clear_time_terms_cache
except ImportError:      # a revision without the time-terms cache (run with PYTHONPATH)
    def clear_time_terms_cache():
        pass

N_LOOP_PLANES = 300

#: The studies and their unit are timed in this process's CPU time: waiting for a core
#: on a busy machine is not the study's cost (the figures are a ratio either way).
CLOCK = time.process_time


def _up_arrays(sky):
    up = sky.sun_up_fraction > 0
    return (sky.position["apparent_zenith"].to_numpy()[up], sky.position["azimuth"].to_numpy()[up],
            sky.dni[up], sky.ghi[up], sky.dhi[up], sky.dni_extra[up], sky.albedo[up],
            sky.kwh_weight[up])


def _pvlib_plane(arrays, tilt, azimuth):
    zen, saz, dni, ghi, dhi, dni_extra, albedo, k = arrays
    poa = pvlib.irradiance.get_total_irradiance(tilt, azimuth, zen, saz, dni, ghi, dhi,
                                                dni_extra=dni_extra, albedo=albedo,
                                                model="perez")
    return float(np.sum(np.asarray(poa["poa_global"]) * k))


def plane_years(fn, arrays, repeat: int):
    """``fn``'s time in plane-years: each run against the unit timed just before it (the
    median of 5 calls), both in CPU time (:data:`CLOCK`), so a shared machine whose load
    changes during the benchmark still gives comparable figures. Returns (median, min)
    plane-years and the median CPU seconds."""
    fn()
    ratios, seconds = [], []
    for _ in range(repeat):
        unit, _, _ = median_time(lambda: _pvlib_plane(arrays, 35.0, 180.0), repeat=5,
                                 clock=CLOCK)
        t0 = CLOCK()
        fn()
        seconds.append(CLOCK() - t0)
        ratios.append(seconds[-1] / unit)
    return statistics.median(ratios), min(ratios), statistics.median(seconds)


def _study(name, cold: bool = False):
    # each run as a new site: the per-site caches (row layouts, plane shading) start empty
    for module, cached in ((rows, "_design_window"), (rows, "_noon_sun"),
                           (rows, "_date_events"), (horizon, "_plane_shading"),
                           (horizon, "_svf_tilt_terms")):
        if hasattr(module, cached):
            getattr(module, cached).cache_clear()
    if cold:     # as the first site of a year and interval in a process
        clear_time_terms_cache()
    return assess(demo_assessment(name)).study()


def main(quick: bool = False):
    repeat = 3 if quick else 7
    site = load_demo("larkmoor-dairy")
    sky = sky_year(site, IrradianceOptions(model="perez", step_min=60))
    arrays = _up_arrays(sky)
    unit, lo, hi = median_time(lambda: _pvlib_plane(arrays, 35.0, 180.0), repeat=31,
                               clock=CLOCK)
    print(f"unit: one plane-year of pvlib get_total_irradiance (CPU time; Perez, hourly, "
          f"{arrays[0].size} sun-up intervals of larkmoor-dairy): median {unit * 1e3:.3f} ms "
          f"(min {lo * 1e3:.3f}, max {hi * 1e3:.3f})")

    print(f"whole study, assess(demo_assessment(name)).study(), median of {repeat}, each run "
          "against the unit timed just before it (CPU time); 'cold' computes the SPA time-only terms, "
          "'terms reused' takes them from the per-process cache (every later site of the same "
          "year, interval and time zone, as in a batch):")
    figures = {True: {}, False: {}}
    for name in demo_site_names():
        line = f"  {name:20s}"
        for cold in (True, False):
            py, lo, sec = plane_years(lambda name=name, cold=cold: _study(name, cold), arrays,
                                      repeat)
            figures[cold][name] = py
            line += (f"  {'cold' if cold else 'terms reused'} {sec * 1e3:6.1f} ms = "
                     f"{py:4.0f} plane-years (min {lo:.0f})")
        print(line)
    for cold in (True, False):
        f = figures[cold]
        print(f"  {'cold' if cold else 'terms reused'}: larkmoor-dairy {f['larkmoor-dairy']:.0f} "
              f"plane-years, tarnvik-cabin (adjustable) {f['tarnvik-cabin']:.0f}, largest "
              f"{max(f.values()):.0f}, median of the sites {np.median(list(f.values())):.0f} "
              "(target at most 200)")

    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 1.0), np.arange(0.0, 361.0, 5.0),
                             indexing="ij")
    tilt, azim = tilt.ravel(), azim.ravel()
    grid, lo, hi = median_time(lambda: many_plane_daily(many_plane_terms(sky), tilt, azim,
                                                        site=site), repeat=repeat, clock=CLOCK)
    mod = np.asarray(sky.month)[np.searchsorted(sky.day_index, np.arange(sky.n_days))]
    grid_m, lo_m = grid, lo
    if many_plane_monthly is not None:
        grid_m, lo_m, _ = median_time(lambda: many_plane_monthly(
            many_plane_terms(sky), tilt, azim, mod, site=site), repeat=repeat, clock=CLOCK)
    pick = np.random.default_rng(0).choice(tilt.size, size=N_LOOP_PLANES, replace=False)
    loop, _, _ = median_time(lambda: [_pvlib_plane(arrays, t, a)
                                      for t, a in zip(tilt[pick], azim[pick], strict=True)],
                             repeat=3, clock=CLOCK)
    loop_full = loop * tilt.size / N_LOOP_PLANES
    print(f"grid (CPU time): {tilt.size} planes with the site horizon; pvlib loop (annual totals) scaled "
          f"from {N_LOOP_PLANES} planes {loop_full:.2f} s; terms + monthly totals (the study's "
          f"map) median {grid_m * 1e3:.1f} ms (min {lo_m * 1e3:.1f}), ratio "
          f"{loop_full / grid_m:.0f}x; terms + daily totals median {grid * 1e3:.1f} ms (min "
          f"{lo * 1e3:.1f}), ratio {loop_full / grid:.0f}x (target at least 150x)")


if __name__ == "__main__":
    main(quick="--quick" in sys.argv)
