"""Tests for tiltyard.engine.weather_check: reading a weather file for a site.

Format and behaviour tests on small CSV files written here: which outcome a file
gives (Loaded, CsvHeader or LoadFailure) and what its message says. The one
full year is pvlib's clear sky, only to have plausible values; no physics is
checked.
"""

from __future__ import annotations

import pickle

import pandas as pd
import pvlib
import pytest

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.timegrid import GRID_STEPS_MIN
from tiltyard.engine.weather import CsvHeader, Loaded, LoadFailure, WeatherData
from tiltyard.engine.weather_check import grid_step_problem, read_weather_for_site

MAPPING = {"timestamp": "Time (UTC)", "ghi": "GHI W/m2"}


@pytest.fixture(scope="module")
def site():
    return load_demo("larkmoor-dairy")


def _write(path, starts, ghi):
    pd.DataFrame({"Time (UTC)": pd.DatetimeIndex(starts).strftime("%Y-%m-%d %H:%M"),
                  "GHI W/m2": ghi, "Air temp": 9.5}).to_csv(path, index=False,
                                                            float_format="%.3f")
    return path


def _clear_sky_year(path, site, step_min=60):
    starts = pd.date_range("2023-01-01", "2024-01-01", freq=f"{step_min}min", tz="UTC",
                           inclusive="left")
    loc = pvlib.location.Location(site.latitude_deg, site.longitude_deg, altitude=0)
    ghi = loc.get_clearsky(starts + pd.Timedelta(minutes=step_min / 2))["ghi"].to_numpy()
    return _write(path, starts, ghi)


def test_a_csv_without_a_mapping_gives_its_header_and_a_guess(tmp_path, site):
    path = _write(tmp_path / "log.csv", pd.date_range("2023-01-01", periods=4, freq="h"),
                  [0.0, 0.0, 1.0, 2.0])
    got = read_weather_for_site(path, site)
    assert isinstance(got, CsvHeader)
    assert got.path == path
    assert got.columns == ("Time (UTC)", "GHI W/m2", "Air temp")
    assert got.guess == {"timestamp": "Time (UTC)", "ghi": "GHI W/m2", "temp_air": "Air temp"}


def test_a_csv_without_a_mapping_or_a_header_fails_at_line_1(tmp_path, site):
    path = tmp_path / "no-header.csv"
    path.write_text(",,\n2023-01-01 00:00,0,1\n", encoding="utf-8")
    got = read_weather_for_site(path, site)
    assert isinstance(got, LoadFailure)
    assert got.line == 1
    assert got.message == "no-header.csv, line 1: the first line holds no column names"


def test_a_bad_value_fails_with_its_line_and_column(tmp_path, site):
    path = tmp_path / "broken.csv"
    path.write_text("Time (UTC),GHI W/m2\n2023-01-01 00:00,0\n2023-01-01 01:00,0\n"
                    "2023-01-01 02:00,abc\n2023-01-01 03:00,0\n", encoding="utf-8")
    got = read_weather_for_site(path, site, MAPPING, "start", "UTC")
    assert isinstance(got, LoadFailure)
    assert got.line == 4
    assert got.message.startswith("broken.csv, line 4: column 'GHI W/m2': value 'abc' "
                                  "is not a number")


def test_a_bad_timestamp_fails_with_its_line(tmp_path, site):
    path = tmp_path / "dates.csv"
    path.write_text("Time (UTC),GHI W/m2\n2023-01-01 00:00,0\n2023-01-01 01:00,0\n"
                    "2023-01-01 02:00,0\nnot a time,0\n", encoding="utf-8")
    got = read_weather_for_site(path, site, MAPPING, "start", "UTC")
    assert isinstance(got, LoadFailure)
    assert got.line == 5 and "'not a time'" in got.message


def test_a_mapped_column_not_in_the_file_is_named(tmp_path, site):
    path = _write(tmp_path / "log.csv", pd.date_range("2023-01-01", periods=4, freq="h"),
                  [0.0, 0.0, 1.0, 2.0])
    got = read_weather_for_site(path, site, {"timestamp": "Time (UTC)", "ghi": "GHI"},
                                "start", "UTC")
    assert isinstance(got, LoadFailure)
    assert got.line == 1
    assert "'GHI' not found" in got.message and "'GHI W/m2'" in got.message


def test_a_missing_option_is_named_with_the_file(tmp_path, site):
    path = _write(tmp_path / "log.csv", pd.date_range("2023-01-01", periods=4, freq="h"),
                  [0.0, 0.0, 1.0, 2.0])
    no_label = read_weather_for_site(path, site, MAPPING, None, "UTC")
    assert isinstance(no_label, LoadFailure)
    assert no_label.message.startswith("log.csv: Each timestamp marks: ")
    no_zone = read_weather_for_site(path, site, MAPPING, "start", None)
    assert isinstance(no_zone, LoadFailure)
    assert no_zone.message.startswith("log.csv: Time zone of the timestamps: the timestamps "
                                      "have no UTC offset")


def test_a_few_days_are_read_but_cannot_serve_as_the_year(tmp_path, site):
    path = _write(tmp_path / "days.csv", pd.date_range("2023-06-01", periods=72, freq="h"),
                  [100.0] * 72)
    got = read_weather_for_site(path, site, MAPPING, "start", "UTC")
    assert isinstance(got, LoadFailure)
    assert got.message.startswith("read, but it cannot serve as this site's year: ")
    assert "days.csv" in got.message


@pytest.mark.parametrize("step", [s for s in range(1, 61) if 60 % s == 0] + [7, 45])
def test_grid_step_problem_follows_the_time_grid(step):
    index = pd.date_range("2023-01-01", periods=2, freq=f"{step}min", tz="UTC")
    weather = WeatherData(pd.DataFrame({"ghi": [0.0, 0.0]}, index=index), step, "x.csv (CSV)",
                          "start", ())
    problem = grid_step_problem(weather)
    assert (problem is None) == (step in GRID_STEPS_MIN) == (60 % step == 0)
    if problem is not None:
        assert problem.startswith(f"{step}-minute intervals")
        assert ", ".join(map(str, GRID_STEPS_MIN)) in problem


def test_a_year_of_weather_loads_and_pickles(tmp_path, site):
    path = _clear_sky_year(tmp_path / "year.csv", site)
    stages = []
    got = read_weather_for_site(path, site, MAPPING | {"temp_air": "Air temp"}, "start", "UTC",
                                progress=lambda f, stage="": stages.append((f, stage)))
    assert isinstance(got, Loaded), getattr(got, "message", got)
    assert got.path == path
    assert got.weather.step_min == 60 and len(got.weather.data) == 8760
    assert list(got.weather.data.columns) == ["ghi", "temp_air"]
    assert got.weather.source == "year.csv (CSV)"
    assert stages and 0 < stages[0][0] < 1
    back = pickle.loads(pickle.dumps(got))
    pd.testing.assert_frame_equal(back.weather.data, got.weather.data)
    assert back.weather.findings == got.weather.findings


def test_a_cancelling_progress_stops_the_check(tmp_path, site):
    path = _clear_sky_year(tmp_path / "year.csv", site)

    class Stop(Exception):
        pass

    def progress(fraction, stage=""):
        raise Stop

    with pytest.raises(Stop):
        read_weather_for_site(path, site, MAPPING, "start", "UTC", progress=progress)
