"""The Tilt study view's charts: the objective against tilt, the tilt × azimuth map and the
schedules across the year (made ahead of need, see :mod:`..plots`), and their drawing.

:class:`StudyChartDrawing` is mixed into :class:`~.study_view.StudyView`: it draws a
:class:`~tiltyard.engine.tilt.TiltStudy` into the charts and holds no physics.
"""

from __future__ import annotations

import math
from datetime import date

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QRectF, Qt
from PySide6.QtGui import QBrush, QColor, QFontMetrics
from PySide6.QtWidgets import QHBoxLayout, QWidget

from tiltyard.engine.words import (
    MONTH_ABBR,
    bearing,
    compass_tick,
    degree_text,
    degrees,
    number,
    option_name,
    schedule_words,
)

from .. import plots, theme
from ..plot_labels import Label, LabelLayer
from ..study_model import day_of_year

#: What an objective's figures measure, for chart axes.
OBJECTIVE_AXIS = {"annual": "Annual irradiation (kWh/m²)",
                  "worst-month": "Weakest month (kWh/m²)",
                  "months": "Chosen months (kWh/m²)"}

#: Light-to-dark ramp for tilt blocks on the schedule timeline (0° light, 90° dark).
_TILT_RAMP = pg.ColorMap(pos=[0.0, 1.0], color=[QColor("#e3edf3"), QColor("#163c50")])



def tilt_fill(tilt_deg: float) -> QColor:
    """The schedule timeline's fill for a block at ``tilt_deg`` (light flat, dark steep:
    a lightness ramp, so it reads the same with any colour vision and in grey)."""
    return _TILT_RAMP.map(float(tilt_deg) / 90.0, mode="qcolor")


_OPTIMUM_WORDS = {"annual": "fixed optimum", "worst-month": "worst-month optimum",
                  "months": "chosen-months optimum"}

def _colour_bar() -> pg.ColorBarItem:
    """The map's colour scale (a plot of its own: made ahead, see :mod:`..plots`)."""
    return pg.ColorBarItem(values=(50, 100), colorMap=theme.percent_colormap(),
                           label="% of optimum", interactive=False, width=14, pen=theme.MUTED)


COLOUR_BAR = "tilt study colour bar"
plots.register(COLOUR_BAR, _colour_bar)


def _azimuth_x(az_deg, equator_az: float):
    """Map azimuths onto the map's x axis, which is centred on the equator direction."""
    a = np.mod(np.asarray(az_deg, dtype=float), 360.0)
    if equator_az < 90.0 or equator_az > 270.0:      # facing north: x runs -180..180
        return np.where(a > 180.0, a - 360.0, a)
    return a


class StudyCharts(QWidget):
    """The study's three charts (made ahead of need, see :mod:`..plots`)."""

    def __init__(self):
        super().__init__()
        lay = QHBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(6)

        self.curve_plot, cp = self._chart("Annual irradiation vs tilt", "kWh/m²", "Tilt (°)")
        self.curve = cp.plot([], [], pen=theme.series_pen(0, dashed=False))
        self.curve_opt = pg.ScatterPlotItem(size=11, symbol="o", brush=pg.mkBrush(theme.ACCENT),
                                            pen=pg.mkPen("w", width=1.5))
        cp.addItem(self.curve_opt)
        cp.setXRange(-2, 96, padding=0)
        cp.getAxis("bottom").setTicks([[(t, f"{t}") for t in range(0, 91, 15)]])
        lay.addWidget(self.curve_plot, 3)

        self.map_plot, mp = self._chart("Tilt × azimuth, % of the best plane", "Tilt (°)",
                                        "Azimuth (° from north, clockwise)", grid=False)
        self.map_image = pg.ImageItem(axisOrder="row-major")
        mp.addItem(self.map_image)
        self.map_bar = plots.take(COLOUR_BAR)
        self.map_bar.setImageItem(self.map_image, insert_in=mp)
        mp.getAxis("left").setTicks([[(t, f"{t}") for t in range(0, 91, 15)]])
        lay.addWidget(self.map_plot, 4)

        self.timeline_plot, tp = self._chart("Schedules across the year", "",
                                             "Month (block labels: tilt)", grid=False)
        tp.invertY(True)
        tp.getAxis("left").setWidth(124)
        tp.getAxis("left").setStyle(tickLength=0)
        tp.getAxis("bottom").setStyle(tickLength=0)
        lay.addWidget(self.timeline_plot, 5)

    @staticmethod
    def _chart(title: str, left: str, bottom: str, grid: bool = True):
        """A plot widget styled as every chart here: no menu, no buttons, no mouse."""
        widget = plots.plot_widget()
        widget.setMinimumHeight(plots.CHART_MIN_HEIGHT_PX)   # a short screen scrolls instead
        plot = widget.getPlotItem()
        theme.style_plot(plot, left, bottom)
        plot.setTitle(title, size="9.5pt")
        if not grid:
            plot.showGrid(x=False, y=False)
        plot.setMenuEnabled(False)
        plot.hideButtons()
        plot.getViewBox().setMouseEnabled(x=False, y=False)
        return widget, plot


CHARTS = "tilt study charts"
plots.register(CHARTS, StudyCharts)



class StudyChartDrawing:
    """Drawing a study into the view's charts (a mixin of the Tilt study view)."""

    def _draw_curve(self, study) -> None:
        cp = self.curve_plot.getPlotItem()
        for item in self._curve_overlay:
            cp.removeItem(item)
        self._curve_overlay = []
        tilt = study.tilt_curve.index.to_numpy(dtype=float)
        kwh = study.tilt_curve["objective_kwh_m2"].to_numpy(dtype=float)
        objective = study.options_used.objective
        # the title names the quantity, the axis its unit: a chart 200 px tall has no
        # room for the whole name along its axis
        cp.setLabel("left", "kWh/m²")
        cp.setTitle(OBJECTIVE_AXIS[objective].split(" (")[0] + " vs tilt", size="9.5pt")
        self.curve.setData(tilt, kwh)
        i = int(np.argmax(kwh))
        self.curve_opt.setData([tilt[i]], [kwh[i]])
        az = study.curve_azimuth_deg
        cp.setLabel("bottom", f"Tilt (°), facing {bearing(az)}")
        lo, hi = float(np.nanmin(kwh)), float(kwh[i])
        self._curve_span = (lo, hi)
        ax = 0.0 if tilt[i] < 20 else (1.0 if tilt[i] > 70 else 0.5)
        label = pg.TextItem(f"best {degrees(tilt[i])}: {number(kwh[i])} kWh/m²", color=theme.ACCENT,
                            anchor=(ax, 1.1))
        label.setFont(theme.plot_font(8.5))
        label.setPos(tilt[i], kwh[i])
        cp.addItem(label)
        self._curve_overlay.append(label)
        self._curve_best = label
        o = study.options_used
        if o.tilt_min_deg > 0 or o.tilt_max_deg < 90:
            region = pg.LinearRegionItem((o.tilt_min_deg, o.tilt_max_deg), movable=False,
                                         brush=pg.mkBrush(47, 109, 140, 22),
                                         pen=pg.mkPen(theme.GRID))
            region.setZValue(-10)
            cp.addItem(region)
            self._curve_overlay.append(region)
        fixed = study.option("fixed-optimal").schedule[0]
        self._curve_line = None
        # mark the objective's fixed optimum when it is not just the curve's best rounded
        # to the tilt step (worst-month objective, narrowed tilt range)
        if abs(fixed.tilt_deg - tilt[i]) > o.tilt_step_deg / 2.0 + 0.5:
            line = pg.InfiniteLine(fixed.tilt_deg, angle=90,
                                   pen=pg.mkPen(theme.SERIES[1], width=1.5,
                                                style=Qt.PenStyle.DashLine),
                                   label=f"{_OPTIMUM_WORDS[o.objective]} {fixed.tilt_deg:g}°",
                                   labelOpts={"position": 0.1, "color": theme.SERIES[1]})
            cp.addItem(line)
            self._curve_overlay.append(line)
            self._curve_line = line
            self._curve_line_texts = (f"{_OPTIMUM_WORDS[o.objective]} {fixed.tilt_deg:g}°",
                                      f"optimum {fixed.tilt_deg:g}°", f"{fixed.tilt_deg:g}°")
        if not self._curve_watched:
            cp.getViewBox().sigResized.connect(self._fit_curve_labels)
            self._curve_watched = True
        self._fit_curve_labels()

    def _fit_curve_labels(self, *_args) -> None:
        """Room above the curve's best point for its label, and the fixed optimum's
        label on the side of its line where it fits (again after every resize: the
        labels keep their size in pixels while the data scale changes)."""
        cp = self.curve_plot.getPlotItem()
        vb = cp.getViewBox()
        span = getattr(self, "_curve_span", None)
        if span is None or vb.height() <= 0:
            return
        lo, hi = span
        bottom = lo - 0.05 * (hi - lo)
        if self._curve_best is not None:
            need_px = self._curve_best.boundingRect().height() * 1.1 + 6.0
            f = min(0.6, need_px / vb.height())
            top = max((hi - f * bottom) / (1.0 - f), hi + 0.05 * (hi - lo))
            if top <= bottom:
                top = bottom + 1.0
            cp.setYRange(bottom, top, padding=0)
        (xmin, xmax), _ = vb.viewRange()
        sx = abs(vb.viewPixelSize()[0]) or 1.0
        width_px = vb.width()
        best = self._curve_best
        if best is not None:
            # centred over its point unless that runs it off either side
            w = best.boundingRect().width() or 1.0
            x_px = (best.pos().x() - xmin) / sx
            ax = min(max(0.5, 1.0 - (width_px - x_px) / w), x_px / w, 1.0)
            best.setAnchor((max(0.0, ax), 1.1))
        line = self._curve_line
        if line is not None and line.label is not None:
            # on the side of the line with room; shorter words when neither side has it
            right_px = (xmax - line.value()) / sx
            left_px = (line.value() - xmin) / sx
            label = line.label
            for text in self._curve_line_texts:
                label.setText(text)
                need = label.boundingRect().width() + 2
                if need <= max(right_px, left_px):
                    break
            anchor = (0, 1) if right_px >= need or right_px >= left_px else (1, 1)
            label.anchors = [anchor, anchor]
            label.updatePosition()

    def _draw_map(self, study):
        """The tilt x azimuth map, its contours and markers (a generator: it pauses
        between contour levels so the event loop gets its turns)."""
        mp = self.map_plot.getPlotItem()
        for item in self._map_overlay + self._map_label_items:
            mp.removeItem(item)
        self._map_overlay, self._map_label_items = [], []
        self._map_label_args = None
        site = study.site
        eq = site.equator_azimuth_deg
        grid = study.grid_pct
        az = grid.columns.to_numpy(dtype=float)
        tilt = grid.index.to_numpy(dtype=float)
        x = _azimuth_x(az, eq)
        order = np.argsort(x, kind="stable")
        x = x[order]
        data = grid.to_numpy(dtype=float)[:, order]
        d_az = float(np.median(np.diff(x))) if len(x) > 1 else 5.0
        d_t = float(np.median(np.diff(tilt))) if len(tilt) > 1 else 1.0
        self.map_image.setImage(data, autoLevels=False)
        x0, y0 = x[0] - d_az / 2, tilt[0] - d_t / 2
        self.map_image.setRect(QRectF(x0, y0, d_az * len(x), d_t * len(tilt)))
        lo = max(0.0, math.floor(float(np.nanmin(data)) / 10.0) * 10.0)
        self.map_bar.setLevels((lo, 100.0))
        mp.setXRange(x0, x0 + d_az * len(x), padding=0)
        mp.setYRange(y0, y0 + d_t * len(tilt), padding=0)
        start = -180 if x[0] < 0 else 0
        ticks = [(a, compass_tick(a)) for a in range(start, start + 361, 45)]
        mp.getAxis("bottom").setTicks([ticks[::2], ticks[1::2]])
        yield

        # contour levels, in the grid's own pixels (centres at index + 0.5)
        contour_lines = []
        for level, width in ((80.0, 1.0), (90.0, 1.0), (95.0, 1.3), (98.0, 1.6)):
            if level <= lo:
                continue
            xs, ys = [], []
            for line in pg.functions.isocurve(data, level, connected=True):
                pts = np.asarray(line, dtype=float)
                ys.extend(tilt[0] + (pts[:, 0] - 0.5) * d_t)
                xs.extend(x[0] + (pts[:, 1] - 0.5) * d_az)
                ys.append(np.nan)
                xs.append(np.nan)
            if not xs:
                continue
            iso = pg.PlotDataItem(xs, ys, connect="finite",
                                  pen=pg.mkPen(255, 255, 255, 170, width=width))
            mp.addItem(iso)
            self._map_overlay.append(iso)
            contour_lines.append((f"{level:.0f} %", np.asarray(xs), np.asarray(ys)))
            yield

        g_tilt, g_az, _ = study.grid_optimum
        opt_x = float(_azimuth_x(g_az, eq))
        star = pg.ScatterPlotItem([opt_x], [g_tilt], symbol="star", size=16,
                                  brush=pg.mkBrush(theme.SERIES[4]), pen=pg.mkPen("k", width=1))
        star.setZValue(20)
        mp.addItem(star)
        self._map_overlay.append(star)
        self.map_markers = [("optimum", opt_x, g_tilt)]
        self.map_labels = []
        labels = [(f"best {degrees(g_tilt)} / {bearing(g_az)}", opt_x, g_tilt)]
        plane_options = [o for o in study.options if o.kind == "plane"]
        for pl, opt in zip(site.planes, plane_options, strict=False):
            px = float(_azimuth_x(pl.azimuth_deg, eq))
            dot = pg.ScatterPlotItem([px], [pl.tilt_deg], symbol="o", size=10,
                                     brush=pg.mkBrush("w"), pen=pg.mkPen("k", width=1.5))
            dot.setZValue(10)
            mp.addItem(dot)
            self._map_overlay.append(dot)
            pct = 100.0 * study.score(opt) / study.grid_optimum[2]
            pct_text = f"{pct:.1f}" if 99.5 <= pct < 100.0 else f"{pct:.0f}"
            labels.append((f"{pl.label} ({pct_text} %)", px, pl.tilt_deg))
            self.map_markers.append((pl.label, px, pl.tilt_deg))
        self._map_label_args = (labels, contour_lines)
        if not self._map_watched:
            mp.getViewBox().sigResized.connect(self._replace_map_labels)
            self._map_watched = True
        self._replace_map_labels()

    def _replace_map_labels(self, *_args) -> None:
        """(Re)place the map's contour and marker labels for the plot's present size
        (they keep their size in pixels while the data scale changes)."""
        args = getattr(self, "_map_label_args", None)
        if args is None:
            return
        mp = self.map_plot.getPlotItem()
        for item in self._map_label_items:
            mp.removeItem(item)
        self._map_label_items = []
        labels, contour_lines = args
        # the markers' own labels first; each contour level then finds a free place
        # along its line (or goes unlabelled)
        taken = self._place_labels(mp, labels, [(mx, my) for _n, mx, my in self.map_markers])
        self._place_contour_labels(mp, contour_lines, taken)

    def _place_contour_labels(self, plot, contour_lines, taken) -> None:
        """Label each contour level once, centred above the highest of its points where
        the label fits inside the plot, clear of the ``taken`` boxes (markers and their
        labels) and of the levels before it; a level with no such point goes unlabelled.
        The boxes placed are kept in ``contour_label_boxes`` (data coordinates)."""
        vb = plot.getViewBox()
        sx, sy = (abs(v) or 1.0 for v in vb.viewPixelSize())
        (xmin, xmax), (ymin, ymax) = vb.viewRange()
        taken = list(taken)
        self.contour_label_boxes = []
        for text, xs, ys in contour_lines:
            tx = pg.TextItem(text, color=(255, 255, 255), anchor=(0.5, 1.0))
            tx.setFont(theme.plot_font(7.5))
            r = tx.boundingRect()               # the drawn box, px
            w, h = (r.width() + 2) * sx, (r.height() + 2) * sy
            ok = np.isfinite(xs) & np.isfinite(ys)
            ok &= (xs - w / 2 >= xmin) & (xs + w / 2 <= xmax) & (ys >= ymin) & (ys + h <= ymax)
            for k in np.flatnonzero(ok)[np.argsort(-ys[ok], kind="stable")][:400]:
                box = (xs[k] - w / 2, ys[k], xs[k] + w / 2, ys[k] + h)
                if all(min(box[2], t[2]) <= max(box[0], t[0])
                       or min(box[3], t[3]) <= max(box[1], t[1]) for t in taken):
                    taken.append(box)
                    self.contour_label_boxes.append(box)
                    tx.setPos(float(xs[k]), float(ys[k]))
                    plot.addItem(tx)
                    self._map_label_items.append(tx)
                    break

    def _place_labels(self, plot, labels, markers) -> list:
        """Put each (text, x, y) label beside its marker, clear of the markers and of
        the labels before it, and inside the plot. Returns the boxes taken (markers
        and labels, in data coordinates)."""
        vb = plot.getViewBox()
        sx, sy = (abs(v) or 1.0 for v in vb.viewPixelSize())
        (xmin, xmax), (ymin, ymax) = vb.viewRange()
        font = theme.plot_font(8)
        fm = QFontMetrics(font)
        taken = [(mx - 7 * sx, my - 7 * sy, mx + 7 * sx, my + 7 * sy) for mx, my in markers]
        self.map_labels = []

        def clamp(b):
            dx = max(0.0, xmin - b[0]) - max(0.0, b[2] - xmax)
            dy = max(0.0, ymin - b[1]) - max(0.0, b[3] - ymax)
            return (b[0] + dx, b[1] + dy, b[2] + dx, b[3] + dy)

        def overlap(b):
            return sum(max(0.0, min(b[2], t[2]) - max(b[0], t[0]))
                       * max(0.0, min(b[3], t[3]) - max(b[1], t[1])) for t in taken)

        for text, x, y in labels:
            # TextItem pads its text by a few pixels on every side
            w, h = (fm.horizontalAdvance(text) + 12) * sx, (fm.height() + 8) * sy
            gap_x, gap_y = 8 * sx, 8 * sy
            cands = [(x - w / 2, y + gap_y), (x - w / 2, y - gap_y - h), (x + gap_x, y - h / 2),
                     (x - gap_x - w, y - h / 2)]
            cands += [(x - w / 2, y + gap_y + k * h) for k in (1, 2, 3)]
            cands += [(x - w / 2, y - gap_y - (k + 1) * h) for k in (1, 2, 3)]
            boxes = [clamp((cx, cy, cx + w, cy + h)) for cx, cy in cands]
            box = next((b for b in boxes if overlap(b) == 0.0), None)
            if box is None:
                box = min(boxes, key=overlap)
            taken.append(box)
            near_y = min(max(y, box[1]), box[3])
            near_x = min(max(x, box[0]), box[2])
            if math.hypot((near_x - x) / sx, (near_y - y) / sy) > 14:
                leader = pg.PlotDataItem([x, near_x], [y, near_y],
                                         pen=pg.mkPen(theme.TEXT, width=1))
                leader.setZValue(25)
                plot.addItem(leader)
                self._map_label_items.append(leader)
            t = pg.TextItem(text, color=theme.TEXT, fill=pg.mkBrush(255, 255, 255, 215),
                            anchor=(0.0, 0.0))
            t.setFont(font)
            t.setZValue(30)
            t.setPos(box[0], box[3])
            plot.addItem(t)
            self._map_label_items.append(t)
            self.map_labels.append((text, box))
        return taken

    def _draw_timeline(self, study) -> None:
        tp = self.timeline_plot.getPlotItem()
        for item in self._timeline_items:
            tp.removeItem(item)
        self._timeline_items = []
        self.timeline_bars = []
        year = study.options_used.irradiance.year
        n_days = (date(year + 1, 1, 1) - date(year, 1, 1)).days
        rec = study.recommended
        ticks = []
        labels = []
        fm = QFontMetrics(theme.plot_font(9))
        for row, opt in enumerate(study.options):
            name = ("▶ " if opt is rec else "") + option_name(opt, study.mounting)
            ticks.append((row, fm.elidedText(name, Qt.TextElideMode.ElideRight, 112)))
            x0s, widths, brushes, texts = [], [], [], []
            for p in opt.schedule:
                a, b = day_of_year(p.start, year), day_of_year(p.end, year) + 1
                segments = [(a, b)] if b > a else [(a, n_days), (0, b)]
                for s, e in segments:
                    x0s.append(s)
                    widths.append(e - s)
                    if p.tilt_deg is None:
                        brushes.append(QBrush(QColor(theme.GRID), Qt.BrushStyle.BDiagPattern))
                    else:
                        brushes.append(pg.mkBrush(tilt_fill(p.tilt_deg)))
                    texts.append((s, e, p.tilt_deg))
            pen = (pg.mkPen(theme.SERIES[1], width=2.5) if opt is rec
                   else pg.mkPen(theme.SURFACE, width=1))
            bars = pg.BarGraphItem(x0=x0s, width=widths, y=[row] * len(x0s), height=0.72,
                                   brushes=brushes, pen=pen)
            bars.setToolTip(f"{degree_text(opt.label)}: {schedule_words(opt, year)}")
            tp.addItem(bars)
            self._timeline_items.append(bars)
            self.timeline_bars.append((opt.kind, bars))
            for s, e, t in texts:
                if t is None:
                    txt, colour = "follows the sun", theme.MUTED
                elif e - s < 18:
                    continue
                else:
                    txt = f"{t:.0f}°"
                    colour = theme.text_on(tilt_fill(t).name())
                labels.append(Label((s + e) / 2.0, row, txt, color=colour,
                                    font_pt=7.5 if e - s < 40 else 8.5))
        if self._timeline_labels is None:
            self._timeline_labels = LabelLayer(theme.plot_font(8.5), theme.TEXT,
                                               fill=(0, 0, 0, 0))
            self._timeline_labels.setZValue(5)
            tp.addItem(self._timeline_labels)
        self._timeline_labels.set_labels(labels)
        # month boundaries: drawn once per kind of year (they rarely change)
        if self._month_lines_year != n_days:
            for line in self._month_lines:
                tp.removeItem(line)
            self._month_lines = []
            for m in range(2, 13):
                d = (date(year, m, 1) - date(year, 1, 1)).days
                line = pg.InfiniteLine(d, angle=90, pen=pg.mkPen(theme.GRID, width=1))
                line.setZValue(-5)
                tp.addItem(line)
                self._month_lines.append(line)
            self._month_lines_year = n_days
        mids = [((date(year, m, 1) - date(year, 1, 1)).days
                 + (date(year + (m == 12), m % 12 + 1, 1) - date(year, m, 1)).days / 2.0,
                 MONTH_ABBR[m - 1])
                for m in range(1, 13)]
        tp.getAxis("bottom").setTicks([mids])
        tp.getAxis("left").setTicks([ticks])
        tp.setXRange(0, n_days, padding=0.0)
        tp.setYRange(-0.6, len(study.options) - 0.4, padding=0.0)



__all__ = ["CHARTS", "COLOUR_BAR", "OBJECTIVE_AXIS", "StudyChartDrawing", "StudyCharts",
           "tilt_fill"]
