"""Tests of horizon CSV reading and writing (:mod:`tiltyard.engine.horizon_io`).

These check our own file format as its module docstring specifies it (two
columns, optional header, comma or semicolon, decimal point, line numbers in
every message); there is no outside reference for a file format of our own,
so the assertions below are specification checks, not physics.
"""

from __future__ import annotations

import os

import pytest

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.horizon_io import (
    HorizonFileError,
    format_horizon_csv,
    parse_horizon_csv,
    read_horizon_csv,
    write_horizon_csv,
)
from tiltyard.engine.site import HorizonProfile


def _write(tmp_path, text, name="h.csv", encoding="utf-8"):
    path = tmp_path / name
    path.write_text(text, encoding=encoding)
    return path


def test_round_trip_is_exact(tmp_path):
    prof = HorizonProfile((0.0, 12.5, 90.0, 180.0, 201.3, 359.9),
                          (3.0, 0.1 + 0.2, -2.75, 11.0, -29.5, 90.0))
    path = write_horizon_csv(prof, tmp_path / "out.csv")
    # shortest round-trip float repr: reading back gives the same floats (spec)
    assert read_horizon_csv(path) == prof
    text = path.read_text(encoding="utf-8")
    assert text.splitlines()[0] == "azimuth_deg,elevation_deg"
    assert text.splitlines()[2] == "12.5,0.30000000000000004"


@pytest.mark.parametrize("demo", ["larkmoor-dairy", "high-pass-hut", "kelpie-creek-shed"])
def test_demo_profiles_round_trip(tmp_path, demo):
    prof = load_demo(demo).horizon
    path = write_horizon_csv(prof, tmp_path / f"{demo}.csv")
    assert read_horizon_csv(path) == prof          # spec: write then read is the identity


def test_write_is_atomic_and_replaces(tmp_path):
    target = tmp_path / "h.csv"
    target.write_text("old content\n", encoding="utf-8")
    prof = HorizonProfile((0.0, 180.0), (1.0, 2.0))
    write_horizon_csv(prof, target)
    assert target.read_text(encoding="utf-8") == format_horizon_csv(prof)
    # no temporary file left beside the target (engine.atomic_files.write_bytes_atomically)
    assert sorted(os.listdir(tmp_path)) == ["h.csv"]


def test_header_optional_semicolon_and_quotes(tmp_path):
    no_header = _write(tmp_path, "0,3\n90,2.5\n180,11\n", "a.csv")
    semi = _write(tmp_path, "azimuth_deg;elevation_deg\n0;3\n90;2.5\n180;11\n", "b.csv")
    quoted = _write(tmp_path, '"azimuth","elevation"\n"0","3"\n"90", "2.5"\n180,11,\n', "c.csv")
    swapped = _write(tmp_path, "elevation_deg,azimuth_deg\n3,0\n2.5,90\n11,180\n", "d.csv")
    bom = _write(tmp_path, "azimuth_deg,elevation_deg\n0,3\n90,2.5\n180,11\n", "e.csv",
                 encoding="utf-8-sig")
    want = HorizonProfile((0.0, 90.0, 180.0), (3.0, 2.5, 11.0))
    for p in (no_header, semi, quoted, swapped, bom):
        assert read_horizon_csv(p) == want, p.name      # spec: module docstring


def test_comments_blank_lines_and_unsorted_input():
    text = "# measured 2024-05-01\n\nazimuth_deg,elevation_deg\n270,4\n\n90,2\n"
    prof = parse_horizon_csv(text)
    assert prof.azimuth_deg == (90.0, 270.0)             # sorted by azimuth (spec)
    assert prof.elevation_deg == (2.0, 4.0)


def test_bad_number_names_the_line(tmp_path):
    path = _write(tmp_path, "azimuth_deg,elevation_deg\n0,3\n90,abc\n180,11\n")
    with pytest.raises(HorizonFileError) as info:
        read_horizon_csv(path)
    err = info.value
    assert err.line == 3
    assert "line 3, elevation_deg" in str(err)
    assert "'abc'" in str(err) and str(path) in str(err)


def test_decimal_comma_in_a_comma_separated_file_gets_a_hint():
    # a ";" file may use a decimal comma (below); in a "," file it splits the value
    with pytest.raises(HorizonFileError, match=r"line 2 .*decimals are written with a point"):
        parse_horizon_csv("0,3\n90,2,5\n")


def test_wrong_number_of_values():
    with pytest.raises(HorizonFileError, match=r"line 2 .*has 3 value\(s\); expected 2"):
        parse_horizon_csv("0,3\n90,2,5\n")
    with pytest.raises(HorizonFileError, match=r"line 1 .*has 1 value"):
        parse_horizon_csv("90\n")


def test_out_of_range_values_name_the_range():
    with pytest.raises(HorizonFileError, match=r"line 3, azimuth_deg = '400'.*between 0 and 360"):
        parse_horizon_csv("az,el\n0,1\n400,2\n")
    # the elevation range is HorizonProfile's (-30 to 90 deg)
    with pytest.raises(HorizonFileError, match=r"line 2, elevation_deg = '95'.*between -30 and 90"):
        parse_horizon_csv("0,1\n90,95\n")
    with pytest.raises(HorizonFileError, match=r"line 1, elevation_deg.*finite"):
        parse_horizon_csv("0,nan\n")


def test_duplicates_name_both_lines():
    with pytest.raises(HorizonFileError, match=r"line 4, azimuth_deg.*repeats the azimuth of "
                                               r"line 2") as info:
        parse_horizon_csv("az,el\n90,1\n180,2\n90.0,3\n")
    assert info.value.line == 4
    # 0 and 360 are one direction (HorizonProfile's convention)
    with pytest.raises(HorizonFileError, match=r"line 2.*repeats the azimuth of line 1"):
        parse_horizon_csv("0,1\n360,2\n")


def test_line_numbers_count_comments_and_blank_lines():
    with pytest.raises(HorizonFileError) as info:
        parse_horizon_csv("# comment\n\n0,1\nx,2\n")
    assert info.value.line == 4


def test_whole_file_problems(tmp_path):
    with pytest.raises(HorizonFileError, match="does not exist"):
        read_horizon_csv(tmp_path / "missing.csv")
    with pytest.raises(HorizonFileError, match="no horizon points"):
        read_horizon_csv(_write(tmp_path, "\n# nothing\n", "empty.csv"))
    with pytest.raises(HorizonFileError, match="header but no horizon points"):
        read_horizon_csv(_write(tmp_path, "azimuth_deg,elevation_deg\n", "head.csv"))
    bad = tmp_path / "latin1.csv"
    bad.write_bytes("azimut,élévation\n0,1\n".encode("latin-1"))
    with pytest.raises(HorizonFileError, match="not UTF-8"):
        read_horizon_csv(bad)


def test_a_semicolon_file_may_write_decimals_with_a_comma():
    from tiltyard.engine.horizon_io import parse_horizon_csv as parse
    with_header = parse("azimuth_deg;elevation_deg\n0;2,5\n90;3,25\n180;10,0\n")
    no_header = parse("0;2,5\n90;3,25\n180;10\n")
    assert with_header.elevation_deg == (2.5, 3.25, 10.0)
    assert no_header == with_header
    assert parse("0;2.5\n90;3.25\n180;10\n") == with_header    # a point still reads
