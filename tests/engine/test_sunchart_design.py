"""Sun-path chart design data: centring, date arcs, the hour band (engine only)."""

from __future__ import annotations

import numpy as np
import pytest

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.sunchart import sun_chart
from tiltyard.engine.sunchart_design import (
    HOUR_LABEL_MIN_SEP_DEG,
    arc_label_candidates,
    arc_label_index,
    chart_centre_deg,
    chart_x,
    edge_cost,
    lead_chart,
    polar_xy,
    skyline_peaks,
)

#: Below this elevation a path meeting the chart edge is its end at the horizon, not a cut.
LOW_DEG = 5.0


def _high_cuts(curve, centre):
    """Elevations at which a day path jumps across the flat chart's edge, sun above LOW_DEG."""
    x = chart_x(curve.azimuth_deg, centre)
    el = curve.elevation_deg
    jump = np.abs(np.diff(x)) > 180.0
    mid = 0.5 * (el[1:] + el[:-1])
    return mid[jump & (mid > LOW_DEG)]


@pytest.fixture(scope="module")
def charts():
    return {name: sun_chart(load_demo(name), "2023-04-10", "solar")
            for name in ("larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic",
                         "tarnvik-cabin")}


def test_centring_follows_the_hemisphere_and_the_tropics(charts):
    # beyond the tropics the flat chart faces the equator: south in the north, north in
    # the south (common practice, no source); in the tropics it faces east and the
    # from-above chart leads
    assert charts["larkmoor-dairy"].centre_azimuth_deg == 180.0
    assert charts["tarnvik-cabin"].centre_azimuth_deg == 180.0
    assert charts["kelpie-creek-shed"].centre_azimuth_deg == 0.0
    assert charts["coral-lane-clinic"].centre_azimuth_deg == 90.0
    assert [charts[n].lead for n in ("larkmoor-dairy", "kelpie-creek-shed",
                                     "coral-lane-clinic")] == ["flat", "flat", "above"]
    assert chart_centre_deg(-6.93) == 90.0 and lead_chart(-6.93) == "above"
    assert chart_centre_deg(30.0) == 180.0 and chart_centre_deg(-30.0) == 0.0


@pytest.mark.parametrize("name", ["coral-lane-clinic", "kelpie-creek-shed", "larkmoor-dairy"])
def test_no_day_path_is_cut_high_in_the_sky(charts, name):
    chart = charts[name]
    for curve in [a.curve for a in chart.arcs] + [chart.day]:
        assert _high_cuts(curve, chart.centre_azimuth_deg).size == 0, curve.label


def test_the_tropical_site_would_be_cut_facing_the_equator(charts):
    # the check above means something: facing south, the clinic's June path (noon sun
    # north of the zenith) is cut at its top, where a U-shape would be drawn
    chart = charts["coral-lane-clinic"]
    june = next(a.curve for a in chart.arcs if 6 in a.months)
    assert _high_cuts(june, 180.0).max() > 60.0
    assert edge_cost(6.93, 90.0) < 0.2 * edge_cost(6.93, 180.0)


def test_solar_time_hour_lines_do_not_swing_across_the_sky(charts):
    # an hour line passing by the zenith is broken there, so no segment joins two points
    # on opposite sides of the sky (the flat line once drawn across the top)
    for chart in charts.values():
        for line in chart.hour_lines:
            az = line.azimuth_deg
            ok = np.isfinite(az[1:]) & np.isfinite(az[:-1])
            swing = np.abs(np.mod(az[1:] - az[:-1] + 180.0, 360.0) - 180.0)[ok]
            assert swing.size == 0 or swing.max() <= 90.0, line.hour


def test_every_month_has_one_arc_and_the_defaults(charts):
    for chart in charts.values():
        months = [m for a in chart.arcs for m in a.months]
        assert sorted(months) == list(range(1, 13))
        assert {a.kind for a in chart.arcs if a.default} == {"solstice", "equinox"}
        noon = chart.events["noon_elevation_deg"].to_numpy()
        for arc in chart.arcs:
            # months that share an arc have nearly the same noon sun on their 21sts: the
            # declinations of 21 Jan/Nov, Feb/Oct, Apr/Aug, May/Jul differ by under 1°
            # (Meeus 1998, ch. 25, from memory), so noon elevations within 1.5°
            if len(arc.months) == 2:
                a, b = arc.months
                assert abs(noon[a - 1] - noon[b - 1]) < 1.5, arc.label
            if len(arc.curve):
                assert 0 <= arc.label_index < len(arc.curve)


def test_hour_band_is_above_every_path_and_labels_keep_apart(charts):
    for chart in charts.values():
        band = chart.hour_band
        top = max(float(np.max(c.elevation_deg)) for c in list(chart.paths) + [chart.day]
                  if len(c))
        assert band.low_deg > top and band.high_deg > band.low_deg
        assert 12 in band.hours or chart.summary.polar == "night"
        x = np.sort(np.asarray(band.azimuth_deg))
        assert np.all(np.diff(x) >= HOUR_LABEL_MIN_SEP_DEG)
        lo = chart.centre_azimuth_deg - 180.0
        assert np.all((x > lo) & (x < lo + 360.0))


def test_label_candidates_start_at_the_label_place_and_never_repeat():
    # a symmetric arch: 0..180 degrees of azimuth, elevation a half sine (shape only)
    az = np.linspace(90.0, 270.0, 181)
    el = 40.0 * np.sin(np.radians(az - 90.0))
    found = arc_label_candidates(az, el, 180.0)
    assert found[0] == arc_label_index(az, el, 180.0)
    assert len(found) == len(set(found)) and all(0 <= j < len(az) for j in found)
    # both sides of the arch are offered at every height
    assert {j > 90 for j in found} == {True, False}
    assert arc_label_candidates([], [], 180.0) == () and arc_label_index([], [], 180.0) == -1


def test_from_above_map_puts_north_up_east_right_and_the_zenith_in_the_centre():
    # azimuthal equidistant sky map (common practice, no source)
    x, y = polar_xy([0.0, 90.0, 180.0, 270.0, 45.0], [0.0, 0.0, 30.0, 60.0, 90.0])
    np.testing.assert_allclose(x, [0.0, 90.0, 0.0, -30.0, 0.0], atol=1e-12)
    np.testing.assert_allclose(y, [90.0, 0.0, -60.0, 0.0, 0.0], atol=1e-12)
    # below the horizon is drawn on the horizon ring
    assert np.hypot(*polar_xy(123.0, -5.0)) == pytest.approx(90.0)


def test_skyline_ticks_go_to_separate_high_points():
    az = np.arange(0.0, 360.0, 5.0)
    el = np.zeros_like(az)
    el[[10, 12, 40, 60]] = [20.0, 18.0, 9.0, 1.0]       # 50°, 60°, 200°, 300°
    # 60° is within 40° of the higher 50°; 300° is under the 2° floor
    assert skyline_peaks(az, el) == (10, 40)
    assert skyline_peaks(az, np.zeros_like(az)) == ()
