"""Start the desktop app: ``tiltyard [SITE]``."""

from __future__ import annotations

import gc
import os
import sys
import threading

from tiltyard.engine.assessment import demo_assessment, load_assessment
from tiltyard.engine.demo_sites import DEFAULT_DEMO, demo_site_names

#: Set to a delay in ms to open the window, report it ready and quit (smoke tests, benchmarks).
SMOKE_ENV = "TILTYARD_SMOKE_QUIT_MS"

#: The interpreter's thread switch interval while the app runs, s (Python's default is
#: 0.005). A thread running Python (a sheet laid out, results arriving) makes the GUI
#: thread wait up to this long for the interpreter lock each time a Qt call hands it
#: back, many times in one repaint; a shorter interval shortens those waits.
SWITCH_INTERVAL_S = 0.001


def configure_interpreter() -> None:
    """Settings of the interpreter for a responsive GUI thread (:data:`SWITCH_INTERVAL_S`)."""
    sys.setswitchinterval(SWITCH_INTERVAL_S)


#: Delay after the window is shown before start-up loads what the first view does not
#: need (the window's first paint happens in the turns before it), ms.
FIRST_PAINT_MS = 30


WARM_UP_MODULES = ("tiltyard.engine.tilt", "tiltyard.engine.sunchart",
                   "tiltyard.engine.daycurves", "tiltyard.engine.horizon_loss",
                   "tiltyard.engine.exports")


def warm_up() -> None:
    """Import the engine modules the views will need (run in a background thread)."""
    from importlib import import_module

    from .views import VIEW_SPECS
    views = tuple(f"tiltyard.app.views.{module}" for _, module, _ in VIEW_SPECS)
    for name in WARM_UP_MODULES + views:
        try:
            import_module(name)
        except Exception:  # noqa: BLE001 - a view will report the real error when it runs
            return


def prepare_ahead(window) -> threading.Thread:
    """After the window is shown: load the engine and the views' modules in a thread,
    then, on the GUI thread one short turn at a time, make the charts and build the
    views the user has not opened yet. Returns the loading thread.

    What start-up loads and builds lives as long as the app, so the cyclic garbage
    collector is off while the modules load, and what they made is then moved out
    of its sight (``gc.freeze``), again once the views are built: a full collection
    over it takes 80-90 ms on the GUI thread, and Python runs one every so often.
    """
    from PySide6.QtCore import QTimer

    latitude_deg = window.document.site.latitude_deg

    def load() -> None:
        gc.disable()            # loading modules makes no garbage worth a collection
        try:
            warm_up()
            # the charts' facing for the open site (kept per latitude): numpy's loops
            # run here, not in the Horizon and Sun path views' first build
            from tiltyard.engine.sunchart_design import chart_centre_deg
            chart_centre_deg(latitude_deg)
        except Exception:  # noqa: BLE001 - the view computes it (and reports) itself
            pass
        finally:
            gc.freeze()
            gc.enable()

    loader = threading.Thread(target=load, name="tiltyard-warm-up", daemon=True)
    loader.start()
    poll = QTimer(window)
    poll.setInterval(50)

    def check() -> None:
        if loader.is_alive():
            return
        poll.stop()
        if not window.runner.closed:
            from . import plots  # pyqtgraph: loaded by the thread above, after the show
            plots.prepare(then=lambda: window.build_views_ahead(then=gc.freeze))
    poll.timeout.connect(check)
    poll.start()
    return loader


def create_window(site_arg: str | None = None):
    """Build the main window on SITE (a file or a demo name), or the default demo.

    Raises SiteError for a bad site, before any window exists.
    """
    from .main_window import MainWindow
    if site_arg is None:
        return MainWindow(demo_assessment(DEFAULT_DEMO), demo_name=DEFAULT_DEMO)
    if site_arg in demo_site_names():
        return MainWindow(demo_assessment(site_arg), demo_name=site_arg)
    return MainWindow(load_assessment(site_arg), site_path=site_arg)   # with its settings


def run(site_arg: str | None = None, argv: list[str] | None = None) -> int:
    """Open the app and run its event loop; returns the exit status."""
    from PySide6.QtWidgets import QApplication

    from . import engine_process, settings, theme
    configure_interpreter()
    app = QApplication.instance() or QApplication(argv or sys.argv[:1])
    app.setOrganizationName(settings.ORGANISATION)
    app.setApplicationName(settings.APPLICATION)
    theme.apply(app)
    from PySide6.QtCore import QTimer
    window = create_window(site_arg)
    window.show()
    window.offer_recovery()

    def after_first_paint() -> None:
        # start the engine's worker processes and load the engine (pvlib, scipy, pandas)
        # and the charts here too, while the user reads the first view; not before the
        # window has painted: a thread importing holds the interpreter lock
        if not window.runner.closed:
            engine_process.start_pool()
            prepare_ahead(window)
    QTimer.singleShot(FIRST_PAINT_MS, after_first_paint)
    if os.environ.get(SMOKE_ENV):
        # smoke tests and the start-up benchmark: say when the window is usable, then quit
        def ready():
            print(f"tiltyard: window ready: {window.windowTitle()}", flush=True)
            window.ask_unsaved = lambda: "discard"
            window.close()
            app.quit()
        QTimer.singleShot(int(os.environ.get(SMOKE_ENV) or 0), ready)
    try:
        return app.exec()
    finally:
        window.runner.shutdown()
        engine_process.shutdown_pool()
        if "tiltyard.app.plots" in sys.modules:
            sys.modules["tiltyard.app.plots"].discard()
