"""SIGTERM at start-up and at exit: the exit status is 143 (stopped) or 0 (done), never a bare
signal death (-15), and no temporary file is left beside the outputs.

The signal is sent once the child has its SIGTERM handler (seen in ``/proc/PID/status``,
``SigCgt``; Linux only): before that the interpreter itself is still starting and no Python
code of ours can run. When the handler arrives is printed (a measured figure, never a pass
condition). Trials: 2 of each kind by default, ``HYPOTHESIS_PROFILE=ci`` 10.
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

pytestmark = pytest.mark.skipif(not Path("/proc/self/status").exists(),
                                reason="reads the child's signal mask from /proc")

TRIALS = 10 if os.environ.get("HYPOTHESIS_PROFILE") == "ci" else 2
SIGTERM_BIT = 1 << (signal.SIGTERM - 1)
ENV = dict(os.environ, QT_QPA_PLATFORM="offscreen")
OUTPUTS = {"--json-out": "study.json", "--csv-monthly": "monthly.csv",
           "--csv-options": "options.csv"}


def _catches_sigterm(pid: int) -> bool:
    try:
        status = Path(f"/proc/{pid}/status").read_text()
    except OSError:
        return False
    line = next(x for x in status.splitlines() if x.startswith("SigCgt:"))
    return bool(int(line.split()[1], 16) & SIGTERM_BIT)


def _wait_for(condition, proc, limit_s: float = 60.0) -> float | None:
    """Seconds until ``condition()``; None if the child ended first."""
    start = time.perf_counter()
    while not condition():
        if proc.poll() is not None or time.perf_counter() - start > limit_s:
            return None
        time.sleep(0.001)
    return time.perf_counter() - start


def _sheet_argv(folder: Path) -> list[str]:
    argv = [sys.executable, "-m", "tiltyard.app.cli", "sheet", "larkmoor-dairy",
            "--preparer", "P", "--organisation", "O", "--paper", "a4", "--times", "clock"]
    for flag, name in OUTPUTS.items():
        argv += [flag, str(folder / name)]
    return argv


def _temp_files(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name not in OUTPUTS.values())


@pytest.mark.timeout(600)
def test_sigterm_at_start_up_gives_143(tmp_path):
    rng = random.Random(143)
    outcomes, handler_s = [], []
    for _ in range(TRIALS):
        started = time.perf_counter()
        proc = subprocess.Popen(_sheet_argv(tmp_path), env=ENV, stdout=subprocess.DEVNULL,
                                stderr=subprocess.PIPE)
        seen = _wait_for(lambda p=proc: _catches_sigterm(p.pid), proc)
        assert seen is not None, "the command line never installed a SIGTERM handler"
        handler_s.append(time.perf_counter() - started)
        time.sleep(rng.uniform(0.0, 0.4))           # the imports and the parser
        proc.send_signal(signal.SIGTERM)
        _out, err = proc.communicate(timeout=120)
        assert proc.returncode in (143, 0), (proc.returncode, err)
        assert b"Traceback" not in err, err
        if proc.returncode == 143:
            assert err.decode().strip().splitlines() == [
                "tiltyard: stopped by SIGTERM; no output was changed by the unfinished step"]
        assert _temp_files(tmp_path) == []
        outcomes.append(proc.returncode)
    print(f"start-up SIGTERM exits: {outcomes}; handler in after "
          f"{min(handler_s) * 1000:.0f}-{max(handler_s) * 1000:.0f} ms")


@pytest.mark.timeout(600)
def test_sigterm_at_exit_gives_143_or_0_and_leaves_complete_outputs(tmp_path):
    rng = random.Random(15)
    outcomes = []
    for trial in range(TRIALS):
        for name in OUTPUTS.values():
            (tmp_path / name).unlink(missing_ok=True)
        proc = subprocess.Popen(_sheet_argv(tmp_path), env=ENV, stdout=subprocess.DEVNULL,
                                stderr=subprocess.PIPE)
        # the last step: every output renamed into place, the process on its way out
        done = _wait_for(lambda: all((tmp_path / n).exists() for n in OUTPUTS.values()), proc)
        if done is not None:
            time.sleep(rng.uniform(0.0, 0.05) if trial % 2 else 0.0)
            proc.send_signal(signal.SIGTERM)
        _out, err = proc.communicate(timeout=120)
        assert proc.returncode in (143, 0), (proc.returncode, err)
        assert b"Traceback" not in err, err
        for name in OUTPUTS.values():             # written whole before the signal came
            assert (tmp_path / name).read_bytes().endswith(b"\n"), name
        assert _temp_files(tmp_path) == []
        outcomes.append(proc.returncode if done is not None else "ended first")
    print("exit SIGTERM exits:", outcomes)


PROBE = """
import signal, sys
import tiltyard.app.cli as cli

def probe(argv):
    handler = signal.getsignal(signal.SIGTERM)
    heavy = sorted(m for m in ("numpy", "pandas", "pvlib", "PySide6") if m in sys.modules)
    print(handler not in (signal.SIG_DFL, signal.SIG_IGN, None), heavy)
    return 0

cli._run = probe
sys.argv = ["tiltyard", "sites"]
raise SystemExit(cli.main())
"""


def test_the_handler_is_in_before_any_heavy_import():
    # the subcommand's run starts with SIGTERM handled and nothing heavy imported yet
    out = subprocess.run([sys.executable, "-c", PROBE], capture_output=True, text=True,
                         env=ENV, timeout=120)
    assert out.returncode == 0, out.stderr
    assert out.stdout.split("\n")[0] == "True []", out.stdout
