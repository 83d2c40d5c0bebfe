"""Render the README's screenshots from the offscreen app.

    QT_QPA_PLATFORM=offscreen python packaging/make_screenshots.py [OUT_DIR]

Opens the desktop app on the demo site, waits for each view's engine work to
finish, grabs the window and saves it, scaled to 960 px wide, as
``docs/screenshots/<view>.png``.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

VIEWS = ("Site", "Horizon", "Sun path", "Irradiance", "Tilt study", "Sheet")
WIDTH_PX = 960


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    out = Path(argv[0]) if argv else Path(__file__).resolve().parent.parent / "docs" / "screenshots"
    out.mkdir(parents=True, exist_ok=True)
    home = tempfile.mkdtemp()            # no user preferences, recent files or autosave
    os.environ.update(HOME=home, XDG_CONFIG_HOME=home, XDG_DATA_HOME=home)
    from PySide6.QtCore import Qt
    from PySide6.QtGui import QImage
    from PySide6.QtWidgets import QApplication

    from tiltyard.app import theme
    from tiltyard.app.desktop import create_window

    app = QApplication.instance() or QApplication([])
    theme.apply(app)
    w = create_window("larkmoor-dairy")
    w.ask_unsaved = lambda: "discard"
    w.resize(1280, 820)
    w.show()
    for title in VIEWS:
        w.show_view(title)
        end = time.monotonic() + 120
        while time.monotonic() < end:
            app.processEvents()
            time.sleep(0.02)
            if not w.runner.is_busy():
                break
        for _ in range(10):
            app.processEvents()
        img = w.grab().toImage().scaledToWidth(WIDTH_PX,
                                               Qt.TransformationMode.SmoothTransformation)
        # 256 colours are plenty for charts and forms and keep the files small
        img = img.convertToFormat(QImage.Format.Format_Indexed8,
                                  Qt.ImageConversionFlag.ThresholdDither)
        path = out / f"{title.lower().replace(' ', '-')}.png"
        img.save(str(path), "PNG", 80)
        print(f"wrote {path} ({path.stat().st_size // 1024} KiB)")
    w.runner.shutdown()
    w.close()
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
