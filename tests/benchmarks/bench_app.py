"""Benchmark: desktop app start-up against a bare PySide6 window, and the longest
GUI-thread stall while the window is driven, with and without another busy core.

(1) Start-up: in fresh processes, alternately, a bare PySide6 window (QApplication,
a 1280x820 QMainWindow shown, ready at the first event-loop turn) and
``python -m tiltyard larkmoor-dairy`` (ready when the window is shown and the
event loop has turned once, ``TILTYARD_SMOKE_QUIT_MS=0``), each timed from spawn
until it reports ready, both from compiled bytecode (the first, untimed run of
each writes it); the ratio of the two medians is the start-up figure (target at
most 3). (2) Stall: in a child process, a 5 ms heartbeat timer on the
GUI thread records every tick while a script drives the window as a user would
(every view opened, the site edited in bursts as when typing, demo sites opened,
the study objective changed); the longest gap between ticks is the longest time
the event loop was blocked (target at most 50 ms). Both are run unloaded and
loaded: a second process spinning one core for the whole of the run.
Prints figures; never fails on time.

Run: QT_QPA_PLATFORM=offscreen python tests/benchmarks/bench_app.py
"""

from __future__ import annotations

import contextlib
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

STARTUP_RUNS = 7
HEARTBEAT_MS = 5

BARE_WINDOW = """
from PySide6.QtCore import QTimer
from PySide6.QtWidgets import QApplication, QMainWindow
app = QApplication([])
w = QMainWindow()
w.setWindowTitle("bare")
w.resize(1280, 820)
w.show()
def ready():
    print("bare: window ready", flush=True)
    w.close()
    app.quit()
QTimer.singleShot(0, ready)
app.exec()
"""


def _time_to_ready(args, env, word) -> float:
    t0 = time.perf_counter()
    proc = subprocess.Popen(args, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL,
                            text=True, env=env)
    line = proc.stdout.readline()
    t1 = time.perf_counter()
    proc.wait(timeout=60)
    if word not in line:
        raise RuntimeError(f"{args[-1]!r} did not report ready: {line!r}")
    return t1 - t0


def startup_times() -> tuple[list[float], list[float]]:
    """(bare PySide6 window times, Tiltyard window-ready times), seconds, run alternately."""
    bare, ours = [], []
    with tempfile.TemporaryDirectory() as home:
        env = dict(os.environ, TILTYARD_SMOKE_QUIT_MS="0", HOME=home, XDG_CONFIG_HOME=home,
                   XDG_DATA_HOME=home)
        # as an installed app runs: from compiled bytecode (pip compiles on install; with
        # PYTHONDONTWRITEBYTECODE set, an editable checkout compiles every module each start)
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        _time_to_ready([sys.executable, "-c", BARE_WINDOW], env, "window ready")   # warm the
        _time_to_ready([sys.executable, "-m", "tiltyard", "larkmoor-dairy"], env,   # file cache
                       "window ready")
        for _ in range(STARTUP_RUNS):
            bare.append(_time_to_ready([sys.executable, "-c", BARE_WINDOW], env, "window ready"))
            ours.append(_time_to_ready([sys.executable, "-m", "tiltyard", "larkmoor-dairy"],
                                       env, "window ready"))
    return bare, ours


@contextlib.contextmanager
def busy_core(on: bool):
    """Another process spinning one core while the block runs (when ``on``)."""
    if not on:
        yield
        return
    spinner = subprocess.Popen([sys.executable, "-c", "while True: pass"])
    try:
        time.sleep(0.2)
        yield
    finally:
        spinner.kill()
        spinner.wait()


def stall_run():
    from PySide6.QtCore import QElapsedTimer, QTimer
    from PySide6.QtWidgets import QApplication

    from tiltyard.app import theme
    from tiltyard.app.desktop import configure_interpreter, create_window

    configure_interpreter()          # as tiltyard.app.desktop.run does
    app = QApplication.instance() or QApplication([])
    theme.apply(app)
    clock = QElapsedTimer()
    clock.start()
    ticks = []
    beat = QTimer()
    beat.setInterval(HEARTBEAT_MS)
    beat.timeout.connect(lambda: ticks.append(clock.elapsed()))
    t0 = time.perf_counter()
    w = create_window("larkmoor-dairy")
    w.ask_unsaved = lambda: "discard"
    w.resize(1280, 820)
    w.show()
    app.processEvents()
    in_process_s = time.perf_counter() - t0
    # as tiltyard.app.desktop.run does: start the engine's worker processes, load the
    # engine and views in the background, then make the charts and build the views
    # ahead; the heartbeat runs through this start-up phase too
    from tiltyard.app import engine_process, plots
    from tiltyard.app.desktop import prepare_ahead
    beat.start()
    engine_process.start_pool()
    t_warm = time.perf_counter()
    prepare_ahead(w)
    while not all(w.views.is_built(t) for t in w.views):
        app.processEvents()
        time.sleep(0.001)
    warm_s = time.perf_counter() - t_warm
    n_startup = len(ticks)

    def pump(seconds):
        end = time.perf_counter() + seconds
        while time.perf_counter() < end:
            app.processEvents()
            time.sleep(0.001)

    def settle(limit=60.0):
        end = time.perf_counter() + limit
        pump(0.2)
        while w.runner.is_busy() and time.perf_counter() < end:
            pump(0.02)
        pump(0.1)

    steps = []
    for title in list(w.views):
        w.show_view(title)
        settle()
        steps.append((f"opened {title}", len(ticks)))
    w.show_view("Sun path" if "Sun path" in w.views else "Site")
    for lat in (53.0, 52.5, 52.0, 51.5, 51.0):       # a burst of edits, as when typing
        w.document.propose(latitude_deg=lat)
        pump(0.05)
    settle()
    steps.append(("latitude edited 5 times in 250 ms", len(ticks)))
    for demo in ("kelpie-creek-shed", "coral-lane-clinic", "tarnvik-cabin"):
        w.open_demo(demo)
        for title in list(w.views):
            w.show_view(title)
            pump(0.05)
        settle()
        steps.append((f"opened demo {demo}, every view", len(ticks)))
    study = w.views.get("Tilt study")
    if study is not None and hasattr(study, "objective"):
        w.show_view("Tilt study")
        study.objective.setCurrentIndex(1)
        settle()
        steps.append(("study objective changed", len(ticks)))
    beat.stop()
    gaps = [b - a for a, b in zip(ticks, ticks[1:], strict=False)]
    startup_gaps, gaps = gaps[:n_startup - 1], gaps[n_startup - 1:]
    # each step with the longest stall in it
    bounds = [n_startup - 1] + [end - 1 for _label, end in steps]
    steps = [f"{label} (longest {max(gaps[a - n_startup + 1:b - n_startup + 1] or [0])} ms)"
             for (label, _end), a, b in zip(steps, bounds[:-1], bounds[1:], strict=True)]
    w.runner.shutdown()
    w.close()
    engine_process.shutdown_pool()
    plots.discard()
    return in_process_s, gaps, steps, len(ticks), warm_s, startup_gaps


def stall_child() -> None:
    """Run :func:`stall_run` and print its figures as one JSON line (in a child process)."""
    in_process_s, gaps, steps, n, warm_s, startup_gaps = stall_run()
    print(json.dumps({"in_process_s": in_process_s, "gaps": gaps, "steps": steps, "n": n,
                      "warm_s": warm_s, "startup_gaps": startup_gaps}), flush=True)


def stall_figures() -> dict:
    out = subprocess.run([sys.executable, __file__, "--stall"], capture_output=True, text=True,
                         timeout=600)
    lines = [ln for ln in out.stdout.splitlines() if ln.startswith("{")]
    if not lines:
        raise RuntimeError(f"the stall run failed: {out.stderr[-2000:]}")
    return json.loads(lines[-1])


def report(label: str, loaded: bool) -> None:
    with busy_core(loaded):
        bare, ours = startup_times()
        stall = stall_figures()
    mb, mo = statistics.median(bare), statistics.median(ours)
    print(f"{label}:")
    print(f"  bare PySide6 window, fresh process ({STARTUP_RUNS} runs): median {mb:.3f} s "
          f"(min {min(bare):.3f}, max {max(bare):.3f})")
    print(f"  Tiltyard window ready, fresh process ({STARTUP_RUNS} runs): median {mo:.3f} s "
          f"(min {min(ours):.3f}, max {max(ours):.3f})")
    pair = sorted(o / b for o, b in zip(ours, bare, strict=True))
    print(f"  start-up ratio Tiltyard / bare: {mo / mb:.2f} (medians; run by run "
          f"{pair[0]:.2f}-{pair[-1]:.2f}); target at most 3")
    gaps = sorted(stall["gaps"])
    p99 = gaps[int(0.99 * (len(gaps) - 1))]
    print(f"  window construction and first show in process: {stall['in_process_s'] * 1000:.0f}"
          f" ms; preparing ahead after show (engine and views loaded in a thread, charts and "
          f"views built a turn at a time): {stall['warm_s']:.2f} s")
    print(f"  longest GUI stall while preparing ahead: {max(stall['startup_gaps'])} ms "
          f"(median gap {statistics.median(stall['startup_gaps']):.0f} ms)")
    print(f"  longest GUI stall while driving ({HEARTBEAT_MS} ms heartbeat, {stall['n']} ticks: "
          + "; ".join(stall["steps"]) + f"): {max(gaps)} ms; 99th percentile gap {p99} ms; "
          f"median {statistics.median(gaps):.0f} ms; target at most 50 ms")


def main():
    print(f"{os.cpu_count()} cores; load average before the run "
          + ", ".join(f"{x:.2f}" for x in os.getloadavg()))
    report("unloaded", loaded=False)
    report("loaded (another process spinning one core)", loaded=True)


if __name__ == "__main__":
    if "--stall" in sys.argv:
        stall_child()
    else:
        main()
