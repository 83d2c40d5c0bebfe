"""IANA time zone from coordinates, offline (no Qt, no network).

``timezonefinder`` and the zone boundary data it ships (from
timezone-boundary-builder, OpenStreetMap data). The boundaries load on first
use (a fraction of a second); the finder is kept for the process.
"""

from __future__ import annotations

import threading
from functools import lru_cache

_lock = threading.Lock()


@lru_cache(maxsize=1)
def _finder():
    from timezonefinder import TimezoneFinder
    return TimezoneFinder()


def timezone_at(latitude_deg: float, longitude_deg: float) -> str | None:
    """IANA time zone at the coordinates, or None at sea far from any zone."""
    with _lock:
        finder = _finder()
        return finder.timezone_at(lng=float(longitude_deg), lat=float(latitude_deg))


__all__ = ["timezone_at"]
