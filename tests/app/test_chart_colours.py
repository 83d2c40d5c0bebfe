"""Chart series under colour-vision deficiency, and line contrast on white.

Every multi-series chart in the app and on the sheet: two series either stay apart in
colour for a deuteranope and a protanope, or differ in pattern (dash, fill, marker) as
well. The simulation is Machado, Oliveira & Fernandes (2009), "A physiologically-based
model for simulation of color vision deficiency", IEEE TVCG 15(6), at full severity, via
colorspacious; distances are CAM02-UCS (Luo, Cui & Li 2006, Color Res. Appl. 31(4)).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from colorspacious import cspace_convert, deltaE

from tiltyard.app import theme
from tiltyard.app.sheet import charts as sheet_charts
from tiltyard.app.views import irradiance_view, sunpath_view
from tiltyard.engine.sunchart_design import ARC_GROUPS

#: Below this CAM02-UCS distance two colours count as alike (about a tenth of the
#: distance from black to white; our threshold, common practice, no source).
MIN_DELTA_E = 12.0
CVD = ("deuteranomaly", "protanomaly")


def _rgb(hex_color: str) -> np.ndarray:
    return np.array([int(hex_color[i:i + 2], 16) / 255.0 for i in (1, 3, 5)])


def simulated(hex_color: str, kind: str) -> np.ndarray:
    space = {"name": "sRGB1+CVD", "cvd_type": kind, "severity": 100}
    return np.clip(cspace_convert(_rgb(hex_color), space, "sRGB1"), 0.0, 1.0)


def distance(a: str, b: str, kind: str) -> float:
    return float(deltaE(simulated(a, kind), simulated(b, kind), input_space="sRGB1",
                        uniform_space="CAM02-UCS"))


def check_series(series: list[tuple[str, object]]) -> list[tuple]:
    """Pairs (i, j, kind, distance) that are alike in colour and also in pattern."""
    bad = []
    for (i, (ca, pa)), (j, (cb, pb)) in itertools.combinations(enumerate(series), 2):
        for kind in CVD:
            d = distance(ca, cb, kind)
            if d < MIN_DELTA_E and pa == pb:
                bad.append((i, j, kind, round(d, 1)))
    return bad


class _Arc:
    def __init__(self, kind):
        self.kind = kind


def test_the_simulation_tells_red_from_green_apart_less():
    # the check can fail: pure red and green, far apart for normal vision, come close
    # for a deuteranope (Machado et al. 2009, fig. 7, from memory)
    normal = float(deltaE(_rgb("#d62728"), _rgb("#2ca02c"), input_space="sRGB1",
                          uniform_space="CAM02-UCS"))
    assert distance("#d62728", "#2ca02c", "deuteranomaly") < 0.5 * normal
    assert check_series([("#d62728", "solid"), ("#2ca02c", "solid")])


def test_app_line_series_are_apart():
    pens = [theme.series_pen(i) for i in range(len(theme.LINE_SERIES))]
    series = [(p.color().name(), p.style()) for p in pens]
    assert check_series(series) == []


def test_irradiance_day_curves_and_bars_are_apart():
    day = [(c if c.startswith("#") else c, style) for c, _w, style
           in irradiance_view._DAY_STYLE.values()]
    assert check_series(day) == []
    bars = [(irradiance_view._bar_brush(i).color().name(), irradiance_view._bar_brush(i).style())
            for i in range(irradiance_view.MAX_BAR_SERIES)]
    assert check_series(bars) == []
    # every bar its own fill pattern, so bars never rest on colour alone
    assert len({p for _c, p in bars}) == irradiance_view.MAX_BAR_SERIES


def test_sun_chart_arcs_are_apart_in_the_app_and_on_the_sheet():
    kinds = [kind for _months, kind in ARC_GROUPS]
    app = [(theme.arc_color(i).name(), (sunpath_view.arc_pen(_Arc(k), i).style(),
                                        sunpath_view.arc_pen(_Arc(k), i).widthF()))
           for i, k in enumerate(kinds)]
    assert check_series(app) == []
    sheet = [(theme.arc_color(i).name(), sheet_charts.arc_style(_Arc(k), i))
             for i, k in enumerate(kinds)]
    assert check_series(sheet) == []


def test_sheet_monthly_series_are_apart():
    series = [sheet_charts.Series("recommended", (0,) * 12, 0, emphasis=True),
              sheet_charts.Series("ceiling", (0,) * 12, 0, ceiling=True)]
    series += [sheet_charts.Series(f"option {i}", (0,) * 12, i) for i in range(6)]
    styles = [sheet_charts._series_style(v) for v in series]
    assert check_series([(c, (dash, w, mk)) for c, dash, w, mk in styles]) == []


@pytest.mark.parametrize("colours", [
    pytest.param(lambda: list(theme.LINE_SERIES), id="app-lines"),
    pytest.param(lambda: [theme.arc_color(i).name() for i in range(len(ARC_GROUPS))],
                 id="sun-arcs"),
    pytest.param(lambda: [c for c, *_ in irradiance_view._DAY_STYLE.values()], id="day-curves"),
    pytest.param(lambda: [sheet_charts._series_style(sheet_charts.Series("o", (0,) * 12, i))[0]
                          for i in range(6)], id="sheet-series"),
])
def test_line_colours_have_3_to_1_contrast_on_white(colours):
    # WCAG 2.1 (W3C 2018), success criterion 1.4.11 non-text contrast: 3:1
    for c in colours():
        assert theme.contrast_on_white(c) >= 3.0, c



def _pen_series(item):
    """(colour, pattern) of a drawn line, marker set or bar set, from the item itself."""
    import pyqtgraph as pg
    if isinstance(item, pg.InfiniteLine):
        pen = item.pen
        return pen.color().name(), ("line", pen.style(), round(pen.widthF(), 1))
    if isinstance(item, pg.ScatterPlotItem):
        return (item.opts["brush"].color().name(),
                ("marker", item.opts["symbol"], item.opts["size"]))
    if isinstance(item, pg.BarGraphItem):
        brush = item.opts.get("brush") or item.opts["brushes"][0]
        brush = pg.mkBrush(brush)
        return brush.color().name(), ("bars", brush.style())
    if isinstance(item, pg.PlotDataItem):
        pen = pg.mkPen(item.opts["pen"])
        filled = item.opts.get("fillLevel") is not None
        return pen.color().name(), ("line", pen.style(), round(pen.widthF(), 1), filled)
    raise TypeError(type(item))


def test_tilt_study_curve_and_timeline_read_without_colour(qtbot, make_ctx, idle):
    """The tilt curve: the curve, its best point and the objective's fixed optimum differ
    in pattern as well as colour. The schedule timeline: one row per option (told apart
    by place and name), each block's tilt in its label and in a lightness ramp that
    keeps its order under deuteranopia and protanopia, the labels at 4.5:1 on their
    block, and the recommended row marked by a wider outline as well as colour."""
    import pyqtgraph as pg

    from tiltyard.app.views.study_charts import tilt_fill
    from tiltyard.app.views.study_view import StudyView
    ctx = make_ctx("coral-lane-clinic")       # its worst-month optimum is marked apart
    view = StudyView(ctx)
    qtbot.addWidget(view)
    view.resize(1280, 720)
    view.show()
    view.objective.setCurrentIndex(view.objective.findData("worst-month"))
    idle(ctx.runner, 120.0)
    qtbot.waitUntil(lambda: view.study is not None
                    and view.study.options_used.objective == "worst-month", timeout=120_000)
    idle(ctx.runner, 120.0)
    vb = view.curve_plot.getPlotItem().getViewBox()
    items = [i for i in vb.addedItems
             if isinstance(i, (pg.PlotDataItem, pg.ScatterPlotItem, pg.InfiniteLine))]
    series = [_pen_series(i) for i in items]
    assert len(series) >= 3, series        # the curve, its best point, the fixed optimum
    assert check_series(series) == []
    # the timeline's ramp: lightness (CAM02-UCS J') falls with tilt for every viewer
    for kind in (*CVD, None):
        lightness = []
        for t in range(0, 91, 10):
            rgb = (_rgb(tilt_fill(t).name()) if kind is None
                   else simulated(tilt_fill(t).name(), kind))
            lightness.append(float(cspace_convert(rgb, "sRGB1", "CAM02-UCS")[0]))
        assert all(b < a - 3.0 for a, b in zip(lightness, lightness[1:], strict=False)), (
            kind, lightness)
    # block labels: WCAG 2.1 (W3C 2018), 1.4.3 contrast of small text, 4.5:1
    for t in range(91):
        fill = tilt_fill(t).name()
        assert theme.contrast(theme.text_on(fill), fill) >= 4.5, t
    pens = {kind: bars.opts["pen"] for kind, bars in view.timeline_bars}
    rec = view.study.recommended.kind
    widths = {kind: pg.mkPen(p).widthF() for kind, p in pens.items()}
    assert all(widths[rec] >= w + 1.0 for kind, w in widths.items() if kind != rec), widths


def test_horizon_chart_series_read_without_colour(qtbot, make_ctx, idle):
    """The Horizon chart's series (the effective horizon, the measured points, the
    obstacles and the 0° line) differ in pattern (fill, marker, hatching, dash) as well
    as colour."""
    import pyqtgraph as pg

    from tiltyard.app.views.horizon_view import HorizonView
    ctx = make_ctx("larkmoor-dairy")
    view = HorizonView(ctx)
    qtbot.addWidget(view)
    view.resize(1280, 720)
    view.show()
    idle(ctx.runner, 120.0)
    assert ctx.site.obstacles and ctx.site.horizon.azimuth_deg
    vb = view.plot.getViewBox()
    kinds = (pg.PlotDataItem, pg.ScatterPlotItem, pg.InfiniteLine, pg.BarGraphItem)
    items = [i for i in vb.addedItems if isinstance(i, kinds) and i.isVisible()]
    items.append(view._obstacle_proxy)          # the obstacles as the legend shows them
    series = {_pen_series(i) for i in items}
    assert len(series) >= 4, series
    assert check_series(sorted(series, key=str)) == []
