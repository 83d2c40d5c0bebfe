"""Horizon view: the measured horizon profile, the obstacles, and what they cost.

- The profile is a table (azimuth, elevation) and a chart of draggable points;
  a drag or an edit is proposed to the site when it is finished.
- Obstacles are a table and an "Add obstacle" form whose fields check their
  values as they are typed, with the engine's own limits.
- The effective horizon (profile and obstacles merged) and the annual horizon
  loss per plane are computed by the engine in the task runner.
- Profiles are imported from and exported to two-column CSV files.

The chart faces the same way as the Sun path view's flat chart
(:func:`tiltyard.engine.sunchart_design.chart_centre_deg`): the equator beyond
the tropics, so at a southern site north is in the middle; its points and
lines are in chart coordinates (``chart_x``) and go back to azimuths on commit.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPointF, QRectF, Qt, QTimer
from PySide6.QtGui import QBrush, QColor, QPen, QStandardItem, QStandardItemModel
from PySide6.QtWidgets import (
    QAbstractItemView,
    QFileDialog,
    QFormLayout,
    QGraphicsRectItem,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPushButton,
    QTableWidget,
    QTableWidgetItem,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from tiltyard.engine.assess import AssessmentError, assessment_part, choose_basis
from tiltyard.engine.horizon import merged_profile
from tiltyard.engine.horizon_io import read_horizon_csv, write_horizon_csv
from tiltyard.engine.site import HorizonProfile, Obstacle, SiteError
from tiltyard.engine.sunchart_design import chart_centre_deg, chart_x
from tiltyard.engine.words import (
    bearing,
    compass,
    compass_tick,
    degrees,
    field_message,
    model_name,
    number,
    user_text,
)

from .. import plots, theme
from ..engine_process import EngineCall
from ..widgets import CopyableTable, ValidatedField, View, wrapping

#: Elevations a profile point may be dragged to, degrees (the range
#: HorizonProfile accepts; the engine still validates on commit).
ELEVATION_LIMITS_DEG = (-30.0, 90.0)
#: Smallest azimuth gap kept between neighbouring points while dragging, degrees.
MIN_GAP_DEG = 0.1
#: The chart shows this much beyond 0° and 360° (the horizon continues across north).
X_MARGIN_DEG = 12.0
CSV_FILTER = "CSV files (*.csv *.txt);;All files (*)"
OBSTACLE_COLOR = theme.SERIES[1]
INVALID_CELL = QColor("#fdf3f2")


def _fmt(v: float, digits: int = 1) -> str:
    text = f"{v:.{digits}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def _to_float(text: str, field: str, unit: str) -> float:
    t = text.strip().replace(",", ".")
    in_unit = "degrees" if unit == "°" else unit
    if not t:
        raise SiteError(field, text, f"is required: type a number in {in_unit}")
    try:
        value = float(t)
    except ValueError:
        raise SiteError(field, text, f"is not a number (type one in {in_unit})") from None
    if not math.isfinite(value):
        raise SiteError(field, text, "must be a finite number")
    return value


#: Form fields of an obstacle: attribute, label, unit, placeholder.
OBSTACLE_FIELDS = (
    ("bearing_deg", "Bearing of centre", "°", "e.g. 200"),
    ("width_deg", "Width (angle)", "°", "e.g. 14"),
    ("distance_m", "Distance", "m", "e.g. 18"),
    ("height_m", "Height above panels", "m", "e.g. 9.5"),
)
_PROBE = {"bearing_deg": 180.0, "width_deg": 10.0, "distance_m": 10.0, "height_m": 1.0}
_UNITS = {"bearing_deg": "°", "width_deg": "°", "distance_m": "m", "height_m": "m"}
_CAPTIONS = {name: caption for name, caption, _u, _p in OBSTACLE_FIELDS}


def parse_obstacle_value(name: str, text: str) -> float:
    """Parse one obstacle field and check it with the Obstacle constructor.

    Raises SiteError whose reason names the field by its label in the form
    ("Distance must be between 0.1 and 100000 m"), so the message beside the
    field says which value and which range in the user's words.
    """
    caption = _CAPTIONS[name]
    try:
        value = _to_float(text, name, _UNITS[name])
        Obstacle("probe", **{**_PROBE, name: value})
    except SiteError as exc:
        raise SiteError(name, text.strip(), f"{caption} {exc.reason}") from None
    return value


class DraggablePoints(pg.ScatterPlotItem):
    """Scatter points the user can drag with the left mouse button.

    Points stay in azimuth order: a point can move between its neighbours
    only (``MIN_GAP_DEG`` apart), within 0-360° and the elevation limits.
    ``moved(index, x, y)`` is called during the drag, ``finished(xs, ys)``
    once when the button is released.
    """

    def __init__(self, moved=None, finished=None, **kw):
        super().__init__(**kw)
        self._moved = moved
        self._finished = finished
        self._drag_index: int | None = None
        self._offset = QPointF(0.0, 0.0)
        self._x = np.zeros(0)
        self._y = np.zeros(0)
        self.bounds = (0.0, 360.0)            # the chart's edges, chart coordinates

    def set_points(self, x, y) -> None:
        self._x = np.asarray(x, dtype=float).copy()
        self._y = np.asarray(y, dtype=float).copy()
        self.setData(x=self._x, y=self._y, data=np.arange(self._x.size))

    @property
    def dragging(self) -> bool:
        return self._drag_index is not None

    def values(self) -> tuple[np.ndarray, np.ndarray]:
        return self._x.copy(), self._y.copy()

    def _limits(self, i: int) -> tuple[float, float]:
        lo = self.bounds[0] if i == 0 else self._x[i - 1] + MIN_GAP_DEG
        hi = (self.bounds[1] - MIN_GAP_DEG) if i == self._x.size - 1 \
            else self._x[i + 1] - MIN_GAP_DEG
        return lo, hi

    def move_point(self, i: int, x: float, y: float) -> tuple[float, float]:
        """Move point ``i`` to (x, y), kept between its neighbours; returns where it went."""
        lo, hi = self._limits(i)
        x = float(min(max(x, lo), hi))
        y = float(min(max(y, ELEVATION_LIMITS_DEG[0]), ELEVATION_LIMITS_DEG[1]))
        self._x[i], self._y[i] = round(x, 1), round(y, 1)
        self.setData(x=self._x, y=self._y, data=np.arange(self._x.size))
        return self._x[i], self._y[i]

    def index_at(self, pos: QPointF) -> int | None:
        """Index of the point under ``pos`` (item coordinates), or None."""
        pts = self.pointsAt(pos)
        if len(pts) == 0:
            return None
        return int(pts[0].index())

    def mouseDragEvent(self, ev):  # noqa: N802 - pyqtgraph override
        if ev.button() != Qt.MouseButton.LeftButton:
            ev.ignore()
            return
        if ev.isStart():
            i = self.index_at(ev.buttonDownPos())
            if i is None:
                ev.ignore()
                return
            self._drag_index = i
            self._offset = QPointF(self._x[i], self._y[i]) - ev.buttonDownPos()
        elif self._drag_index is None:
            ev.ignore()
            return
        ev.accept()
        i = self._drag_index
        target = ev.pos() + self._offset
        x, y = self.move_point(i, target.x(), target.y())
        if self._moved is not None:
            self._moved(i, x, y)
        if ev.isFinish():
            self._drag_index = None
            if self._finished is not None:
                self._finished(tuple(self._x.tolist()), tuple(self._y.tolist()))


def _num_item(text: str, editable: bool = True) -> QTableWidgetItem:
    item = QTableWidgetItem(text)
    item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
    if not editable:
        item.setFlags(item.flags() & ~Qt.ItemFlag.ItemIsEditable)
        item.setForeground(QColor(theme.MUTED))
    return item


def _read_only(text: str) -> QTableWidgetItem:
    item = QTableWidgetItem(text)
    item.setFlags(item.flags() & ~Qt.ItemFlag.ItemIsEditable)
    item.setForeground(QColor(theme.MUTED))
    return item


class HorizonView(View):
    title = "Horizon"

    def __init__(self, ctx, parent=None):
        super().__init__(ctx, parent)
        self._updating = False
        self._centre = 180.0                  # what the chart faces (chart_centre_deg)
        self._select_az: float | None = None
        self._merged: HorizonProfile | None = None
        self._y_range = (-5.0, 25.0)
        self._obstacle_items: list = []
        self._fill_timer = QTimer(self)
        self._fill_timer.setSingleShot(True)
        self._fill_timer.setInterval(0)
        self._fill_timer.timeout.connect(self._fill_tables)

        # no scroll area: its height-for-width sizing would make the page taller than
        # the window; the page's minimum fits well inside the space a view gets
        page = QVBoxLayout(self)
        page.setContentsMargins(18, 10, 18, 8)
        page.setSpacing(6)
        head = QLabel("Horizon and obstacles")
        head.setProperty("role", "heading")
        page.addWidget(head)
        columns = QHBoxLayout()
        columns.setSpacing(16)
        page.addLayout(columns, 1)
        left = QVBoxLayout()
        left.setSpacing(8)
        # the profile and the obstacles share the right-hand column as two tabs, so
        # each has the full height for its table, its form and their messages
        self.tabs = QTabWidget()
        columns.addLayout(left, 11)
        columns.addWidget(self.tabs, 10)

        # -- chart ----------------------------------------------------------------
        chart_box = QWidget()
        cl = QVBoxLayout(chart_box)
        cl.setContentsMargins(0, 0, 0, 0)
        self.plot_widget = plots.plot_widget()
        self.plot_widget.setMinimumHeight(250)
        self.plot = self.plot_widget.getPlotItem()
        theme.style_plot(self.plot, "Elevation (°)", "Azimuth (° clockwise from true north)")
        self.plot.setMenuEnabled(False)
        self.plot.hideButtons()
        self.plot.setMouseEnabled(x=False, y=False)
        self.plot.getViewBox().setDefaultPadding(0.0)
        self._set_ticks()
        self.zero_line = pg.InfiniteLine(0.0, angle=0, movable=False,
                                         pen=pg.mkPen(theme.MUTED, width=1,
                                                      style=Qt.PenStyle.DashLine))
        self.zero_line.setZValue(3)
        self.plot.addItem(self.zero_line)
        self.horizon_curve = pg.PlotDataItem(
            [], [], pen=pg.mkPen(theme.HORIZON_LINE, width=2), fillLevel=-90.0,
            brush=pg.mkBrush(*theme.HORIZON_FILL), name="effective horizon (profile + obstacles)")
        self.horizon_curve.setZValue(1)
        self.plot.addItem(self.horizon_curve)
        self.points = DraggablePoints(
            moved=self._point_moved, finished=self._drag_finished, size=11, symbol="o",
            pen=pg.mkPen("white", width=1.5), brush=pg.mkBrush(theme.ACCENT),
            hoverable=True, hoverSize=15, hoverBrush=pg.mkBrush(theme.SERIES[0]),
            name="measured points (drag to move)")
        self.points.setZValue(10)
        self.plot.addItem(self.points)
        legend = self.plot.addLegend(offset=(6, 2), labelTextSize="8.5pt", colCount=3)
        legend.setBrush(pg.mkBrush(255, 255, 255, 230))
        legend.addItem(self.horizon_curve, "effective horizon")
        legend.addItem(self.points, "measured point (drag)")
        self._obstacle_proxy = pg.BarGraphItem(x=[0], height=[0], width=0,
                                               brush=self._obstacle_brush(),
                                               pen=pg.mkPen(OBSTACLE_COLOR, width=1.5))
        legend.addItem(self._obstacle_proxy, "obstacle")
        cl.addWidget(self.plot_widget, 1)
        self.readout = QLabel("Drag a point up, down or sideways to reshape the horizon; "
                              "it is stored when you let go.")
        self.readout.setProperty("role", "muted")
        wrapping(self.readout, lines=2)
        cl.addWidget(self.readout)
        left.addWidget(chart_box, 1)

        # -- profile table ------------------------------------------------------------
        prof = QWidget()
        pl = QVBoxLayout(prof)
        pl.setContentsMargins(10, 10, 10, 8)
        self.profile_table = QTableWidget(0, 3)
        self.profile_table.setHorizontalHeaderLabels(["Azimuth (°)", "Elevation (°)",
                                                      "Direction"])
        self.profile_table.verticalHeader().setVisible(False)
        self.profile_table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Stretch)
        self.profile_table.setMinimumHeight(120)
        self.profile_table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.profile_table.itemChanged.connect(self._profile_edited)
        pl.addWidget(self.profile_table, 1)
        self.profile_empty = QLabel("No measured points: the horizon is flat at 0° apart from "
                                    "the obstacles. Add points or import a CSV file.")
        self.profile_empty.setProperty("role", "muted")
        self.profile_empty.setWordWrap(True)
        pl.addWidget(self.profile_empty)
        brow = QHBoxLayout()
        self.add_point_button = QPushButton("Add point")
        self.add_point_button.setToolTip("Add a point in the middle of the widest gap")
        self.add_point_button.clicked.connect(self.add_point)
        self.delete_points_button = QPushButton("Delete selected")
        self.delete_points_button.clicked.connect(self.delete_selected_points)
        self.import_button = QPushButton("Import CSV…")
        self.import_button.setToolTip("Two columns: azimuth (°, clockwise from north) and "
                                      "elevation (°); a header line is optional; commas or "
                                      "semicolons between them (with semicolons, a decimal "
                                      "comma too)")
        self.import_button.clicked.connect(self._import_clicked)
        self.export_button = QPushButton("Export CSV…")
        self.export_button.clicked.connect(self._export_clicked)
        for b in (self.add_point_button, self.delete_points_button, self.import_button,
                  self.export_button):
            brow.addWidget(b)
        brow.addStretch(1)
        pl.addLayout(brow)
        self.profile_error = QLabel()
        self.profile_error.setProperty("role", "fieldError")
        self.profile_error.setWordWrap(True)
        self.profile_error.hide()
        pl.addWidget(self.profile_error)
        self.io_message = QLabel()
        self.io_message.setWordWrap(True)
        self.io_message.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.io_message.hide()
        pl.addWidget(self.io_message)
        hint = QLabel("Azimuth clockwise from true north (south = 180°); elevation is "
                      "negative where the ground falls away.")
        hint.setProperty("role", "muted")
        hint.setWordWrap(True)
        pl.addWidget(hint)
        self.profile_tab = prof
        self.tabs.addTab(prof, "Measured profile")

        # -- horizon loss -------------------------------------------------------------
        loss = QGroupBox("Annual irradiation lost to the horizon")
        ll = QVBoxLayout(loss)
        self.loss_figure = QLabel("…")
        self.loss_figure.setProperty("role", "figure")
        self.loss_figure.setWordWrap(True)
        ll.addWidget(self.loss_figure)
        self.loss_model = QStandardItemModel(0, 6)
        self.loss_model.setHorizontalHeaderLabels([
            "Plane", "Open\n(kWh/m²)", "With horizon\n(kWh/m²)", "Loss\n(%)",
            "Beam loss\n(%)", "Sky-view\nfactor"])
        self.loss_table = CopyableTable()
        self.loss_table.setSortingEnabled(False)
        self.loss_table.setModel(self.loss_model)
        self.loss_table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        hh = self.loss_table.horizontalHeader()
        hh.setSectionResizeMode(0, QHeaderView.ResizeMode.Stretch)
        for c in range(1, 6):
            hh.setSectionResizeMode(c, QHeaderView.ResizeMode.ResizeToContents)
        self.loss_table.setMinimumHeight(110)
        self.loss_table.setSizeAdjustPolicy(QAbstractItemView.SizeAdjustPolicy.AdjustToContents)
        self.loss_table.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAsNeeded)
        self.loss_table.setWordWrap(True)
        self.loss_table.verticalHeader().setSectionResizeMode(
            QHeaderView.ResizeMode.ResizeToContents)
        ll.addWidget(self.loss_table, 0)
        self.loss_note = QLabel()
        self.loss_note.setProperty("role", "muted")
        wrapping(self.loss_note, lines=6)  # the column is narrow on a 1024 px screen
        ll.addWidget(self.loss_note)
        left.addWidget(loss, 0)

        # -- obstacles ------------------------------------------------------------------
        obs = QWidget()
        ol = QVBoxLayout(obs)
        ol.setContentsMargins(10, 10, 10, 8)
        what = QLabel("Trees, buildings and masts measured on site: bearing of the centre, "
                      "angular width, horizontal distance and height above the panels.")
        what.setProperty("role", "muted")
        what.setWordWrap(True)
        ol.addWidget(what)
        self.obstacle_table = QTableWidget(0, 6)
        self.obstacle_table.setHorizontalHeaderLabels([
            "Label", "Bearing\n(°)", "Width\n(°)", "Distance\n(m)", "Height above\npanels (m)",
            "Elevation\n(°)"])
        self.obstacle_table.horizontalHeaderItem(5).setToolTip(
            "Elevation angle of the top seen from the panels, atan(height / distance); "
            "read-only")
        self.obstacle_table.verticalHeader().setVisible(False)
        oh = self.obstacle_table.horizontalHeader()
        oh.setSectionResizeMode(0, QHeaderView.ResizeMode.Stretch)
        for c, w in zip(range(1, 6), (64, 56, 72, 104, 74), strict=True):
            oh.setSectionResizeMode(c, QHeaderView.ResizeMode.Fixed)
            self.obstacle_table.setColumnWidth(c, w)
        self.obstacle_table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.obstacle_table.setMinimumHeight(96)
        self.obstacle_table.setMaximumHeight(230)
        self.obstacle_table.setWordWrap(True)
        self.obstacle_table.verticalHeader().setSectionResizeMode(
            QHeaderView.ResizeMode.ResizeToContents)
        self.obstacle_table.itemChanged.connect(self._obstacles_edited)
        ol.addWidget(self.obstacle_table, 3)
        self.remove_obstacles_button = QPushButton("Remove selected")
        self.remove_obstacles_button.clicked.connect(self.remove_selected_obstacles)
        rrow = QHBoxLayout()
        self.obstacle_hint = QLabel()
        self.obstacle_hint.setProperty("role", "muted")
        self.obstacle_hint.setWordWrap(True)
        rrow.addWidget(self.obstacle_hint, 1)
        rrow.addWidget(self.remove_obstacles_button)
        ol.addLayout(rrow)
        self.obstacle_error = QLabel()
        self.obstacle_error.setProperty("role", "fieldError")
        self.obstacle_error.setWordWrap(True)
        self.obstacle_error.hide()
        ol.addWidget(self.obstacle_error)

        add_title = QLabel("Add an obstacle")
        add_title.setStyleSheet("font-weight: 600;")
        ol.addWidget(add_title)
        form = QFormLayout()
        form.setHorizontalSpacing(10)
        form.setVerticalSpacing(4)
        form.setLabelAlignment(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignTop)
        self.obstacle_fields: dict[str, ValidatedField] = {}
        self.obstacle_label = ValidatedField(self._parse_label, "e.g. ash tree by the lane")
        form.addRow("Label", self.obstacle_label)
        for name, caption, unit, placeholder in OBSTACLE_FIELDS:
            f = ValidatedField(lambda t, n=name: parse_obstacle_value(n, t), placeholder, unit)
            f.edit.textEdited.connect(self._preview_obstacle)
            f.edit.returnPressed.connect(self.add_obstacle)
            self.obstacle_fields[name] = f
            form.addRow(caption, f)
        self.add_obstacle_button = QPushButton("Add obstacle")
        self.add_obstacle_button.clicked.connect(self.add_obstacle)
        arow = QHBoxLayout()
        arow.addWidget(self.add_obstacle_button)
        arow.addStretch(1)
        form.addRow("", arow)
        ol.addLayout(form)
        self.obstacle_preview = QLabel()
        self.obstacle_preview.setProperty("role", "muted")
        self.obstacle_preview.setWordWrap(True)
        ol.addWidget(self.obstacle_preview)
        self.form_message = QLabel()
        self.form_message.setProperty("role", "fieldError")
        self.form_message.setWordWrap(True)
        self.form_message.hide()
        ol.addWidget(self.form_message)
        ol.addStretch(1)
        self.obstacle_tab = obs
        self.tabs.addTab(obs, "Obstacles")
        self.show_site(ctx.site)

    # -- small helpers -----------------------------------------------------------
    @staticmethod
    def _obstacle_brush() -> QBrush:
        brush = QBrush(QColor(OBSTACLE_COLOR), Qt.BrushStyle.BDiagPattern)
        return brush

    def _set_ticks(self) -> None:
        lo = self._centre - 180.0
        major = []
        for i in range(9):
            v = lo + 45.0 * i
            major.append((v, compass_tick(v, "\n")))
        minor = [(lo + 15.0 * i, "") for i in range(25) if i % 3]
        axis = self.plot.getAxis("bottom")
        axis.setTicks([major, minor])
        axis.setStyle(hideOverlappingLabels=False)
        axis.setHeight(56)                    # two-line tick labels and the axis title
        self.plot.setXRange(lo - X_MARGIN_DEG, lo + 360.0 + X_MARGIN_DEG, padding=0.0)

    def _face(self, site) -> None:
        """Face the chart the way the Sun path view's flat chart faces for ``site``."""
        centre = chart_centre_deg(site.latitude_deg)
        if centre != self._centre:
            self._centre = centre
            self._set_ticks()
        self.points.bounds = (centre - 180.0, centre + 180.0)

    def _chart_points(self, azimuth_deg, elevation_deg):
        """Profile points in chart coordinates, in chart order."""
        x = chart_x(np.asarray(azimuth_deg, dtype=float), self._centre)
        y = np.asarray(elevation_deg, dtype=float)
        order = np.argsort(x, kind="stable")
        return x[order], y[order]

    @staticmethod
    def _azimuths(xs) -> tuple:
        """Chart coordinates back to azimuths 0-360 (rounded to 0.1°)."""
        return tuple(round(float(x) % 360.0, 1) for x in xs)

    def _propose(self, **changes) -> bool:
        return self.ctx.propose(**changes)

    # -- computations --------------------------------------------------------------
    def refresh(self) -> None:
        super().refresh()
        a = self.ctx.assessment
        self._submit_line(a.site)
        self.loss_note.setText("Updating…")
        self.ctx.runner.submit_call(self.channel("loss"),
                                    EngineCall(assessment_part, (a, "horizon_loss")),
                                    self._show_loss, label="Horizon loss")

    def _submit_line(self, site) -> None:
        self.ctx.runner.submit_call(self.channel("line"),
                                    EngineCall(merged_profile, (site, 1.0), progress_arg=None),
                                    self._show_line, label="Effective horizon")

    def _show_line(self, profile: HorizonProfile) -> None:
        self._merged = profile
        self.draw_in_stages(self.channel("line drawing"), (lambda: self._draw_line(profile),))

    def _draw_line(self, profile: HorizonProfile) -> None:
        az = np.asarray(profile.azimuth_deg, dtype=float)
        el = np.asarray(profile.elevation_deg, dtype=float)
        if az.size == 0:
            az, el = np.array([0.0]), np.array([0.0])
        lo = self._centre - 180.0
        az, el = self._chart_points(az, el)
        if az[0] > lo:                       # close the curve across the chart's edge
            az = np.concatenate([[lo], az])
            el = np.concatenate([[el[-1]], el])
        az = np.concatenate([az, [lo + 360.0]])
        el = np.concatenate([el, [el[0]]])
        # continue the periodic horizon a little past the edge on both sides
        before = az[:-1] > lo + 360.0 - X_MARGIN_DEG - 1.0
        after = az[1:] < lo + X_MARGIN_DEG + 1.0
        az = np.concatenate([az[:-1][before] - 360.0, az, az[1:][after] + 360.0])
        el = np.concatenate([el[:-1][before], el, el[1:][after]])
        self.horizon_curve.setData(az, el)
        self.horizon_curve.setFillLevel(self._y_range[0] - 100.0)

    def _show_loss(self, result) -> None:
        self.draw_in_stages(self.channel("loss drawing"), (lambda: self._fill_loss(result),))

    def _fill_loss(self, result) -> None:
        self.loss_model.setRowCount(0)
        for p in result.planes:
            name = "Horizontal" if p is result.horizontal else p.label
            first = QStandardItem(name)
            first.setToolTip(f"tilt {degrees(p.surface_tilt)}, azimuth "
                             f"{bearing(p.surface_azimuth)}")
            cells = [first]
            for text, tip in (
                    (number(p.open_kwh_m2), ""),
                    (number(p.site_kwh_m2), ""),
                    (f"{p.loss_pct:.1f}", f"{p.loss_kwh_m2:.1f} kWh/m² a year"),
                    (f"{p.beam_loss_pct:.1f}", f"{p.beam_loss_kwh_m2:.1f} kWh/m² of beam; "
                                               f"sky diffuse {p.sky_diffuse_loss_pct:.1f} % "
                                               f"({p.sky_diffuse_loss_kwh_m2:.1f} kWh/m²)"),
                    (f"{p.sky_view_factor:.3f}", f"open horizon: {p.sky_view_factor_open:.3f}")):
                item = QStandardItem(text)
                item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
                if tip:
                    item.setToolTip(tip)
                cells.append(item)
            self.loss_model.appendRow(cells)
        h = result.horizontal
        verb = "lost" if h.loss_kwh_m2 >= 0 else "gained"
        self.loss_figure.setText(
            f"Horizontal plane: {abs(h.loss_pct):.1f} % {verb} "
            f"({number(abs(h.loss_kwh_m2))} of {number(h.open_kwh_m2)} kWh/m² a year)")
        try:
            sky = choose_basis(self.ctx.assessment).words
        except AssessmentError as exc:
            sky = str(exc)
        model = model_name(result.options.model)
        self.loss_note.setText(
            f"Sky: {sky}; {model} sky diffuse; reference year {result.options.year}, "
            f"{result.options.step_min}-minute steps. Losses in % of the open-horizon "
            "irradiation; beam counts only while the sun is above the horizon; ground-reflected "
            "light is not reduced; a negative loss is a gain (horizon below the horizontal).")

    # -- showing the site ----------------------------------------------------------
    def _on_site_changed(self, site) -> None:
        self.draw_in_stages(self.channel("site drawing"), (lambda: self.show_site(site),))
        super()._on_site_changed(site)

    def show_site(self, site) -> None:
        prof = site.horizon
        els = list(prof.elevation_deg) + [o.elevation_deg for o in site.obstacles] + [0.0]
        lo = min(-5.0, math.floor(min(els) / 5.0) * 5.0 - 5.0)
        hi = min(90.0, max(25.0, math.ceil((max(els) + 12.0) / 5.0) * 5.0))
        if not self.points.dragging:
            self._face(site)
            self._y_range = (lo, hi)
            self.plot.setYRange(lo, hi, padding=0.0)
            self.points.set_points(*self._chart_points(prof.azimuth_deg, prof.elevation_deg))
        self.horizon_curve.setFillLevel(self._y_range[0] - 100.0)
        self._draw_obstacles(site.obstacles)
        self._fill_timer.start()

    def _draw_obstacles(self, obstacles) -> None:
        for item in self._obstacle_items:
            self.plot.removeItem(item)
        self._obstacle_items = []
        pen = QPen(QColor(OBSTACLE_COLOR))
        pen.setWidthF(1.5)
        pen.setCosmetic(True)
        lo, hi = self._centre - 180.0, self._centre + 180.0
        for ob in obstacles:
            top = ob.elevation_deg
            mid = float(chart_x(ob.bearing_deg, self._centre))
            start = mid - ob.width_deg / 2.0
            end = mid + ob.width_deg / 2.0
            spans = [(start, end)]
            if start < lo:
                spans = [(lo, end), (start + 360.0, hi)]
            elif end > hi:
                spans = [(start, hi), (lo, end - 360.0)]
            for a, b in spans:
                rect = QGraphicsRectItem(QRectF(a, 0.0, b - a, top))
                rect.setPen(pen)
                rect.setBrush(self._obstacle_brush())
                rect.setZValue(2)
                self.plot.addItem(rect)
                self._obstacle_items.append(rect)
            text = pg.TextItem(f"{ob.label}\n{_fmt(top)}°", color=theme.TEXT, anchor=(0.5, 1.0))
            text.setFont(theme.plot_font(8.5))
            x = mid
            if start < lo or end > hi:
                x = lo + (max(end - 360.0, lo) - lo) / 2.0 if end > hi else lo + (end - lo) / 2.0
            text.setPos(min(max(x, lo + 12.0), hi - 12.0), top)
            text.setZValue(5)
            self.plot.addItem(text)
            self._obstacle_items.append(text)

    def _fill_tables(self) -> None:
        site = self.ctx.site
        self._updating = True
        try:
            prof = site.horizon
            t = self.profile_table
            t.setRowCount(len(prof.azimuth_deg))
            select = None
            for r, (az, el) in enumerate(zip(prof.azimuth_deg, prof.elevation_deg,
                                             strict=True)):
                t.setItem(r, 0, _num_item(_fmt(az, 2)))
                t.setItem(r, 1, _num_item(_fmt(el, 2)))
                t.setItem(r, 2, _read_only(compass(az)))
                if self._select_az is not None and abs(az - self._select_az) < 1e-9:
                    select = r
            if select is not None:
                t.selectRow(select)
                t.scrollToItem(t.item(select, 0))
            self._select_az = None
            self.profile_empty.setVisible(prof.is_empty)
            self.profile_error.hide()
            o = self.obstacle_table
            o.setRowCount(len(site.obstacles))
            for r, ob in enumerate(site.obstacles):
                o.setItem(r, 0, QTableWidgetItem(ob.label))
                for c, v in enumerate((ob.bearing_deg, ob.width_deg, ob.distance_m,
                                       ob.height_m), start=1):
                    o.setItem(r, c, _num_item(_fmt(v, 2)))
                o.setItem(r, 5, _num_item(_fmt(ob.elevation_deg, 1), editable=False))
            self.obstacle_error.hide()
            self.obstacle_hint.setText("Double-click a cell to edit it." if site.obstacles else
                                       "No obstacles yet: add one with the form below.")
            self.tabs.setTabText(self.tabs.indexOf(self.profile_tab),
                                 f"Measured profile ({len(prof.azimuth_deg)} points)")
            self.tabs.setTabText(self.tabs.indexOf(self.obstacle_tab),
                                 f"Obstacles ({len(site.obstacles)})")
        finally:
            self._updating = False

    # -- profile edits ----------------------------------------------------------------
    def _point_moved(self, index: int, az: float, el: float) -> None:
        self.readout.setText(f"Point {index + 1}: azimuth {bearing(az % 360.0, decimals=1)}, "
                             f"elevation {el:.1f}°; let go to keep it")
        xs, ys = self.points.values()
        site = self.ctx.site
        try:
            preview = site.with_changes(horizon=HorizonProfile(self._azimuths(xs),
                                                               tuple(ys.tolist())))
        except SiteError:
            return
        self._submit_line(preview)

    def _drag_finished(self, xs: tuple, ys: tuple) -> None:
        self.readout.setText("Drag a point up, down or sideways to reshape the horizon; "
                             "it is stored when you let go.")
        try:
            profile = HorizonProfile(self._azimuths(xs), ys)
        except SiteError as exc:
            self.ctx.notify("error", str(exc))
            self.show_site(self.ctx.site)
            return
        if not self._propose(horizon=profile):
            self.show_site(self.ctx.site)

    def _read_profile_table(self) -> HorizonProfile | None:
        t = self.profile_table
        azs, els, rows_of = [], [], {}
        for r in range(t.rowCount()):
            texts = [(t.item(r, c).text() if t.item(r, c) is not None else "") for c in (0, 1)]
            try:
                az = _to_float(texts[0], "Azimuth", "°")
                el = _to_float(texts[1], "Elevation", "°")
                if not 0.0 <= az <= 360.0:
                    raise SiteError("Azimuth", texts[0], "must be between 0° and 360°")
                try:
                    HorizonProfile((az,), (el,))
                except SiteError as exc:       # the profile's own limits, in the column's name
                    raise SiteError("Elevation", texts[1], exc.reason) from None
            except SiteError as exc:
                self._table_error(r, f"Row {r + 1}: "
                                     f"{field_message(exc.value, exc.reason, exc.field)}")
                return None
            key = az % 360.0
            if key in rows_of:
                self._table_error(r, f"Row {r + 1}: azimuth {_fmt(az, 2)}° repeats row "
                                     f"{rows_of[key] + 1} (each direction once; 0 and 360 "
                                     "are the same)")
                return None
            rows_of[key] = r
            azs.append(az)
            els.append(el)
        return HorizonProfile(tuple(azs), tuple(els))

    def _table_error(self, row: int, message: str) -> None:
        self.profile_error.setText(message)
        self.profile_error.show()
        self._updating = True
        try:
            for c in (0, 1):
                item = self.profile_table.item(row, c)
                if item is not None:
                    item.setBackground(INVALID_CELL)
        finally:
            self._updating = False

    def _profile_edited(self, _item) -> None:
        if self._updating:
            return
        profile = self._read_profile_table()
        if profile is None:
            return
        self.profile_error.hide()
        if self._propose(horizon=profile):
            self._fill_timer.start()          # sorted by azimuth, even if nothing changed

    def add_point(self) -> None:
        """Add a point in the middle of the widest azimuth gap (at the gap's lower edge)."""
        prof = self.ctx.site.horizon
        if prof.is_empty:
            az, el = self.ctx.site.equator_azimuth_deg, 0.0
        else:
            xs = np.asarray(prof.azimuth_deg)
            gaps = np.diff(np.concatenate([xs, [xs[0] + 360.0]]))
            i = int(np.argmax(gaps))
            if gaps[i] < 2 * MIN_GAP_DEG:
                self.ctx.notify("warning", "no room for another point: the profile is full")
                return
            az = round(float((xs[i] + gaps[i] / 2.0) % 360.0), 1)
            el = float(min(prof.elevation_deg[i], prof.elevation_deg[(i + 1) % xs.size]))
        self._select_az = az
        self._propose(horizon=HorizonProfile(prof.azimuth_deg + (az,),
                                             prof.elevation_deg + (el,)))

    def delete_selected_points(self) -> None:
        rows = {i.row() for i in self.profile_table.selectedIndexes()}
        if not rows:
            return
        prof = self.ctx.site.horizon
        keep = [i for i in range(len(prof.azimuth_deg)) if i not in rows]
        self._propose(horizon=HorizonProfile(tuple(prof.azimuth_deg[i] for i in keep),
                                             tuple(prof.elevation_deg[i] for i in keep)))

    # -- obstacles ---------------------------------------------------------------------
    @staticmethod
    def _parse_label(text: str) -> str:
        if len(text) > 120:
            raise SiteError("label", text[:20] + "…", "label must be at most 120 characters")
        return text.strip()

    def _form_values(self, show: bool) -> dict | None:
        values, bad = {}, []
        for name, f in self.obstacle_fields.items():
            try:
                values[name] = parse_obstacle_value(name, f.edit.text())
            except SiteError as exc:
                bad.append(name)
                if show:
                    f.set_error(exc.reason)
        return None if bad else values

    def _preview_obstacle(self, _text: str = "") -> None:
        values = self._form_values(show=False)
        if values is None:
            self.obstacle_preview.setText("")
            return
        ob = Obstacle("preview", **values)
        self.obstacle_preview.setText(
            f"Its top will stand {_fmt(ob.elevation_deg)}° above the horizontal, from "
            f"{_fmt((ob.bearing_deg - ob.width_deg / 2) % 360)}° to "
            f"{_fmt((ob.bearing_deg + ob.width_deg / 2) % 360)}° azimuth.")

    def add_obstacle(self) -> None:
        """Add the obstacle typed in the form (nothing is added while a field is invalid)."""
        values = self._form_values(show=True)
        if values is None:
            bad = [n for n, f in self.obstacle_fields.items() if f.message]
            self.form_message.setText("Not added: check "
                                      + ", ".join(_CAPTIONS[n].lower() for n in bad) + ".")
            self.form_message.show()
            return
        site = self.ctx.site
        label = self.obstacle_label.edit.text().strip() or f"obstacle {len(site.obstacles) + 1}"
        try:
            ob = Obstacle(label, **values)
        except SiteError as exc:
            self.form_message.setText(f"Not added: {exc}")
            self.form_message.show()
            return
        if self._propose(obstacles=site.obstacles + (ob,)):
            self.form_message.hide()
            for f in (self.obstacle_label, *self.obstacle_fields.values()):
                f.clear()
            self.obstacle_preview.setText(f"Added “{ob.label}”.")

    def remove_selected_obstacles(self) -> None:
        rows = {i.row() for i in self.obstacle_table.selectedIndexes()}
        if not rows:
            return
        obstacles = tuple(o for i, o in enumerate(self.ctx.site.obstacles) if i not in rows)
        self._propose(obstacles=obstacles)

    def _obstacles_edited(self, _item) -> None:
        if self._updating:
            return
        t = self.obstacle_table
        out = []
        for r in range(t.rowCount()):
            texts = [(t.item(r, c).text() if t.item(r, c) is not None else "")
                     for c in range(5)]
            try:
                vals = {name: parse_obstacle_value(name, texts[c])
                        for c, (name, *_rest) in enumerate(OBSTACLE_FIELDS, start=1)}
                out.append(Obstacle(texts[0].strip() or f"obstacle {r + 1}", **vals))
            except SiteError as exc:
                self.obstacle_error.setText(f"Row {r + 1}: {field_message(exc.value, exc.reason)}")
                self.obstacle_error.show()
                self._updating = True
                try:
                    for c in range(5):
                        if t.item(r, c) is not None:
                            t.item(r, c).setBackground(INVALID_CELL)
                finally:
                    self._updating = False
                return
        self.obstacle_error.hide()
        if self._propose(obstacles=tuple(out)):
            self._fill_timer.start()

    # -- CSV import / export -------------------------------------------------------------
    def ask_import_path(self) -> str:
        path, _ = QFileDialog.getOpenFileName(self, "Import horizon profile", "", CSV_FILTER)
        return path

    def ask_export_path(self) -> str:
        name = "".join(c.lower() if c.isalnum() else "-" for c in self.ctx.site.name).strip("-")
        path, _ = QFileDialog.getSaveFileName(self, "Export horizon profile",
                                              f"{name or 'site'}-horizon.csv", CSV_FILTER)
        return path

    def _import_clicked(self) -> None:
        path = self.ask_import_path()
        if path:
            self.import_csv(path)

    def _export_clicked(self) -> None:
        path = self.ask_export_path()
        if path:
            self.export_csv(path)

    def import_csv(self, path) -> None:
        """Read a profile from ``path`` (in the runner); the site changes only if it reads."""
        def job(progress):
            try:
                return read_horizon_csv(path)
            except SiteError as exc:
                return exc
        self.ctx.runner.submit(self.channel("import"), job, self._imported,
                               label="Horizon import")

    @staticmethod
    def _file_words(exc: SiteError) -> str:
        """A horizon file's fault in the user's words: the file, the line and column by
        name, what is wrong (no field names, no repr)."""
        name = Path(exc.file).name if exc.file else "the file"
        if exc.field == "(file)":
            return user_text(f"{name} {exc.reason}")
        where = exc.field.replace("azimuth_deg", "azimuth").replace("elevation_deg",
                                                                     "elevation")
        return user_text(f"{name}, {where}: {field_message(exc.value, exc.reason)}")

    def _imported(self, result) -> None:
        if isinstance(result, SiteError):
            said = self._file_words(result)
            self._io_show("error", f"Import failed, the horizon is unchanged: {said}")
            self.ctx.notify("error", f"Horizon import failed: {said}", "horizon import")
            return
        if self._propose(horizon=result):
            self.ctx.resolve("horizon import")
            self._io_show("info", f"Imported {len(result.azimuth_deg)} points.")

    def export_csv(self, path) -> None:
        """Write the site's measured profile to ``path`` as CSV (in the runner)."""
        profile = self.ctx.site.horizon

        def job(progress):
            try:
                return write_horizon_csv(profile, path), len(profile.azimuth_deg)
            except OSError as exc:
                return exc
        self.ctx.runner.submit(self.channel("export"), job, self._exported,
                               label="Horizon export")

    def _exported(self, result) -> None:
        if isinstance(result, OSError):
            self._io_show("error", f"Export failed: {result.strerror or result}")
            self.ctx.notify("error", f"horizon export failed: {result}", "horizon export")
            return
        self.ctx.resolve("horizon export")
        written, n = result
        self._io_show("info", f"Exported {n} points to {written.name}.")

    def _io_show(self, level: str, text: str) -> None:
        self.io_message.setProperty("role", "fieldError" if level == "error" else "muted")
        self.io_message.style().unpolish(self.io_message)
        self.io_message.style().polish(self.io_message)
        self.io_message.setText(text)
        self.io_message.show()
