"""The sheet's two charts as vector display-list ops: the sun path and the monthly bars.

Both charts read in black-and-white print: besides colour, lines differ in
dash pattern and width, series carry marker shapes, and the horizon is a grey
fill with hatching. Every path is clipped to its plot area; every label is a
fitted text box inside the chart's frame. No numbers are computed here: the
sun-path data are a :class:`tiltyard.engine.sunchart.SunChart`, the monthly
values the study's JSON document's.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from PySide6.QtCore import QPointF, QRectF
from PySide6.QtGui import QPainterPath

from tiltyard.engine.words import MONTH_ABBR, MONTH_NAMES, compass_tick

from .. import theme
from .layout import (
    TEXT,
    Font,
    Measure,
    fit_text,
    line_path,
    natural_height,
    pen,
    rect_path,
    shape,
)

#: Smallest chart label, points (ticks, legends, hour labels).
LEGEND_PT = 7.0
GRID = "#d5d8d3"
AXIS = "#5b6570"
HORIZON_FILL = "#b9bdb6"
HORIZON_HATCH = "#6c7169"
HORIZON_LINE = "#3f443d"
HOUR_LINE = "#8b9198"

#: Dash patterns in points (on, off, ...): solid, dashed, dotted, dash-dot, long dash,
#: dash-dot-dot.
DASHES = (None, (5.0, 2.5), (1.2, 1.8), (5.0, 2.0, 1.2, 2.0), (9.0, 3.0),
          (5.0, 1.6, 1.2, 1.6, 1.2, 1.6))
MARKERS = ("circle", "square", "triangle", "diamond", "down", "cross", "plus", "star")


@dataclass(frozen=True)
class Axes:
    """A plot area and the data ranges it shows."""

    plot: QRectF
    x0: float
    x1: float
    y0: float
    y1: float

    def px(self, x):
        return self.plot.left() + (np.asarray(x, dtype=float) - self.x0) / (self.x1 - self.x0) \
            * self.plot.width()

    def py(self, y):
        return self.plot.bottom() - (np.asarray(y, dtype=float) - self.y0) / (self.y1 - self.y0) \
            * self.plot.height()


def nice_step(span: float, target: int = 5) -> float:
    """A 1-2-2.5-5 step giving about ``target`` intervals over ``span`` (common practice,
    no source)."""
    if span <= 0:
        return 1.0
    raw = span / target
    mag = 10.0 ** math.floor(math.log10(raw))
    for k in (1.0, 2.0, 2.5, 5.0, 10.0):
        if k * mag >= raw:
            return k * mag
    return 10.0 * mag


def polyline(xs, ys) -> QPainterPath:
    """A path through the points, broken at NaNs."""
    p = QPainterPath()
    pen_down = False
    for x, y in zip(np.asarray(xs, dtype=float), np.asarray(ys, dtype=float), strict=True):
        if not (math.isfinite(x) and math.isfinite(y)):
            pen_down = False
            continue
        if pen_down:
            p.lineTo(x, y)
        else:
            p.moveTo(x, y)
            pen_down = True
    return p


def chart_x(azimuth_deg, centre_deg: float) -> np.ndarray:
    """Azimuth folded onto a chart centred on ``centre_deg`` (range centre ± 180°).

    Facing the equator, east is on the left at a northern site and on the right at a
    southern one (common practice, no source).
    """
    az = np.asarray(azimuth_deg, dtype=float)
    return np.mod(az - centre_deg + 180.0, 360.0) - 180.0 + centre_deg


def wrap_break(azimuth_deg, elevation_deg, centre_deg: float):
    """Chart x and y of a curve with a NaN where it leaves one side and enters the other."""
    x = chart_x(azimuth_deg, centre_deg)
    y = np.asarray(elevation_deg, dtype=float)
    if len(x) < 2:
        return x, y
    jump = np.abs(np.diff(x)) > 180.0
    if not jump.any():
        return x, y
    idx = np.flatnonzero(jump) + 1
    return np.insert(x, idx, np.nan), np.insert(y, idx, np.nan)


def marker_path(kind: str, x: float, y: float, r: float) -> QPainterPath:
    """A marker of radius ``r`` points centred on (x, y)."""
    p = QPainterPath()
    if kind == "circle":
        p.addEllipse(QPointF(x, y), r, r)
    elif kind == "square":
        p.addRect(QRectF(x - r * 0.85, y - r * 0.85, 1.7 * r, 1.7 * r))
    elif kind in ("triangle", "down"):
        sgn = 1.0 if kind == "triangle" else -1.0
        p.moveTo(x, y - sgn * r * 1.1)
        p.lineTo(x + r, y + sgn * r * 0.8)
        p.lineTo(x - r, y + sgn * r * 0.8)
        p.closeSubpath()
    elif kind == "diamond":
        p.moveTo(x, y - r * 1.15)
        p.lineTo(x + r, y)
        p.lineTo(x, y + r * 1.15)
        p.lineTo(x - r, y)
        p.closeSubpath()
    elif kind == "cross":
        d = r * 0.85
        p.moveTo(x - d, y - d)
        p.lineTo(x + d, y + d)
        p.moveTo(x - d, y + d)
        p.lineTo(x + d, y - d)
    elif kind == "plus":
        p.moveTo(x - r, y)
        p.lineTo(x + r, y)
        p.moveTo(x, y - r)
        p.lineTo(x, y + r)
    else:  # star: five points
        pts = []
        for k in range(10):
            a = -math.pi / 2 + k * math.pi / 5
            rr = r * (1.2 if k % 2 == 0 else 0.5)
            pts.append(QPointF(x + rr * math.cos(a), y + rr * math.sin(a)))
        p.moveTo(pts[0])
        for q in pts[1:]:
            p.lineTo(q)
        p.closeSubpath()
    return p


_OPEN_MARKERS = ("cross", "plus")


def _marker_ops(kind, xs, ys, r, color, frame, clip, width=0.7):
    path = QPainterPath()
    for x, y in zip(xs, ys, strict=True):
        if math.isfinite(x) and math.isfinite(y):
            path.addPath(marker_path(kind, float(x), float(y), r))
    if path.isEmpty():
        return []
    if kind in _OPEN_MARKERS:
        return [shape(path, frame, pen(color, width * 1.3), None, clip=clip)]
    return [shape(path, frame, pen(color, width), "#ffffff", clip=clip)]


# -- axes ---------------------------------------------------------------------------------------

def _axes_ops(m: Measure, frame: QRectF, ax: Axes, xticks, yticks, x_label: str, y_label: str,
              s: float, x_grid: bool = True, x_tick_boxes=None) -> list:
    ops = []
    plot = ax.plot
    tick_font = Font(max(LEGEND_PT, 6.6 * s), condensed=True)
    label_font = Font(max(LEGEND_PT, 7.0 * s))
    grid = QPainterPath()
    for v, _t in yticks:
        y = float(ax.py(v))
        grid.moveTo(plot.left(), y)
        grid.lineTo(plot.right(), y)
    if x_grid:
        for v, _t in xticks:
            x = float(ax.px(v))
            grid.moveTo(x, plot.top())
            grid.lineTo(x, plot.bottom())
    if not grid.isEmpty():
        ops.append(shape(grid, frame, pen(GRID, 0.4), clip=plot, role="grid"))
    ops.append(shape(rect_path(plot), frame, pen(AXIS, 0.6), role="axes"))
    lh = m.line_height(tick_font)
    # y tick labels: right-aligned left of the plot, centred on their value
    for v, t in yticks:
        y = float(ax.py(v))
        box = QRectF(frame.left(), y - lh / 2.0, plot.left() - frame.left() - 2.5, lh)
        if box.bottom() > plot.bottom() + 1.0:      # the lowest label clear of the x labels
            box.moveBottom(plot.bottom() + 1.0)
        box = box.intersected(QRectF(frame.left(), frame.top(), frame.width(), frame.height()))
        ops += fit_text(m, t, box, tick_font, min_size=LEGEND_PT, align="right", color=TEXT,
                        valign="middle").ops
    # x tick labels under the plot
    n = max(1, len(xticks))
    for i, (v, t) in enumerate(xticks):
        x = float(ax.px(v))
        if x_tick_boxes is not None:
            w = x_tick_boxes
        else:
            w = plot.width() / n
        left = max(frame.left(), x - w / 2.0)
        right = min(frame.right(), x + w / 2.0)
        box = QRectF(left, plot.bottom() + 1.5, right - left, lh)
        align = "center"
        if i == 0 and x - w / 2.0 < frame.left():
            align = "left"
        ops += fit_text(m, t, box, tick_font, min_size=LEGEND_PT - 0.5, align=align).ops
    # unit labels: x centred under the tick labels, y above the axis (left-aligned)
    lf = m.line_height(label_font)
    xb = QRectF(plot.left(), plot.bottom() + 1.5 + lh + 1.0, plot.width(), lf)
    xb = xb.intersected(frame)
    ops += fit_text(m, x_label, xb, label_font, min_size=LEGEND_PT, align="center", color=TEXT,
                    role="x-label").ops
    yb = QRectF(frame.left(), plot.top() - lh / 2.0 - lf - 1.0, frame.right() - frame.left(),
                lf)
    yb = yb.intersected(frame)
    ops += fit_text(m, y_label, yb, label_font, min_size=LEGEND_PT, color=TEXT, role="y-label").ops
    return ops


def _title(m: Measure, frame: QRectF, text: str, s: float, role: str) -> tuple[list, float]:
    f = Font(9.0 * s, bold=True)
    h = m.line_height(f)
    box = QRectF(frame.left(), frame.top(), frame.width(), h)
    return fit_text(m, text, box, f, min_size=6.5, role=role).ops, h


def _legend(m: Measure, rect: QRectF, entries, s: float, frame: QRectF, out=None) -> list:
    """Legend rows: (sample(rect) -> ops, text); text wraps to two lines, shrinks, elides.

    ``out``, a list, receives the y below the last row."""
    ops = []
    font = Font(max(LEGEND_PT, 6.8 * s))
    lh = m.line_height(font)
    sample_w = 20.0 * s
    y = rect.top()
    for sample, text in entries:
        text_w = rect.width() - sample_w - 4.0
        h = natural_height(m, text, text_w, font, 3)
        if y + h > rect.bottom():
            h = rect.bottom() - y
            if h < m.line_height(font.sized(5.0)):
                break
        box = QRectF(rect.left() + sample_w + 4.0, y, text_w, h)
        ops += fit_text(m, text, box, font, min_size=LEGEND_PT, max_lines=3, role="legend").ops
        ops += sample(QRectF(rect.left(), y, sample_w, lh))
        y += h + 2.5 * s
    for op in ops:
        op.frame = QRectF(frame)
    if out is not None:
        out.append(y)
    return ops


def _legend_width(m: Measure, texts, frame: QRectF, height: float, s: float) -> float:
    """The key's width: 28 % of the chart (at most 150 pt at scale 1), widened in steps
    up to 40 % where its rows at their natural height would not fit ``height``, so
    that no row is dropped or cut while there is room beside the plot."""
    font = Font(max(LEGEND_PT, 6.8 * s))
    sample_w = 20.0 * s
    width = min(150.0 * s, frame.width() * 0.28)
    while True:
        need = sum(natural_height(m, t, width - sample_w - 4.0, font, 3) + 2.5 * s
                   for t in texts)
        if need <= height or width >= frame.width() * 0.4:
            return width
        width = min(width + 10.0 * s, frame.width() * 0.4)


def _line_sample(color, width, dash, marker=None, frame=None):
    def draw(r: QRectF):
        y = r.center().y()
        out = [shape(line_path(r.left() + 0.5, y, r.right() - 0.5, y), frame or r,
                     pen(color, width, dash))]
        if marker is not None:
            out += _marker_ops(marker, [r.center().x()], [y], 2.0, color, frame or r, None)
        return out
    return draw


def _fill_sample(frame=None):
    def draw(r: QRectF):
        box = QRectF(r.left() + 2.0, r.top() + 0.5, r.width() - 4.0, r.height() - 1.0)
        return [shape(rect_path(box), frame or r, pen(HORIZON_LINE, 0.6), HORIZON_FILL),
                *_hatch(box, QPainterPath(rect_path(box)), frame or r, spacing=2.6)]
    return draw


def _hatch(bounds: QRectF, clip_path: QPainterPath, frame: QRectF, spacing: float = 3.5):
    """Diagonal hatching over ``bounds``, clipped to ``clip_path`` (vector lines, not a
    brush pattern, so it prints the same everywhere)."""
    p = QPainterPath()
    h = bounds.height()
    x = bounds.left() - h
    while x < bounds.right():
        p.moveTo(x, bounds.bottom())
        p.lineTo(x + h, bounds.top())
        x += spacing
    return [shape(p, frame, pen(OBSTACLE_LINE, 0.35), clip=bounds, clip_path=clip_path,
                  role="hatch")]


# -- the sun path -------------------------------------------------------------------------------

#: Line width and dash of each kind of date arc (the same kinds as the app's chart).
_ARC_STYLE = {"solstice": (1.5, None), "equinox": (1.3, DASHES[1])}
#: Month-pair arcs alternate dotted and dash-dot (as in the app), so neighbours differ.
_MONTH_ARC_DASHES = (DASHES[2], DASHES[3])


def arc_style(arc, index: int):
    """Line width and dash of the ``index``-th date arc."""
    if arc.kind == "month":
        return 0.8, _MONTH_ARC_DASHES[index % 2]
    return _ARC_STYLE[arc.kind]
#: The obstacles' outline and hatching (the categorical palette's vermillion).
OBSTACLE_LINE = theme.SERIES[1]


def arc_key_text(arc) -> str:
    """The key's words for a date arc: which dates it stands for, in full."""
    if arc.kind == "solstice":
        which = "June" if arc.months == (6,) else "December"
        return f"{which} solstice, {arc.label}"
    if arc.kind == "equinox":
        return "equinoxes, March and September"
    names = " and ".join(MONTH_NAMES[m - 1] for m in arc.months)
    return f"{arc.label}: 21 {names}"


def sun_key(chart, basis_words: str, hours_where: str, frame: QRectF) -> list:
    """The sun chart's key, flat or from above: every arc in its colour and pattern
    with the dates it stands for, the hour lines, and the terrain with its obstacles."""
    entries = [(_line_sample(theme.arc_color(i).name(), *arc_style(arc, i), frame=frame),
                arc_key_text(arc) + ("" if len(arc.curve) else
                                     ": the sun stays below the horizon"))
               for i, arc in enumerate(chart.arcs)]
    entries.append((_line_sample(HOUR_LINE, 0.6, (1.0, 1.4), frame=frame),
                    f"hour lines, {basis_words}; {hours_where}"))
    entries.append((_fill_sample(frame), "terrain and obstacles (hatched): the sun is "
                                         "hidden behind them"))
    return entries


def _horizon_polygon(ax: Axes, plot: QRectF, az, el, centre: float) -> QPainterPath:
    """The area below a horizon line across the plot (NaN: no area there)."""
    hx = chart_x(az, centre)
    hy = np.asarray(el, dtype=float)
    order = np.argsort(hx, kind="stable")
    hx, hy = hx[order], hy[order]
    poly = QPainterPath()
    ok = np.isfinite(hy)
    if not ok.any():
        return poly
    if ok.all():
        ext_x = np.concatenate([[hx[-1] - 360.0], hx, [hx[0] + 360.0]])
        ext_y = np.concatenate([[hy[-1]], hy, [hy[0]]])
        first = float(np.interp(ax.x0, ext_x, ext_y))
        hx = np.concatenate([[ax.x0], hx, [ax.x1]])
        hy = np.concatenate([[first], hy, [first]])
        ok = np.ones(len(hx), dtype=bool)
    # one closed piece per run of finite values
    edges = np.flatnonzero(np.diff(np.concatenate([[0], ok.astype(int), [0]])))
    for a, b in zip(edges[0::2], edges[1::2], strict=True):
        px_, py_ = ax.px(hx[a:b]), ax.py(hy[a:b])
        poly.moveTo(float(px_[0]), plot.bottom() + 2.0)
        for x, y in zip(px_, py_, strict=True):
            poly.lineTo(float(x), float(y))
        poly.lineTo(float(px_[-1]), plot.bottom() + 2.0)
        poly.closeSubpath()
    return poly


def sun_path_chart(m: Measure, frame: QRectF, chart, basis_words: str, s: float = 1.0) -> list:
    """Elevation against azimuth: date arcs labelled on the arc, hour lines with their
    labels in a band above the paths, terrain and hatched obstacles, and a key.

    The design's data (centring, arcs, hour band) is the engine's
    (:mod:`tiltyard.engine.sunchart_design`), as in the app. Every arc is drawn (a sheet
    cannot be asked for more), two months with the same sun path sharing one.

    Parameters
    ----------
    m : Measure
    frame : QRectF
        The chart's box, points.
    chart : tiltyard.engine.sunchart.SunChart
    basis_words : str
        The hour lines' time basis in words ("local clock time").
    s : float
        Font scale.
    """
    ops, th = _title(m, frame, "Sun path through the year, with the site horizon", s,
                     "title.sunpath")
    tick_font = Font(max(LEGEND_PT, 6.6 * s), condensed=True)
    lh = m.line_height(tick_font)
    label_h = m.line_height(Font(max(LEGEND_PT, 7.0 * s)))
    top = frame.top() + th + label_h + lh / 2.0 + 4.0
    entries = sun_key(chart, basis_words, "hours in the band above", frame)
    legend_w = _legend_width(m, [t for _s, t in entries], frame, frame.bottom() - top, s)
    left = frame.left() + m.width("90°", tick_font) + 4.0
    plot = QRectF(left, top, frame.right() - legend_w - 10.0 - left, 0.0)
    plot.setBottom(frame.bottom() - lh - label_h - 4.0)
    centre = chart.centre_azimuth_deg
    band = chart.hour_band
    ymax = float(min(100.0, max(20.0, band.high_deg)))
    ax = Axes(plot, centre - 180.0, centre + 180.0, 0.0, ymax)
    xticks = [(a, compass_tick(a % 360.0))
              for a in np.arange(centre - 180.0, centre + 180.1, 45.0)]
    ystep = 10.0 if ymax <= 60 else 15.0
    yticks = [(v, f"{v:.0f}°") for v in np.arange(0.0, min(ymax, 90.0) + 0.1, ystep)]
    facing = "facing the equator" if centre == chart.equator_azimuth_deg else \
        f"facing {compass_tick(centre % 360.0).split()[0]}, so no path is cut"
    ops += _axes_ops(m, frame, ax, xticks, yticks,
                     f"Azimuth (°, clockwise from true north; {facing})",
                     "Sun elevation (°)", s)
    # the hour band: a light strip above every path
    band_box = QRectF(plot.left(), float(ax.py(band.high_deg)), plot.width(),
                      float(ax.py(band.low_deg) - ax.py(band.high_deg)))
    ops.append(shape(rect_path(band_box), frame, None, "#eef1f4", clip=plot, role="hour-band"))
    # hour lines
    hour_path = QPainterPath()
    for hl in chart.hour_lines:
        x, y = wrap_break(hl.azimuth_deg, hl.elevation_deg, centre)
        hour_path.addPath(polyline(ax.px(x), ax.py(y)))
    if not hour_path.isEmpty():
        ops.append(shape(hour_path, frame, pen(HOUR_LINE, 0.5, (1.0, 1.4)), clip=plot,
                         role="hour-lines"))
    # date arcs, months first, the solstices and the equinoxes on top
    arcs = sorted(enumerate(chart.arcs), key=lambda t: t[1].kind != "month")
    for i, arc in arcs:
        if not len(arc.curve):
            continue
        width, dash = arc_style(arc, i)
        x, y = wrap_break(arc.curve.azimuth_deg, arc.curve.elevation_deg, centre)
        ops.append(shape(polyline(ax.px(x), ax.py(y)), frame,
                         pen(theme.arc_color(i).name(), width, dash), clip=plot,
                         role=f"path.{arc.label}"))
    # terrain below the horizon line, obstacles hatched on it
    terrain = _horizon_polygon(ax, plot, chart.horizon_azimuth_deg,
                               chart.horizon_elevation_deg, centre)
    ops.append(shape(terrain, frame, None, HORIZON_FILL, clip=plot, role="horizon-fill"))
    objects = _horizon_polygon(ax, plot, chart.horizon_azimuth_deg,
                               chart.obstacle_elevation_deg, centre)
    if not objects.isEmpty():
        ops += _hatch(plot, objects, frame)
        ops.append(shape(objects, frame, pen(OBSTACLE_LINE, 0.6), clip=plot, role="obstacles"))
    hx, hy = wrap_break(chart.horizon_azimuth_deg, chart.horizon_elevation_deg, centre)
    ops.append(shape(polyline(ax.px(hx), ax.py(hy)), frame, pen(HORIZON_LINE, 0.9),
                     clip=plot, role="horizon-line"))
    # labels: the hours in their band, each arc's name on the arc; none over another
    taken: list[QRectF] = []
    inner = plot.adjusted(1, 1, -1, -1)

    def put(text, x, y, font, role, above=True):
        w = m.width(text, font) + 1.5
        h = m.line_height(font)
        box = QRectF(x - w / 2.0, (y - h - 1.0) if above else (y - h / 2.0), w, h)
        if not inner.contains(box) or any(box.intersects(t) for t in taken):
            return False
        taken.append(box)
        ops.append(shape(rect_path(box), frame, None, "#ffffff" if role != "hour-label"
                         else "#eef1f4", role=f"{role}-bg"))
        ops.extend(fit_text(m, text, box, font, align="center", color="#3b4148",
                            role=role).ops)
        return True

    hf = Font(max(LEGEND_PT - 0.5, 6.0 * s), condensed=True)
    mid = 0.5 * (band.low_deg + band.high_deg)
    for hour, x in zip(band.hours, band.azimuth_deg, strict=True):
        put(f"{hour}h", float(ax.px(x)), float(ax.py(mid)), hf, "hour-label", above=False)
    af = Font(max(LEGEND_PT - 0.5, 6.0 * s))
    for _i, arc in arcs:
        if arc.label_index < 0:
            continue
        for j in (arc.label_index, *arc.label_candidates):
            x = float(ax.px(chart_x(arc.curve.azimuth_deg[j], centre)))
            if put(arc.label, x, float(ax.py(arc.curve.elevation_deg[j])), af, "arc-label"):
                break
    # the key: every arc, what it stands for, in its colour and pattern
    lrect = QRectF(frame.right() - legend_w, plot.top(), legend_w,
                   frame.bottom() - plot.top())
    ops += _legend(m, lrect, entries, s, frame)
    return ops


# -- the monthly chart ------------------------------------------------------------------------------

@dataclass(frozen=True)
class Series:
    """One line of the monthly chart."""

    name: str
    values: tuple           # 12 monthly values, kWh/m²
    style: int              # index into the colour / dash / marker cycles
    emphasis: bool = False  # the recommended option
    ceiling: bool = False   # the two-axis ceiling


def monthly_chart(m: Measure, frame: QRectF, series, s: float = 1.0,
                  title: str = "Monthly irradiation on the plane of the compared options") -> list:
    """Monthly irradiation of several options, one line with markers per option."""
    ops, th = _title(m, frame, title, s, "title.monthly")
    tick_font = Font(max(LEGEND_PT, 6.6 * s), condensed=True)
    lh = m.line_height(tick_font)
    label_h = m.line_height(Font(max(LEGEND_PT, 7.0 * s)))
    vmax = max((max(v.values) for v in series), default=1.0)
    step = nice_step(vmax * 1.05, 6)
    ymax = max(step, math.ceil(vmax * 1.04 / step) * step)
    yticks = [(v, f"{v:g}") for v in np.arange(0.0, ymax + step / 2, step)]
    left = frame.left() + max(m.width(t, tick_font) for _v, t in yticks) + 4.0
    top = frame.top() + th + label_h + lh / 2.0 + 4.0
    bottom = frame.bottom() - lh - label_h - 4.0
    legend_w = _legend_width(m, [v.name for v in series], frame, bottom - top, s)
    plot = QRectF(left, top, frame.right() - legend_w - 10.0 - left, 0.0)
    plot.setBottom(bottom)
    ax = Axes(plot, 0.5, 12.5, 0.0, ymax)
    xticks = [(i + 1, MONTH_ABBR[i]) for i in range(12)]
    ops += _axes_ops(m, frame, ax, xticks, yticks, "Month",
                     "Irradiation on the plane (kWh/m² per month)", s, x_grid=False)
    xs = ax.px(np.arange(1, 13))
    entries = []
    # ceiling first (underneath), the recommended option last (on top)
    ordered = sorted(series, key=lambda v: (not v.ceiling, v.emphasis))
    for v in ordered:
        ys = ax.py(np.asarray(v.values, dtype=float))
        color, dash, width, mk = _series_style(v)
        ops.append(shape(polyline(xs, ys), frame, pen(color, width, dash), clip=plot,
                         role=f"series.{v.name}"))
        ops += _marker_ops(mk, xs, ys, 2.1 if not v.emphasis else 2.6, color, frame, plot,
                           width=0.8)
    for v in series:
        color, dash, width, mk = _series_style(v)
        entries.append((_line_sample(color, width, dash, mk, frame), v.name))
    lrect = QRectF(frame.right() - legend_w, plot.top(), legend_w, plot.height())
    ops += _legend(m, lrect, entries, s, frame)
    return ops


#: Colours of the other series: Okabe-Ito without black (the recommendation's) and without
#: the pale yellow (too faint for thin lines on white).
_OTHER_COLOURS = tuple(c for c in theme.LINE_SERIES if c != "#000000")


def _series_style(v: Series):
    """Colour, dash, width and marker of a series: the recommendation solid black and thick,
    the ceiling dotted grey, the others a colour, a dash pattern and a marker each."""
    if v.ceiling:
        return "#7a8088", (1.2, 1.6), 0.9, "plus"
    if v.emphasis:
        return "#1f2328", None, 2.0, "diamond"
    i = v.style
    color = _OTHER_COLOURS[i % len(_OTHER_COLOURS)]
    dash = DASHES[i % len(DASHES)]
    others = [k for k in MARKERS if k not in ("diamond", "plus")]
    return color, dash, 1.0, others[i % len(others)]


__all__ = ["Axes", "Series", "arc_key_text", "arc_style", "chart_x", "marker_path",
           "monthly_chart", "nice_step", "polyline", "sun_key", "sun_path_chart", "wrap_break"]
