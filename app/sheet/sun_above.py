"""The sheet's sun path seen from above, for sites where it leads (the tropics).

The same design as the app's from-above chart (:mod:`tiltyard.app.views.sunpath_view`):
north up and east to the right, the zenith in the centre and the horizon on the outer
ring; the date arcs labelled on the arc; the hour lines with their hours written on
them; the skyline as a light outline with elevation ticks at its highest points, the
terrain a grey fill outside it and the obstacles hatched. Where the sun crosses both
meridians high in the sky, a flat chart must cut or squeeze some path; this one shows
every path whole. The geometry (map projection, skyline ticks, label places) is the
engine's (:mod:`tiltyard.engine.sunchart_design`).
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import QRectF
from PySide6.QtGui import QPainterPath

from tiltyard.engine.sunchart_design import polar_xy, skyline_peaks
from tiltyard.engine.words import compass

from .. import theme
from .charts import (
    AXIS,
    GRID,
    HORIZON_FILL,
    HORIZON_LINE,
    HOUR_LINE,
    LEGEND_PT,
    OBSTACLE_LINE,
    _hatch,
    _legend,
    _legend_width,
    arc_style,
    polyline,
    sun_key,
)
from .layout import TEXT, Font, Measure, fit_text, line_path, pen, rect_path, shape

#: Hour labels closer to the zenith than this (degrees of zenith angle) are written
#: this far out along their own bearing, where the line runs on (as in the app).
NEAR_ZENITH_LABEL_R = 28.0


def _ring(cx: float, cy: float, r: float) -> QPainterPath:
    p = QPainterPath()
    p.addEllipse(cx - r, cy - r, 2.0 * r, 2.0 * r)
    return p


def sun_above_chart(m: Measure, frame: QRectF, chart, basis_words: str, s: float = 1.0,
                    title: str = "Sun path through the year, seen from above, with the "
                                 "site horizon") -> list:
    """The from-above sun chart with its key, as display-list ops inside ``frame``.

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
    tf = Font(9.0 * s, bold=True)
    th = m.line_height(tf)
    ops = fit_text(m, title, QRectF(frame.left(), frame.top(), frame.width(), th), tf,
                   min_size=6.5, role="title.sunpath").ops
    entries = sun_key(chart, basis_words, "hours written on their lines", frame)
    top = frame.top() + th + 4.0
    legend_w = _legend_width(m, [t for _s, t in entries], frame, frame.bottom() - top, s)
    cf = Font(max(LEGEND_PT, 7.5 * s), bold=True)
    pad = m.line_height(cf) + 3.0
    area = QRectF(frame.left(), top, frame.width() - legend_w - 10.0, frame.bottom() - top)
    radius = max(10.0, 0.5 * min(area.width(), area.height()) - pad)
    cx, cy = area.center().x(), area.center().y()
    k = radius / 90.0
    disc = QRectF(cx - radius, cy - radius, 2.0 * radius, 2.0 * radius)

    def xy(az, el):
        x, y = polar_xy(az, el)
        return cx + k * np.asarray(x), cy - k * np.asarray(y)

    # terrain: between the horizon ring and the skyline; obstacles hatched on it
    ring = _ring(cx, cy, radius)
    az = np.asarray(chart.horizon_azimuth_deg, dtype=float)
    sx, sy = xy(az, np.maximum(chart.horizon_elevation_deg, 0.0))
    sky = polyline(sx, sy)
    sky.closeSubpath()
    terrain = ring.subtracted(sky)
    ops.append(shape(terrain, frame, None, HORIZON_FILL, clip=disc, role="horizon-fill"))
    obst = np.asarray(chart.obstacle_elevation_deg, dtype=float)
    if np.isfinite(obst).any():
        ox, oy = xy(az, np.where(np.isfinite(obst), obst, 0.0))
        objects = ring.subtracted(_closed(ox, oy))
        ops += _hatch(disc, objects, frame)
        ops.append(shape(objects, frame, pen(OBSTACLE_LINE, 0.6), clip=disc, role="obstacles"))
    # rings at 0°, 30° and 60°, bearings every 45°
    grid = QPainterPath()
    for el in (30.0, 60.0):
        grid.addPath(_ring(cx, cy, k * (90.0 - el)))
    for b in np.arange(0.0, 360.0, 45.0):
        x, y = xy([b, b], [90.0, 0.0])
        grid.addPath(line_path(x[0], y[0], x[1], y[1]))
    ops.append(shape(grid, frame, pen(GRID, 0.5), role="grid"))
    ops.append(shape(ring, frame, pen(HORIZON_LINE, 0.8), role="horizon-ring"))
    ops.append(shape(sky, frame, pen(HORIZON_LINE, 0.9), clip=disc, role="horizon-line"))
    # hour lines, then the arcs on top (months first, the solstices and equinoxes last)
    hours = QPainterPath()
    for hl in chart.hour_lines:
        hours.addPath(polyline(*xy(hl.azimuth_deg, hl.elevation_deg)))
    if not hours.isEmpty():
        ops.append(shape(hours, frame, pen(HOUR_LINE, 0.5, (1.0, 1.4)), clip=disc,
                         role="hour-lines"))
    arcs = sorted(enumerate(chart.arcs), key=lambda t: t[1].kind != "month")
    for i, arc in arcs:
        if len(arc.curve):
            ops.append(shape(polyline(*xy(arc.curve.azimuth_deg, arc.curve.elevation_deg)),
                             frame, pen(theme.arc_color(i).name(), *arc_style(arc, i)),
                             clip=disc, role=f"path.{arc.label}"))
    ops += _labels(m, frame, chart, xy, cx, cy, radius, k, s)
    lrect = QRectF(frame.right() - legend_w, top, legend_w, frame.bottom() - top)
    ops += _legend(m, lrect, entries, s, frame)
    return ops


def _closed(x, y) -> QPainterPath:
    p = polyline(x, y)
    p.closeSubpath()
    return p


def _labels(m: Measure, frame: QRectF, chart, xy, cx, cy, radius, k, s) -> list:
    """Compass points, ring elevations, skyline ticks, hours and arc names; none over
    another and none outside the frame (a label with no free place is left out)."""
    ops: list = []
    taken: list[QRectF] = []

    def put(text, x, y, font, role, color="#3b4148", ax=0.5, ay=0.5):
        w = m.width(text, font) + 1.5
        h = m.line_height(font)
        box = QRectF(x - ax * w, y - ay * h, w, h)
        if not frame.contains(box) or any(box.intersects(t) for t in taken):
            return False
        taken.append(box)
        ops.append(shape(rect_path(box), frame, None, "#ffffff", role=f"{role}-bg"))
        ops.extend(fit_text(m, text, box, font, align="center", color=color, role=role).ops)
        return True

    cf = Font(max(LEGEND_PT, 7.5 * s), bold=True)
    small = Font(max(LEGEND_PT - 0.5, 6.0 * s))
    for b in np.arange(0.0, 360.0, 45.0):
        sb, cb = math.sin(math.radians(b)), math.cos(math.radians(b))
        name = compass(b)
        put(name, cx + (radius + 2.0) * sb, cy - (radius + 2.0) * cb,
            cf if len(name) == 1 else small, "compass", TEXT if len(name) == 1 else AXIS,
            0.5 - 0.5 * sb, 0.5 + 0.5 * cb)
    # ring elevations on the side away from the equator, where paths are fewest
    pole = 0.0 if chart.equator_azimuth_deg == 180.0 else 180.0
    b = math.radians(pole + 20.0)
    for el in (30.0, 60.0):
        r = k * (90.0 - el)
        put(f"{el:.0f}°", cx + r * math.sin(b), cy - r * math.cos(b), small, "ring-label",
            AXIS)
    # skyline ticks at its highest points
    az = np.asarray(chart.horizon_azimuth_deg[:-1], dtype=float)
    el = np.asarray(chart.horizon_elevation_deg[:-1], dtype=float)
    ticks = QPainterPath()
    for i in skyline_peaks(az, el):
        bi = math.radians(az[i])
        r0, r1 = k * (90.0 - el[i]), k * (90.0 - el[i] - 4.0)
        ticks.addPath(line_path(cx + r0 * math.sin(bi), cy - r0 * math.cos(bi),
                                cx + r1 * math.sin(bi), cy - r1 * math.cos(bi)))
        put(f"{el[i]:.0f}°", cx + r1 * math.sin(bi), cy - r1 * math.cos(bi), small,
            "skyline-label", HORIZON_LINE, 0.5 + 0.6 * math.sin(bi), 0.5 - 0.6 * math.cos(bi))
    if not ticks.isEmpty():
        ops.append(shape(ticks, frame, pen(HORIZON_LINE, 0.9), role="skyline-ticks"))
    # the hours on their lines: near the zenith further out along their own bearing,
    # else beside the labelling solstice on its outer side in the tropics (inner side
    # elsewhere), as in the app; then each arc's name at the first free place along it
    hf = Font(max(LEGEND_PT - 0.5, 6.0 * s), condensed=True)
    for line in chart.hour_lines:
        if not math.isfinite(line.label_azimuth_deg):
            continue
        bl = math.radians(line.label_azimuth_deg)
        if 90.0 - line.label_elevation_deg < NEAR_ZENITH_LABEL_R:
            x, y = xy(line.label_azimuth_deg, 90.0 - NEAR_ZENITH_LABEL_R)
            anchor = (0.5, 0.5)
        else:
            x, y = xy(line.label_azimuth_deg, line.label_elevation_deg)
            sign = -1.0 if line.label_on_top else 1.0
            anchor = (0.5 - 0.6 * sign * math.sin(bl), 0.5 + 0.6 * sign * math.cos(bl))
        put(f"{line.hour}h", float(x), float(y), hf, "hour-label", "#3b4148", *anchor)
    af = Font(max(LEGEND_PT - 0.5, 6.0 * s))
    for arc in chart.arcs:
        if arc.label_index < 0:
            continue
        # on the arc, else just beside it (paths crowd each other in the tropics)
        places = [(j, ay) for ay in (0.5, 1.05, -0.05)
                  for j in (arc.label_index, *arc.label_candidates)]
        for j, ay in places:
            x, y = xy(arc.curve.azimuth_deg[j], arc.curve.elevation_deg[j])
            if put(arc.label, float(x), float(y), af, "arc-label", ay=ay):
                break
    return ops


__all__ = ["NEAR_ZENITH_LABEL_R", "sun_above_chart"]
