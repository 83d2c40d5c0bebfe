"""File -> Open portfolio results: the batch's RESULTS as a sortable table with the
distribution of the best-plane irradiation; a double-click opens that site in the views."""

from __future__ import annotations

import pytest
from PySide6.QtCore import Qt

from tiltyard.app.cli import main
from tiltyard.app.desktop import create_window
from tiltyard.engine.batch.run import planned_hash

HEADER = "id,name,latitude_deg,longitude_deg,elevation_m,timezone,albedo,plane1_tilt_deg," \
         "plane1_azimuth_deg,plane1_mounting\n"
ROWS = ["r1,Low roof,51.5,-1.2,80,Europe/London,0.2,15,180,flush",
        "r2,Steep roof,51.6,-1.1,90,Europe/London,0.2,40,200,flush",
        "r3,Field,40.4,-3.7,650,Europe/Madrid,0.25,0,180,ground-rows"]


@pytest.fixture
def results(tmp_path, capsys):
    p = tmp_path / "sites.csv"
    p.write_text(HEADER + "\n".join(ROWS) + "\n", encoding="utf-8")
    out = tmp_path / "results.parquet"
    assert main(["batch", str(p), "-o", str(out), "--workers", "0"]) == 0
    capsys.readouterr()
    return out


def test_open_portfolio_results_sort_and_open_a_site(qtbot, results):
    w = create_window(None)
    w.ask_unsaved = lambda: "discard"
    qtbot.addWidget(w)
    w.show()
    try:
        w.ask_results_path = lambda: str(results)
        w.file_open_portfolio()
        qtbot.waitUntil(lambda: getattr(w, "portfolio_window", None) is not None,
                        timeout=60_000)
        pw = w.portfolio_window
        model = pw.model
        assert model.rowCount() == 3
        assert "site_file" not in model.columns and "caution" not in model.columns
        assert sum(pw.summary.counts) == 3                  # one bar count per site
        col = model.columns.index("fixed_optimal_annual_kwh_m2")
        pw.table.sortByColumn(col, Qt.SortOrder.DescendingOrder)
        shown = [float(model.data(model.index(i, col))) for i in range(3)]
        assert shown == sorted(shown, reverse=True)
        name_col = model.columns.index("name")
        pw.table.doubleClicked.emit(model.index(1, name_col))
        row = model.row(1)
        assert w.document.site.name == row["name"]
        assert planned_hash(w.document.assessment) == row["inputs_hash"]
        assert "from the portfolio results" in w.banner.text
        pw.close()
    finally:
        w.ask_unsaved = lambda: "discard"
        w.close()
