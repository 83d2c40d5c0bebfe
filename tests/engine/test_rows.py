"""Row pitch for rows of tilted panels (tiltyard.engine.rows).

External references: pvlib 0.16.1 ``pvlib.shading.shaded_fraction1d``
(Anderson & Jensen, Shaded fraction and backtracking in single-axis trackers
on rolling terrain, J. Renewable Sustainable Energy 16, 023504, 2024, eq. 12),
which computes the shaded fraction of a row from the sun position and the
pitch independently of our shadow formula; and the hand geometry of Duffie &
Beckman, Solar Engineering of Thermal Processes, 4th ed. (2013).
"""

from __future__ import annotations

import math
from functools import cache

import numpy as np
import pandas as pd
import pvlib
import pytest

from tiltyard.engine.rows import (
    GCR_DEFINITIONS,
    LIMITATION,
    default_design_date,
    irradiation_per_ground_m2,
    row_layout,
    shadow_pitch_m,
)
from tiltyard.engine.site import Site
from tiltyard.engine.solarpos import solar_position
from tiltyard.engine.sunevents import sun_events

TURIN = Site("open field 45N", 45.0, 7.0, 300.0, "Europe/Rome")
STOCKHOLM = Site("roof 59N", 59.33, 18.07, 20.0, "Europe/Stockholm")
TROMSO = Site("roof 69N", 69.65, 18.96, 10.0, "Europe/Oslo")
SVALBARD = Site("field 79N", 78.92, 11.93, 10.0, "Arctic/Longyearbyen")


@cache
def _layout(site: Site, tilt: float, azimuth: float | None = None, length: float = 1.0,
            half_width_h: float = 3.0, design_date=None):
    return row_layout(site, tilt, azimuth, collector_length_m=length,
                      half_width_h=half_width_h, design_date=design_date)


def _pvlib_shaded_fraction(layout, pitch_m, times):
    """pvlib's shaded fraction of the row behind, for sun positions in front of the rows."""
    site = {x.name: x for x in (TURIN, STOCKHOLM, SVALBARD)}[layout.site_name]
    pos = solar_position(times, site)
    el = pos["apparent_elevation"].to_numpy()
    az = pos["azimuth"].to_numpy()
    front = (np.cos(np.radians(az - layout.azimuth_deg)) > 0.0) & (
        el >= layout.min_elevation_deg)
    fs = pvlib.shading.shaded_fraction1d(
        90.0 - el[front], az[front], axis_azimuth=(layout.azimuth_deg - 90.0) % 360.0,
        shaded_row_rotation=layout.tilt_deg, collector_width=layout.collector_length_m,
        pitch=pitch_m)
    return np.asarray(fs, dtype=float), int(front.sum())


# -- against pvlib's shaded fraction ----------------------------------------------

@pytest.mark.parametrize("site, tilt, azimuth, length, date, half_h", [
    (TURIN, 30.0, None, 1.0, None, 3.0),
    (TURIN, 20.0, 150.0, 2.3, None, 3.0),          # rows turned 30 deg east
    (STOCKHOLM, 35.0, 200.0, 1.0, None, 3.0),      # window clipped at 1 deg elevation
    (SVALBARD, 30.0, 135.0, 1.0, "2023-06-21", 6.0),  # midnight sun: limit inside the window
])
def test_no_shade_at_pitch_and_shade_just_below_it_per_pvlib(site, tilt, azimuth, length, date,
                                                              half_h):
    lay = _layout(site, tilt, azimuth, length, half_h, date)
    times = pd.date_range(lay.window_start, lay.window_end, freq="1min")
    fs, n_front = _pvlib_shaded_fraction(lay, lay.pitch_m, times)
    assert n_front > 60
    # pvlib 0.16.1 shading.shaded_fraction1d (Anderson & Jensen 2024, eq. 12):
    # no shade anywhere in the protected window at the computed pitch, sampled
    # every minute; tolerance 1e-9 of the collector length
    assert fs.max() <= 1e-9
    # same source: at 98 % of the pitch the row behind is shaded at the
    # limiting sun position (strictly positive shaded fraction)
    fs_lim, n_lim = _pvlib_shaded_fraction(lay, 0.98 * lay.pitch_m,
                                           pd.DatetimeIndex([lay.limiting_time]))
    assert n_lim == 1 and fs_lim[0] > 1e-4


def test_limit_inside_the_window_is_found_between_samples():
    # internal consistency: under the midnight sun at 79 N, rows facing 135 deg
    # see their lowest profile angle about 2 h after the window opens; the
    # maximum is refined between samples, so a 30 min sampling step finds the
    # same pitch as 5 min within 1e-6 m
    fine = _layout(SVALBARD, 30.0, 135.0, 1.0, 6.0, "2023-06-21")
    coarse = row_layout(SVALBARD, 30.0, 135.0, design_date="2023-06-21", half_width_h=6.0,
                        step_min=30.0)
    assert fine.window_start + pd.Timedelta(hours=1) < fine.limiting_time
    assert fine.limiting_time < fine.window_end - pd.Timedelta(hours=1)
    assert coarse.pitch_m == pytest.approx(fine.pitch_m, abs=1e-6)


def test_shadow_formula_equals_pvlib_at_the_edge_of_shade():
    # pvlib 0.16.1 shading.shaded_fraction1d: at the pitch of shadow_pitch_m
    # the shaded fraction is exactly at the edge (0 within 1e-9), 1 % closer it
    # is positive; over a spread of sun positions in front of the rows.
    el = np.array([5.0, 12.0, 25.0, 40.0, 60.0])
    daz = np.array([-60.0, -20.0, 0.0, 35.0, 70.0])
    for tilt in (10.0, 35.0, 60.0, 90.0):
        p = shadow_pitch_m(tilt, 180.0, el, 180.0 + daz, 1.7)
        kwargs = dict(axis_azimuth=90.0, shaded_row_rotation=tilt, collector_width=1.7)
        at = pvlib.shading.shaded_fraction1d(90.0 - el, 180.0 + daz, pitch=p, **kwargs)
        closer = pvlib.shading.shaded_fraction1d(90.0 - el, 180.0 + daz, pitch=0.99 * p,
                                                 **kwargs)
        assert np.max(at) <= 1e-9
        assert np.min(closer) > 0.0


# -- against hand geometry ----------------------------------------------------------

def test_noon_pitch_equals_duffie_beckman_hand_geometry():
    # Duffie & Beckman (2013), Solar Engineering of Thermal Processes, 4th ed.:
    # declination by Cooper's equation (eq. 1.6.1a, delta = 23.45 sin(360 (284 +
    # n) / 365), n = 355 for 21 December); at solar noon the sun is due south
    # at altitude alpha = 90 - |lat - delta| (section 1.6); the shadow of a
    # height h on the row normal is h / tan(alpha_p), with the profile angle
    # alpha_p = alpha at noon for south-facing rows (section 1.9, eq. 1.9.12,
    # equation numbers from memory).
    site = Site("hand check 40N", 40.0, 0.0, 0.0, "UTC")
    tilt, length = 30.0, 1.0
    delta = 23.45 * math.sin(math.radians(360.0 * (284 + 355) / 365.0))
    alpha = 90.0 - abs(site.latitude_deg - delta)
    b = math.radians(tilt)
    hand = length * math.cos(b) + length * math.sin(b) / math.tan(math.radians(alpha))
    lay = row_layout(site, tilt, 180.0, design_date="2023-12-21", half_width_h=1.0 / 60.0)
    # tolerance 0.1 deg on the sun altitude (refraction about 0.03 deg at 26.6
    # deg, Cooper's declination within about 0.02 deg of SPA on this date), i.e.
    # 4.4 mm per m of collector on the pitch here
    assert lay.limiting_elevation_deg == pytest.approx(alpha, abs=0.1)
    assert lay.pitch_m == pytest.approx(hand, abs=0.0044)
    # within one minute of noon the sun is due south within 0.5 deg
    assert lay.limiting_azimuth_deg == pytest.approx(180.0, abs=0.5)


def test_tilt_zero_gives_pitch_equal_to_length():
    # common practice, no source: flat collectors cast no shadow on each other,
    # so they can touch: pitch = L, gcr = 1 (exact)
    for length in (1.0, 2.0):
        lay = _layout(TURIN, 0.0, None, length)
        assert lay.pitch_m == length
        assert lay.gcr == 1.0 and lay.ground_cover_fraction == 1.0
        assert lay.row_gap_m == 0.0


def test_steeper_tilt_needs_larger_pitch():
    # Duffie & Beckman (2013) section 1.9 geometry: d(pitch)/d(tilt) =
    # L (cos(b) / tan(alpha_p) - sin(b)) > 0 while tan(b) < 1 / tan(alpha_p);
    # at 45 N in the winter window 1/tan(alpha_p) >= 4, so up to 60 deg the pitch
    # grows with tilt (strictly) and both coverage ratios fall
    tilts = [0.0, 10.0, 20.0, 30.0, 40.0, 50.0, 60.0]
    lays = [_layout(TURIN, t) for t in tilts]
    pitch = np.array([x.pitch_m for x in lays])
    assert np.all(np.diff(pitch) > 0.0)
    assert np.all(np.diff([x.gcr for x in lays]) < 0.0)
    assert np.all(np.diff([x.ground_cover_fraction for x in lays]) < 0.0)


def test_pitch_scales_with_collector_length():
    # similar triangles (Duffie & Beckman 2013, section 1.9): every length of
    # the section scales with L; relative tolerance 1e-9
    one, two = _layout(TURIN, 30.0, None, 1.0), _layout(TURIN, 30.0, None, 2.5)
    assert two.pitch_m == pytest.approx(2.5 * one.pitch_m, rel=1e-9)
    assert two.gcr == pytest.approx(one.gcr, rel=1e-9)


def test_southern_hemisphere_mirror_gives_the_same_pitch():
    north = Site("mirror N", 38.0, 20.0, 0.0, "UTC")
    south = Site("mirror S", -38.0, 20.0, 0.0, "UTC")
    a = row_layout(north, 30.0, 180.0)
    b = row_layout(south, 30.0, 0.0)
    assert (a.design_date.month, b.design_date.month) == (12, 6)
    # common practice, no source: the sun's path mirrors across the equator
    # between the two solstices; tolerance 0.3 % (the two solstice declinations
    # differ by about 0.01 deg and the Earth-Sun geometry is not exactly
    # symmetric over the year)
    assert b.pitch_m == pytest.approx(a.pitch_m, rel=3e-3)
    assert b.limiting_elevation_deg == pytest.approx(a.limiting_elevation_deg, abs=0.05)
    # mirrored azimuths: the same angle between the sun and the facing
    # direction (morning and afternoon ends of the window are alike)
    def off(lay):
        return abs((lay.limiting_azimuth_deg - lay.azimuth_deg + 180.0) % 360.0 - 180.0)

    assert off(b) == pytest.approx(off(a), abs=0.2)


# -- the design window ------------------------------------------------------------

def test_default_window_is_the_winter_solstice_noon_plus_minus_three_hours():
    lay = _layout(TURIN, 30.0)
    assert lay.design_date == pd.Timestamp("2023-12-21")
    noon = sun_events(TURIN, ["2023-12-21"]).table["solar_noon"].iloc[0]
    assert lay.solar_noon == noon
    assert lay.window_start.tzinfo is not None and lay.window_end.tzinfo is not None
    assert lay.window_end - lay.window_start == pd.Timedelta(hours=6)
    assert lay.window_start + pd.Timedelta(hours=3) == noon
    # common practice, no source: for equator-facing rows in winter the lowest
    # profile angle is at the ends of a window centred on solar noon
    assert min(abs((lay.limiting_time - lay.window_start).total_seconds()),
               abs((lay.limiting_time - lay.window_end).total_seconds())) < 1.0
    assert lay.protected_h == pytest.approx(6.0)
    assert lay.definitions == GCR_DEFINITIONS and "pvlib" in lay.definitions
    assert "above" in lay.definitions and "neglected" in lay.limitation
    assert lay.limitation == LIMITATION


def test_user_window_is_used():
    lay = row_layout(TURIN, 30.0, design_date="2023-03-20", half_width_h=2.0)
    assert lay.design_date == pd.Timestamp("2023-03-20") and lay.design_date_rule == (
        "given by the user")
    assert lay.window_end - lay.window_start == pd.Timedelta(hours=4)
    # a higher sun and a shorter window: a shorter shadow than at the solstice
    assert lay.pitch_m < _layout(TURIN, 30.0).pitch_m


@pytest.mark.parametrize("lat, azimuth, month", [
    (10.0, 180.0, 12),   # noon sun south of the zenith in December, in front
    (10.0, 0.0, 6),      # facing north: the June noon sun is in front
    (10.0, 90.0, 12),    # facing east: a tie at noon, hemisphere's winter solstice
    (-10.0, 90.0, 6),
    (-10.0, 180.0, 12),
    (30.0, 0.0, 12),     # outside the tropics: always the hemisphere's winter solstice
    (-30.0, 180.0, 6),
])
def test_design_date_rule(lat, azimuth, month):
    # common practice, no source: at 10 N the noon sun stands south of the
    # zenith (declination -23.4 deg) on 21 December and north of it
    # (declination +23.4 deg) on 21 June; the rule is documented in
    # default_design_date
    day, rule = default_design_date(Site("rule", lat, 0.0, 0.0, "UTC"), azimuth)
    assert (day.month, day.day) == (month, 21)
    assert rule


def test_clipped_window_is_reported():
    lay = _layout(STOCKHOLM, 35.0, 200.0)
    # common practice, no source: at 59 N on 21 December the sun sets about
    # 3 h after solar noon, so part of the window has the sun below 1 deg
    assert lay.protected_h < 6.0
    assert any("not prevented" in n for n in lay.notes)
    assert lay.limiting_elevation_deg == pytest.approx(1.0, abs=1e-3)
    assert math.isfinite(lay.pitch_m)


def test_polar_night_gets_a_clear_message():
    # common practice, no source: at 69.65 N the sun does not rise on 21 December
    with pytest.raises(ValueError, match="polar night") as err:
        row_layout(TROMSO, 30.0)
    assert "69.65" in str(err.value) and "design_date" in str(err.value)


def test_sun_too_low_or_behind_gets_a_clear_message():
    # common practice, no source: at 66 N the noon sun of 21 December is about
    # 0.6 deg high (plus refraction), under the 1 deg design minimum
    with pytest.raises(ValueError, match="stays below 1 deg"):
        row_layout(Site("66N", 66.0, 0.0, 0.0, "UTC"), 30.0)
    # rows facing north at 45 N never see the December sun in front of them
    with pytest.raises(ValueError, match="never in front"):
        row_layout(TURIN, 30.0, 0.0)


# -- derived figures and inputs -----------------------------------------------------

def test_coverage_ratios_follow_their_definitions():
    lay = _layout(TURIN, 30.0, None, 2.0)
    cos_b = math.cos(math.radians(30.0))
    # pvlib 0.16.1 shading.ground_angle docstring: gcr is the "ratio of row
    # slant length to row spacing"; ground cover seen from above is the
    # horizontal projection over the pitch; exact to 1e-12
    assert lay.gcr == pytest.approx(2.0 / lay.pitch_m, rel=1e-12)
    assert lay.ground_cover_fraction == pytest.approx(2.0 * cos_b / lay.pitch_m, rel=1e-12)
    assert lay.row_gap_m == pytest.approx(lay.pitch_m - 2.0 * cos_b, rel=1e-12)


def test_irradiation_per_ground_area():
    # definition of the ground coverage ratio (pvlib shading.ground_angle):
    # m2 of panel per m2 of ground; exact
    assert irradiation_per_ground_m2(1500.0, 0.4) == pytest.approx(600.0, rel=1e-15)
    out = irradiation_per_ground_m2(np.array([100.0, 0.0, 50.0]), 0.5)
    np.testing.assert_allclose(out, [50.0, 0.0, 25.0], rtol=1e-15)
    with pytest.raises(ValueError, match=r"gcr = 0\b.*greater than 0"):
        irradiation_per_ground_m2(1500.0, 0)
    with pytest.raises(ValueError, match="poa_kwh_m2 = -1.0"):
        irradiation_per_ground_m2([10.0, -1.0], 0.4)


@pytest.mark.parametrize("kwargs, field", [
    (dict(tilt_deg=-1.0), "tilt_deg = -1.0: must be between 0 and 90 deg"),
    (dict(tilt_deg=95.0), "tilt_deg = 95.0: must be between 0 and 90 deg"),
    (dict(azimuth_deg=400.0), "azimuth_deg = 400.0: must be between 0 and 360 deg"),
    (dict(collector_length_m=0.0), "collector_length_m = 0.0: must be greater than 0 m"),
    (dict(half_width_h=0.0), "half_width_h = 0.0: must be greater than 0 and at most 6 h"),
    (dict(half_width_h=6.5), "half_width_h = 6.5: must be greater than 0 and at most 6 h"),
    (dict(min_elevation_deg=0.0), "min_elevation_deg = 0.0: must be between 0.5 and 45"),
    (dict(design_date="21st of never"), "design_date = '21st of never'"),
    (dict(tilt_deg="steep"), "tilt_deg = 'steep': must be a number"),
])
def test_bad_inputs_name_the_field(kwargs, field):
    args = dict(tilt_deg=30.0)
    args.update(kwargs)
    with pytest.raises(ValueError) as err:
        row_layout(TURIN, **args)
    assert field in str(err.value)
