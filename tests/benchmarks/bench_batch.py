"""Benchmark: the batch on the invented demo portfolio. Prints measured figures; never fails
on time.

- one whole study of each demo site in plane-years (bench_study.py's unit and measure: one
  pvlib get_total_irradiance call on an hourly year, timed in the same run), cold and with
  the SPA time terms reused as a batch has them (target at most 200);
- sites per second on a local process pool of 1 and 2 workers and on a 2-worker Dask
  LocalCluster (worker processes), and the time that gives for 10,000 sites;
- the start-up overhead of the LocalCluster (start, connect, first task back);
- the peak resident memory of each worker after 100 and after 1,000 sites (flat memory:
  the two should be about the same).

Each figure is one section: a function of the shared ``Bench`` that returns its lines.
``SECTIONS`` is the list ``main`` runs, in order; a figure measured elsewhere joins it with
``SECTIONS.append(fn)`` (or by adding its function to the list below).

Run: python tests/benchmarks/bench_batch.py [--quick]
"""

from __future__ import annotations

import importlib.util
import shutil
import sys
import tempfile
import time
from pathlib import Path

from tiltyard.engine.batch.inputs import BatchRow
from tiltyard.engine.batch.run import plan_jobs, run_batch

DEMO = Path(__file__).resolve().parents[2] / "sample_sites" / "portfolio"
TARGET_SITES = 10_000


def _generator():
    spec = importlib.util.spec_from_file_location("make_portfolio", DEMO / "make_portfolio.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


class Bench:
    """The portfolio (the demo generator's good rows, as many as asked) and a scratch folder."""

    def __init__(self, quick: bool):
        from tiltyard.engine.batch.inputs import read_csv

        self.quick = quick
        self.rate_sites = 24 if quick else 80
        self.rss_counts = (20, 100) if quick else (100, 1000)
        self.folder = Path(tempfile.mkdtemp(prefix="tiltyard-bench-batch-"))
        gen = _generator()
        n = max(self.rss_counts) + 50
        rows = [r for i, r in enumerate(gen.sites(n=n)) if i not in gen.BAD]
        gen.write_csv(rows, self.folder / "portfolio.csv")
        port = read_csv(self.folder / "portfolio.csv")
        assert not port.errors, port.errors[:3]
        self.max_planes = port.max_planes
        self.rows: list[BatchRow] = list(port.rows)
        self.jobs, errors = plan_jobs(self.rows)
        assert not errors, errors[:3]
        self.rates: dict = {}

    def run(self, n: int, name: str, **kw):
        out = self.folder / f"{name}.csv"
        return run_batch(self.jobs[:n], [], out, self.max_planes, **kw)

    def close(self):
        shutil.rmtree(self.folder, ignore_errors=True)


def _rate_line(label: str, summary) -> str:
    return (f"  {label:34} {summary.ran:5d} sites in {summary.seconds:6.1f} s: "
            f"{summary.sites_per_second:6.2f} sites/s")


def study_cost(b: Bench) -> list[str]:
    from bench_study import CLOCK, _pvlib_plane, _study, _up_arrays, plane_years
    from timing import median_time

    from tiltyard.engine.demo_sites import demo_site_names, load_demo
    from tiltyard.engine.skyyear import IrradianceOptions, sky_year

    arrays = _up_arrays(sky_year(load_demo("larkmoor-dairy"),
                                 IrradianceOptions(model="perez", step_min=60)))
    unit, _, _ = median_time(lambda: _pvlib_plane(arrays, 35.0, 180.0), repeat=31,
                             clock=CLOCK)
    repeat = 3 if b.quick else 5
    lines = [f"one whole study in plane-years (unit {unit * 1e3:.3f} ms CPU; median of "
             f"{repeat}, each run against the unit timed just before it; target at most 200):"]
    worst = {True: 0.0, False: 0.0}
    for name in demo_site_names():
        cost = {}
        for cold in (True, False):
            cost[cold], _, _ = plane_years(lambda name=name, cold=cold: _study(name, cold),
                                           arrays, repeat)
            worst[cold] = max(worst[cold], cost[cold])
        lines.append(f"  {name:20} cold {cost[True]:4.0f}   time terms reused {cost[False]:4.0f}")
    lines.append(f"  largest: cold {worst[True]:.0f}, time terms reused {worst[False]:.0f}")
    return lines


def local_pool(b: Bench) -> list[str]:
    lines = ["local process pool (spawned workers; start-up included):"]
    for workers in (1, 2):
        s = b.run(b.rate_sites, f"pool{workers}", workers=workers)
        b.rates[f"{workers} local worker" + ("s" if workers > 1 else "")] = s.sites_per_second
        lines.append(_rate_line(f"{workers} worker(s)", s))
    return lines


def local_cluster(b: Bench) -> list[str]:
    try:
        from distributed import Client, LocalCluster
    except ImportError:
        return ["Dask LocalCluster: distributed is not installed (pip install tiltyard[batch])"]
    t0 = time.perf_counter()
    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                           dashboard_address=None)
    client = Client(cluster)
    client.submit(sum, [1, 2], pure=False).result()
    startup = time.perf_counter() - t0
    try:
        s = b.run(b.rate_sites, "cluster", client=client)
    finally:
        client.close()
        cluster.close()
    b.rates["2-worker LocalCluster"] = s.sites_per_second
    return ["Dask LocalCluster, 2 worker processes, 1 thread each:",
            f"  start-up (cluster, client, first task back): {startup:.1f} s",
            _rate_line("2 workers", s)]


def extrapolated(b: Bench) -> list[str]:
    lines = [f"extrapolated time for {TARGET_SITES:,} sites (at the measured rate):"]
    for label, rate in b.rates.items():
        if rate > 0:
            lines.append(f"  {label:34} {TARGET_SITES / rate / 60:7.1f} min")
    return lines


def memory(b: Bench) -> list[str]:
    lines = ["peak resident memory per worker (2 local workers), MiB:"]
    for n in b.rss_counts:
        s = b.run(n, f"rss{n}", workers=2)
        peaks = ", ".join(f"{v:.0f}" for v in sorted(s.peak_rss_mib_by_worker.values()))
        lines.append(f"  after {n:5d} sites: {peaks}   ({s.sites_per_second:.2f} sites/s)")
    return lines


#: The figures printed, in order.
SECTIONS = [study_cost, local_pool, local_cluster, extrapolated, memory]


def main(argv=None):
    argv = sys.argv[1:] if argv is None else argv
    b = Bench(quick="--quick" in argv)
    try:
        print(f"demo portfolio: {len(b.jobs)} sites available; rates on {b.rate_sites} sites")
        for section in SECTIONS:
            for line in section(b):
                print(line, flush=True)
    finally:
        b.close()


if __name__ == "__main__":
    main()
