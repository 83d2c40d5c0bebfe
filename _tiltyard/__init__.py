"""Tiltyard: solar site assessment for feasibility studies.

The computation lives in :mod:`tiltyard.engine` (no Qt); the desktop app and
the command line live in :mod:`tiltyard.app`.
"""

import functools


@functools.cache
def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("tiltyard")
    except PackageNotFoundError:  # running from a source tree that is not installed
        return "0.0.0+unknown"


def __getattr__(name: str):
    # ``__version__`` is looked up on first use: importing importlib.metadata costs a
    # command line's ``--help`` a fifth of its start-up
    if name == "__version__":
        return _version()
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


__all__ = ["__version__"]
