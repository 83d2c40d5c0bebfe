"""Tests for the site model, its validation and site files (tiltyard.engine.site,
site_file, demo_sites).

Most checks here pin the contract of DESIGN.md (site-file format, error messages naming
field, value and allowed range, atomic saving) rather than outside values; the few outside
facts (limits of latitude and longitude, the IANA zone database, heights on Earth) are
labelled where they are used.
"""

from __future__ import annotations

import json
import math
import os
from importlib import resources
from pathlib import Path

import pytest

from tiltyard.engine import site as site_mod
from tiltyard.engine.demo_sites import demo_site_names, load_demo, resolve_site
from tiltyard.engine.site import HorizonProfile, Obstacle, Plane, Site, SiteError
from tiltyard.engine.site_file import (
    FORMAT_NAME,
    FORMAT_VERSION,
    load_site,
    save_site,
    site_from_dict,
    site_to_dict,
)


def _minimal(**changes) -> dict:
    """The JSON structure of a small valid site file, with some keys changed."""
    d = {
        "format": FORMAT_NAME,
        "format_version": 1,
        "name": "Test roof",
        "latitude_deg": 50.0,
        "longitude_deg": 8.0,
        "elevation_m": 100,
        "timezone": "Europe/Berlin",
        "albedo": 0.2,
        "horizon": {"azimuth_deg": [0, 180], "elevation_deg": [2, 5]},
        "obstacles": [{"label": "tree", "bearing_deg": 200, "width_deg": 10, "distance_m": 12,
                       "height_m": 6}],
        "planes": [{"label": "roof", "tilt_deg": 30, "azimuth_deg": 180}],
        "linke_turbidity": None,
        "notes": "",
    }
    d.update(changes)
    return d


def _write(path: Path, data) -> Path:
    path.write_text(data if isinstance(data, str) else json.dumps(data), encoding="utf-8")
    return path


def _assert_names(err: SiteError, field: str, value_text: str, range_text: str) -> None:
    """The message names the field, the refused value and the allowed range (DESIGN.md)."""
    msg = str(err)
    assert err.field == field
    assert field in msg
    assert value_text in msg
    assert range_text in msg


# -- validation -----------------------------------------------------------------

def test_latitude_out_of_range_names_field_value_and_range():
    # latitude is defined on [-90, 90] deg (geographic definition, common practice, no source)
    with pytest.raises(SiteError) as exc:
        Site("x", latitude_deg=91, longitude_deg=0)
    _assert_names(exc.value, "latitude_deg", "91", "between -90 and 90°")
    assert exc.value.value == 91


def test_longitude_out_of_range_names_field_value_and_range():
    # longitude is defined on [-180, 180] deg (geographic definition, common practice, no source)
    with pytest.raises(SiteError) as exc:
        Site("x", latitude_deg=0, longitude_deg=-181)
    _assert_names(exc.value, "longitude_deg", "-181", "between -180 and 180°")


def test_poles_and_date_line_are_accepted():
    # the closed interval ends are real places (geographic definition, common practice)
    for lat, lon in [(90, 180), (-90, -180), (0, 0)]:
        s = Site("edge", latitude_deg=lat, longitude_deg=lon)
        assert (s.latitude_deg, s.longitude_deg) == (float(lat), float(lon))


def test_elevation_range_covers_earth_and_refuses_beyond():
    # Everest summit 8849 m and the Dead Sea shore about -430 m (from memory) must load;
    # the allowed range is -500 to 9000 m
    assert Site("summit", 27.99, 86.93, elevation_m=8849).elevation_m == 8849.0
    assert Site("shore", 31.5, 35.5, elevation_m=-430).elevation_m == -430.0
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, elevation_m=9500)
    _assert_names(exc.value, "elevation_m", "9500", "between -500 and 9,000 m")
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, elevation_m=-600)
    _assert_names(exc.value, "elevation_m", "-600", "between -500 and 9,000 m")


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), "50", True, None])
def test_latitude_must_be_a_finite_number(bad):
    with pytest.raises(SiteError) as exc:
        Site("x", latitude_deg=bad, longitude_deg=0)
    assert exc.value.field == "latitude_deg"
    assert "number" in exc.value.reason


def test_unknown_time_zone_is_refused():
    # 'Mars/Olympus' is not in the IANA time zone database
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, timezone="Mars/Olympus")
    _assert_names(exc.value, "timezone", "'Mars/Olympus'", "IANA time zone")


def test_known_time_zones_with_odd_offsets_are_accepted():
    # IANA zones with 30- and 45-minute offsets (IANA tz database)
    for tz in ("Asia/Kathmandu", "Asia/Colombo", "Australia/Adelaide"):
        assert Site("x", 0, 0, timezone=tz).timezone == tz


def test_albedo_out_of_range_is_refused():
    # albedo is a reflectance, a fraction in [0, 1] (definition, common practice, no source)
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, albedo=1.5)
    _assert_names(exc.value, "albedo", "1.5", "between 0 and 1")


def test_albedo_needs_one_or_twelve_values():
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, albedo=(0.2,) * 11)
    assert exc.value.field == "albedo"
    assert "12 monthly values" in str(exc.value)
    twelve = tuple(0.1 + 0.05 * i for i in range(12))
    assert Site("x", 0, 0, albedo=twelve).albedo_by_month() == twelve
    assert Site("x", 0, 0, albedo=0.3).albedo_by_month() == (0.3,) * 12


def test_one_bad_monthly_albedo_names_its_month():
    values = [0.2] * 12
    values[6] = -0.1
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, albedo=tuple(values))
    _assert_names(exc.value, "albedo[6]", "-0.1", "between 0 and 1")


def test_horizon_lengths_must_match():
    with pytest.raises(SiteError) as exc:
        HorizonProfile((0, 90, 180), (1, 2))
    assert exc.value.field == "horizon.elevation_deg"
    assert "as many values as azimuth_deg (3)" in str(exc.value)


def test_horizon_lengths_must_match_in_a_file(tmp_path):
    d = _minimal(horizon={"azimuth_deg": [0, 90, 180], "elevation_deg": [1, 2]})
    path = _write(tmp_path / "site.json", d)
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.file == str(path)
    assert exc.value.field == "horizon.elevation_deg"


def test_horizon_elevation_range_and_distinct_azimuths():
    with pytest.raises(SiteError) as exc:
        HorizonProfile((0, 90), (5, 95))
    _assert_names(exc.value, "horizon.elevation_deg[1]", "95", "between -30 and 90°")
    with pytest.raises(SiteError) as exc:
        HorizonProfile((0, 360), (5, 6))  # the same direction twice
    assert exc.value.field == "horizon.azimuth_deg"
    assert "distinct" in exc.value.reason


def test_horizon_arrays_that_are_not_lists_are_refused_in_a_file(tmp_path):
    path = _write(tmp_path / "site.json",
                  _minimal(horizon={"azimuth_deg": 5, "elevation_deg": 3}))
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field == "horizon.azimuth_deg"
    assert "list" in exc.value.reason


def test_obstacle_distance_zero_is_refused():
    with pytest.raises(SiteError) as exc:
        Obstacle("shed", bearing_deg=180, width_deg=10, distance_m=0, height_m=3)
    _assert_names(exc.value, "distance_m", "0", "between 0.1 and 100,000 m")


def test_obstacle_distance_zero_in_a_file_names_the_obstacle(tmp_path):
    obstacles = [{"bearing_deg": 90, "width_deg": 5, "distance_m": 10, "height_m": 2},
                 {"bearing_deg": 200, "width_deg": 10, "distance_m": 0, "height_m": 6}]
    path = _write(tmp_path / "site.json", _minimal(obstacles=obstacles))
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field == "obstacles[1].distance_m"
    assert str(path) in str(exc.value)
    assert "between 0.1 and 100,000 m" in str(exc.value)


def test_obstacle_missing_field_in_a_file(tmp_path):
    path = _write(tmp_path / "site.json",
                  _minimal(obstacles=[{"bearing_deg": 90, "width_deg": 5, "distance_m": 10}]))
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field == "obstacles[0].height_m"
    assert "required" in exc.value.reason


def test_plane_tilt_95_is_refused():
    # tilt runs from horizontal (0) to vertical (90) (DESIGN.md)
    with pytest.raises(SiteError) as exc:
        Plane("roof", tilt_deg=95, azimuth_deg=180)
    _assert_names(exc.value, "tilt_deg", "95", "between 0 and 90°")


def test_plane_tilt_95_in_a_file_names_the_plane(tmp_path):
    path = _write(tmp_path / "site.json",
                  _minimal(planes=[{"label": "roof", "tilt_deg": 95, "azimuth_deg": 180}]))
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field == "planes[0].tilt_deg"
    assert "between 0 and 90°" in str(exc.value)


def test_monthly_linke_turbidity_out_of_range():
    values = [3.0] * 12
    values[5] = 12.0
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, linke_turbidity=tuple(values))
    _assert_names(exc.value, "linke_turbidity[5]", "12.0", "between 1 and 10")
    with pytest.raises(SiteError) as exc:
        Site("x", 0, 0, linke_turbidity=(3.0,) * 5)
    assert exc.value.field == "linke_turbidity"
    assert "12 monthly values" in exc.value.reason


def test_name_must_be_text():
    with pytest.raises(SiteError) as exc:
        Site("   ", 0, 0)
    assert exc.value.field == "name"


def test_with_changes_validates():
    s = Site("x", 10, 10)
    assert s.with_changes(latitude_deg=-20).hemisphere == "south"
    with pytest.raises(SiteError):
        s.with_changes(latitude_deg=95)


def test_equator_facing_azimuth_by_hemisphere():
    # azimuth clockwise from true north in both hemispheres, south = 180 (DESIGN.md)
    assert Site("n", 45, 0).equator_azimuth_deg == 180.0
    assert Site("s", -33, 150).equator_azimuth_deg == 0.0


# -- obstacles by bearing range -------------------------------------------------

def test_obstacle_from_bearing_range_across_north():
    ob = Obstacle.from_bearing_range("hedge", 350, 10, distance_m=10, height_m=2)
    assert ob.bearing_deg == pytest.approx(0.0, abs=1e-12)
    assert ob.width_deg == pytest.approx(20.0, abs=1e-12)


def test_obstacle_from_bearing_range_plain_and_reflex():
    ob = Obstacle.from_bearing_range("barn", 190, 210, distance_m=30, height_m=6)
    assert (ob.bearing_deg, ob.width_deg) == pytest.approx((200.0, 20.0))
    with pytest.raises(SiteError) as exc:  # clockwise 10 -> 350 would be 340 deg wide
        Obstacle.from_bearing_range("wall", 10, 350, distance_m=5, height_m=2)
    assert exc.value.field == "width_deg"
    with pytest.raises(SiteError) as exc:
        Obstacle.from_bearing_range("post", 40, 40, distance_m=5, height_m=2)
    assert exc.value.field == "bearing_end_deg"


def test_obstacle_bearing_range_in_a_file(tmp_path):
    obstacles = [{"label": "hedge", "bearing_start_deg": 350, "bearing_end_deg": 10,
                  "distance_m": 10, "height_m": 2}]
    s = load_site(_write(tmp_path / "site.json", _minimal(obstacles=obstacles)))
    assert s.obstacles[0].bearing_deg == pytest.approx(0.0, abs=1e-12)
    assert s.obstacles[0].width_deg == pytest.approx(20.0)


def test_obstacle_elevation_is_plane_trigonometry():
    # atan(h / d): 10 m up at 10 m is 45 deg; 1 m at sqrt(3) m is 30 deg
    # (plane trigonometry, common practice, no source; exact to 1e-12 deg)
    assert Obstacle("a", 0, 10, 10, 10).elevation_deg == pytest.approx(45.0, abs=1e-12)
    assert Obstacle("b", 0, 10, math.sqrt(3), 1).elevation_deg == pytest.approx(30.0, abs=1e-12)


# -- files: load, save, round trip ----------------------------------------------

def test_demo_sites_are_the_shipped_files():
    shipped = sorted(p.name[:-5] for p in resources.files("tiltyard.sample_sites").iterdir()
                     if p.name.endswith(".json"))
    assert demo_site_names() == shipped
    assert len(shipped) >= 6  # DESIGN.md lists six scenarios


@pytest.mark.parametrize("name", demo_site_names())
def test_round_trip_every_demo_site(tmp_path, name):
    site = load_demo(name)
    path = tmp_path / f"{name}.json"
    save_site(site, path)
    again = load_site(path)
    assert site_to_dict(again) == site_to_dict(site)
    assert again == site
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["format"] == FORMAT_NAME
    assert data["format_version"] == FORMAT_VERSION


def test_round_trip_keeps_optional_fields(tmp_path):
    s = Site("opt", 40, -3, timezone="Europe/Madrid", albedo=tuple([0.25] * 12),
             linke_turbidity=tuple(2.0 + 0.2 * i for i in range(12)),
             monthly_ghi_kwh_m2_day=tuple(1.0 + 0.3 * i for i in range(12)),
             notes="line one\nline two")
    save_site(s, tmp_path / "opt.json")
    assert site_to_dict(load_site(tmp_path / "opt.json")) == site_to_dict(s)


def test_unicode_names_survive(tmp_path):
    name = "Ærøskøbing grain store — 南向き屋根 ☀"
    s = Site(name, 54.89, 10.41, timezone="Europe/Copenhagen",
             obstacles=(Obstacle("Überhang / 電柱", 170, 8, 9, 4),),
             planes=(Plane("façade sud", 90, 180),), notes="Ça marche, ñandú")
    path = tmp_path / "ünïcode sïte.json"
    save_site(s, path)
    raw = path.read_bytes()
    assert name.encode("utf-8") in raw  # written as UTF-8 text, not \\u escapes
    again = load_site(path)
    assert again.name == name
    assert again.obstacles[0].label == "Überhang / 電柱"
    assert again.planes[0].label == "façade sud"
    assert again.notes == "Ça marche, ñandú"


def test_saving_over_an_existing_file(tmp_path):
    path = tmp_path / "site.json"
    save_site(load_demo("larkmoor-dairy"), path)
    other = load_demo("tarnvik-cabin")
    save_site(other, path)
    assert load_site(path) == other
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site.json"]


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_saving_keeps_permissions(tmp_path):
    path = tmp_path / "site.json"
    save_site(load_demo("larkmoor-dairy"), path)
    mask = os.umask(0o022)
    os.umask(mask)
    assert os.stat(path).st_mode & 0o777 == 0o666 & ~mask  # like any newly created file
    os.chmod(path, 0o640)
    save_site(load_demo("tarnvik-cabin"), path)
    assert os.stat(path).st_mode & 0o777 == 0o640  # an existing file keeps its mode


class _SimulatedCrash(RuntimeError):
    pass


@pytest.mark.parametrize("failing", ["fsync", "replace"])
def test_save_is_atomic_when_interrupted(tmp_path, monkeypatch, failing):
    path = tmp_path / "site.json"
    save_site(load_demo("larkmoor-dairy"), path)
    before = path.read_bytes()

    def crash(*args, **kwargs):
        raise _SimulatedCrash(f"power lost during os.{failing}")

    monkeypatch.setattr(site_mod.os, failing, crash)
    with pytest.raises(_SimulatedCrash):
        save_site(load_demo("tarnvik-cabin"), path)
    monkeypatch.undo()
    assert path.read_bytes() == before  # the old file is intact, byte for byte
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site.json"]  # no temp file left
    assert load_site(path) == load_demo("larkmoor-dairy")


def test_first_save_interrupted_leaves_nothing(tmp_path, monkeypatch):
    def crash(*args, **kwargs):
        raise _SimulatedCrash("power lost")

    monkeypatch.setattr(site_mod.os, "replace", crash)
    with pytest.raises(_SimulatedCrash):
        save_site(load_demo("larkmoor-dairy"), tmp_path / "new.json")
    monkeypatch.undo()
    assert list(tmp_path.iterdir()) == []


# -- files: errors ----------------------------------------------------------------

def test_bad_json_reports_file_line_and_column(tmp_path):
    text = '{\n  "format": "tiltyard-site",\n  "name": \'single quotes\',\n}\n'
    path = _write(tmp_path / "broken.json", text)
    with pytest.raises(SiteError) as exc:
        load_site(path)
    col = text.splitlines()[2].index("'") + 1
    assert exc.value.field == f"line 3, column {col}"
    assert exc.value.file == str(path)
    msg = str(exc.value)
    assert str(path) in msg and "line 3" in msg and "not valid JSON" in msg


@pytest.mark.parametrize("text", ['{"format": "tiltyard-site", "format_version": 1,\n', ""])
def test_truncated_or_empty_json_is_a_site_error(tmp_path, text):
    path = _write(tmp_path / "cut.json", text)
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field.startswith("line ")
    assert "not valid JSON" in exc.value.reason


def test_missing_field_is_named(tmp_path):
    d = _minimal()
    del d["latitude_deg"]
    path = _write(tmp_path / "site.json", d)
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field == "latitude_deg"
    assert "required" in exc.value.reason
    assert str(path) in str(exc.value)


@pytest.mark.parametrize("fmt", ["geojson", None])
def test_wrong_format_is_refused(tmp_path, fmt):
    d = _minimal(format=fmt)
    path = _write(tmp_path / "site.json", d)
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field == "format"
    assert FORMAT_NAME in exc.value.reason
    assert str(path) in str(exc.value)


def test_newer_format_version_asks_for_an_update(tmp_path):
    path = _write(tmp_path / "future.json", _minimal(format_version=99))
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert exc.value.field == "format_version"
    assert exc.value.value == 99
    msg = str(exc.value)
    assert "99" in msg and "newer" in msg and "update" in msg.lower()
    assert str(path) in msg


@pytest.mark.parametrize("version", [0, "1", 1.5, True])
def test_format_version_must_be_a_whole_number(version):
    with pytest.raises(SiteError) as exc:
        site_from_dict(_minimal(format_version=version))
    assert exc.value.field == "format_version"


def test_missing_file_and_top_level_not_an_object(tmp_path):
    with pytest.raises(SiteError) as exc:
        load_site(tmp_path / "nowhere.json")
    assert "does not exist" in str(exc.value)
    assert "nowhere.json" in str(exc.value)
    with pytest.raises(SiteError) as exc:
        load_site(_write(tmp_path / "list.json", "[1, 2, 3]"))
    assert exc.value.field == "(top level)"


def test_file_not_utf8(tmp_path):
    path = tmp_path / "latin1.json"
    path.write_bytes(json.dumps(_minimal(name="Caf\u00e9"), ensure_ascii=False).encode("latin-1"))
    with pytest.raises(SiteError) as exc:
        load_site(path)
    assert "UTF-8" in exc.value.reason


def test_resolve_site_file_or_demo(tmp_path):
    path = tmp_path / "mine.json"
    save_site(load_demo("coral-lane-clinic"), path)
    assert resolve_site(str(path)) == load_demo("coral-lane-clinic")
    assert resolve_site("high-pass-hut") == load_demo("high-pass-hut")
    with pytest.raises(SiteError) as exc:
        resolve_site("no-such-demo")
    assert "no-such-demo" in str(exc.value)
    assert "larkmoor-dairy" in str(exc.value)  # lists the choices
