"""Benchmark: one hourly year for one site (positions, clear sky, one Perez plane).

Prints measured figures; never fails on time. Target (issue 2): median under
0.3 s on the 2-core reference machine.

Run: python tests/benchmarks/bench_year.py
"""

from __future__ import annotations

from timing import median_time

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.jobs import IrradianceOptions, irradiance_year
from tiltyard.engine.sky import clear_sky
from tiltyard.engine.sun import evaluation_points
from tiltyard.engine.timegrid import year_grid


def main():
    site = load_demo("larkmoor-dairy")
    grid = year_grid(site.timezone, 2023, 60)
    ep = evaluation_points(grid, site)
    parts = {
        "evaluation points (SPA, sunrise/sunset refinement)":
            lambda: evaluation_points(grid, site),
        "clear sky (Ineichen-Perez, turbidity lookup)":
            lambda: clear_sky(ep.times_utc, ep.position, site),
        "whole year, one plane, Perez, with horizon":
            lambda: irradiance_year(site, 35.0, 180.0, IrradianceOptions(model="perez")),
    }
    print(f"site {site.name!r}, hourly year ({len(grid)} intervals)")
    for label, fn in parts.items():
        med, lo, hi = median_time(fn)
        print(f"  {label:55s} median {med * 1000:7.1f} ms  (min {lo * 1000:.1f}, "
              f"max {hi * 1000:.1f})")
    print("  target: whole year under 300 ms median")


if __name__ == "__main__":
    main()
