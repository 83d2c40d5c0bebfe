"""The batch engine: reading a portfolio (bad rows reported with line, field and reason in
the site checks' words), one results row per site equal to the single-site assessment's
figures, chunked and resumable writing."""

from __future__ import annotations

import csv
import json

import pandas as pd
import pytest

from tiltyard.engine.assess import assess
from tiltyard.engine.assessment import Assessment, demo_assessment
from tiltyard.engine.batch.inputs import PortfolioError, read_portfolio
from tiltyard.engine.batch.results import (
    portfolio_summary,
    read_results,
    result_columns,
    row_assessment,
)
from tiltyard.engine.batch.run import (
    chunk_folder,
    errors_path,
    plan_jobs,
    planned_hash,
    run_batch,
)
from tiltyard.engine.exports import sheet_figures
from tiltyard.engine.site import Plane, Site, SiteError
from tiltyard.engine.site_file import site_from_dict

HEADER = ("id,name,latitude_deg,longitude_deg,elevation_m,timezone,albedo,"
          "plane1_tilt_deg,plane1_azimuth_deg,plane1_mounting\n")


def _csv(tmp_path, lines, header=HEADER, name="sites.csv"):
    p = tmp_path / name
    p.write_text(header + "".join(line + "\n" for line in lines), encoding="utf-8")
    return p


def _site_error(**kw) -> SiteError:
    """The single-site check's error for the same values (the words a row must use)."""
    args = {"name": "x", "latitude_deg": 50.0, "longitude_deg": 0.0, "timezone": "UTC"}
    args.update(kw)
    with pytest.raises(SiteError) as info:
        Site(**args)
    return info.value


def _plane_error(**kw) -> SiteError:
    args = {"label": "p", "tilt_deg": 30.0, "azimuth_deg": 180.0}
    args.update(kw)
    with pytest.raises(SiteError) as info:
        Plane(**args)
    return info.value


def test_every_bad_row_is_reported_with_line_field_and_the_site_checks_words(tmp_path):
    p = _csv(tmp_path, [
        "a,Good roof,51.5,-1.2,80,Europe/London,0.2,30,180,flush",     # line 2
        "b,Too far north,95,-1.2,80,Europe/London,0.2,30,180,flush",   # line 3
        "c,Decimal comma,\"51,5\",-1.2,80,Europe/London,0.2,,,",        # line 4
        ",,51.5,-1.2,80,Europe/London,0.2,,,",                         # line 5: no name
        "",                                                            # blank: skipped
        "e,Steep,51.5,-1.2,80,Europe/London,0.2,120,180,flush",        # line 7
        "f,Odd mount,51.5,-1.2,80,Europe/London,0.2,30,180,tracker",   # line 8
        "g,Bad zone,51.5,-1.2,80,Mars/Olympus,0.2,,,",                 # line 9
        "h,Bright ground,51.5,-1.2,80,Europe/London,1.5,,,",           # line 10
        "i,Good field,40.4,-3.7,650,,0.25,,,",                         # line 11 (zone looked up)
    ])
    port = read_portfolio(p)
    assert [r.line for r in port.rows] == [2, 11]
    got = {e.line: e for e in port.errors}
    assert sorted(got) == [3, 4, 5, 7, 8, 9, 10]
    assert (got[3].field, got[3].reason) == ("latitude_deg",
                                             _site_error(latitude_deg=95.0).reason)
    assert (got[4].field, got[4].value) == ("latitude_deg", "51,5")
    assert got[4].reason == _site_error(latitude_deg="51,5").reason
    # a site file without a name: the same words
    with pytest.raises(SiteError) as no_name:
        site_from_dict({"format": "tiltyard-site", "format_version": 2, "latitude_deg": 1,
                        "longitude_deg": 1})
    assert (got[5].field, got[5].reason) == (no_name.value.field, no_name.value.reason)
    assert (got[7].field, got[7].reason) == ("plane1_tilt_deg",
                                             _plane_error(tilt_deg=120.0).reason)
    assert (got[8].field, got[8].reason) == ("plane1_mounting",
                                             _plane_error(mounting="tracker").reason)
    assert (got[9].field, got[9].reason) == ("timezone",
                                             _site_error(timezone="Mars/Olympus").reason)
    assert (got[10].field, got[10].reason) == ("albedo", _site_error(albedo=1.5).reason)
    field_row = port.rows[1]
    # Madrid's zone for a point near it (common practice, no source: the IANA zone of
    # mainland Spain)
    assert field_row.assessment.site.timezone == "Europe/Madrid"
    assert any("looked up" in n for n in field_row.notes)


def test_monthly_ghi_columns_map_back_to_the_column_named(tmp_path):
    months = ("jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov",
              "dec")
    header = "name,latitude_deg,longitude_deg,timezone," + ",".join(
        f"ghi_{m}_kwh_m2_day" for m in months) + "\n"
    good = [0.8, 1.5, 2.6, 3.9, 5.0, 5.4, 5.2, 4.4, 3.1, 1.9, 1.0, 0.6]
    bad = list(good)
    bad[6] = -2
    p = _csv(tmp_path, ["Good,52,0,Europe/London," + ",".join(map(str, good)),
                        "Bad,52,0,Europe/London," + ",".join(map(str, bad))], header=header)
    port = read_portfolio(p)
    assert port.rows[0].assessment.site.monthly_ghi_kwh_m2_day == tuple(good)
    (err,) = port.errors
    assert (err.line, err.field) == (3, "ghi_jul_kwh_m2_day")
    ref = _site_error(monthly_ghi_kwh_m2_day=tuple(float(v) for v in bad))
    assert err.reason == ref.reason


@pytest.mark.parametrize("text, words", [
    ("name,latitude_deg\nA,50\n", "'longitude_deg' is required"),
    ("name,latitude_deg,longitude_deg,colour\nA,50,0,red\n", "'colour' is not one"),
    ("", "no header row"),
    ("name,latitude_deg,longitude_deg,ghi_jan_kwh_m2_day\nA,50,0,1\n", "all twelve"),
])
def test_an_unreadable_input_is_one_error_naming_the_file(tmp_path, text, words):
    p = tmp_path / "p.csv"
    p.write_text(text, encoding="utf-8")
    with pytest.raises(PortfolioError, match=words) as info:
        read_portfolio(p)
    assert str(p) in str(info.value)


def test_an_input_of_another_kind_or_missing_is_unreadable(tmp_path):
    (tmp_path / "x.txt").write_text("hello", encoding="utf-8")
    with pytest.raises(PortfolioError, match="not a portfolio"):
        read_portfolio(tmp_path / "x.txt")
    with pytest.raises(PortfolioError, match="no such file"):
        read_portfolio(tmp_path / "none.csv")
    (tmp_path / "f.geojson").write_text('{"type": "Feature"}', encoding="utf-8")
    with pytest.raises(PortfolioError, match="FeatureCollection"):
        read_portfolio(tmp_path / "f.geojson")


def test_geojson_points_and_a_bad_feature(tmp_path):
    doc = {"type": "FeatureCollection", "features": [
        {"type": "Feature", "geometry": {"type": "Point", "coordinates": [-1.5, 53.8, 120]},
         "properties": {"name": "Shed", "timezone": "Europe/London",
                        "planes": [{"tilt_deg": 25, "azimuth_deg": 170}]}},
        {"type": "Feature", "geometry": {"type": "Point", "coordinates": [-1.5, 95]},
         "properties": {"name": "Pole"}},
        {"type": "Feature", "geometry": {"type": "LineString", "coordinates": []},
         "properties": {"name": "Line"}},
    ]}
    p = tmp_path / "p.geojson"
    p.write_text(json.dumps(doc), encoding="utf-8")
    port = read_portfolio(p)
    (row,) = port.rows
    assert (row.assessment.site.elevation_m, row.assessment.site.planes[0].tilt_deg) == (120, 25)
    errs = {e.line: e for e in port.errors}
    assert errs[2].field == "geometry.coordinates"
    assert errs[2].reason == _site_error(latitude_deg=95.0).reason
    assert errs[3].field == "geometry"


def test_a_folder_of_site_files_keeps_each_files_settings(tmp_path):
    src = demo_assessment("larkmoor-dairy")
    from tiltyard.engine.assessment import save_assessment

    save_assessment(src, tmp_path / "a.json")
    (tmp_path / "b.json").write_text('{"format": "tiltyard-site", "format_version": 1, '
                                     '"name": "x", "latitude_deg": 200, "longitude_deg": 0}',
                                     encoding="utf-8")
    port = read_portfolio(tmp_path)
    assert [r.source for r in port.rows] == ["a.json"]
    assert port.rows[0].assessment == src
    (err,) = port.errors
    assert (err.source, err.field) == ("b.json", "latitude_deg")


def _read_results(path):
    if str(path).endswith(".parquet"):
        return pd.read_parquet(path)
    return pd.read_csv(path)


@pytest.mark.parametrize("name", ["r.csv", "r.parquet"])
def test_results_are_the_single_site_figures(tmp_path, name):
    demo = demo_assessment("larkmoor-dairy")          # flush roof, monthly basis, one plane
    site = demo.site
    p = tmp_path / "one.csv"
    with open(p, "w", encoding="utf-8", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["name", "latitude_deg", "longitude_deg", "elevation_m", "timezone",
                    "albedo", "plane1_label", "plane1_tilt_deg", "plane1_azimuth_deg"])
        w.writerow([site.name, repr(site.latitude_deg), repr(site.longitude_deg),
                    repr(site.elevation_m), site.timezone, site.albedo, site.planes[0].label,
                    repr(site.planes[0].tilt_deg), repr(site.planes[0].azimuth_deg)])
    port = read_portfolio(p)
    jobs, errs = plan_jobs(port.rows)
    assert not errs
    summary = run_batch(jobs, [], tmp_path / name, port.max_planes)
    assert (summary.succeeded, summary.failed, summary.rows_written) == (1, 0, 1)
    (row,) = _read_results(tmp_path / name).to_dict("records")
    # the same site through the single-site entry point
    single = Assessment(port.rows[0].assessment.site)
    result = assess(single)
    d = result.study().to_json_dict()
    by_kind = {r["kind"]: r for r in d["options"]}
    assert row["basis"] == result.basis.kind == "clear"
    assert row["recommended"] == d["recommended"]
    assert row["fixed_optimal_annual_kwh_m2"] == by_kind["fixed-optimal"]["annual_kwh_m2"]
    assert row["plane1_annual_kwh_m2"] == by_kind["plane"]["annual_kwh_m2"]
    assert row["plane1_gain_vs_best_plane_pct"] == by_kind["plane"]["gain_vs_fixed_optimal_pct"]
    assert row["horizontal_gain_vs_horizontal_pct"] == 0.0
    assert row["best_tilt_deg"] == by_kind["fixed-optimal"]["schedule"][0]["tilt_deg"]
    loss = result.option_horizon_loss(result.study().recommended)
    assert row["horizon_loss_pct"] == loss.loss_pct
    fig = sheet_figures(result.study(), result.sky, result)
    assert row["inputs_hash"] == fig.digest                  # the sheet's fingerprint
    assert row["inputs_hash"] == planned_hash(single)
    rec_kind = by_kind[row["recommended_kind"]]
    assert (row["plane1_weakest_month"], row["plane1_weakest_month_kwh_m2"]) == \
        fig.weakest_month == (fig.weakest_month[0], rec_kind["monthly_kwh_m2"][
            fig.weakest_month[0] - 1])
    yields = {y["kind"]: y["annual_kwh_kwp"] for y in d["specific_yield"]["options"]}
    assert row["recommended_kwh_kwp"] == yields[row["recommended_kind"]]
    assert pd.isna(row["two_season_annual_kwh_m2"])          # a flush roof: not allowed
    assert "not a design" in row["caution"]
    # the row opens as the site it was made from (the app's double-click)
    assert planned_hash(row_assessment(row)) == row["inputs_hash"]
    typed = read_results(tmp_path / name)
    assert typed["two_season_schedule"].tolist() == [""]
    summary_ = portfolio_summary(tmp_path / name, bins=4)
    assert sum(summary_.counts) == 1 and len(summary_.edges_kwh_m2) == 5
    assert not chunk_folder(tmp_path / name).exists()
    assert errors_path(tmp_path / name).read_text(encoding="utf-8").splitlines() == [
        "line,source,field,value,reason"]


def _portfolio(tmp_path, n):
    lines = [f"s{i},Roof {i},{50 + i * 0.1:.2f},{-2 + i * 0.1:.2f},50,Europe/London,0.2,"
             f"{20 + i},{170 + i},fixed-rack" for i in range(n)]
    return read_portfolio(_csv(tmp_path, lines))


def test_resume_skips_the_rows_already_in_a_chunk_and_writes_each_once(tmp_path):
    port = _portfolio(tmp_path, 5)
    jobs, _ = plan_jobs(port.rows)
    out = tmp_path / "r.csv"
    # a first run stopped after its second site, with chunks of one site
    calls = []

    def stop_after_two(state):
        calls.append(state.done)
        if state.done == 2:
            raise KeyboardInterrupt
    with pytest.raises(KeyboardInterrupt):
        run_batch(jobs, [], out, port.max_planes, chunk_size=1, progress=stop_after_two)
    assert not out.exists() and len(list(chunk_folder(out).iterdir())) == 2
    summary = run_batch(jobs, [], out, port.max_planes, resume=True, chunk_size=2)
    assert (summary.skipped, summary.ran, summary.rows_written) == (2, 3, 5)
    df = pd.read_csv(out)
    assert sorted(df["line"]) == [2, 3, 4, 5, 6]
    assert df["inputs_hash"].is_unique
    # a resumed run of a finished batch runs nothing and keeps every row
    again = run_batch(jobs, [], out, port.max_planes, resume=True)
    assert (again.skipped, again.ran, again.rows_written) == (5, 0, 5)
    assert pd.read_csv(out).equals(df)
    # without --resume the chunks of a stopped run are not reused
    fresh = run_batch(jobs[:2], [], out, port.max_planes)
    assert (fresh.skipped, fresh.ran, fresh.rows_written) == (0, 2, 2)


def test_a_row_the_basis_refuses_and_a_repeated_row_are_errors(tmp_path):
    port = _portfolio(tmp_path, 2)
    rows = list(port.rows)
    rows.append(rows[0])                                       # the same site again
    rows.append(rows[1].__class__(9, "x.csv", rows[1].key,
                                  rows[1].assessment.with_changes(sky="monthly")))
    jobs, errors = plan_jobs(rows)
    assert len(jobs) == 2
    by_line = {e.line: e for e in errors}
    assert "the same site and settings as line 2" in by_line[2].reason
    assert by_line[9].field == "sky" and "no monthly GHI values" in by_line[9].reason


def test_result_columns_are_fixed_by_the_most_planes():
    names = [c for c, _ in result_columns(2)]
    assert "plane2_annual_kwh_m2" in names and "plane3_annual_kwh_m2" not in names
    assert names[:4] == ["line", "source", "id", "name"] and names[-1] == "site_file"
    assert len(names) == len(set(names))


def test_stale_temporary_files_of_killed_runs_are_swept_from_a_chunk_folder(tmp_path):
    import os
    import subprocess
    import sys

    from tiltyard.engine.atomic_files import remove_stale_temps_in

    dead = subprocess.run([sys.executable, "-c", "import os; print(os.getpid())"],
                          capture_output=True, text=True, check=True)
    dead_pid = int(dead.stdout)                   # a process that has ended
    stale = tmp_path / f".chunk-000003.csv.tiltyard-{dead_pid}-abc123.tmp"
    live = tmp_path / f".chunk-000004.csv.tiltyard-{os.getpid()}-def456.tmp"
    other = tmp_path / ".chunk-000005.csv.someone-else.tmp"
    for p in (stale, live, other):
        p.write_text("part", encoding="utf-8")
    assert remove_stale_temps_in(tmp_path) == [stale]
    assert live.exists() and other.exists()
