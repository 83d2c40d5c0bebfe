"""Data exports and the sheet's figures (tiltyard.engine.exports).

Most checks tie the exports to the engine's own results (the study's JSON document,
``schedule_poa``, ``irradiance_year``): every figure that leaves the program must be the
engine's figure. Two checks go to the outside world: the horizontal plane receives the
global horizontal irradiance, and an open horizon costs nothing.
"""

from __future__ import annotations

import io
import json

import numpy as np
import pandas as pd
import pytest

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.exports import (
    SHEET_CAUTIONS,
    check_option_kinds,
    hourly_csv_text,
    hourly_poa_table,
    input_digest,
    monthly_csv_text,
    monthly_table,
    option_horizon_loss,
    options_csv_text,
    options_table,
    select_options,
    sheet_figures,
    study_document,
    study_json_text,
)
from tiltyard.engine.jobs import irradiance_year
from tiltyard.engine.site import Plane, Site
from tiltyard.engine.site_file import site_from_dict, site_to_dict
from tiltyard.engine.skyyear import IrradianceOptions, sky_year
from tiltyard.engine.tilt import StudyOptions, tilt_study
from tiltyard.engine.weather import Finding, WeatherData

COARSE = StudyOptions(tilt_step_deg=5.0)


@pytest.fixture(scope="module")
def lark():
    site = load_demo("larkmoor-dairy")
    study = tilt_study(site, COARSE)
    return site, study, sky_year(site, study.options_used.irradiance)


def test_study_document_is_the_json_of_the_study(lark):
    _site, study, _sky = lark
    doc = study_document(study)
    assert set(doc) == {"study"}                       # no weather on the clear-sky basis
    assert doc["study"] == study.to_json_dict()
    text = study_json_text(study)
    assert text.endswith("}\n")
    assert json.loads(text) == doc
    # exactly what `tiltyard study --json` prints: 2-space indent, UTF-8 kept, one newline
    assert text == json.dumps(doc, indent=2, ensure_ascii=False) + "\n"


def test_monthly_table_is_the_json_documents(lark):
    _site, study, _sky = lark
    d = study.to_json_dict()
    table = monthly_table(study)
    assert list(table.index) == ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug",
                                 "Sep", "Oct", "Nov", "Dec", "Year"]
    assert len(table.columns) == len(d["options"])
    for col, row in zip(table.columns, d["options"], strict=True):
        assert col == f"{row['label']} (kWh/m2)"
        assert table[col].iloc[:12].tolist() == row["monthly_kwh_m2"]
        assert table[col].iloc[12] == row["annual_kwh_m2"]
        # the year is the sum of the months: 12 roundings of 0.0005 kWh/m2 at most
        assert sum(row["monthly_kwh_m2"]) == pytest.approx(row["annual_kwh_m2"], abs=0.006)
    back = pd.read_csv(io.StringIO(monthly_csv_text(study)), index_col=0)
    # the CSV keeps 3 decimals, like the JSON document: 1e-9 kWh/m2
    np.testing.assert_allclose(back.to_numpy(), table.to_numpy(), rtol=0, atol=1e-9)
    assert list(back.columns) == list(table.columns)


def test_options_table_flags_the_recommendation(lark):
    _site, study, _sky = lark
    table = options_table(study)
    assert table["recommended"].sum() == 1
    assert table.loc[table["recommended"], "label"].item() == study.recommended.label
    d = study.to_json_dict()
    for (_i, r), j in zip(table.iterrows(), d["options"], strict=True):
        assert r["gain_vs_horizontal_pct"] == j["gain_vs_horizontal_pct"]
        assert r["adjustments_per_year"] == j["adjustments_per_year"]
    two = table.loc[table["kind"] == "two-season", "schedule"].item()
    assert two.count("..") == 2 and ";" in two
    assert table.loc[table["kind"] == "two-axis", "schedule"].item() == "tracking"
    back = pd.read_csv(io.StringIO(options_csv_text(study)))
    assert back["label"].tolist() == table["label"].tolist()


def test_hourly_series_sum_to_the_annual_figures(lark):
    site, study, sky = lark
    table = hourly_poa_table(sky, site, study.options)
    assert len(table) == 8760                          # hourly non-leap reference year
    assert table.index[0] == "2023-01-01T00:00:00+00:00"   # local midnight, Europe/London
    assert pd.Timestamp(table.index[4000]).utcoffset() == pd.Timedelta(hours=1)  # summer
    for opt in study.options:
        poa = table[f"{opt.label}: poa_global (W/m2)"].to_numpy()
        # interval means x 1 h / 1000 = kWh/m2; the many-plane engine's annual (regression
        # value, schedule_poa's documented identity): 1e-6 relative
        assert poa.sum() / 1000.0 == pytest.approx(opt.annual_kwh_m2, rel=1e-6), opt.label
    two = study.option("two-season")
    tilts = set(np.unique(table[f"{two.label}: surface_tilt (deg)"]))
    assert {p.tilt_deg for p in two.schedule} <= tilts
    text = hourly_csv_text(sky, site, select_options(study, ["recommended", "horizontal"]))
    head = text.splitlines()[0].split(",")
    assert head[0] == "interval_start" and len(head) == 5
    assert len(text.splitlines()) == 8761


def test_horizontal_plane_receives_the_ghi():
    # Perez et al. (1990), Solar Energy 44(5), 271-289, eq. 9: on a horizontal plane the
    # sky diffuse is the DHI (cos aoi / cos zenith = 1 for zenith < 85 deg), the beam is
    # DNI cos Z and nothing is reflected from the ground, so POA = GHI (closure GHI = DNI
    # cos Z + DHI, Duffie & Beckman 2013, sec. 1.8, from memory). Tolerance 1e-6 W/m2.
    site = Site("open field 45N", 45.0, 7.0, 300.0, "Europe/Rome")
    study = tilt_study(site, StudyOptions(tilt_step_deg=10.0))
    sky = sky_year(site, study.options_used.irradiance)
    table = hourly_poa_table(sky, site, [study.option("horizontal")])
    poa = table["Horizontal: poa_global (W/m2)"].to_numpy()
    # intervals whose clear-sky nodes (where the year is transposed) all have zenith < 85
    low = np.zeros(len(sky.sun_up_fraction), dtype=bool)
    low[sky.nodes.interval[sky.nodes.apparent_zenith >= 85.0]] = True
    day = (sky.sun_up_fraction > 0) & ~low
    np.testing.assert_allclose(poa[day], (sky.ghi * sky.sun_up_fraction)[day], rtol=0,
                               atol=1e-6)


def test_horizon_loss_of_a_schedule(lark):
    site, study, sky = lark
    fixed = study.option("fixed-optimal")
    p = fixed.schedule[0]
    loss = option_horizon_loss(sky, site, fixed)
    one = irradiance_year(site, p.tilt_deg, p.azimuth_deg, study.options_used.irradiance)
    # a one-period schedule is one plane: the one-plane job's open and shaded annuals
    # (regression value, same sky and transposition): 1e-9 relative
    assert loss.open_kwh_m2 == pytest.approx(one.annual["poa_open_kwh_m2"], rel=1e-9)
    assert loss.site_kwh_m2 == pytest.approx(one.annual["poa_kwh_m2"], rel=1e-9)
    assert loss.loss_pct == pytest.approx(one.horizon_loss_pct, rel=1e-9)
    rec = option_horizon_loss(sky, site, study.recommended)
    assert rec.site_kwh_m2 == pytest.approx(study.recommended.annual_kwh_m2, rel=1e-6)
    assert 0.0 < rec.loss_pct < 50.0
    # an open horizon costs nothing: the obstructed view factor equals Liu & Jordan's
    # (1 + cos tilt) / 2 (Liu & Jordan 1963, Solar Energy 7(2), 53-74) and the sun is
    # never hidden; tolerance 1e-9 kWh/m2
    open_site = site.with_changes(horizon=type(site.horizon)(), obstacles=())
    open_sky = sky_year(open_site, study.options_used.irradiance)
    nothing = option_horizon_loss(open_sky, open_site, study.option("two-season"))
    assert nothing.loss_kwh_m2 == pytest.approx(0.0, abs=1e-9)


def test_input_digest_is_deterministic_and_sensitive(lark):
    site, study, _sky = lark
    opts = study.options_used
    a = input_digest(site, opts)
    assert len(a) == 64 and int(a, 16) >= 0
    d = site_to_dict(site)
    shuffled = site_from_dict(dict(reversed(list(d.items()))))
    assert input_digest(shuffled, opts) == a                       # key order irrelevant
    assert input_digest(site, StudyOptions(tilt_step_deg=5.0)) == a
    assert input_digest(site.with_changes(latitude_deg=53.72), opts) != a
    assert input_digest(site, StudyOptions(tilt_step_deg=2.0)) != a
    assert input_digest(site, StudyOptions(tilt_step_deg=5.0, objective="worst-month")) != a


def test_select_options_and_kind_errors(lark):
    _site, study, _sky = lark
    assert select_options(study, None) == study.options
    got = select_options(study, ["recommended", "horizontal"])
    assert [o.kind for o in got][0] == "horizontal" and study.recommended in got
    with pytest.raises(ValueError, match="'sideways'.*two-axis or recommended"):
        select_options(study, ["sideways"])
    assert check_option_kinds([" plane "]) == ("plane",)


def test_sheet_figures(lark):
    site, study, sky = lark
    f = sheet_figures(study, sky)
    d = study.to_json_dict()
    assert f.recommended["label"] == d["recommended"] == study.recommended.label
    plane_rows = [r for r in d["options"] if r["kind"] == "plane"]
    assert len(f.gains_over_planes) == len(site.planes) == len(plane_rows)
    for (label, g), r in zip(f.gains_over_planes, plane_rows, strict=True):
        assert label == r["label"]
        # the same formula as TiltStudy.gain_pct on the JSON values (regression value)
        assert g == pytest.approx(100.0 * (f.recommended["annual_kwh_m2"]
                                           / r["annual_kwh_m2"] - 1.0), abs=5e-4)
    heads = [h for h, _t in f.assumptions]
    for need in ("Sky basis", "Solar position", "Clear sky", "Transposition",
                 "Solar constant", "Turbidity", "Albedo", "Time convention", "Weather data"):
        assert need in heads
    text = dict(f.assumptions)
    assert "upper bound" in text["Sky basis"]
    assert "Reda" in text["Solar position"] and "Perez" in text["Transposition"]
    assert "1361 W/m²" in text["Solar constant"]
    assert text["Turbidity"] == sky.turbidity_source
    assert f.cautions == SHEET_CAUTIONS
    joined = " ".join(f.cautions)
    for words in ("preliminary feasibility estimate", "not a design", "roof access",
                  "licensed installers", "fire safety", "varies from year to year"):
        assert words in joined.lower()
    assert f.short_digest == input_digest(site, study.options_used)[:12]
    assert f.short_digest in f.reproducibility and f.version in f.reproducibility


def test_weather_file_basis_in_the_document_and_assumptions():
    site = Site("open 40N", 40.0, -105.0, 1600.0, "Etc/GMT+7",
                planes=(Plane("roof", 20.0, 180.0),))
    idx = pd.date_range("2023-01-01 07:00", periods=8760, freq="60min", tz="UTC")
    # invented demo data (a smooth GHI-only year) to exercise the weather path, not a check
    # value: the checks are on the words and the document's structure
    hours = (idx.hour.to_numpy() - 7) % 24
    ghi = np.clip(600.0 * np.sin(np.pi * (hours - 6.0) / 12.0), 0.0, None)
    findings = tuple(Finding("gap", "warning", f"gap {i}: 3 hours missing", 40 + i)
                     for i in range(6))
    weather = WeatherData(pd.DataFrame({"ghi": ghi}, index=pd.DatetimeIndex(
        idx, name="interval_start")), 60, "demo.csv (CSV)", "start", findings)
    opts = StudyOptions(irradiance=IrradianceOptions(sky="file", weather=weather),
                        tilt_step_deg=10.0)
    study = tilt_study(site, opts)
    doc = study_document(study)
    assert doc["weather"]["source"] == "demo.csv (CSV)"
    assert len(doc["weather"]["findings"]) == 6
    f = sheet_figures(study)
    text = dict(f.assumptions)["Weather data"]
    assert "demo.csv" in text and "6 warnings" in text and "(line 40)" in text
    assert "and 2 more" in text
    assert "Clear sky" not in dict(f.assumptions)
    assert "Erbs" in dict(f.assumptions)["Beam and diffuse"]
    # the weather series is part of the digest
    other = WeatherData(weather.data * 0.5, 60, "demo.csv (CSV)", "start", findings)
    opts2 = StudyOptions(irradiance=IrradianceOptions(sky="file", weather=other),
                         tilt_step_deg=10.0)
    assert input_digest(site, opts) != input_digest(site, opts2)
