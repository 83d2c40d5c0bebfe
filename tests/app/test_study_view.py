"""Tilt study view driven as a user would, on the real widgets (offscreen).

The study runs through the task runner on an hourly year with a 5° tilt step
(typed into the view's field) to keep each test to a few seconds. What is
checked is what the user sees: the options table, the message beside a field,
the clipboard, the chart items' data.
"""

from __future__ import annotations

import os

import numpy as np
import pytest
from PySide6.QtCore import QPoint, Qt
from PySide6.QtGui import QColor, QGuiApplication

from tiltyard.app import theme
from tiltyard.app.views.study_view import OBJECTIVES, StudyView

SIZE = (1130, 760)


def _open(qtbot, make_ctx, idle, demo="larkmoor-dairy", objective_index=None,
          mounting="adjustable", sky=None):
    """A shown study view on ``demo`` with the tilt step typed as 5° and the study done
    (on an adjustable rack by default, so every kind of option is compared)."""
    ctx = make_ctx(demo)
    if sky is not None:
        ctx.set_settings(sky=sky)
    view = StudyView(ctx)
    qtbot.addWidget(view)
    view.resize(*SIZE)
    view.show()
    qtbot.waitExposed(view)
    if mounting is not None:
        view.mounting.setCurrentIndex(view.mounting.findData(mounting))
        assert ctx.assessment.mounting_kind == mounting
    if objective_index is not None:
        view.objective.setCurrentIndex(objective_index)
    view.tilt_step.edit.clear()
    qtbot.keyClicks(view.tilt_step.edit, "5")
    qtbot.waitUntil(lambda: view.options is not None and view.options.tilt_step_deg == 5.0)
    idle(ctx.runner)
    qtbot.waitUntil(lambda: view.study is not None
                    and view.study.options_used.tilt_step_deg == 5.0)
    return ctx, view


def _column(view, header: str) -> int:
    m = view.proxy
    return next(c for c in range(m.columnCount())
                if m.headerData(c, Qt.Orientation.Horizontal) == header)


def test_changing_the_objective_changes_the_options_and_publishes(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle, sky="clear")
    study_annual = view.study
    assert ctx.study is study_annual                     # published for the other views
    assert study_annual.options_used.objective == "annual"
    rows_annual = view.table_rows()
    rec_annual = view.table_rows()[view.recommended_row()][0]
    assert len(rows_annual) == len(study_annual.options)
    assert view.table.isColumnHidden(3)                  # objective column = annual column

    with qtbot.waitSignal(ctx.study_changed, timeout=60000):
        view.objective.setCurrentIndex(view.objective.findData("worst-month"))
    idle(ctx.runner)
    study_worst = view.study
    assert study_worst.options_used.objective == "worst-month"
    assert ctx.study is study_worst
    rows_worst = view.table_rows()
    rec_worst = rows_worst[view.recommended_row()][0]
    # Larkmoor (53.7° N): the worst month is December, which wants a steep plane, so the
    # fixed optimum moves from mid tilts to steep ones and its row text changes
    # (regression value: annual -> two-season recommended, worst month -> fixed optimum)
    fixed_annual = next(r for r in rows_annual if r[0].endswith("Optimal fixed"))
    fixed_worst = next(r for r in rows_worst if r[0].endswith("Optimal fixed"))
    assert fixed_annual[1] != fixed_worst[1]
    assert rec_annual != rec_worst
    assert (study_worst.option("fixed-optimal").schedule[0].tilt_deg
            > study_annual.option("fixed-optimal").schedule[0].tilt_deg)
    assert not view.table.isColumnHidden(3)
    assert view.proxy.headerData(3, Qt.Orientation.Horizontal) == "Worst month (kWh/m²)"
    assert "worst-month objective" in view.recommendation.text()


def test_a_flush_roof_lists_the_roof_and_no_seasonal_schedule(qtbot, make_ctx, idle):
    # larkmoor-dairy's plane is a roof plane: panels flush on it by default
    ctx, view = _open(qtbot, make_ctx, idle, mounting=None)
    assert view.mounting.currentData() == "flush"
    st = view.study
    assert {o.kind for o in st.options} == {"horizontal", "plane", "fixed-optimal", "two-axis"}
    assert st.recommended.kind == "plane"
    assert "This roof as it is" in view.recommendation.text()
    assert "of the best plane for the site" in view.recommendation.text()
    assert "on the site's monthly irradiation values" in view.basis.text()
    qtbot.waitUntil(lambda: view.bound.isVisible())
    assert "upper bound, not an expected value" in view.bound.text()
    # the mounting is saved with the site; the adjustable rack brings the schedules back
    view.mounting.setCurrentIndex(view.mounting.findData("adjustable"))
    idle(ctx.runner)
    qtbot.waitUntil(lambda: view.study.mounting == "adjustable")
    assert view.study.has_option("two-season") and view.study.has_option("monthly")
    view.positions.setCurrentIndex(view.positions.findData(2))
    idle(ctx.runner)
    qtbot.waitUntil(lambda: view.study.options_used.max_positions == 2)
    assert view.study.has_option("two-season") and not view.study.has_option("four-season")


def test_the_worst_month_objective_reaches_the_curve_and_the_map(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle, demo="tarnvik-cabin", objective_index=1)
    st = view.study
    assert st.options_used.objective == "worst-month"
    x, y = view.curve.getData()
    np.testing.assert_allclose(y, st.tilt_curve["objective_kwh_m2"].to_numpy())
    # the curve is in worst-month units: well below the annual totals at every tilt
    assert np.all(y < st.tilt_curve["annual_kwh_m2"].to_numpy() / 6.0)
    assert "Weakest month" in view.curve_plot.getPlotItem().titleLabel.text
    assert "kWh/m²" in view.curve_plot.getPlotItem().getAxis("left").labelText
    # the map's best plane is the objective's: the curve's best to 0.5 % (the map steps the
    # azimuth by 5°, the curve sits at the fixed optimum's azimuth, found to 1°)
    assert st.grid_optimum[2] == pytest.approx(float(np.max(y)), rel=5e-3)
    # gains in the table are on the objective too
    fixed, hor = st.option("fixed-optimal"), st.option("horizontal")
    assert st.gain_pct(fixed, "horizontal") == pytest.approx(
        100.0 * (st.score(fixed) / st.score(hor) - 1.0))


def test_recommended_row_is_highlighted_and_two_axis_is_a_ceiling(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle, demo="kelpie-creek-shed")
    st = view.study
    r = view.recommended_row()
    idx = view.proxy.index(r, 0)
    assert idx.data().startswith("★ ")
    assert idx.data(Qt.ItemDataRole.FontRole).bold()
    assert idx.data(Qt.ItemDataRole.BackgroundRole) == QColor(theme.ACCENT_SOFT)
    rec_kind = st.recommended.kind
    assert view.table_rows()[r][0].endswith(
        {"fixed-optimal": "Optimal fixed", "two-season": "Two-season",
         "four-season": "Four-season", "monthly": "Monthly"}[rec_kind])
    # only one row is highlighted
    bold = [i for i in range(view.proxy.rowCount())
            if view.proxy.index(i, 0).data(Qt.ItemDataRole.FontRole).bold()]
    assert bold == [r]
    ceiling = [row for row in view.table_rows() if "ceiling" in row[0]]
    assert len(ceiling) == 1 and not ceiling[0][0].startswith("★")
    assert ceiling[0][-1] == "continuous"
    assert "Rule:" in view.recommendation.text()
    assert "upper bound" in view.basis.text()             # clear-sky basis
    assert "upper bound" in view.warnings.text()

    # the curve is the engine's tilt curve with its optimum marked
    x, y = view.curve.getData()
    np.testing.assert_allclose(x, st.tilt_curve.index.to_numpy(dtype=float))
    np.testing.assert_allclose(y, st.tilt_curve["objective_kwh_m2"].to_numpy())
    ox, oy = view.curve_opt.getData()
    assert ox[0] == x[int(np.argmax(y))] and oy[0] == pytest.approx(y.max())

    # the timeline has one bar item per option; a schedule that wraps past 31 Dec is
    # drawn as two blocks, so the two-season row has three
    kinds = [k for k, _b in view.timeline_bars]
    assert kinds == [o.kind for o in st.options]
    two = dict(view.timeline_bars)["two-season"]
    widths = two.opts["width"]
    assert len(widths) == 3 and sum(widths) == 365       # non-leap reference year

    # sorting by a header click orders the rows by the number, not the text
    hh = view.table.horizontalHeader()
    col = _column(view, "Annual (kWh/m²)")
    pos = QPoint(hh.sectionViewportPosition(col) + hh.sectionSize(col) // 2, 5)
    qtbot.mouseClick(hh.viewport(), Qt.MouseButton.LeftButton, pos=pos)
    vals = [float(view.proxy.index(i, col).data().replace(",", ""))    # 1,767: thousands
            for i in range(view.proxy.rowCount())]
    assert vals == sorted(vals) or vals == sorted(vals, reverse=True)
    assert len(set(vals)) > 2


def test_bad_tilt_range_shows_the_range_and_keeps_the_result(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle)
    before_rows = view.table_rows()
    before_study = ctx.study

    view.tilt_max.edit.clear()
    qtbot.keyClicks(view.tilt_max.edit, "95")
    assert view.tilt_max.message == ("Tilt to: the highest tilt (95°) must be between 0° (flat) "
                                     "and 90° (vertical).")
    qtbot.wait(2 * view.tilt_max.COMMIT_MS)
    assert not ctx.runner.is_busy()                      # nothing was submitted
    assert view.table_rows() == before_rows
    assert ctx.study is before_study

    view.tilt_max.edit.clear()
    qtbot.keyClicks(view.tilt_max.edit, "-5")            # below the lowest tilt (10)
    assert "the highest tilt (-5°)" in view.tilt_max.message
    view.tilt_step.edit.clear()
    qtbot.keyClicks(view.tilt_step.edit, "five")
    assert "is not a number" in view.tilt_step.message
    qtbot.wait(2 * view.tilt_max.COMMIT_MS)
    assert not ctx.runner.is_busy()
    assert view.table_rows() == before_rows
    assert view.study is before_study

    # the map of that last good result: the grid's shape, 100 % at the optimum
    st = view.study
    img = view.map_image.image
    assert img.shape == st.grid_pct.shape
    assert float(np.nanmax(img)) == pytest.approx(100.0, abs=1e-9)   # % of the grid's own max
    names = [m[0] for m in view.map_markers]
    assert names == ["optimum"] + [p.label for p in st.site.planes]
    assert len(view.map_labels) == len(names)
    assert view.map_bar.levels()[1] == 100.0
    # the plane labels keep off the contour percentages (boxes in data coordinates)
    boxes = [b for _t, b in view.map_labels]
    assert view.contour_label_boxes
    for b in boxes:
        for c in view.contour_label_boxes:
            assert min(b[2], c[2]) <= max(b[0], c[0]) or min(b[3], c[3]) <= max(b[1], c[1])


def test_copy_table_gives_tab_separated_text_with_units(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle, demo="coral-lane-clinic")
    QGuiApplication.clipboard().clear()
    qtbot.mouseClick(view.copy_button, Qt.MouseButton.LeftButton)
    text = QGuiApplication.clipboard().text()
    lines = text.rstrip("\n").split("\n")
    head = lines[0].split("\t")
    assert head[0] == "Option"
    assert "Annual (kWh/m²)" in head
    assert "Gain vs horizontal (%)" in head and "Share of two-axis ceiling (%)" in head
    assert len(lines) == 1 + len(view.study.options)
    assert all(len(line.split("\t")) == len(head) for line in lines)
    annual = [float(line.split("\t")[head.index("Annual (kWh/m²)")].replace(",", ""))
              for line in lines[1:]]
    np.testing.assert_allclose(annual, [round(o.annual_kwh_m2) for o in view.study.options])
    assert sum(line.startswith("★ ") for line in lines[1:]) == 1


@pytest.mark.parametrize("demo,objective", [("larkmoor-dairy", "annual"),
                                            ("kelpie-creek-shed", "annual"),
                                            ("coral-lane-clinic", "annual"),
                                            ("tarnvik-cabin", "worst-month")])
def test_render_study_view(qtbot, make_ctx, idle, artefacts_dir, demo, objective):
    index = [k for _t, k in OBJECTIVES].index(objective)
    ctx, view = _open(qtbot, make_ctx, idle, demo=demo, objective_index=index)
    assert view.study.options_used.objective == objective
    assert view.proxy.rowCount() == len(view.study.options)
    qtbot.wait(50)
    path = os.path.join(artefacts_dir, f"study_view_{demo}.png")
    assert view.grab().save(path)
    assert os.path.getsize(path) > 10_000


def test_chosen_months_and_fixed_switch_dates(qtbot, make_ctx, idle):
    ctx, view = _open(qtbot, make_ctx, idle, demo="kelpie-creek-shed")
    first = view.study
    view.objective.setCurrentIndex(view.objective.findData("months"))
    assert "Tick the months" in view.months_error.text() and view.months_error.isVisible()
    qtbot.wait(300)
    assert not ctx.runner.is_busy() and view.study is first      # nothing to optimise yet
    for m in (6, 7):                                              # June, July (winter, 33° S)
        box = view.month_boxes[m - 1]                             # click on the tick box
        qtbot.mouseClick(box, Qt.MouseButton.LeftButton, pos=QPoint(8, box.height() // 2))
    assert not view.months_error.isVisible()
    idle(ctx.runner)
    assert view.study.options_used.objective == "months"
    assert view.study.options_used.months == (6, 7)
    assert view.proxy.headerData(3, Qt.Orientation.Horizontal) == "Chosen months (kWh/m²)"

    view.switch_mode.setCurrentIndex(view.switch_mode.findData("fixed"))
    assert view.switch_a.edit.text() and view.switch_b.edit.text()   # filled from the study
    idle(ctx.runner)
    view.switch_a.edit.clear()
    qtbot.keyClicks(view.switch_a.edit, "13-40")
    assert "Switch on: “13-40” is no day of 2023" in view.switch_a.message
    view.switch_a.edit.clear()
    qtbot.keyClicks(view.switch_a.edit, "03-15")
    view.switch_b.edit.clear()
    qtbot.keyClicks(view.switch_b.edit, "09-15")
    qtbot.waitUntil(lambda: view.options.switch_dates == ("03-15", "09-15"))
    idle(ctx.runner)
    starts = {p.start for p in view.study.option("two-season").schedule}
    assert starts == {"03-15", "09-15"}
    assert "switch dates fixed by the user" in view.study.option("two-season").note
