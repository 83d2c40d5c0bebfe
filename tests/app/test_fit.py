"""The window fits a small laptop screen: no view sets a minimum window size over
1024×600, and at 1024×600, 1280×720, 1366×768 and 1920×1080 every view's text labels
and fields keep to their own places (none overlaps another, none is cut short, no form
column runs out of the view).

In-chart labels are checked with the charts; here only the widgets around them.
"""

from __future__ import annotations

import pytest
from PySide6.QtCore import QRect
from PySide6.QtWidgets import (
    QAbstractButton,
    QAbstractItemView,
    QComboBox,
    QLabel,
    QLineEdit,
    QScrollArea,
    QTabBar,
    QWidget,
)

from tiltyard.app.desktop import create_window

SMALLEST = (1024, 600)
SIZES = (SMALLEST, (1280, 720), (1366, 768), (1920, 1080))
TEXT_KINDS = (QLabel, QAbstractButton, QLineEdit, QComboBox)


@pytest.fixture
def window(qtbot):
    w = create_window("larkmoor-dairy")
    w.ask_unsaved = lambda: "discard"
    qtbot.addWidget(w)
    w.show()
    yield w
    w.close()
    assert w.runner.active_thread_count() == 0


def _inside_something_drawn(widget: QWidget, view: QWidget) -> bool:
    """True for a widget inside a table's cells, a tab bar or a chart: those lay out
    their own children (cell editors, tab buttons) and are not form widgets."""
    import pyqtgraph as pg
    p = widget.parentWidget()
    while p is not None and p is not view:
        if isinstance(p, (QAbstractItemView, QTabBar, pg.GraphicsView, QComboBox)):
            return True
        p = p.parentWidget()
    return False


def _text_widgets(view: QWidget) -> list[QWidget]:
    out = []
    for w in view.findChildren(QWidget):
        if not isinstance(w, TEXT_KINDS) or not w.isVisible() or _inside_something_drawn(w, view):
            continue
        if isinstance(w, QLabel) and not w.text().strip():
            continue
        out.append(w)
    return out


def _rect_in(widget: QWidget, view: QWidget) -> QRect:
    return QRect(widget.mapTo(view, widget.rect().topLeft()), widget.size())


def _related(a: QWidget, b: QWidget) -> bool:
    return a.isAncestorOf(b) or b.isAncestorOf(a)


def _problems(view: QWidget) -> list[str]:
    widgets = _text_widgets(view)
    rects = {id(w): _rect_in(w, view) for w in widgets}
    found = []
    whole = view.rect()
    for w in widgets:
        r = rects[id(w)]
        name = w.text() if hasattr(w, "text") and w.text() else type(w).__name__
        # sideways only: a view (or the Site view's form inside it) may scroll down
        if r.left() < 0 or r.right() > whole.right():
            found.append(f"{name!r} runs out of the view sideways ({r} in {whole})")
        if (isinstance(w, QLabel) and not w.wordWrap() and w.textFormat() != 1
                and "<" not in w.text()):
            need = w.fontMetrics().horizontalAdvance(w.text()) + 2 * w.margin()
            if r.width() + 1 < need and w.sizePolicy().horizontalPolicy().name != "Ignored":
                found.append(f"label {w.text()!r} is cut: {r.width()} px of {need}")
        if isinstance(w, QLabel) and w.wordWrap() and w.hasHeightForWidth():
            need = w.heightForWidth(r.width())
            if r.height() + 2 < need:
                found.append(f"wrapped label {w.text()[:40]!r} is cut: {r.height()} px "
                             f"of {need}")
    for i, a in enumerate(widgets):
        for b in widgets[i + 1:]:
            if _related(a, b):
                continue
            if rects[id(a)].intersects(rects[id(b)]):
                inter = rects[id(a)].intersected(rects[id(b)])
                if inter.width() > 1 and inter.height() > 1:
                    ta = getattr(a, "text", lambda: "")() or type(a).__name__
                    tb = getattr(b, "text", lambda: "")() or type(b).__name__
                    found.append(f"{ta!r} overlaps {tb!r}")
    return found


def test_no_view_sets_a_minimum_window_over_1024_by_600(window, qtbot, idle):
    for title in list(window.views):
        window.show_view(title)
        idle(window.runner, 120.0)
        hint = window.minimumSizeHint()
        assert hint.width() <= SMALLEST[0] and hint.height() <= SMALLEST[1], (title, hint)
        assert window.minimumSize().width() <= SMALLEST[0], title
    window.resize(*SMALLEST)
    qtbot.wait(50)
    assert (window.width(), window.height()) == SMALLEST


def _each_view_at(window, qtbot, idle, sizes):
    """Every view shown at each of ``sizes`` in turn: ``(title, view, holder, size)``, the
    view's result drawn."""
    for title in list(window.views):
        view = window.show_view(title)
        idle(window.runner, 120.0)
        holder = window.stack.currentWidget()
        for size in sizes:
            window.resize(*size)
            qtbot.wait(30)
            idle(window.runner, 120.0)
            yield title, view, holder, size


def test_every_view_at_laptop_sizes_keeps_its_labels_apart(window, qtbot, idle):
    seen = {}
    problems = []
    for title, view, holder, size in _each_view_at(window, qtbot, idle, SIZES):
        assert isinstance(holder, QScrollArea) and holder.widget() is view
        assert (window.width(), window.height()) == size, (title, size)
        # the width always fits (a form column is never cut); at 1024x600 a view
        # may scroll up and down
        assert view.width() <= holder.viewport().width(), (title, size, view.width())
        if size != SMALLEST:
            assert not holder.verticalScrollBar().isVisible() or title == "Site", (
                title, size, view.minimumSizeHint(), holder.viewport().size(),
                window.banner.isVisible() and window.banner.text)
        problems += [(title, size, p) for p in _problems(view)]
        seen[(title, size)] = len(_text_widgets(view))
    assert not problems, "\n".join(map(str, problems))
    assert all(n > 3 for n in seen.values()), seen     # the check looked at something


def test_choosing_a_weather_file_does_not_grow_the_window(window, qtbot, idle, tmp_path):
    view = window.show_view("Irradiance")
    idle(window.runner, 120.0)
    window.resize(1280, 720)
    qtbot.wait(30)
    long_name = tmp_path / ("a weather file with a rather long name for this site, "
                            "measured on the roof in 2019 and 2020.csv")
    from tiltyard.engine.assessment import WeatherSource
    window.ctx.set_settings(weather=WeatherSource(path=str(long_name)))
    qtbot.wait(50)
    assert window.width() == 1280 and window.minimumSizeHint().width() <= SMALLEST[0]
    assert view.width() <= window.stack.currentWidget().viewport().width()


CHART_SIZES = (SMALLEST, (1280, 720), (1366, 768))


def _clipped_axis_labels(chart, title, size) -> list:
    """Axis titles longer than their axis (drawn cut at the plot's edge)."""
    import pyqtgraph as pg
    out = []
    for item in chart.scene().items():
        if not isinstance(item, pg.AxisItem) or not item.isVisible() or not item.label.isVisible():
            continue
        text = item.label.toPlainText()
        if not text:
            continue
        room = item.height() if item.orientation in ("left", "right") else item.width()
        need = item.label.boundingRect().width()
        if need > room + 1:
            out.append((title, size, text, round(need), round(room)))
    return out


def test_every_chart_keeps_a_usable_height_and_the_view_scrolls_instead(window, qtbot, idle):
    """At 1024×600, 1280×720 and 1366×768 every chart of every view is at least
    ``plots.CHART_MIN_HEIGHT_PX`` tall (its labels, ticks and data stay readable) and
    no axis title is longer than its axis; a view that needs more height than the
    window gives scrolls."""
    import pyqtgraph as pg

    from tiltyard.app import plots
    heights = {}
    clipped = []
    for title, view, holder, size in _each_view_at(window, qtbot, idle, CHART_SIZES):
        charts = [c for c in view.findChildren(pg.GraphicsView) if c.isVisible()]
        for chart in charts:
            heights[(title, size, chart.objectName() or type(chart).__name__,
                     len(heights))] = chart.height()
            clipped += _clipped_axis_labels(chart, title, size)
        if any(c.height() < plots.CHART_MIN_HEIGHT_PX for c in charts):
            continue            # reported below, with every other short chart
        # everything the view holds is reachable: it fits or the holder scrolls
        bar = holder.verticalScrollBar()
        assert view.height() <= holder.viewport().height() or bar.maximum() > 0, (
            title, size, view.height(), holder.viewport().height())
    short = {k: h for k, h in heights.items() if h < plots.CHART_MIN_HEIGHT_PX}
    assert not short, short
    assert not clipped, clipped
    charted = {k[0] for k in heights}
    assert {"Horizon", "Sun path", "Irradiance", "Tilt study"} <= charted, charted


LABEL_SIZES = ((1024, 640), (1280, 720), (1920, 1080))


def _scene_rect(item):
    """An item's drawn rectangle in its scene (a TextItem's text box)."""
    return item.mapRectToScene(item.boundingRect())


def _study_label_problems(view, size) -> list[str]:
    """Labels on the tilt curve and the tilt × azimuth map that leave their plot's view
    box, meet another label, or sit away from their marker."""
    import pyqtgraph as pg
    found = []
    for name, widget in (("curve", view.curve_plot), ("map", view.map_plot)):
        plot = widget.getPlotItem()
        vb = plot.getViewBox()
        box = vb.mapRectToScene(vb.boundingRect())
        texts = []
        for item in vb.addedItems:
            if isinstance(item, pg.TextItem) and item.isVisible() and item.toPlainText():
                texts.append(item)
            if isinstance(item, pg.InfiniteLine) and item.label is not None:
                texts.append(item.label)
        assert texts, (name, size)
        rects = [(t.toPlainText(), _scene_rect(t)) for t in texts]
        for text, r in rects:
            if not box.adjusted(-1, -1, 1, 1).contains(r):
                found.append(f"{name} {size}: {text!r} leaves the plot ({r} in {box})")
        for i, (ta, ra) in enumerate(rects):
            for tb, rb in rects[i + 1:]:
                inter = ra.intersected(rb)
                if inter.width() > 1 and inter.height() > 1:
                    found.append(f"{name} {size}: {ta!r} meets {tb!r}")
    # each map label beside its marker: within 14 px, or joined to it by its leader
    vb = view.map_plot.getPlotItem().getViewBox()
    drawn = {t.toPlainText(): _scene_rect(t) for t in vb.addedItems
             if isinstance(t, pg.TextItem)}
    for (text, _box), (_name, mx, my) in zip(view.map_labels, view.map_markers, strict=True):
        r = drawn[text]
        p = vb.mapViewToScene(pg.Point(mx, my))
        dx = max(r.left() - p.x(), 0.0, p.x() - r.right())
        dy = max(r.top() - p.y(), 0.0, p.y() - r.bottom())
        if (dx * dx + dy * dy) ** 0.5 > 14.0 + 1.0 and not _leader_reaches(vb, p, r):
            found.append(f"map {size}: {text!r} is {dx:.0f}, {dy:.0f} px from its marker")
    return found


def _leader_reaches(vb, marker, rect) -> bool:
    """A straight leader drawn from the marker to the label's edge."""
    import pyqtgraph as pg
    for item in vb.addedItems:
        if not isinstance(item, pg.PlotDataItem):
            continue
        xs, ys = item.getData()
        if xs is None or len(xs) != 2:
            continue
        a = vb.mapViewToScene(pg.Point(xs[0], ys[0]))
        b = vb.mapViewToScene(pg.Point(xs[1], ys[1]))
        if (a - marker).manhattanLength() < 2 and rect.adjusted(-2, -2, 2, 2).contains(b):
            return True
    return False


@pytest.mark.parametrize(("demo", "objective"), [("larkmoor-dairy", "worst-month"),
                                               ("kelpie-creek-shed", "annual"),
                                               ("coral-lane-clinic", "worst-month"),
                                               ("tarnvik-cabin", "annual")])
def test_study_chart_labels_stay_inside_apart_and_by_their_markers(qtbot, idle, demo,
                                                                     objective):
    """"…orst-month optimum" was cut at the plot's edge and map labels drifted from their
    markers after a resize: at each size (and back), every label is inside its view box,
    meets no other and sits by its marker (the worst-month objective also marks the
    fixed optimum on the curve)."""
    window = create_window(demo)
    window.ask_unsaved = lambda: "discard"
    qtbot.addWidget(window)
    window.show()
    view = window.show_view("Tilt study")
    idle(window.runner, 120.0)
    view.objective.setCurrentIndex(view.objective.findData(objective))
    idle(window.runner, 120.0)
    qtbot.waitUntil(lambda: view.study is not None
                    and view.study.options_used.objective == objective, timeout=120_000)
    problems = []
    for size in LABEL_SIZES + ((1024, 640),):       # and back down again
        window.resize(*size)
        qtbot.wait(60)
        idle(window.runner, 120.0)
        problems += _study_label_problems(view, size)
    window.close()
    assert window.runner.active_thread_count() == 0
    assert not problems, "\n".join(problems)
