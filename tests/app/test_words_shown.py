"""Every text a user can read, checked against the style of the user's words.

:func:`texts_of` walks a window or dialog: labels, buttons, placeholders, tool tips,
status tips, group and tab titles, combo and list items, table headers and cells, menu
actions, and in charts the axis labels, tick labels, titles and label layers.
:func:`style_problems` names what breaks the style of the user's words (DESIGN.md "The
app's words and look"; DEVELOPERS.md "Client text"): program identifiers, code literals,
``deg`` for the degree sign, three dots for the ellipsis.
"""

from __future__ import annotations

import re

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
    t = _FILE_NAME.sub("FILE", plain(text))
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
                "azimuth 12 deg", "between 0-360", "tilts 10-90"):
        assert style_problems(bad), bad
    for good in ("Tilt range: the lowest tilt (95°) must be between 0° and the highest "
                 "tilt (90°).", "Weather file…", "tmy_site_2.csv could not be read",
                 "Sunrise 06:12 · sunset 18:40", "e.g. 10-01 for 1 October", "2023-06-21",
                 "0–360°", "-2.48°", "<b>Polar day</b>: the sun does not set."):
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
    assert len(texts) > 200, len(texts)          # the walk did reach the views' texts
    found = problems_in(texts)
    assert not found, "\n".join(found)
