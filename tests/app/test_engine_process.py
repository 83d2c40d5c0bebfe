"""Engine calls in worker processes: same results as in-process, errors and cancellation.

The app runs engine computations in child processes so they never hold the
GUI process's interpreter lock (see tiltyard.app.engine_process). These tests
check that a result crossing the process boundary is the same result, that a
failure arrives as the same exception with its message, and that a cancelled
call stops and frees its slot for the next one.
"""

from __future__ import annotations

import numpy as np
import pytest

from tiltyard.app import engine_process
from tiltyard.app.engine_process import Cancelled, EngineCall, run_call
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.site import SiteError
from tiltyard.engine.site_file import load_site
from tiltyard.engine.sunchart import sun_chart
from tiltyard.engine.tilt import StudyOptions, tilt_study


def _no_progress(fraction, stage=""):
    return None


def test_a_result_from_a_worker_process_equals_the_in_process_result(monkeypatch):
    site = load_demo("kelpie-creek-shed")
    call = EngineCall(sun_chart, (site, "2023-12-21", "clock"))
    remote = run_call(call, _no_progress)
    monkeypatch.setenv(engine_process.MODE_ENV, "threads")
    local = run_call(call, _no_progress)
    assert type(remote) is type(local)
    assert remote.summary == local.summary
    for a, b in zip(remote.paths + (remote.day,), local.paths + (local.day,), strict=True):
        assert a.label == b.label
        np.testing.assert_array_equal(a.azimuth_deg, b.azimuth_deg)
        np.testing.assert_array_equal(a.elevation_deg, b.elevation_deg)


def test_an_engine_error_in_a_worker_process_keeps_its_type_and_message(tmp_path):
    missing = tmp_path / "no-such-site.json"
    with pytest.raises(SiteError, match="no-such-site"):
        run_call(EngineCall(load_site, (str(missing),), progress_arg=None), _no_progress)


def test_a_cancelled_call_stops_and_the_pool_takes_the_next_one():
    site = load_demo("larkmoor-dairy")

    def cancel_at_once(fraction, stage=""):
        raise Cancelled()

    with pytest.raises(Cancelled):
        run_call(EngineCall(tilt_study, (site, StudyOptions())), cancel_at_once, poll_s=0.01)
    # every slot came back; the next call runs normally
    assert len(engine_process._get_pool()._free) == engine_process.SLOTS
    seen = []
    study = run_call(EngineCall(tilt_study, (site, StudyOptions())),
                     lambda f, s="": seen.append(f))
    assert study.options and seen
    assert all(0.0 <= f <= 1.0 for f in seen)


def test_the_runner_delivers_only_the_newest_process_result(make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    seen = []
    site = ctx.site
    for tilt_max in (40.0, 50.0, 60.0):
        opts = StudyOptions(tilt_min_deg=10.0, tilt_max_deg=tilt_max)
        ctx.runner.submit_call("study", EngineCall(tilt_study, (site, opts)), seen.append,
                               debounce_ms=0)
    idle(ctx.runner)
    assert len(seen) == 1
    assert seen[0].options_used.tilt_max_deg == 60.0
