"""Tests for tiltyard.engine.weather.preview: header reading, column guesses, texts.

Format and behaviour tests on small CSV files written here; no physics is checked.
"""

from __future__ import annotations

import dataclasses
import pickle
from pathlib import Path

import pandas as pd
import pytest

from tiltyard.engine.weather import (
    LABELS,
    MAPPED_COLUMNS,
    CsvHeader,
    Finding,
    Loaded,
    LoadFailure,
    WeatherData,
    WeatherImportError,
    finding_text,
    guess_columns,
    read_header,
    summary_text,
)

# -- read_header -----------------------------------------------------------------------

def test_read_header_gives_the_stripped_names_of_the_first_line(tmp_path):
    path = tmp_path / "log.csv"
    path.write_text(" Time (UTC) ,GHI W/m2,\"Air, temp\"\n2023-01-01 00:00,0,3\n",
                    encoding="utf-8")
    assert read_header(path) == ("Time (UTC)", "GHI W/m2", "Air, temp")


def test_read_header_skips_a_byte_order_mark_and_empty_names(tmp_path):
    path = tmp_path / "bom.csv"
    path.write_bytes("time,,ghi,\n1,2,3,4\n".encode("utf-8-sig"))
    assert read_header(path) == ("time", "ghi")


def test_read_header_of_an_empty_first_line_names_line_1(tmp_path):
    path = tmp_path / "blank.csv"
    path.write_text(",,\n2023-01-01,1,2\n", encoding="utf-8")
    with pytest.raises(WeatherImportError) as info:
        read_header(path)
    assert info.value.line == 1
    assert str(info.value) == "blank.csv, line 1: the first line holds no column names"


def test_read_header_of_an_empty_file_names_line_1(tmp_path):
    path = tmp_path / "empty.csv"
    path.write_text("", encoding="utf-8")
    with pytest.raises(WeatherImportError) as info:
        read_header(path)
    assert info.value.line == 1


def test_read_header_of_a_file_that_is_not_text_names_the_file(tmp_path):
    path = tmp_path / "binary.csv"
    path.write_bytes(b"\xff\xfe\xfa\x00time")
    with pytest.raises(WeatherImportError) as info:
        read_header(path)
    assert info.value.file == "binary.csv" and info.value.line is None
    assert "cannot read" in info.value.reason


def test_read_header_of_a_missing_file_names_the_file(tmp_path):
    with pytest.raises(WeatherImportError) as info:
        read_header(tmp_path / "gone.csv")
    assert str(info.value).startswith("gone.csv: cannot read")


# -- guess_columns ---------------------------------------------------------------------

def test_guess_columns_from_common_header_words():
    header = ("Time (UTC)", "GHI W/m2", "DNI W/m2", "DHI W/m2", "Air temp", "Wind speed")
    assert guess_columns(header) == {
        "timestamp": "Time (UTC)", "ghi": "GHI W/m2", "dni": "DNI W/m2", "dhi": "DHI W/m2",
        "temp_air": "Air temp", "wind_speed": "Wind speed"}


def test_guess_columns_by_longer_words_inside_a_name():
    header = ("DateTime", "GlobalHoriz", "BeamNormal", "DiffuseHoriz", "Tamb_C")
    assert guess_columns(header) == {
        "timestamp": "DateTime", "ghi": "GlobalHoriz", "dni": "BeamNormal",
        "dhi": "DiffuseHoriz", "temp_air": "Tamb_C"}


def test_guess_columns_uses_each_header_name_once_and_leaves_out_unmatched():
    # "date" and "time" both hint at the timestamp; only one column is taken for it
    header = ("date", "time", "irradiance", "humidity")
    guess = guess_columns(header)
    assert guess == {"timestamp": "time"}
    assert len(set(guess.values())) == len(guess)


def test_guess_columns_is_case_and_space_blind():
    assert guess_columns(("  TIMESTAMP ", "ghi_avg")) == {"timestamp": "  TIMESTAMP ",
                                                         "ghi": "ghi_avg"}


def test_guess_columns_of_an_unrelated_header_is_empty():
    assert guess_columns(("a", "b", "c")) == {}


def test_form_words_cover_every_guessed_key():
    keys = [k for k, _ in MAPPED_COLUMNS]
    assert keys[0] == "timestamp" and len(set(keys)) == len(keys)
    assert set(guess_columns(("Time", "GHI", "DNI", "DHI", "temp", "wind"))) <= set(keys)
    assert [k for k, _ in LABELS] == ["start", "end", "centre"]


# -- texts -----------------------------------------------------------------------------

def test_finding_text_with_and_without_a_line():
    assert (finding_text(Finding("gap", "warning", "3 missing intervals", 14))
            == "warning: line 14: 3 missing intervals")
    assert finding_text(Finding("units", "info", "read as W/m2")) == "info: read as W/m2"


def _weather(findings=()) -> WeatherData:
    index = pd.date_range("2023-01-01", periods=3, freq="30min", tz="UTC", name="interval_start")
    return WeatherData(data=pd.DataFrame({"ghi": [0.0, 1.0, 2.0]}, index=index), step_min=30,
                       source="log.csv (CSV)", timestamp_label="start",
                       findings=tuple(findings), timezone="Europe/London")


def test_summary_text_counts_findings_and_those_to_look_at():
    weather = _weather([Finding("units", "info", "a"), Finding("gap", "warning", "b", 3),
                        Finding("irradiance_limit", "error", "c", 4)])
    assert summary_text(weather) == (
        "log.csv (CSV): 3 intervals of 30 min, timestamps at the interval start, "
        "time zone Europe/London; 3 findings, 2 to look at")


def test_summary_text_without_findings_or_zone():
    weather = dataclasses.replace(_weather(), timezone=None)
    assert summary_text(weather).endswith("time zone from the file; no findings")
    assert summary_text(_weather([Finding("units", "info", "a")])).endswith("; 1 finding")


# -- outcomes cross process boundaries -------------------------------------------------

def test_outcomes_and_the_import_error_pickle_with_their_fields(tmp_path):
    weather = _weather([Finding("gap", "warning", "b", 3)])
    loaded = pickle.loads(pickle.dumps(Loaded(Path(tmp_path / "log.csv"), weather)))
    assert loaded.path == tmp_path / "log.csv"
    pd.testing.assert_frame_equal(loaded.weather.data, weather.data)
    assert loaded.weather.findings == weather.findings
    header = CsvHeader(tmp_path / "x.csv", ("Time", "GHI"), {"timestamp": "Time"})
    assert pickle.loads(pickle.dumps(header)) == header
    failure = LoadFailure("x.csv, line 4: bad", 4)
    assert pickle.loads(pickle.dumps(failure)) == failure
    err = pickle.loads(pickle.dumps(WeatherImportError("x.csv", 4, "value 'abc'")))
    assert (err.file, err.line, err.reason) == ("x.csv", 4, "value 'abc'")
    assert str(err) == "x.csv, line 4: value 'abc'"
