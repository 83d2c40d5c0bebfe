"""The sun-chart job, checked against published values and textbook formulas."""

import math

import numpy as np
import pandas as pd
import pytest

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.horizon import site_horizon_deg
from tiltyard.engine.site import HorizonProfile, Site
from tiltyard.engine.solarpos import RISE_SET_ELEVATION_DEG
from tiltyard.engine.sun import standard_path_dates
from tiltyard.engine.sunchart import basis_hours, horizon_crossings, monthly_events, sun_chart
from tiltyard.engine.sunevents import sun_events


def _rise_hour_angle_deg(lat_deg: float, decl_deg: float, h0_deg: float = -0.8333) -> float:
    """Meeus (1998), Astronomical Algorithms, 2nd ed., eq. 15.1 (from memory):
    cos H0 = (sin h0 - sin phi sin delta) / (cos phi cos delta); NaN when |cos H0| > 1."""
    p, d, h = (math.radians(v) for v in (lat_deg, decl_deg, h0_deg))
    c = (math.sin(h) - math.sin(p) * math.sin(d)) / (math.cos(p) * math.cos(d))
    return math.degrees(math.acos(c)) if -1.0 <= c <= 1.0 else float("nan")


def _cos_h0(lat_deg: float, decl_deg: float, h0_deg: float = -0.8333) -> float:
    p, d, h = (math.radians(v) for v in (lat_deg, decl_deg, h0_deg))
    return (math.sin(h) - math.sin(p) * math.sin(d)) / (math.cos(p) * math.cos(d))


@pytest.fixture(scope="module")
def demo_charts():
    out = {}
    for name in ("larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic"):
        site = load_demo(name)
        out[name] = (site, sun_chart(site, "2023-06-21", basis="solar"))
    return out


@pytest.mark.parametrize("lat", [0.0, 50.0])
def test_equinox_day_length(lat):
    site = Site("equinox check", lat, 0.0, 0.0, "UTC")
    chart = sun_chart(site, "2023-03-20", basis="solar")
    s = chart.summary
    # Meeus (1998), Astronomical Algorithms, eq. 15.1 with delta = 0 and
    # h0 = -0.8333 deg (34' refraction + 16' solar semi-diameter; Reda & Andreas
    # 2008, App. A.2): day length = 2 H0 / 15 h, i.e. 12 h + 6.7 min at the
    # equator, 12 h + 10.4 min at 50 deg. Tolerance 3 min: on the equinox date
    # the declination is within +/-0.25 deg of zero, which moves the day length
    # by up to 2 min at 50 deg.
    expected_h = 2.0 * _rise_hour_angle_deg(lat, 0.0) / 15.0
    assert s.day_length_h == pytest.approx(expected_h, abs=3.0 / 60.0)
    assert 12.0 + 5.0 / 60.0 < s.day_length_h < 12.0 + 13.0 / 60.0
    assert s.polar is None
    assert s.sunrise.tzinfo is not None and str(s.sunrise.tz) == "UTC"
    # Duffie & Beckman (2013), sec. 1.5: solar noon is 12:00 apparent solar
    # time by definition; within 0.5 min.
    assert s.solar_noon_h == pytest.approx(12.0, abs=0.5 / 60.0)
    # symmetry of the day about solar noon (same source), within 1 min
    assert 12.0 - s.sunrise_h == pytest.approx(s.sunset_h - 12.0, abs=1.0 / 60.0)


@pytest.mark.parametrize("name", ["larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic"])
def test_june_solstice_noon_elevation(demo_charts, name):
    site, chart = demo_charts[name]
    row = chart.events.iloc[5]
    assert row["date"].month == 6 and row["date"].day == 21
    # Duffie & Beckman (2013), Solar Engineering of Thermal Processes, sec. 1.6:
    # at solar noon the zenith angle is |phi - delta| (eq. 1.6.5 with omega = 0),
    # and delta = 23.44 deg at the June solstice (eq. 1.6.1 peak, the obliquity);
    # tolerance 0.5 deg (refraction, solstice a few hours off the date).
    expected = 90.0 - abs(site.latitude_deg - 23.44)
    assert row["noon_elevation_deg"] == pytest.approx(expected, abs=0.5)
    assert chart.summary.max_elevation_deg == pytest.approx(expected, abs=0.5)
    # the bold path of the same date peaks there too, within the 5-min sampling
    # (at most 0.3 deg below the culmination; common practice, no source)
    assert chart.day.elevation_deg.max() == pytest.approx(expected, abs=0.6)
    assert chart.day.elevation_deg.max() <= chart.summary.max_elevation_deg + 0.01


def test_polar_day_and_night_at_tarnvik():
    site = load_demo("tarnvik-cabin")
    assert site.latitude_deg == pytest.approx(69.65)
    ev = monthly_events(site, 2023)
    june, december = ev.iloc[5], ev.iloc[11]
    # Meeus (1998) eq. 15.1: with delta = +/-23.44 deg at 69.65 N, cos H0 < -1
    # in June (the sun never sets) and > 1 in December (it never rises).
    assert _cos_h0(site.latitude_deg, 23.44) < -1.0 < 1.0 < _cos_h0(site.latitude_deg, -23.44)
    assert june["polar"] == "day" and december["polar"] == "night"
    assert pd.isna(june["sunrise"]) and pd.isna(june["sunset"])
    assert pd.isna(december["sunrise"]) and pd.isna(december["sunset"])
    assert june["day_length_h"] == 24.0 and december["day_length_h"] == 0.0
    assert december["direct_sun_h"] == 0.0 and pd.isna(december["clears_horizon"])
    # the equinox rows are ordinary days (Meeus eq. 15.1 has a solution)
    assert ev.iloc[2]["polar"] is None and not pd.isna(ev.iloc[2]["sunrise"])

    day = sun_chart(site, "2023-06-21")
    assert day.summary.polar == "day" and day.summary.sunrise is None
    assert len(day.day) == 24 * 12                     # every 5-min sample is above the line
    night = sun_chart(site, "2023-12-21")
    assert night.summary.polar == "night" and night.summary.sunrise is None
    assert len(night.day) == 0
    # 90 - phi - 23.44 = -3.1 deg: the noon sun stays below the horizon
    # (Duffie & Beckman 2013 sec. 1.6, theta_z = |phi - delta|); within 0.5 deg.
    assert night.summary.max_elevation_deg == pytest.approx(90 - 69.65 - 23.44, abs=0.5)


@pytest.mark.parametrize("name", ["larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic"])
def test_solar_noon_hour_line_crosses_paths_at_their_highest(demo_charts, name):
    site, chart = demo_charts[name]
    noon = next(h for h in chart.hour_lines if h.hour == 12)
    ok = ~np.isnan(noon.day_of_year)
    doy, az, el = noon.day_of_year[ok], noon.azimuth_deg[ok], noon.elevation_deg[ok]
    dates = pd.Timestamp(chart.year, 1, 1) + pd.to_timedelta(doy - 1, unit="D")
    culm = sun_events(site, dates).table["max_elevation_deg"].to_numpy()
    # Definition of apparent solar time (Duffie & Beckman 2013, sec. 1.5): at
    # 12:00 the sun is on the meridian, at azimuth 180 deg when it culminates
    # south of the zenith and 0 deg when north of it, and at its highest of the
    # day (SPA transit, Reda & Andreas 2008 App. A.2). Tolerance 0.2 deg.
    # Within 5 deg of the zenith the azimuth is ill-conditioned (a second of
    # time turns it by degrees), so it is checked below 85 deg only.
    off_meridian = np.degrees(np.arcsin(np.abs(np.sin(np.radians(az)))))
    assert np.all(off_meridian[el < 85.0] < 0.2)
    assert np.allclose(el, culm, atol=0.2)
    if abs(site.latitude_deg) > 23.44:
        want = site.equator_azimuth_deg
        assert np.all(np.abs((az - want + 180.0) % 360.0 - 180.0) < 0.2)
    # and where the drawn day paths of the 21sts cross it: the line,
    # interpolated to each path's date, is at that path's noon elevation
    order_doy, first = np.unique(doy, return_index=True)
    for path, row in zip(chart.paths[4:], chart.events.itertuples(), strict=True):
        d = pd.Timestamp(path.date).day_of_year
        assert np.interp(d, order_doy, el[first]) == pytest.approx(row.noon_elevation_deg,
                                                                    abs=0.2)


def test_clock_time_hour_lines_shift_an_hour_in_summer():
    site = load_demo("larkmoor-dairy")                 # Europe/London
    clock = sun_chart(site, "2023-07-15", basis="clock")
    std = sun_chart(site, "2023-07-15", basis="standard")

    def line(chart, hour):
        h = next(h for h in chart.hour_lines if h.hour == hour)
        return h.day_of_year, h.azimuth_deg, h.elevation_deg

    c12, s12, s11 = line(clock, 12), line(std, 12), line(std, 11)
    # UK civil time: GMT in winter, GMT+1 (BST) from the last Sunday of March to
    # the last Sunday of October (Summer Time Act 1972; EU directive 2000/84/EC).
    # So 12:00 clock time in July is 11:00 standard time, and in January it is
    # 12:00 standard time. Same positions within 0.01 deg.
    for doy, ref in ((196.0, s11), (16.0, s12)):
        i = int(np.flatnonzero(c12[0] == doy)[0])
        j = int(np.flatnonzero(ref[0] == doy)[0])
        assert c12[1][i] == pytest.approx(ref[1][j], abs=0.01)
        assert c12[2][i] == pytest.approx(ref[2][j], abs=0.01)
    # the clock line jumps at the two changes: at least two pieces
    assert np.isnan(c12[1]).sum() >= 1
    assert not np.isnan(s12[1][:-1]).any()
    # event hours read one hour later on the clock in July, the same in January
    jul, jan = clock.events.iloc[6], clock.events.iloc[0]
    assert jul["sunrise_h"] - std.events.iloc[6]["sunrise_h"] == pytest.approx(1.0, abs=1e-6)
    assert jan["sunrise_h"] == pytest.approx(std.events.iloc[0]["sunrise_h"], abs=1e-6)


def test_hill_in_the_east_delays_the_sun():
    hill = HorizonProfile((0.0, 44.0, 45.0, 135.0, 136.0), (0.0, 0.0, 10.0, 10.0, 0.0))
    site = Site("equator, hill east", 0.0, 0.0, 0.0, "UTC", horizon=hill)
    chart = sun_chart(site, "2023-03-20")
    s = chart.summary
    # At the equator at the equinox the sun climbs straight up in the east at
    # 15 deg/h (Duffie & Beckman 2013 eq. 1.6.5 with phi = delta = 0: altitude =
    # 90 - |omega|). Sunrise is the upper limb on the horizon, the centre at
    # geometric -0.8333 deg (Reda & Andreas 2008 App. A.2); likewise the sun
    # clears a 10 deg hill when its upper limb does, the centre at apparent
    # 10 - 0.2667 = 9.733 deg, geometric 9.641 deg (refraction 5.5' there,
    # Bennett 1982 via Meeus 1998 eq. 16.4, from memory):
    # (9.641 + 0.8333) / 15 h = 41.9 min later. Tolerance 1 min.
    assert s.sunrise is not None and s.clears_horizon is not None
    delay_min = (s.clears_horizon - s.sunrise).total_seconds() / 60.0
    assert delay_min == pytest.approx(41.9, abs=1.0)
    assert s.clears_horizon_h > s.sunrise_h
    # nothing in the west: the sun sets behind the plain horizon, at sunset
    assert s.behind_horizon is None and np.isnan(s.behind_horizon_h)
    assert s.direct_sun_h == pytest.approx(s.day_length_h - 41.9 / 60.0, abs=1.5 / 60.0)
    # the bold path marks its samples before the sun clears the hill as hidden
    # (its flag compares the sun's centre, so allow the 1-2 min the semi-diameter takes)
    early = (chart.day.time < s.clears_horizon - pd.Timedelta(minutes=1))
    late = ((chart.day.time > s.clears_horizon + pd.Timedelta(minutes=4))
            & (chart.day.time < s.sunset - pd.Timedelta(minutes=4)))
    assert early.any() and not chart.day.visible[early].any()
    assert chart.day.visible[late].all()


def test_horizon_crossings_without_horizon_are_sunrise_and_sunset():
    site = Site("flat", 40.0, 0.0, 0.0, "UTC")
    cr = horizon_crossings(site, ["2023-05-01"]).iloc[0]
    ev = sun_events(site, ["2023-05-01"]).table.iloc[0]
    # A flat horizon hides nothing: the sampled crossings of the -0.8333 deg
    # line agree with the SPA rise/set procedure (Reda & Andreas 2008 App. A.2)
    # within 1 min (same test as tests/engine/test_sun.py).
    assert abs((cr["first_clear"] - ev["sunrise"]).total_seconds()) < 60
    assert abs((cr["last_clear"] - ev["sunset"]).total_seconds()) < 60
    assert cr["direct_sun_h"] == pytest.approx(ev["day_length_h"], abs=2.0 / 60.0)
    # and the monthly table reports no separate horizon times for it
    assert monthly_events(site, 2023)["clears_horizon"].isna().all()


def test_chart_contents(demo_charts):
    site, chart = demo_charts["larkmoor-dairy"]
    assert [p.label for p in chart.paths] == [lab for lab, _ in standard_path_dates(site, 2023)]
    kinds = [p.kind for p in chart.paths]
    assert kinds.count("solstice") == 2 and kinds.count("equinox") == 2
    assert kinds.count("month") == 12
    assert chart.day.kind == "chosen" and chart.day.date.isoformat() == "2023-06-21"
    for p in chart.paths:
        assert str(p.time.tz) == site.timezone
        assert (p.elevation_deg > RISE_SET_ELEVATION_DEG).all()
        assert len(p.hour) == len(p.azimuth_deg) == len(p.visible)
    # horizon every degree 0..360 (plus obstacle edges), equal to the site horizon
    whole = np.arange(0.0, 361.0)
    assert np.isin(whole, chart.horizon_azimuth_deg).all()
    at = np.searchsorted(chart.horizon_azimuth_deg, whole[:-1])
    assert np.allclose(chart.horizon_elevation_deg[at], site_horizon_deg(site, whole[:-1]),
                       atol=1e-3)
    assert chart.horizon_elevation_deg[-1] == chart.horizon_elevation_deg[0]
    assert len(chart.events) == 12 and chart.events["date"].iloc[0].isoformat() == "2023-01-21"
    assert chart.equator_azimuth_deg == 180.0
    assert {h.hour for h in chart.hour_lines} >= set(range(5, 21))


def test_basis_hours_of_a_known_instant():
    site = Site("Greenwich-like", 51.48, 0.0, 0.0, "Europe/London")
    t = pd.DatetimeIndex([pd.Timestamp("2023-07-01 12:00", tz="UTC"), pd.NaT])
    # BST is UTC+1 (Summer Time Act 1972): 13:00 clock, 12:00 standard time.
    assert basis_hours(t, site, "clock")[0] == pytest.approx(13.0)
    assert basis_hours(t, site, "standard")[0] == pytest.approx(12.0)
    # apparent solar time at longitude 0 is UTC + equation of time, which is
    # about -3.8 min on 1 July (common practice, no source; from memory),
    # within 0.5 min.
    assert basis_hours(t, site, "solar")[0] == pytest.approx(12.0 - 3.8 / 60.0, abs=0.5 / 60)
    assert np.isnan(basis_hours(t, site, "clock")[1])


def test_bad_input_is_named():
    site = Site("x", 10.0, 0.0, 0.0, "UTC")
    with pytest.raises(ValueError, match="basis = 'sidereal'"):
        sun_chart(site, "2023-01-01", basis="sidereal")
    with pytest.raises(ValueError, match="step_min = 0"):
        sun_chart(site, "2023-01-01", step_min=0)
    with pytest.raises(ValueError, match="date = 'soon'"):
        sun_chart(site, "soon")
    with pytest.raises(ValueError, match="between 1900 and 2100"):
        sun_chart(site, "1850-01-01")


def test_progress_can_cancel():
    site = Site("x", 10.0, 0.0, 0.0, "UTC")
    stages = []

    def progress(fraction, stage):
        stages.append(stage)
        if stage == "hour lines":
            raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        sun_chart(site, "2023-01-01", progress=progress)
    assert stages == ["day paths", "hour lines"]
