#!/usr/bin/env bash
# Build the frozen one-folder Tiltyard app with PyInstaller and smoke-test it.
#
#   packaging/pyinstaller/build_frozen.sh          # -> dist/tiltyard/tiltyard
#   PYTHON=python3.12 packaging/pyinstaller/build_frozen.sh
#   TILTYARD_FROZEN_FRESH=1 packaging/pyinstaller/build_frozen.sh   # rebuild the venv too
#
# Steps: a venv of its own under build/frozen-venv (reused when present), `pip install` of the
# project (not editable, so its package data is installed as it ships) and PyInstaller;
# PyInstaller on packaging/pyinstaller/tiltyard.spec (work files in build/pyinstaller, the app
# in dist/tiltyard/); then the smoke test of the bundle:
#   dist/tiltyard/tiltyard --version
#   dist/tiltyard/tiltyard study larkmoor-dairy --json        (must parse as JSON)
#   QT_QPA_PLATFORM=offscreen TILTYARD_SMOKE_QUIT_MS=0 dist/tiltyard/tiltyard larkmoor-dairy
#                                                   (the app prints "tiltyard: window ready")
#   TILTYARD_BUNDLE_SELFCHECK=1 dist/tiltyard/tiltyard (place search, zone from coordinates,
#                                                   Linke turbidity, tzdata, Qt plugins)
#
# Linux is the only platform this was run on. Windows (Git Bash) and macOS builders can use the
# same spec, but this script and the spec are untested there (the venv's bin/ is Scripts/ on
# Windows and the program is tiltyard.exe).
set -euo pipefail

root="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
cd "$root"
export PIP_DISABLE_PIP_VERSION_CHECK=1

python="${PYTHON:-}"
if [ -z "$python" ]; then
    if command -v python3.11 >/dev/null 2>&1; then python=python3.11; else python=python3; fi
fi
venv="$root/build/frozen-venv"
app="$root/dist/tiltyard/tiltyard"
start=$(date +%s)

if [ "${TILTYARD_FROZEN_FRESH:-0}" = 1 ]; then rm -rf "$venv"; fi
if [ ! -x "$venv/bin/python" ]; then
    echo "== venv $venv ($("$python" --version))"
    "$python" -m venv "$venv"
fi
echo "== pip install the project and PyInstaller"
"$venv/bin/python" -m pip install -q --upgrade pip
# --force-reinstall --no-deps of the project: pick up source changes at the same version
"$venv/bin/python" -m pip install -q "$root" "pyinstaller>=6.10,<7"
"$venv/bin/python" -m pip install -q --no-deps --force-reinstall "$root"
"$venv/bin/python" -m PyInstaller --version

echo "== pyinstaller packaging/pyinstaller/tiltyard.spec"
rm -rf "$root/dist/tiltyard"
"$venv/bin/python" -m PyInstaller --noconfirm --clean --log-level WARN \
    --distpath "$root/dist" --workpath "$root/build/pyinstaller" \
    "$root/packaging/pyinstaller/tiltyard.spec"
built=$(date +%s)

echo "== smoke test: --version"
version_line="$("$app" --version)"
echo "$version_line"
expected="tiltyard $("$venv/bin/python" -c 'from importlib.metadata import version; print(version("tiltyard"))')"
if [ "$version_line" != "$expected" ]; then
    echo "build_frozen: --version printed '$version_line', expected '$expected'" >&2
    exit 1
fi

echo "== smoke test: study larkmoor-dairy --json"
study_json="$(mktemp)"
trap 'rm -f "$study_json"' EXIT
"$app" study larkmoor-dairy --json >"$study_json"
"$venv/bin/python" - "$study_json" <<'EOF'
import json
import sys

with open(sys.argv[1], encoding="utf-8") as f:
    doc = json.load(f)
if not isinstance(doc, dict) or not doc:
    sys.exit(f"study --json: expected a non-empty JSON object, got {type(doc).__name__}")
print(f"study --json: a JSON object with keys {', '.join(sorted(doc)[:8])}")
EOF

echo "== smoke test: the desktop app opens and quits (offscreen)"
window_out="$(QT_QPA_PLATFORM=offscreen TILTYARD_SMOKE_QUIT_MS=0 "$app" larkmoor-dairy 2>&1)"
echo "$window_out"
if ! grep -q "^tiltyard: window ready" <<<"$window_out"; then
    echo "build_frozen: the app did not report 'tiltyard: window ready'" >&2
    exit 1
fi

echo "== smoke test: bundled data (self-check)"
QT_QPA_PLATFORM=offscreen TILTYARD_BUNDLE_SELFCHECK=1 "$app"

done_at=$(date +%s)
echo "== bundle: $(du -sh "$root/dist/tiltyard" | cut -f1) in $(find "$root/dist/tiltyard" -type f | wc -l) files"
echo "== build took $(( built - start )) s (venv, install, PyInstaller); smoke test $(( done_at - built )) s"
echo "== frozen build passed: $app"
