"""``tiltyard sheet``: the PDF, the data exports, headless runs and failures.

The sheet must print the engine's numbers: they are compared with ``tiltyard study
--json`` for the same flags. Failures must exit 2 with one line on stderr and leave no
file behind and no existing file changed.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pypdf
import pytest

from tiltyard.app.cli import main
from tiltyard.engine.words import number

FLAGS = ["--tilt-step", "5", "--mounting", "fixed-rack"]   # a coarse rack keeps the tests fast
PEOPLE = ["--preparer", "Jane Doe", "--organisation", "Example Solar Ltd",
          "--prepared", "2025-05-12", "--times", "clock"]


def _call(*argv) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        rc = main(list(argv))
    return rc, out.getvalue(), err.getvalue()


def _text(path) -> str:
    reader = pypdf.PdfReader(str(path))
    return " ".join(" ".join(p.extract_text() for p in reader.pages).split())


def _listing(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir())


@pytest.fixture(scope="module")
def run(tmp_path_factory):
    folder = tmp_path_factory.mktemp("sheet")
    files = {k: folder / name for k, name in (("pdf", "sheet.pdf"), ("monthly", "monthly.csv"),
                                             ("options", "options.csv"),
                                             ("hourly", "hourly.csv"), ("json", "study.json"))}
    rc, out, err = _call("sheet", "larkmoor-dairy", "-o", str(files["pdf"]), "--paper", "a4",
                         *PEOPLE, "--csv-monthly", str(files["monthly"]),
                         "--csv-options", str(files["options"]),
                         "--csv-hourly", str(files["hourly"]),
                         "--hourly-options", "recommended,horizontal",
                         "--json-out", str(files["json"]), *FLAGS)
    src, study_out, study_err = _call("study", "larkmoor-dairy", "--json", *FLAGS)
    assert src == 0, study_err
    return {"rc": rc, "out": out, "err": err, "files": files, "folder": folder,
            "study_text": study_out, "study": json.loads(study_out)["study"]}


def test_sheet_writes_every_file(run):
    assert run["rc"] == 0, run["err"]
    assert run["err"] == ""
    lines = run["out"].splitlines()
    assert len(lines) == 5 and all(line.startswith("wrote ") for line in lines)
    assert "2 pages, A4" in lines[0]
    assert _listing(run["folder"]) == sorted(p.name for p in run["files"].values())


def test_json_out_is_the_study_json(run):
    # one shared builder: byte for byte what `study --json` prints for the same flags
    assert run["files"]["json"].read_text("utf-8") == run["study_text"]


def test_pdf_figures_are_the_study_json_numbers(run):
    text = _text(run["files"]["pdf"])
    d = run["study"]
    rec = next(r for r in d["options"] if r["label"] == d["recommended"])
    assert f"{number(rec['annual_kwh_m2'])} kWh/m² a year on the plane" in text
    assert f"{rec['gain_vs_horizontal_pct']:+.1f} % over a horizontal plane" in text
    g = rec["gain_vs_fixed_optimal_pct"]
    assert (f"{g:+.1f} % over the" if abs(g) >= 0.05 else "0.0 % over the fixed") in text
    plane = next(r for r in d["options"] if r["kind"] == "plane")
    gp = 100.0 * (rec["annual_kwh_m2"] / plane["annual_kwh_m2"] - 1.0)
    assert f"{gp:+.1f} % over the existing plane “{plane['label']}”" in text
    for r in d["options"]:                   # the options table: every annual figure
        assert f" {number(r['annual_kwh_m2'])} " in text, r["label"]
    for words in ("Larkmoor dairy, milking-shed roof", "Jane Doe, Example Solar Ltd",
                  "12 May 2025", "Key figures", "Sun path", "Options compared", "Assumptions",
                  "Cautions", "Reproducibility", "Tiltyard ", "roof access"):
        assert words in text, words


def test_flush_roof_sheet_leads_with_the_roof_on_the_monthly_basis(tmp_path):
    # larkmoor-dairy: a roof plane (flush by default) and twelve monthly GHI values
    pdf = tmp_path / "roof.pdf"
    rc, _, err = _call("sheet", "larkmoor-dairy", "-o", str(pdf), *PEOPLE, "--tilt-step", "5")
    assert rc == 0, err
    src, study_out, _ = _call("study", "larkmoor-dairy", "--json", "--tilt-step", "5")
    doc = json.loads(study_out)
    d = doc["study"]
    assert d["mounting"]["kind"] == "flush" and d["recommended_kind"] == "plane"
    assert {o["kind"] for o in d["options"]} == {"horizontal", "plane", "fixed-optimal",
                                                 "two-axis"}
    rec = next(r for r in d["options"] if r["label"] == d["recommended"])
    text = _text(pdf)
    assert (f"{number(rec['annual_kwh_m2'])} kWh/m² a year on the plane of this roof as it is, "
            "on the site's monthly irradiation values") in text
    assert f"{rec['share_of_best_plane_pct']:.1f} % of the best plane for the site" in text
    bound = doc["clear_sky_bound_kwh_m2"][rec["label"]]
    assert f"{number(bound)} kWh/m² under a clear sky every day: the upper bound" in text
    assert "seasonal" not in text.lower() or "Two-season" not in text


def test_csv_exports_match_the_study_json(run):
    d = run["study"]
    monthly = pd.read_csv(run["files"]["monthly"], index_col=0)
    assert list(monthly.index)[-1] == "Year"
    for r in d["options"]:
        col = monthly[f"{r['label']} (kWh/m2)"]
        # the JSON document's values, 3 decimals both: 1e-9 kWh/m2
        assert col.iloc[:12].tolist() == pytest.approx(r["monthly_kwh_m2"], abs=1e-9)
        assert col.iloc[12] == pytest.approx(r["annual_kwh_m2"], abs=1e-9)
    options = pd.read_csv(run["files"]["options"])
    assert options["label"].tolist() == [r["label"] for r in d["options"]]
    assert options.loc[options["recommended"], "label"].item() == d["recommended"]
    hourly = pd.read_csv(run["files"]["hourly"], index_col=0)
    assert len(hourly) == 8760 and len(hourly.columns) == 4
    rec = next(r for r in d["options"] if r["label"] == d["recommended"])
    col = hourly[f"{rec['label']}: poa_global (W/m2)"]
    # hourly interval means x 1 h / 1000 = the annual kWh/m2 of the JSON document
    # (regression value; CSV rounding 0.0005 W/m2 x 8760 h): 0.01 kWh/m2
    assert col.sum() / 1000.0 == pytest.approx(rec["annual_kwh_m2"], abs=0.01)
    assert "Horizontal: poa_global (W/m2)" in hourly.columns


def test_preferences_fill_in_preparer_and_paper(tmp_path):
    from PySide6.QtCore import QSettings

    from tiltyard.app import settings

    for fmt in (QSettings.Format.NativeFormat, QSettings.Format.IniFormat):
        QSettings.setPath(fmt, QSettings.Scope.UserScope, str(tmp_path / "settings"))
    settings.save_preferences(settings.Preferences(preparer="Pref Person",
                                                   organisation="Pref Org", paper="letter"))
    out = tmp_path / "pref.pdf"
    rc, stdout, err = _call("sheet", "kelpie-creek-shed", "-o", str(out), "--prepared",
                            "2025-05-12", *FLAGS)
    assert rc == 0, err
    assert "US Letter" in stdout
    reader = pypdf.PdfReader(str(out))
    assert len(reader.pages) in (2, 3)        # the details flow on when they need to
    for page in reader.pages:
        # US Letter, 8.5 x 11 in = 612 x 792 pt: 1 pt
        assert float(page.mediabox.width) == pytest.approx(612.0, abs=1.0)
        assert float(page.mediabox.height) == pytest.approx(792.0, abs=1.0)
    assert "by Pref Person, Pref Org" in _text(out)


def test_runs_without_a_display(tmp_path):
    env = {k: v for k, v in os.environ.items()
           if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    env.update(HOME=str(tmp_path), XDG_CONFIG_HOME=str(tmp_path))
    out = tmp_path / "headless.pdf"
    proc = subprocess.run([sys.executable, "-m", "tiltyard", "sheet", "tarnvik-cabin", "-o",
                           str(out), "--paper", "a4", *FLAGS], capture_output=True, text=True,
                          env=env, timeout=120)
    assert proc.returncode == 0, proc.stderr
    reader = pypdf.PdfReader(str(out))
    assert len(reader.pages) in (2, 3)        # the details flow on when they need to
    # ISO 216 A4, 210 x 297 mm = 595 x 842 pt: 1 pt
    assert float(reader.pages[0].mediabox.width) == pytest.approx(595.0, abs=1.0)
    assert float(reader.pages[0].mediabox.height) == pytest.approx(842.0, abs=1.0)


def _fails(*argv) -> str:
    rc, out, err = _call(*argv)
    assert rc == 2, (rc, out, err)
    assert out == ""
    assert err.count("\n") == 1 and err.startswith("tiltyard: "), err
    return err


def test_unwritable_paths_fail_before_any_work(tmp_path):
    missing = tmp_path / "missing" / "out.pdf"
    err = _fails("sheet", "larkmoor-dairy", "-o", str(missing))
    assert "-o" in err and "does not exist" in err
    assert not missing.parent.exists()
    a_file = tmp_path / "plain.txt"
    a_file.write_text("x", "utf-8")
    err = _fails("sheet", "larkmoor-dairy", "-o", str(a_file / "out.pdf"))
    assert "is not a folder" in err
    err = _fails("sheet", "larkmoor-dairy", "-o", str(tmp_path))
    assert "is a folder" in err
    existing = tmp_path / "existing.pdf"
    existing.write_bytes(b"old sheet")
    err = _fails("sheet", "larkmoor-dairy", "-o", str(existing), "--csv-monthly",
                 str(missing.parent / "m.csv"))
    assert "--csv-monthly" in err
    assert existing.read_bytes() == b"old sheet"
    err = _fails("sheet", "larkmoor-dairy", "-o", str(existing), "--json-out", str(existing))
    assert "the same file" in err
    assert "nothing to write" in _fails("sheet", "larkmoor-dairy")
    err = _fails("sheet", "larkmoor-dairy", "--csv-hourly", str(tmp_path / "h.csv"),
                 "--hourly-options", "sideways")
    assert "'sideways'" in err and "recommended" in err
    assert "only with --csv-hourly" in _fails("sheet", "larkmoor-dairy", "-o", str(existing),
                                              "--hourly-options", "plane")
    assert _listing(tmp_path) == ["existing.pdf", "plain.txt"]
    assert existing.read_bytes() == b"old sheet"


@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0,
                    reason="root may write into a read-only folder")
def test_read_only_folder(tmp_path):
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(0o555)
    try:
        err = _fails("sheet", "larkmoor-dairy", "-o", str(folder / "out.pdf"))
        assert "not writable" in err
        assert _listing(folder) == []
    finally:
        folder.chmod(0o755)


def test_bad_site_leaves_the_existing_file(tmp_path):
    existing = tmp_path / "sheet.pdf"
    existing.write_bytes(b"the client's copy")
    bad = tmp_path / "bad.json"
    bad.write_text('{"format": "tiltyard-site", "format_version": 1, "name": "x", '
                   '"latitude_deg": 123, "longitude_deg": 0}', "utf-8")
    err = _fails("sheet", str(bad), "-o", str(existing), *FLAGS)
    assert "latitude_deg" in err and "123" in err
    broken = tmp_path / "broken.json"
    broken.write_text("{ not json", "utf-8")
    err = _fails("sheet", str(broken), "-o", str(existing), *FLAGS)
    assert "broken.json" in err
    assert existing.read_bytes() == b"the client's copy"
    assert _listing(tmp_path) == ["bad.json", "broken.json", "sheet.pdf"]


def test_a_failed_write_leaves_no_partial_file(tmp_path, monkeypatch):
    existing = tmp_path / "sheet.pdf"
    existing.write_bytes(b"the client's copy")

    def no_disk(_fd):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "fsync", no_disk)
    err = _fails("sheet", "larkmoor-dairy", "-o", str(existing), *PEOPLE, "--paper", "a4",
                 *FLAGS)
    assert "No space left on device" in err and "sheet.pdf" in err
    assert existing.read_bytes() == b"the client's copy"
    assert _listing(tmp_path) == ["sheet.pdf"]             # the temporary file is gone


def test_help_documents_the_sheet_and_its_exports():
    rc, out, _err = _call("sheet", "--help")
    assert rc == 0
    for flag in ("-o FILE.pdf", "--paper", "--preparer", "--organisation", "--csv-monthly",
                 "--csv-hourly", "--csv-options", "--json-out", "--hourly-options", "--sky",
                 "--objective", "--tilt-step"):
        assert flag in out, flag
    rc, out, _err = _call("--help")
    assert rc == 0 and "sheet" in out


def test_an_accepted_weather_warning_stays_on_page_one(tmp_path):
    import pvlib

    tmy3 = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"   # recorded in North Carolina
    pdf = tmp_path / "far.pdf"
    rc, _, err = _call("sheet", "larkmoor-dairy", "-o", str(pdf), "--sky", str(tmy3), *FLAGS)
    assert rc == 2 and "km from the site" in err and "--accept-weather-warnings" in err
    assert not pdf.exists()
    rc, _, err = _call("sheet", "larkmoor-dairy", "-o", str(pdf), "--sky", str(tmy3),
                       "--accept-weather-warnings", *FLAGS)
    assert rc == 0, err
    reader = pypdf.PdfReader(str(pdf))
    page1 = " ".join(reader.pages[0].extract_text().split())
    assert "Weather data warning, accepted by the preparer" in page1
    assert "km from the site" in page1


def test_fifteen_minute_weather_runs_through_study_and_sheet(tmp_path, quarter_hour_weather):
    path, _written, columns = quarter_hour_weather
    flags = ["--sky", str(path), "--columns", ",".join(f"{k}={v}" for k, v in columns),
             "--time-label", "start", "--time-zone", "UTC", "--tilt-step", "5"]
    rc, out, err = _call("study", "larkmoor-dairy", "--json", *flags)
    assert rc == 0, err
    doc = json.loads(out)
    assert doc["study"]["step_min"] == 15 and doc["assessment"]["interval_min"] == 15
    assert doc["assessment"]["basis"]["used"] == "file"
    pdf = tmp_path / "quarter.pdf"
    rc, _, err = _call("sheet", "larkmoor-dairy", "-o", str(pdf), *flags)
    assert rc == 0, err
    assert "15-minute intervals" in _text(pdf)
    # --step only resamples a clear or monthly sky; a weather file keeps its own interval
    rc, _, err = _call("study", "larkmoor-dairy", "--step", "60", *flags)
    assert rc == 2 and "15-minute intervals" in err


def test_study_says_it_uses_the_sites_monthly_values_by_default():
    rc, out, _ = _call("study", "larkmoor-dairy", "--tilt-step", "5")
    assert rc == 0
    assert "Sky basis: on the site's monthly irradiation values" in out
    assert "Clear-sky upper bound for it:" in out and "This roof as it is:" in out
