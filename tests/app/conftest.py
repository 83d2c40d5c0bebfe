"""Fixtures for the app tests: isolated settings, a shared context, idle waiting.

Every test runs with Qt's test-mode standard paths and its own QSettings
folder, so no test reads or writes the user's preferences, recent files or
autosave. The runner is shut down after each test and no worker thread may be
left running.
"""

from __future__ import annotations

import os
import time

import pytest

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import QCoreApplication, QSettings, QStandardPaths  # noqa: E402

from tiltyard.app import settings  # noqa: E402
from tiltyard.app.context import AppContext  # noqa: E402
from tiltyard.app.document import SiteDocument  # noqa: E402
from tiltyard.app.tasks import TaskRunner  # noqa: E402
from tiltyard.engine.demo_sites import load_demo  # noqa: E402

ARTEFACTS = os.path.join(os.path.dirname(__file__), "..", "artefacts")


@pytest.fixture(autouse=True)
def isolated_settings(qapp, tmp_path):
    QStandardPaths.setTestModeEnabled(True)
    QCoreApplication.setOrganizationName(settings.ORGANISATION)
    QCoreApplication.setApplicationName("TiltyardTest")
    QSettings.setDefaultFormat(QSettings.Format.IniFormat)
    QSettings.setPath(QSettings.Format.IniFormat, QSettings.Scope.UserScope,
                      str(tmp_path / "settings"))
    QSettings.setPath(QSettings.Format.NativeFormat, QSettings.Scope.UserScope,
                      str(tmp_path / "settings"))
    SiteDocument.clear_autosave()
    from tiltyard.app import theme
    theme.apply(qapp)
    yield
    SiteDocument.clear_autosave()


def wait_idle(qtbot, runner: TaskRunner, timeout_s: float = 60.0) -> None:
    """Process events until the runner has nothing queued or running."""
    deadline = time.monotonic() + timeout_s
    qtbot.wait(20)
    while runner.is_busy():
        if time.monotonic() > deadline:
            raise AssertionError("engine work did not finish in time")
        qtbot.wait(20)
    qtbot.wait(10)


@pytest.fixture
def idle(qtbot):
    """``idle(runner)`` waits until the runner has finished all queued work."""
    return lambda runner, timeout_s=60.0: wait_idle(qtbot, runner, timeout_s)


@pytest.fixture
def make_ctx(qapp):
    """Build an AppContext on a demo site; shut its runner down afterwards."""
    made = []

    def make(demo: str = "larkmoor-dairy") -> AppContext:
        doc = SiteDocument(load_demo(demo))
        runner = TaskRunner()
        ctx = AppContext(doc, runner, settings.Preferences())
        made.append(ctx)
        return ctx

    yield make
    for ctx in made:
        assert ctx.runner.shutdown(60000), "a worker thread was still running"
        assert ctx.runner.active_thread_count() == 0


@pytest.fixture
def artefacts_dir():
    os.makedirs(ARTEFACTS, exist_ok=True)
    return ARTEFACTS
