"""The main window: files, recovery, messages, About — driven on the real widgets."""

from __future__ import annotations

import gc
import json

import pytest

from tiltyard.app import settings
from tiltyard.app.desktop import create_window
from tiltyard.app.document import SiteDocument
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.site_file import load_site, save_site


@pytest.fixture
def window(qtbot):
    made = []

    def make(site_arg=None):
        w = create_window(site_arg)
        w.ask_unsaved = lambda: "discard"   # tests that check the prompt replace this
        qtbot.addWidget(w)
        w.show()
        made.append(w)
        return w

    yield make
    for w in made:
        w.ask_unsaved = lambda: "discard"  # no modal prompt while tearing down
        w.close()
        assert w.runner.active_thread_count() == 0, "a worker thread was left running"


def test_opens_on_the_demo_site_with_every_view(window):
    w = window()
    assert w.document.site.name == load_demo("larkmoor-dairy").name
    titles = [w.nav.item(i).text() for i in range(w.nav.count())]
    assert titles[0] == "Site" and titles[-1] == "Sheet"
    for t in titles:
        assert w.show_view(t) is w.current_view()


def test_views_and_charts_are_made_ahead_after_start_up(window, qtbot, idle):
    """What ``tiltyard`` does after show: the hidden views are built a turn at a time
    from plots made ahead, and a view built ahead still computes when first shown."""
    from tiltyard.app import plots
    from tiltyard.app.desktop import prepare_ahead
    from tiltyard.app.main_window import VIEW_TITLES

    plots.discard()
    w = window()
    assert [t for t in VIEW_TITLES if w.views.is_built(t)] == ["Site"]
    loader = prepare_ahead(w)
    qtbot.waitUntil(lambda: all(w.views.is_built(t) for t in VIEW_TITLES), timeout=60000)
    assert not loader.is_alive()
    # start-up objects are out of the cyclic collector's sight, and it runs again
    assert gc.isenabled() and gc.get_freeze_count() > 0
    assert plots.ready_count("plot") == 0          # the eight made ahead were all taken
    assert w.current_view() is w.views["Site"]      # nothing else was shown meanwhile
    sun = w.show_view("Sun path")
    idle(w.runner)
    assert sun.chart is not None and sun.chart.site_name == w.document.site.name
    assert len(sun.polar_hour_labels) > 0


def test_drawing_steps_let_timers_run_between_them(qtbot):
    """A zero-delay single shot would run every step in one turn; TURN_MS steps do not."""
    from PySide6.QtCore import QTimer

    from tiltyard.app.tasks import TaskRunner

    runner = TaskRunner()
    order = []
    beat = QTimer()
    beat.setInterval(0)
    beat.timeout.connect(lambda: order.append("beat"))

    def step(name):
        return lambda: order.append(name)

    beat.start()
    runner.run_in_stages("test", [step(f"s{i}") for i in range(4)])
    qtbot.waitUntil(lambda: not runner.is_busy(), timeout=5000)
    beat.stop()
    runner.shutdown()
    steps = [i for i, x in enumerate(order) if x != "beat"]
    assert [order[i] for i in steps] == ["s0", "s1", "s2", "s3"]
    # the heartbeat got a turn between every two steps
    assert all(b - a > 1 for a, b in zip(steps, steps[1:], strict=False))


def test_save_reopen_gives_the_same_site(window, tmp_path, qtbot):
    w = window()
    site_view = w.show_view("Site")
    site_view.name.edit.clear()
    qtbot.keyClicks(site_view.name.edit, "Reopened barn roof")
    site_view.name.commit()
    assert w.document.dirty and w.windowTitle().startswith("*")
    target = tmp_path / "barn.json"
    w.ask_save_path = lambda: str(target)
    assert w.file_save()
    assert not w.document.dirty and not w.windowTitle().startswith("*")
    saved = load_site(target)
    assert saved == w.document.site
    w2 = window(str(target))
    assert w2.document.site == saved
    assert str(target.resolve()) in settings.recent_files()


def test_a_bad_file_leaves_the_open_site_untouched(window, tmp_path):
    w = window()
    before = w.document.site
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps({"format": "tiltyard-site", "format_version": 1, "name": "x",
                               "latitude_deg": 123, "longitude_deg": 0}))
    assert not w.open_path(str(bad))
    assert w.document.site is before
    assert w.banner.isVisible() and "latitude_deg" in w.banner.text


def test_unsaved_changes_prompt_can_cancel_and_discard(window, qtbot):
    w = window()
    w.document.propose(elevation_m=200.0)
    asked = []
    w.ask_unsaved = lambda: asked.append(1) or "cancel"
    w.open_demo("kelpie-creek-shed")
    assert asked and w.document.site.elevation_m == 200.0      # cancelled: nothing replaced
    w.ask_unsaved = lambda: "discard"
    w.open_demo("kelpie-creek-shed")
    assert w.document.site.name == load_demo("kelpie-creek-shed").name


def test_crash_recovery_round_trip(window, qtbot):
    w = window()
    w.document.propose(name="Unsaved greenhouse", elevation_m=321.0)
    w.autosave()                              # what the timer does every 20 s
    path = SiteDocument.autosave_path()
    assert path.exists()
    # the session "crashes": the window goes away without closing cleanly
    w.autosave_timer.stop()
    w.runner.shutdown()
    edited = w.document.site
    w2 = window()
    w2.ask_recover = lambda site: site.name == "Unsaved greenhouse"
    assert w2.offer_recovery()
    assert w2.document.site == edited and w2.document.dirty
    assert not path.exists()
    assert "Recovered" in w2.banner.text


def test_declined_recovery_is_not_offered_again(window, tmp_path):
    save_site(load_demo("tarnvik-cabin"), SiteDocument.autosave_path())
    w = window()
    w.ask_recover = lambda site: False
    assert not w.offer_recovery()
    assert SiteDocument.pending_recovery() is None


def test_a_worker_error_is_a_visible_non_modal_message(window, qtbot, idle):
    w = window()

    def boom(progress):
        raise RuntimeError("deliberate test fault")

    w.runner.submit("test", boom, lambda r: None, label="Test job", debounce_ms=0)
    idle(w.runner)
    assert w.banner.isVisible() and w.banner.level == "error"
    assert "deliberate test fault" in w.banner.text
    assert "Traceback" in w.banner.details
    assert w.isEnabled()


def test_an_error_belongs_to_what_raised_it(window, qtbot, idle):
    # issue 14, point 1: a message goes when its cause is fixed, not when the view changes
    w = window()
    assert not w.ctx.propose(elevation_m=-1e9)          # refused: below any site
    assert w.banner.isVisible() and w.banner.level == "error"
    for row in range(w.nav.count()):                     # every view in turn: it stays
        w.nav.setCurrentRow(row)
        assert w.banner.isVisible()
    assert w.ctx.propose(name="Another name")            # another field: it stays
    assert w.banner.isVisible()
    assert w.ctx.propose(elevation_m=120.0)              # the same field fixed: it goes
    assert not w.banner.isVisible()

    state = {"fail": True}

    def job(progress):
        if state["fail"]:
            raise RuntimeError("deliberate test fault")
        return 1

    w.runner.submit("test", job, lambda r: None, label="Test job", debounce_ms=0)
    idle(w.runner)
    assert w.banner.isVisible() and "deliberate test fault" in w.banner.text
    assert w.ctx.propose(elevation_m=130.0)              # an unrelated edit: it stays
    assert w.banner.isVisible()
    state["fail"] = False
    w.runner.submit("test", job, lambda r: None, label="Test job", debounce_ms=0)
    idle(w.runner)                                       # the same task succeeds: it goes
    assert not w.banner.isVisible()


def test_a_newer_request_cancels_the_older(window, qtbot, idle):
    w = window()
    seen = []
    import threading
    started = threading.Event()

    def slow(progress):
        started.set()
        for _ in range(200):
            progress(0.1, "working")
            threading.Event().wait(0.01)
        return "old"

    w.runner.submit("ch", slow, seen.append, debounce_ms=0)
    qtbot.waitUntil(started.is_set)
    w.runner.submit("ch", lambda progress: "new", seen.append, debounce_ms=0)
    idle(w.runner)
    assert seen == ["new"]


def test_about_names_models_versions_and_cautions(window):
    w = window()
    text = w.about_text()
    for needle in ("Reda", "Ineichen", "Perez", "pvlib", "PySide6", "licensed installers",
                   "not a design"):
        assert needle in text


def test_preferences_round_trip(qtbot):
    prefs = settings.Preferences(preparer="A. Surveyor", organisation="Fieldwork Ltd",
                                 sky="monthly", model="haydavies", time_basis="solar",
                                 paper="letter")
    settings.save_preferences(prefs)
    assert settings.load_preferences() == prefs


def test_typing_a_site_changes_the_sun_path_and_its_events(window, qtbot, idle):
    w = window()
    sun = w.show_view("Sun path")
    idle(w.runner)
    before_chart = sun.chart
    before_rows = sun.table.as_tsv()
    site_view = w.show_view("Site")
    site_view.tz_follow.setChecked(False)
    site_view.latitude.edit.clear()
    qtbot.keyClicks(site_view.latitude.edit, "33 27 S")   # typed as degrees, minutes, letter
    site_view.latitude.commit()
    assert w.document.site.latitude_deg == -33.45
    w.show_view("Sun path")
    idle(w.runner)
    assert sun.chart is not before_chart
    # June solstice noon: 90 - |lat - 23.44| (Duffie & Beckman 2013, sec. 1.6), within 0.5 deg
    june = max(max(p.elevation_deg) for p in sun.chart.paths if p.date.month == 6)
    assert abs(june - (90 - abs(-33.45 - 23.44))) < 0.5
    assert sun.table.as_tsv() != before_rows


def test_adding_an_obstacle_raises_the_horizon_loss_in_the_window(window, idle):
    from tiltyard.engine.site import Obstacle

    w = window("tarnvik-cabin")
    view = w.show_view("Horizon")
    idle(w.runner)

    def shown_loss_pct():            # the horizontal row's loss as the table shows it
        return float(view.loss_model.index(0, 3).data())

    before = shown_loss_pct()
    site = w.document.site
    w.document.propose(obstacles=site.obstacles + (Obstacle("new shed", 180.0, 40.0, 5.0, 4.0),))
    idle(w.runner)
    assert shown_loss_pct() > before + 1.0
