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
        # 256 colours, chosen from the image itself, are plenty for charts and forms
        # and keep the files small (Qt's own 8-bit conversion uses a fixed colour cube,
        # which bands the colour maps)
        img = img.convertToFormat(QImage.Format.Format_Indexed8, _palette(img),
                                  Qt.ImageConversionFlag.DiffuseDither)
        path = out / f"{title.lower().replace(' ', '-')}.png"
        img.save(str(path), "PNG", 80)
        print(f"wrote {path} ({path.stat().st_size // 1024} KiB)")
    w.runner.shutdown()
    w.close()
    return 0


def _palette(img, size: int = 256) -> list[int]:
    """The ``size`` most used colours of the QImage ``img``, binned at 5 bits a channel
    (each the mean colour of its bin), as a Qt colour table."""
    import numpy as np
    from PySide6.QtGui import QImage

    rgb = img.convertToFormat(QImage.Format.Format_RGB32)     # 4 bytes a pixel, no padding
    a = np.frombuffer(rgb.constBits(), dtype=np.uint32)[: rgb.width() * rgb.height()]
    r, g, b = (a >> 16) & 0xFF, (a >> 8) & 0xFF, a & 0xFF
    key = ((r >> 3) << 10) | ((g >> 3) << 5) | (b >> 3)
    counts = np.bincount(key, minlength=1 << 15)
    top = np.argsort(counts)[::-1][:size]
    top = top[counts[top] > 0]
    means = [np.bincount(key, weights=c, minlength=1 << 15)[top] / counts[top]
             for c in (r, g, b)]
    return [0xFF000000 | (int(rr) << 16) | (int(gg) << 8) | int(bb)
            for rr, gg, bb in zip(*means, strict=True)]


if __name__ == "__main__":
    raise SystemExit(main())
