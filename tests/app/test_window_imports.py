"""The window and its first view (the Site form) open before the numerical stack and the
chart library load: start-up loads them after the first paint (tests/benchmarks/bench_app.py
times it against a bare PySide6 window)."""

from __future__ import annotations

import subprocess
import sys

HEAVY = ("pandas", "pvlib", "scipy", "pyqtgraph", "numpy")

CODE = """
import sys
from PySide6.QtWidgets import QApplication
from tiltyard.app import theme
from tiltyard.app.desktop import create_window
app = QApplication([])
theme.apply(app)
w = create_window("larkmoor-dairy")
w.show()
app.processEvents()
assert w.current_view().__class__.__name__ == "SiteView", w.current_view()
assert w.current_view().name.edit.text().startswith("Larkmoor"), "the Site form shows the site"
print(sorted({m.split('.')[0] for m in sys.modules} & set(%r)))
w.runner.shutdown()
"""


def test_the_window_and_the_site_view_open_without_the_numerical_stack():
    out = subprocess.run([sys.executable, "-c", CODE % (HEAVY,)], capture_output=True,
                         text=True, timeout=120, env={**__import__("os").environ,
                                                      "QT_QPA_PLATFORM": "offscreen"})
    assert out.returncode == 0, out.stderr[-3000:]
    assert out.stdout.strip().splitlines()[-1] == "[]", out.stdout
