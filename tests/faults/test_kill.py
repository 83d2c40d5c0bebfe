"""Killing ``tiltyard sheet`` with every export at random moments, over an older set of
outputs: each output is afterwards its old file or a complete new one (PDFs checked with
pypdf), and no temporary file remains after the next run. Trials: 2 by default,
``HYPOTHESIS_PROFILE=ci`` 20."""

from __future__ import annotations

import json
import os
import random
import signal
import subprocess
import sys
import time

import pypdf
import pytest

TRIALS = 20 if os.environ.get("HYPOTHESIS_PROFILE") == "ci" else 2
OUTPUTS = {"-o": "out.pdf", "--csv-monthly": "monthly.csv", "--csv-options": "options.csv",
           "--csv-hourly": "hourly.csv", "--json-out": "study.json"}


def _argv(folder, preparer):
    argv = [sys.executable, "-m", "tiltyard.app.cli", "sheet", "larkmoor-dairy",
            "--preparer", preparer, "--organisation", "Fuzz", "--paper", "a4",
            "--prepared", "2024-01-01"]
    for flag, name in OUTPUTS.items():
        argv += [flag, str(folder / name)]
    return argv


def _snapshot(folder):
    return {name: (folder / name).read_bytes() for name in OUTPUTS.values()}


def _pdf_text(data) -> str:
    """Text of a complete PDF (pypdf raises on a cut-off file)."""
    import io
    reader = pypdf.PdfReader(io.BytesIO(data), strict=True)
    return " ".join(" ".join(page.extract_text().split()) for page in reader.pages)


def _complete(name, data):
    if name.endswith(".pdf"):
        return len(_pdf_text(data)) > 100
    if name.endswith(".json"):
        return bool(json.loads(data))
    return data.endswith(b"\n") and data.count(b"\n") > 1


@pytest.mark.timeout(600)
def test_kills_leave_old_or_complete_new_outputs(tmp_path):
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen")
    subprocess.run(_argv(tmp_path, "Old Preparer"), check=True, env=env, capture_output=True)
    old = _snapshot(tmp_path)
    start = time.perf_counter()
    subprocess.run(_argv(tmp_path, "New Preparer"),
                   check=True, env=env, capture_output=True)
    full = time.perf_counter() - start
    new = _snapshot(tmp_path)
    assert "New Preparer" in _pdf_text(new["out.pdf"])     # the preparer is on the sheet
    assert "Old Preparer" in _pdf_text(old["out.pdf"])
    rng = random.Random(13)
    outcomes = []
    for trial in range(TRIALS):
        # old outputs back, then a run killed at a random moment
        for name, data in old.items():
            (tmp_path / name).write_bytes(data)
        sig = signal.SIGKILL if trial % 2 else signal.SIGTERM
        proc = subprocess.Popen(_argv(tmp_path, "New Preparer"), env=env,
                                stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
        time.sleep(rng.uniform(0.3, full * 1.05))
        proc.send_signal(sig)
        _out, err = proc.communicate(timeout=120)
        if sig == signal.SIGTERM and proc.returncode not in (0,):
            assert proc.returncode in (143, -15), err
            assert b"Traceback" not in err
        for name in OUTPUTS.values():
            data = (tmp_path / name).read_bytes()
            assert _complete(name, data), name
            if name.endswith(".pdf"):      # a PDF carries a random document id: read it
                text = _pdf_text(data)
                assert ("Old Preparer" in text) != ("New Preparer" in text)
            else:
                assert data in (old[name], new[name]), name
        outcomes.append((sig.name, proc.returncode))
    print("kill trials:", outcomes)
    subprocess.run(_argv(tmp_path, "New Preparer"), check=True, env=env, capture_output=True)
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(OUTPUTS.values())
