"""Benchmark: the obstacle-to-horizon step for many obstacles.

10,000 random obstacles (the site file's limit) against one sun azimuth per hour of a
year, through ``horizon.obstacle_elevation_deg``. Prints the median time; never fails
on time. Target (issue: no input costs unbounded time): under 1 s for 10,000
obstacles. The result's correctness is checked in tests/faults/test_repros.py.

Run: python tests/benchmarks/bench_obstacles.py
"""

from __future__ import annotations

import numpy as np
from timing import median_time

from tiltyard.engine.horizon import obstacle_elevation_deg
from tiltyard.engine.site import Obstacle


def main() -> None:
    rng = np.random.default_rng(13)
    azimuth = rng.uniform(0, 360, 8760)
    for n in (1_000, 10_000):
        obstacles = [Obstacle("o", float(b), float(w), float(d), float(h))
                     for b, w, d, h in zip(rng.uniform(0, 360, n), rng.uniform(0.1, 30, n),
                                           rng.uniform(1, 200, n), rng.uniform(0, 30, n),
                                           strict=True)]
        med, lo, hi = median_time(lambda obs=obstacles: obstacle_elevation_deg(obs, azimuth),
                                  repeat=5)
        print(f"{n:>6,} obstacles x 8,760 azimuths: median {med:.3f} s "
              f"(min {lo:.3f}, max {hi:.3f}); target < 1 s at 10,000")


if __name__ == "__main__":
    main()
