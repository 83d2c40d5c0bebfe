"""Irradiance view and weather dialog driven as a user would, on the real widgets (offscreen)."""

from __future__ import annotations

import os

import numpy as np
import pandas as pd
import pvlib
import pytest
from PySide6.QtCore import QDate, Qt

from tiltyard.app.views.irradiance_view import MAX_BAR_SERIES, IrradianceView, bar_rows
from tiltyard.engine.assess import assessment_part
from tiltyard.engine.assessment import Mounting, file_sha256
from tiltyard.engine.daycurves import irradiance_day
from tiltyard.engine.skyyear import IrradianceOptions
from tiltyard.engine.words import degree_text


def _open(qtbot, ctx, idle) -> IrradianceView:
    view = IrradianceView(ctx)
    qtbot.addWidget(view)
    view.resize(1130, 760)
    view.show()
    idle(ctx.runner)
    return view


def _y(view, key: str) -> np.ndarray:
    return np.asarray(view.day_items[key].getData()[1], dtype=float)


def _study(ctx):
    return assessment_part(ctx.assessment, "study")


# -- controls and the day curves ------------------------------------------------------------

def test_model_combo_changes_the_plane_curve_and_the_shared_sky(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    ctx.set_settings(sky="clear")
    view = _open(qtbot, ctx, idle)
    assert ctx.assessment.model == "perez"
    perez_poa, perez_ghi = _y(view, "poa"), _y(view, "ghi")
    perez_total = view.day.totals_kwh_m2["poa_kwh_m2"]
    seen = []
    ctx.document.settings_changed.connect(seen.append)
    view.model_combo.setCurrentIndex(view.model_combo.findData("isotropic"))
    # saved with the site, so shared with the Tilt study and the Sheet
    assert ctx.assessment.model == "isotropic" and len(seen) == 1
    idle(ctx.runner)
    iso_poa = _y(view, "poa")
    assert iso_poa.shape == perez_poa.shape
    assert np.max(np.abs(iso_poa - perez_poa)) > 5.0            # W/m2
    # the model transposes; the horizontal components are the sky's, unchanged
    # (Perez et al. 1990, Solar Energy 44(5); Liu & Jordan 1963): regression value
    np.testing.assert_array_equal(_y(view, "ghi"), perez_ghi)
    # the isotropic model leaves out circumsolar brightening and so gives less on a
    # tilted plane under a clear sky (Duffie & Beckman 2013, Solar Engineering of Thermal
    # Processes, sec. 2.16, from memory); no tolerance needed, a strict inequality
    assert view.day.totals_kwh_m2["poa_kwh_m2"] < perez_total
    # the curve drawn is the engine's (regression value)
    label, tilt, az = view._selected_plane()
    ref = irradiance_day(ctx.site, "2023-06-21", tilt, az,
                         IrradianceOptions(model="isotropic", sky="clear"))
    np.testing.assert_allclose(iso_poa, ref.series["poa_global"], rtol=1e-12)


def test_choosing_a_site_plane_changes_the_plane_curve(qtbot, make_ctx, idle):
    ctx = make_ctx("kelpie-creek-shed")
    view = _open(qtbot, ctx, idle)
    labels = [view.plane_combo.itemText(i) for i in range(view.plane_combo.count())]
    assert labels[0] == "Horizontal"
    assert labels[1].startswith("shed roof, north face") and labels[2].startswith("lean-to")
    assert view.plane_combo.currentIndex() == 1
    north = _y(view, "poa")
    view.plane_combo.setCurrentIndex(2)          # the west-facing lean-to
    idle(ctx.runner)
    west = _y(view, "poa")
    assert np.max(np.abs(west - north)) > 20.0   # W/m2
    assert view.day.surface_azimuth == pytest.approx(278.0)
    view.plane_combo.setCurrentIndex(0)          # horizontal
    idle(ctx.runner)
    # on a horizontal plane the Perez model returns the diffuse horizontal itself, so the
    # plane never receives more than GHI (Perez et al. 1990; pvlib.irradiance.perez);
    # the horizon only takes away; 1e-6 W/m2 for rounding
    assert np.all(_y(view, "poa") <= _y(view, "ghi") + 1e-6)
    assert "Horizontal" in view.day_legend.entries[0]


def test_picking_a_date_changes_the_day_curves(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle)
    assert view.date_edit.date() == QDate(2023, 6, 21)
    june_ghi = _y(view, "ghi")
    june_total = view.day.totals_kwh_m2["ghi_kwh_m2"]
    view.date_edit.setDate(QDate(2023, 12, 21))
    idle(ctx.runner)
    assert "21 December 2023" in view.day_title.text()
    assert not np.array_equal(_y(view, "ghi"), june_ghi)
    # common practice, no source: at 53.7 N the December solstice day has a fraction of
    # the June solstice's clear-sky irradiation (short day, low sun); regression band < 1/3
    assert view.day.totals_kwh_m2["ghi_kwh_m2"] < june_total / 3.0
    assert "kWh/m²" in view.day_totals.text()
    # units on every axis
    assert "W/m²" in view.day_plot.getAxis("left").labelText
    assert "Local clock time" in view.day_plot.getAxis("bottom").labelText
    assert "kWh/m²/day" in view.bars_plot.getAxis("left").labelText


# -- monthly bars and the study --------------------------------------------------------------

def _groups_ok(view) -> None:
    for bar in view.bar_items:
        x = np.asarray(bar.opts["x"], dtype=float)
        h = np.asarray(bar.opts["height"], dtype=float)
        assert x.shape == (12,) and h.shape == (12,)
        # one group per month: each series has one bar inside each month's slot
        np.testing.assert_array_equal(np.round(x), np.arange(1, 13))


def test_monthly_bars_have_one_series_per_option_of_the_assessment(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    ctx.set_settings(sky="clear")
    view = _open(qtbot, ctx, idle)
    n_own = 1 + len(ctx.site.planes)
    study = _study(ctx)
    # the study's options of the same assessment, on the same sky, join at once
    added = [o for o in study.options if o.kind not in ("horizontal", "plane")]
    assert len(view.bar_items) == n_own + len(added) == len(view.bars_legend.entries)
    _groups_ok(view)
    assert view.table_model.rowCount() == n_own + len(added)
    assert view.table_rows()[0][0] == "Horizontal"
    assert "upper bound" in view.table_rows()[0][4]
    # the study's bars are its monthly totals over the month lengths (regression value)
    days = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31], dtype=float)
    for bar, opt in zip(view.bar_items[n_own:], added, strict=True):
        np.testing.assert_allclose(bar.opts["height"], opt.monthly_kwh_m2 / days, rtol=1e-12)
    rows = view.table_rows()
    assert [r[0] for r in rows[n_own:]] == [degree_text(o.label) for o in added]
    assert rows[-1][3] == "—"                     # a tracking ceiling has no horizon loss
    # the published study's optimum joins the plane selector
    ctx.publish_study(study)
    idle(ctx.runner)
    planes = [view.plane_combo.itemText(i) for i in range(view.plane_combo.count())]
    assert any(p.startswith("Study: optimal fixed") for p in planes)
    view.plane_combo.setCurrentIndex(planes.index(next(p for p in planes
                                                       if p.startswith("Study: optimal"))))
    idle(ctx.runner)
    fixed = study.option("fixed-optimal").schedule[0]
    assert view.day.surface_tilt == pytest.approx(fixed.tilt_deg)


def test_monthly_basis_needs_the_sites_monthly_values(qtbot, make_ctx, idle):
    kelpie = make_ctx("kelpie-creek-shed")
    view = _open(qtbot, kelpie, idle)
    item = view.sky_combo.model().item(view.sky_combo.findData("monthly"))
    assert not item.isEnabled()
    assert view.monthly_reason.isVisible()
    assert "no monthly mean daily GHI" in view.monthly_reason.text()
    assert "no monthly mean daily GHI" in item.toolTip()
    view.sky_combo.setCurrentIndex(view.sky_combo.findData("monthly"))   # refused
    assert kelpie.assessment.sky == "auto"
    assert view.sky_combo.currentData() == "auto"
    # the best available basis of a site without monthly values or weather is the clear sky
    assert "clear sky: upper bound only" in view.sky_note.text()

    lark = make_ctx("larkmoor-dairy")
    view2 = _open(qtbot, lark, idle)
    item2 = view2.sky_combo.model().item(view2.sky_combo.findData("monthly"))
    assert item2.isEnabled()
    assert not view2.monthly_reason.isVisible()
    # the site holds its monthly values: the best available basis uses them
    assert "on the site's monthly irradiation values" in view2.sky_note.text()
    view2.sky_combo.setCurrentIndex(view2.sky_combo.findData("monthly"))
    assert lark.assessment.sky == "monthly"
    idle(lark.runner)
    assert view2.day.options.sky == "monthly"
    assert view2.day.step_min == 60
    assert view2.day_items["ghi_clear"].isVisible()      # the clear sky shown beside it
    assert view2.table_rows()[0][4] == "monthly GHI values"


# -- weather file ------------------------------------------------------------------------------

def _clear_sky_csv(path, site) -> pd.DataFrame:
    """A year of hourly pvlib clear-sky values at the interval midpoints, labelled by start."""
    starts = pd.date_range("2023-01-01", periods=8760, freq="h", tz="UTC")
    loc = pvlib.location.Location(site.latitude_deg, site.longitude_deg, "UTC",
                                  site.elevation_m)
    cs = loc.get_clearsky(starts + pd.Timedelta(minutes=30), model="ineichen")
    pd.DataFrame({"Time (UTC)": starts.strftime("%Y-%m-%d %H:%M"),
                  "GHI W/m2": cs["ghi"].to_numpy(), "DNI W/m2": cs["dni"].to_numpy(),
                  "DHI W/m2": cs["dhi"].to_numpy(), "Air temp": 12.0}).to_csv(
        path, index=False, float_format="%.6f")
    return cs


def _map_columns(dlg, mapping: dict, label: str, timezone: str) -> None:
    for key, name in mapping.items():
        box = dlg.column_combos[key]
        box.setCurrentIndex(box.findData(name))
    dlg.label_combo.setCurrentIndex(dlg.label_combo.findData(label))
    dlg.timezone_combo.setCurrentText(timezone)


def test_a_weather_csv_loads_through_the_dialog(qtbot, make_ctx, idle, tmp_path):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle)
    path = tmp_path / "clear-year.csv"
    cs = _clear_sky_csv(path, ctx.site)
    dlg = view.open_weather_dialog()
    dlg.path_edit.setText(str(path))
    qtbot.mouseClick(dlg.read_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    assert dlg.mapping.isVisible()                       # not TMY3/EPW: name the columns
    assert dlg.column_mapping()["ghi"] == "GHI W/m2"     # first guess from the header
    _map_columns(dlg, {"timestamp": "Time (UTC)", "ghi": "GHI W/m2", "dni": "DNI W/m2",
                       "dhi": "DHI W/m2", "temp_air": "Air temp"}, "start", "UTC")
    qtbot.mouseClick(dlg.read_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    assert dlg.loaded is not None, dlg.message
    assert dlg.use_button.isEnabled()
    assert dlg.findings.count() >= 1                     # the importer's findings are shown
    assert ctx.assessment.weather is None                # nothing changes before "use"
    qtbot.mouseClick(dlg.use_button, Qt.MouseButton.LeftButton)
    # the file, its import settings and its SHA-256 belong to the site now
    w = ctx.assessment.weather
    assert ctx.assessment.sky == "file" and w.path == str(path.resolve())
    assert w.sha256 == file_sha256(path) and w.timestamp_label == "start"
    assert dict(w.columns)["ghi"] == "GHI W/m2"
    idle(ctx.runner)
    assert view.sky_combo.currentData() == "file"
    assert "clear-year.csv" in view.sky_combo.currentText()
    assert "clear-year.csv" in view.sky_note.text()
    day = view.day
    assert day.options.sky == "file" and day.step_min == 60
    full = day.series["sun_up_fraction"].to_numpy() == 1.0
    t_utc = day.series.index.tz_convert("UTC")[full]
    written = cs["ghi"].reindex(t_utc).to_numpy()
    # pvlib.clearsky.ineichen through pvlib.location.Location.get_clearsky (Ineichen & Perez
    # 2002) written at the interval midpoints: whole sun-up hours come back as written;
    # tolerance 1e-5 W/m2 (six decimals in the file)
    np.testing.assert_allclose(_y(view, "ghi")[full], written, atol=1e-5)
    assert "clear-year.csv" in view.table_rows()[0][4]


def test_a_broken_csv_shows_the_line_and_keeps_the_sky(qtbot, make_ctx, idle, tmp_path):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle)
    before = ctx.assessment
    site_before = ctx.site
    path = tmp_path / "broken.csv"
    path.write_text("Time (UTC),GHI W/m2\n2023-01-01 00:00,0\n2023-01-01 01:00,0\n"
                    "2023-01-01 02:00,abc\n2023-01-01 03:00,0\n", encoding="utf-8")
    dlg = view.open_weather_dialog()
    dlg.path_edit.setText(str(path))
    qtbot.mouseClick(dlg.read_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    _map_columns(dlg, {"timestamp": "Time (UTC)", "ghi": "GHI W/m2"}, "start", "UTC")
    qtbot.mouseClick(dlg.read_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    assert "line 4" in dlg.message and "“abc”" in dlg.message
    assert not dlg.use_button.isEnabled()
    assert ctx.assessment is before and ctx.site is site_before
    dlg.reject()
    assert view.sky_combo.currentData() == "auto"


def test_a_csv_without_a_label_choice_is_not_read(qtbot, make_ctx, idle, tmp_path):
    ctx = make_ctx("larkmoor-dairy")
    view = _open(qtbot, ctx, idle)
    path = tmp_path / "few.csv"
    path.write_text("Time,GHI\n2023-01-01 00:00,0\n", encoding="utf-8")
    dlg = view.open_weather_dialog()
    dlg.path_edit.setText(str(path))
    dlg.read()
    idle(ctx.runner)
    dlg.read()                                   # mapping shown, no label chosen
    assert "start, end or centre" in dlg.message
    dlg.reject()


# -- screenshots --------------------------------------------------------------------------------

@pytest.mark.parametrize("demo", ["larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic"])
def test_render_the_view(qtbot, make_ctx, idle, artefacts_dir, demo):
    ctx = make_ctx(demo)
    ctx.set_settings(mounting=Mounting("adjustable"))     # every option, seasonal ones too
    view = _open(qtbot, ctx, idle)
    ctx.publish_study(_study(ctx))
    idle(ctx.runner)
    # eight and more options: the bars show at most six, on one sky basis, each in its
    # own colour and fill pattern; the rest are in the table
    assert len(view.rows) >= 8 and len(view.bar_items) == MAX_BAR_SERIES
    assert len({r.sky_label for r in bar_rows(view.rows)[0]}) == 1
    styles = {(b.opts["brush"].color().name(), b.opts["brush"].style()) for b in view.bar_items}
    assert len({st for _c, st in styles}) == len(view.bar_items)
    assert view.table_model.rowCount() == len(view.rows)
    assert "more in the table" in view.bars_title.text()
    assert all(len(item.getData()[0]) > 0 for key, item in view.day_items.items()
               if item.isVisible())
    path = os.path.join(artefacts_dir, f"irradiance_view_{demo}.png")
    assert view.grab().save(path)
    assert os.path.getsize(path) > 10_000
