"""``tiltyard batch``: exit statuses 0/3/2, the errors file, the study flags on every site,
--json, --sheets, a local process pool, a Dask LocalCluster in this process, and a sample
of the demo portfolio end to end (the whole portfolio runs in tests/faults)."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import pandas as pd
import pytest

from tiltyard.app.cli import main

DEMO = Path(__file__).resolve().parents[2] / "sample_sites" / "portfolio"
HEADER = "id,name,latitude_deg,longitude_deg,elevation_m,timezone,albedo\n"
GOOD = ["a,Roof A,51.5,-1.2,80,Europe/London,0.2", "b,Yard B,40.4,-3.7,650,,0.25"]


def _run(capsys, *argv):
    rc = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return rc, out, err


def _csv(tmp_path, lines, name="sites.csv"):
    p = tmp_path / name
    p.write_text(HEADER + "".join(line + "\n" for line in lines), encoding="utf-8")
    return p


def _errors(path) -> list[dict]:
    with open(str(path) + ".errors.csv", encoding="utf-8", newline="") as fh:
        return list(csv.DictReader(fh))


def test_every_row_done_is_exit_0_with_a_json_summary(tmp_path, capsys):
    p = _csv(tmp_path, GOOD)
    out = tmp_path / "r.csv"
    rc, stdout, _ = _run(capsys, "batch", p, "-o", out, "--workers", "0", "--json",
                         "--mounting", "fixed-rack", "--tilt-range", "10:50")
    assert rc == 0
    doc = json.loads(stdout)
    assert (doc["sites"], doc["succeeded"], doc["failed"], doc["rows_written"]) == (2, 2, 0, 2)
    assert "not a design" in doc["caution"]
    df = pd.read_csv(out)
    assert list(df["id"]) == ["a", "b"] or sorted(df["id"]) == ["a", "b"]
    assert set(df["mounting"]) == {"fixed-rack"}                 # the flag on every site
    assert df["best_tilt_deg"].between(10, 50).all()             # so is the tilt range
    assert df["row_pitch_m"].notna().all() and df["row_gcr"].notna().all()
    assert _errors(out) == []


def test_some_rows_failed_is_exit_3_and_every_bad_row_is_in_the_errors_file(tmp_path, capsys):
    p = _csv(tmp_path, GOOD + ["c,North,95,0,0,UTC,0.2", "d,Zone,50,0,0,Nowhere/Land,0.2"])
    out = tmp_path / "r.csv"
    rc, stdout, _ = _run(capsys, "batch", p, "-o", out, "--workers", "0")
    assert rc == 3
    assert "2 rows failed" in stdout
    errs = _errors(out)
    assert [(e["line"], e["field"]) for e in errs] == [("4", "latitude_deg"), ("5", "timezone")]
    assert len(pd.read_csv(out)) == 2


@pytest.mark.parametrize("args, words", [
    (["missing.csv", "-o", "r.csv"], "missing.csv: no such file"),
    (["sites.csv", "-o", "r.txt"], "must be a .csv or a .parquet"),
    (["sites.csv", "-o", "sites.csv"], "would replace an input"),
    (["sites.csv", "-o", "r.csv", "--tilt-step", "0"], "--tilt-step"),
    (["sites.csv", "-o", "nofolder/r.csv"], "does not exist"),
    (["bad.csv", "-o", "r.csv"], "'colour' is not one"),
])
def test_an_unusable_input_or_option_is_exit_2_in_one_line(tmp_path, capsys, monkeypatch,
                                                           args, words):
    monkeypatch.chdir(tmp_path)
    _csv(tmp_path, GOOD)
    (tmp_path / "bad.csv").write_text("name,latitude_deg,longitude_deg,colour\n",
                                      encoding="utf-8")
    rc, _, err = _run(capsys, "batch", *args, "--workers", "0")
    assert rc == 2
    assert words in err and len(err.strip().splitlines()) == 1
    assert not (tmp_path / "r.csv").exists()


def test_an_output_over_a_site_file_of_an_input_folder_is_refused(tmp_path, capsys):
    folder = tmp_path / "sites"
    folder.mkdir()
    (folder / "one.json").write_text(json.dumps({
        "format": "tiltyard-site", "format_version": 1, "name": "x", "latitude_deg": 50,
        "longitude_deg": 0, "timezone": "UTC"}), encoding="utf-8")
    weather = tmp_path / "w.csv"
    weather.write_text("x\n", encoding="utf-8")
    rc, _, err = _run(capsys, "batch", folder, "-o", weather, "--sky", weather,
                      "--columns", "ghi=x")
    assert rc == 2 and "would replace an input" in err


def test_a_local_process_pool_and_sheets(tmp_path, capsys):
    p = _csv(tmp_path, GOOD[:1] + ["c,Roof C,53.4,-2.2,40,Europe/London,0.2"])
    out, sheets = tmp_path / "r.parquet", tmp_path / "sheets"
    rc, stdout, _ = _run(capsys, "batch", p, "-o", out, "--workers", "2", "--sheets", sheets,
                         "--json")
    assert rc == 0
    doc = json.loads(stdout)
    assert doc["executor"] == "processes" and doc["workers"] == 2
    df = pd.read_parquet(out)
    assert sorted(df["id"]) == ["a", "c"]
    pdfs = sorted(sheets.glob("*.pdf"))
    assert [f.name.split("-")[0] for f in pdfs] == ["a", "c"]
    assert all(f.read_bytes().startswith(b"%PDF") for f in pdfs)


def test_the_batch_on_a_dask_local_cluster(tmp_path, capsys):
    distributed = pytest.importorskip("distributed")
    rows = list(csv.reader(open(DEMO / "sites.csv", encoding="utf-8")))
    sample = tmp_path / "sample.csv"
    with open(sample, "w", encoding="utf-8", newline="") as fh:
        csv.writer(fh).writerows(rows[:7])                       # six demo sites
    out = tmp_path / "r.csv"
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False,
                                  dashboard_address=None) as cluster:
        rc, stdout, _ = _run(capsys, "batch", sample, "-o", out, "--scheduler",
                             cluster.scheduler_address, "--json")
    assert rc == 0
    doc = json.loads(stdout)
    assert (doc["executor"], doc["workers"], doc["rows_written"]) == ("dask", 2, 6)
    # the same figures as on this process
    local = tmp_path / "local.csv"
    assert _run(capsys, "batch", sample, "-o", local, "--workers", "0")[0] == 0
    a = pd.read_csv(out).sort_values("line").reset_index(drop=True)
    b = pd.read_csv(local).sort_values("line").reset_index(drop=True)
    pd.testing.assert_frame_equal(a, b)


def test_a_sample_of_the_demo_portfolio_end_to_end(tmp_path, capsys):
    """The first 60 rows of the demo portfolio (three bad on purpose); the whole one runs
    in tests/faults/test_portfolio_demo.py."""
    rows = list(csv.reader(open(DEMO / "sites.csv", encoding="utf-8")))
    sample = tmp_path / "sample.csv"
    with open(sample, "w", encoding="utf-8", newline="") as fh:
        csv.writer(fh).writerows(rows[:61])
    out = tmp_path / "r.csv"
    rc, _, _ = _run(capsys, "batch", sample, "-o", out, "--workers", "2")
    assert rc == 3
    assert [(e["line"], e["field"]) for e in _errors(out)] == [
        ("9", "latitude_deg"), ("33", "longitude_deg"), ("60", "name")]
    df = pd.read_csv(out)
    assert len(df) == 57 and df["inputs_hash"].is_unique
    assert df["recommended_annual_kwh_m2"].gt(0).all()


def test_the_demo_geojson(tmp_path, capsys):
    out = tmp_path / "g.csv"
    rc, _, _ = _run(capsys, "batch", DEMO / "sites.geojson", "-o", out, "--workers", "0")
    assert rc == 3
    (err,) = _errors(out)
    assert (err["line"], err["field"]) == ("12", "geometry.coordinates")
    assert len(pd.read_csv(out)) == 11


class _Stream:
    def __init__(self, tty: bool):
        import io

        self.buf, self.tty = io.StringIO(), tty

    def isatty(self):
        return self.tty

    def write(self, text):
        return self.buf.write(text)

    def flush(self):
        pass


def test_progress_is_a_bar_on_a_terminal_and_plain_lines_otherwise():
    from tiltyard.app.cli_batch import _Progress
    from tiltyard.engine.batch.run import BatchProgress

    for tty in (True, False):
        stream = _Stream(tty)
        progress = _Progress(10, every=4, stream=stream)
        state = BatchProgress(total=10, skipped=2, failed=1, refused=1)
        for _ in range(7):
            state.done += 1
            progress(state)
        progress.close()
        text = stream.buf.getvalue()
        if tty:                                    # tqdm: count, rate and the failures
            assert "10/10" in text and "site/s" in text and "failed=1" in text
        else:
            lines = text.splitlines()
            assert lines == [line for line in lines if line.startswith("tiltyard batch: ")]
            assert len(lines) == 2 and lines[-1].startswith("tiltyard batch: 10/10 sites, "
                                                            "1 failed")
