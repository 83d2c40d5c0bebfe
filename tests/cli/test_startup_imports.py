"""What each command line start imports (issue 16, point 7): ``--version``, ``--help``
and every subcommand's ``--help`` load none of numpy, pandas, pvlib or Qt, and no
engine module but the two in the standard library only (``choices`` and ``words``); a subcommand loads the engine it uses and no Qt unless it draws (the
sheet, the desktop app).

Each case runs in a fresh interpreter and lists ``sys.modules`` at exit.
"""

import json
import subprocess
import sys

import pytest

HEAVY = ("numpy", "pandas", "pvlib", "scipy", "PySide6", "shiboken6", "pyqtgraph",
         "tiltyard.engine", "tiltyard.app.desktop")
QT = ("PySide6", "shiboken6", "pyqtgraph")

_RUN = """
import contextlib, io, json, sys
from tiltyard.app.cli import main
with contextlib.redirect_stdout(io.StringIO()) as out:
    code = main(sys.argv[1:])
light = ("tiltyard.engine", "tiltyard.engine.choices", "tiltyard.engine.words")
heavy = sorted({h for m in sys.modules for h in HEAVY
                if (m == h or m.startswith(h + ".")) and m not in light})
print(json.dumps({"code": code, "heavy": heavy, "out": out.getvalue()}))
"""


def _start(*args):
    code = _RUN.replace("HEAVY", repr(HEAVY), 1)
    out = subprocess.run([sys.executable, "-c", code, *args], capture_output=True, text=True,
                         timeout=120)
    assert out.returncode == 0, out.stderr
    return json.loads(out.stdout.strip().splitlines()[-1])


@pytest.mark.parametrize("args", [["--version"], ["--help"], ["sun", "--help"],
                                  ["--verbose", "--help"], ["study", "--help"],
                                  ["sheet", "--help"], ["irradiance", "--help"],
                                  ["batch", "--help"], ["sites", "--help"],
                                  ["study", "-h", "--verbose"]])
def test_version_and_help_import_no_engine(args):
    # a subcommand's help lists its choices from tiltyard.engine.choices (standard
    # library only), not from the modules that compute
    got = _start(*args)
    assert got["code"] == 0
    assert got["heavy"] == []
    assert "tiltyard" in got["out"]


def test_version_text():
    from tiltyard import __version__

    assert _start("--version")["out"] == f"tiltyard {__version__}\n"


def test_help_lists_every_subcommand_without_the_engine():
    out = _start("--help")["out"]
    for name in ("sites", "sun", "irradiance", "study", "sheet"):
        assert f"    {name}" in out


def test_usage_error_is_still_exit_2_without_the_engine():
    got = _start("sun")             # SITE and --date missing
    assert got["code"] == 2
    assert not [m for m in got["heavy"] if m in ("numpy", "pandas", "pvlib")]


def test_subcommands_load_no_qt():
    for args in (["study", "--help"], ["sites"],
                 ["sun", "larkmoor-dairy", "--date", "2023-06-21"]):
        got = _start(*args)
        assert got["code"] == 0, args
        assert not [m for m in got["heavy"] if m in QT], (args, got["heavy"])
    assert "tiltyard.engine" in _start("sun", "larkmoor-dairy", "--date", "2023-06-21")["heavy"]


def test_subcommand_help_names_the_engines_choices():
    # the help's choices are the engine's own (tiltyard.engine.choices is their one home)
    from tiltyard.engine.plane import TRANSPOSITION_MODELS
    from tiltyard.engine.site import MOUNTINGS
    from tiltyard.engine.tilt import OPTION_KINDS

    study = _start("study", "--help")["out"]
    assert "{" + ",".join(TRANSPOSITION_MODELS) + "}" in study
    assert "{" + ",".join(MOUNTINGS) + "}" in study
    sheet = "".join(_start("sheet", "--help")["out"].split())   # wrapped at any hyphen
    assert ",".join(OPTION_KINDS) in sheet
