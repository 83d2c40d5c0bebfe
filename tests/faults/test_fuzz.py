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
import re
from pathlib import Path

import pytest
from hypothesis import HealthCheck, event, given, settings
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
    event(f"exit {rc}")                 # counts shown by --hypothesis-show-statistics
    assert rc in (0, 2), err
    assert "Traceback" not in err and "internal fault" not in err, err
    if rc == 2:
        lines = err.strip().splitlines()
        assert len(lines) == 1, err
        # names as the one line shows them (runs of white space as one space)
        assert any(" ".join(n.split()) in lines[0] for n in names), (names, lines[0])
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


# -- every subcommand's arguments -------------------------------------------------------

#: The tests below run five times their examples under the ci profile (not ten, like the
#: ones above: the CI fault step stays within its few minutes).
SCALE = 5 if os.environ.get("HYPOTHESIS_PROFILE") == "ci" else 1
DATES = st.sampled_from(["2024-06-21", "1582-10-10", "0001-01-01", "2262-04-12", "9999-12-31",
                         "2024-02-30", "2023-02-29", "2024-13-01", "2024-1-1", "24-06-21",
                         "today", "2024-06-21T12:00", "-2024-01-01", ""])
SITE_ARGS = st.sampled_from(["larkmoor-dairy", "kelpie-creek-shed", "no-such-demo",
                             "missing.json", "folder", "not-json.json", "folder/"])


def _site_arg(folder: Path, name: str) -> str:
    """A SITE argument in ``folder``: a demo name, or a path to a missing file, a folder or
    a file that is no site file."""
    (folder / "folder").mkdir(exist_ok=True)
    (folder / "not-json.json").write_text("plain text, not JSON\n", encoding="utf-8")
    return str(folder / name) if name.endswith(("json", "folder", "/")) else name


def _files(folder: Path) -> dict:
    return {p.relative_to(folder).as_posix(): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


@settings(max_examples=60 * SCALE)
@given(site=st.one_of(st.just("larkmoor-dairy"), SITE_ARGS), pairs=st.lists(st.tuples(st.sampled_from(["--date", "--step"]),
                                                st.one_of(DATES, VALUES)), max_size=3),
       json_flag=st.booleans())
def test_mutated_sun_arguments(tmp_path, capsys, site, pairs, json_flag):
    argv = ["sun", _site_arg(tmp_path, site)] + (["--json"] if json_flag else [])
    if "--date" not in {o for o, _ in pairs}:
        argv += ["--date", "2024-06-21"]
    for option, value in pairs:
        argv += [option, value]
    before = _files(tmp_path)
    rc, out, err = _run(capsys, argv)
    _check(rc, out, err, [o for o, _ in pairs] + ["tiltyard sun", Path(argv[1]).name, "--date"])
    if rc == 0 and not json_flag:
        assert "nan" not in out.lower() and "inf" not in out.lower(), out[:300]
    assert _files(tmp_path) == before


@settings(max_examples=30 * SCALE)
@given(words=st.lists(st.one_of(st.sampled_from(["--json", "--verbose", "--bogus", "x",
                                                 "--json=1", "-", "--", "larkmoor-dairy"]),
                                st.text(max_size=6)), max_size=3))
def test_mutated_sites_arguments(capsys, words):
    import shlex

    rc, out, err = _run(capsys, ["sites", *words])
    # a stray word is named quoted, or as Python shows it if it holds control characters
    _check(rc, out, err, ["tiltyard sites", *[shlex.quote(w) if w.isprintable() else repr(w)
                                              for w in words]])
    if rc == 0:
        assert "larkmoor-dairy" in out


SHEET_VALUE_OPTIONS = ["--paper", "--preparer", "--organisation", "--prepared", "--client",
                       "--address", "--reference", "--times", "--hourly-options", "--sky",
                       "--objective", "--tilt-step", "--mounting", "--year", "--step",
                       "--switch-dates", "--time-zone", "--columns"]
SHEET_OUTPUTS = ["-o", "--csv-monthly", "--csv-options", "--csv-hourly", "--json-out"]
#: Where an output may point: a new file, the site file, a link to it, a folder, a folder
#: that does not exist, an existing older output, an empty name.
OUTPUT_TARGETS = st.one_of(st.sampled_from(["a.pdf", "b.csv", "c.json", "d.out"]),
                           st.sampled_from(["site.json", "link.json", "folder", "no/such.out",
                                            "old.out", "", "a.pdf"]))


@settings(max_examples=40 * SCALE)
@given(outputs=st.lists(st.tuples(st.sampled_from(SHEET_OUTPUTS), OUTPUT_TARGETS),
                        min_size=0, max_size=3),
       pairs=st.lists(st.tuples(st.sampled_from(SHEET_VALUE_OPTIONS),
                                st.one_of(VALUES, DATES, st.sampled_from(
                                    ["a4", "letter", "clock", "solar", "recommended",
                                     "fixed-optimal,nonsense", "Ms \u00e9 O'Neil"]))),
                      max_size=2))
def test_mutated_sheet_arguments(capsys, outputs, pairs):
    """``sheet`` with mutated options and output paths, some of them an input: exit 0 or 2,
    one line, nothing changed on 2, no NaN or infinity in any file written on 0."""
    import tempfile

    with tempfile.TemporaryDirectory() as name:
        folder = Path(name)
        site = folder / "site.json"
        site.write_text(json.dumps(SAMPLE), encoding="utf-8")
        (folder / "link.json").symlink_to(site)
        (folder / "folder").mkdir()
        (folder / "old.out").write_text("an older output\n", encoding="utf-8")
        argv = ["sheet", site, "--preparer", "P", "--organisation", "O", "--paper", "a4",
                "--times", "clock", "--prepared", "2024-01-01"]
        for flag, target in outputs:
            argv += [flag, (folder / target) if target else ""]
        for option, value in pairs:
            argv += [option, value]
        before = _files(folder)
        rc, out, err = _run(capsys, argv)
        _check(rc, out, err, [o for o, _ in pairs] + [f for f, _ in outputs]
               + ["tiltyard sheet", site.name] + ([] if outputs else ["-o FILE.pdf"]))
        after = _files(folder)
        assert after["site.json"] == before["site.json"]
        if rc == 2:
            assert after == before
        else:
            for path, data in after.items():
                if data != before.get(path):
                    text = (_pdf_text(data) if data.startswith(b"%PDF")
                            else data.decode("utf-8"))
                    assert not NOT_A_NUMBER.search(text), (path, text[:300])


#: A number that is none: nan, inf, infinity as words of their own, any case.
NOT_A_NUMBER = re.compile(r"(?<![A-Za-z])(nan|inf|infinity)(?![A-Za-z])", re.IGNORECASE)


def _pdf_text(data: bytes) -> str:
    import io

    import pypdf

    return " ".join(page.extract_text() for page in pypdf.PdfReader(io.BytesIO(data)).pages)


# -- EPW weather files ----------------------------------------------------------------

@pytest.fixture(scope="module")
def epw_lines(tmp_path_factory, write_epw):
    """A whole EPW year (pvlib's TMY3 sample written as EPW), as lines."""
    import pvlib

    data, meta = pvlib.iotools.read_tmy3(Path(pvlib.__file__).parent / "data" / "723170TYA.CSV",
                                         map_variables=True)
    path = write_epw(tmp_path_factory.mktemp("epw") / "greensboro.epw", data, meta)
    return path.read_text(encoding="utf-8").splitlines()


EPW_JUNK = st.sampled_from(["", "abc", "-9999", "9999", "1e400", "nan", "-inf", "99999999",
                            "\ufeff", ",,,", "0x10", " 12 ", "-0", "1,5"])
#: Dates and hours that do not exist (year, month, day, hour) and a year far outside pandas.
EPW_BAD_DATES = st.sampled_from([(1999, 2, 30, 1), (1999, 2, 29, 5), (1999, 4, 31, 1),
                                 (1999, 13, 1, 1), (1999, 0, 5, 1), (1999, 6, 0, 1),
                                 (1999, 6, 1, 0), (1999, 6, 1, 25), (1500, 6, 1, 1),
                                 (99999, 6, 1, 1), (1999, 6, 1, -1), (1999, 6, 1, 1.5)])
#: Header time zones (hours from UTC): beyond any zone (+-20), odd and not numbers.
EPW_ZONES = st.sampled_from(["20", "-20", "20.0", "-20.5", "14", "-12", "5.75", "99", "nan",
                             "inf", "abc", "", "1e400"])
EPW_MUTATION = st.one_of(
    st.tuples(st.just("truncate"), st.integers(0, 8800), st.integers(0, 400)),
    st.tuples(st.just("field"), st.integers(8, 8767), st.integers(0, 34), EPW_JUNK),
    st.tuples(st.just("gap"), st.integers(8, 8767), st.integers(1, 800)),
    st.tuples(st.just("duplicate"), st.integers(8, 8767), st.integers(1, 30)),
    st.tuples(st.just("zone"), EPW_ZONES),
    st.tuples(st.just("date"), st.integers(8, 8767), EPW_BAD_DATES),
    st.tuples(st.just("header"), st.integers(0, 7), EPW_JUNK),
)


def _mutate_epw(lines: list[str], mutation) -> list[str]:
    kind, *rest = mutation
    lines = list(lines)
    if kind == "truncate":                  # cut after a line, and part-way into the next
        keep, chars = rest
        cut = lines[keep][:chars] if keep < len(lines) else None
        lines = lines[:keep] + ([cut] if cut else [])
    elif kind == "field" and rest[0] < len(lines):
        row, field, junk = rest
        cells = lines[row].split(",")
        cells[min(field, len(cells) - 1)] = junk
        lines[row] = ",".join(cells)
    elif kind == "gap":
        row, n = rest
        del lines[row:row + n]
    elif kind == "duplicate" and rest[0] < len(lines):
        row, n = rest
        lines[row + 1:row + 1] = [lines[row]] * n
    elif kind == "zone" and lines:
        cells = lines[0].split(",")
        cells[8] = rest[0]
        lines[0] = ",".join(cells)
    elif kind == "date" and rest[0] < len(lines):
        row, date = rest
        cells = lines[row].split(",")
        cells[:4] = [f"{v:g}" for v in date]
        lines[row] = ",".join(cells)
    elif kind == "header" and rest[0] < len(lines):
        row, junk = rest
        cells = lines[row].split(",")
        cells[min(len(cells) - 1, 1 + row % 3)] = junk
        lines[row] = ",".join(cells)
    return lines


@settings(max_examples=40 * SCALE)
@given(mutations=st.lists(EPW_MUTATION, min_size=1, max_size=3))
def test_mutated_epw_files(tmp_path, capsys, epw_lines, mutations):
    """An EPW year cut short, garbled, with gaps, duplicates, odd header zones and dates
    that do not exist: exit 0 or 2 with one line naming the file, and the file unchanged."""
    lines = epw_lines
    for mutation in mutations:
        lines = _mutate_epw(lines, mutation)
    path = tmp_path / "station.epw"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    before = path.read_bytes()
    rc, out, err = _run(capsys, ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth",
                                 "180", "--sky", path, "--accept-weather-warnings", "--json"])
    _check(rc, out, err, [path.name])
    assert path.read_bytes() == before


@pytest.mark.parametrize("zone", ["20", "-20"])
def test_an_epw_header_zone_beyond_any_is_one_line_naming_it(tmp_path, capsys, epw_lines,
                                                               zone):
    path = tmp_path / "far.epw"
    path.write_text("\n".join(_mutate_epw(epw_lines, ("zone", zone))) + "\n", encoding="utf-8")
    rc, out, err = _run(capsys, ["irradiance", "larkmoor-dairy", "--tilt", "30", "--azimuth",
                                 "180", "--sky", path, "--accept-weather-warnings"])
    assert rc == 2 and err.count("\n") == 1 and "far.epw" in err, err
    assert zone in err or "zone" in err.lower(), err
