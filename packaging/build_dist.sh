#!/usr/bin/env bash
# Build Tiltyard's wheel and sdist into dist/ with `python -m build` (PEP 517, isolated build
# environment from pyproject.toml's [build-system]), then check that both carry the package data.
#
#   packaging/build_dist.sh            # uses $PYTHON (default python3.11, else python3)
#   PYTHON=/path/to/python packaging/build_dist.sh
#
# When that Python has no `build` package, a throw-away venv under build/ gets one from PyPI.
set -euo pipefail

root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$root"
export PIP_DISABLE_PIP_VERSION_CHECK=1

python="${PYTHON:-}"
if [ -z "$python" ]; then
    if command -v python3.11 >/dev/null 2>&1; then python=python3.11; else python=python3; fi
fi

# -I: not from the current folder, where build/ (this script's own work folder) would pass
if ! "$python" -I -c "import build.__main__" >/dev/null 2>&1; then
    venv="$root/build/dist-venv"
    echo "== no 'build' package for $python: installing it into $venv"
    [ -x "$venv/bin/python" ] || "$python" -m venv "$venv"
    "$venv/bin/pip" install -q "build>=1.2,<2"
    python="$venv/bin/python"
fi

version="$("$python" - <<'EOF'
import tomllib
with open("pyproject.toml", "rb") as f:
    print(tomllib.load(f)["project"]["version"])
EOF
)"
wheel="dist/tiltyard-$version-py3-none-any.whl"
sdist="dist/tiltyard-$version.tar.gz"
rm -f "$wheel" "$sdist"

echo "== python -m build (tiltyard $version)"
"$python" -m build --outdir dist .

echo "== check the archives"
"$python" - "$wheel" "$sdist" <<'EOF'
import sys
import tarfile
import tomllib
import zipfile
from pathlib import Path

wheel, sdist = sys.argv[1:]
names = zipfile.ZipFile(wheel).namelist()
need = ["tiltyard/__init__.py", "tiltyard/engine/site.py", "tiltyard/app/cli.py",
        "tiltyard/sample_sites/__init__.py", "tiltyard/sample_sites/larkmoor-dairy.json"]
missing = [n for n in need if n not in names]
entry = [n for n in names if n.endswith(".dist-info/entry_points.txt")]
scripts = zipfile.ZipFile(wheel).read(entry[0]).decode() if entry else ""
if "tiltyard = tiltyard.app.cli:main" not in scripts:
    missing.append("console script tiltyard = tiltyard.app.cli:main")
# every source folder with an __init__.py under a package-dir root must be in the wheel
with open("pyproject.toml", "rb") as f:
    package_dir = tomllib.load(f)["tool"]["setuptools"]["package-dir"]
for package, folder in package_dir.items():
    for init in sorted(Path(folder).rglob("__init__.py")):
        rel = init.parent.relative_to(folder).parts
        if "__pycache__" in rel:
            continue
        target = "/".join(package.split(".") + list(rel) + ["__init__.py"])
        if target not in names:
            missing.append(f"package {'.'.join([package, *rel])} ({init.parent}/)")
stray = [n for n in names if n.split("/")[0] in ("engine", "app", "_tiltyard", "tests")]
if missing or stray:
    sys.exit(f"{wheel}: missing {missing}, stray top-level entries {stray[:5]}")
sites = [n for n in names if n.startswith("tiltyard/sample_sites/") and n.endswith(".json")]
members = tarfile.open(sdist).getnames()
if not any(m.endswith("sample_sites/larkmoor-dairy.json") for m in members):
    sys.exit(f"{sdist}: the sample sites are missing")
print(f"{wheel}: {len(names)} files, {len(sites)} sample sites; {sdist}: {len(members)} members")
EOF
ls -l "$wheel" "$sdist"
