"""Benchmark: the full tilt/azimuth grid (91 x 73 planes) for one hourly year.

Site larkmoor-dairy with its horizon and obstacles, Perez sky, hourly
reference year. Times (a) the many-plane engine (time-only terms plus the
grid pass, and the grid pass alone with the terms precomputed), for daily
totals (``many_plane_daily``) and for monthly totals (``many_plane_monthly``,
what the tilt study's map takes), and (b) a loop
calling pvlib.irradiance.get_total_irradiance once per plane on the same sky
(at its nodes, where the engine transposes; Holmgren, Hansen & Mikofski 2018,
JOSS 3(29), 884), timed on a subset of
planes and scaled linearly to the full grid. Prints figures; never fails on
time. Targets: (a) at most 0.3 s median and at least 150x faster than (b) (the
loop gives annual totals only, so either grid gives more than it).

Run: python tests/benchmarks/bench_manyplane.py
"""

from __future__ import annotations

import resource
import tracemalloc

import numpy as np
import pvlib
from timing import median_time

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.manyplane import many_plane_daily, many_plane_monthly, many_plane_terms
from tiltyard.engine.skyyear import IrradianceOptions, sky_year

REPEAT = 7
N_LOOP_PLANES = 300


def _pvlib_loop(sky, tilts, azimuths):
    nd = getattr(sky, "nodes", None)
    if nd is None:   # a revision without nodes (run with PYTHONPATH): the sun-up intervals
        up = sky.sun_up_fraction > 0
        zen = sky.position["apparent_zenith"].to_numpy()[up]
        saz = sky.position["azimuth"].to_numpy()[up]
        dni, ghi, dhi = sky.dni[up], sky.ghi[up], sky.dhi[up]
        dni_extra, albedo, k = sky.dni_extra[up], sky.albedo[up], sky.kwh_weight[up]
    else:            # the sky's nodes, where the engine transposes
        zen, saz, dni, ghi, dhi = nd.apparent_zenith, nd.azimuth, nd.dni, nd.ghi, nd.dhi
        dni_extra, albedo, k = nd.dni_extra, nd.albedo, nd.weight * sky.grid.step_h / 1000.0
    out = np.empty(len(tilts))
    for i, (t, a) in enumerate(zip(tilts, azimuths, strict=True)):
        poa = pvlib.irradiance.get_total_irradiance(t, a, zen, saz, dni, ghi, dhi,
                                                    dni_extra=dni_extra, albedo=albedo,
                                                    model="perez")
        out[i] = float(np.sum(np.asarray(poa["poa_global"]) * k))
    return out


def main():
    site = load_demo("larkmoor-dairy")
    sky = sky_year(site, IrradianceOptions(model="perez", step_min=60))
    # 73 azimuths 0..360 by 5 (360 repeats 0, as the 91 x 73 = 6643 grid counts it)
    tilt, azim = np.meshgrid(np.arange(0.0, 91.0, 1.0), np.arange(0.0, 361.0, 5.0),
                             indexing="ij")
    tilt, azim = tilt.ravel(), azim.ravel()
    n_planes = tilt.size
    terms = many_plane_terms(sky)
    print(f"site {site.name!r}, hourly year ({len(sky.sun_up_fraction)} intervals, "
          f"{len(terms.rows)} nodes with the sun up), Perez, {n_planes} planes (91 tilts x 73 "
          f"azimuths), site horizon on, {REPEAT} runs each")

    med_terms, lo, hi = median_time(lambda: many_plane_terms(sky))
    print(f"  many_plane_terms alone                       median {med_terms * 1000:7.1f} ms"
          f"  (min {lo * 1000:.1f}, max {hi * 1000:.1f})")
    med_grid, lo, hi = median_time(lambda: many_plane_daily(terms, tilt, azim, site=site))
    print(f"  many_plane_daily, terms precomputed          median {med_grid * 1000:7.1f} ms"
          f"  (min {lo * 1000:.1f}, max {hi * 1000:.1f})")
    med_a, lo, hi = median_time(
        lambda: many_plane_daily(many_plane_terms(sky), tilt, azim, site=site))
    print(f"  (a) terms + many_plane_daily                 median {med_a * 1000:7.1f} ms"
          f"  (min {lo * 1000:.1f}, max {hi * 1000:.1f})")

    mod = np.asarray(sky.month)[np.searchsorted(sky.day_index, np.arange(sky.n_days))]
    med_m, lo, hi = median_time(
        lambda: many_plane_monthly(many_plane_terms(sky), tilt, azim, mod, site=site))
    print(f"  (a') terms + many_plane_monthly              median {med_m * 1000:7.1f} ms"
          f"  (min {lo * 1000:.1f}, max {hi * 1000:.1f})")

    rng = np.random.default_rng(0)
    pick = rng.choice(n_planes, size=N_LOOP_PLANES, replace=False)
    med_loop, lo, hi = median_time(lambda: _pvlib_loop(sky, tilt[pick], azim[pick]))
    med_b = med_loop * n_planes / N_LOOP_PLANES
    print(f"  (b) pvlib get_total_irradiance loop, {N_LOOP_PLANES} planes  median "
          f"{med_loop * 1000:7.1f} ms  (min {lo * 1000:.1f}, max {hi * 1000:.1f})")
    print(f"      scaled linearly to {n_planes} planes: {med_b:.2f} s (estimate, not measured)")
    print(f"  ratio (b)/(a): {med_b / med_a:.0f}x daily totals "
          f"(with terms precomputed: {med_b / med_grid:.0f}x); (b)/(a'): {med_b / med_m:.0f}x "
          "monthly totals, the study's map")

    # the loop is open-horizon pvlib; check the engine's open totals agree on the subset
    res = many_plane_daily(terms, tilt[pick], azim[pick], site=site, with_open=True)
    ref = _pvlib_loop(sky, tilt[pick], azim[pick])
    dev = np.max(np.abs(res.daily_open_kwh_m2.sum(axis=0) / ref - 1.0))
    print(f"  max relative difference, engine open horizon vs pvlib loop: {dev:.1e}")

    tracemalloc.start()
    many_plane_daily(terms, tilt, azim, site=site)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(f"  peak traced memory of the grid call: {peak / 2**20:.1f} MiB; process peak RSS "
          f"so far: {rss / 1024:.0f} MiB")
    print("  target: (a) at most 300 ms median and at least 150x faster than (b)")


if __name__ == "__main__":
    main()
