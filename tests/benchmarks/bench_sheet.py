"""Benchmark: one feasibility sheet end to end (tilt study + figures + sun path + PDF).

The study at the command line's defaults (tilts 0-90 deg by 1 deg, free azimuth,
clear sky, hourly year), the sheet's figures, the sun-path chart, the layout of both
pages and the PDF bytes, in one process with Qt already started. Also the stages on
their own, and ``tiltyard sheet`` as a fresh process for reference. Prints measured
figures; never fails on time. Target: end to end under 3 s.

Run: QT_QPA_PLATFORM=offscreen python tests/benchmarks/bench_sheet.py
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from timing import median_time  # noqa: E402

SITES = ("larkmoor-dairy", "kelpie-creek-shed", "tarnvik-cabin")


def main():
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication([])  # noqa: F841 - fonts need it

    from tiltyard.app.sheet import SheetMeta, build_sheet, compute_sheet, pdf_bytes
    from tiltyard.engine.demo_sites import load_demo
    from tiltyard.engine.exports import sheet_figures
    from tiltyard.engine.skyyear import sky_year
    from tiltyard.engine.sunchart import sun_chart
    from tiltyard.engine.tilt import StudyOptions, tilt_study

    meta = SheetMeta("Benchmark", "Tiltyard")
    print("one sheet end to end (study at default options + figures + sun path + layout + "
          "PDF), in process:")
    worst = 0.0
    for name in SITES:
        site = load_demo(name)

        def end_to_end(site=site):
            return pdf_bytes(compute_sheet(site, StudyOptions(), meta, "a4").document)

        med, lo, hi = median_time(end_to_end, repeat=3)
        worst = max(worst, med)
        print(f"  {name:20s} median {med:6.2f} s  (min {lo:.2f}, max {hi:.2f})")
    site = load_demo(SITES[0])
    study = tilt_study(site, StudyOptions())
    sky = sky_year(site, study.options_used.irradiance)
    figures = sheet_figures(study, sky)
    sun = sun_chart(site, "2023-06-21", step_min=10)
    doc = build_sheet(figures, sun, meta, "a4")
    stages = {
        "tilt study (0-90 by 1 deg, free azimuth)": lambda: tilt_study(site, StudyOptions()),
        "sky year for the figures": lambda: sky_year(site, study.options_used.irradiance),
        "sheet figures (horizon loss, tables, hash)": lambda: sheet_figures(study, sky),
        "sun-path chart data (10-min paths)": lambda: sun_chart(site, "2023-06-21",
                                                                step_min=10),
        "layout of both pages": lambda: build_sheet(figures, sun, meta, "a4"),
        "PDF bytes": lambda: pdf_bytes(doc),
    }
    print(f"stages, {site.name!r}:")
    for label, fn in stages.items():
        med, lo, hi = median_time(fn, repeat=3)
        print(f"  {label:45s} median {med * 1000:7.1f} ms  (min {lo * 1000:.1f}, "
              f"max {hi * 1000:.1f})")
    with tempfile.TemporaryDirectory() as folder:
        env = dict(os.environ, HOME=folder, XDG_CONFIG_HOME=folder)
        env.pop("DISPLAY", None)
        env.pop("WAYLAND_DISPLAY", None)
        env.pop("QT_QPA_PLATFORM", None)
        t0 = time.perf_counter()
        proc = subprocess.run([sys.executable, "-m", "tiltyard", "sheet", SITES[0], "-o",
                               os.path.join(folder, "sheet.pdf")], capture_output=True,
                              text=True, env=env, timeout=300)
        wall = time.perf_counter() - t0
        status = "ok" if proc.returncode == 0 else f"exit {proc.returncode}: {proc.stderr}"
    print(f"'tiltyard sheet {SITES[0]} -o sheet.pdf' as a fresh process, no display: "
          f"{wall:.2f} s ({status}; includes Python, Qt and library start-up)")
    print(f"target: end to end under 3 s in process; measured worst median {worst:.2f} s "
          f"({'met' if worst < 3.0 else 'NOT met'})")


if __name__ == "__main__":
    main()
