"""Every view rendered to PNG for a northern, a southern and a tropical demo site.

The images go to tests/artefacts/ (not committed) for a person to look at; the
test checks that each view rendered at full size and is not blank.
"""

from __future__ import annotations

import os

import pytest
from PySide6.QtGui import QImage

from tiltyard.app.desktop import create_window

SITES = ("larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic")


@pytest.mark.parametrize("demo", SITES)
def test_every_view_renders(qtbot, idle, artefacts_dir, demo):
    w = create_window(demo)
    w.ask_unsaved = lambda: "discard"
    qtbot.addWidget(w)
    w.resize(1280, 820)
    w.show()
    try:
        for title in list(w.views):
            w.show_view(title)
            idle(w.runner, 120.0)
            qtbot.wait(50)
            name = title.lower().replace(" ", "-")
            path = os.path.join(artefacts_dir, f"window-{demo}-{name}.png")
            assert w.grab().save(path)
            img = QImage(path)
            assert img.width() >= 1200 and img.height() >= 780
            # not blank: more than a handful of distinct colours in the view area
            colours = {img.pixel(x, y) for x in range(160, img.width(), 5)
                       for y in range(30, img.height() - 60, 5)}
            assert len(colours) > 3, f"{title} looks blank"
            assert not w.banner.isVisible() or w.banner.level != "error", w.banner.text
    finally:
        w.close()
        assert w.runner.active_thread_count() == 0
