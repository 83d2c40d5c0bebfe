"""Site view driven as a user would, on the real widgets (offscreen)."""

from __future__ import annotations

from tiltyard.app.views.site_view import SiteView


def test_typing_a_latitude_changes_the_site(qtbot, make_ctx, idle):
    ctx = make_ctx()
    view = SiteView(ctx)
    qtbot.addWidget(view)
    view.tz_follow.setChecked(False)
    qtbot.keyClicks(view.latitude.edit, "x")       # 53.71x: not a number
    assert "latitude" in view.latitude.message or view.latitude.message
    assert ctx.site.latitude_deg == 53.71          # the last good value stays
    view.latitude.edit.clear()
    qtbot.keyClicks(view.latitude.edit, "51 30 N")
    qtbot.waitUntil(lambda: abs(ctx.site.latitude_deg - 51.5) < 1e-12)
    assert ctx.document.dirty
    idle(ctx.runner)


def test_out_of_range_latitude_shows_the_range_and_keeps_the_site(qtbot, make_ctx):
    ctx = make_ctx()
    view = SiteView(ctx)
    qtbot.addWidget(view)
    view.latitude.edit.clear()
    qtbot.keyClicks(view.latitude.edit, "95")
    assert "between -90° and 90°" in view.latitude.message
    qtbot.wait(2 * view.latitude.COMMIT_MS)
    assert ctx.site.latitude_deg == 53.71
    assert not ctx.document.dirty
