"""File -> Open portfolio results: a batch's RESULTS as a sortable table with the
distribution of the best-plane irradiation; double-clicking a row opens that site.

The file is read in a worker process (:func:`tiltyard.engine.batch.results.portfolio_summary`,
through ``ctx.runner.submit_call``); the window holds no physics: it shows the frame and the
histogram the engine made, and opens a row's own site file (its ``site_file`` column,
:func:`tiltyard.engine.batch.results.row_assessment`).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QAbstractTableModel, QModelIndex, Qt
from PySide6.QtWidgets import QLabel, QSplitter, QTableView, QVBoxLayout, QWidget

from tiltyard.engine.cautions import CAUTION

from . import plots, theme

_NO_PARENT = QModelIndex()

#: Columns the table leaves out (long JSON and the standing caution, said once above).
HIDDEN_COLUMNS = ("site_file", "caution")
RESULTS_FILTER = "Portfolio results (*.csv *.parquet);;All files (*)"


class FrameModel(QAbstractTableModel):
    """A pandas DataFrame as a read-only table model; sorting sorts the frame (pandas), so
    a repaint reads only the visible cells."""

    def __init__(self, frame, parent=None):
        super().__init__(parent)
        self._all = frame
        self._columns = [c for c in frame.columns if c not in HIDDEN_COLUMNS]
        self._frame = frame.reset_index(drop=True)
        self._cells = self._frame[self._columns].to_numpy(dtype=object)

    def rowCount(self, parent=_NO_PARENT):  # noqa: N802 - Qt override
        return 0 if parent.isValid() else len(self._frame)

    def columnCount(self, parent=_NO_PARENT):  # noqa: N802 - Qt override
        return 0 if parent.isValid() else len(self._columns)

    def data(self, index, role=Qt.ItemDataRole.DisplayRole):
        if not index.isValid():
            return None
        value = self._cells[index.row(), index.column()]
        if role == Qt.ItemDataRole.DisplayRole:
            return _cell_text(value)
        if role == Qt.ItemDataRole.TextAlignmentRole and isinstance(value, (float, int)):
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None

    def headerData(self, section, orientation, role=Qt.ItemDataRole.DisplayRole):  # noqa: N802
        if role != Qt.ItemDataRole.DisplayRole:
            return None
        if orientation == Qt.Orientation.Horizontal:
            return self._columns[section]
        return str(section + 1)

    def sort(self, column, order=Qt.SortOrder.AscendingOrder):
        self.layoutAboutToBeChanged.emit()
        name = self._columns[column]
        self._frame = self._frame.sort_values(
            name, ascending=order == Qt.SortOrder.AscendingOrder, na_position="last",
            kind="stable").reset_index(drop=True)
        self._cells = self._frame[self._columns].to_numpy(dtype=object)
        self.layoutChanged.emit()

    def row(self, i: int):
        """Row ``i`` as shown (after sorting), every column included."""
        return self._frame.iloc[i]

    @property
    def columns(self) -> list:
        return list(self._columns)


def _cell_text(value) -> str:
    if value is None:
        return ""
    if isinstance(value, float):
        return "" if np.isnan(value) else f"{value:.6g}"
    try:
        import pandas as pd

        if pd.isna(value):
            return ""
    except (TypeError, ValueError):
        pass
    return str(value)


class PortfolioWindow(QWidget):
    """The results of one batch: summary, histogram and table."""

    def __init__(self, summary, open_row: Callable[[object], None], parent=None):
        super().__init__(parent, Qt.WindowType.Window)
        self.summary = summary
        self._open_row = open_row
        self.setWindowTitle(f"Portfolio results · {Path(summary.path).name}")
        self.resize(1100, 720)
        layout = QVBoxLayout(self)
        self.header = QLabel(self._header_text())
        self.header.setWordWrap(True)
        layout.addWidget(self.header)
        caution = QLabel(CAUTION)
        caution.setProperty("role", "caution")
        caution.setWordWrap(True)
        layout.addWidget(caution)
        split = QSplitter(Qt.Orientation.Vertical)
        self.plot = plots.plot_widget()
        self._draw_histogram()
        split.addWidget(self.plot)
        self.table = QTableView()
        self.model = FrameModel(summary.frame, self.table)
        self.table.setModel(self.model)
        self.table.setWordWrap(False)
        self.table.setSortingEnabled(True)
        self.table.sortByColumn(0, Qt.SortOrder.AscendingOrder)     # input order
        self.table.horizontalHeader().setSortIndicatorShown(True)
        self.table.setSelectionBehavior(QTableView.SelectionBehavior.SelectRows)
        self.table.setToolTip("Double-click a site to open it in the other views")
        self.table.doubleClicked.connect(self._double_clicked)
        split.addWidget(self.table)
        split.setSizes([220, 480])
        layout.addWidget(split, 1)

    def _header_text(self) -> str:
        s = self.summary
        df = s.frame
        basis = ""
        if "basis" in df and len(df):
            counts = df["basis"].value_counts()
            basis = "; sky basis: " + ", ".join(f"{k} {v}" for k, v in counts.items())
            if "clear" in counts:
                basis += " (clear-sky figures are upper bounds, not expected values)"
        return (f"{s.sites} sites from {s.path}{basis}. Sort by any column; double-click a "
                "site to open it.")

    def _draw_histogram(self) -> None:
        p = self.plot.getPlotItem()
        p.setLabel("bottom", "Best fixed plane, annual irradiation (kWh/m²)")
        p.setLabel("left", "Sites")
        s = self.summary
        if not s.counts:
            return
        edges = np.asarray(s.edges_kwh_m2)
        centres, widths = (edges[:-1] + edges[1:]) / 2.0, np.diff(edges)
        self.bars = pg.BarGraphItem(x=centres, height=np.asarray(s.counts), width=widths * 0.95,
                                    brush=theme.ACCENT, pen=pg.mkPen(theme.ACCENT))
        p.addItem(self.bars)

    def _double_clicked(self, index) -> None:
        if index.isValid():
            self._open_row(self.model.row(index.row()))
