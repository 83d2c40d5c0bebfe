"""Sun path view: where the sun goes over the site through the year, and what blocks it.

Two charts of the same sky:

- **elevation against azimuth**, centred on the direction of the equator as
  seen from the site: facing south at a northern site (east on the left),
  facing north at a southern site (east on the right);
- **seen from above**, like a map: north up, east to the right, the zenith at
  the centre and rings at 0°, 30° and 60° elevation.

Both show the date arcs (by default the solstices and the equinoxes, the other
months on request, two months with the same sun path sharing an arc), each
labelled on the arc itself; the hour lines in the chosen time basis, with their
labels in a band of their own above every path; the site horizon drawn as
terrain, the obstacles hatched on it; and the chosen date in bold. The flat
chart's centring, the arcs and the hour band are the engine's
(:mod:`tiltyard.engine.sunchart_design`); in the tropics the flat chart faces
east so that no path is cut, and the from-above chart leads.
All numbers come from :func:`tiltyard.engine.sunchart.sun_chart`, run through
the task runner; this module only maps them to the screen.
"""

from __future__ import annotations

import datetime as _dt
import math
import zoneinfo

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QDate, QPointF, Qt
from PySide6.QtGui import QBrush, QColor, QStandardItem, QStandardItemModel
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QDateEdit,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QScrollArea,
    QSizePolicy,
    QVBoxLayout,
    QWidget,
)

from tiltyard.engine.sunchart import sun_chart
from tiltyard.engine.sunchart_design import chart_x, polar_xy, skyline_peaks
from tiltyard.engine.words import (
    MONTH_ABBR,
    NO_VALUE,
    TIME_BASIS_WORDS,
    bearing,
    compass,
    compass_tick,
    day_length,
)

from .. import plots, theme
from ..engine_process import EngineCall
from ..plot_labels import Label, LabelLayer
from ..widgets import CopyableTable, View, wrapping

BASIS_SHORT = {"clock": "clock time", "standard": "standard time", "solar": "solar time"}


HOUR_LINE_COLOR = "#9aa0a6"
#: The hour band's fill (a light strip above the paths).
HOUR_BAND_FILL = (238, 241, 244)
#: Obstacles on the sun charts: hatched in the categorical palette's vermillion.
OBSTACLE_COLOR = theme.SERIES[1]
#: Terrain (the measured profile) below the horizon line: a muted earth tone.
TERRAIN_FILL = (176, 166, 140, 170)
TERRAIN_LINE = "#6e6650"
#: The from-above chart's skyline: a light outline.
SKYLINE_COLOR = "#8a8272"
HOUR_TEXT_COLOR = "#4b525a"
LABEL_FILL = (255, 255, 255, 190)     # behind hour and ring labels, so lines do not cross them
#: Hour labels nearer the zenith than this (degrees) are written at this distance.
NEAR_ZENITH_LABEL_R = 28.0
#: How near (pixels) the pointer must be to a path for the readout to show it.
PICK_RADIUS_PX = 40.0
#: Chart items created or updated per event-loop turn while a result is drawn.
PER_TURN = 6


# -- small formatting helpers (no physics) -------------------------------------------

def hhmm(hours: float) -> str:
    """Hours of the day as ``HH:MM`` (rounded to the minute); no value for NaN."""
    if hours is None or not math.isfinite(hours):
        return NO_VALUE
    m = int(round(hours * 60.0)) % (24 * 60)
    return f"{m // 60:02d}:{m % 60:02d}"




def split_at_edges(azimuth_deg, elevation_deg, centre_deg: float):
    """Chart x/y of a curve, cut where it crosses the chart's side edges.

    Where the curve passes through the direction opposite the centre, the
    crossing point is added on both edges with a NaN between them, so the
    curve leaves one side and comes back on the other. NaNs in the input
    (breaks between pieces) are kept.
    """
    az = np.asarray(azimuth_deg, dtype=float)
    el = np.asarray(elevation_deg, dtype=float)
    x = chart_x(az, centre_deg)
    if len(az) < 2:
        return x, el
    lo, hi = centre_deg - 180.0, centre_deg + 180.0
    d_ang = np.mod(az[1:] - az[:-1] + 180.0, 360.0) - 180.0
    dx = x[1:] - x[:-1]
    with np.errstate(invalid="ignore"):
        wraps = np.flatnonzero(np.abs(dx - d_ang) > 1.0)
    if len(wraps) == 0:
        return x, el
    xs, ys, start = [], [], 0
    for i in wraps:
        xs.append(x[start:i + 1])
        ys.append(el[start:i + 1])
        if d_ang[i] > 0:
            frac = (hi - x[i]) / d_ang[i]
            edge_out, edge_in = hi, lo
        else:
            frac = (x[i] - lo) / -d_ang[i]
            edge_out, edge_in = lo, hi
        yc = el[i] + frac * (el[i + 1] - el[i])
        xs.append(np.array([edge_out, np.nan, edge_in]))
        ys.append(np.array([yc, np.nan, yc]))
        start = i + 1
    xs.append(x[start:])
    ys.append(el[start:])
    return np.concatenate(xs), np.concatenate(ys)


_POINTS = {0.0: "north", 90.0: "east", 180.0: "south", 270.0: "west"}


def facing_words(centre_deg: float) -> str:
    """``"facing south, east on the left"``; on an east- or west-facing chart the side
    north is on (``"facing east, north on the left"``)."""
    c = centre_deg % 360.0
    name = _POINTS.get(c) or compass(c, 8)
    ref = 90.0 if c in (0.0, 180.0) else 0.0
    side = "left" if chart_x(ref, centre_deg) < centre_deg else "right"
    return f"facing {name}, {_POINTS[ref]} on the {side}"


def obstacle_brush() -> QBrush:
    return QBrush(QColor(OBSTACLE_COLOR), Qt.BrushStyle.BDiagPattern)


def _edge_to_edge(azimuth_deg, elevation_deg, centre_deg: float):
    """A horizon (or obstacle) line from one edge of the flat chart to the other, sorted
    by chart x; NaNs (no obstacle) are kept as gaps."""
    hx = chart_x(azimuth_deg, centre_deg)
    hy = np.asarray(elevation_deg, dtype=float)
    order = np.argsort(hx, kind="stable")
    hx, hy = hx[order], hy[order]
    hx, keep = np.unique(hx, return_index=True)
    hy = hy[keep]
    lo, hi = centre_deg - 180.0, centre_deg + 180.0
    if hx[0] > lo:
        hx, hy = np.append(lo, hx), np.append(hy[-1], hy)
    if hx[-1] < hi:
        hx, hy = np.append(hx, hi), np.append(hy, hy[0])
    return hx, hy


def _pen(color, width: float, style=Qt.PenStyle.SolidLine):
    pen = pg.mkPen(color, width=width)
    pen.setStyle(style)
    pen.setCapStyle(Qt.PenCapStyle.FlatCap)
    pen.setJoinStyle(Qt.PenJoinStyle.BevelJoin)
    return pen


def _hex(c: QColor) -> str:
    return c.name()


#: Month-pair arcs alternate dash-dot and dotted, so neighbouring arcs (next in the ramp,
#: nearly alike under colour-vision deficiency) never share a pattern.
MONTH_ARC_DASHES = (Qt.PenStyle.DotLine, Qt.PenStyle.DashDotLine)


def arc_pen(arc, index: int):
    """Solstices solid and thick, equinoxes dashed and thick, month pairs thin dotted or
    dash-dot: told apart by pattern as well as colour (and each is labelled on its arc)."""
    color = theme.arc_color(index)
    if arc.kind == "solstice":
        return _pen(color, 2.6)
    if arc.kind == "equinox":
        return _pen(color, 2.4, Qt.PenStyle.DashLine)
    return _pen(color, 1.4, MONTH_ARC_DASHES[index % 2])


def arc_shown(arc, every_month: bool) -> bool:
    return arc.default or every_month


class SunPathView(View):
    """The sun's paths, hour lines and horizon; the chosen date; a monthly events table."""

    title = "Sun path"

    def __init__(self, ctx, parent=None):
        super().__init__(ctx, parent)
        self.chart = None                  # the last SunChart shown
        self.path_items: dict[str, pg.PlotCurveItem] = {}
        self.polar_path_items: dict[str, pg.PlotCurveItem] = {}
        self.hour_labels: dict[int, Label] = {}
        self.polar_hour_labels: dict[int, Label] = {}
        self._pick: dict[str, list] = {"cart": [], "polar": []}

        outer = QVBoxLayout(self)
        outer.setContentsMargins(14, 8, 14, 6)
        outer.setSpacing(4)

        # -- controls -----------------------------------------------------------
        top = QHBoxLayout()
        head = QLabel("Sun path")
        head.setProperty("role", "heading")
        top.addWidget(head)
        self.site_label = QLabel()
        self.site_label.setProperty("role", "muted")
        wrapping(self.site_label)
        top.addWidget(self.site_label, 1)
        top.addWidget(QLabel("Date"))
        self.date_edit = QDateEdit()
        self.date_edit.setCalendarPopup(True)
        self.date_edit.setDisplayFormat("d MMM yyyy")
        self.date_edit.setDateRange(QDate(1901, 1, 1), QDate(2099, 12, 31))
        self.date_edit.setDate(QDate(ctx.design_date))
        self.date_edit.setToolTip("The date drawn in bold and described below the charts "
                                  "(shared with the Irradiance view)")
        top.addWidget(self.date_edit)
        top.addSpacing(10)
        top.addWidget(QLabel("Times in"))
        self.basis = QComboBox()
        for key, text in TIME_BASIS_WORDS.items():
            self.basis.addItem(text, key)
        self._set_basis(ctx.prefs.time_basis)
        self.basis.setToolTip("Time basis of the hour lines, the readout and the tables")
        top.addWidget(self.basis)
        outer.addLayout(top)
        self.every_month = QCheckBox("Every month")
        self.every_month.setToolTip("Draw the 21st of every month as well as the solstices "
                                    "and equinoxes (two months with the same sun path share "
                                    "an arc)")

        # -- charts ---------------------------------------------------------------
        charts = QWidget()
        cl = QHBoxLayout(charts)
        cl.setContentsMargins(0, 0, 0, 0)
        cl.setSpacing(6)
        self.cart = plots.plot_widget()
        self.polar = plots.plot_widget()
        for w in (self.cart, self.polar):
            w.setBackground("w")
            w.setMinimumHeight(260)
            w.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Expanding)
            p = w.getPlotItem()
            p.setMenuEnabled(False)
            p.hideButtons()
            p.setMouseEnabled(x=False, y=False)
        cl.addWidget(self.cart, 3)
        cl.addWidget(self.polar, 2)
        self._charts_layout = cl
        self._setup_cartesian()
        self._setup_polar()

        self.legend = QLabel()
        self.legend.setWordWrap(True)
        self.legend.setTextFormat(Qt.TextFormat.RichText)
        self.readout = QLabel("Point at a path on either chart to read its time and position.")
        self.readout.setProperty("role", "muted")
        wrapping(self.readout, lines=2)
        self.readout.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)

        upper = QWidget()
        ul = QVBoxLayout(upper)
        ul.setContentsMargins(0, 0, 0, 0)
        ul.setSpacing(2)
        ul.addWidget(charts, 1)
        key = QHBoxLayout()
        key.addWidget(self.legend, 1)
        key.addWidget(self.every_month, 0, Qt.AlignmentFlag.AlignTop)
        ul.addLayout(key)
        ul.addWidget(self.readout)

        # -- chosen date and the monthly table --------------------------------------
        lower = QWidget()
        ll = QHBoxLayout(lower)
        ll.setContentsMargins(0, 4, 0, 0)
        ll.setSpacing(12)
        self.day_text = QLabel("Computing…")
        self.day_text.setTextFormat(Qt.TextFormat.RichText)
        self.day_text.setWordWrap(True)
        self.day_text.setAlignment(Qt.AlignmentFlag.AlignTop | Qt.AlignmentFlag.AlignLeft)
        self.day_text.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        # the day's figures scroll in their own column on a short screen, beside the table
        day_box = QScrollArea()
        day_box.setFrameShape(QScrollArea.Shape.NoFrame)
        day_box.setWidgetResizable(True)
        day_box.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        day_box.setWidget(self.day_text)
        day_box.setFixedWidth(262)
        day_box.setMinimumHeight(90)
        ll.addWidget(day_box)
        tbox = QVBoxLayout()
        tbox.setSpacing(2)
        self.table_caption = QLabel()
        self.table_caption.setProperty("role", "muted")
        wrapping(self.table_caption)
        tbox.addWidget(self.table_caption)
        self.events_model = QStandardItemModel(0, 0, self)
        self.table = CopyableTable()
        self.table.setSortingEnabled(False)
        self.table.setModel(self.events_model)
        self.table.verticalHeader().setDefaultSectionSize(19)
        self.table.setWordWrap(False)
        tbox.addWidget(self.table, 1)
        ll.addLayout(tbox, 1)

        outer.addWidget(upper, 1)
        outer.addWidget(lower, 0)

        # -- signals ----------------------------------------------------------------
        self.date_edit.dateChanged.connect(
            lambda d: (ctx.set_design_date(d.toPython()), self.mark_stale()))
        ctx.design_date_changed.connect(self._design_date_changed)
        self.basis.currentIndexChanged.connect(lambda _i: self.mark_stale())
        self.every_month.toggled.connect(
            lambda _on: self._show_chart(self.chart) if self.chart is not None else None)
        ctx.preferences_changed.connect(lambda prefs: self._set_basis(prefs.time_basis))
        self._proxies = [
            pg.SignalProxy(self.cart.scene().sigMouseMoved, rateLimit=30,
                           slot=self._on_cart_mouse_moved),
            pg.SignalProxy(self.polar.scene().sigMouseMoved, rateLimit=30,
                           slot=self._on_polar_mouse_moved)]
        self._show_site_label(ctx.site)

    # -- set-up -------------------------------------------------------------------
    def _set_basis(self, basis: str) -> None:
        i = self.basis.findData(basis)
        if i >= 0 and i != self.basis.currentIndex():
            self.basis.setCurrentIndex(i)

    # Plot items are made once and then only given new data: every pyqtgraph
    # item added or removed costs several signal emissions, so redrawing by
    # clearing the plots would be needlessly heavy.
    def _item(self, plot, store: dict, key, z: float, pen=None) -> pg.PlotCurveItem:
        item = store.get(key)
        if item is None:
            item = pg.PlotCurveItem(pen=pen)
            item.setZValue(z)
            plot.addItem(item)
            store[key] = item
        return item

    @staticmethod
    def _set(item, x, y) -> None:
        """New data for a curve, skipped when it is the data already shown."""
        x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
        last = getattr(item, "_shown", None)
        if last is not None and np.array_equal(last[0], x, equal_nan=True) \
                and np.array_equal(last[1], y, equal_nan=True):
            return
        item.setData(x=x, y=y, connect="finite")
        item._shown = (x, y)

    def _text(self, plot, store: dict, key, z: float, size: float = 8.5,
              color: str = HOUR_TEXT_COLOR) -> pg.TextItem:
        item = store.get(key)
        if item is None:
            item = pg.TextItem("", color=color, fill=LABEL_FILL)
            item.setFont(theme.plot_font(size))
            item.setZValue(z)
            plot.addItem(item)
            store[key] = item
        return item

    @staticmethod
    def _label_layer(plot) -> LabelLayer:
        """Labels of one chart, drawn together above the lines, none over another."""
        layer = LabelLayer(theme.plot_font(8.5), HOUR_TEXT_COLOR, LABEL_FILL,
                           avoid_overlap=True)
        layer.setZValue(12)
        plot.addItem(layer)
        return layer

    def _setup_cartesian(self) -> None:
        p = self.cart.getPlotItem()
        theme.style_plot(p, "Elevation (°)", "Azimuth (° clockwise from north)")
        p.getAxis("bottom").setHeight(42)
        p.getAxis("left").setWidth(44)
        self._cart_items: dict = {}
        self._cart_labels = self._label_layer(p)
        self._arc_labels = self._label_layer(p)
        self.horizon_item = self._item(p, self._cart_items, "horizon", 5,
                                       _pen(TERRAIN_LINE, 1.2))
        self.horizon_item.setFillLevel(-100.0)
        self.horizon_item.setBrush(pg.mkBrush(*TERRAIN_FILL))
        self.obstacle_item = self._item(p, self._cart_items, "obstacles", 6,
                                        _pen(OBSTACLE_COLOR, 1.2))
        self.obstacle_item.setFillLevel(-100.0)
        self.obstacle_item.setBrush(obstacle_brush())
        self.band_item = self._item(p, self._cart_items, "hour band", 0.5, pg.mkPen(None))
        self.band_item.setBrush(pg.mkBrush(*HOUR_BAND_FILL))
        self.day_item = self._day_items(p, self._cart_items)

    def _day_items(self, plot, store):
        """The chosen date: dotted where hidden, white halo and bold where the sun is clear."""
        self._item(plot, store, "day hidden", 10,
                   _pen(theme.ACCENT, 1.8, Qt.PenStyle.DotLine))
        self._item(plot, store, "day halo", 9, _pen("#ffffff", 7.0))
        bold = self._item(plot, store, "day", 11, _pen(theme.ACCENT, 3.6))
        bold.full_data = (np.array([]), np.array([]))
        return bold

    def _set_day(self, store, day, mapper) -> None:
        if len(day) == 0:
            x = y = xv = yv = np.array([])
        else:
            x, y = mapper(day.azimuth_deg, day.elevation_deg)
            xv, yv = mapper(day.azimuth_deg, np.where(day.visible, day.elevation_deg, np.nan))
        self._set(store["day hidden"], x, y)
        self._set(store["day halo"], xv, yv)
        self._set(store["day"], xv, yv)
        store["day"].full_data = (x, y)

    def _setup_polar(self) -> None:
        p = self.polar.getPlotItem()
        p.hideAxis("left")
        p.hideAxis("bottom")
        p.setAspectLocked(True)
        p.setTitle("Seen from above · north up, east to the right", color=theme.TEXT,
                   size="10pt")
        self._polar_items: dict = {}
        self._polar_texts: dict = {}
        self._polar_labels = self._label_layer(p)
        self._polar_arc_labels = self._label_layer(p)
        self._skyline_labels: list[Label] = []   # go on the arc labels' layer, first
        # skyline: a light outline over a faint fill between the 0° ring and the skyline,
        # with elevation ticks at its highest points
        self._polar_outer = pg.PlotCurveItem(pen=pg.mkPen(None))
        self._polar_horizon = pg.PlotCurveItem(pen=_pen(SKYLINE_COLOR, 1.0))
        fill = pg.FillBetweenItem(self._polar_outer, self._polar_horizon,
                                  brush=pg.mkBrush(*TERRAIN_FILL[:3], 70))
        self._skyline_ticks = pg.PlotCurveItem(pen=_pen(TERRAIN_LINE, 1.2))
        for it, z in ((self._polar_outer, 5), (fill, 5), (self._polar_horizon, 6),
                      (self._skyline_ticks, 6)):
            it.setZValue(z)
            p.addItem(it)
        # elevation rings and bearings
        ring = np.radians(np.arange(0.0, 361.0, 2.0))
        for el in (0.0, 30.0, 60.0):
            r = 90.0 - el
            c = pg.PlotCurveItem(r * np.sin(ring), r * np.cos(ring),
                                 pen=_pen(theme.MUTED if el == 0 else theme.GRID, 1.0))
            c.setZValue(0)
            p.addItem(c)
        for b in np.arange(0.0, 360.0, 45.0):
            s, c = math.sin(math.radians(b)), math.cos(math.radians(b))
            line = pg.PlotCurveItem([0, 90 * s], [0, 90 * c], pen=_pen(theme.GRID, 1.0))
            line.setZValue(0)
            p.addItem(line)
            name = compass(b)
            big = len(name) == 1
            t = pg.TextItem(name, color=theme.TEXT if big else theme.MUTED,
                            anchor=(0.5 - 0.5 * s, 0.5 + 0.5 * c))
            t.setFont(theme.plot_font(10 if big else 8.5))
            t.setPos(92 * s, 92 * c)
            p.addItem(t)
        for el in (0.0, 30.0, 60.0, 90.0):
            self._text(p, self._polar_texts, ("ring", el), 7, 8, theme.MUTED).setText(
                f"{el:.0f}°")
        zen = pg.ScatterPlotItem([0], [0], size=5, brush=pg.mkBrush(theme.MUTED), pen=None)
        p.addItem(zen)
        self.polar_day_item = self._day_items(p, self._polar_items)
        p.setRange(xRange=(-106, 106), yRange=(-104, 104), padding=0)

    def _lead_with(self, lead: str) -> None:
        """Put the leading chart first and larger (the from-above chart in the tropics)."""
        cl = self._charts_layout
        first, second = (self.polar, self.cart) if lead == "above" else (self.cart, self.polar)
        if cl.indexOf(first) != 0:
            cl.removeWidget(first)
            cl.insertWidget(0, first)
        cl.setStretch(0, 3)
        cl.setStretch(1, 2)

    def _show_site_label(self, site) -> None:
        hemi = "N" if site.latitude_deg >= 0 else "S"
        ew = "E" if site.longitude_deg >= 0 else "W"
        self.site_label.setText(f"  {site.name} · {abs(site.latitude_deg):.2f}° {hemi}, "
                                f"{abs(site.longitude_deg):.2f}° {ew} · {site.timezone}")

    # -- computation ------------------------------------------------------------------
    def _design_date_changed(self, day) -> None:
        if self.date_edit.date().toPython() != day:
            self.date_edit.setDate(QDate(day))           # marks the view stale

    def refresh(self) -> None:
        super().refresh()
        site = self.ctx.site
        date = self.date_edit.date().toPython()
        basis = self.basis.currentData()
        self._show_site_label(site)
        self.ctx.runner.submit_call(self.channel("chart"),
                                    EngineCall(sun_chart, (site, date, basis)),
                                    self._show_chart, label="Sun path")

    # -- drawing ----------------------------------------------------------------------
    def _show_chart(self, chart) -> None:
        self.chart = chart
        self.draw_in_stages(self.channel("draw"), (
            lambda: self._draw_cartesian(chart),
            lambda: self._draw_cartesian_paths(chart),
            lambda: self._draw_polar(chart),
            lambda: self._show_legend(chart),
            lambda: self._show_day(chart),
            lambda: self._show_events(chart)))

    def _arcs(self, chart):
        """(index, arc) of the arcs to draw, lowest sun first (the index picks the colour)."""
        on = self.every_month.isChecked()
        return [(i, a) for i, a in enumerate(chart.arcs) if arc_shown(a, on)]

    def _draw_paths(self, plot, items, chart, mapper, pick_mapper, layer, first=()):
        """The date arcs, their labels on ``layer`` and the pick lists.

        A generator: drawing pauses every few items (see ``run_in_stages``).
        Arcs not shown are given no data (their items are kept for reuse). ``first``
        are labels that go on ``layer`` before the arcs' (they win a place).
        """
        shown, labels = {}, list(first)
        pick = [(chart.day, *pick_mapper(chart.day.azimuth_deg, chart.day.elevation_deg))]
        drawn = dict(self._arcs(chart))
        for n, (i, arc) in enumerate(enumerate(chart.arcs)):
            if n and n % PER_TURN == 0:
                yield
            curve = arc.curve
            item = self._item(plot, items, ("path", curve.label),
                              3 if arc.kind == "month" else 4, arc_pen(arc, i))
            if i not in drawn:
                self._set(item, [], [])
                continue
            self._set(item, *mapper(curve.azimuth_deg, curve.elevation_deg))
            shown[curve.label] = item
            pick.append((curve, *pick_mapper(curve.azimuth_deg, curve.elevation_deg)))
            if arc.label_index >= 0:
                # the label's place on the arc, then the others along it (a crowded
                # chart still names every arc)
                js = [arc.label_index, *arc.label_candidates]
                x, y = pick_mapper(curve.azimuth_deg[js], curve.elevation_deg[js])
                x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
                labels.append(Label(float(x[0]), float(y[0]), arc.label, 0.5, 1.15,
                                    color=theme.TEXT,
                                    alternates=tuple(zip(x[1:].tolist(), y[1:].tolist(),
                                                         strict=True))))
        # the key says what the dashes mean
        layer.set_labels(labels)
        return shown, pick

    def _draw_hours(self, plot, items, layer, chart, mapper, place_label):
        """All hour lines as one curve (NaN between hours) and their labels on ``layer``.

        ``place_label(line)`` gives the label's (x, y, anchor_x, anchor_y), or None
        for a line left unlabelled. Returns {hour: Label}.
        """
        xs, ys, labels = [], [], {}
        for line in chart.hour_lines:
            x, y = mapper(line.azimuth_deg, line.elevation_deg)
            xs += [np.asarray(x, dtype=float), [np.nan]]
            ys += [np.asarray(y, dtype=float), [np.nan]]
            at = place_label(line)
            if at is not None:
                lx, ly, ax, ay = at
                labels[line.hour] = Label(float(lx), float(ly), f"{line.hour}", ax, ay)
        item = self._item(plot, items, "hours", 1, _pen(HOUR_LINE_COLOR, 1.0))
        self._set(item, np.concatenate(xs) if xs else [], np.concatenate(ys) if ys else [])
        layer.set_labels(labels.values())
        return labels

    def _draw_cartesian(self, chart) -> None:
        p = self.cart.getPlotItem()
        centre = chart.centre_azimuth_deg
        lo, hi = centre - 180.0, centre + 180.0
        self._lead_with(chart.lead)
        p.setTitle(f"Elevation against azimuth · {facing_words(centre)}",
                   color=theme.TEXT, size="10pt")
        # x ticks: compass letters and degrees every 45°, minor ticks every 15°; the two
        # edges (both the direction opposite the centre) carry the letter only, so it fits
        major = [(v, compass(v % 360.0, 8) if v in (lo, hi) else compass_tick(v % 360.0))
                 for v in np.arange(lo, hi + 1, 45.0)]
        minor = [(v, "") for v in np.arange(lo, hi + 1, 15.0) if v % 45]
        p.getAxis("bottom").setTicks([major, minor])

        # terrain filled below the horizon line, obstacles hatched on it
        hx, hy = _edge_to_edge(chart.horizon_azimuth_deg, chart.horizon_elevation_deg, centre)
        self._set(self.horizon_item, hx, hy)
        ox, oy = _edge_to_edge(chart.horizon_azimuth_deg, chart.obstacle_elevation_deg, centre)
        self._set(self.obstacle_item, ox, oy)
        band = chart.hour_band
        self._set(self.band_item, [lo - 10.0, hi + 10.0], [band.high_deg, band.high_deg])
        self.band_item.setFillLevel(band.low_deg)
        yield

        def split(az, el):
            return split_at_edges(az, el, centre)

        at = dict(zip(band.hours, band.azimuth_deg, strict=True))
        mid = 0.5 * (band.low_deg + band.high_deg)

        def place(line):
            if line.hour not in at:
                return None
            return at[line.hour], mid, 0.5, 0.5

        self.hour_labels = self._draw_hours(p, self._cart_items, self._cart_labels, chart,
                                            split, place)

    def _draw_cartesian_paths(self, chart) -> None:
        """Second half of the flat chart: date arcs, the chosen day, the range."""
        p = self.cart.getPlotItem()
        centre = chart.centre_azimuth_deg
        lo, hi = centre - 180.0, centre + 180.0
        hy = chart.horizon_elevation_deg

        def split(az, el):
            return split_at_edges(az, el, centre)

        self.path_items, self._pick["cart"] = yield from self._draw_paths(
            p, self._cart_items, chart, split, lambda az, el: (chart_x(az, centre), el),
            self._arc_labels)
        self._set_day(self._cart_items, chart.day, split)

        ymin = min(-2.0, math.floor(float(np.min(hy))) - 2.0)
        ymax = chart.hour_band.high_deg
        # a little room at the sides so the edge ticks show their letters
        p.setRange(xRange=(lo - 6.0, hi + 6.0), yRange=(ymin, ymax), padding=0.0)

    def _draw_polar(self, chart) -> None:
        p = self.polar.getPlotItem()
        az = chart.horizon_azimuth_deg
        hx, hy = polar_xy(az, np.maximum(chart.horizon_elevation_deg, 0.0))
        ox, oy = polar_xy(az, np.zeros_like(az))
        self._set(self._polar_outer, ox, oy)
        self._set(self._polar_horizon, hx, hy)
        self._set_skyline_ticks(chart)
        # ring labels on the side away from the equator, where paths are fewest;
        # the zenith's label on that side of the centre
        pole = 0.0 if chart.equator_azimuth_deg == 180.0 else 180.0
        b = math.radians(pole + 20.0)
        for el in (30.0, 60.0):
            t = self._polar_texts[("ring", el)]
            t.setAnchor((0.5, 0.5))
            t.setPos((90.0 - el) * math.sin(b), (90.0 - el) * math.cos(b))
        # 0° just outside the horizon ring, clear of the lowest paths
        t = self._polar_texts[("ring", 0.0)]
        t.setAnchor((0.5 - 0.5 * math.sin(b), 0.5 + 0.5 * math.cos(b)))
        t.setPos(91.0 * math.sin(b), 91.0 * math.cos(b))
        zen = self._polar_texts[("ring", 90.0)]
        zen.setAnchor((0.5, 1.2) if pole == 0.0 else (0.5, -0.2))
        zen.setPos(0.0, 0.0)
        # the ring labels (and the skyline's) are written on the arc labels' layer, first,
        # so an arc label never covers one
        rings = []
        for key, t in self._polar_texts.items():
            if key[0] != "ring":
                continue
            t.setVisible(False)
            rings.append(Label(t.pos().x(), t.pos().y(), t.toPlainText(), t.anchor.x(),
                               t.anchor.y(), color=theme.MUTED, font_pt=8.0))

        def place(line):
            br = math.radians(line.label_azimuth_deg)
            r = 90.0 - line.label_elevation_deg
            if r < NEAR_ZENITH_LABEL_R:
                # close to the zenith the label points of several hours meet: write the
                # hour further out along its own bearing, where the line runs on
                return (NEAR_ZENITH_LABEL_R * math.sin(br), NEAR_ZENITH_LABEL_R * math.cos(br),
                        0.5, 0.5)
            # towards the zenith when the label sits above its point on the other chart
            sign = -1.0 if line.label_on_top else 1.0
            ux, uy = sign * math.sin(br), sign * math.cos(br)
            return r * math.sin(br), r * math.cos(br), 0.5 - 0.6 * ux, 0.5 + 0.6 * uy

        yield
        self.polar_hour_labels = self._draw_hours(p, self._polar_items, self._polar_labels,
                                                  chart, polar_xy, place)
        self.polar_path_items, self._pick["polar"] = yield from self._draw_paths(
            p, self._polar_items, chart, polar_xy, polar_xy, self._polar_arc_labels,
            rings + self._skyline_labels + list(self.polar_hour_labels.values()))
        self._polar_labels.set_labels(())       # written on the one layer above
        self._set_day(self._polar_items, chart.day, polar_xy)

    def _set_skyline_ticks(self, chart) -> None:
        """Elevation ticks on the skyline: a short radial tick and its elevation at the
        skyline's highest points (up to three, at least 40° of azimuth apart)."""
        az = np.asarray(chart.horizon_azimuth_deg[:-1], dtype=float)
        el = np.asarray(chart.horizon_elevation_deg[:-1], dtype=float)
        picks = skyline_peaks(az, el)
        xs, ys, labels = [], [], []
        for i in picks:
            b = math.radians(az[i])
            r0, r1 = 90.0 - el[i], 90.0 - el[i] - 4.0
            xs += [r0 * math.sin(b), r1 * math.sin(b), np.nan]
            ys += [r0 * math.cos(b), r1 * math.cos(b), np.nan]
            labels.append(Label(r1 * math.sin(b), r1 * math.cos(b), f"{el[i]:.0f}°",
                                0.5 + 0.6 * math.sin(b), 0.5 - 0.6 * math.cos(b),
                                color=TERRAIN_LINE))
        self._set(self._skyline_ticks, xs, ys)
        self._skyline_labels = labels

    def _show_legend(self, chart) -> None:
        """The key: each arc drawn (its label, dates and pattern), the chosen date, the
        hour lines, terrain and obstacles."""
        pattern = {"solstice": "━━", "equinox": "╍╍", "month": "─·─"}
        arcs = " &nbsp; ".join(
            f"<span style='color:{_hex(theme.arc_color(i))}; font-size:12pt'>"
            f"{pattern[a.kind]}</span>&nbsp;{a.label}" for i, a in self._arcs(chart))
        basis = BASIS_SHORT[chart.basis]
        terrain = "rgba({},{},{},{:.2f})".format(*TERRAIN_FILL[:3], TERRAIN_FILL[3] / 255)
        more = "" if self.every_month.isChecked() else " (tick “Every month” for the rest)"
        self.legend.setText(
            f"<span style='color:{theme.MUTED}'>Sun paths:</span> {arcs}{more}"
            f"<br><span style='color:{theme.ACCENT}; font-size:13pt'>━</span>&nbsp;"
            f"{chart.day.label} (dotted where the horizon hides the sun)"
            f" &nbsp;·&nbsp; <span style='color:{HOUR_LINE_COLOR}; font-size:13pt'>━</span>"
            f"&nbsp;hour lines, {basis} (labels in the band above)"
            f" &nbsp;·&nbsp; <span style='background:{terrain}'>&nbsp;&nbsp;&nbsp;&nbsp;</span>"
            f"&nbsp;terrain &nbsp;·&nbsp; <span style='color:{OBSTACLE_COLOR}'>▨</span>"
            "&nbsp;obstacles")


    def _basis_note(self, chart) -> str:
        if chart.basis == "solar":
            return "apparent solar time (12:00 = the sun on the meridian)"
        zone = zoneinfo.ZoneInfo(chart.timezone)
        offs = []
        for month in (1, 7):
            t = _dt.datetime(chart.year, month, 15, 12, tzinfo=zone)
            off = t.utcoffset() - (t.dst() or _dt.timedelta(0)) if chart.basis == "standard" \
                else t.utcoffset()
            mins = int(off.total_seconds() // 60)
            sign = "+" if mins >= 0 else "−"
            text = f"UTC{sign}{abs(mins) // 60:02d}:{abs(mins) % 60:02d}"
            if text not in offs:
                offs.append(text)
        if chart.basis == "standard":
            return f"local standard time ({offs[0]} all year)"
        dst = " with daylight saving" if len(offs) > 1 else ", no daylight saving"
        return f"local clock time ({chart.timezone}, {' / '.join(offs)}{dst})"

    def _show_day(self, chart) -> None:
        s = chart.summary
        basis = BASIS_SHORT[chart.basis]
        lines = [f"<b>{chart.day.label}</b> <span style='color:{theme.MUTED}'>({basis})</span>"]
        if s.polar == "day":
            lines.append("<b>Polar day</b>: the sun does not set.")
            lines.append(f"Solar noon {hhmm(s.solar_noon_h)}")
            lines.append(f"Highest elevation {s.max_elevation_deg:.1f}°")
        elif s.polar == "night":
            lines.append("<b>Polar night</b>: the sun does not rise.")
            lines.append(f"At solar noon ({hhmm(s.solar_noon_h)}) it stays "
                         f"{-s.max_elevation_deg:.1f}° below the horizon.")
        else:
            lines.append(f"Sunrise {hhmm(s.sunrise_h)} · sunset {hhmm(s.sunset_h)}")
            lines.append(f"Solar noon {hhmm(s.solar_noon_h)}")
            lines.append(f"Day length {day_length(s.day_length_h)}")
            lines.append(f"Highest elevation {s.max_elevation_deg:.1f}°")
        if s.polar != "night":
            if s.direct_sun_h <= 0.0:
                lines.append("The site horizon hides the sun all day.")
            else:
                first = (f"clears the site horizon at {hhmm(s.clears_horizon_h)}"
                         if s.clears_horizon is not None else None)
                last = (f"drops behind it at {hhmm(s.behind_horizon_h)}"
                        if s.behind_horizon is not None else None)
                if first or last:
                    said = ", ".join(x for x in (first, last) if x)
                    lines.append(f"The sun {said}.")
                lines.append(f"Direct sun on the site: {day_length(s.direct_sun_h)}")
        self.day_text.setText("<br>".join(lines))

    def _show_events(self, chart) -> None:
        heads = ["Date", "Sunrise\n(hh:mm)", "Solar noon\n(hh:mm)", "Sunset\n(hh:mm)",
                 "Day length", "Elevation\nat noon (°)", "Sun clears\nhorizon\n(hh:mm)",
                 "Sun behind\nhorizon\n(hh:mm)", "Direct sun"]
        m = self.events_model
        hdr = self.table.horizontalHeader()
        # fixed sections while filling: fitting a column to its contents after every
        # appended row makes the fill quadratic
        hdr.setSectionResizeMode(QHeaderView.ResizeMode.Fixed)
        rows_in = []
        for r in chart.events.itertuples():
            polar = r.polar
            if polar in ("day", "night"):
                rise = sset = f"polar {polar}"
            else:
                rise, sset = hhmm(r.sunrise_h), hhmm(r.sunset_h)
            if polar == "night":
                clears = behind = NO_VALUE
            elif r.direct_sun_h <= 0.0:
                clears = behind = "no sun"
            else:
                clears = hhmm(r.clears_horizon_h) if math.isfinite(r.clears_horizon_h) else (
                    "at sunrise" if polar is None else NO_VALUE)
                behind = hhmm(r.behind_horizon_h) if math.isfinite(r.behind_horizon_h) else (
                    "at sunset" if polar is None else NO_VALUE)
            cells = [f"{r.date.day} {MONTH_ABBR[r.date.month - 1]}", rise,
                     hhmm(r.solar_noon_h), sset, day_length(r.day_length_h),
                     f"{r.noon_elevation_deg:.1f}", clears, behind, day_length(r.direct_sun_h)]
            items = []
            for i, text in enumerate(cells):
                it = QStandardItem(text)
                it.setEditable(False)
                if i > 0:
                    it.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                        | Qt.AlignmentFlag.AlignVCenter)
                items.append(it)
            rows_in.append(items)
        m.clear()
        m.setHorizontalHeaderLabels(heads)
        for items in rows_in:
            m.appendRow(items)
        hdr.setSectionResizeMode(QHeaderView.ResizeMode.Stretch)
        hdr.setSectionResizeMode(0, QHeaderView.ResizeMode.ResizeToContents)
        # room for all twelve months without scrolling where the screen has it; on a
        # short screen the table scrolls, keeping four months in sight
        row_h = self.table.verticalHeader().defaultSectionSize()
        frame = hdr.sizeHint().height() + 2 * self.table.frameWidth() + 2
        self.table.setMaximumHeight(frame + row_h * m.rowCount())
        self.table.setMinimumHeight(frame + row_h * min(4, m.rowCount()))
        self.table_caption.setText(f"Sun on the 21st of each month · times in "
                                   f"{self._basis_note(chart)}")

    # -- pointer readout ------------------------------------------------------------
    def _on_cart_mouse_moved(self, event) -> None:
        self._on_mouse_moved(event, "cart")

    def _on_polar_mouse_moved(self, event) -> None:
        self._on_mouse_moved(event, "polar")

    def _on_mouse_moved(self, event, chart: str = "cart") -> None:
        """SignalProxy slot: ``event`` is the tuple of sigMouseMoved arguments."""
        pos = event[0] if isinstance(event, (tuple, list)) else event
        text = self.readout_at(pos, chart)
        if text:
            self.readout.setText(text)

    def readout_at(self, scene_pos: QPointF, chart: str = "cart") -> str | None:
        """The readout for a position in the scene of one chart (``"cart"`` or ``"polar"``).

        None before the first result or when the position is outside the plot area.
        """
        if self.chart is None:
            return None
        widget = self.cart if chart == "cart" else self.polar
        vb = widget.getPlotItem().getViewBox()
        if not vb.sceneBoundingRect().contains(scene_pos):
            return None
        view_pt = vb.mapSceneToView(scene_pos)
        return self._nearest_text(chart, vb, view_pt.x(), view_pt.y())

    def _nearest_text(self, key, vb, x, y) -> str:
        px, py = vb.viewPixelSize()
        best = None
        for curve, xs, ys in self._pick[key]:
            if len(xs) == 0:
                continue
            d2 = ((np.asarray(xs) - x) / px) ** 2 + ((np.asarray(ys) - y) / py) ** 2
            i = int(np.nanargmin(d2))
            if best is None or d2[i] < best[0]:
                best = (d2[i], curve, i)
        if best is None or best[0] > PICK_RADIUS_PX ** 2:
            return "No path near the pointer."
        _, curve, i = best
        az = float(curve.azimuth_deg[i])
        el = float(curve.elevation_deg[i])
        hidden = "" if curve.visible[i] else " · behind the site horizon"
        return (f"{curve.label}: {hhmm(curve.hour[i])} {BASIS_SHORT[self.chart.basis]} · "
                f"azimuth {bearing(az, decimals=1)} · elevation {el:.1f}°{hidden}")


__all__ = ["SunPathView", "chart_x", "hhmm", "polar_xy",
           "split_at_edges"]
