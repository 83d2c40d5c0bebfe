"""Import architecture: the engine never imports Qt, pyqtgraph or the app.

Two checks: a static one over every source file under ``engine/`` (any import
statement, also inside functions), and a dynamic one that imports every engine
module in a fresh interpreter and looks at ``sys.modules``.
"""

import ast
import pathlib
import subprocess
import sys

ENGINE = pathlib.Path(__file__).resolve().parents[1] / "engine"
FORBIDDEN = ("PySide6", "PyQt5", "PyQt6", "shiboken6", "pyqtgraph", "tiltyard.app")


def _imports(path: pathlib.Path):
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                yield node.lineno, alias.name
        elif isinstance(node, ast.ImportFrom):
            if node.level:  # relative import inside the engine
                if node.module and node.module.split(".")[0] == "app":
                    yield node.lineno, "tiltyard.app"
                continue
            yield node.lineno, node.module or ""


def test_engine_sources_do_not_import_qt():
    files = sorted(ENGINE.rglob("*.py"))
    assert len(files) >= 8
    bad = [f"{f.name}:{line}: {name}" for f in files for line, name in _imports(f)
           if any(name == x or name.startswith(x + ".") for x in FORBIDDEN)]
    assert bad == []


def test_importing_the_engine_loads_no_qt():
    modules = [".".join(("tiltyard.engine", *f.relative_to(ENGINE).with_suffix("").parts))
               for f in sorted(ENGINE.rglob("*.py")) if f.stem != "__init__"]
    code = ("import importlib, sys\n"
            f"for m in {modules!r}: importlib.import_module(m)\n"
            f"bad = [m for m in sys.modules if m.split('.')[0] in {FORBIDDEN!r} "
            "or m.startswith('tiltyard.app')]\n"
            "print(bad); sys.exit(1 if bad else 0)\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120)
    assert out.returncode == 0, out.stdout + out.stderr
