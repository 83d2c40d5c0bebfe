"""Tiltyard's look: a calm light theme, one accent colour, colour-vision-safe series.

- Categorical series use the Okabe-Ito palette (M. Okabe and K. Ito, "Color
  Universal Design (CUD): how to make figures and presentations that are
  friendly to colorblind people", 2008), which stays distinguishable for the
  common colour-vision deficiencies; lines also differ in dash pattern so they
  read in greyscale.
- Months use a perceptual sequential ramp (viridis, van der Walt and Smith,
  matplotlib 2015), trimmed before its palest yellow so every month reads on
  white.
"""

from __future__ import annotations

import functools
from typing import TYPE_CHECKING

from PySide6.QtCore import Qt
from PySide6.QtGui import QColor, QFont, QPalette
from PySide6.QtWidgets import QApplication, QGraphicsItem

if TYPE_CHECKING:
    import pyqtgraph as pg

# pyqtgraph (150-350 ms to import) is loaded only by the functions that draw charts,
# so the window and its first view (the Site form) show before it is loaded

ACCENT = "#2f6d8c"          # slate blue: selection, bold day path, recommended option
ACCENT_SOFT = "#dfeaf1"
TEXT = "#1f2328"
MUTED = "#5b6570"
SURFACE = "#fbfbf9"
PANEL = "#f1f2ef"
GRID = "#d5d8d3"
ERROR = "#b3261e"
WARNING = "#8a5a00"
HORIZON_FILL = (90, 96, 88, 150)   # the ground and obstacles below the horizon line
HORIZON_LINE = "#4a4f47"

#: Okabe-Ito (2008) in their published order, black first.
CATEGORICAL = ("#000000", "#E69F00", "#56B4E9", "#009E73", "#F0E442", "#0072B2",
               "#D55E00", "#CC79A7")
#: Order used for series on white (the yellow is too pale for thin lines; it goes last).
SERIES = ("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000",
          "#F0E442")

def _relative_luminance(hex_color: str) -> float:
    """WCAG 2.1 relative luminance of an sRGB colour ("#rrggbb")."""
    c = [int(hex_color[i:i + 2], 16) / 255.0 for i in (1, 3, 5)]
    c = [v / 12.92 if v <= 0.04045 else ((v + 0.055) / 1.055) ** 2.4 for v in c]
    return 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2]


def contrast_on_white(hex_color: str) -> float:
    """WCAG 2.1 contrast ratio of a colour against white (W3C, WCAG 2.1, 2018, sec. 1.4.11)."""
    return 1.05 / (_relative_luminance(hex_color) + 0.05)


def contrast(a: str, b: str) -> float:
    """WCAG 2.1 contrast ratio of two colours ("#rrggbb"; W3C, WCAG 2.1, 2018, sec. 1.4.3)."""
    la, lb = sorted((_relative_luminance(a), _relative_luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)


def text_on(fill: str) -> str:
    """White or black, whichever reads better on ``fill``: at least 4.58:1 on any fill
    (WCAG 2.1 asks 4.5:1 of small text; between white and the body text colour, a
    mid-grey fill would give only 4:1)."""
    return "#ffffff" if contrast("#ffffff", fill) > contrast("#000000", fill) else "#000000"


#: Lines need 3:1 against the white plot (WCAG 2.1 non-text contrast).
LINE_CONTRAST = 3.0


def _line_colour(hex_color: str) -> str:
    """The colour darkened (same hue, in steps of 4 % lightness) until it has
    :data:`LINE_CONTRAST` against white."""
    c = QColor(hex_color)
    while contrast_on_white(c.name()) < LINE_CONTRAST:
        h, s_, lig, _a = c.getHslF()
        c = QColor.fromHslF(h, s_, max(0.0, lig - 0.04))
    return c.name()


#: The series colours for lines and outlines: SERIES with the orange and sky blue
#: darkened to 3:1 on white (the pale yellow dropped); fills keep SERIES.
LINE_SERIES = tuple(_line_colour(c) for c in SERIES if c != "#F0E442")
DASHES = (Qt.PenStyle.SolidLine, Qt.PenStyle.DashLine, Qt.PenStyle.DotLine,
          Qt.PenStyle.DashDotLine, Qt.PenStyle.DashDotDotLine)


def series_pen(i: int, width: float = 2.0, dashed: bool = True):
    """Pen for the i-th categorical series (colour and, for i >= 1, a dash pattern)."""
    import pyqtgraph as pg
    pen = pg.mkPen(LINE_SERIES[i % len(LINE_SERIES)], width=width)
    if dashed:
        pen.setStyle(DASHES[i % len(DASHES)])
    return pen


def series_color(i: int) -> QColor:
    return QColor(SERIES[i % len(SERIES)])


@functools.cache
def _viridis():
    import pyqtgraph as pg
    return pg.colormap.get("viridis")


def viridis_color(fraction: float) -> QColor:
    """The colour at ``fraction`` (0..1) of the viridis ramp."""
    return _viridis().map(float(fraction), mode="qcolor")


def arc_color(index: int, n: int = 7) -> QColor:
    """Colour of the ``index``-th sun-path date arc (lowest sun first): the darker part
    of viridis, so every arc keeps at least 3:1 contrast on white (a line, not text;
    checked in tests/app/test_chart_colours.py)."""
    return viridis_color(0.0 + 0.55 * index / max(n - 1, 1))


def month_color(month: int) -> QColor:
    """Colour of month 1..12 on the trimmed viridis ramp."""
    return _viridis().map(0.05 + 0.80 * (month - 1) / 11.0, mode="qcolor")


@functools.cache
def percent_colormap():
    """Sequential map for 'percent of the optimum' grids (read once from pyqtgraph's files)."""
    import pyqtgraph as pg
    return pg.colormap.get("cividis")


STYLE_SHEET = f"""
QMainWindow, QDialog {{ background: {SURFACE}; }}
QListWidget#navigation {{ background: {PANEL}; border: none; font-size: 11pt; outline: 0; }}
QListWidget#navigation::item {{ padding: 10px 14px; }}
QListWidget#navigation::item:selected {{ background: {ACCENT}; color: white; }}
QLabel.fieldError, QLabel[role="fieldError"] {{ color: {ERROR}; }}
QLabel[role="muted"] {{ color: {MUTED}; }}
QLabel[role="caution"] {{ color: {MUTED}; font-size: 9pt; }}
QLabel[role="heading"] {{ font-size: 13pt; font-weight: 600; }}
QLabel[role="figure"] {{ font-size: 12pt; font-weight: 600; color: {ACCENT}; }}
QFrame#banner[level="error"] {{ background: #f9e3e1; border: 1px solid {ERROR}; }}
QFrame#banner[level="warning"] {{ background: #fbf0d9; border: 1px solid {WARNING}; }}
QFrame#banner[level="info"] {{ background: {ACCENT_SOFT}; border: 1px solid {ACCENT}; }}
QGroupBox {{ font-weight: 600; margin-top: 14px; }}
QGroupBox::title {{ subcontrol-origin: margin; left: 6px; padding: 0 3px; }}
QTableView {{ gridline-color: {GRID}; selection-background-color: {ACCENT_SOFT};
             selection-color: {TEXT}; }}
QHeaderView::section {{ background: {PANEL}; padding: 4px; border: none;
                       border-bottom: 1px solid {GRID}; font-weight: 600; }}
QLineEdit[invalid="true"] {{ border: 1px solid {ERROR}; background: #fdf3f2; }}
"""


def apply(app: QApplication) -> None:
    """Apply the theme to the application (pyqtgraph's defaults: :func:`configure_charts`)."""
    app.setStyle("Fusion")
    pal = app.palette()
    pal.setColor(QPalette.ColorRole.Window, QColor(SURFACE))
    pal.setColor(QPalette.ColorRole.Base, QColor("#ffffff"))
    pal.setColor(QPalette.ColorRole.AlternateBase, QColor(PANEL))
    pal.setColor(QPalette.ColorRole.Text, QColor(TEXT))
    pal.setColor(QPalette.ColorRole.WindowText, QColor(TEXT))
    pal.setColor(QPalette.ColorRole.ButtonText, QColor(TEXT))   # text colour by palette, not
    # by a style-sheet rule on every widget (such a rule slows every widget's painting)
    pal.setColor(QPalette.ColorRole.Highlight, QColor(ACCENT))
    pal.setColor(QPalette.ColorRole.HighlightedText, QColor("#ffffff"))
    app.setPalette(pal)
    font = app.font()
    if font.pointSizeF() < 9.5:
        font.setPointSizeF(9.5)
    app.setFont(font)
    app.setStyleSheet(STYLE_SHEET)


def configure_charts() -> None:
    """pyqtgraph's defaults for our charts (:mod:`tiltyard.app.plots` calls it on import)."""
    import pyqtgraph as pg
    pg.setConfigOptions(background="w", foreground=TEXT, antialias=True)


def plot_font(size_pt: float = 9.0) -> QFont:
    f = QFont()
    f.setPointSizeF(size_pt)
    return f


def style_plot(plot: pg.PlotItem, left: str, bottom: str) -> None:
    """Axis labels with units and a light grid, the same on every chart."""
    import pyqtgraph as pg
    plot.showGrid(x=True, y=True, alpha=0.25)
    plot.setLabel("left", left)
    plot.setLabel("bottom", bottom)
    for name in ("left", "bottom"):
        ax = plot.getAxis(name)
        ax.setPen(pg.mkPen(MUTED))
        ax.setTextPen(pg.mkPen(TEXT))
        ax.setTickFont(plot_font(9))
    cache_axes(plot)


def cache_axes(plot: pg.PlotItem) -> None:
    """Keep each axis's rendering in a pixmap that Qt reuses until the axis changes.

    An axis replays its recorded ticks, labels and grid lines on every repaint
    that touches it (with a grid, that is any change in the plot); replaying
    text is slow. The cache is for the screen only: the sheet draws its own
    charts.
    """
    for name in ("left", "bottom", "right", "top"):
        plot.getAxis(name).setCacheMode(QGraphicsItem.CacheMode.DeviceCoordinateCache)
