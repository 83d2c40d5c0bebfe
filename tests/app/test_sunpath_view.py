"""Sun path view driven as a user would, on the real widgets (offscreen)."""

from __future__ import annotations

import os
import re

import numpy as np
import pytest
from PySide6.QtCore import QDate, QPointF

from tiltyard.app.views.sunpath_view import SunPathView, chart_x, hhmm, split_at_edges


def _open(qtbot, ctx, idle, date=(2023, 5, 10), size=(1130, 760)):
    view = SunPathView(ctx)
    qtbot.addWidget(view)
    view.resize(*size)
    view.date_edit.setDate(QDate(*date))
    view.show()
    qtbot.waitExposed(view)
    view.activated()
    idle(ctx.runner)
    assert view.chart is not None
    return view


def _curve(item):
    x, y = item.getData()
    return np.asarray(x, dtype=float), np.asarray(y, dtype=float)


def _table(view):
    m = view.events_model
    return [[m.index(r, c).data() for c in range(m.columnCount())] for r in range(m.rowCount())]


def test_another_site_changes_the_curves_and_the_table(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle)
    before_x, before_y = _curve(view.path_items["June solstice"])
    before_rows = _table(view)
    assert len(before_rows) == 12 and before_rows[0][0] == "21 Jan"
    assert ctx.document.propose(latitude_deg=-33.45, longitude_deg=150.0,
                                timezone="Australia/Sydney") is None
    idle(ctx.runner)
    after_x, after_y = _curve(view.path_items["June solstice"])
    after_rows = _table(view)
    # June is winter in the south: the June solstice path is far lower. Noon
    # elevation 90 - |phi - delta| (Duffie & Beckman 2013, sec. 1.6): 59.7 deg
    # at 53.71 N, 33.1 deg at 33.45 S; within 1 deg (5-min path sampling).
    assert np.nanmax(before_y) == pytest.approx(90 - abs(53.71 - 23.44), abs=1.0)
    assert np.nanmax(after_y) == pytest.approx(90 - abs(-33.45 - 23.44), abs=1.0)
    assert not np.array_equal(before_x, after_x)
    assert after_rows != before_rows
    # the June row of the table: day length under 10 h in Sydney's winter
    # (Meeus 1998 eq. 15.1, h0 = -0.8333 deg, phi = -33.45, delta = 23.44: 9.93 h), 0.1 h
    h, m = re.fullmatch(r"(\d+) h (\d\d) min", after_rows[5][4]).groups()
    assert int(h) + int(m) / 60.0 == pytest.approx(9.93, abs=0.1)
    assert "Australia/Sydney" in view.table_caption.text()


def test_changing_the_date_moves_the_bold_path_and_the_day_text(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle, date=(2023, 6, 21))
    june_x, june_y = view.day_item.full_data
    june_text = view.day_text.text()
    view.date_edit.setFocus()
    view.date_edit.setDate(QDate(2023, 12, 21))
    idle(ctx.runner)
    dec_x, dec_y = view.day_item.full_data
    dec_text = view.day_text.text()
    # 21 Dec at 53.71 N: noon elevation 90 - 53.71 - 23.44 = 12.85 deg (Duffie
    # & Beckman 2013 sec. 1.6), within 0.5 deg; a far shorter path.
    assert np.nanmax(dec_y) == pytest.approx(12.85, abs=0.5)
    assert np.nanmax(june_y) > 55.0
    assert len(dec_x) < len(june_x)
    assert dec_text != june_text
    # day length: 17 h 05 min on 21 June, 7 h 26 min on 21 December (regression
    # values; Meeus 1998 eq. 15.1 gives 17.08 h and 7.43 h at 53.71 N)
    assert "Day length 17 h 05 min" in june_text
    assert "Day length 7 h 26 min" in dec_text
    assert "21 Dec 2023" in dec_text


def test_switching_time_basis_relabels_the_hour_lines(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle, date=(2023, 6, 21))
    assert view.basis.currentData() == ctx.prefs.time_basis == "clock"
    clock_pos = {h: (lb.x, lb.y) for h, lb in view.hour_labels.items()}
    clock_caption = view.table_caption.text()
    assert "clock time" in view.legend.text()
    view.basis.setCurrentIndex(view.basis.findData("solar"))
    idle(ctx.runner)
    solar_pos = {h: (lb.x, lb.y) for h, lb in view.hour_labels.items()}
    # at 12:00 apparent solar time the sun is due south (definition of solar
    # time, Duffie & Beckman 2013 sec. 1.5): the "12" label sits on azimuth 180,
    # within 0.2 deg; on the clock (BST, 13:00 is near solar noon at 2.48 W) it
    # sits well east of south.
    assert solar_pos[12][0] == pytest.approx(180.0, abs=0.2)
    assert clock_pos[12][0] < 170.0
    assert view.hour_labels[12].text == "12"
    assert view._cart_labels.label("12") == view.hour_labels[12]
    assert "solar time" in view.legend.text() and "solar time" in view.table_caption.text()
    assert view.table_caption.text() != clock_caption
    assert view.events_model.horizontalHeaderItem(1).text() == "Sunrise\n(hh:mm)"


def test_southern_site_is_centred_on_north(qtbot, make_ctx, idle):
    ctx = make_ctx("kelpie-creek-shed")
    view = _open(qtbot, ctx, idle, date=(2023, 12, 21))
    vb = view.cart.getPlotItem().getViewBox()
    (x0, x1), _ = vb.viewRange()
    assert (x0 + x1) / 2 == pytest.approx(0.0, abs=1e-6)      # north in the middle
    ticks = dict(view.cart.getPlotItem().getAxis("bottom")._tickLevels[0])
    assert ticks[0.0] == "N 0°" and ticks[90.0] == "E 90°" and ticks[-90.0] == "W 270°"
    # facing north, east is on the right: the morning part of the path (sunrise
    # in the east) is at positive x. Common practice, no source.
    day = view.chart.day
    x_morning = chart_x(day.azimuth_deg[0], 0.0)
    assert x_morning > 0
    assert "facing north, east on the right" in view.cart.getPlotItem().titleLabel.text


def test_cursor_readout_for_a_synthetic_position(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle, date=(2023, 6, 21))
    day = view.chart.day
    i = int(np.argmax(day.elevation_deg))
    vb = view.cart.getPlotItem().getViewBox()
    scene = vb.mapViewToScene(QPointF(float(day.azimuth_deg[i]), float(day.elevation_deg[i])))
    view._on_mouse_moved((scene,))
    text = view.readout.text()
    # the chosen date is named (it lies on the 21 Jun path too), with its own
    # sample's time, azimuth and elevation
    assert text.startswith("21 Jun 2023: ")
    assert f"azimuth {day.azimuth_deg[i]:.1f}° (S)" in text
    assert f"elevation {day.elevation_deg[i]:.1f}°" in text
    assert f"{hhmm(day.hour[i])} clock time" in text
    # that sample is the one nearest solar noon, which on 21 June at 2.48 W is
    # at 12:00 + 4 min/deg * 2.48 deg - E (E = -1.7 min, from memory) = 12:11.6
    # GMT, 13:11.6 BST (Duffie & Beckman 2013 eq. 1.5.2); within the 5-min step.
    assert abs(day.hour[i] - (13.0 + 11.6 / 60.0)) <= 2.6 / 60.0
    # on the polar chart the same point reads the same
    pvb = view.polar.getPlotItem().getViewBox()
    r = 90.0 - day.elevation_deg[i]
    a = np.radians(day.azimuth_deg[i])
    ps = pvb.mapViewToScene(QPointF(float(r * np.sin(a)), float(r * np.cos(a))))
    assert f"elevation {day.elevation_deg[i]:.1f}°" in view.readout_at(ps, "polar")
    # a real pointer move over the polar chart goes through its SignalProxy
    view.polar.scene().sigMouseMoved.emit(ps)
    qtbot.waitUntil(lambda: view.readout.text() == view.readout_at(ps, "polar"))
    # far from every path there is nothing to read
    far = vb.mapViewToScene(QPointF(25.0, 55.0))      # high in the north-east: no path
    assert view.readout_at(far) == "No path near the pointer."


def test_polar_day_text_at_tarnvik(qtbot, make_ctx, idle):
    ctx = make_ctx("tarnvik-cabin")
    view = _open(qtbot, ctx, idle, date=(2023, 6, 21))
    # 69.65 N on 21 June: the sun does not set (Meeus 1998 eq. 15.1, cos H0 < -1)
    assert "Polar day" in view.day_text.text()
    rows = _table(view)
    assert rows[5][1] == "polar day" and rows[11][1] == "polar night"
    view.date_edit.setDate(QDate(2023, 12, 21))
    idle(ctx.runner)
    assert "Polar night" in view.day_text.text()


def test_split_at_edges_joins_both_sides():
    # a path crossing north on a chart centred on south leaves at 360 and comes back at 0
    x, y = split_at_edges([350.0, 10.0], [20.0, 30.0], 180.0)
    assert np.isnan(x).sum() == 1
    assert x[1] == 360.0 and x[3] == 0.0 and y[1] == pytest.approx(25.0)


@pytest.mark.parametrize("demo,date", [("larkmoor-dairy", (2023, 5, 10)),
                                       ("kelpie-creek-shed", (2023, 11, 3)),
                                       ("coral-lane-clinic", (2023, 2, 21)),
                                       ("tarnvik-cabin", (2023, 6, 1))])
def test_render_screenshots(qtbot, make_ctx, idle, artefacts_dir, demo, date):
    ctx = make_ctx(demo)
    view = _open(qtbot, ctx, idle, date=date)
    qtbot.wait(50)
    path = os.path.join(artefacts_dir, f"sunpath_{demo}.png")
    assert view.grab().save(path)
    assert os.path.getsize(path) > 10_000
    # by default the solstices and the equinoxes (one arc for both); every month on
    # request, two months with the same sun path sharing an arc: seven arcs in all
    assert set(view.path_items) == {"December solstice", "March equinox", "June solstice"}
    assert view.hour_labels
    view.every_month.setChecked(True)
    idle(ctx.runner)
    assert len(view.path_items) == 7


def _overlaps(rects):
    return [(a, b) for i, a in enumerate(rects) for b in rects[i + 1:]
            if a.intersects(b)]


@pytest.mark.parametrize("size", [(1280, 720), (1920, 1080)])
@pytest.mark.parametrize("demo", ["larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic",
                                  "tarnvik-cabin"])
def test_chart_labels_never_meet_and_stay_on_their_points(qtbot, make_ctx, idle, demo, size):
    ctx = make_ctx(demo)
    view = _open(qtbot, ctx, idle, date=(2023, 5, 10), size=size)
    view.every_month.setChecked(True)
    idle(ctx.runner)
    qtbot.wait(30)
    cart = view._cart_labels.scene_rects() + view._arc_labels.scene_rects()
    assert len(view._cart_labels.scene_rects()) >= 4 and view._arc_labels.scene_rects()
    assert _overlaps(cart) == []
    # every arc is named: a label whose place is taken moves along its arc
    assert len(view._arc_labels.scene_rects()) == len(view._arc_labels.labels) == \
        sum(1 for a in view.chart.arcs if len(a.curve))
    polar = view._polar_arc_labels.scene_rects() + view._polar_labels.scene_rects()
    rings = {lb.text for lb in view._polar_arc_labels.labels if lb.text.endswith("°")}
    assert {"0°", "30°", "60°", "90°"} <= rings
    assert _overlaps(polar) == []
    # the hour labels sit in the band, each centred on its hour's azimuth (no drift with
    # the window's size), and inside the plot
    band = view.chart.hour_band
    vb = view.cart.getPlotItem().getViewBox()
    plot_rect = vb.sceneBoundingRect()
    mid = 0.5 * (band.low_deg + band.high_deg)
    for rect, hour in zip(view._cart_labels.scene_rects(), view._cart_labels.labels,
                          strict=False):
        assert plot_rect.contains(rect), hour.text
    for hour, x in zip(band.hours, band.azimuth_deg, strict=True):
        label = view.hour_labels[hour]
        at = vb.mapViewToScene(QPointF(label.x, label.y))
        want = vb.mapViewToScene(QPointF(x, mid))
        assert abs(at.x() - want.x()) < 1.0 and abs(at.y() - want.y()) < 1.0


@pytest.mark.parametrize("basis", ["solar", "clock"])
@pytest.mark.parametrize("demo", ["coral-lane-clinic", "kelpie-creek-shed", "larkmoor-dairy"])
def test_drawn_paths_are_whole_and_hour_labels_clear_the_terrain(qtbot, make_ctx, idle,
                                                                 demo, basis):
    """What the flat chart draws, in the tropics and the south too: no drawn line jumps
    across the chart (a U-shaped path cut at an edge, or a flat line across the top in
    solar time), a path crosses an edge only low in the sky, and every hour label (6 and
    18 h included) sits above the terrain under it."""
    import pyqtgraph as pg
    ctx = make_ctx(demo)
    view = _open(qtbot, ctx, idle, date=(2023, 6, 21), size=(1280, 720))
    view.basis.setCurrentIndex(view.basis.findData(basis))
    view.every_month.setChecked(True)
    idle(ctx.runner)
    qtbot.wait(30)
    vb = view.cart.getPlotItem().getViewBox()
    centre = view.chart.centre_azimuth_deg
    checked = 0
    for item in vb.addedItems:
        if not isinstance(item, (pg.PlotDataItem, pg.PlotCurveItem)) or item is view.band_item:
            continue
        x, y = _curve(item)
        if x.size < 2:
            continue
        both = np.isfinite(x[1:]) & np.isfinite(x[:-1])
        assert np.all(np.abs(np.diff(x))[both] <= 90.0), item.name()
        checked += 1
    # where a date arc breaks at the chart's back edge, the sun is low (hour lines near
    # the zenith cross every azimuth in the tropics; the from-above chart leads there)
    arcs = list(view.path_items.values())
    assert arcs
    for item in arcs:
        x, y = _curve(item)
        for k in np.flatnonzero(~np.isfinite(x[1:]) & np.isfinite(x[:-1])):
            if abs(x[k] - centre) > 170.0:
                assert y[k] <= 30.0, (item.name(), x[k], y[k])
    assert checked >= 8
    hx, hy = _curve(view.horizon_item)
    ox, oy = _curve(view.obstacle_item)
    ground_x = np.concatenate([hx, ox])
    ground_y = np.concatenate([hy, oy])
    assert {6, 18} & set(view.hour_labels) or demo != "coral-lane-clinic"
    for rect, label in zip(view._cart_labels.scene_rects(), view._cart_labels.labels,
                           strict=False):
        r = vb.mapSceneToView(rect).boundingRect()
        under = np.isfinite(ground_x) & (ground_x >= r.left()) & (ground_x <= r.right())
        assert under.any(), label.text
        assert min(r.top(), r.bottom()) > np.nanmax(ground_y[under]), label.text
