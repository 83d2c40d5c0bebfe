"""Render the Tiltyard icon (packaging/icons/tiltyard.svg) to PNG files with Qt.

Writes ``packaging/icons/tiltyard-<N>.png`` for every size in :data:`SIZES` (square,
transparent outside the rounded tile). Runs without a display (Qt's offscreen
platform). The PNGs are committed; run this again after editing the SVG::

    python packaging/make_icons.py            # write the PNGs beside the SVG
    python packaging/make_icons.py --out DIR  # write them elsewhere
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

ICON_DIR = Path(__file__).resolve().parent / "icons"
SVG_PATH = ICON_DIR / "tiltyard.svg"
#: Pixel sizes rendered (the freedesktop hicolor sizes the desktop entry installs).
SIZES = (16, 32, 48, 64, 128, 256, 512)


def png_name(size_px: int) -> str:
    """File name of the PNG rendering at ``size_px`` pixels."""
    return f"tiltyard-{size_px}.png"


def render(svg_path: Path, size_px: int):
    """Render ``svg_path`` to a square ``size_px`` x ``size_px`` QImage (ARGB, antialiased)."""
    from PySide6.QtCore import Qt
    from PySide6.QtGui import QImage, QPainter
    from PySide6.QtSvg import QSvgRenderer

    renderer = QSvgRenderer(str(svg_path))
    if not renderer.isValid():
        raise ValueError(f"{svg_path}: not a valid SVG for Qt's renderer")
    image = QImage(size_px, size_px, QImage.Format.Format_ARGB32)
    image.fill(Qt.GlobalColor.transparent)
    painter = QPainter(image)
    painter.setRenderHint(QPainter.RenderHint.Antialiasing)
    painter.setRenderHint(QPainter.RenderHint.SmoothPixmapTransform)
    renderer.render(painter)
    painter.end()
    return image


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--svg", type=Path, default=SVG_PATH, help="source SVG")
    parser.add_argument("--out", type=Path, default=ICON_DIR, help="folder for the PNG files")
    args = parser.parse_args(argv)

    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from PySide6.QtGui import QGuiApplication

    app = QGuiApplication.instance() or QGuiApplication(sys.argv[:1])  # noqa: F841 (kept alive)
    args.out.mkdir(parents=True, exist_ok=True)
    for size_px in SIZES:
        image = render(args.svg, size_px)
        target = args.out / png_name(size_px)
        if not image.save(str(target), "PNG"):
            sys.stderr.write(f"make_icons: could not write {target}\n")
            return 1
        print(f"{target} ({size_px}x{size_px})")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
