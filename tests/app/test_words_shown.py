"""Every text a user can read, checked against the style of the user's words.

:func:`texts_of` walks a window or dialog: labels, buttons, placeholders, tool tips,
status tips, group and tab titles, combo and list items, table headers and cells, menu
actions, and in charts the axis labels, tick labels, titles and label layers.
:func:`style_problems` names what breaks the style of the user's words (DESIGN.md "The
app's words and look"; DEVELOPERS.md "Client text"): program identifiers, code literals,
``deg`` for the degree sign, three dots for the ellipsis.
"""

from __future__ import annotations

import os
import re
from pathlib import Path

import pytest
from PySide6.QtCore import Qt
from PySide6.QtGui import QAction, QTextDocument
from PySide6.QtWidgets import (
    QAbstractButton,
    QAbstractItemView,
    QComboBox,
    QGroupBox,
    QLabel,
    QLineEdit,
    QListWidget,
    QPlainTextEdit,
    QTabWidget,
    QTextEdit,
    QWidget,
)

from tiltyard.app.desktop import create_window
from tiltyard.app.main_window import VIEW_TITLES
from tiltyard.engine.demo_sites import demo_site_names

#: A file name the user chose may hold anything (``tmy_site_2.csv``): not program words.
_FILE_NAME = re.compile(r"\S+\.(?:csv|json|epw|tm2|txt|pdf|png)\b", re.IGNORECASE)

#: Each style rule: a name and the pattern of what it refuses.
RULES = (
    ("snake_case identifier", re.compile(r"\b[a-z][a-z0-9]*_[a-z0-9_]*[a-z0-9]\b")),
    ("indexed field", re.compile(r"\w\[\d+\]")),
    ("'= None' or a code literal", re.compile(r"=\s*None\b|\b(?:None|True|False|nan|NaN)\b")),
    ("keyword argument", re.compile(r"\b[a-z_]+=['\"\w]")),
    ("quoted repr", re.compile(r"(?:^|[\s(:])''|(?:^|[\s(])'[^'\s]*':")),
    ("'deg' for °", re.compile(r"\d\s*deg\b|\bdeg\b")),
    ("'...' for the ellipsis '…'", re.compile(r"\.\.\.")),
    ("'<=' or '>=' for words", re.compile(r"<=|>=")),
    ("'|x|' for words", re.compile(r"\|\w+\|")),
    # one dash, one meaning (engine/words.py): "—" is a cell with no value, alone;
    # "–" joins the two ends of a range, with no spaces
    ("'—' that is not a lone no-value", re.compile(r"^(?!—$).*—", re.DOTALL)),
    ("'–' that is not a range", re.compile(r"\s–|–\s|^–|–$")),
    # one thousands rule (words.number): a figure with a unit has its thousands separated
    ("thousands not separated",
     re.compile(r"(?<![\d.,:/-])\d{4,}(?:\.\d+)?\s?(?:kWh|Wh|W/m|m\b|km\b|MJ)")),
    ("'-' for the range dash '–'", re.compile(r"(?<![\d-])(?!(?:0\d|1[0-2])-[0-3]\d\b|\d{4}-\d\d-\d\d)\d+(?:\.\d+)?°?-\d")),
)


def plain(text: str) -> str:
    """Rich text as a reader sees it (tags gone, entities read)."""
    if "<" in text and re.search(r"<[a-zA-Z/][^>]*>", text):
        doc = QTextDocument()
        doc.setHtml(text)
        return doc.toPlainText()
    return text


def style_problems(text: str) -> list[str]:
    """The style rules ``text`` breaks (an empty list when none)."""
    # a file name the user chose and text they typed (quoted “…”) are theirs
    t = re.sub(r"“[^”]*”", "“TYPED”", _FILE_NAME.sub("FILE", plain(text)))
    return [name for name, pattern in RULES if pattern.search(t)]


def _model_texts(view: QAbstractItemView, where: str, out: list, max_rows: int = 400) -> None:
    model = view.model()
    if model is None:
        return
    for orient, n in ((Qt.Orientation.Horizontal, model.columnCount()),
                      (Qt.Orientation.Vertical, model.rowCount())):
        for i in range(n):
            for role in (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.ToolTipRole):
                v = model.headerData(i, orient, role)
                if isinstance(v, str):
                    out.append((f"{where} header", v))
    for r in range(min(model.rowCount(), max_rows)):
        for c in range(model.columnCount()):
            idx = model.index(r, c)
            for role in (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.ToolTipRole):
                v = idx.data(role)
                if isinstance(v, str):
                    out.append((f"{where} cell", v))


def _chart_texts(widget, where: str, out: list) -> None:
    import pyqtgraph as pg

    from tiltyard.app.plot_labels import LabelLayer
    for item in widget.scene().items():
        if isinstance(item, pg.AxisItem):
            if item.labelText:
                out.append((f"{where} axis", item.labelText + " " + (item.labelUnits or "")))
            for level in item._tickLevels or ():
                out.extend((f"{where} tick", str(s)) for _v, s in level)
        elif isinstance(item, pg.TextItem):
            out.append((f"{where} text", item.textItem.toPlainText()))
        elif isinstance(item, pg.LabelItem):
            out.append((f"{where} label", item.text))
        elif isinstance(item, LabelLayer):
            out.extend((f"{where} label", lb.text) for lb in item.labels)
        elif isinstance(item, pg.ViewBox) and item.menuEnabled():
            # pyqtgraph's own chart menu (and the scene's "Export..."), reachable by a
            # right click only where the view leaves the menu on
            menus = [item.getMenu(None)] + list(widget.scene().contextMenu)
            for m in menus:
                acts = m.actions() if hasattr(m, "actions") else [m]
                out.extend((f"{where} chart menu", a.text()) for a in acts)
        elif isinstance(item, pg.LegendItem):
            out.extend((f"{where} legend", lab.text) for _s, lab in item.items)
        tip = item.toolTip() if hasattr(item, "toolTip") else ""
        if tip:
            out.append((f"{where} chart tip", tip))


def texts_of(root: QWidget) -> list[tuple[str, str]]:
    """Every user-facing text under ``root`` as (where, text)."""
    import pyqtgraph as pg
    out: list[tuple[str, str]] = []
    for w in [root, *root.findChildren(QWidget)]:
        where = type(w).__name__ + (f"#{w.objectName()}" if w.objectName() else "")
        for kind in ("toolTip", "statusTip", "whatsThis", "accessibleName"):
            t = getattr(w, kind)()
            if t:
                out.append((f"{where} {kind}", t))
        if w.isWindow() and w.windowTitle():
            out.append((f"{where} title", w.windowTitle()))
        if isinstance(w, QLabel):
            out.append((where, w.text()))
        elif isinstance(w, QAbstractButton):
            out.append((where, w.text()))
        elif isinstance(w, QLineEdit):
            out.append((f"{where} placeholder", w.placeholderText()))
        elif isinstance(w, QComboBox):
            for i in range(w.count()):
                out.append((f"{where} item", w.itemText(i)))
                tip = w.itemData(i, Qt.ItemDataRole.ToolTipRole)
                if isinstance(tip, str):
                    out.append((f"{where} item tip", tip))
        elif isinstance(w, QGroupBox):
            out.append((where, w.title()))
        elif isinstance(w, QTabWidget):
            for i in range(w.count()):
                out += [(f"{where} tab", w.tabText(i)), (f"{where} tab tip", w.tabToolTip(i))]
        elif isinstance(w, (QTextEdit, QPlainTextEdit)):
            out.append((where, w.toPlainText()))
        if isinstance(w, QListWidget):
            out += [(f"{where} item", w.item(i).text()) for i in range(w.count())]
        elif isinstance(w, QAbstractItemView) and not isinstance(w, QComboBox):
            _model_texts(w, where, out)
        if isinstance(w, pg.GraphicsView) and w.scene() is not None:
            _chart_texts(w, where, out)
    for a in root.findChildren(QAction):
        if type(a.parent()).__module__.startswith("pyqtgraph"):
            continue                         # a chart's menu: taken with its chart above
        for t in (a.text(), a.toolTip(), a.statusTip()):
            if t:
                out.append(("action", t))
    return [(where, t) for where, t in out if t and t.strip()]


def problems_in(texts) -> list[str]:
    """``where: text  [rules]`` for every text that breaks a rule, each text once."""
    seen, found = set(), []
    for where, text in texts:
        if text in seen:
            continue
        seen.add(text)
        bad = style_problems(text)
        if bad:
            found.append(f"{where}: {text!r} {bad}")
    return found


# -- the checks ---------------------------------------------------------------------------

def test_the_rules_catch_what_they_are_for():
    for bad in ("tilt range = 95:90: must satisfy 0 <= min <= max <= 90 deg",
                "timezone = None", "planes[0].tilt_deg must be a number",
                "'': height_m is required", "Loading...", "'95': must be between",
                "azimuth 12 deg", "between 0-360", "tilts 10-90", "equal to |latitude|",
                "Tilt study — Larkmoor", "Print – preview", "–", "1767 kWh/m²",
                "elevation 2350 m"):
        assert style_problems(bad), bad
    for good in ("Tilt range: the lowest tilt (95°) must be between 0° and the highest "
                 "tilt (90°).", "Weather file…", "tmy_site_2.csv could not be read",
                 "Sunrise 06:12 · sunset 18:40", "e.g. 10-01 for 1 October", "2023-06-21",
                 "0–360°", "-2.48°", "—", "12° 1 Apr–30 Sep",
                 "1,767 kWh/m² a year", "2,350 m", "in 2023", "999 m", "<b>Polar day</b>: the sun does not set."):
        assert not style_problems(good), (good, style_problems(good))


@pytest.fixture
def window(qtbot):
    made = []

    def make(site_arg):
        w = create_window(site_arg)
        w.ask_unsaved = lambda: "discard"
        qtbot.addWidget(w)
        w.resize(1280, 720)
        w.show()
        made.append(w)
        return w

    yield make
    for w in made:
        w.ask_unsaved = lambda: "discard"
        w.close()
        assert w.runner.active_thread_count() == 0


@pytest.mark.parametrize("demo", demo_site_names())
def test_every_view_speaks_the_users_words(window, idle, demo):
    w = window(demo)
    texts = []
    for title in VIEW_TITLES:
        view = w.show_view(title)
        idle(w.runner, 120.0)
        texts += [(f"{title}: {where}", t) for where, t in texts_of(view)]
    texts += [(f"window: {where}", t) for where, t in texts_of(w)]
    texts.append(("About box", w.about_text()))
    assert len(texts) > 200, len(texts)          # the walk did reach the views' texts
    found = problems_in(texts)
    assert not found, "\n".join(found)


# -- bad input in every form --------------------------------------------------------------

def _type(qtbot, field, text: str) -> None:
    """Type into a ValidatedField as a user does: select all, type, leave the field."""
    field.edit.selectAll()
    field.edit.del_()
    if text:
        qtbot.keyClicks(field.edit, text)
    field.edit.editingFinished.emit()


def _cell(table, row: int, col: int, text: str) -> None:
    item = table.item(row, col)
    item.setText(text)                        # emits itemChanged, as an edit does


def _shown(w) -> list[tuple[str, str]]:
    return texts_of(w)


def _check_form(qtbot, idle, w, title: str, steps) -> list[str]:
    """Run each bad-input step on a fresh copy of the view's site, collect what shows."""
    view = w.show_view(title)
    idle(w.runner)
    texts = []
    for label, step in steps:
        step(view)
        qtbot.wait(2 * 300)                   # ValidatedField.COMMIT_MS: pending commits
        idle(w.runner)
        texts += [(f"{title} after {label}: {where}", t) for where, t in _shown(w)]
    return texts


def _site_steps(qtbot):
    steps = []
    for name, bad in (("name", ""), ("latitude", "95"), ("latitude", "north"),
                      ("longitude", "200"), ("elevation", "-900"), ("elevation", "high"),
                      ("albedo", "2"), ("albedo", "x")):
        steps.append((f"{name} {bad!r}", lambda v, n=name, b=bad: _type(qtbot, getattr(v, n), b)))
    steps += [("plane tilt 95", lambda v: _cell(v.planes, 0, 1, "95")),
              ("plane azimuth x", lambda v: _cell(v.planes, 0, 2, "x"))]
    return steps


def _horizon_steps(qtbot):
    steps = [("profile azimuth 400", lambda v: _cell(v.profile_table, 0, 0, "400")),
             ("profile elevation x", lambda v: _cell(v.profile_table, 0, 1, "x")),
             ("obstacle bearing 400", lambda v: _cell(v.obstacle_table, 0, 1, "400")),
             ("obstacle height empty", lambda v: _cell(v.obstacle_table, 0, 4, ""))]
    for name, bad in (("bearing_deg", "400"), ("width_deg", "0"), ("distance_m", "x"),
                      ("height_m", "")):
        steps.append((f"obstacle form {bad!r}",
                      lambda v, n=name, b=bad: _type(qtbot, v.obstacle_fields[n], b)))
    steps.append(("add obstacle", lambda v: v.add_obstacle()))
    # horizon files with faults (invented lines; only the fault matters)
    for name, text in (("bad-number.csv", "azimuth,elevation\n0,2\n90,x\n"),
                       ("out-of-range.csv", "0;2\n400;3\n"), ("empty.csv", ""),
                       ("one-column.csv", "0\n90\n"), ("missing.csv", None)):
        steps.append((f"import {name}", lambda v, n=name, t=text: _import(v, n, t)))
    return steps


def _import(view, name: str, text) -> None:
    import tempfile
    folder = Path(tempfile.mkdtemp())
    path = folder / name
    if text is not None:
        path.write_text(text, encoding="utf-8")
    view.import_csv(str(path))


def _study_steps(qtbot):
    def fixed(combo, v):
        combo(v).setCurrentIndex(combo(v).findData("fixed"))
    steps = [("adjustable rack", lambda v: v.mounting.setCurrentIndex(
        v.mounting.findData("adjustable")))]
    steps.append(("fixed azimuth", lambda v: fixed(lambda x: x.azimuth_mode, v)))
    steps.append(("fixed switch dates", lambda v: fixed(lambda x: x.switch_mode, v)))
    good = {"tilt_min_deg": "10", "tilt_max_deg": "90", "tilt_step_deg": "1",
            "min_days_between": "30", "azimuth_deg": "180", "switch_a": "04-01",
            "switch_b": "10-01"}
    for name, bad in (("tilt_min_deg", "95"), ("tilt_max_deg", "5"), ("tilt_max_deg", "100"),
                      ("tilt_min_deg", "x"), ("tilt_min_deg", ""), ("tilt_step_deg", "0"),
                      ("min_days_between", "0"), ("min_days_between", "x"),
                      ("azimuth_deg", "400"), ("switch_a", "13-40"), ("switch_a", "4 April"),
                      ("switch_b", "04-20"), ("switch_b", "04-01")):
        steps.append((f"{name} {bad!r}", lambda v, n=name, b=bad: _type(qtbot, v.fields[n], b)))
        steps.append((f"{name} back", lambda v, n=name: _type(qtbot, v.fields[n], good[n])))
    return steps


@pytest.mark.parametrize("title", ["Site", "Horizon", "Tilt study"])
def test_bad_input_is_told_in_the_forms_words(window, qtbot, idle, title):
    steps = {"Site": _site_steps, "Horizon": _horizon_steps,
             "Tilt study": _study_steps}[title](qtbot)
    w = window("larkmoor-dairy")
    texts = _check_form(qtbot, idle, w, title, steps)
    errors = [t for where, t in texts if "must" in t.lower() or "not a" in t or "type" in t]
    assert len(errors) >= len(steps) // 2, errors     # the bad values were refused
    if os.environ.get("TILTYARD_SHOW_WORDS"):
        print("\n".join(sorted(set(errors))))
    found = problems_in(texts)
    assert not found, "\n".join(found)


# a year of hourly rows from 1 January 2023, invented values (only the format matters here)
def _csv(path, stamp, ghi="0", header="time,ghi,temp"):
    rows = [header] + [f"{stamp(h)},{ghi if h == 5 else 0},{4}" for h in range(8760)]
    path.write_text("\n".join(rows) + "\n", encoding="utf-8")
    return path


def _naive(h):
    import datetime as dt
    return (dt.datetime(2023, 1, 1) + dt.timedelta(hours=h)).strftime("%Y-%m-%d %H:%M")


@pytest.mark.parametrize("case", ["a typical-year file", "no zone for naive stamps",
                                  "unknown zone", "bad number",
                                  "bad timestamp", "empty file", "no such file",
                                  "no label"])
def test_the_weather_dialog_tells_bad_files_in_the_users_words(qtbot, make_ctx, idle,
                                                              tmp_path, case):
    from tiltyard.app.weather_dialog import WeatherDialog
    ctx = make_ctx()
    dlg = WeatherDialog(ctx)
    qtbot.addWidget(dlg)
    dlg.show()
    path = tmp_path / "weather_log_2023.csv"
    if case == "bad number":
        _csv(path, _naive, ghi="lots")
    elif case == "bad timestamp":
        _csv(path, lambda h: "yesterday" if h == 7 else _naive(h))
    elif case == "empty file":
        path.write_text("", encoding="utf-8")
    elif case == "a typical-year file":                 # read as it is, with its findings
        import pvlib
        path = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"
    elif case != "no such file":
        _csv(path, _naive)
    dlg.path_edit.setText(str(path))
    dlg.read()
    idle(ctx.runner)
    if dlg.mapping.isVisible():                      # a generic CSV: name its columns
        if case != "no label":
            dlg.label_combo.setCurrentIndex(1)
        if case == "unknown zone":
            dlg.timezone_combo.setEditText("Mars/Olympus")
        elif case == "no zone for naive stamps":
            dlg.timezone_combo.setCurrentIndex(0)     # "each timestamp carries its offset"
        else:
            dlg.timezone_combo.setCurrentIndex(1)
        dlg.read()
        idle(ctx.runner)
    assert dlg.message, "the dialog said nothing"
    if case == "a typical-year file":
        assert dlg.findings.count() >= 3 and dlg.use_button.isEnabled()
        # the file is of another place: the question before using it
        assert dlg.loaded.fit_warnings
        asked = dlg.fit_warning_text(dlg.loaded.fit_warnings)
        assert not style_problems(asked), (asked, style_problems(asked))
    if os.environ.get("TILTYARD_SHOW_WORDS"):
        print(f"\n{case}: {dlg.message}")
    found = problems_in(texts_of(dlg))
    assert not found, "\n".join(found)
