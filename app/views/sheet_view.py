"""Sheet view: a live preview of the feasibility sheet, PDF export, printing, data exports.

The preview is the sheet's own drawing code (:mod:`tiltyard.app.sheet`)
painted into one image per page in a worker thread, so what is on screen is
what the PDF and the printer get. It follows the open assessment (the site and
its settings: sky basis, study settings, mounting) and the preferences: the
engine's part (:func:`tiltyard.engine.assess.assessment_part`, ``sheet_data``)
runs in a worker process on the same assessment the Tilt study view shows.

File and print dialogs go through :meth:`SheetView.ask_save_path`,
:meth:`SheetView.ask_print` and :meth:`SheetView.exec_dialog`, which tests
replace.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

from PySide6.QtCore import Qt, QTimer
from PySide6.QtGui import QPixmap
from PySide6.QtWidgets import (
    QComboBox,
    QFileDialog,
    QGridLayout,
    QHBoxLayout,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QMenu,
    QPushButton,
    QScrollArea,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from tiltyard.engine.assess import assessment_part
from tiltyard.engine.atomic_files import write_bytes_atomically
from tiltyard.engine.exports import (
    document_json_text,
    hourly_csv_text,
    monthly_csv_text,
    options_csv_text,
)
from tiltyard.engine.words import basis_label, option_name

from ..engine_process import EngineCall
from ..sheet import PAPERS, SheetMeta, build_sheet, page_image, pdf_bytes
from ..sheet.job import lay_out
from ..sheet.pdf import page_layout, paint_to
from ..widgets import View

#: What each export writes: (dialog title, file filter, suffix).
EXPORTS = {
    "pdf": ("Export the sheet as PDF", "PDF document (*.pdf)", ".pdf"),
    "monthly": ("Export the monthly table", "CSV table (*.csv)", ".csv"),
    "options": ("Export the options table", "CSV table (*.csv)", ".csv"),
    "hourly": ("Export the hourly plane-of-array irradiance", "CSV table (*.csv)", ".csv"),
    "json": ("Export the study as JSON", "JSON document (*.json)", ".json"),
}

ZOOMS = (("Both pages", "pages"), ("Page width", "width"), ("100 %", "actual"))

#: Gap between pages in the preview, pixels.
PAGE_GAP = 14
#: Highest resolution the preview renders at, dots per inch.
MAX_PREVIEW_DPI = 200.0


@dataclass(frozen=True)
class _Preview:
    """A computed sheet and its pages as images."""

    result: object          # tiltyard.app.sheet.SheetResult
    document: object        # SheetDocument (paper and preferences may be newer than result's)
    images: tuple
    dpi: float


def _slug(name: str) -> str:
    keep = re.sub(r"[^0-9A-Za-z]+", "-", name).strip("-").lower()
    return keep[:60] or "site"


class _Pages(QWidget):
    """The page images side by side or stacked, on a grey desk."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("sheetDesk")
        self.setStyleSheet("#sheetDesk { background: #d9dcd6; }")
        self._grid = QGridLayout(self)
        self._grid.setContentsMargins(PAGE_GAP, PAGE_GAP, PAGE_GAP, PAGE_GAP)
        self._grid.setSpacing(PAGE_GAP)
        self._grid.setAlignment(Qt.AlignmentFlag.AlignCenter)
        self.labels: list[QLabel] = []

    def set_images(self, images, vertical: bool) -> None:
        while len(self.labels) < len(images):
            lab = QLabel()
            lab.setStyleSheet("QLabel { background: white; border: 1px solid #9aa09a; }")
            lab.setAlignment(Qt.AlignmentFlag.AlignCenter)
            self.labels.append(lab)
        while len(self.labels) > len(images):
            self.labels.pop().deleteLater()
        for i, (lab, img) in enumerate(zip(self.labels, images, strict=True)):
            self._grid.removeWidget(lab)
            self._grid.addWidget(lab, i if vertical else 0, 0 if vertical else i)
            pm = QPixmap.fromImage(img)
            lab.setPixmap(pm)
            lab.setFixedSize(pm.width() + 2, pm.height() + 2)


class SheetView(View):
    title = "Sheet"

    def __init__(self, ctx, parent=None):
        super().__init__(ctx, parent)
        self.preview: _Preview | None = None     # what is on screen
        self.last_written: str | None = None
        self._preview_printer = None
        self._paper = ctx.prefs.paper if ctx.prefs.paper in PAPERS else "a4"
        self._hourly_checked: dict[str, bool] = {}

        outer = QVBoxLayout(self)
        outer.setContentsMargins(14, 10, 14, 6)
        outer.setSpacing(6)
        head = QLabel("Feasibility sheet")
        head.setProperty("role", "heading")
        outer.addWidget(head)       # a line of its own: the controls fit a laptop screen
        top = QHBoxLayout()
        top.addWidget(QLabel("Paper"))
        self.paper = QComboBox()
        for key, (name, _w, _h) in PAPERS.items():
            self.paper.addItem(name, key)
        self.paper.setCurrentIndex(list(PAPERS).index(self._paper))
        self.paper.setToolTip("Paper size of the sheet (the default is in Edit ▸ Preferences)")
        self.paper.currentIndexChanged.connect(self._paper_changed)
        top.addWidget(self.paper)
        top.addWidget(QLabel("View"))
        self.zoom = QComboBox()
        for text, key in ZOOMS:
            self.zoom.addItem(text, key)
        self.zoom.currentIndexChanged.connect(lambda _i: self._request_images())
        top.addWidget(self.zoom)
        self.export_button = QPushButton("Export PDF…")
        self.export_button.setToolTip("Save the sheet as a PDF file (vector charts, "
                                      "selectable text)")
        self.export_button.clicked.connect(lambda: self.export("pdf"))
        top.addWidget(self.export_button)
        self.print_button = QPushButton("Print…")
        self.print_button.clicked.connect(self.print_sheet)
        top.addWidget(self.print_button)
        self.preview_button = QPushButton("Print preview…")
        self.preview_button.clicked.connect(self.print_preview)
        top.addWidget(self.preview_button)
        self.data_button = QToolButton()
        self.data_button.setText("Export data ▾")
        self.data_button.setToolTip("The sheet's figures as CSV tables or the whole study as "
                                    "JSON")
        self.data_button.setStyleSheet("QToolButton { padding: 3px 8px; } "
                                       "QToolButton::menu-indicator { image: none; width: 0; }")
        self.data_button.setPopupMode(QToolButton.ToolButtonPopupMode.InstantPopup)
        menu = QMenu(self.data_button)
        self.data_actions = {}
        for key, text in (("monthly", "Monthly and annual table (CSV)…"),
                          ("options", "Options table (CSV)…"),
                          ("hourly", "Hourly plane-of-array irradiance (CSV)…"),
                          ("json", "Whole study (JSON)…")):
            act = menu.addAction(text)
            act.triggered.connect(lambda _=False, k=key: self.export(k))
            self.data_actions[key] = act
        self.data_button.setMenu(menu)
        top.addWidget(self.data_button)
        top.addStretch(1)
        outer.addLayout(top)

        body = QHBoxLayout()
        body.setSpacing(10)
        self.pages = _Pages()
        self.scroll = QScrollArea()
        self.scroll.setWidgetResizable(True)
        self.scroll.setWidget(self.pages)
        self.scroll.setAlignment(Qt.AlignmentFlag.AlignCenter)
        body.addWidget(self.scroll, 1)
        body.addWidget(self._build_side())
        outer.addLayout(body, 1)

        self._resize_timer = QTimer(self)
        self._resize_timer.setSingleShot(True)
        self._resize_timer.setInterval(120)
        self._resize_timer.timeout.connect(self._request_images)
        ctx.preferences_changed.connect(self._on_preferences)
        self._enable(False)

    def _build_side(self) -> QWidget:
        side = QWidget()
        side.setFixedWidth(210)
        lay = QVBoxLayout(side)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(4)
        self.status = QLabel("")
        self.status.setWordWrap(True)
        self.status.setTextFormat(Qt.TextFormat.PlainText)
        lay.addWidget(self.status)
        lay.addSpacing(6)
        t = QLabel("Prepared by")
        t.setStyleSheet("font-weight: 600;")
        lay.addWidget(t)
        self.prepared = QLabel()
        self.prepared.setWordWrap(True)
        lay.addWidget(self.prepared)
        hint = QLabel("Name and organisation come from Edit ▸ Preferences.")
        hint.setProperty("role", "muted")
        hint.setWordWrap(True)
        lay.addWidget(hint)
        lay.addSpacing(8)
        t = QLabel("Options in the hourly CSV")
        t.setStyleSheet("font-weight: 600;")
        lay.addWidget(t)
        self.hourly_list = QListWidget()
        self.hourly_list.setToolTip("Tick the options whose hourly plane-of-array irradiance "
                                    "Export data ▸ Hourly writes")
        self.hourly_list.itemChanged.connect(self._hourly_item_changed)
        lay.addWidget(self.hourly_list, 1)
        self.figures_note = QLabel()
        self.figures_note.setProperty("role", "muted")
        self.figures_note.setWordWrap(True)
        lay.addWidget(self.figures_note)
        self._show_prepared()
        return side

    # -- inputs ---------------------------------------------------------------
    def meta(self) -> SheetMeta:
        p = self.ctx.prefs
        basis = p.time_basis if p.time_basis in ("clock", "standard", "solar") else "clock"
        return SheetMeta(preparer=p.preparer, organisation=p.organisation, time_basis=basis)

    @property
    def paper_key(self) -> str:
        return self._paper

    def _target_dpi(self, doc_w: float, doc_h: float, n_pages: int) -> float:
        vp = self.scroll.viewport().size()
        vw, vh = max(200, vp.width()), max(200, vp.height())
        mode = self.zoom.currentData()
        if mode == "actual":
            dpi = float(self.logicalDpiX() or 96)
        elif mode == "width":
            dpi = (vw - 2 * PAGE_GAP - 4) / (doc_w / 72.0)
        else:
            dpi = min((vh - 2 * PAGE_GAP - 4) / (doc_h / 72.0),
                      (vw - (n_pages + 1) * PAGE_GAP - 4 * n_pages) / (n_pages * doc_w / 72.0))
        return max(20.0, min(MAX_PREVIEW_DPI, dpi))

    # -- computing ------------------------------------------------------------
    def refresh(self) -> None:
        super().refresh()
        a, meta, paper = self.ctx.assessment, self.meta(), self._paper
        _name, w, h = PAPERS[paper]
        dpi = self._target_dpi(w, h, 2)
        self.status.setText("computing the sheet…")

        # the engine's part in a worker process (it holds no lock the window needs), then
        # the layout and the preview images, which need Qt, in a thread
        def lay_out_job(data):
            if a != self.ctx.assessment:         # the site or its settings changed meanwhile
                return

            def job(progress):
                progress(0.5, "laying out the pages")
                result = lay_out(data, meta, paper)
                images = tuple(page_image(result.document, i, dpi)
                               for i in range(result.document.page_count))
                return _Preview(result, result.document, images, dpi)
            self.ctx.runner.submit(self.channel("layout"), job, self._show, label="Sheet",
                                   debounce_ms=0)

        self.ctx.runner.submit_call(
            self.channel("sheet"),
            EngineCall(assessment_part, (a, "sheet_data", meta.time_basis)),
            lay_out_job, label="Sheet")

    def _relayout(self) -> None:
        """New paper or preferences on the same figures: lay out and render again."""
        if self.preview is None:
            self.refresh()
            return
        result, meta, paper = self.preview.result, self.meta(), self._paper
        if meta.time_basis != result.document.meta.time_basis:
            self.refresh()                  # the sun chart's hour lines change
            return
        _name, w, h = PAPERS[paper]
        dpi = self._target_dpi(w, h, 2)

        def job(progress):
            doc = build_sheet(result.figures, result.sun, meta, paper)
            progress(0.6, "rendering the preview")
            images = tuple(page_image(doc, i, dpi) for i in range(doc.page_count))
            return _Preview(result, doc, images, dpi)

        self.status.setText("laying out the sheet…")
        self.ctx.runner.submit(self.channel("layout"), job, self._show, label="Sheet")

    def _request_images(self) -> None:
        """Render the pages again at the size the preview now has."""
        pv = self.preview
        if pv is None:
            return
        doc = pv.document
        dpi = self._target_dpi(doc.width, doc.height, doc.page_count)
        if abs(dpi - pv.dpi) < 0.5:
            self._place(pv)
            return

        def job(_progress):
            return _Preview(pv.result, doc, tuple(page_image(doc, i, dpi)
                                                  for i in range(doc.page_count)), dpi)

        self.ctx.runner.submit(self.channel("preview"), job, self._show_images,
                               label="Sheet preview")

    def _show(self, pv: _Preview) -> None:
        self.preview = pv
        doc = pv.document
        self._place(pv)
        self._fill_hourly(pv.result.study)
        self._enable(True)
        name = PAPERS[doc.paper][0]
        rec = pv.result.study.recommended
        sky = basis_label(pv.result.study.options_used.irradiance.sky)
        self.status.setText(f"{doc.page_count} pages, {name}\nRecommended: {option_name(rec)}"
                            f"\nSky basis: {sky}")
        self.figures_note.setText(f"Inputs {pv.result.figures.short_digest} · Tiltyard "
                                  f"{pv.result.figures.version}")
        # the viewport may have changed size while the sheet was computed
        self._resize_timer.start()

    def _show_images(self, pv: _Preview) -> None:
        if self.preview is None or pv.document is not self.preview.document:
            return
        self.preview = pv
        self._place(pv)

    def _place(self, pv: _Preview) -> None:
        self.pages.set_images(pv.images, self.zoom.currentData() == "width")

    def _enable(self, on: bool) -> None:
        for w in (self.export_button, self.print_button, self.preview_button, self.data_button):
            w.setEnabled(on)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().resizeEvent(event)
        self._resize_timer.start()

    # -- reactions ------------------------------------------------------------
    def _on_preferences(self, prefs) -> None:
        self._show_prepared()
        if prefs.paper in PAPERS and prefs.paper != self._paper:
            self.paper.setCurrentIndex(list(PAPERS).index(prefs.paper))  # re-lays out
            return
        if self.isVisible():
            self._relayout()
        else:
            self._stale = True

    def _paper_changed(self, _i) -> None:
        self._paper = self.paper.currentData()
        if self.isVisible():
            self._relayout()
        else:
            self._stale = True

    def _show_prepared(self) -> None:
        meta = self.meta()
        who = ", ".join(x for x in (meta.preparer, meta.organisation) if x)
        self.prepared.setText(who or "(not set)")

    def _fill_hourly(self, study) -> None:
        self.hourly_list.blockSignals(True)
        self.hourly_list.clear()
        for opt in study.options:
            item = QListWidgetItem(option_name(opt))
            item.setToolTip(opt.label.replace(" deg", "°"))
            item.setData(Qt.ItemDataRole.UserRole, opt.label)
            item.setFlags(item.flags() | Qt.ItemFlag.ItemIsUserCheckable)
            on = self._hourly_checked.get(opt.label, True)
            item.setCheckState(Qt.CheckState.Checked if on else Qt.CheckState.Unchecked)
            self.hourly_list.addItem(item)
        self.hourly_list.blockSignals(False)

    def _hourly_item_changed(self, item) -> None:
        self._hourly_checked[item.data(Qt.ItemDataRole.UserRole)] = (
            item.checkState() == Qt.CheckState.Checked)

    def hourly_selection(self) -> tuple:
        """The options ticked for the hourly CSV (study order)."""
        if self.preview is None:
            return ()
        picked = {self.hourly_list.item(i).data(Qt.ItemDataRole.UserRole)
                  for i in range(self.hourly_list.count())
                  if self.hourly_list.item(i).checkState() == Qt.CheckState.Checked}
        return tuple(o for o in self.preview.result.study.options if o.label in picked)

    # -- dialogs (tests replace these) ----------------------------------------------
    def ask_save_path(self, kind: str, suggested: str) -> str | None:
        """Ask where to save an export; None when the user cancels."""
        title, filt, suffix = EXPORTS[kind]
        path, _ = QFileDialog.getSaveFileName(self, title, suggested, filt)
        if path and not path.lower().endswith(suffix):
            path += suffix
        return path or None

    def ask_print(self, printer) -> bool:
        """The system print dialog; True when the user chose to print."""
        from PySide6.QtPrintSupport import QPrintDialog

        dlg = QPrintDialog(printer, self)
        dlg.setWindowTitle("Print the feasibility sheet")
        return bool(self.exec_dialog(dlg))

    def exec_dialog(self, dialog) -> int:
        return dialog.exec()

    # -- commands ---------------------------------------------------------------------
    def suggested_name(self, kind: str) -> str:
        site = self.preview.result.study.site if self.preview is not None else self.ctx.site
        base = {"pdf": "sheet", "monthly": "monthly", "options": "options",
                "hourly": "hourly-poa", "json": "study"}[kind]
        folder = Path(self.last_written).parent if self.last_written else Path.home()
        return str(folder / f"{_slug(site.name)}-{base}{EXPORTS[kind][2]}")

    def export(self, kind: str) -> None:
        """Ask for a path and write one export there (atomically, in a worker thread)."""
        pv = self.preview
        if pv is None:
            return
        path = self.ask_save_path(kind, self.suggested_name(kind))
        if not path:
            return
        result, doc = pv.result, pv.document
        chosen = self.hourly_selection() if kind == "hourly" else ()
        if kind == "hourly" and not chosen:
            self.ctx.notify("warning", "Tick at least one option for the hourly CSV.")
            return

        def job(_progress):
            if kind == "pdf":
                data = pdf_bytes(doc)
            elif kind == "monthly":
                data = monthly_csv_text(result.study).encode("utf-8")
            elif kind == "options":
                data = options_csv_text(result.study).encode("utf-8")
            elif kind == "hourly":
                data = hourly_csv_text(result.sky, result.study.site, chosen).encode("utf-8")
            else:
                data = document_json_text(result.figures.document).encode("utf-8")
            try:
                write_bytes_atomically(path, data)
            except OSError as exc:
                raise ValueError(f"could not write {path}: {exc.strerror or exc}") from None
            return path

        self.ctx.runner.submit(self.channel(f"export-{kind}"), job, self._written,
                               label="Sheet export", debounce_ms=0)

    def _written(self, path: str) -> None:
        self.last_written = path
        self.ctx.notify("info", f"Saved {path}")

    def _printer(self):
        from PySide6.QtPrintSupport import QPrinter

        printer = QPrinter(QPrinter.PrinterMode.HighResolution)
        printer.setFullPage(True)
        printer.setPageLayout(page_layout(self.preview.document.paper))
        printer.setDocName(self.preview.document.title)
        return printer

    def print_sheet(self, printer=None) -> bool:
        """Print through the system print dialog (or on ``printer`` as it is set up)."""
        if self.preview is None:
            return False
        if printer is None:
            printer = self._printer()
        else:
            printer.setFullPage(True)
            printer.setPageLayout(page_layout(self.preview.document.paper))
        if not self.ask_print(printer):
            return False
        self.paint_on(printer)
        return True

    def print_preview(self):
        """Qt's print preview of the sheet; returns the dialog after it closes."""
        if self.preview is None:
            return None
        from PySide6.QtPrintSupport import QPrintPreviewDialog

        # the dialog does not own its printer: keep it alive as long as the dialog
        self._preview_printer = self._printer()
        dlg = QPrintPreviewDialog(self._preview_printer, self)
        dlg.setWindowTitle("Print preview: feasibility sheet")
        dlg.paintRequested.connect(self.paint_on)
        self.exec_dialog(dlg)
        return dlg

    def paint_on(self, printer) -> None:
        """Draw the sheet on a printer (the print dialog's or the preview's)."""
        from PySide6.QtGui import QPainter

        painter = QPainter()
        if not painter.begin(printer):
            self.ctx.notify("error", "Sheet: could not start printing")
            return
        try:
            paint_to(painter, printer, self.preview.document)
        finally:
            painter.end()


__all__ = ["SheetView"]
