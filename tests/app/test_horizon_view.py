"""Horizon view driven as a user would, on the real widgets (offscreen).

Figures on screen come from :func:`tiltyard.engine.horizon_loss.horizon_loss`,
which tests/engine/test_horizon_loss.py checks against closed forms and the
one-plane job; here the checks are that what the user does reaches the site
and what the site holds reaches the screen.
"""

from __future__ import annotations

import math
import os

import numpy as np
import pyqtgraph as pg
import pytest
from PySide6.QtCore import QPointF, Qt
from PySide6.QtTest import QTest
from PySide6.QtWidgets import QLineEdit

from tiltyard.app.views.horizon_view import HorizonView
from tiltyard.engine.site import HorizonProfile


def _open(qtbot, make_ctx, idle, demo="larkmoor-dairy"):
    ctx = make_ctx(demo)
    view = HorizonView(ctx)
    qtbot.addWidget(view)
    view.resize(1130, 760)
    view.show()
    qtbot.waitExposed(view)
    view.activated()
    idle(ctx.runner)
    return ctx, view


def _show_tab(qtbot, view, tab):
    """Click the tab's title, as a user would."""
    bar = view.tabs.tabBar()
    qtbot.mouseClick(bar, Qt.MouseButton.LeftButton,
                     pos=bar.tabRect(view.tabs.indexOf(tab)).center())
    assert view.tabs.currentWidget() is tab


def _loss_cells(view, row=0):
    m = view.loss_model
    return [m.item(row, c).text() for c in range(m.columnCount())]


def _row_of(view, azimuth):
    t = view.profile_table
    return next(r for r in range(t.rowCount()) if float(t.item(r, 0).text()) == azimuth)


class FakeDrag:
    """The parts of pyqtgraph's MouseDragEvent that a drag handler reads."""

    def __init__(self, down, pos, start=False, finish=False):
        self._down, self._pos, self._start, self._finish = down, pos, start, finish
        self.accepted = None

    def button(self):
        return Qt.MouseButton.LeftButton

    def isStart(self):  # noqa: N802 - pyqtgraph's API
        return self._start

    def isFinish(self):  # noqa: N802
        return self._finish

    def buttonDownPos(self):  # noqa: N802
        return self._down

    def pos(self):
        return self._pos

    def accept(self):
        self.accepted = True

    def ignore(self):
        self.accepted = False


def test_adding_an_obstacle_through_the_form_raises_the_loss(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    before = float(_loss_cells(view)[3])
    n = len(ctx.site.obstacles)
    _show_tab(qtbot, view, view.obstacle_tab)
    assert view.tabs.tabText(view.tabs.currentIndex()) == f"Obstacles ({n})"
    qtbot.keyClicks(view.obstacle_label.edit, "grain silo")
    qtbot.keyClicks(view.obstacle_fields["bearing_deg"].edit, "170")
    qtbot.keyClicks(view.obstacle_fields["width_deg"].edit, "30")
    qtbot.keyClicks(view.obstacle_fields["distance_m"].edit, "6")
    qtbot.keyClicks(view.obstacle_fields["height_m"].edit, "12")
    assert "63.4° above the horizontal" in view.obstacle_preview.text()
    qtbot.mouseClick(view.add_obstacle_button, Qt.MouseButton.LeftButton)
    assert len(ctx.site.obstacles) == n + 1
    ob = ctx.site.obstacles[-1]
    assert (ob.label, ob.bearing_deg, ob.width_deg, ob.distance_m, ob.height_m) == \
        ("grain silo", 170.0, 30.0, 6.0, 12.0)
    qtbot.waitUntil(lambda: view.obstacle_table.rowCount() == n + 1)
    assert view.obstacle_table.item(n, 0).text() == "grain silo"
    assert view.tabs.tabText(view.tabs.currentIndex()) == f"Obstacles ({n + 1})"
    # plane trigonometry: atan(12 m / 6 m) = 63.43 deg (common practice, no source)
    assert view.obstacle_table.item(n, 5).text() == "63.4"
    labels = [i.toPlainText() for i in view._obstacle_items if isinstance(i, pg.TextItem)]
    assert any(t.startswith("grain silo") for t in labels)
    assert view.obstacle_label.edit.text() == ""          # the form is ready for the next one
    idle(ctx.runner)
    x, y = view.horizon_curve.getData()
    # the effective horizon takes the obstacle's top across its span: atan(12/6) deg
    # (upper envelope, engine/horizon.py; plane trigonometry), to 1e-3 deg
    assert y[np.argmin(np.abs(x - 170.0))] == pytest.approx(math.degrees(math.atan(2.0)),
                                                            abs=1e-3)
    after = float(_loss_cells(view)[3])
    # physical sense: a 63 deg obstacle across the south at 53.7 N hides the midday
    # sun for months; the horizontal plane must lose several points more (common
    # practice, no source)
    assert after > before + 3.0
    assert "Horizontal plane:" in view.loss_figure.text()


def test_invalid_distance_names_the_field_and_adds_nothing(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    n = len(ctx.site.obstacles)
    _show_tab(qtbot, view, view.obstacle_tab)
    qtbot.keyClicks(view.obstacle_fields["bearing_deg"].edit, "90")
    qtbot.keyClicks(view.obstacle_fields["width_deg"].edit, "10")
    qtbot.keyClicks(view.obstacle_fields["height_m"].edit, "3")
    qtbot.keyClicks(view.obstacle_fields["distance_m"].edit, "0")
    message = view.obstacle_fields["distance_m"].message
    # the Obstacle constructor's own range (engine/site.py)
    assert "Distance must be" in message and "distance_m" not in message and "between 0.1 and 100,000 m" in message
    qtbot.mouseClick(view.add_obstacle_button, Qt.MouseButton.LeftButton)
    assert len(ctx.site.obstacles) == n
    assert view.obstacle_table.rowCount() == n
    assert "distance" in view.form_message.text() and "_m" not in view.form_message.text()
    assert not ctx.document.dirty
    view.obstacle_fields["distance_m"].edit.clear()
    qtbot.keyClicks(view.obstacle_fields["distance_m"].edit, "x")
    assert "Distance is not a number" in view.obstacle_fields["distance_m"].message
    idle(ctx.runner)


def test_editing_a_profile_cell_changes_the_site(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    t = view.profile_table
    r = _row_of(view, 180.0)
    item = t.item(r, 1)
    t.setCurrentItem(item)
    t.editItem(item)
    editor = t.viewport().findChild(QLineEdit)
    assert editor is not None
    editor.selectAll()
    qtbot.keyClicks(editor, "14")
    qtbot.keyClick(editor, Qt.Key.Key_Return)
    qtbot.waitUntil(lambda: dict(zip(ctx.site.horizon.azimuth_deg,
                                     ctx.site.horizon.elevation_deg, strict=True))[180.0] == 14.0)
    assert ctx.document.dirty
    # an azimuth edit re-sorts the table on commit
    t.item(0, 0).setText("355")               # what the delegate does on commit
    qtbot.waitUntil(lambda: ctx.site.horizon.azimuth_deg[-1] == 355.0)
    qtbot.waitUntil(lambda: t.item(0, 0).text() == "60")
    assert t.item(t.rowCount() - 1, 0).text() == "355"
    # a bad cell names the row and field and leaves the site alone
    site = ctx.site
    t.item(1, 1).setText("high")
    assert view.profile_error.text().startswith("Row 2: Elevation: “high” is not a number")
    assert ctx.site == site
    idle(ctx.runner)


def test_add_and_delete_points(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    n = len(ctx.site.horizon.azimuth_deg)
    qtbot.mouseClick(view.add_point_button, Qt.MouseButton.LeftButton)
    prof = ctx.site.horizon
    assert len(prof.azimuth_deg) == n + 1
    assert 30.0 in prof.azimuth_deg            # middle of the widest gap, 0 to 60 deg
    qtbot.waitUntil(lambda: view.profile_table.rowCount() == n + 1)
    r = _row_of(view, 30.0)
    assert view.profile_table.currentRow() == r or r in {
        i.row() for i in view.profile_table.selectedIndexes()}
    view.profile_table.selectRow(r)
    qtbot.mouseClick(view.delete_points_button, Qt.MouseButton.LeftButton)
    assert 30.0 not in ctx.site.horizon.azimuth_deg
    assert len(ctx.site.horizon.azimuth_deg) == n
    idle(ctx.runner)


def test_dragging_a_point_changes_the_site(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    start = QPointF(180.0, 11.0)
    ev = FakeDrag(start, QPointF(181.0, 13.0), start=True)
    view.points.mouseDragEvent(ev)
    assert ev.accepted
    view.points.mouseDragEvent(FakeDrag(start, QPointF(182.0, 15.0)))
    assert "elevation 15.0°" in view.readout.text()
    assert 180.0 in ctx.site.horizon.azimuth_deg          # nothing stored mid-drag
    view.points.mouseDragEvent(FakeDrag(start, QPointF(183.0, 16.0), finish=True))
    prof = dict(zip(ctx.site.horizon.azimuth_deg, ctx.site.horizon.elevation_deg, strict=True))
    assert 180.0 not in prof and prof[183.0] == 16.0
    x, y = view.points.getData()
    assert (183.0, 16.0) in set(zip(x.tolist(), y.tolist(), strict=True))
    # a point cannot pass its neighbour (210 deg): it stops 0.1 deg short
    start = QPointF(183.0, 16.0)
    view.points.mouseDragEvent(FakeDrag(start, QPointF(183.0, 16.0), start=True))
    view.points.mouseDragEvent(FakeDrag(start, QPointF(250.0, 16.0), finish=True))
    assert 209.9 in ctx.site.horizon.azimuth_deg
    # a press away from every point does not start a drag
    miss = FakeDrag(QPointF(40.0, 30.0), QPointF(41.0, 30.0), start=True)
    view.points.mouseDragEvent(miss)
    assert miss.accepted is False
    idle(ctx.runner)


def test_mouse_drag_on_the_chart(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    vb = view.plot.getViewBox()
    pw = view.plot_widget

    def to_view(x, y):
        return pw.mapFromScene(vb.mapViewToScene(QPointF(x, y)))

    vp = pw.viewport()
    QTest.mousePress(vp, Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier,
                     to_view(270.0, 3.0))
    for k in range(1, 9):
        qtbot.wait(25)                       # pyqtgraph drops moves above its rate limit
        QTest.mouseMove(vp, to_view(270.0, 3.0 + k))
    qtbot.wait(25)
    QTest.mouseRelease(vp, Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier,
                       to_view(270.0, 11.0))
    prof = dict(zip(ctx.site.horizon.azimuth_deg, ctx.site.horizon.elevation_deg, strict=True))
    moved = [a for a in prof if abs(a - 270.0) < 1.0]
    assert len(moved) == 1
    # dragged 8 deg up, to within one screen pixel (about 0.2 deg here)
    assert prof[moved[0]] == pytest.approx(11.0, abs=0.3)
    idle(ctx.runner)


def test_bad_csv_import_shows_the_line_and_keeps_the_site(qtbot, make_ctx, idle, tmp_path,
                                                          monkeypatch):
    ctx, view = _open(qtbot, make_ctx, idle)
    bad = tmp_path / "survey.csv"
    bad.write_text("azimuth_deg,elevation_deg\n0,3\n90,abc\n180,11\n", encoding="utf-8")
    messages = []
    ctx.message.connect(lambda level, text, _owner: messages.append((level, text)))
    site = ctx.site
    monkeypatch.setattr(view, "ask_import_path", lambda: str(bad))
    qtbot.mouseClick(view.import_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    assert "line 3" in view.io_message.text() and "abc" in view.io_message.text()
    assert view.io_message.isVisible()
    assert messages and messages[-1][0] == "error" and "line 3" in messages[-1][1]
    assert ctx.site == site and not ctx.document.dirty


def test_export_then_import_round_trips(qtbot, make_ctx, idle, tmp_path, monkeypatch):
    ctx, view = _open(qtbot, make_ctx, idle, "high-pass-hut")
    original = ctx.site.horizon
    path = tmp_path / "hut-horizon.csv"
    monkeypatch.setattr(view, "ask_export_path", lambda: str(path))
    qtbot.mouseClick(view.export_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    assert path.exists()
    assert f"Exported {len(original.azimuth_deg)} points" in view.io_message.text()
    assert ctx.document.propose(horizon=HorizonProfile()) is None
    qtbot.waitUntil(lambda: view.profile_table.rowCount() == 0)
    assert view.profile_empty.isVisible()
    monkeypatch.setattr(view, "ask_import_path", lambda: str(path))
    qtbot.mouseClick(view.import_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    assert ctx.site.horizon == original
    qtbot.waitUntil(lambda: view.profile_table.rowCount() == len(original.azimuth_deg))
    assert min(float(view.profile_table.item(r, 1).text())
               for r in range(view.profile_table.rowCount())) == -3.0


def test_sky_choice_reaches_the_figures(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    assert "Perez 1990" in view.loss_note.text()
    ctx.set_settings(model="isotropic")
    idle(ctx.runner)
    assert "isotropic (Liu-Jordan) sky diffuse" in view.loss_note.text()


@pytest.mark.parametrize("demo", ["larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic",
                                  "high-pass-hut"])
def test_screenshot(qtbot, make_ctx, idle, artefacts_dir, demo):
    ctx, view = _open(qtbot, make_ctx, idle, demo)
    site = ctx.site
    assert view.loss_model.rowCount() == 1 + len(site.planes)
    assert view.profile_table.rowCount() == len(site.horizon.azimuth_deg)
    assert view.obstacle_table.rowCount() == len(site.obstacles)
    x, y = view.horizon_curve.getData()
    # the chart faces the way the Sun path view's flat chart does: the equator beyond
    # the tropics (north in the middle at the southern shed), east at the tropical clinic
    centre = {"kelpie-creek-shed": 0.0, "coral-lane-clinic": 90.0}.get(demo, 180.0)
    assert view._centre == centre
    lo, hi = view.plot.getViewBox().viewRange()[0]
    assert lo < centre - 180.0 and hi > centre + 180.0
    # the horizon continues past both edges
    assert x.size > 360 and x.min() < centre - 180.0 and x.max() > centre + 180.0
    # the points are the profile's, in chart order, and map back to its azimuths
    px, py = view.points.values()
    assert np.all(np.diff(px) > 0)
    assert np.all((px >= centre - 180.0) & (px < centre + 180.0))
    shown = sorted(zip(view._azimuths(px), py.tolist(), strict=True))
    stored = sorted(zip((round(a % 360.0, 1) for a in site.horizon.azimuth_deg),
                        site.horizon.elevation_deg, strict=True))
    assert shown == stored
    if demo == "high-pass-hut":
        assert y.min() < 0.0                 # the negative part of the horizon is drawn
    assert view.grab().save(os.path.join(artefacts_dir, f"horizon-{demo}.png"))
    _show_tab(qtbot, view, view.obstacle_tab)
    assert view.grab().save(os.path.join(artefacts_dir, f"horizon-{demo}-obstacles.png"))
