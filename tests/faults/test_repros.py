"""Every repro of the fault audit (issue 13): bad input is one line and exit 2, no output
replaces an input, nothing half-written is left, and the limits hold."""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np
import pvlib
import pytest

from tiltyard.app.cli import main
from tiltyard.engine.site import Obstacle

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "larkmoor-dairy.json"
TMY3 = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"
# a site at the TMY3 sample's station (Greensboro NC, header line of 723170TYA.CSV)
GREENSBORO = {"format": "tiltyard-site", "format_version": 2, "name": "Greensboro roof",
              "latitude_deg": 36.1, "longitude_deg": -79.95, "elevation_m": 273,
              "timezone": "America/New_York"}


def _refused(capsys, *argv, names=()):
    """Run the command line; it must refuse in one line (exit 2) naming ``names``."""
    rc = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    lines = err.strip().splitlines()
    assert rc == 2, err
    assert len(lines) == 1, err
    assert "Traceback" not in err and "internal fault" not in err
    for name in names:
        assert name in lines[0], lines[0]
    return lines[0]


def _site_text(**changes) -> str:
    d = json.loads(SAMPLE.read_text(encoding="utf-8"))
    d.update(changes)
    return json.dumps(d)


# -- 1. outputs over inputs -----------------------------------------------------------------

@pytest.mark.parametrize("flag", ["-o", "--json-out", "--csv-monthly"])
def test_sheet_never_writes_over_its_site_file(tmp_path, capsys, flag):
    site = tmp_path / "s.json"
    site.write_text(SAMPLE.read_text(encoding="utf-8"), encoding="utf-8")
    before = site.read_bytes()
    _refused(capsys, "sheet", site, flag, site, names=(flag, "site file"))
    link = tmp_path / "link.json"
    link.symlink_to(site)
    _refused(capsys, "sheet", site, flag, link, names=(flag,))
    _refused(capsys, "sheet", link, flag, site, names=(flag,))
    hard = tmp_path / "hard.json"
    os.link(site, hard)
    _refused(capsys, "sheet", site, flag, hard, names=(flag,))
    assert site.read_bytes() == before


def test_sheet_never_writes_over_its_weather_file(tmp_path, capsys):
    site = tmp_path / "g.json"
    site.write_text(json.dumps(GREENSBORO), encoding="utf-8")
    weather = tmp_path / "w.csv"
    weather.write_bytes(TMY3.read_bytes())
    _refused(capsys, "sheet", site, "--sky", weather, "--csv-monthly", weather,
             names=("--csv-monthly", "weather file"))
    _refused(capsys, "sheet", site, "--sky", weather, "--csv-options",
             tmp_path / "sub" / ".." / "w.csv", names=("--csv-options",))
    assert weather.read_bytes() == TMY3.read_bytes()


# -- 2. bad input reported as bad input -------------------------------------------------------

BAD_SITES = {
    "zone-is-a-folder": (_site_text(timezone="America"), "timezone"),
    "zone-too-long": (_site_text(timezone="A" * 300), "timezone"),
    "400-digits": (_site_text().replace('"elevation_m": 162.0', '"elevation_m": 1' + "0" * 400),
                   "elevation_m"),
    "5000-digits": (_site_text().replace('"elevation_m": 162.0',
                                         '"elevation_m": 1' + "0" * 5000), "elevation_m"),
    "nested-100000": (_site_text(extra="X").replace('"X"', "[" * 100_000 + "]" * 100_000),
                      "deep"),
    "lone-surrogate": (_site_text().replace('"Larkmoor', '"\\ud800Larkmoor'), "name"),
    "nan": (_site_text().replace('"elevation_m": 162.0', '"elevation_m": NaN'), "elevation_m"),
    "too-many-planes": (_site_text(planes=[{"tilt_deg": 10, "azimuth_deg": 180}] * 51),
                        "planes"),
    "too-many-horizon-points": (_site_text(horizon={
        "azimuth_deg": [i / 10 for i in range(3601)][:3600] + [359.95],
        "elevation_deg": [1.0] * 3601}), "horizon"),
}


@pytest.mark.parametrize("name", sorted(BAD_SITES))
def test_bad_site_files_are_one_line_exit_2(tmp_path, capsys, name):
    text, field = BAD_SITES[name]
    path = tmp_path / f"{name}.json"
    path.write_text(text, encoding="utf-8", errors="surrogatepass")
    _refused(capsys, "study", path, names=(path.name, field))
    _refused(capsys, str(path), names=(path.name, field))        # tiltyard FILE (the app)


def test_an_oversized_site_file_is_refused_before_parsing(tmp_path, capsys):
    from tiltyard.engine.site_limits import MAX_SITE_FILE_BYTES

    path = tmp_path / "big.json"
    path.write_text(_site_text(notes=" " * 10) + " " * (MAX_SITE_FILE_BYTES + 1))
    _refused(capsys, "sun", path, "--date", "2024-06-21", names=("big.json", "MB"))


@pytest.mark.parametrize("date", ["1582-10-10", "0001-01-01", "2262-04-12", "9999-12-31"])
def test_sun_dates_outside_the_documented_range(capsys, date):
    _refused(capsys, "sun", "larkmoor-dairy", "--date", date,
             names=("--date", "1900-01-01", "2100-12-31"))


def test_sun_dates_at_the_ends_of_the_range(capsys):
    for date in ("1900-01-01", "2100-12-31"):
        assert main(["sun", "larkmoor-dairy", "--date", date, "--json"]) == 0
        assert json.loads(capsys.readouterr().out)["sun"]["date"] == date


def _tmy3_with(tmp_path, name, edit):
    lines = TMY3.read_text().splitlines()
    path = tmp_path / name
    path.write_text("\n".join(edit(lines)) + "\n")
    return path


@pytest.mark.parametrize("case", ["header-only", "zone+20", "zone-20"])
def test_broken_tmy3_files(tmp_path, capsys, case):
    site = tmp_path / "g.json"
    site.write_text(json.dumps(GREENSBORO), encoding="utf-8")

    def edit(lines):
        if case == "header-only":
            return lines[:2]
        head = lines[0].split(",")
        head[3] = "20.0" if case == "zone+20" else "-20.0"
        return [",".join(head)] + lines[1:]
    path = _tmy3_with(tmp_path, f"{case}.csv", edit)
    _refused(capsys, "irradiance", site, "--tilt", "30", "--azimuth", "180", "--sky", path,
             names=(path.name,))


@pytest.mark.parametrize("rows", [[], ["1500-01-01 00:00,0,0,0", "1500-01-01 01:00,0,0,0"]],
                         ids=["header-only", "year-1500"])
def test_broken_csv_weather_files(tmp_path, capsys, rows):
    path = tmp_path / "w.csv"
    path.write_text("\n".join(["time,ghi,dni,dhi"] + rows) + "\n")
    _refused(capsys, "irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth", "180",
             "--sky", path, "--columns", "timestamp=time,ghi=ghi,dni=dni,dhi=dhi",
             "--time-label", "start", "--time-zone", "UTC", names=("w.csv",))


def test_the_app_keeps_its_site_when_a_bad_file_is_opened(qtbot, tmp_path):
    from tiltyard.app.desktop import create_window

    window = create_window("larkmoor-dairy")
    qtbot.addWidget(window)
    before = window.document.site
    for name, (text, _field) in sorted(BAD_SITES.items()):
        path = tmp_path / f"{name}.json"
        path.write_text(text, encoding="utf-8", errors="surrogatepass")
        assert window.open_path(str(path), confirmed=True) is False
        assert window.document.site == before
        assert name in window.banner.text


# -- 3. bounded cost ----------------------------------------------------------------------------

def test_ten_thousand_obstacles_give_the_definition_s_answer():
    # its time is measured by tests/benchmarks/bench_obstacles.py (speed lives in benchmarks)
    from tiltyard.engine.horizon import obstacle_elevation_deg

    rng = np.random.default_rng(13)
    obstacles = [Obstacle("o", float(b), float(w), float(d), float(h)) for b, w, d, h in zip(
        rng.uniform(0, 360, 10_000), rng.uniform(0.1, 30, 10_000), rng.uniform(1, 200, 10_000),
        rng.uniform(0, 30, 10_000), strict=True)]
    azimuth = rng.uniform(0, 360, 8760)            # one sun azimuth per hour of a year
    got = obstacle_elevation_deg(obstacles, azimuth)
    # the same answer as the obstacle-by-obstacle definition (plane trigonometry, exact)
    ref = np.full(azimuth.size, -90.0)
    for ob in obstacles:
        delta = np.abs((azimuth - ob.bearing_deg + 180.0) % 360.0 - 180.0)
        ref = np.where(delta <= ob.width_deg / 2, np.maximum(ref, ob.elevation_deg), ref)
    np.testing.assert_array_equal(got, ref)


def test_obstacle_edges_and_north_crossings_match_the_definition():
    from tiltyard.engine.horizon import obstacle_elevation_deg

    obstacles = [Obstacle("a", 355, 20, 10, 5), Obstacle("b", 5, 10, 10, 8),
                 Obstacle("c", 180, 180, 50, 1), Obstacle("d", 90, 0.1, 1, 100)]
    azimuth = np.array([345, 345.0001, 0, 360, 10, 15, 90, 90.05, 90.0501, 270, 269.99, 180])
    ref = np.full(azimuth.size, -90.0)
    for ob in obstacles:
        delta = np.abs((azimuth - ob.bearing_deg + 180.0) % 360.0 - 180.0)
        ref = np.where(delta <= ob.width_deg / 2, np.maximum(ref, ob.elevation_deg), ref)
    np.testing.assert_array_equal(obstacle_elevation_deg(obstacles, azimuth), ref)


def test_more_obstacles_than_the_limit_are_refused(tmp_path, capsys):
    from tiltyard.engine.site_limits import MAX_OBSTACLES

    ob = {"bearing_deg": 180, "width_deg": 5, "distance_m": 20, "height_m": 5}
    path = tmp_path / "many.json"
    path.write_text(_site_text(obstacles=[ob] * (MAX_OBSTACLES + 1)))
    # refused at load, before any study work (pytest-timeout bounds a hang)
    _refused(capsys, "study", path, names=("many.json", "obstacles", str(MAX_OBSTACLES)))


# -- 4. high elevation ---------------------------------------------------------------------------

def test_ineichen_is_refused_above_its_altitude_range(tmp_path, capsys):
    path = tmp_path / "summit.json"
    path.write_text(_site_text(elevation_m=8848))
    _refused(capsys, "study", path, names=("summit.json", "elevation_m", "4000",
                                           "simplified_solis"))
    _refused(capsys, "irradiance", path, "--tilt", "30", "--azimuth", "180", "--sky", "clear",
             names=("elevation_m",))
    assert main(["irradiance", str(path), "--tilt", "30", "--azimuth", "180", "--sky", "clear",
                 "--clearsky", "simplified_solis", "--json"]) == 0
    capsys.readouterr()


# -- 5. temporary files and several outputs -----------------------------------------------------

def test_a_stale_temp_file_of_ours_is_removed_and_others_are_kept(tmp_path):
    from tiltyard.engine.atomic_files import write_files_atomically

    target = tmp_path / "out.pdf"
    dead = tmp_path / f".out.pdf.tiltyard-{_dead_pid()}-abc123.tmp"
    alive = tmp_path / f".out.pdf.tiltyard-{os.getppid()}-abc123.tmp"
    other = tmp_path / ".out.pdf.xyz.tmp"
    for p in (dead, alive, other):
        p.write_bytes(b"partial")
    write_files_atomically([(target, b"new")])
    assert target.read_bytes() == b"new"
    assert not dead.exists() and alive.exists() and other.exists()


def _dead_pid() -> int:
    import subprocess
    import sys

    proc = subprocess.Popen([sys.executable, "-c", "pass"])
    proc.wait()
    return proc.pid


def test_a_failure_part_way_changes_no_output(tmp_path, monkeypatch):
    from tiltyard.engine import atomic_files

    a, b = tmp_path / "a.csv", tmp_path / "b.csv"
    a.write_bytes(b"old a")
    b.write_bytes(b"old b")
    real = atomic_files._write_temp
    calls = []

    def second_fails(path, data):
        calls.append(path)
        if len(calls) == 2:
            raise OSError(28, "No space left on device")
        return real(path, data)
    monkeypatch.setattr(atomic_files, "_write_temp", second_fails)
    with pytest.raises(OSError) as info:
        atomic_files.write_files_atomically([(a, b"new a"), (b, b"new b")])
    assert info.value.target == str(b)
    assert (a.read_bytes(), b.read_bytes()) == (b"old a", b"old b")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.csv", "b.csv"]


# -- 6. options ------------------------------------------------------------------------------------

@pytest.mark.parametrize("dates,shorter", [("03-01,03-01", 0), ("03-01,03-10", 9),
                                           ("01-15,12-20", 26)])
def test_switch_dates_closer_than_the_minimum_are_refused(capsys, dates, shorter):
    _refused(capsys, "study", "larkmoor-dairy", "--mounting", "adjustable", "--switch-dates",
             dates, names=("--switch-dates", "30 days", f"is {shorter}"))


def test_negative_values_after_options_are_values(capsys):
    line = _refused(capsys, "study", "larkmoor-dairy", "--tilt-range", "-10:100",
                    names=("--tilt-range -10:100",))
    assert "expected one argument" not in line
    path = "x.csv"
    line = _refused(capsys, "irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth", "180",
                    "--sky", path, "--columns", "timestamp=t,ghi=g", "--time-label", "start",
                    "--time-zone", "-05:00")
    assert "expected one argument" not in line and "x.csv" in line


def test_a_site_file_with_a_byte_order_mark_loads(tmp_path, capsys):
    path = tmp_path / "bom.json"
    path.write_bytes(b"\xef\xbb\xbf" + SAMPLE.read_bytes())
    assert main(["sun", str(path), "--date", "2024-06-21", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["sun"]["timezone"] == "Europe/London"


def test_all_zero_monthly_ghi_is_refused_once_at_load(tmp_path, capsys):
    path = tmp_path / "zero.json"
    path.write_text(_site_text(monthly_ghi_kwh_m2_day=[0] * 12))
    for argv in (["irradiance", path, "--tilt", "30", "--azimuth", "180"], ["study", path],
                 ["sheet", path, "--csv-monthly", tmp_path / "m.csv"]):
        _refused(capsys, *argv, names=("zero.json", "monthly_ghi_kwh_m2_day[0]"))
    assert not (tmp_path / "m.csv").exists()


# -- 7. messages -----------------------------------------------------------------------------------

@pytest.mark.parametrize("argv,option", [
    (["--tilt-step", "0"], "--tilt-step"), (["--min-days", "500"], "--min-days"),
    (["--tilt-range", "50:10"], "--tilt-range"), (["--loss", "2"], "--loss"),
    (["--row-length", "100"], "--row-length")])
def test_messages_name_the_option_not_the_field(capsys, argv, option):
    line = _refused(capsys, "study", "larkmoor-dairy", *argv, names=(option,))
    assert "_deg" not in line and "min_days_between" not in line


def test_sky_monthly_without_values_names_the_site(capsys):
    _refused(capsys, "irradiance", "kelpie-creek-shed", "--tilt", "30", "--azimuth", "0",
             "--sky", "monthly", names=("kelpie-creek-shed", "monthly"))


def test_no_library_warning_reaches_stderr(tmp_path, capsys):
    site = tmp_path / "g.json"
    site.write_text(json.dumps(GREENSBORO), encoding="utf-8")
    assert main(["irradiance", str(site), "--tilt", "30", "--azimuth", "180", "--sky",
                 str(TMY3), "--json"]) == 0
    err = capsys.readouterr().err
    assert "Warning" not in err and "warn" not in err.lower()


def test_clear_sky_plane_irradiation_stays_physical_over_random_sites():
    from tiltyard.engine.assess import assess
    from tiltyard.engine.assessment import Assessment
    from tiltyard.engine.site import Site
    from tiltyard.engine.sky import INEICHEN_MAX_ELEVATION_M

    rng = np.random.default_rng(4)
    for _ in range(4):
        lat, lon = float(rng.uniform(-66, 66)), float(rng.uniform(-180, 180))
        elevation = float(rng.choice([rng.uniform(0, INEICHEN_MAX_ELEVATION_M),
                                      rng.uniform(INEICHEN_MAX_ELEVATION_M, 9000)]))
        model = "ineichen" if elevation <= INEICHEN_MAX_ELEVATION_M else "simplified_solis"
        site = Site("random", lat, lon, elevation, "UTC")
        m = assess(Assessment(site, sky="clear", clearsky_model=model)).irradiance(
            30.0, site.equator_azimuth_deg).monthly
        where = (lat, lon, elevation, model)
        # energy conservation (Duffie & Beckman 2013, eq. 1.10.1): GHI <= H0, and the beam
        # on the plane <= the extraterrestrial beam on it; tolerance 1e-6 kWh/m2
        assert np.all(m.ghi_kwh_m2 <= m.extraterrestrial_horizontal_kwh_m2 + 1e-6), where
        assert np.all(m.poa_beam_kwh_m2 <= m.extraterrestrial_poa_kwh_m2 + 1e-6), where
        # the plane gets at most the extraterrestrial beam on it plus the sky's diffuse and
        # the ground's reflection (each bounded by what reaches the horizontal: DHI and
        # albedo x GHI); tolerance 1e-6 kWh/m2
        assert np.all(m.poa_kwh_m2 <= m.extraterrestrial_poa_kwh_m2 + m.dhi_kwh_m2
                      + 0.2 * m.ghi_kwh_m2 + 1e-6), where
