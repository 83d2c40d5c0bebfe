"""Fuzzing the command line with mutated site files, weather files and arguments.

The promise checked on every example: exit 0 or 2; on 2 exactly one line on stderr that
names the file or the option; never a traceback or an internal fault; no NaN or
infinity in a JSON output; no input file changed. ``HYPOTHESIS_PROFILE=ci`` (used by
``.ci/run``) runs ten times the examples of the default profile.
"""

from __future__ import annotations

import copy
import json
import math
import os
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tiltyard.app.cli import main

settings.register_profile("default", max_examples=60, deadline=None,
                          suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                 HealthCheck.too_slow])
settings.register_profile("ci", max_examples=600, deadline=None,
                          suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                 HealthCheck.too_slow])
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "default"))

SAMPLE = json.loads((Path(__file__).resolve().parents[2] / "sample_sites"
                     / "larkmoor-dairy.json").read_text(encoding="utf-8"))
FIELDS = ["name", "latitude_deg", "longitude_deg", "elevation_m", "timezone", "albedo",
          "horizon", "obstacles", "planes", "linke_turbidity", "monthly_ghi_kwh_m2_day", "notes",
          "format_version", "assessment"]

odd_numbers = st.sampled_from([math.nan, math.inf, -math.inf, 1e308, -1e308, 5e-324, 0, -0.0,
                               10 ** 30, -(10 ** 30), 9000.0001, 90.0000001, -500.1])
odd_text = st.one_of(st.text(max_size=30), st.sampled_from(
    ["America", "A" * 300, "../../etc/passwd", "Europe/London\x00", "\ud800", "UTC+25",
     "Etc/GMT+14", "", " ", "\u202e"]))
leaf = st.one_of(st.none(), st.booleans(), st.integers(-10 ** 6, 10 ** 6),
                 st.floats(allow_nan=True, allow_infinity=True), odd_numbers, odd_text)
anything = st.recursive(leaf, lambda inner: st.one_of(
    st.lists(inner, max_size=4), st.dictionaries(st.text(max_size=8), inner, max_size=4)),
    max_leaves=12)


def _check(rc: int, out: str, err: str, names) -> None:
    assert rc in (0, 2), err
    assert "Traceback" not in err and "internal fault" not in err, err
    if rc == 2:
        lines = err.strip().splitlines()
        assert len(lines) == 1, err
        assert any(n in lines[0] for n in names), (names, lines[0])
    else:
        for token in ("NaN", "Infinity"):
            assert token not in out, out[:300]


def _run(capsys, argv):
    rc = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return rc, out, err


@given(mutations=st.lists(st.tuples(st.sampled_from(FIELDS + ["extra"]), anything),
                          min_size=1, max_size=3),
       drop=st.sets(st.sampled_from(FIELDS), max_size=2))
def test_mutated_site_files(tmp_path, capsys, mutations, drop):
    doc = copy.deepcopy(SAMPLE)
    for key in drop:
        doc.pop(key, None)
    for key, value in mutations:
        doc[key] = value
    path = tmp_path / "fuzzed.json"
    text = json.dumps(doc, allow_nan=True, ensure_ascii=True)
    path.write_text(text, encoding="utf-8")
    rc, out, err = _run(capsys, ["sun", path, "--date", "2024-03-20", "--json"])
    _check(rc, out, err, [path.name])
    if rc == 0:
        rc, out, err = _run(capsys, ["irradiance", path, "--tilt", "30", "--azimuth", "180",
                                     "--sky", "clear", "--json"])
        _check(rc, out, err, [path.name, "elevation_m"])
    assert path.read_text(encoding="utf-8") == text


@given(raw=st.binary(max_size=200), keep=st.integers(0, 2000))
def test_truncated_and_garbled_site_files(tmp_path, capsys, raw, keep):
    text = json.dumps(SAMPLE).encode("utf-8")
    data = text[:keep] + raw
    path = tmp_path / "garbled.json"
    path.write_bytes(data)
    rc, out, err = _run(capsys, ["sun", path, "--date", "2024-03-20", "--json"])
    _check(rc, out, err, [path.name])
    assert path.read_bytes() == data


HEADER = "time,ghi,dni,dhi"


def _rows(n: int) -> list[str]:
    return [f"2023-01-{1 + h // 24:02d} {h % 24:02d}:00,{max(0, 400 - abs(12 - h % 24) * 60)},"
            f"0,{max(0, 400 - abs(12 - h % 24) * 60)}" for h in range(n)]


@given(n=st.integers(0, 72), cut=st.integers(0, 4000), junk=st.text(max_size=40),
       dup=st.integers(0, 71), zone=st.sampled_from(["UTC", "+01:00", "-05:00", "+14:00",
                                                       "America", "Mars/Base"]))
def test_mutated_weather_csv(tmp_path, capsys, n, cut, junk, dup, zone):
    rows = _rows(n)
    if rows:
        rows.insert(min(dup, len(rows)), rows[min(dup, len(rows) - 1)])   # a duplicate
    text = "\n".join([HEADER] + rows) + "\n"
    text = text[:cut] + junk if cut < len(text) else text
    path = tmp_path / "fuzzed.csv"
    path.write_text(text, encoding="utf-8", errors="surrogatepass")
    before = path.read_bytes()
    rc, out, err = _run(capsys, ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth",
                                 "180", "--sky", path, "--columns",
                                 "timestamp=time,ghi=ghi,dni=dni,dhi=dhi", "--time-label",
                                 "start", "--time-zone", zone, "--json"])
    _check(rc, out, err, [path.name, "--time-zone", "--columns"])
    assert path.read_bytes() == before


VALUES = st.one_of(st.sampled_from(["-1", "0", "1e400", "nan", "-inf", "-05:00", "-10:100",
                                    "90:0", "13-40,01-01", "03-01,03-01", "months=13",
                                    "months=", "free", "", "--json", "9" * 400]),
                   st.text(max_size=10))
OPTIONS = ["--tilt-range", "--tilt-step", "--azimuth", "--min-days", "--switch-dates",
           "--objective", "--row-tilt", "--row-length", "--row-date", "--loss", "--year",
           "--max-positions", "--mounting", "--model", "--step", "--clearsky"]


@given(pairs=st.lists(st.tuples(st.sampled_from(OPTIONS), VALUES), min_size=1, max_size=3))
def test_mutated_study_arguments(capsys, pairs):
    argv = ["study", "larkmoor-dairy", "--json"]
    for option, value in pairs:
        argv += [option, value]
    rc, out, err = _run(capsys, argv)
    names = [o for o, _ in pairs] + ["tiltyard study", "larkmoor-dairy"]
    _check(rc, out, err, names)


@pytest.mark.parametrize("value", ["-05:00", "-10:100"])
def test_a_negative_value_never_reads_as_an_option(capsys, value):
    rc, out, err = _run(capsys, ["study", "larkmoor-dairy", "--tilt-range", value])
    assert "expected one argument" not in err


TMY3_LINES = (Path(__import__("pvlib").__file__).parent / "data" / "723170TYA.CSV").read_text(
    encoding="utf-8").splitlines()


@given(keep=st.integers(0, 400), row=st.integers(0, 399), field=st.integers(0, 70),
       junk=st.sampled_from(["", "abc", "-9999", "1e400", "nan", "13/45/1988", "25:00",
                             "\ufeff", ",,,", "99999999"]))
def test_mutated_tmy3_files(tmp_path, capsys, keep, row, field, junk):
    """A typical-year file cut short and with one field garbled (pvlib's TMY3 sample)."""
    lines = list(TMY3_LINES[:keep])
    if 2 <= row < len(lines):
        cells = lines[row].split(",")
        cells[min(field, len(cells) - 1)] = junk
        lines[row] = ",".join(cells)
    path = tmp_path / "station.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    before = path.read_bytes()
    rc, out, err = _run(capsys, ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth",
                                 "180", "--sky", path, "--accept-weather-warnings", "--json"])
    _check(rc, out, err, [path.name])
    assert path.read_bytes() == before


IRRADIANCE_OPTIONS = ["--tilt", "--azimuth", "--model", "--clearsky", "--solar-constant",
                      "--year", "--step", "--sky"]


@given(pairs=st.lists(st.tuples(st.sampled_from(IRRADIANCE_OPTIONS), VALUES), min_size=1,
                      max_size=3))
def test_mutated_irradiance_arguments(capsys, pairs):
    argv = ["irradiance", "kelpie-creek-shed", "--json"]
    given_options = {o for o, _ in pairs}
    for option, default in (("--tilt", "30"), ("--azimuth", "0")):
        if option not in given_options:
            argv += [option, default]
    for option, value in pairs:
        argv += [option, value]
    rc, out, err = _run(capsys, argv)
    _check(rc, out, err, [o for o, _ in pairs] + ["tiltyard irradiance", "kelpie-creek-shed"])
