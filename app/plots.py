"""Chart parts made ahead of need, so building a view takes one short turn.

A pyqtgraph plot (its view box, four axes and two context menus) takes
8–15 ms to build on the GUI thread, and a view holds up to four. After the
window is shown, :func:`prepare` builds them one per event-loop turn while the
user reads the first view; a view takes one with :func:`plot_item` or
:func:`plot_widget` (or :func:`take` for another registered part) and a new
one is built on the spot only when none is ready.
"""

from __future__ import annotations

from collections.abc import Callable

import pyqtgraph as pg
from PySide6.QtCore import QTimer
from PySide6.QtGui import QColor, QPen

from . import theme
from .tasks import TURN_MS

theme.configure_charts()     # pyqtgraph's defaults, before any chart is made

#: The least height of a chart on screen, px: below it tick labels, titles and data
#: crowd one another. A view on a short screen scrolls rather than squash a chart.
CHART_MIN_HEIGHT_PX = 200

#: Plots the views hold in all: sun path 2, horizon 1, irradiance 2, tilt study 3.
PLOTS_NEEDED = 8


class OpaqueGridAxisItem(pg.AxisItem):
    """An axis whose ticks and grid lines are drawn in opaque colours.

    pyqtgraph fades grid lines with the pen's alpha; Qt's raster engine draws
    translucent aliased lines some thirty times slower than opaque ones, and a grid
    repaints with its plot. Each translucent colour is replaced by the colour it
    gives over the plots' white background (the same pixels); :func:`new_plot`
    puts the axis behind the plot's data, as a grid belongs.
    """

    def generateDrawSpecs(self, p):  # noqa: N802 - pyqtgraph override
        specs = super().generateDrawSpecs(p)
        if specs is None:
            return None
        axis_spec, tick_specs, text_specs = specs
        return axis_spec, [(_opaque(pen), a, b) for pen, a, b in tick_specs], text_specs


def _opaque(pen: QPen) -> QPen:
    """``pen`` with its colour composited over white (alpha taken out)."""
    c = pen.color()
    a = c.alphaF()
    if a >= 1.0:
        return pen
    out = QPen(pen)
    out.setColor(QColor.fromRgbF(1.0 - a + a * c.redF(), 1.0 - a + a * c.greenF(),
                                 1.0 - a + a * c.blueF()))
    return out


def new_plot() -> pg.PlotItem:
    """An empty plot with :class:`OpaqueGridAxisItem` left and bottom axes."""
    plot = pg.PlotItem(axisItems={side: OpaqueGridAxisItem(side) for side in ("left", "bottom")})
    for side in ("left", "bottom"):
        plot.getAxis(side).setZValue(-0.5)    # pyqtgraph puts axes at 0.5, over the data
    return plot


_factories: dict[str, tuple[Callable[[], object], int]] = {}
_ready: dict[str, list] = {}


def register(key: str, factory: Callable[[], object], count: int = 1) -> None:
    """Let :func:`prepare` make ``count`` parts with ``factory`` ahead of need."""
    _factories[key] = (factory, int(count))


def take(key: str):
    """A part made ahead under ``key``, or a new one from its factory."""
    made = _ready.get(key)
    if made:
        return made.pop()
    return _factories[key][0]()


def plot_item() -> pg.PlotItem:
    """A new, empty plot: one made ahead if any is ready."""
    return take("plot")


def plot_widget() -> pg.PlotWidget:
    """A new plot widget around :func:`plot_item`."""
    return pg.PlotWidget(plotItem=plot_item())


def ready_count(key: str = "plot") -> int:
    return len(_ready.get(key, ()))


def prepare(then: Callable[[], None] | None = None) -> None:
    """Make every registered part, one per event-loop turn, then call ``then``."""
    todo = [key for key, (_f, count) in _factories.items()
            for _ in range(max(0, count - ready_count(key)))]

    def step() -> None:
        if not todo:
            if then is not None:
                then()
            return
        key = todo.pop(0)
        _ready.setdefault(key, []).append(_factories[key][0]())
        QTimer.singleShot(TURN_MS, step)

    QTimer.singleShot(TURN_MS, step)


def discard() -> None:
    """Drop the parts made ahead (the window is closing)."""
    _ready.clear()


register("plot", new_plot, PLOTS_NEEDED)

__all__ = ["CHART_MIN_HEIGHT_PX", "PLOTS_NEEDED", "OpaqueGridAxisItem", "discard", "new_plot", "plot_item",
           "plot_widget", "prepare", "ready_count", "register", "take"]
