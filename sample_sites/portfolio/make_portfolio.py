"""Write the invented demo portfolio: sites.csv (about 300 roofs and plots) and sites.geojson
(a dozen of them as GeoJSON points).

An invented scenario: the roofs and spare ground of "Brackenfold Homes", a housing
association of our own imagining, in three invented districts; names, numbers and values
are made up here (fixed seed), not real addresses or measurements. A few rows are
deliberately bad, to show the errors file. Run from anywhere:

    python sample_sites/portfolio/make_portfolio.py
"""

from __future__ import annotations

import csv
import json
import random
from pathlib import Path

SEED = 16
HERE = Path(__file__).resolve().parent
MONTHS = ("jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec")
#: Three invented districts: centre (lat, lon), spread (deg), a zone or None (looked up).
DISTRICTS = (
    ("Harrowgate Fold", 53.9, -1.6, 0.35, "Europe/London"),
    ("Sallow Reach", 44.6, 4.9, 0.45, None),
    ("Cobble Downs", -33.8, 150.9, 0.30, "Australia/Sydney"),
)
#: Invented monthly mean daily GHI shapes, kWh/m2/day (northern mid-latitude, January
#: first); the southern district takes them half a year on.
GHI_SHAPE = (0.7, 1.4, 2.5, 3.8, 4.9, 5.3, 5.1, 4.3, 3.0, 1.8, 0.9, 0.5)
STREETS = ("Alder", "Birch", "Cinder", "Dove", "Elm", "Fern", "Gorse", "Heron", "Ivy",
           "Juniper", "Kestrel", "Linden", "Moss", "Nettle", "Osier", "Plover")
KINDS = ("terrace roof", "block roof", "garage roof", "flat roof", "spare plot")
HEADER = (["id", "name", "latitude_deg", "longitude_deg", "elevation_m", "timezone",
           "albedo"] + [f"ghi_{m}_kwh_m2_day" for m in MONTHS]
          + ["plane1_label", "plane1_tilt_deg", "plane1_azimuth_deg", "plane1_mounting",
             "plane2_label", "plane2_tilt_deg", "plane2_azimuth_deg", "plane2_mounting"])
N_SITES = 300
#: Rows spoiled on purpose (row index -> column -> value), each with its reason.
BAD = {
    7: {"latitude_deg": "95"},                       # beyond the pole
    31: {"longitude_deg": "1,5"},                    # a decimal comma
    58: {"name": ""},                                # no name
    104: {"plane1_tilt_deg": "120"},                 # steeper than vertical
    150: {"ghi_jul_kwh_m2_day": "-2"},               # negative irradiation
    199: {"plane1_mounting": "tracker"},             # not a mounting we know
    251: {"timezone": "Mars/Olympus"},               # not an IANA zone
}


def _site(rng: random.Random, i: int) -> dict:
    district, lat0, lon0, spread, zone = DISTRICTS[i % len(DISTRICTS)]
    lat = round(lat0 + rng.uniform(-spread, spread), 4)
    lon = round(lon0 + rng.uniform(-spread, spread), 4)
    kind = rng.choice(KINDS)
    row = {"id": f"BF-{i + 1:04d}",
           "name": f"{district}, {rng.randint(1, 120)} {rng.choice(STREETS)} Row, {kind}",
           "latitude_deg": lat, "longitude_deg": lon,
           "elevation_m": rng.randint(5, 420), "timezone": zone or "",
           "albedo": rng.choice((0.18, 0.2, 0.22, 0.25))}
    if rng.random() < 0.6:      # most sites have a local monthly table, the rest clear sky
        scale = rng.uniform(0.85, 1.25)
        shape = GHI_SHAPE if lat > 0 else GHI_SHAPE[6:] + GHI_SHAPE[:6]
        for m, v in zip(MONTHS, shape, strict=True):
            row[f"ghi_{m}_kwh_m2_day"] = round(v * scale * rng.uniform(0.93, 1.07), 2)
    equator = 180 if lat > 0 else 0
    if kind in ("terrace roof", "block roof", "garage roof"):
        az = (equator + rng.choice((-90, -45, -20, 0, 0, 15, 30, 60, 90))) % 360
        row.update(plane1_label="main slope", plane1_tilt_deg=rng.choice((15, 22, 30, 35, 40)),
                   plane1_azimuth_deg=az, plane1_mounting="flush")
        if kind == "terrace roof" and rng.random() < 0.5:   # the other slope of a gable
            row.update(plane2_label="rear slope", plane2_tilt_deg=row["plane1_tilt_deg"],
                       plane2_azimuth_deg=(az + 180) % 360, plane2_mounting="flush")
    elif kind == "flat roof":
        row.update(plane1_label="flat roof", plane1_tilt_deg=rng.choice((0, 2, 3)),
                   plane1_azimuth_deg=equator, plane1_mounting="flat-roof-rows")
    else:                       # spare ground: rows on a field, nothing built yet
        row.update(plane1_label="plot", plane1_tilt_deg=0, plane1_azimuth_deg=equator,
                   plane1_mounting="ground-rows")
    return row


def sites(seed: int = SEED, n: int = N_SITES) -> list[dict]:
    """The portfolio's rows (bad rows included), the same for the same seed."""
    rng = random.Random(seed)
    rows = [_site(rng, i) for i in range(n)]
    for i, change in BAD.items():
        if i < n:
            rows[i].update(change)
    return rows


def write_csv(rows: list[dict], path: Path) -> None:
    with open(path, "w", encoding="utf-8", newline="") as fh:
        w = csv.DictWriter(fh, fieldnames=HEADER, lineterminator="\n")
        w.writeheader()
        for r in rows:
            w.writerow({k: r.get(k, "") for k in HEADER})


def write_geojson(rows: list[dict], path: Path) -> None:
    features = []
    for r in rows:
        props = {k: v for k, v in r.items() if k not in ("latitude_deg", "longitude_deg")
                 and v != "" and not k.startswith("ghi_")}
        ghi = [r.get(f"ghi_{m}_kwh_m2_day") for m in MONTHS]
        if all(v not in (None, "") for v in ghi):
            props["monthly_ghi_kwh_m2_day"] = ghi
        features.append({"type": "Feature", "properties": props,
                         "geometry": {"type": "Point",
                                      "coordinates": [r["longitude_deg"], r["latitude_deg"]]}})
    doc = {"type": "FeatureCollection", "features": features}
    path.write_text(json.dumps(doc, indent=1) + "\n", encoding="utf-8")


def main() -> None:
    rows = sites()
    write_csv(rows, HERE / "sites.csv")
    good = [r for i, r in enumerate(rows) if i not in BAD]
    write_geojson(good[:11] + [rows[7]], HERE / "sites.geojson")   # one bad feature too
    print(f"wrote {HERE / 'sites.csv'} ({len(rows)} sites, {len(BAD)} bad on purpose) and "
          f"{HERE / 'sites.geojson'} (12 features, 1 bad)")


if __name__ == "__main__":
    main()
