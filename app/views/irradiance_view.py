"""Irradiance view: one day's curves, monthly bars per option, annual totals.

Controls: the sky basis (best available, clear sky, the site's monthly values,
a weather file) and the transposition model, saved with the site
(``ctx.set_settings``) and so shared with the Tilt study and the Sheet; the plane (horizontal, each existing plane, and the tilt study's
optimum when there is one); the date.

Charts: (1) the date's curves, W/m², on local clock time; (2) monthly mean daily
irradiation, kWh/m²/day, grouped by month with one bar per option; (3) a table
of annual totals with the horizon loss. All figures come from the engine
of the open assessment (:func:`tiltyard.engine.assess.assessment_part`: day curves
and option totals) in a worker process.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QDate, Qt
from PySide6.QtGui import (
    QBrush,
    QColor,
    QIcon,
    QPainter,
    QPixmap,
    QStandardItem,
    QStandardItemModel,
)
from PySide6.QtWidgets import (
    QComboBox,
    QDateEdit,
    QGridLayout,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QSizePolicy,
    QVBoxLayout,
    QWidget,
)

from tiltyard.engine.assess import AssessmentError, assessment_part, choose_basis
from tiltyard.engine.timegrid import REFERENCE_YEAR
from tiltyard.engine.words import (
    MONTH_ABBR,
    NO_VALUE,
    day_month,
    day_words,
    degree_text,
    model_name,
    number,
    plane_words,
    sky_choice_words,
)

from .. import plots, theme
from ..engine_process import EngineCall
from ..weather_dialog import WeatherDialog
from ..widgets import CopyableTable, View, wrapping

#: The sky bases and transposition models the view offers.
SKY_KEYS = ("auto", "clear", "monthly", "file")
MODEL_KEYS = ("perez", "haydavies", "isotropic")

MONTHLY_MISSING = ("this site has no monthly mean daily GHI values; enter the 12 values "
                   "in the Site view to use them.")

# day curves: key, pen (colour, width, dash) — colour and dash both differ, for greyscale
_DAY_STYLE = {
    "poa": (theme.LINE_SERIES[0], 2.6, Qt.PenStyle.SolidLine),
    "ghi": (theme.LINE_SERIES[1], 2.0, Qt.PenStyle.DashLine),
    "dni": (theme.LINE_SERIES[2], 2.0, Qt.PenStyle.DotLine),
    "dhi": (theme.LINE_SERIES[3], 2.0, Qt.PenStyle.DashDotLine),
    "ghi_clear": (theme.LINE_SERIES[4], 1.4, Qt.PenStyle.DashDotDotLine),
    "dni_extra": (theme.CATEGORICAL[0], 1.2, Qt.PenStyle.DashLine),
}
_SHADE = QColor(90, 96, 88, 40)   # sun up but behind the site horizon


def _pen(key: str):
    colour, width, style = _DAY_STYLE[key]
    pen = pg.mkPen(colour, width=width)
    pen.setStyle(style)
    return pen


#: At most this many bar series on the monthly chart (more are not told apart).
MAX_BAR_SERIES = 6
#: Each bar series has its own fill pattern as well as its own colour, so the bars are
#: told apart without colour (deuteranopia, protanopia, grey print).
BAR_PATTERNS = (Qt.BrushStyle.SolidPattern, Qt.BrushStyle.BDiagPattern,
                Qt.BrushStyle.Dense4Pattern, Qt.BrushStyle.FDiagPattern,
                Qt.BrushStyle.DiagCrossPattern, Qt.BrushStyle.HorPattern)


def _bar_brush(i: int) -> QBrush:
    return QBrush(theme.series_color(i), BAR_PATTERNS[i % len(BAR_PATTERNS)])


def bar_rows(rows) -> tuple[list, list]:
    """The rows drawn as bars and the rows left to the table.

    Bars show one sky basis only: the site's own rows (horizontal and planes) and the
    study's options on the same basis, at most :data:`MAX_BAR_SERIES`; study rows on
    another basis (a clear-sky study beside a weather file) stay in the table.
    """
    own = [r for r in rows if not r.from_study]
    basis = own[0].sky_label if own else (rows[0].sky_label if rows else None)
    same = [r for r in rows if r.sky_label == basis]
    shown = same[:MAX_BAR_SERIES]
    return shown, [r for r in rows if r not in shown]


def _swatch_icon(i: int) -> QIcon:
    """The bar colour (and hatch) of series ``i`` as a table icon."""
    pm = QPixmap(14, 14)
    pm.fill(QColor("white"))
    p = QPainter(pm)
    p.fillRect(0, 0, 14, 14, _bar_brush(i))
    p.setPen(theme.series_color(i).darker(135))
    p.drawRect(0, 0, 13, 13)
    p.end()
    return QIcon(pm)


def _short(label: str) -> str:
    """A legend name: the option's label up to its parenthesis."""
    return label.split(" (")[0].strip() or label


class Legend(QWidget):
    """Legend entries in rows of ``columns``, painted by one widget below a chart.

    One painted widget rather than a label per entry: creating and showing
    child widgets on every redraw cost several milliseconds each and stalled
    the GUI thread.
    """

    ROW_H = 17
    SWATCH_W = 30

    def __init__(self, columns: int = 3, parent=None):
        super().__init__(parent)
        self.columns = columns
        self.entries: list[str] = []
        self._items: list[tuple] = []
        f = self.font()
        f.setPointSizeF(9.0)
        self.setFont(f)
        self.setSizePolicy(QSizePolicy.Policy.Preferred, QSizePolicy.Policy.Fixed)

    def clear(self) -> None:
        self.entries = []
        self._items = []

    def add(self, text: str, pen=None, brush=None, outline=None) -> None:
        self.entries.append(text)
        self._items.append((text, pen, brush, outline))

    def finish(self) -> None:
        """Lay out and repaint after a run of :meth:`add` calls."""
        self.setFixedHeight(self._rows() * self.ROW_H + 4)
        self.setToolTip("\n".join(self.entries))
        self.update()

    def _rows(self) -> int:
        return max(1, -(-len(self._items) // self.columns))

    def sizeHint(self):  # noqa: N802 - Qt override
        from PySide6.QtCore import QSize
        return QSize(300, self._rows() * self.ROW_H + 4)

    def paintEvent(self, _event) -> None:  # noqa: N802 - Qt override
        p = QPainter(self)
        p.setRenderHint(QPainter.RenderHint.Antialiasing)
        col_w = max(1, (self.width() - 12) // self.columns)
        fm = p.fontMetrics()
        for i, (text, pen, brush, outline) in enumerate(self._items):
            r, c = divmod(i, self.columns)
            x0 = 6 + c * col_w
            y0 = 2 + r * self.ROW_H
            if brush is not None:
                p.fillRect(x0 + 7, y0 + 2, 16, 12, QColor("white"))
                p.fillRect(x0 + 7, y0 + 2, 16, 12, brush)
                if outline is not None:
                    p.setPen(outline)
                    p.drawRect(x0 + 7, y0 + 2, 16, 12)
            elif pen is not None:
                p.setPen(pen)
                p.drawLine(x0 + 1, y0 + 8, x0 + 29, y0 + 8)
            p.setPen(QColor(theme.TEXT))
            avail = col_w - self.SWATCH_W - 8
            shown = fm.elidedText(text, Qt.TextElideMode.ElideRight, max(10, avail))
            p.drawText(x0 + self.SWATCH_W + 4, y0 + 2 + fm.ascent(), shown)
        p.end()


class _Block(QWidget):
    """A container that does not pass height-for-width up: the charts take the height left."""

    def hasHeightForWidth(self) -> bool:  # noqa: N802 - Qt override
        return False


class _Item(QStandardItem):
    def __init__(self, text: str, sort=None):
        super().__init__(text)
        self.setEditable(False)
        self.setData(text if sort is None else sort, Qt.ItemDataRole.UserRole)


def _day_columns(series) -> dict:
    """The day's curves by their key in ``_DAY_STYLE``: the series' columns."""
    return {"poa": series["poa_global"], "ghi": series["ghi"], "dni": series["dni"],
            "dhi": series["dhi"], "ghi_clear": series["ghi_clear"],
            "dni_extra": series["dni_extra"]}


class IrradianceView(View):
    title = "Irradiance"

    def __init__(self, ctx, parent=None):
        super().__init__(ctx, parent)
        self._updating = False
        self._planes: list[tuple[str, float, float]] = []
        self.day = None          # the DayCurves on show
        self.rows = ()           # the OptionTotals on show
        self.rows_not_barred = []  # of those, the ones only in the table (bar_rows)
        self._dialog = None

        outer = QVBoxLayout(self)
        outer.setContentsMargins(18, 10, 18, 8)
        outer.setSpacing(4)
        head = QLabel("Irradiance")
        head.setProperty("role", "heading")
        outer.addWidget(head)

        # -- controls -------------------------------------------------------------------
        grid = QGridLayout()
        grid.setHorizontalSpacing(10)
        grid.setVerticalSpacing(4)
        self.sky_combo = QComboBox()
        # long basis names elide in the closed box (the list shows them whole), so the
        # controls never widen the window past a laptop screen
        self.sky_combo.setSizeAdjustPolicy(
            QComboBox.SizeAdjustPolicy.AdjustToMinimumContentsLengthWithIcon)
        self.sky_combo.setMinimumContentsLength(18)
        self.sky_combo.view().setTextElideMode(Qt.TextElideMode.ElideNone)
        for key in SKY_KEYS:
            self.sky_combo.addItem(sky_choice_words(key, capital=True), key)
        self.sky_combo.setToolTip("Best available: the site's weather file if it has one, else "
                                  "its monthly values, else clear sky. Saved with the site and "
                                  "shared with the Tilt study and the Sheet.")
        self.sky_combo.currentIndexChanged.connect(self._sky_picked)
        self.weather_button = QPushButton("Choose weather file…")
        self.weather_button.clicked.connect(self.open_weather_dialog)
        self.model_combo = QComboBox()
        for key in MODEL_KEYS:
            self.model_combo.addItem(model_name(key, capital=True), key)
        self.model_combo.setToolTip("Sky-diffuse transposition model, shared with the Tilt "
                                    "study view")
        self.model_combo.currentIndexChanged.connect(self._model_picked)
        self.plane_combo = QComboBox()
        self.plane_combo.setSizeAdjustPolicy(
            QComboBox.SizeAdjustPolicy.AdjustToMinimumContentsLengthWithIcon)
        self.plane_combo.setMinimumContentsLength(22)
        self.plane_combo.view().setTextElideMode(Qt.TextElideMode.ElideNone)
        self.plane_combo.currentIndexChanged.connect(self._plane_picked)
        self.date_edit = QDateEdit()
        self.date_edit.setCalendarPopup(True)
        self.date_edit.setDisplayFormat("d MMMM yyyy")
        self.date_edit.setDateRange(QDate(REFERENCE_YEAR, 1, 1), QDate(REFERENCE_YEAR, 12, 31))
        self.date_edit.setDate(QDate(REFERENCE_YEAR, ctx.design_date.month,
                                     ctx.design_date.day))
        ctx.design_date_changed.connect(self._design_date_changed)
        self.date_edit.setToolTip(f"A date of the reference year {REFERENCE_YEAR} "
                                  "(the year every figure is computed for)")
        self.date_edit.dateChanged.connect(self._date_picked)
        for col, (text, w) in enumerate((("Sky basis", self.sky_combo),
                                         ("Transposition", self.model_combo))):
            grid.addWidget(QLabel(text), col, 0)
            grid.addWidget(w, col, 1)
        grid.addWidget(self.weather_button, 0, 2)
        grid.addWidget(QLabel("Plane"), 0, 4)
        grid.addWidget(self.plane_combo, 0, 5)
        grid.addWidget(QLabel("Date"), 1, 4)
        date_row = QHBoxLayout()
        date_row.addWidget(self.date_edit)
        date_row.addStretch(1)
        grid.addLayout(date_row, 1, 5)
        grid.setColumnMinimumWidth(3, 18)
        grid.setColumnStretch(6, 1)
        outer.addLayout(grid)
        self.sky_note = QLabel("")
        self.sky_note.setProperty("role", "muted")
        self.sky_note.setWordWrap(True)
        outer.addWidget(self.sky_note)
        self.monthly_reason = QLabel("")
        self.monthly_reason.setProperty("role", "muted")
        self.monthly_reason.setWordWrap(True)
        outer.addWidget(self.monthly_reason)

        # -- charts ---------------------------------------------------------------------
        self.charts = _Block()
        charts = QHBoxLayout(self.charts)
        charts.setContentsMargins(0, 0, 0, 0)
        charts.setSpacing(14)
        left = QVBoxLayout()
        self.day_title = QLabel("")
        self.day_title.setStyleSheet("font-weight: 600;")
        wrapping(self.day_title, lines=2)
        left.addWidget(self.day_title)
        self.day_widget = pg.GraphicsLayoutWidget()
        self.day_widget.setMinimumHeight(plots.CHART_MIN_HEIGHT_PX)
        self.day_plot = plots.plot_item()
        self.day_plot.setMenuEnabled(False)     # pyqtgraph's menu is not in our words
        self.day_widget.addItem(self.day_plot, row=0, col=0)
        theme.style_plot(self.day_plot, "Irradiance (W/m²)", "Local clock time (h)")
        self.day_plot.getAxis("left").setWidth(62)     # room for "1400" beside the label
        self.day_plot.setMouseEnabled(x=False, y=False)
        self.day_plot.hideButtons()
        self.day_plot.setXRange(0, 24, padding=0.0)
        self.day_plot.getAxis("bottom").setTicks(
            [[(h, f"{h:02d}:00") for h in range(0, 25, 3)], [(h, "") for h in range(25)]])
        self.day_items = {}
        for key in ("poa", "ghi", "dni", "dhi", "ghi_clear", "dni_extra"):
            item = pg.PlotDataItem([], [], pen=_pen(key), connect="finite")
            self.day_plot.addItem(item)
            self.day_items[key] = item
        self._shades = []
        left.addWidget(self.day_widget, 1)
        self.day_legend = Legend(2)
        left.addWidget(self.day_legend)
        self.day_totals = QLabel("")
        self.day_totals.setWordWrap(True)
        self.day_totals.setProperty("role", "muted")
        self.day_totals.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        left.addWidget(self.day_totals)
        charts.addLayout(left, 1)

        right = QVBoxLayout()
        self.bars_title = QLabel("")
        self.bars_title.setStyleSheet("font-weight: 600;")
        wrapping(self.bars_title, lines=2)
        right.addWidget(self.bars_title)
        self.bars_widget = pg.GraphicsLayoutWidget()
        self.bars_widget.setMinimumHeight(plots.CHART_MIN_HEIGHT_PX)
        self.bars_plot = plots.plot_item()
        self.bars_plot.setMenuEnabled(False)
        self.bars_widget.addItem(self.bars_plot, row=0, col=0)
        theme.style_plot(self.bars_plot, "Irradiation (kWh/m²/day)", "Month")
        self.bars_plot.getAxis("left").setWidth(62)    # room for "4.5" beside the label
        self.bars_plot.setMouseEnabled(x=False, y=False)
        self.bars_plot.hideButtons()
        self.bars_plot.showGrid(x=False, y=True, alpha=0.25)
        self.bars_plot.getAxis("bottom").setTicks([[(m, MONTH_ABBR[m - 1]) for m in range(1, 13)]])
        self.bars_plot.setXRange(0.5, 12.5, padding=0.0)
        self.bar_items: list[pg.BarGraphItem] = []
        right.addWidget(self.bars_widget, 1)
        self.bars_legend = Legend(3)
        right.addWidget(self.bars_legend)
        self.study_note = QLabel("")
        self.study_note.setWordWrap(True)
        self.study_note.setProperty("role", "muted")
        right.addWidget(self.study_note)
        charts.addLayout(right, 1)
        outer.addWidget(self.charts, 1)

        # -- annual table -----------------------------------------------------------------
        self.table_model = QStandardItemModel(0, 5, self)
        self.table_model.setHorizontalHeaderLabels(
            ["Option", "Tilt, azimuth (°)", "Annual\n(kWh/m²)", "Horizon\nloss (%)",
             "Sky basis"])
        self.table_model.setSortRole(Qt.ItemDataRole.UserRole)
        self.table = CopyableTable()
        self.table.setModel(self.table_model)
        hh = self.table.horizontalHeader()
        hh.setSortIndicator(-1, Qt.SortOrder.AscendingOrder)   # engine order until clicked
        hh.setStretchLastSection(True)
        self.table.verticalHeader().setDefaultSectionSize(20)
        self.table.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Fixed)
        self._fit_table(3)
        outer.addWidget(self.table)

        ctx.document.settings_changed.connect(self._on_sky_changed)
        ctx.study_changed.connect(self._on_study_changed)
        self._sync_controls()

    # -- controls -------------------------------------------------------------------------
    def _study_for_site(self):
        study = self.ctx.study
        if study is None or study.site != self.ctx.site:
            return None
        return study

    def _plane_choices(self) -> list[tuple[str, float, float]]:
        site = self.ctx.site
        out = [("Horizontal", 0.0, site.equator_azimuth_deg)]
        out += [(f"{p.label} ({plane_words(p.tilt_deg, p.azimuth_deg)})", p.tilt_deg,
                 p.azimuth_deg) for p in site.planes]
        study = self._study_for_site()
        if study is not None:
            fixed = study.option("fixed-optimal")
            fp = fixed.schedule[0]
            rec = study.recommended
            tag = ", recommended" if rec.kind == "fixed-optimal" else ""
            out.append((f"Study: optimal fixed{tag} ({plane_words(fp.tilt_deg, fp.azimuth_deg)})",
                        fp.tilt_deg, fp.azimuth_deg))
            if rec.kind != "fixed-optimal":
                p = rec.schedule[0]
                out.append((f"Study: recommended {_short(rec.label).lower()}, first period "
                            f"{day_words(p.start)} to {day_words(p.end)} "
                            f"({plane_words(p.tilt_deg, p.azimuth_deg)})",
                            p.tilt_deg, p.azimuth_deg))
        return out

    def _sync_controls(self) -> None:
        """Show the site's sky choice, its planes and what the site allows."""
        self._updating = True
        try:
            a = self.ctx.assessment
            site = a.site
            has_monthly = site.monthly_ghi_kwh_m2_day is not None
            item = self.sky_combo.model().item(2)
            item.setEnabled(has_monthly)
            self.monthly_reason.setText("" if has_monthly else
                                        "Monthly values unavailable: " + MONTHLY_MISSING)
            item.setToolTip("" if has_monthly else "Unavailable: " + MONTHLY_MISSING)
            self.monthly_reason.setVisible(not has_monthly)
            file_text = ("Weather file…" if a.weather is None
                         else f"Weather file: {a.weather.name}")
            self.sky_combo.setItemText(3, file_text)
            self.sky_combo.setCurrentIndex(self.sky_combo.findData(a.sky))
            self.model_combo.setCurrentIndex(self.model_combo.findData(a.model))
            previous = self.plane_combo.currentText()
            self._planes = self._plane_choices()
            self.plane_combo.clear()
            for label, _t, _a in self._planes:
                self.plane_combo.addItem(label)
            idx = self.plane_combo.findText(previous)
            self.plane_combo.setCurrentIndex(idx if idx >= 0 else min(1, len(self._planes) - 1))
            self._show_sky_note(None)
        finally:
            self._updating = False

    def _show_sky_note(self, summary) -> None:
        """The basis in use and why; the weather file's import summary once it is known."""
        try:
            basis = choose_basis(self.ctx.assessment) if summary is None else summary.basis
        except AssessmentError as exc:
            self.sky_note.setText(str(exc))
            self.sky_note.setToolTip("")
            return
        text = f"Sky basis: {basis.words} ({basis.reason})."
        tip = ""
        if basis.kind == "monthly":
            text += (" A synthetic hourly year scaled to the site's monthly mean daily GHI: "
                     "right monthly totals, no day-to-day weather.")
        elif basis.kind == "clear":
            text += " Every figure is an upper bound, not an expected yield (no clouds)."
        if summary is not None and summary.weather is not None:
            text += " Weather file " + summary.weather
            tip = "\n".join(summary.findings)
        if summary is not None:
            for w in summary.weather_warnings:
                text += " Warning (accepted): " + w
        self.sky_note.setText(text)
        self.sky_note.setToolTip(tip)

    def _sky_picked(self, index: int) -> None:
        if self._updating:
            return
        key = self.sky_combo.itemData(index)
        a = self.ctx.assessment
        if key == "file" and a.weather is None:
            self._sync_controls()
            self.open_weather_dialog()
            return
        if key == "monthly" and a.site.monthly_ghi_kwh_m2_day is None:
            self._sync_controls()
            return
        self.ctx.set_settings(sky=key)

    def _model_picked(self, index: int) -> None:
        if not self._updating:
            self.ctx.set_settings(model=self.model_combo.itemData(index))

    def _plane_picked(self, _index: int) -> None:
        if not self._updating:
            self._request(day=True, year=False)

    def _date_picked(self, date) -> None:
        if not self._updating:
            d = date.toPython()
            if (d.month, d.day) != (self.ctx.design_date.month, self.ctx.design_date.day):
                self.ctx.set_design_date(d)     # shared with the Sun path view
            self._request(day=True, year=False)

    def _design_date_changed(self, day) -> None:
        """The shared design date, in the reference year every figure here is for (29
        February becomes 28 February in a non-leap year)."""
        d = self.date_edit.date()
        if (d.month(), d.day()) != (day.month, day.day):
            q = QDate(REFERENCE_YEAR, day.month, day.day)
            self.date_edit.setDate(q if q.isValid() else QDate(REFERENCE_YEAR, day.month, 28))

    def open_weather_dialog(self) -> WeatherDialog:
        """Open the weather-file dialog (window-modal, not blocking) and return it."""
        w = self.ctx.assessment.weather
        path = w.path if w is not None else None
        self._dialog = WeatherDialog(self.ctx, self, path=path)
        self._dialog.finished.connect(lambda _r: self._sync_controls())
        self._dialog.open()
        return self._dialog

    # -- reacting to the shared state -------------------------------------------------------
    def _on_sky_changed(self, _sky) -> None:
        self._sync_controls()
        self._request(day=True, year=True)

    def _on_study_changed(self, _study) -> None:
        selected = self._selected_plane()
        self._sync_controls()
        self._request(day=self._selected_plane() != selected, year=True)

    def showEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().showEvent(event)
        self.activated()          # catch up on what changed while hidden

    def _request(self, day: bool, year: bool) -> None:
        if not self.isVisible():
            self._stale = True
            return
        self._submit(day, year)

    def refresh(self) -> None:
        super().refresh()
        self._sync_controls()
        self._submit(True, True)

    # -- engine work --------------------------------------------------------------------------
    def _selected_plane(self) -> tuple[str, float, float]:
        i = self.plane_combo.currentIndex()
        if 0 <= i < len(self._planes):
            return self._planes[i]
        return self._plane_choices()[0]

    def _submit(self, day: bool, year: bool) -> None:
        a = self.ctx.assessment
        if day:
            label, tilt, az = self._selected_plane()
            d = self.date_edit.date()
            date = f"{a.year:04d}-{d.month():02d}-{d.day():02d}"
            self.ctx.runner.submit_call(
                self.channel("day"),
                EngineCall(assessment_part, (a, "day_curves", date, tilt, az)),
                lambda result, name=label: self._show_day(result, name),
                label="Irradiance: day curves")
        if year:
            self.ctx.runner.submit_call(
                self.channel("summary"), EngineCall(assessment_part, (a, "summary")),
                self._show_sky_note, label="Irradiance: sky basis")
            self.ctx.runner.submit_call(
                self.channel("year"),
                EngineCall(assessment_part, (a, "option_totals")),
                self._show_rows, label="Irradiance: monthly and annual totals")

    # -- drawing --------------------------------------------------------------------------
    def _show_day(self, day, plane_label: str) -> None:
        self.day = day
        self.draw_in_stages(self.channel("day drawing"), (
            lambda: self._draw_day_curves(day, plane_label),
            lambda: self._draw_day_notes(day)))

    def _draw_day_curves(self, day, plane_label: str):
        """The day's curves; a generator that pauses after each curve (``run_in_stages``)."""
        s = day.series
        x = day.clock_hours
        up = day.sun_up
        basis = day.options.sky
        ghi_name = {"clear": "GHI, clear sky", "monthly": "GHI, monthly values",
                    "file": "GHI, weather file"}[basis]
        names = {"poa": f"Plane of array ({_short(plane_label)})", "ghi": ghi_name,
                 "dni": "DNI", "dhi": "DHI", "ghi_clear": "GHI, clear sky (reference)",
                 "dni_extra": "Extraterrestrial normal"}
        data = _day_columns(s)
        self.day_legend.clear()
        symbol = "o" if day.step_min >= 30 else None
        for key, item in self.day_items.items():
            y = np.asarray(data[key], dtype=float)
            show = not (key == "ghi_clear" and basis == "clear")
            if key == "dni_extra":
                y = np.where(up, y, np.nan)   # defined while the sun is up
            if show:
                item.setData(x, y, symbol=symbol if key != "dni_extra" else None, symbolSize=4,
                             symbolPen=None, symbolBrush=_DAY_STYLE[key][0])
                self.day_legend.add(names[key], pen=_pen(key))
            else:
                item.setData([], [])
            item.setVisible(show)
            yield

    def _draw_day_notes(self, day) -> None:
        """Shading where the horizon hides the sun, the range, title, legend, totals."""
        s = day.series
        up = day.sun_up
        data = _day_columns(s)
        for r in self._shades:
            self.day_plot.removeItem(r)
        self._shades = []
        behind = up & ~s["sun_visible"].to_numpy(dtype=bool)
        step_h = day.step_min / 60.0
        starts = s["interval_start"]
        start_h = (starts.dt.hour + starts.dt.minute / 60.0).to_numpy(dtype=float)
        for a, b in _runs(behind):
            region = pg.LinearRegionItem((start_h[a], min(start_h[b - 1] + step_h, 24.0)),
                                         movable=False, brush=_SHADE, pen=pg.mkPen(None))
            region.setZValue(-10)
            self.day_plot.addItem(region)
            self._shades.append(region)
        ymax = float(np.nanmax([np.nanmax(np.asarray(data[k], dtype=float)) for k in data]
                               + [100.0]))
        self.day_plot.setYRange(0, ymax * 1.05, padding=0.0)
        self.day_plot.setLabel("bottom", f"Local clock time, {day.site.timezone} (h)")
        date = day.date
        self.day_title.setText(f"{day_month(date, full=True)} {date.year}: {day.sky_label}"
                               + (", hourly values of the basis" if day.step_min >= 60 else ""))
        t = day.totals_kwh_m2
        if behind.any():
            self.day_legend.add("Sun behind the horizon", brush=QBrush(_SHADE))
        self.day_legend.finish()
        self.day_totals.setText(
            f"Day, kWh/m²: extraterrestrial horizontal "
            f"{t['extraterrestrial_horizontal_kwh_m2']:.2f} · GHI {t['ghi_kwh_m2']:.2f} · "
            f"DNI {t['dni_kwh_m2']:.2f} · DHI {t['dhi_kwh_m2']:.2f} · plane "
            f"{t['poa_kwh_m2']:.2f} = beam {t['poa_beam_kwh_m2']:.2f} + sky "
            f"{t['poa_sky_diffuse_kwh_m2']:.2f} + ground {t['poa_ground_kwh_m2']:.2f} "
            f"(horizon loss {t['horizon_loss_kwh_m2']:.2f})")

    def _show_rows(self, rows) -> None:
        self.rows = tuple(rows)
        # bars, notes and table in separate event-loop turns: the GUI stays responsive
        self.draw_in_stages(self.channel("rows"), (
            self._draw_bars, self._show_row_notes, self._fill_table))

    def _draw_bars(self):
        """The monthly bars, a few options per event-loop turn (a generator)."""
        for item in self.bar_items:
            self.bars_plot.removeItem(item)
        self.bar_items = []
        self.bars_legend.clear()
        shown, self.rows_not_barred = bar_rows(self.rows)
        n = len(shown)
        group = 0.84
        width = group / max(n, 1)
        top = 0.0
        for i, r in enumerate(shown):
            if i and i % 4 == 0:
                yield
            x = np.arange(1, 13) - group / 2 + width * (i + 0.5)
            h = r.mean_daily_kwh_m2_day
            top = max(top, float(np.max(h)))
            outline = pg.mkPen(theme.series_color(i).darker(135), width=0.8)
            bar = pg.BarGraphItem(x=x, height=h, width=width * 0.92, brush=_bar_brush(i),
                                  pen=outline)
            bar.setToolTip(degree_text(r.label))
            self.bars_plot.addItem(bar)
            self.bar_items.append(bar)
            self.bars_legend.add(_short(r.label), brush=_bar_brush(i), outline=outline)
        self.bars_legend.finish()
        self.bars_plot.setYRange(0, max(top, 0.1) * 1.06, padding=0.0)

    def _show_row_notes(self) -> None:
        own = [r.sky_label for r in self.rows if not r.from_study]
        basis = own[0] if own else ""
        left = self.rows_not_barred
        more = f" ({len(left)} more in the table)" if left else ""
        self.bars_title.setText(f"Monthly mean daily irradiation per option: {basis}{more}")
        # the study's options come from the same assessment, on the same sky
        self.study_note.setText("")
        self.study_note.setVisible(False)

    def _fill_table(self) -> None:
        m = self.table_model
        m.removeRows(0, m.rowCount())
        shown = bar_rows(self.rows)[0]
        for r in self.rows:
            name = _Item(degree_text(r.label))
            if r in shown:
                name.setIcon(_swatch_icon(shown.index(r)))
            loss = (NO_VALUE if r.horizon_loss_pct is None else f"{r.horizon_loss_pct:.1f}")
            cells = [name, _Item(r.plane_text),
                     _Item(number(r.annual_kwh_m2), r.annual_kwh_m2),
                     _Item(loss, -1.0 if r.horizon_loss_pct is None else r.horizon_loss_pct),
                     _Item(r.sky_label)]
            for c in (2, 3):
                cells[c].setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
            if r.horizon_loss_pct is None:
                cells[3].setToolTip("not defined for a plane that follows the sun")
            m.appendRow(cells)
        self._fit_table(m.rowCount())
        for c in range(m.columnCount() - 1):
            self.table.resizeColumnToContents(c)
            self.table.setColumnWidth(c, self.table.columnWidth(c) + 10)

    def _fit_table(self, n_rows: int) -> None:
        """Height for up to nine rows without scrolling."""
        head = max(self.table.horizontalHeader().sizeHint().height(), 40)
        rows = min(max(n_rows, 2), 9)
        self.table.setFixedHeight(head + rows * self.table.verticalHeader().defaultSectionSize()
                                  + 2 * self.table.frameWidth() + 2)
        if self.layout() is not None:
            self.layout().activate()     # lay out now, not at the next resize

    # -- what a test or the sheet reads ---------------------------------------------------------
    def table_rows(self) -> list[list[str]]:
        m = self.table_model
        return [[m.item(r, c).text() for c in range(m.columnCount())] for r in range(m.rowCount())]


def _runs(mask: np.ndarray):
    """(start, end) index pairs of the True runs of ``mask`` (end exclusive)."""
    m = np.concatenate([[False], np.asarray(mask, dtype=bool), [False]])
    d = np.diff(m.astype(int))
    return list(zip(np.flatnonzero(d == 1), np.flatnonzero(d == -1), strict=True))


__all__ = ["IrradianceView"]
