"""Benchmark: start-up of the command line against a bare Python start.

Runs each command in a fresh interpreter ``REPEAT`` times (as the ``tiltyard``
script does: ``from tiltyard.app.cli import main``) and prints the median wall
time, the ratio to ``python -c pass`` and the heavy modules the command loaded
(numpy, pandas, pvlib, scipy, Qt, the engine). Prints figures; never fails on
time. Target: ``--version``, ``--help`` and each subcommand's ``--help`` import no
engine module, numpy, pandas, pvlib or Qt, and start within a few times a bare Python.

Run: python tests/benchmarks/bench_startup.py [--source DIR]
``--source DIR`` puts DIR first on the path (a folder holding a ``tiltyard``
package of another revision), to measure that revision with the same interpreter.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import time

REPEAT = 15
HEAVY = ("numpy", "pandas", "pvlib", "scipy", "PySide6", "pyqtgraph", "tiltyard.engine")
COMMANDS = (["--version"], ["--help"], ["sun", "--help"], ["study", "--help"],
            ["sheet", "--help"], ["batch", "--help"], ["sites"],
            ["sun", "larkmoor-dairy", "--date", "2023-06-21"])
RUN = ("import atexit, sys\n"
       "def _report():\n"
       "    light = ('tiltyard.engine', 'tiltyard.engine.choices', 'tiltyard.engine.words')\n"
       "    heavy = sorted({h for m in sys.modules for h in HEAVY\n"
       "                    if (m == h or m.startswith(h + '.')) and m not in light})\n"
       "    sys.stderr.write('HEAVY ' + ','.join(heavy) + '\\n')\n"
       "atexit.register(_report)\n"
       "from tiltyard.app.cli import main\n"
       "sys.exit(main())\n").replace("HEAVY", repr(HEAVY), 1)


def _time(argv, env, repeat=REPEAT):
    times, heavy = [], ""
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = subprocess.run(argv, env=env, capture_output=True, text=True)
        times.append(time.perf_counter() - t0)
        for line in out.stderr.splitlines():
            if line.startswith("HEAVY "):
                heavy = line[6:]
    return statistics.median(times), min(times), heavy


def main():
    env = dict(os.environ)
    if "--source" in sys.argv:
        env["PYTHONPATH"] = sys.argv[sys.argv.index("--source") + 1]
    env.pop("DISPLAY", None)
    bare, lo, _ = _time([sys.executable, "-c", "pass"], env)
    print(f"python -c pass: median {bare * 1e3:.1f} ms (min {lo * 1e3:.1f}), {REPEAT} runs each")
    for args in COMMANDS:
        med, lo, heavy = _time([sys.executable, "-c", RUN, *args], env)
        print(f"  tiltyard {' '.join(args):40s} median {med * 1e3:7.1f} ms (min {lo * 1e3:6.1f})"
              f"  {med / bare:5.1f}x bare   loads: {heavy or 'none of ' + '/'.join(HEAVY[:4])}")


if __name__ == "__main__":
    main()
