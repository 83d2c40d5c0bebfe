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

from .tasks import TURN_MS

#: Plots the views hold in all: sun path 2, horizon 1, irradiance 2, tilt study 3.
PLOTS_NEEDED = 8

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


register("plot", pg.PlotItem, PLOTS_NEEDED)

__all__ = ["PLOTS_NEEDED", "discard", "plot_item", "plot_widget", "prepare", "ready_count",
           "register", "take"]
