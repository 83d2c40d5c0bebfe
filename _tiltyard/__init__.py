"""Tiltyard: solar site assessment for feasibility studies.

The computation lives in :mod:`tiltyard.engine` (no Qt); the desktop app and
the command line live in :mod:`tiltyard.app`.
"""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("tiltyard")
except PackageNotFoundError:  # running from a source tree that is not installed
    __version__ = "0.0.0+unknown"

__all__ = ["__version__"]
