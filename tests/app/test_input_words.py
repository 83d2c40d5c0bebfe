"""Forgiving input and the user's words: degree-sign look-alikes, the obstacle form's
messages and its Enter right after the last key, the Site view's client fields."""

from __future__ import annotations

import re

import pytest

from tiltyard.app.views.horizon_view import HorizonView
from tiltyard.app.views.site_view import SiteView
from tiltyard.engine.site import parse_coordinate

IDENTIFIER = re.compile(r"\b[a-z]+_[a-z_]+\b")


@pytest.mark.parametrize("sign", ["°", "º", "˚"])
def test_degree_sign_look_alikes_are_degrees(sign):
    # 53°42′36″ = 53 + 42/60 + 36/3600 (sexagesimal, common practice, no source)
    assert parse_coordinate(f"53{sign}42'36\"N", "latitude") == pytest.approx(53.71)
    assert parse_coordinate(f"2{sign}28'48\"W", "longitude") == pytest.approx(-2.48)


def _obstacle_form(view, values):
    for name, text in values.items():
        view.obstacle_fields[name].edit.clear()
        if text:
            view._qtbot.keyClicks(view.obstacle_fields[name].edit, text)


def test_enter_straight_after_typing_adds_the_obstacle_without_a_false_error(
        qtbot, make_ctx):
    ctx = make_ctx()
    view = HorizonView(ctx)
    qtbot.addWidget(view)
    view.show()
    before = len(ctx.site.obstacles)
    fields = view.obstacle_fields
    for name, text in (("bearing_deg", "95"), ("width_deg", "12"), ("distance_m", "30")):
        qtbot.keyClicks(fields[name].edit, text)
    qtbot.keyClicks(fields["height_m"].edit, "4")
    qtbot.keyClick(fields["height_m"].edit, "\r")         # Enter within 0.3 s
    assert len(ctx.site.obstacles) == before + 1
    qtbot.wait(2 * fields["height_m"].COMMIT_MS)            # the pending commit falls due
    assert all(not f.message for f in fields.values()), [f.message for f in fields.values()]
    assert view.form_message.isHidden()


def test_obstacle_form_messages_use_the_form_labels(qtbot, make_ctx):
    ctx = make_ctx()
    view = HorizonView(ctx)
    qtbot.addWidget(view)
    view.show()
    qtbot.keyClicks(view.obstacle_fields["bearing_deg"].edit, "400")
    view.add_obstacle()
    texts = [view.form_message.text()] + [f.message for f in view.obstacle_fields.values()]
    joined = " ".join(texts)
    assert "bearing of centre" in joined.lower() and "height above panels" in joined.lower()
    assert not IDENTIFIER.search(joined), joined
    assert "''" not in joined and not re.search(r"\bdeg\b", joined), joined


def test_client_fields_are_stored_with_the_site_and_shown_again(qtbot, make_ctx, tmp_path):
    ctx = make_ctx()
    view = SiteView(ctx)
    qtbot.addWidget(view)
    view.show()
    typed = {"client": "Hollin Farm Partnership", "address": "Lane End, Larkmoor",
             "reference": "Q-2026-031"}
    for key, text in typed.items():
        e = view.client_fields[key]
        e.clear()
        qtbot.keyClicks(e, text)
        e.editingFinished.emit()
    for key, text in typed.items():
        assert getattr(ctx.site, key) == text
    assert ctx.document.dirty
    path = tmp_path / "site.json"
    ctx.document.save(path)
    ctx.document.undo_stack.undo()                      # the reference edit is undone
    assert ctx.site.reference != typed["reference"]
    assert view.client_fields["reference"].text() == ctx.site.reference
    ctx.document.open(path)                             # reopened: stored with the site
    assert {k: getattr(ctx.site, k) for k in typed} == typed
    assert {k: view.client_fields[k].text() for k in typed} == typed
    # a blanked field is stored blank (not printed on the sheet)
    view.client_fields["address"].clear()
    view.client_fields["address"].editingFinished.emit()
    assert ctx.site.address == ""
