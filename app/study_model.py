"""The tilt study's options as a Qt table, and the words used to describe them.

Nothing here computes irradiation: the rows are the figures of an engine
:class:`~tiltyard.engine.tilt.TiltStudy`, formatted for reading and copying.
"""

from __future__ import annotations

import functools
import math
from datetime import date, timedelta

from PySide6.QtCore import QSortFilterProxyModel, Qt
from PySide6.QtGui import QColor, QFont, QStandardItem, QStandardItemModel

from . import theme

MONTH_ABBR = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov",
              "Dec")
COMPASS_16 = ("N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W",
              "WNW", "NW", "NNW")

#: Role carrying the numeric value a column sorts by.
SORT_ROLE = Qt.ItemDataRole.UserRole + 1
#: Role carrying the option kind (``"two-season"``, ...).
KIND_ROLE = Qt.ItemDataRole.UserRole + 2

#: Short names for the schedule timeline and compact places.
SHORT_NAMES = {"horizontal": "Horizontal", "rule-of-thumb": "Rule of thumb",
               "fixed-optimal": "Optimal fixed", "two-season": "Two-season",
               "four-season": "Four-season", "monthly": "Monthly",
               "two-axis": "Two-axis (ceiling)"}

#: Names in the options table (the engine's full label is in the tooltip).
TABLE_NAMES = {"horizontal": "Horizontal", "rule-of-thumb": "Rule of thumb",
               "fixed-optimal": "Optimal fixed", "two-season": "Two-season",
               "four-season": "Four-season", "monthly": "Monthly",
               "two-axis": "Two-axis (ceiling)"}

OBJECTIVE_HEADERS = {"worst-month": "Worst month (kWh/m²)",
                     "months": "Chosen months (kWh/m²)"}


# -- words ----------------------------------------------------------------------

def compass(azimuth_deg: float) -> str:
    """16-point compass name of an azimuth (degrees clockwise from north)."""
    return COMPASS_16[int(math.floor((azimuth_deg % 360.0) / 22.5 + 0.5)) % 16]


def degree_text(label: str) -> str:
    """An engine label with ``deg`` written as the degree sign."""
    return label.replace(" deg", "°")


def day_of_year(mmdd: str, year: int) -> int:
    """0-based day of ``year`` of a ``"MM-DD"`` date."""
    m, d = (int(x) for x in mmdd.split("-"))
    return (date(year, m, d) - date(year, 1, 1)).days


def day_words(mmdd: str, year: int) -> str:
    """``"04-01"`` as ``"1 Apr"``."""
    m, d = (int(x) for x in mmdd.split("-"))
    return f"{date(year, m, d).day} {MONTH_ABBR[m - 1]}"


def _whole_month(period, year: int) -> int | None:
    """The month number if the period is exactly one calendar month."""
    sm, sd = (int(x) for x in period.start.split("-"))
    em, ed = (int(x) for x in period.end.split("-"))
    if sd != 1 or sm != em:
        return None
    last = (date(year + (sm == 12), sm % 12 + 1, 1) - timedelta(days=1)).day
    return sm if ed == last else None


def _tilt(v: float) -> str:
    return f"{v:.0f}°" if abs(v - round(v)) < 0.05 else f"{v:.1f}°"


def schedule_words(opt, year: int) -> str:
    """A schedule in words: ``"34° 1 Oct–31 Mar, 12° 1 Apr–30 Sep; facing 180° (S)"``."""
    if opt.kind == "two-axis":
        return "follows the sun all year (two-axis tracker)"
    sched = opt.schedule
    az = sched[0].azimuth_deg
    facing = "" if az is None else f"facing {az:.0f}° ({compass(az)})"
    if len(sched) == 1:
        return f"{_tilt(sched[0].tilt_deg)} all year, {facing}"
    months = [_whole_month(p, year) for p in sched]
    if all(m is not None for m in months):
        parts = [f"{MONTH_ABBR[m - 1]} {_tilt(p.tilt_deg)}"
                 for m, p in zip(months, sched, strict=True)]
    else:
        parts = [f"{_tilt(p.tilt_deg)} {day_words(p.start, year)}–{day_words(p.end, year)}"
                 for p in sched]
    return ", ".join(parts) + (f"; {facing}" if facing else "")


def short_name(opt) -> str:
    return SHORT_NAMES.get(opt.kind, opt.label)


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
            label = TABLE_NAMES.get(opt.kind, opt.label)
            if opt.kind == "fixed-optimal" and study.mounting == "flush":
                label = "Best plane"      # a reference for the roof as it is
            if opt is rec:
                label = "★ " + label
            adjust = ("continuous" if opt.kind == "two-axis"
                      else str(opt.adjustments_per_year))
            rows.append({
                "order": i, "kind": opt.kind, "recommended": opt is rec,
                "ceiling": opt.kind == "two-axis",
                "note": degree_text(opt.label) + (f": {opt.note}" if opt.note else ""),
                "text": [label, schedule_words(opt, year), f"{opt.annual_kwh_m2:.0f}",
                         f"{study.score(opt):.1f}", _pct(g_h), _pct(g_f),
                         "–" if share is None else f"{share:.1f}", adjust],
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
        return "–"
    return "0.0" if abs(v) < 0.05 else f"{v:+.1f}"


class StudySortProxy(QSortFilterProxyModel):
    """Sorts the options by the numeric value of a column, not its text."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setSortRole(SORT_ROLE)


__all__ = ["COLUMNS", "KIND_ROLE", "SORT_ROLE", "StudySortProxy", "StudyTableModel",
           "compass", "day_of_year", "day_words", "degree_text", "schedule_words",
           "short_name"]
