"""The weather dialog runs its read as an engine call in a worker process, not in a thread.

Format and behaviour tests (offscreen); the parsing itself is tested in
tests/engine/test_weather_preview.py and tests/engine/test_weather_check.py.
"""

from __future__ import annotations

import pickle
from pathlib import Path

import pvlib
from PySide6.QtCore import Qt

from tiltyard.app import engine_process
from tiltyard.app.engine_process import EngineCall
from tiltyard.app.weather_dialog import WeatherDialog
from tiltyard.engine.weather import WeatherData
from tiltyard.engine.weather_check import read_weather_for_site

TMY3_GREENSBORO = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"


def _dialog(qtbot, ctx) -> WeatherDialog:
    dlg = WeatherDialog(ctx)
    qtbot.addWidget(dlg)
    dlg.show()
    return dlg


def _spy(ctx, monkeypatch):
    """Record what reaches the runner on the dialog's channel: engine calls and plain submits."""
    calls, submits = [], []
    submit, submit_call = ctx.runner.submit, ctx.runner.submit_call

    def spy_submit(channel, fn, *args, **kwargs):
        if channel == WeatherDialog.CHANNEL:
            submits.append(fn)
        return submit(channel, fn, *args, **kwargs)

    def spy_submit_call(channel, call, *args, **kwargs):
        if channel == WeatherDialog.CHANNEL:
            calls.append(call)
        return submit_call(channel, call, *args, **kwargs)

    monkeypatch.setattr(ctx.runner, "submit", spy_submit)
    monkeypatch.setattr(ctx.runner, "submit_call", spy_submit_call)
    return calls, submits


def test_the_read_is_a_picklable_engine_call(qtbot, make_ctx, idle, tmp_path, monkeypatch):
    assert engine_process.use_processes()          # the suite runs engine calls in processes
    ctx = make_ctx("larkmoor-dairy")
    calls, submits = _spy(ctx, monkeypatch)
    path = tmp_path / "log.csv"
    path.write_text("Time (UTC),GHI W/m2\n2023-01-01 00:00,0\n2023-01-01 01:00,0\n",
                    encoding="utf-8")
    dlg = _dialog(qtbot, ctx)
    dlg.path_edit.setText(str(path))
    qtbot.mouseClick(dlg.read_button, Qt.MouseButton.LeftButton)
    idle(ctx.runner)
    assert len(calls) == 1 and len(submits) == 1   # the one submit is submit_call's own
    call = calls[0]
    assert isinstance(call, EngineCall) and call.func is read_weather_for_site
    assert call.args[0] == path and call.args[1] == ctx.site and call.args[2:] == (None,) * 3
    back = pickle.loads(pickle.dumps(call))
    assert back.func is read_weather_for_site and back.args == call.args
    assert dlg.mapping.isVisible()                 # the CsvHeader came back from the process
    assert dlg.column_mapping() == {"timestamp": "Time (UTC)", "ghi": "GHI W/m2"}
    dlg.reject()


def test_a_mapped_read_passes_the_form_to_the_engine_call(qtbot, make_ctx, idle, tmp_path,
                                                          monkeypatch):
    ctx = make_ctx("larkmoor-dairy")
    calls, _ = _spy(ctx, monkeypatch)
    path = tmp_path / "log.csv"
    path.write_text("Time (UTC),GHI W/m2\n2023-01-01 00:00,0\n2023-01-01 01:00,x\n",
                    encoding="utf-8")
    dlg = _dialog(qtbot, ctx)
    dlg.path_edit.setText(str(path))
    dlg.read()
    idle(ctx.runner)
    dlg.label_combo.setCurrentIndex(dlg.label_combo.findData("end"))
    dlg.timezone_combo.setCurrentText("UTC")
    dlg.read()
    idle(ctx.runner)
    assert calls[-1].args[2:] == ({"timestamp": "Time (UTC)", "ghi": "GHI W/m2"}, "end", "UTC")
    assert dlg.message == ("Could not use the file: log.csv, line 3: column “GHI W/m2”: "
                           "value “x” is not a number (expected a decimal number, or "
                           "empty or “NaN” for a missing value)")
    assert not dlg.use_button.isEnabled()
    dlg.reject()


def test_a_typical_year_file_comes_back_loaded_with_its_findings(qtbot, make_ctx, idle):
    ctx = make_ctx("larkmoor-dairy")
    dlg = _dialog(qtbot, ctx)
    dlg.path_edit.setText(str(TMY3_GREENSBORO))
    dlg.read()
    idle(ctx.runner)
    assert dlg.loaded is not None, dlg.message
    assert isinstance(dlg.loaded.weather, WeatherData)
    assert dlg.loaded.weather.source == "723170TYA.CSV (TMY3)"
    assert dlg.message.startswith("723170TYA.CSV (TMY3): 8760 intervals of 60 min")
    assert dlg.findings.count() == len(dlg.loaded.weather.findings)
    # the file's header is far from the site: the importer says so, and the dialog shows it
    assert any("differs from the file header" in dlg.findings.item(i).text()
               for i in range(dlg.findings.count()))
    assert not dlg.mapping.isVisible()
    dlg.reject()


def _row_gaps(dlg) -> list[tuple[str, int]]:
    """Empty height between the texts of the dialog's rows, top to bottom, up to the
    buttons (which sit at the foot): the gap between two rows' boxes plus the height a
    row's box has beyond what its content needs (a label given more height than its
    lines draws them centred in blank space). The findings list may take any height."""
    lay = dlg.layout()
    rows = []
    for i in range(lay.count()):
        item = lay.itemAt(i)
        w = item.widget()
        if item.spacerItem() is not None or (w is not None and not w.isVisible()):
            continue
        if w is dlg.buttons:
            break
        g = item.geometry()
        if g.height() <= 0:
            continue
        if w is dlg.findings:
            need = g.height()
        elif item.hasHeightForWidth():
            need = item.heightForWidth(g.width())
        else:
            need = item.sizeHint().height()
        rows.append((type(w).__name__ if w is not None else "row", g, max(0, g.height() - need)))
    return [(f"{a[0]} -> {b[0]}", b[1].top() - a[1].bottom() + (a[2] + b[2]) // 2)
            for a, b in zip(rows, rows[1:], strict=False)]


def test_no_large_gaps_with_or_without_the_column_mapping(qtbot, make_ctx, idle, tmp_path):
    ctx = make_ctx("larkmoor-dairy")
    path = tmp_path / "log.csv"
    path.write_text("Time (UTC),GHI W/m2\n" + "".join(
        f"2023-01-01 {h:02d}:00,0\n" for h in range(24)), encoding="utf-8")
    tmy3 = TMY3_GREENSBORO
    for size in ((1024, 600), (1280, 720)):
        for case in ("empty", "mapping", "findings"):
            dlg = _dialog(qtbot, ctx)
            dlg.resize(*size)
            if case != "empty":
                dlg.path_edit.setText(str(path if case == "mapping" else tmy3))
                dlg.read()
                idle(ctx.runner)
            qtbot.wait(20)
            assert dlg.mapping.isVisible() == (case == "mapping")
            assert dlg.findings.isVisible() == (case == "findings")
            gaps = _row_gaps(dlg)
            assert gaps, "no rows laid out"
            spacing = dlg.layout().spacing()
            # rows follow one another at the layout's spacing (a wrapped label's rounding
            # aside): nothing is spread over the dialog's height
            assert all(g <= spacing + 4 for _w, g in gaps), (size, case, gaps)
            if case == "findings":                      # the list takes the room left
                assert dlg.findings.geometry().bottom() >= dlg.buttons.geometry().top() - 30
            dlg.reject()
