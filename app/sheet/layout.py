"""A small page-layout engine for the sheet: fonts, fitted text boxes, a display list.

Pages are laid out once, in points (1/72 inch), with font metrics taken at a
fixed reference resolution, into a display list of :class:`TextOp` and
:class:`ShapeOp`. The same list is then painted on any device (PDF writer,
printer, preview image) by :mod:`.render`, so the screen preview, the PDF and
the printout break lines in the same places.

Every text is placed in a box (its *frame*) by :func:`fit_text`: wrapped at
word boundaries (characters, for a word wider than the box), shrunk down to
a minimum size, then elided with "…" — never drawn outside its frame. The
ops keep their frames so tests can check that nothing leaves its box.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from PySide6.QtCore import QRectF, Qt
from PySide6.QtGui import QColor, QFont, QFontMetricsF, QImage, QPainterPath, QPen

#: Resolution at which text is measured, dots per inch (that of the PDF writer).
REF_DPI = 1200
#: Font family of the sheet (embedded in the PDF); fontconfig falls back to a sans face.
FAMILY = "DejaVu Sans"
#: Ellipsis used to elide text that does not fit.
ELLIPSIS = "…"
#: Tolerance for the in-frame checks, points.
EPS = 0.01

TEXT = "#1f2328"
MUTED = "#5b6570"


@dataclass(frozen=True)
class Font:
    """A font of the sheet: size in points, weight, slant, width."""

    size: float
    bold: bool = False
    italic: bool = False
    condensed: bool = False

    def sized(self, size: float) -> Font:
        return replace(self, size=size)

    def scaled(self, factor: float) -> Font:
        return replace(self, size=self.size * factor)


def qfont(spec: Font, dpi: float) -> QFont:
    """A QFont that draws ``spec.size`` points on a painter scaled to points on a
    device of ``dpi`` dots per inch (Qt applies the device resolution and the
    painter's scale both, so the point size is divided by ``dpi / 72``)."""
    f = QFont(FAMILY)
    f.setStyleHint(QFont.StyleHint.SansSerif)
    f.setPointSizeF(spec.size * 72.0 / float(dpi))
    f.setBold(spec.bold)
    f.setItalic(spec.italic)
    if spec.condensed:
        f.setStretch(QFont.Stretch.Condensed)
    f.setHintingPreference(QFont.HintingPreference.PreferNoHinting)
    f.setKerning(True)
    if hasattr(f, "setFeature"):
        # no "fi"/"fl" ligatures: copied text reads "figures", not "ﬁgures"
        f.setFeature(QFont.Tag("liga"), 0)
    return f


# -- the display list ---------------------------------------------------------------------

@dataclass
class TextOp:
    """One line of text at a baseline, in points."""

    x: float
    baseline: float
    text: str
    font: Font
    color: str
    width: float
    ascent: float
    descent: float
    frame: QRectF
    role: str = ""

    @property
    def rect(self) -> QRectF:
        return QRectF(self.x, self.baseline - self.ascent, self.width,
                      self.ascent + self.descent)


@dataclass
class ShapeOp:
    """A vector path with an optional pen and fill, optionally clipped."""

    path: QPainterPath
    pen: QPen | None
    brush: QColor | None
    frame: QRectF
    clip: QRectF | None = None
    clip_path: QPainterPath | None = None
    role: str = ""

    @property
    def rect(self) -> QRectF:
        """Where ink can land: the path's bounds grown by half the pen, clipped."""
        r = self.path.boundingRect()
        if self.pen is not None and self.pen.style() != Qt.PenStyle.NoPen:
            w = self.pen.widthF() / 2.0
            # mitre joins can reach further than half the width; caps and joins are
            # round or flat on the sheet, so half the width is the reach
            r = r.adjusted(-w, -w, w, w)
        if self.clip is not None:
            r = r.intersected(self.clip)
        if self.clip_path is not None:
            r = r.intersected(self.clip_path.boundingRect())
        return r


@dataclass
class Page:
    """One page: its size and content area in points, the ops and the named frames."""

    width: float
    height: float
    content: QRectF
    ops: list = field(default_factory=list)
    frames: dict = field(default_factory=dict)

    def add(self, ops) -> None:
        if isinstance(ops, (TextOp, ShapeOp)):
            self.ops.append(ops)
        else:
            self.ops.extend(ops)

    def texts(self) -> list[TextOp]:
        return [o for o in self.ops if isinstance(o, TextOp)]

    def text(self) -> str:
        return "\n".join(o.text for o in self.texts())


def inside(inner: QRectF, outer: QRectF, eps: float = EPS) -> bool:
    """True when ``inner`` lies within ``outer`` (with a small tolerance)."""
    return (inner.left() >= outer.left() - eps and inner.top() >= outer.top() - eps
            and inner.right() <= outer.right() + eps and inner.bottom() <= outer.bottom() + eps)


def pen(color, width: float = 0.8, dash=None, cap=Qt.PenCapStyle.FlatCap) -> QPen:
    """A pen of ``width`` points; ``dash`` is a dash pattern in points (on, off, ...)."""
    p = QPen(QColor(color))
    p.setWidthF(width)
    p.setCapStyle(cap)
    p.setJoinStyle(Qt.PenJoinStyle.RoundJoin)
    if dash:
        # Qt's dash pattern is in units of the pen width
        p.setDashPattern([max(0.01, d / max(width, 0.01)) for d in dash])
    return p


def rect_path(r: QRectF) -> QPainterPath:
    p = QPainterPath()
    p.addRect(r)
    return p


def line_path(x0, y0, x1, y1) -> QPainterPath:
    p = QPainterPath()
    p.moveTo(x0, y0)
    p.lineTo(x1, y1)
    return p


def hrule(frame: QRectF, y: float, color, width: float, role: str = "rule") -> ShapeOp:
    """A horizontal rule across ``frame`` at ``y``, kept inside the frame with its width."""
    h = width / 2.0
    y = min(max(y, frame.top() + h), frame.bottom() - h)
    return ShapeOp(line_path(frame.left() + h, y, frame.right() - h, y), pen(color, width), None,
                   QRectF(frame), role=role)


def shape(path, frame, pen_=None, brush=None, clip=None, clip_path=None, role="") -> ShapeOp:
    return ShapeOp(path, pen_, None if brush is None else QColor(brush), frame, clip, clip_path,
                   role)


# -- measuring ------------------------------------------------------------------------------

class Measure:
    """Font metrics at the reference resolution, in points.

    Create one per layout (it holds a small reference image; safe in a worker
    thread).
    """

    def __init__(self):
        self._device = QImage(8, 8, QImage.Format.Format_ARGB32_Premultiplied)
        dpm = int(round(REF_DPI / 0.0254))
        self._device.setDotsPerMeterX(dpm)
        self._device.setDotsPerMeterY(dpm)
        self._fm: dict[Font, QFontMetricsF] = {}

    def metrics(self, font: Font) -> QFontMetricsF:
        fm = self._fm.get(font)
        if fm is None:
            fm = QFontMetricsF(qfont(font, REF_DPI), self._device)
            self._fm[font] = fm
        return fm

    def width(self, text: str, font: Font) -> float:
        return float(self.metrics(font).horizontalAdvance(text))

    def ascent(self, font: Font) -> float:
        return float(self.metrics(font).ascent())

    def descent(self, font: Font) -> float:
        return float(self.metrics(font).descent())

    def line_height(self, font: Font, spacing: float = 1.0) -> float:
        fm = self.metrics(font)
        return float(fm.ascent() + fm.descent()) * spacing

    def elide(self, text: str, font: Font, width: float) -> str:
        if self.width(text, font) <= width:
            return text
        out = self.metrics(font).elidedText(text, Qt.TextElideMode.ElideRight, width)
        while out and self.width(out, font) > width:       # belt and braces
            out = out[:-2] + ELLIPSIS if len(out) > 1 else ""
        return out

    def wrap(self, text: str, font: Font, width: float) -> list[str]:
        """Greedy word wrap to ``width``; words wider than the line are cut by characters."""
        return self.wrap_cut(text, font, width)[0]

    def wrap_cut(self, text: str, font: Font, width: float) -> tuple[list[str], bool]:
        """:meth:`wrap`, and whether a word had to be cut."""
        lines: list[str] = []
        cut_any = False
        for para in text.split("\n"):
            words = para.split()
            if not words:
                lines.append("")
                continue
            cur = ""
            for word in words:
                trial = word if not cur else cur + " " + word
                if self.width(trial, font) <= width:
                    cur = trial
                    continue
                if cur:
                    lines.append(cur)
                    cur = ""
                while self.width(word, font) > width and len(word) > 1:
                    cut_any = True
                    cut = self._fit_chars(word, font, width)
                    lines.append(word[:cut])
                    word = word[cut:]
                cur = word
            lines.append(cur)
        return lines, cut_any

    def _fit_chars(self, word: str, font: Font, width: float) -> int:
        lo, hi = 1, len(word)
        while lo < hi:
            mid = (lo + hi + 1) // 2
            if self.width(word[:mid], font) <= width:
                lo = mid
            else:
                hi = mid - 1
        return max(1, lo)


# -- fitted text ------------------------------------------------------------------------------

@dataclass
class Fitted:
    """The result of :func:`fit_text`: the ops, the height used and whether text was cut."""

    ops: list
    height: float
    elided: bool
    size: float


def fit_text(m: Measure, text: str, frame: QRectF, font: Font, *, min_size: float | None = None,
             max_lines: int | None = None, align: str = "left", valign: str = "top",
             color: str = TEXT, spacing: float = 1.12, role: str = "") -> Fitted:
    """Lay ``text`` out inside ``frame``: wrap, shrink to ``min_size``, then elide.

    Parameters
    ----------
    m : Measure
    text : str
        The text (``\\n`` starts a new line).
    frame : QRectF
        The box, points; no glyph is placed outside it.
    font : Font
        Preferred font; sizes from ``font.size`` down to ``min_size`` (default:
        no shrinking) are tried in 0.25 pt steps.
    max_lines : int, optional
        At most this many lines.
    align : {"left", "right", "center"}
    valign : {"top", "middle", "bottom"}
    """
    min_size = font.size if min_size is None else min(min_size, font.size)
    sizes = [font.size]
    s = font.size
    while s - 0.25 >= min_size - 1e-9:
        s -= 0.25
        sizes.append(round(s, 3))
    chosen = None
    # first without cutting a word, then (a word wider than the box) cutting it
    for allow_cut in (False, True):
        for size in sizes:
            f = font.sized(size)
            lines, cut = m.wrap_cut(text, f, frame.width())
            cap = _lines_that_fit(m, f, frame.height(), spacing)
            if max_lines is not None:
                cap = min(cap, max_lines)
            if len(lines) <= cap and (allow_cut or not cut):
                chosen = (f, lines, False)
                break
        if chosen is not None:
            break
    if chosen is None:
        f = font.sized(sizes[-1])
        lines = m.wrap(text, f, frame.width())
        cap = _lines_that_fit(m, f, frame.height(), spacing)
        if max_lines is not None:
            cap = min(cap, max_lines)
        if cap <= 0:
            return Fitted([], 0.0, bool(text.strip()), f.size)
        kept = lines[:cap]
        rest = " ".join(x for x in lines[cap - 1:] if x)
        last = m.elide(rest, f, frame.width())
        if not last.endswith(ELLIPSIS):
            last = m.elide(last + ELLIPSIS, f, frame.width())
        kept[-1] = last
        chosen = (f, kept, True)
    f, lines, elided = chosen
    asc, desc = m.ascent(f), m.descent(f)
    lh = m.line_height(f, spacing)
    height = (len(lines) - 1) * lh + asc + desc if lines else 0.0
    if valign == "middle":
        top = frame.top() + (frame.height() - height) / 2.0
    elif valign == "bottom":
        top = frame.bottom() - height
    else:
        top = frame.top()
    ops = []
    for i, line in enumerate(lines):
        w = m.width(line, f)
        if align == "right":
            x = frame.right() - w
        elif align == "center":
            x = frame.left() + (frame.width() - w) / 2.0
        else:
            x = frame.left()
        ops.append(TextOp(x, top + asc + i * lh, line, f, color, w, asc, desc, QRectF(frame),
                          role))
    return Fitted(ops, height, elided, f.size)


def _lines_that_fit(m: Measure, f: Font, height: float, spacing: float) -> int:
    first = m.ascent(f) + m.descent(f)
    if height + EPS < first:
        return 0
    return 1 + int(math.floor((height - first + EPS) / m.line_height(f, spacing)))


def natural_height(m: Measure, text: str, width: float, font: Font, max_lines=None,
                   spacing: float = 1.12) -> float:
    """Height the text takes at ``font`` in ``width`` (at most ``max_lines`` lines)."""
    n = len(m.wrap(text, font, width))
    if max_lines is not None:
        n = min(n, max_lines)
    return (n - 1) * m.line_height(font, spacing) + m.ascent(font) + m.descent(font)


# -- a column that fills from the top ---------------------------------------------------------

class Column:
    """Stacks boxes down a rectangle; never hands out space below its bottom."""

    def __init__(self, m: Measure, rect: QRectF):
        self.m = m
        self.rect = QRectF(rect)
        self.y = rect.top()
        self.overflow = False

    @property
    def remaining(self) -> float:
        return max(0.0, self.rect.bottom() - self.y)

    def take(self, height: float) -> QRectF:
        """A full-width box of ``height`` (less if the column is short: overflow noted)."""
        if height > self.remaining + EPS:
            self.overflow = True
        h = min(height, self.remaining)
        r = QRectF(self.rect.left(), self.y, self.rect.width(), h)
        self.y += h
        return r

    def gap(self, height: float) -> None:
        self.y = min(self.rect.bottom(), self.y + height)

    def text(self, text: str, font: Font, *, min_size=None, max_lines=None, color=TEXT,
             align="left", gap_after: float = 0.0, spacing: float = 1.12, role: str = "",
             indent: float = 0.0) -> list:
        """Fit ``text`` into the column at the current position, natural height first."""
        width = self.rect.width() - indent
        want = natural_height(self.m, text, width, font, max_lines, spacing)
        if want > self.remaining + EPS and min_size is not None:
            # it may fit smaller: let fit_text shrink it inside what is left
            want = self.remaining
        box = self.take(want)
        box = QRectF(box.left() + indent, box.top(), width, box.height())
        fitted = fit_text(self.m, text, box, font, min_size=min_size, max_lines=max_lines,
                          align=align, color=color, spacing=spacing, role=role)
        if fitted.elided:
            self.overflow = True
        # give back what shrinking saved
        self.y = box.top() + fitted.height
        self.gap(gap_after)
        return fitted.ops


__all__ = ["ELLIPSIS", "EPS", "FAMILY", "REF_DPI", "Column", "Fitted", "Font", "Measure",
           "Page", "ShapeOp", "TextOp", "fit_text", "hrule", "inside", "line_path", "natural_height",
           "pen", "qfont", "rect_path", "shape"]
