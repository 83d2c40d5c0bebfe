"""Grab chart views of the demo sites to PNG, for looking at them (not for the README).

    QT_QPA_PLATFORM=offscreen python packaging/grab_views.py OUT_DIR [SITE ...] [--sizes 1280x720,1920x1080]
        [--views "Horizon,Sun path,Irradiance,Tilt study"]

Writes ``OUT_DIR/<site>-<view>-<w>x<h>.png`` and a grey copy ``...-grey.png``.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

SITES = ("larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic", "tarnvik-cabin")
VIEWS = ("Horizon", "Sun path", "Irradiance", "Tilt study")


def _wait(app, w, seconds=120):
    end = time.monotonic() + seconds
    while time.monotonic() < end:
        app.processEvents()
        time.sleep(0.02)
        if not w.runner.is_busy():
            break
    for _ in range(30):
        app.processEvents()
        time.sleep(0.005)


def main(argv):
    args = list(argv)
    sizes, views = ["1280x720", "1920x1080"], list(VIEWS)
    if "--sizes" in args:
        i = args.index("--sizes")
        sizes = args[i + 1].split(",")
        del args[i:i + 2]
    if "--views" in args:
        i = args.index("--views")
        views = args[i + 1].split(",")
        del args[i:i + 2]
    out = Path(args[0])
    sites = args[1:] or list(SITES)
    out.mkdir(parents=True, exist_ok=True)
    home = tempfile.mkdtemp()
    os.environ.update(HOME=home, XDG_CONFIG_HOME=home, XDG_DATA_HOME=home)
    from PySide6.QtGui import QImage
    from PySide6.QtWidgets import QApplication

    from tiltyard.app import theme
    from tiltyard.app.desktop import create_window

    app = QApplication.instance() or QApplication([])
    theme.apply(app)
    for site in sites:
        w = create_window(site)
        w.ask_unsaved = lambda: "discard"
        w.show()
        for size in sizes:
            wd, ht = (int(v) for v in size.split("x"))
            w.resize(wd, ht)
            for title in views:
                w.show_view(title)
                _wait(app, w)
                img = w.grab().toImage()
                path = out / f"{site}-{title.lower().replace(' ', '-')}-{size}.png"
                img.save(str(path))
                img.convertToFormat(QImage.Format.Format_Grayscale8).save(
                    str(path.with_name(path.stem + "-grey.png")))
                print("wrote", path, flush=True)
        w.runner.shutdown()
        w.close()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
