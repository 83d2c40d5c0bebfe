"""Tests for the ``tiltyard`` command line (tiltyard.app.cli).

The contract is DESIGN.md's: exit status 0 done, 2 bad input or usage with one line on
stderr naming file, field and reason, 1 an internal fault; ``--json`` documents with the
listed keys. Most runs are in-process through ``main``; a few go through a real
``python -m tiltyard`` process to check the exit status the shell sees.
"""

from __future__ import annotations

import datetime as dt
import json
import math
import subprocess
import sys
from importlib.metadata import version
from pathlib import Path
from zoneinfo import ZoneInfo

import numpy as np
import pandas as pd
import pvlib
import pytest

from tiltyard.app.cli import main
from tiltyard.engine.demo_sites import demo_site_names, load_demo

DEMOS = demo_site_names()
MIDSUMMER = "2023-06-21"
MIDWINTER = "2023-12-21"
#: Solar declination at the June solstice of 2023, deg (obliquity of the ecliptic about
#: 23.44 deg; from memory). Within 0.01 deg all day on 21 June.
DECL_JUNE_DEG = 23.44

SUN_KEYS = {"date", "timezone", "sunrise", "sunset", "solar_noon", "day_length_h",
            "max_elevation_deg", "polar", "path"}
PATH_KEYS = {"time", "azimuth_deg", "elevation_deg", "visible"}
IRRADIANCE_KEYS = {"site", "year", "model", "sky", "solar_constant_w_m2", "monthly", "annual"}
MONTHLY_KEYS = {"extraterrestrial_horizontal_kwh_m2", "ghi_kwh_m2", "poa_kwh_m2",
                "poa_beam_kwh_m2", "poa_sky_diffuse_kwh_m2", "poa_ground_kwh_m2",
                "horizon_loss_kwh_m2"}


def _run(capsys, *argv):
    """Run the command line in-process; returns (exit status, stdout, stderr)."""
    rc = main(list(argv))
    out, err = capsys.readouterr()
    return rc, out, err


def _json(capsys, *argv) -> dict:
    rc, out, err = _run(capsys, *argv)
    assert rc == 0, err
    assert err == ""
    return json.loads(out)


def _local_time(text, tz: str) -> dt.datetime | None:
    """Parse an ISO 8601 time that must carry the zone's own offset (or be null)."""
    if text is None:
        return None
    t = dt.datetime.fromisoformat(text)
    assert t.utcoffset() is not None, text  # ISO 8601 with offset (DESIGN.md)
    # the offset is the zone's at that instant (IANA tz database through zoneinfo)
    assert t.astimezone(ZoneInfo(tz)).utcoffset() == t.utcoffset(), text
    return t


@pytest.fixture(scope="module")
def sun_docs():
    """``sun DEMO --date 2023-06-21 --json`` for every demo site, run once."""
    import contextlib
    import io

    docs = {}
    for name in DEMOS:
        buf = io.StringIO()
        with contextlib.redirect_stdout(buf):
            rc = main(["sun", name, "--date", MIDSUMMER, "--json"])
        assert rc == 0
        docs[name] = json.loads(buf.getvalue())["sun"]
    return docs


# -- basics ---------------------------------------------------------------------------

def test_version(capsys):
    rc, out, _ = _run(capsys, "--version")
    assert rc == 0
    assert out.strip() == f"tiltyard {version('tiltyard')}"


def test_help_returns_zero(capsys):
    rc, out, _ = _run(capsys, "--help")
    assert rc == 0
    assert "sun" in out and "irradiance" in out


def test_sites_lists_every_demo(capsys):
    rc, out, err = _run(capsys, "sites")
    assert rc == 0 and err == ""
    for name in DEMOS:
        assert name in out
    assert "deg" in out and "elev m" in out  # units in the table header
    doc = _json(capsys, "sites", "--json")
    assert [r["name"] for r in doc["sites"]] == DEMOS
    assert doc["sites"][0]["latitude_deg"] == load_demo(DEMOS[0]).latitude_deg


# -- sun --------------------------------------------------------------------------------

@pytest.mark.parametrize("name", DEMOS)
def test_sun_json_has_the_design_keys(sun_docs, name):
    doc = sun_docs[name]
    site = load_demo(name)
    assert SUN_KEYS <= set(doc)
    assert doc["date"] == MIDSUMMER
    assert doc["timezone"] == site.timezone
    rise = _local_time(doc["sunrise"], site.timezone)
    noon = _local_time(doc["solar_noon"], site.timezone)
    sset = _local_time(doc["sunset"], site.timezone)
    assert noon is not None and noon.date().isoformat() == MIDSUMMER
    assert doc["polar"] in ("day", "night", None)
    assert isinstance(doc["day_length_h"], float) and isinstance(doc["max_elevation_deg"], float)
    if doc["polar"] is None:
        assert rise < noon < sset
        assert doc["day_length_h"] == pytest.approx((sset - rise).total_seconds() / 3600,
                                                     abs=1e-3)
    else:
        assert rise is None and sset is None
    assert isinstance(doc["path"], list) and doc["path"]
    for p in doc["path"]:
        assert set(p) == PATH_KEYS
        _local_time(p["time"], site.timezone)
        assert 0.0 <= p["azimuth_deg"] <= 360.0
        assert -1.0 <= p["elevation_deg"] <= 90.0
        assert isinstance(p["visible"], bool)


@pytest.mark.parametrize("name", DEMOS)
def test_sun_noon_elevation_on_the_solstice(sun_docs, name):
    lat = load_demo(name).latitude_deg
    # Duffie & Beckman (2013) eq. 1.6.5 at solar noon: elevation = 90 - |lat - decl|;
    # tolerance 0.05 deg (refraction above 30 deg elevation is under 0.03 deg, Bennett 1982)
    assert sun_docs[name]["max_elevation_deg"] == pytest.approx(
        90.0 - abs(lat - DECL_JUNE_DEG), abs=0.05)


@pytest.mark.parametrize("name", [n for n in DEMOS if n != "tarnvik-cabin"])
def test_sun_day_length_on_the_solstice(sun_docs, name):
    phi, dec = math.radians(load_demo(name).latitude_deg), math.radians(DECL_JUNE_DEG)
    # sunrise equation with h0 = -0.8333 deg (refraction 34' plus the sun's semi-diameter
    # 16'): cos H0 = (sin h0 - sin phi sin d) / (cos phi cos d), day = 2 H0 / 15 deg/h
    # (Meeus, Astronomical Algorithms 2nd ed. 1998, eq. 15.1; from memory).
    # Tolerance 0.01 h (36 s): the declination hardly changes on the solstice.
    cos_h0 = ((math.sin(math.radians(-0.8333)) - math.sin(phi) * math.sin(dec))
              / (math.cos(phi) * math.cos(dec)))
    expected_h = 2.0 * math.degrees(math.acos(cos_h0)) / 15.0
    assert sun_docs[name]["day_length_h"] == pytest.approx(expected_h, abs=0.01)


def test_sun_offsets_of_half_and_quarter_hour_zones(sun_docs):
    # Asia/Colombo is UTC+05:30 and Asia/Kathmandu UTC+05:45 (IANA tz database)
    assert sun_docs["coral-lane-clinic"]["solar_noon"].endswith("+05:30")
    assert sun_docs["gorkha-terrace"]["solar_noon"].endswith("+05:45")
    # Europe/London keeps summer time in June: UTC+01:00 (IANA tz database)
    assert sun_docs["larkmoor-dairy"]["sunrise"].endswith("+01:00")


def test_polar_day_at_the_arctic_cabin(sun_docs):
    doc = sun_docs["tarnvik-cabin"]
    assert doc["polar"] == "day"
    assert doc["sunrise"] is None and doc["sunset"] is None
    assert doc["day_length_h"] == 24.0
    lowest = min(p["elevation_deg"] for p in doc["path"])
    # lowest sun at the lower transit: lat + decl - 90 = 3.09 deg (Duffie & Beckman 2013,
    # eq. 1.6.5 with hour angle 180 deg) plus refraction about 0.23 deg at that height
    # (Bennett 1982); tolerance 0.3 deg for refraction and the 10-min sampling
    lat = load_demo("tarnvik-cabin").latitude_deg
    assert lowest == pytest.approx(lat + DECL_JUNE_DEG - 90.0 + 0.23, abs=0.3)


def test_polar_night_at_the_arctic_cabin(capsys):
    doc = _json(capsys, "sun", "tarnvik-cabin", "--date", MIDWINTER, "--json")["sun"]
    assert doc["polar"] == "night"
    assert doc["sunrise"] is None and doc["sunset"] is None
    assert doc["day_length_h"] == 0.0
    assert doc["path"] == []
    _local_time(doc["solar_noon"], "Europe/Oslo")
    # noon elevation 90 - (lat + |decl|) = -3.09 deg with decl = -23.44 deg on 21 December
    # (Duffie & Beckman 2013, eq. 1.6.5; no refraction below -0.83 deg in SPA); 0.05 deg
    lat = load_demo("tarnvik-cabin").latitude_deg
    assert doc["max_elevation_deg"] == pytest.approx(90.0 - (lat + DECL_JUNE_DEG), abs=0.05)
    rc, out, _ = _run(capsys, "sun", "tarnvik-cabin", "--date", MIDWINTER)
    assert rc == 0 and "Polar night" in out


def test_sun_human_readable_has_units(capsys):
    rc, out, err = _run(capsys, "sun", "larkmoor-dairy", "--date", MIDSUMMER)
    assert rc == 0 and err == ""
    assert "sunrise" in out and "sunset" in out
    assert " h" in out and "deg" in out and " m)" in out
    assert "Europe/London" in out


def test_sun_accepts_a_site_file(tmp_path, capsys):
    from tiltyard.engine.site_file import save_site

    path = tmp_path / "cabin.json"
    save_site(load_demo("tarnvik-cabin"), path)
    doc = _json(capsys, "sun", str(path), "--date", MIDSUMMER, "--json")["sun"]
    assert doc["polar"] == "day"


# -- irradiance -------------------------------------------------------------------------

def test_irradiance_json(capsys):
    full = _json(capsys, "irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth", "180",
                 "--json")
    doc = full["irradiance"]
    assert IRRADIANCE_KEYS <= set(doc)
    assert doc["site"] == load_demo("larkmoor-dairy").name
    # the site holds twelve monthly GHI values: the auto basis takes them, and says so
    assert (doc["model"], doc["sky"]) == ("perez", "monthly")
    assert full["assessment"]["basis"]["used"] == "monthly"
    assert full["assessment"]["basis"]["requested"] == "auto"
    assert isinstance(doc["year"], int)
    assert doc["solar_constant_w_m2"] == pytest.approx(1361.0)  # Kopp & Lean (2011), GRL 38
    monthly = doc["monthly"]
    assert [m["month"] for m in monthly] == list(range(1, 13))
    for m in monthly:
        assert MONTHLY_KEYS <= set(m)
        # the atmosphere only takes away: clear-sky GHI below the extraterrestrial value
        # (physical bound, common practice)
        assert 0.0 < m["ghi_kwh_m2"] < m["extraterrestrial_horizontal_kwh_m2"]
        # components add up to the plane total (rounded to 1e-4 each)
        assert m["poa_kwh_m2"] == pytest.approx(
            m["poa_beam_kwh_m2"] + m["poa_sky_diffuse_kwh_m2"] + m["poa_ground_kwh_m2"],
            abs=5e-4)
        assert m["horizon_loss_kwh_m2"] >= 0.0  # this site's horizon is above 0 deg
    assert MONTHLY_KEYS <= set(doc["annual"])
    for key in MONTHLY_KEYS:
        assert doc["annual"][key] == pytest.approx(sum(m[key] for m in monthly), abs=1e-3)

    # annual extraterrestrial irradiation on a horizontal surface at the site's latitude:
    # daily closed form of Duffie & Beckman (2013) eq. 1.10.3 with Spencer (1971)
    # declination and distance factor (D&B eq. 1.6.1b, 1.4.1b; coefficients from memory),
    # summed over 365 days.
    # Tolerance 0.5 %: the hourly interval midpoints overstate a day's cosine integral by
    # up to 1 - sinc(7.5 deg) = 0.29 %.
    phi = math.radians(load_demo("larkmoor-dairy").latitude_deg)
    b = 2.0 * np.pi * (np.arange(1, 366) - 1) / 365.0
    dec = (0.006918 - 0.399912 * np.cos(b) + 0.070257 * np.sin(b) - 0.006758 * np.cos(2 * b)
           + 0.000907 * np.sin(2 * b) - 0.002697 * np.cos(3 * b) + 0.00148 * np.sin(3 * b))
    ecc = (1.000110 + 0.034221 * np.cos(b) + 0.001280 * np.sin(b) + 0.000719 * np.cos(2 * b)
           + 0.000077 * np.sin(2 * b))
    ws = np.arccos(np.clip(-np.tan(phi) * np.tan(dec), -1.0, 1.0))
    h0_j_m2 = (24 * 3600 * doc["solar_constant_w_m2"] / np.pi * ecc
               * (np.cos(phi) * np.cos(dec) * np.sin(ws) + ws * np.sin(phi) * np.sin(dec)))
    assert doc["annual"]["extraterrestrial_horizontal_kwh_m2"] == pytest.approx(
        h0_j_m2.sum() / 3.6e6, rel=5e-3)


def test_irradiance_human_readable_has_units(capsys):
    rc, out, err = _run(capsys, "irradiance", "kelpie-creek-shed", "--tilt", "20",
                        "--azimuth", "0", "--model", "isotropic")
    assert rc == 0 and err == ""
    assert "kWh/m2" in out and "W/m2" in out and "deg" in out
    assert "Jan" in out and "Dec" in out and "year" in out
    assert "not a design" in out  # the caution line


# -- bad input: exit 2, one line ------------------------------------------------------

def _bad_lat_file(tmp_path):
    d = {"format": "tiltyard-site", "format_version": 1, "name": "bad",
         "latitude_deg": 91, "longitude_deg": 0}
    path = tmp_path / "bad-lat.json"
    path.write_text(json.dumps(d), encoding="utf-8")
    return path


def _bad_json_file(tmp_path):
    path = tmp_path / "broken.json"
    path.write_text('{"format": "tiltyard-site",\n "format_version": 1,,\n}', encoding="utf-8")
    return path


@pytest.mark.parametrize(("argv", "expect"), [
    (lambda p: ["sun", str(p / "nowhere.json"), "--date", MIDSUMMER],
     lambda p: [str(p / "nowhere.json"), "does not exist"]),
    (lambda p: ["sun", str(_bad_json_file(p)), "--date", MIDSUMMER],
     lambda p: [str(p / "broken.json"), "line 2, column", "not valid JSON"]),
    (lambda p: ["sun", str(_bad_lat_file(p)), "--date", MIDSUMMER],
     lambda p: [str(p / "bad-lat.json"), "latitude_deg", "91", "between -90 and 90"]),
    (lambda p: ["irradiance", "larkmoor-dairy", "--tilt", "95", "--azimuth", "180"],
     lambda p: ["--tilt", "95", "between 0 and 90"]),
    (lambda p: ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth", "400"],
     lambda p: ["--azimuth", "400", "between 0 and 360"]),
    (lambda p: ["sun", "larkmoor-dairy", "--date", "2023-02-30"],
     lambda p: ["--date", "2023-02-30", "day is out of range"]),
    (lambda p: ["sun", "larkmoor-dairy", "--date", "21/06/2023"],
     lambda p: ["--date", "YYYY-MM-DD"]),
    (lambda p: ["sun", "no-such-demo", "--date", MIDSUMMER],
     lambda p: ["no-such-demo", "demo site", "larkmoor-dairy"]),
    (lambda p: ["frobnicate"], lambda p: ["frobnicate", "neither a subcommand", "study"]),
    (lambda p: ["sun", "larkmoor-dairy"], lambda p: ["--date", "required"]),
    (lambda p: ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth", "180",
                "--solar-constant", "2000"],
     lambda p: ["--solar-constant", "2000", "between 1000 and 1500"]),
], ids=["missing-file", "bad-json", "bad-latitude", "tilt-95", "azimuth-400", "feb-30",
        "date-format", "unknown-demo", "unknown-subcommand", "missing-date", "solar-constant"])
def test_bad_input_exits_2_with_one_line(tmp_path, capsys, argv, expect):
    rc, out, err = _run(capsys, *argv(tmp_path))
    assert rc == 2
    assert out == ""
    assert "Traceback" not in err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    for text in expect(tmp_path):
        assert text in lines[0]


# -- internal fault: exit 1 --------------------------------------------------------------

def _boom(*args, **kwargs):
    raise RuntimeError("simulated engine fault")


def test_internal_fault_exits_1_with_one_line(capsys, monkeypatch):
    monkeypatch.setattr("tiltyard.engine.jobs.sun_day", _boom)
    rc, out, err = _run(capsys, "sun", "larkmoor-dairy", "--date", MIDSUMMER)
    assert rc == 1
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1
    assert "internal fault" in lines[0] and "RuntimeError" in lines[0]
    assert "simulated engine fault" in lines[0] and "--verbose" in lines[0]
    assert "Traceback" not in err


def test_internal_fault_with_verbose_shows_the_traceback(capsys, monkeypatch):
    monkeypatch.setattr("tiltyard.engine.assess.irradiance_on_plane", _boom)
    rc, _, err = _run(capsys, "--verbose", "irradiance", "larkmoor-dairy", "--tilt", "30",
                      "--azimuth", "180")
    assert rc == 1
    assert "Traceback (most recent call last)" in err
    assert "RuntimeError: simulated engine fault" in err
    assert err.strip().splitlines()[-1].startswith("tiltyard: internal fault")


# -- a real process ---------------------------------------------------------------------------

def test_exit_status_seen_by_the_shell(tmp_path):
    bad = _bad_lat_file(tmp_path)
    runs = {
        "version": ["--version"],
        "bad-file": ["sun", str(bad), "--date", MIDSUMMER],
        "usage": ["frobnicate"],
    }
    procs = {k: subprocess.Popen([sys.executable, "-m", "tiltyard", *a], stdout=subprocess.PIPE,
                                 stderr=subprocess.PIPE, text=True, encoding="utf-8")
             for k, a in runs.items()}  # started together, to keep the test quick
    res = {k: (p.wait(timeout=60), *p.communicate()) for k, p in procs.items()}

    rc, out, err = res["version"]
    assert rc == 0 and out.strip() == f"tiltyard {version('tiltyard')}"
    for key in ("bad-file", "usage"):
        rc, out, err = res[key]
        assert rc == 2 and out == ""
        assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert str(bad) in res["bad-file"][2] and "latitude_deg" in res["bad-file"][2]


def test_study_json_and_table(capsys):
    from tiltyard.app.cli import main as cli_main

    assert cli_main(["study", "kelpie-creek-shed", "--json", "--tilt-range", "10:60",
                     "--tilt-step", "5", "--mounting", "adjustable"]) == 0
    doc = json.loads(capsys.readouterr().out)["study"]
    for key in ("site", "year", "sky", "objective", "options"):
        assert key in doc
    kinds = {o["kind"] for o in doc["options"]}
    assert kinds == {"horizontal", "plane", "rule-of-thumb", "fixed-optimal", "two-season",
                     "four-season", "monthly", "two-axis"}
    fixed = next(o for o in doc["options"] if o["kind"] == "fixed-optimal")
    assert fixed["schedule"][0]["tilt_deg"] % 5 == 0
    assert cli_main(["study", "kelpie-creek-shed", "--objective", "worst-month",
                     "--azimuth", "0"]) == 0
    out = capsys.readouterr().out
    # the site's roof planes are flush by default: the answer is the roof as it is
    assert "kWh/m2" in out and "This roof as it is:" in out and "not a design" in out
    assert "mounting: flush" in out and "Two-season" not in out


def test_study_bad_objective_is_one_line(capsys):
    from tiltyard.app.cli import main as cli_main

    assert cli_main(["study", "larkmoor-dairy", "--objective", "months=13"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "months" in err and "Traceback" not in err


# -- weather CSV files: --columns, --time-label, --time-zone ----------------------------

#: Our names -> the header names of the generated file (the --columns example).
RENAMED = {"timestamp": "Time", "ghi": "GHI", "dni": "DNI", "dhi": "DHI", "temp_air": "T2m",
           "wind_speed": "WS"}
COLUMNS_ARG = ",".join(f"{k}={v}" for k, v in RENAMED.items())
STANDARD_ARG = ",".join(f"{k}={k}" for k in RENAMED)
TMY3_GREENSBORO = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"


@pytest.fixture(scope="module")
def clear_csv(tmp_path_factory):
    """A year of hourly pvlib clear sky for larkmoor-dairy, written as a logger would.

    pvlib's Ineichen-Perez clear sky (Location.get_clearsky) at the midpoint of each
    hour stands for the hour's mean (invented demo data, not a check value in itself:
    the checks compare the command's totals with the sums of what was written).
    Timestamps are naive wall-clock time at UTC+01:00. Three files: interval-start
    labels with renamed and with standard headers, and interval-end labels renamed.
    """
    site = load_demo("larkmoor-dairy")
    loc = pvlib.location.Location(site.latitude_deg, site.longitude_deg,
                                  altitude=site.elevation_m)
    start = pd.date_range("2023-01-01 00:00", periods=8760, freq="h", tz="UTC")
    cs = loc.get_clearsky(start + pd.Timedelta(minutes=30))
    folder = tmp_path_factory.mktemp("weather")
    paths = {}
    for name, label_shift_h, header in (("start", 0, RENAMED), ("end", 1, RENAMED),
                                        ("standard", 0, {k: k for k in RENAMED})):
        wall = (start + pd.Timedelta(hours=1 + label_shift_h)).tz_localize(None)
        table = pd.DataFrame({header["timestamp"]: wall.strftime("%Y-%m-%d %H:%M"),
                              header["ghi"]: cs["ghi"].round(3).to_numpy(),
                              header["dni"]: cs["dni"].round(3).to_numpy(),
                              header["dhi"]: cs["dhi"].round(3).to_numpy(),
                              header["temp_air"]: 10.0, header["wind_speed"]: 3.0})
        paths[name] = folder / f"{name}.csv"
        table.to_csv(paths[name], index=False)
    ghi_kwh_m2 = float(cs["ghi"].round(3).sum()) / 1000.0
    return paths, ghi_kwh_m2


def _csv_argv(path, columns, label, *extra):
    return ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth", "180", "--model",
            "isotropic", "--sky", str(path), "--columns", columns, "--time-label", label,
            "--time-zone", "+01:00", *extra]


def _labelling(doc):
    found = [f for f in doc["weather"]["findings"] if f["kind"] == "labelling"]
    assert len(found) == 1
    return found[0]


def test_csv_columns_mapping_matches_standard_names(capsys, clear_csv):
    paths, ghi_file = clear_csv
    renamed = _json(capsys, *_csv_argv(paths["start"], COLUMNS_ARG, "start", "--json"))
    standard = _json(capsys, *_csv_argv(paths["standard"], STANDARD_ARG, "start", "--json"))
    # the same data under other header names: the same figures, exactly (regression)
    assert renamed["irradiance"]["annual"] == standard["irradiance"]["annual"]
    assert renamed["irradiance"]["monthly"] == standard["irradiance"]["monthly"]
    assert renamed["irradiance"]["sky"] == "file"
    # annual GHI is the sum of the pvlib clear-sky hourly means written to the file
    # (arithmetic: W/m2 over 1 h = Wh/m2); 1e-5 relative for the JSON rounding
    assert renamed["irradiance"]["annual"]["ghi_kwh_m2"] == pytest.approx(ghi_file, rel=1e-5)
    # the importer's findings are in the JSON document; the timestamps agree with the sun
    # (weather.py's labelling check, centroid within 20 min: consistent)
    weather = renamed["weather"]
    assert weather["source"] == "start.csv (CSV)" and weather["step_min"] == 60
    assert (weather["timestamp_label"], weather["timezone"]) == ("start", "UTC+01:00")
    assert _labelling(renamed)["severity"] == "info"
    assert "consistent" in _labelling(renamed)["message"]


def test_csv_time_label_end_versus_start(capsys, clear_csv):
    paths, ghi_file = clear_csv
    start = _json(capsys, *_csv_argv(paths["start"], COLUMNS_ARG, "start", "--json"))
    end = _json(capsys, *_csv_argv(paths["end"], COLUMNS_ARG, "end", "--json"))
    # the same intervals, labelled at their end and read as such: the same figures
    # (regression value, exact)
    assert end["irradiance"]["annual"] == start["irradiance"]["annual"]
    assert _labelling(end)["severity"] == "info"
    # read as interval start, every value lands one hour late: the labelling check
    # sees the GHI centroid about +60 min from the sun's and names the cause, and the
    # findings go to stderr with the table
    rc, out, err = _run(capsys, *_csv_argv(paths["end"], COLUMNS_ARG, "start"))
    assert rc == 0 and "kWh/m2" in out
    warning = [line for line in err.splitlines() if "(labelling)" in line]
    assert len(warning) == 1 and "warning" in warning[0]
    assert "'end', not 'start'" in warning[0]
    assert "end.csv (CSV)" in warning[0]
    wrong = _json(capsys, *_csv_argv(paths["end"], COLUMNS_ARG, "start", "--json"))
    # regression values: GHI measured with the sun down is dropped and late afternoon
    # values above the extraterrestrial irradiance are capped (both in the notes), so
    # the annual GHI falls below the file's sum (1464.5 against 1479.8 kWh/m2) and the
    # plane total changes by more than 1 %
    notes = " ".join(wrong["irradiance"]["notes"])
    assert "with the sun down" in notes and "capped" in notes
    assert wrong["irradiance"]["annual"]["ghi_kwh_m2"] < 0.995 * ghi_file
    poa_right = start["irradiance"]["annual"]["poa_kwh_m2"]
    poa_wrong = wrong["irradiance"]["annual"]["poa_kwh_m2"]
    assert abs(poa_wrong / poa_right - 1.0) > 0.01


def _csv_bad(key):
    """argv for a bad weather option (the CSV from the clear_csv fixture as {csv})."""
    base = ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth", "180"]
    return {
        "unknown-key": base + ["--sky", "{csv}", "--columns", "timestamp=Time,gni=GHI",
                               "--time-label", "start", "--time-zone", "+01:00"],
        "unknown-key-study": ["study", "larkmoor-dairy", "--sky", "{csv}", "--columns",
                              "stamp=Time,ghi=GHI", "--time-label", "start"],
        "not-key-value": base + ["--sky", "{csv}", "--columns", "timestamp=Time,GHI",
                                 "--time-label", "start"],
        "bad-zone": base + ["--sky", "{csv}", "--columns", COLUMNS_ARG, "--time-label",
                            "start", "--time-zone", "Mars/Olympus"],
        "bad-label": base + ["--sky", "{csv}", "--columns", COLUMNS_ARG, "--time-label",
                             "middle"],
        "no-label": base + ["--sky", "{csv}", "--columns", COLUMNS_ARG],
        "no-zone": base + ["--sky", "{csv}", "--columns", COLUMNS_ARG, "--time-label", "start"],
        "no-columns": base + ["--sky", "{csv}"],
        "columns-without-file": base + ["--columns", COLUMNS_ARG],
        "columns-with-tmy3": ["study", "larkmoor-dairy", "--sky", str(TMY3_GREENSBORO),
                              "--columns", COLUMNS_ARG],
    }[key]


@pytest.mark.parametrize(("key", "expect"), [
    ("unknown-key", ["--columns", "unknown key 'gni'",
                     "allowed keys: timestamp, date, time, ghi, dni, dhi, temp_air, wind_speed"]),
    ("unknown-key-study", ["--columns", "unknown key 'stamp'", "allowed keys: timestamp"]),
    ("not-key-value", ["--columns", "'GHI' is not KEY=NAME"]),
    ("bad-zone", ["--time-zone Mars/Olympus", "IANA zone name", "UTC offset"]),
    ("bad-label", ["--time-label", "'middle'", "'start', 'end', 'centre'"]),
    ("no-label", ["--time-label", "'start', 'end' or 'centre'"]),
    ("no-zone", ["--time-zone", "no UTC offset", "line 2"]),
    ("no-columns", ["not a TMY3, TMY2 or EPW file", "--columns"]),
    ("columns-without-file", ["--columns", "only for a weather file"]),
    ("columns-with-tmy3", ["--columns", "723170TYA.CSV (TMY3)", "defines its own columns"]),
])
def test_csv_options_bad_input_one_line(capsys, clear_csv, key, expect):
    argv = [a.replace("{csv}", str(clear_csv[0]["start"])) for a in _csv_bad(key)]
    rc, out, err = _run(capsys, *argv)
    assert rc == 2, err
    assert out == ""
    assert "Traceback" not in err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    for text in expect:
        assert text in lines[0]


# -- the desktop app from the command line ------------------------------------------------------

def test_site_argument_opens_the_app_window(tmp_path):
    import os

    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", TILTYARD_SMOKE_QUIT_MS="0",
               XDG_CONFIG_HOME=str(tmp_path), XDG_DATA_HOME=str(tmp_path), HOME=str(tmp_path))
    proc = subprocess.run([sys.executable, "-m", "tiltyard", "kelpie-creek-shed"], env=env,
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert "window ready" in proc.stdout and "Kelpie Creek" in proc.stdout


def test_bad_site_for_the_app_is_one_line_before_any_window(capsys):
    rc, out, err = _run(capsys, "no-such-site.json")
    assert rc == 2 and out == ""
    assert len(err.strip().splitlines()) == 1 and "no-such-site.json" in err


def test_no_display_is_one_line(capsys, monkeypatch):
    for var in ("QT_QPA_PLATFORM", "DISPLAY", "WAYLAND_DISPLAY"):
        monkeypatch.delenv(var, raising=False)
    monkeypatch.setattr(sys, "platform", "linux")
    rc, out, err = _run(capsys)
    assert rc == 2 and "no display" in err and len(err.strip().splitlines()) == 1


def test_verbose_works_after_the_subcommand(capsys):
    rc, _, err = _run(capsys, "study", "larkmoor-dairy", "--tilt-range", "50:10", "--verbose")
    assert rc == 2 and "--tilt-range" in err


def test_study_table_shows_rows_yield_and_the_monthly_method(capsys):
    rc, out, _ = _run(capsys, "study", "larkmoor-dairy", "--sky", "monthly", "--tilt-step", "5",
                      "--row-tilt", "30", "--row-length", "2", "--mounting", "ground-rows")
    assert rc == 0
    assert "30 deg rows" in out and "2 m slant length" in out and "pitch" in out
    assert "GCR" in out and "ground cover" in out
    assert "indicative specific yield" in out and "not a system design" in out
    assert "monthly-mean method" in out and "Klein (1977)" in out
