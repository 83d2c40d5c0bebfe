"""Many small text labels on a pyqtgraph plot as one painted item.

A pyqtgraph ``TextItem`` is three graphics items with Python-side bounding
and transform code; a chart with dozens of them (the hour labels of a sun
path) spends most of each redraw, after every data or range change, in that
bookkeeping. :class:`LabelLayer` keeps the labels as plain data and draws
them all in one ``paint`` call, at a fixed screen size, each anchored to a
point in data coordinates the way ``TextItem`` anchors are read.
"""

from __future__ import annotations

from dataclasses import dataclass

import pyqtgraph as pg
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QFont, QFontMetricsF


@dataclass(frozen=True)
class Label:
    """One label: ``text`` at data point (``x``, ``y``); the anchor is the fraction
    of the label box's width and height that sits on the point ((0.5, 1.0):
    centred above it; values outside 0..1 leave a gap). ``alternates`` are further
    (x, y) data points, best first, tried in turn on a layer that avoids overlaps when
    the box at (``x``, ``y``) is taken."""

    x: float
    y: float
    text: str
    anchor_x: float = 0.5
    anchor_y: float = 0.5
    color: str | None = None        # the layer's colour when None
    font_pt: float | None = None    # the layer's font size when None
    alternates: tuple = ()


class LabelLayer(pg.GraphicsObject):
    """All of a chart's small labels, drawn in one pass on a translucent fill."""

    PAD_PX = 2.0

    def __init__(self, font: QFont, color, fill=(255, 255, 255, 190),
                 avoid_overlap: bool = False):
        super().__init__()
        self.avoid_overlap = avoid_overlap
        self._font = QFont(font)
        self._color = pg.mkColor(color)
        self._fill = QColor(*fill) if isinstance(fill, tuple) else pg.mkColor(fill)
        self._labels: tuple[Label, ...] = ()
        self._metrics = QFontMetricsF(self._font)

    # -- data -------------------------------------------------------------------------
    @property
    def labels(self) -> tuple[Label, ...]:
        return self._labels

    def set_labels(self, labels) -> None:
        labels = tuple(labels)
        if labels == self._labels:
            return
        self._labels = labels
        self.update()

    def label(self, text: str) -> Label | None:
        """The first label reading ``text`` (None if there is none)."""
        return next((lb for lb in self._labels if lb.text == text), None)

    # -- pyqtgraph / QGraphicsItem ----------------------------------------------------
    def dataBounds(self, ax, frac=1.0, orthoRange=None):
        return None                       # labels never widen the auto range

    def boundingRect(self) -> QRectF:
        r = self.viewRect()
        return QRectF() if r is None else r

    def viewRangeChanged(self) -> None:
        self.prepareGeometryChange()
        self.update()

    def _boxes(self, tr):
        """(label, box, font, metrics) of the labels drawn, under item-to-device ``tr``.

        With ``avoid_overlap`` a label whose box would meet one drawn before it is left
        out (labels come in priority order), so labels never cover each other.
        """
        pad = self.PAD_PX
        out, taken = [], []
        for lb in self._labels:
            font = self._font if lb.font_pt is None else self._sized(lb.font_pt)
            fm = self._metrics if lb.font_pt is None else QFontMetricsF(font)
            h = fm.height()
            w = fm.horizontalAdvance(lb.text) + 2 * pad
            places = ((lb.x, lb.y), *lb.alternates) if self.avoid_overlap else ((lb.x, lb.y),)
            for x, y in places:
                pt = tr.map(QPointF(x, y))
                box = QRectF(pt.x() - lb.anchor_x * w, pt.y() - lb.anchor_y * h, w, h)
                if not (self.avoid_overlap and any(box.intersects(t) for t in taken)):
                    taken.append(box)
                    out.append((lb, box, font))
                    break
        return out

    def scene_rects(self) -> list[QRectF]:
        """The boxes of the labels drawn, in scene coordinates (pixels of the plot widget)."""
        if not self._labels or self.scene() is None:
            return []
        return [box for _lb, box, _f in self._boxes(self.sceneTransform())]

    def paint(self, p, *args) -> None:
        if not self._labels:
            return
        tr = p.transform()                # item to device coordinates while painting
        p.save()
        p.resetTransform()
        color = None
        p.setPen(self._color)
        for lb, box, font in self._boxes(tr):
            p.setFont(font)
            if lb.color != color:
                color = lb.color
                p.setPen(self._color if color is None else pg.mkColor(color))
            if self._fill.alpha():
                p.fillRect(box, self._fill)
            p.drawText(box, Qt.AlignmentFlag.AlignCenter, lb.text)
        p.restore()

    def _sized(self, size_pt: float) -> QFont:
        f = QFont(self._font)
        f.setPointSizeF(size_pt)
        return f
