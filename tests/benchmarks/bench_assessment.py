"""Benchmark: one assessment at hourly and 1-minute intervals, part by part.

The sky year is built once per assessment; the study, the option comparison (the
Irradiance view's yearly totals) and the sheet's data reuse it. For contrast, the
option comparison is also timed the old way, building its own sky again. Prints
measured figures; never fails on time.

Run: python tests/benchmarks/bench_assessment.py
"""

from __future__ import annotations

import time
from dataclasses import replace

from tiltyard.engine.assess import assess
from tiltyard.engine.assessment import StudySettings, demo_assessment
from tiltyard.engine.daycurves import compare_options


def _timed(fn):
    t0 = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t0


def main():
    base = replace(demo_assessment("larkmoor-dairy"), study=StudySettings(tilt_step_deg=5.0))
    print(f"site {base.site.name!r}, {base.sky} basis, tilt step 5 deg")
    for interval in (60, 1):
        a = replace(base, interval_min=interval)
        result, t_sky = _timed(lambda a=a: assess(a))
        study, t_study = _timed(result.study)
        _totals, t_totals = _timed(result.option_totals)
        _old, t_old = _timed(lambda a=a, r=result, st=study: compare_options(
            a.site, r.irradiance_options, st))
        _sheet, t_sheet = _timed(result.sheet_data)
        print(f"  {interval:2d}-min intervals ({len(result.sky.grid)} of them)")
        print(f"    sky year, built once             {t_sky:7.2f} s")
        print(f"    tilt study on it                 {t_study:7.2f} s")
        print(f"    option comparison, same sky      {t_totals:7.2f} s")
        print(f"    option comparison, its own sky   {t_old:7.2f} s  (the path before)")
        print(f"    sheet data, same sky and study   {t_sheet:7.2f} s")


if __name__ == "__main__":
    main()
