"""The site is one document: its weather file, sky basis and study settings come and go with
it, and every view reads the same assessment (driven on the real widgets, offscreen)."""

from __future__ import annotations

from tiltyard.app.views.irradiance_view import IrradianceView
from tiltyard.app.views.sheet_view import SheetView
from tiltyard.app.views.study_view import StudyView
from tiltyard.engine.assessment import (
    StudySettings,
    WeatherSource,
    file_sha256,
    load_assessment,
    save_assessment,
)

SIZE = (1130, 760)


def _show(qtbot, view):
    qtbot.addWidget(view)
    view.resize(*SIZE)
    view.show()
    qtbot.waitExposed(view)
    view.activated()                  # as the window does when the view is opened
    return view


def _with_weather(ctx, quarter_hour_weather):
    path, _written, columns = quarter_hour_weather
    src = WeatherSource(str(path), columns, "start", "UTC", file_sha256(path))
    assert ctx.set_settings(weather=src, study=StudySettings(tilt_step_deg=5.0))
    return path


def test_fifteen_minute_weather_reaches_the_study_and_the_sheet_views(
        qtbot, make_ctx, idle, quarter_hour_weather):
    ctx = make_ctx("larkmoor-dairy")
    _with_weather(ctx, quarter_hour_weather)
    study_view = _show(qtbot, StudyView(ctx))
    idle(ctx.runner)
    qtbot.waitUntil(lambda: study_view.study is not None)
    irr = study_view.study.options_used.irradiance
    assert (irr.sky, irr.step_min) == ("file", 15)
    assert "on the weather file quarter-hours.csv" in study_view.basis.text()
    assert "15 min steps" in study_view.basis.text()
    sheet = _show(qtbot, SheetView(ctx))
    idle(ctx.runner)
    qtbot.waitUntil(lambda: sheet.preview is not None)
    doc = sheet.preview.result.figures.document
    assert doc["assessment"]["interval_min"] == 15
    assert doc["assessment"]["basis"]["weather_file"] == "quarter-hours.csv"
    # the sheet and the study view show one study: the same recommendation and figure
    assert (sheet.preview.result.study.recommended.annual_kwh_m2
            == study_view.study.recommended.annual_kwh_m2)


def test_opening_another_site_leaves_no_trace_of_the_old_weather_file(
        qtbot, make_ctx, idle, tmp_path, quarter_hour_weather):
    ctx = make_ctx("larkmoor-dairy")
    path = _with_weather(ctx, quarter_hour_weather)
    view = _show(qtbot, IrradianceView(ctx))
    idle(ctx.runner)
    assert view.sky_combo.currentData() == "auto"
    assert "quarter-hours.csv" in view.sky_combo.itemText(3)
    assert "on the weather file quarter-hours.csv" in view.sky_note.text()
    # saved with the site: the file, its import settings and hash travel with it
    site_file = tmp_path / "larkmoor-with-weather.json"
    ctx.document.save(site_file)
    assert load_assessment(site_file).weather.path == str(path)

    ctx.document.open_demo("kelpie-creek-shed")
    idle(ctx.runner)
    a = ctx.assessment
    assert a.weather is None and a.sky == "auto" and a.study == StudySettings()
    assert ctx.study is None                                 # nothing computed is kept
    assert "Weather file…" == view.sky_combo.itemText(3)
    assert "quarter-hours" not in view.sky_note.text()
    assert "clear sky: upper bound only" in view.sky_note.text()
    rows = view.table_rows()
    assert rows and all("quarter-hours" not in r[4] for r in rows)
    assert all(r[4] == rows[0][4] for r in rows)             # one basis for every row

    # and back: the saved site brings its own weather file again
    ctx.document.open(site_file)
    idle(ctx.runner)
    assert ctx.assessment.weather.name == "quarter-hours.csv"
    assert "on the weather file quarter-hours.csv" in view.sky_note.text()


def test_the_study_editor_shows_each_sites_own_settings(qtbot, make_ctx, idle, tmp_path):
    ctx = make_ctx("larkmoor-dairy")
    view = _show(qtbot, StudyView(ctx))
    idle(ctx.runner)
    view.objective.setCurrentIndex(view.objective.findData("worst-month"))
    idle(ctx.runner)
    assert ctx.assessment.study.objective == "worst-month"
    ctx.document.open_demo("kelpie-creek-shed")              # a site with default settings
    idle(ctx.runner)
    assert view.objective.currentData() == "annual"
    assert view.study.options_used.objective == "annual"
    assert view.study.site.name == ctx.site.name
    # the cabin's file asks for the worst month on an adjustable rack
    ctx.document.open_demo("tarnvik-cabin")
    idle(ctx.runner)
    assert view.objective.currentData() == "worst-month"
    assert view.mounting.currentData() == "adjustable"
    assert view.positions.currentData() == 4
    qtbot.waitUntil(lambda: view.study.site.name == ctx.site.name)
    assert view.study.has_option("four-season") and not view.study.has_option("monthly")
    # a setting made here is saved with the site
    target = tmp_path / "cabin.json"
    save_assessment(ctx.assessment, target)
    assert load_assessment(target).mounting.max_positions == 4


def test_a_new_site_shows_none_of_the_previous_sites_monthly_values(qtbot, make_ctx, idle):
    from tiltyard.app.views.site_view import SiteView

    ctx = make_ctx("larkmoor-dairy")                         # twelve monthly GHI values
    view = SiteView(ctx)
    qtbot.addWidget(view)
    assert view.ghi_use.isChecked()
    assert all(e.text() for e in view.ghi_months["edits"])
    ctx.document.open_demo("kelpie-creek-shed")              # none
    assert not view.ghi_use.isChecked()
    assert all(e.text() == "" for e in view.ghi_months["edits"])
    view.ghi_use.setChecked(True)                            # nothing of Larkmoor's applies
    assert ctx.site.monthly_ghi_kwh_m2_day is None
    idle(ctx.runner)


def test_a_planes_mounting_is_edited_on_the_site_view(qtbot, make_ctx, idle):
    from tiltyard.app.views.site_view import SiteView

    ctx = make_ctx("kelpie-creek-shed")
    view = SiteView(ctx)
    qtbot.addWidget(view)
    box = view.planes.cellWidget(1, 3)                       # the lean-to
    assert box.currentData() == "flush"
    box.setCurrentIndex(box.findData("fixed-rack"))
    assert [p.mounting for p in ctx.site.planes] == ["flush", "fixed-rack"]
    assert ctx.assessment.mounting_kind == "flush"           # the first plane's, for the study
    idle(ctx.runner)


def test_the_window_opens_a_site_with_its_saved_settings(qtbot, tmp_path):
    from tiltyard.app.desktop import create_window
    from tiltyard.engine.assessment import Mounting, demo_assessment

    w = create_window("tarnvik-cabin")                       # the demo file's own settings
    qtbot.addWidget(w)
    a = w.ctx.assessment
    assert (a.study.objective, a.mounting) == ("worst-month", Mounting("adjustable", 4))
    path = tmp_path / "lark.json"
    save_assessment(demo_assessment("larkmoor-dairy").with_changes(model="isotropic"), path)
    w2 = create_window(str(path))
    qtbot.addWidget(w2)
    assert w2.ctx.assessment.model == "isotropic" and w2.document.path == path
    w.runner.shutdown(60000)
    w2.runner.shutdown(60000)


def test_undo_and_redo_every_edit_and_the_dirty_mark_follows(qtbot, make_ctx, idle, tmp_path):
    from tiltyard.engine.site import Obstacle

    ctx = make_ctx("kelpie-creek-shed")
    doc = ctx.document
    view = _show(qtbot, StudyView(ctx))
    idle(ctx.runner)
    start = ctx.assessment
    assert not doc.dirty and not doc.undo_stack.canUndo()
    assert doc.propose(elevation_m=700.0) is None                        # a site field
    tree = Obstacle("gum tree", 45.0, 10.0, 20.0, 8.0)
    assert doc.propose(obstacles=ctx.site.obstacles + (tree,)) is None   # an obstacle
    view.objective.setCurrentIndex(view.objective.findData("worst-month"))  # a setting
    assert doc.undo_stack.count() == 3 and doc.dirty
    assert doc.undo_stack.undoText() == "change study settings, mounting"
    doc.undo_stack.undo()
    assert view.objective.currentData() == "annual"                      # the editor follows
    doc.undo_stack.undo()
    assert tree not in ctx.site.obstacles
    doc.undo_stack.undo()
    assert ctx.assessment == start and not doc.dirty                     # back to clean
    doc.undo_stack.redo()
    assert ctx.site.elevation_m == 700.0 and doc.dirty
    doc.save(tmp_path / "kelpie.json")
    assert not doc.dirty                                                 # saved is clean
    doc.undo_stack.undo()
    assert doc.dirty
    doc.open_demo("larkmoor-dairy")                                      # a new document
    assert not doc.undo_stack.canUndo() and not doc.dirty
    idle(ctx.runner)


def test_the_edit_menu_undoes_with_the_usual_shortcuts(qtbot):
    from PySide6.QtGui import QKeySequence

    from tiltyard.app.desktop import create_window

    w = create_window("larkmoor-dairy")
    qtbot.addWidget(w)
    assert w.undo_action.shortcut() == QKeySequence(QKeySequence.StandardKey.Undo)
    assert w.redo_action.shortcut() == QKeySequence(QKeySequence.StandardKey.Redo)
    assert not w.undo_action.isEnabled()
    w.document.propose(name="Larkmoor dairy, new parlour roof")
    assert w.undo_action.isEnabled() and w.windowTitle().startswith("*")
    w.undo_action.trigger()
    assert w.ctx.site.name == "Larkmoor dairy, milking-shed roof"
    assert not w.windowTitle().startswith("*")
    w.runner.shutdown(60000)


def test_one_design_date_for_the_sun_path_and_the_irradiance_views(qtbot, make_ctx, idle):
    from PySide6.QtCore import QDate

    from tiltyard.app.views.sunpath_view import SunPathView

    ctx = make_ctx("kelpie-creek-shed")                        # southern hemisphere
    sun = SunPathView(ctx)
    qtbot.addWidget(sun)
    irr = _show(qtbot, IrradianceView(ctx))
    # the summer solstice of the site's hemisphere in both (not today's date)
    assert sun.date_edit.date() == QDate(2023, 12, 21) == irr.date_edit.date()
    sun.date_edit.setDate(QDate(2023, 3, 20))
    assert irr.date_edit.date() == QDate(2023, 3, 20)
    irr.date_edit.setDate(QDate(2023, 9, 23))
    assert sun.date_edit.date() == QDate(2023, 9, 23)
    ctx.document.open_demo("larkmoor-dairy")                   # northern: a new default
    assert sun.date_edit.date() == QDate(2023, 6, 21) == irr.date_edit.date()
    idle(ctx.runner)
