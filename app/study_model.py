"""The tilt study's options as a Qt table.

Nothing here computes irradiation: the rows are the figures of an engine
:class:`~tiltyard.engine.tilt.TiltStudy`, formatted for reading and copying in
the words of :mod:`tiltyard.engine.words`.
"""

from __future__ import annotations

import functools
from datetime import date

from PySide6.QtCore import QSortFilterProxyModel, Qt
from PySide6.QtGui import QColor, QFont, QStandardItem, QStandardItemModel

from tiltyard.engine.words import NO_VALUE, degree_text, number, option_name, schedule_words

from . import theme

#: Role carrying the numeric value a column sorts by.
SORT_ROLE = Qt.ItemDataRole.UserRole + 1
#: Role carrying the option kind (``"two-season"``, ...).
KIND_ROLE = Qt.ItemDataRole.UserRole + 2

OBJECTIVE_HEADERS = {"worst-month": "Worst month (kWh/m²)",
                     "months": "Chosen months (kWh/m²)"}


# -- dates ----------------------------------------------------------------------

def day_of_year(mmdd: str, year: int) -> int:
    """0-based day of ``year`` of a ``"MM-DD"`` date."""
    m, d = (int(x) for x in mmdd.split("-"))
    return (date(year, m, d) - date(year, 1, 1)).days


# -- the table -------------------------------------------------------------------

COLUMNS = ("Option", "Schedule", "Annual (kWh/m²)", "Objective (kWh/m²)",
           "Gain vs horizontal (%)", "Gain vs best fixed plane (%)",
           "Share of two-axis ceiling (%)", "Adjustments per year")
COL_OBJECTIVE = 3


class StudyTableModel(QStandardItemModel):
    """One row per compared option of a :class:`TiltStudy` (in the engine's order).

    Every cell's text, sort key, tooltip, alignment, font and colours are set once
    per study, so the table answers its view from C++ (a Python ``data()`` is
    called hundreds of times for each repaint).
    """

    def __init__(self, parent=None):
        super().__init__(0, len(COLUMNS), parent)
        self._rows: list[dict] = []
        self._set_headers("Objective (kWh/m²)")

    def _set_headers(self, objective_header: str) -> None:
        self.setHorizontalHeaderLabels([objective_header if i == COL_OBJECTIVE else c
                                        for i, c in enumerate(COLUMNS)])

    def set_study(self, study) -> None:
        self.beginResetModel()
        try:
            self.blockSignals(True)
            self._rows = self._build(study) if study is not None else []
            self.setRowCount(0)
            self._set_headers(OBJECTIVE_HEADERS.get(study.options_used.objective,
                                                    "Objective (kWh/m²)")
                              if study is not None else "Objective (kWh/m²)")
            for row in self._rows:
                self.appendRow([self._cell(row, c) for c in range(len(COLUMNS))])
        finally:
            self.blockSignals(False)
            self.endResetModel()

    @staticmethod
    def _cell(row: dict, c: int) -> QStandardItem:
        it = QStandardItem(row["text"][c])
        it.setEditable(False)
        it.setData(row["sort"][c], SORT_ROLE)
        it.setData(row["kind"], KIND_ROLE)
        it.setToolTip(row["note"] + "\n" + row["text"][1])
        it.setTextAlignment((Qt.AlignmentFlag.AlignRight if c >= 2 else Qt.AlignmentFlag.AlignLeft)
                            | Qt.AlignmentFlag.AlignVCenter)
        it.setFont(_font(row["recommended"], row["ceiling"]))
        if row["recommended"]:
            it.setBackground(QColor(theme.ACCENT_SOFT))
            it.setForeground(QColor(theme.ACCENT))
        elif row["ceiling"]:
            it.setForeground(QColor(theme.MUTED))
        return it

    @staticmethod
    def _build(study) -> list[dict]:
        year = study.options_used.irradiance.year
        rec = study.recommended
        rows = []
        for i, opt in enumerate(study.options):
            # gains and shares on the study's objective (the annual total beside it)
            g_h = study.gain_pct(opt, "horizontal")
            g_f = study.gain_pct(opt, "fixed-optimal")
            share = study.share_pct(opt, "two-axis")
            label = option_name(opt, study.mounting)   # the full label is in the tooltip
            if opt is rec:
                label = "★ " + label
            adjust = ("continuous" if opt.kind == "two-axis"
                      else str(opt.adjustments_per_year))
            rows.append({
                "order": i, "kind": opt.kind, "recommended": opt is rec,
                "ceiling": opt.kind == "two-axis",
                "note": degree_text(opt.label + (f": {opt.note}" if opt.note else "")),
                "text": [label, schedule_words(opt, year), number(opt.annual_kwh_m2),
                         f"{study.score(opt):.1f}", _pct(g_h), _pct(g_f),
                         NO_VALUE if share is None else f"{share:.1f}", adjust],
                "sort": [i, i, opt.annual_kwh_m2, study.score(opt),
                         -1e9 if g_h is None else g_h, -1e9 if g_f is None else g_f,
                         -1.0 if share is None else share,
                         1e6 if opt.kind == "two-axis" else opt.adjustments_per_year],
            })
        return rows

    def is_recommended(self, row: int) -> bool:
        return bool(self._rows[row]["recommended"])


@functools.cache
def _font(bold: bool, italic: bool) -> QFont:
    f = QFont()
    f.setBold(bold)
    f.setItalic(italic)
    return f


def _pct(v) -> str:
    if v is None:
        return NO_VALUE
    return "0.0" if abs(v) < 0.05 else f"{v:+.1f}"


class StudySortProxy(QSortFilterProxyModel):
    """Sorts the options by the numeric value of a column, not its text."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setSortRole(SORT_ROLE)


__all__ = ["COLUMNS", "KIND_ROLE", "SORT_ROLE", "StudySortProxy", "StudyTableModel",
           "day_of_year"]
