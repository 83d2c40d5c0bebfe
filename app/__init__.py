"""Tiltyard desktop app and command line (PySide6 + pyqtgraph over the engine)."""
