"""One day of irradiance (irradiance_day) and the compared options' yearly figures.

Checked against: the year computed by irradiance_year (the same arithmetic),
published closed forms (Duffie & Beckman eq. 1.10.3; Spencer 1971 through
pvlib), the solar constant (Kopp & Lean 2011) and pvlib's transposition.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pvlib
import pytest

from tiltyard.engine.daycurves import (
    DAY_STEP_MIN,
    TOTAL_KEYS,
    _clear_day,
    compare_options,
    day_grid,
    irradiance_day,
)
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.horizon_loss import schedule_horizon_loss
from tiltyard.engine.jobs import irradiance_year
from tiltyard.engine.site import Site
from tiltyard.engine.skyyear import IrradianceOptions, sky_year
from tiltyard.engine.tilt import StudyOptions, tilt_study
from tiltyard.engine.weather import WeatherData

# the day totals that irradiance_year's series also carries, by series column
_YEAR_COLUMNS = {"extraterrestrial_horizontal_kwh_m2": "extraterrestrial_horizontal",
                 "extraterrestrial_poa_kwh_m2": "extraterrestrial_poa",
                 "ghi_kwh_m2": "ghi", "dni_kwh_m2": "dni", "dhi_kwh_m2": "dhi",
                 "poa_kwh_m2": "poa_global", "poa_beam_kwh_m2": "poa_direct",
                 "poa_sky_diffuse_kwh_m2": "poa_sky_diffuse",
                 "poa_ground_kwh_m2": "poa_ground_diffuse", "poa_open_kwh_m2": "poa_global_open"}


def _year_day_totals(result, date: str) -> dict:
    """One local date's totals out of an irradiance_year result (kWh/m²)."""
    s = result.series
    local = s.index.tz_convert(result.site.timezone)
    day = pd.Timestamp(date)
    sel = s[(local.month == day.month) & (local.day == day.day)]
    step_h = result.options.step_min / 60.0
    return {k: float(sel[c].sum()) * step_h / 1000.0 for k, c in _YEAR_COLUMNS.items()}


@pytest.fixture(scope="module")
def larkmoor():
    return load_demo("larkmoor-dairy")


@pytest.fixture(scope="module")
def kelpie():
    return load_demo("kelpie-creek-shed")


# -- agreement with the year ---------------------------------------------------------

@pytest.mark.parametrize("demo,date", [("larkmoor-dairy", "2023-06-21"),
                                       ("kelpie-creek-shed", "2023-06-21"),
                                       ("coral-lane-clinic", "2023-12-21")])
def test_clear_day_at_the_years_step_equals_the_year(demo, date):
    site = load_demo(demo)
    pl = site.planes[0]
    opts = IrradianceOptions(model="perez")
    day = irradiance_day(site, date, pl.tilt_deg, pl.azimuth_deg, opts, step_min=60)
    ref = _year_day_totals(irradiance_year(site, pl.tilt_deg, pl.azimuth_deg, opts), date)
    for key, value in ref.items():
        # regression value: the same intervals and arithmetic as irradiance_year; 1e-7
        # relative covers only TT-UT1, taken at 1 January for the year and at the date
        # for the day (< 0.1 s apart, a sun position change below 0.001 deg)
        assert day.totals_kwh_m2[key] == pytest.approx(value, rel=1e-7, abs=1e-12), key


@pytest.mark.parametrize("model", ["perez", "haydavies", "isotropic"])
def test_clear_day_at_ten_minutes_agrees_with_the_hourly_year(kelpie, model):
    pl = kelpie.planes[1]
    opts = IrradianceOptions(model=model)
    for date in ("2023-06-21", "2023-12-21"):
        day = irradiance_day(kelpie, date, pl.tilt_deg, pl.azimuth_deg, opts)
        assert day.step_min == 10
        ref = _year_day_totals(irradiance_year(kelpie, pl.tilt_deg, pl.azimuth_deg, opts),
                               date)
        for key in ("ghi_kwh_m2", "poa_kwh_m2", "extraterrestrial_horizontal_kwh_m2"):
            # step discretisation: both integrate the clear sky at Gauss-Legendre nodes
            # and the extraterrestrial part in closed form (the hourly midpoint rule was
            # off by about (omega h)^2 / 24 = 0.3 %, Burden & Faires, Numerical Analysis,
            # composite midpoint rule error, from memory); what is left is where the sun
            # crosses the plane's own horizon or the skyline inside an hour: measured up
            # to 0.17 % of a day's plane-of-array total, under 0.01 % for GHI and the
            # extraterrestrial. Tolerance 0.5 % of the day total.
            assert day.totals_kwh_m2[key] == pytest.approx(ref[key], rel=5e-3), (date, key)


def test_monthly_basis_day_is_the_years_day(larkmoor):
    pl = larkmoor.planes[0]
    opts = IrradianceOptions(sky="monthly", model="haydavies")
    result = irradiance_year(larkmoor, pl.tilt_deg, pl.azimuth_deg, opts)
    for date in ("2023-01-15", "2023-07-04"):
        day = irradiance_day(larkmoor, date, pl.tilt_deg, pl.azimuth_deg, opts)
        assert day.step_min == 60
        assert len(day.series) == 24
        ref = _year_day_totals(result, date)
        for key, value in ref.items():
            # regression value: the day is cut out of the same sky year; rounding only
            assert day.totals_kwh_m2[key] == pytest.approx(value, rel=1e-12, abs=1e-12), key
    # the days of a month add up to irradiance_year's monthly table (here February,
    # 28 days of the same sky year); rounding only
    feb = sum(irradiance_day(larkmoor, f"2023-02-{d:02d}", pl.tilt_deg, pl.azimuth_deg,
                             opts).totals_kwh_m2["poa_kwh_m2"] for d in (1, 2))
    two_days = _year_day_totals(result, "2023-02-01")["poa_kwh_m2"] + _year_day_totals(
        result, "2023-02-02")["poa_kwh_m2"]
    assert feb == pytest.approx(two_days, rel=1e-12)  # regression value


def test_weather_basis_day_is_the_years_day():
    site = Site("open 40N", 40.0, -105.0, 1600.0, "Etc/GMT+7")
    idx = pd.date_range("2023-01-01 07:00", periods=8760, freq="60min", tz="UTC")
    # invented demo data (a smooth GHI-only year) to exercise the weather path, not a check
    # value: the check is agreement with irradiance_year on the same data
    hours = (idx.hour.to_numpy() - 7) % 24
    ghi = np.clip(600.0 * np.sin(np.pi * (hours - 6.0) / 12.0), 0.0, None)
    weather = WeatherData(pd.DataFrame({"ghi": ghi}, index=pd.DatetimeIndex(idx,
                                                                            name="interval_start")),
                          60, "demo.csv (CSV)", "start", ())
    opts = IrradianceOptions(sky="file", weather=weather, model="perez")
    day = irradiance_day(site, "2023-05-10", 30.0, 180.0, opts)
    ref = _year_day_totals(irradiance_year(site, 30.0, 180.0, opts), "2023-05-10")
    for key, value in ref.items():
        # regression value: the same sky year cut at the date; rounding only
        assert day.totals_kwh_m2[key] == pytest.approx(value, rel=1e-12, abs=1e-12), key
    assert "demo.csv" in day.sky_label


# -- the outside world ---------------------------------------------------------------

def test_clear_sky_ghi_never_exceeds_the_extraterrestrial_horizontal():
    for demo in ("larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic", "high-pass-hut"):
        site = load_demo(demo)
        for date in ("2023-03-20", "2023-06-21", "2023-12-21"):
            s = irradiance_day(site, date, 0.0, 180.0).series
            # energy conservation: the atmosphere does not add to the extraterrestrial beam
            # on a horizontal surface (Duffie & Beckman 2013, Solar Engineering of Thermal
            # Processes, eq. 1.10.1); tolerance 1e-9 W/m2 for rounding
            assert (s["ghi"] <= s["extraterrestrial_horizontal"] + 1e-9).all(), (demo, date)
            assert (s["dni"] <= s["dni_extra"] + 1e-9).all(), (demo, date)
            # closure GHI = DHI + DNI cos z of the clear-sky components (Duffie & Beckman
            # 2013, sec. 2.8, from memory). It holds at each node; the series hold means
            # over each 10-minute interval's nodes, where the mean of DNI cos z differs
            # from the mean DNI times cos z at the evaluation instant by the curvature
            # over the interval (measured up to 0.13 W/m2); tolerance 0.5 W/m2
            closure = s["dhi"] + s["dni"] * np.cos(np.radians(s["apparent_zenith"]))
            up = s["sun_up_fraction"] > 0
            np.testing.assert_allclose(s["ghi"][up], closure[up], atol=0.5)


def test_extraterrestrial_normal_at_the_equinox_noon_on_the_equator():
    site = Site("equator", 0.0, 0.0, 0.0, "UTC")
    day = irradiance_day(site, "2023-03-20", 0.0, 0.0)
    s = day.series
    noon = int(np.argmax(s["apparent_elevation"].to_numpy()))
    e0 = float(s["dni_extra"].iloc[noon])
    # Kopp, G. & Lean, J. L. (2011), GRL 38, L01706: solar constant 1360.8 W/m2 (rounded to
    # 1361); the Earth-Sun distance varies the irradiance by about +/-3.4 % over the year
    # (Duffie & Beckman 2013, eq. 1.4.1a: 1 + 0.033 cos(360 n / 365), from memory)
    assert 1361.0 * (1 - 0.034) <= e0 <= 1361.0 * (1 + 0.034)
    # Spencer, J. W. (1971), Fourier series representation of the position of the sun,
    # Search 2(5), 172: distance factor, as implemented in
    # pvlib.irradiance.get_extra_radiation(method="spencer"); Spencer's series is good to
    # about 1e-4 (from memory); tolerance 0.1 % (1.4 W/m2)
    spencer = float(pvlib.irradiance.get_extra_radiation(79, solar_constant=1361.0,
                                                         method="spencer"))
    assert e0 == pytest.approx(spencer, rel=1e-3)
    # near the zenith at the equinox noon on the equator: the extraterrestrial
    # horizontal is the interval mean of G_on cos z (Duffie & Beckman 2013, eq.
    # 1.10.1); on the equator cos z = cos(delta) cos(w), whose mean over the
    # interval's hour angles w_mid +/- h is cos z(w_mid) sin(h) / h (h = 1.25 deg
    # for 10 minutes); tolerance 1e-7 relative (the declination's change in 10 min)
    assert s["apparent_elevation"].iloc[noon] > 88.0  # common practice, no source
    h = np.radians(0.5 * 10.0 * 15.0 / 60.0)
    assert s["extraterrestrial_horizontal"].iloc[noon] == pytest.approx(
        e0 * np.cos(np.radians(s["zenith"].iloc[noon])) * np.sin(h) / h, rel=1e-7)


@pytest.mark.parametrize("date,dec_sensitivity", [("2023-06-21", 0.002), ("2023-12-21", 0.005)])
def test_daily_extraterrestrial_on_the_horizontal_matches_duffie_beckman(date, dec_sensitivity):
    lat = 53.71
    site = Site("open 53.7N", lat, -2.48, 0.0, "Europe/London")
    day = irradiance_day(site, date, 0.0, 180.0)
    n = pd.Timestamp(date).day_of_year
    # Duffie & Beckman (2013), Solar Engineering of Thermal Processes, eq. 1.10.3:
    # H0 = 24/pi G_on [cos phi cos d sin ws + (pi ws / 180) sin phi sin d],
    # with declination and G_on by Spencer (1971) through pvlib
    dec = float(pvlib.solarposition.declination_spencer71(n))
    g_on = float(pvlib.irradiance.get_extra_radiation(n, solar_constant=1361.0,
                                                      method="spencer"))
    phi = np.radians(lat)
    ws = np.arccos(-np.tan(phi) * np.tan(dec))
    h0 = 24.0 / np.pi * g_on * (np.cos(phi) * np.cos(dec) * np.sin(ws)
                                + ws * np.sin(phi) * np.sin(dec)) / 1000.0
    # tolerance: Spencer's declination is good to about 0.035 deg (0.0006 rad; Iqbal 1983,
    # An Introduction to Solar Radiation, from memory), which moves H0 at 53.7 N by 0.08 %
    # in June and 0.4 % in December; the 10-min midpoint rule adds < 0.01 %
    assert day.totals_kwh_m2["extraterrestrial_horizontal_kwh_m2"] == pytest.approx(
        h0, rel=dec_sensitivity)


@pytest.mark.parametrize("model", ["perez", "haydavies", "isotropic"])
def test_plane_of_array_matches_pvlib_on_an_open_horizon(model):
    site = Site("open field 45N", 45.0, 7.0, 300.0, "Europe/Rome", albedo=0.25)
    day = irradiance_day(site, "2023-04-15", 35.0, 200.0, IrradianceOptions(model=model))
    s = day.series
    assert s["sun_visible"][s["sun_up_fraction"] > 0].all()
    # the day's nodes, where its intervals are transposed (tiltyard.engine.skynodes)
    nd = _clear_day(site, day_grid(site, pd.Timestamp("2023-04-15"), DAY_STEP_MIN),
                    IrradianceOptions(model=model)).nodes
    ref = pvlib.irradiance.get_total_irradiance(
        35.0, 200.0, nd.apparent_zenith, nd.azimuth, nd.dni, nd.ghi, nd.dhi,
        dni_extra=nd.dni_extra, albedo=0.25, model=model)
    frac = s["sun_up_fraction"].to_numpy()
    up = frac > 0
    for col in ("poa_global", "poa_direct", "poa_sky_diffuse", "poa_ground_diffuse"):
        mean = np.bincount(nd.interval, weights=np.asarray(ref[col]) * nd.weight,
                           minlength=len(s))
        # pvlib.irradiance.get_total_irradiance (Holmgren, Hansen & Mikofski 2018,
        # JOSS 3(29), 884) at the same nodes and horizontal components, averaged with
        # the nodes' weights over each interval's sun-up part; 1e-9 relative
        np.testing.assert_allclose(s[col].to_numpy()[up], mean[up] / frac[up], rtol=1e-9,
                                   atol=1e-12)
    # an open horizon loses nothing (regression value)
    assert day.totals_kwh_m2["horizon_loss_kwh_m2"] == pytest.approx(0.0, abs=1e-12)


def test_parts_add_up_and_the_horizon_only_takes_away(larkmoor):
    pl = larkmoor.planes[0]
    day = irradiance_day(larkmoor, "2023-12-21", pl.tilt_deg, pl.azimuth_deg)
    s = day.series
    parts = s["poa_direct"] + s["poa_sky_diffuse"] + s["poa_ground_diffuse"]
    np.testing.assert_allclose(s["poa_global"], parts, rtol=1e-12)  # regression value
    t = day.totals_kwh_m2
    assert t["poa_kwh_m2"] == pytest.approx(
        t["poa_beam_kwh_m2"] + t["poa_sky_diffuse_kwh_m2"] + t["poa_ground_kwh_m2"], rel=1e-12)
    # the Larkmoor horizon hides the low winter sun part of the day (regression value)
    assert not s["sun_visible"][s["sun_up_fraction"] > 0].all()
    assert t["horizon_loss_kwh_m2"] > 0.0
    assert (s["poa_global"] <= s["poa_global_open"] + 1e-9).all()
    assert set(TOTAL_KEYS) <= set(t)


def test_day_grid_follows_the_clock_changes():
    site = Site("London", 51.5, -0.1, 0.0, "Europe/London")
    # Directive 2000/84/EC (EU summer time): clocks go forward on the last Sunday of
    # March and back on the last Sunday of October, so those local days last 23 and 25 h
    assert len(day_grid(site, "2023-03-26", 60)) == 23
    assert len(day_grid(site, "2023-10-29", 60)) == 25
    assert len(day_grid(site, "2023-06-21", 10)) == 144
    day = irradiance_day(site, "2023-03-26", 0.0, 180.0)
    assert day.series.index.tz is not None
    assert str(day.series.index.tz) == "Europe/London"
    assert len(day.series) == 23 * 6
    h = day.clock_hours
    assert h.min() >= 0.0 and h.max() < 24.0


def test_bad_input_is_named():
    site = load_demo("larkmoor-dairy")
    with pytest.raises(ValueError, match="surface_tilt = 95"):
        irradiance_day(site, "2023-06-21", 95.0, 180.0)
    with pytest.raises(ValueError, match="surface_azimuth = -1"):
        irradiance_day(site, "2023-06-21", 10.0, -1.0)
    with pytest.raises(ValueError, match="date = 'midsummer'"):
        irradiance_day(site, "midsummer", 10.0, 180.0)
    with pytest.raises(ValueError, match="built for the year 2023"):
        irradiance_day(site, "2024-06-21", 10.0, 180.0, IrradianceOptions(sky="monthly"))
    with pytest.raises(ValueError, match="step_min = 10"):
        irradiance_day(site, "2023-06-21", 10.0, 180.0, IrradianceOptions(sky="monthly"),
                       step_min=10)
    with pytest.raises(ValueError, match="interval = 7 min"):
        irradiance_day(site, "2023-06-21", 10.0, 180.0, step_min=7)


# -- compared options -----------------------------------------------------------------

@pytest.fixture(scope="module")
def kelpie_study(kelpie):
    return tilt_study(kelpie, StudyOptions(tilt_step_deg=5.0))


def test_compare_options_site_planes_are_irradiance_year(kelpie):
    rows = compare_options(kelpie, IrradianceOptions())
    assert [r.label for r in rows] == ["Horizontal"] + [p.label for p in kelpie.planes]
    for r, (t, a) in zip(rows, [(0.0, 0.0)] + [(p.tilt_deg, p.azimuth_deg)
                                               for p in kelpie.planes], strict=True):
        ref = irradiance_year(kelpie, t, a, IrradianceOptions())
        # regression value: the same function
        np.testing.assert_allclose(r.monthly_kwh_m2, ref.monthly["poa_kwh_m2"], rtol=1e-12)
        assert r.horizon_loss_pct == pytest.approx(ref.horizon_loss_pct, rel=1e-12)
        assert r.mean_daily_kwh_m2_day[1] == pytest.approx(r.monthly_kwh_m2[1] / 28.0)
        assert "upper bound" in r.sky_label


def test_compare_options_adds_the_study(kelpie, kelpie_study):
    rows = compare_options(kelpie, IrradianceOptions(), kelpie_study)
    added = [r for r in rows if r.from_study]
    kinds = [r.kind for r in added]
    assert kinds == ["rule-of-thumb", "fixed-optimal", "two-season", "four-season", "monthly",
                     "two-axis"]
    for r in added:
        opt = kelpie_study.option(r.kind)
        np.testing.assert_allclose(r.monthly_kwh_m2, opt.monthly_kwh_m2, rtol=1e-12)
    fixed = kelpie_study.option("fixed-optimal").schedule[0]
    ref = irradiance_year(kelpie, fixed.tilt_deg, fixed.azimuth_deg, IrradianceOptions())
    # consistency with irradiance_year (pvlib-based, Holmgren et al. 2018); 1e-9 relative
    assert added[1].horizon_loss_pct == pytest.approx(ref.horizon_loss_pct, rel=1e-9)
    assert added[-1].horizon_loss_pct is None
    two = kelpie_study.option("two-season")
    sched = schedule_horizon_loss(sky_year(kelpie, IrradianceOptions()), two.label, two.schedule)
    # the many-plane engine is tested against irradiance_year to 1e-9 relative
    # (tests/engine/test_manyplane.py); the schedule sum must agree to the same
    assert sched.site_kwh_m2 == pytest.approx(two.annual_kwh_m2, rel=1e-9)


def test_schedule_refuses_a_tracking_period(kelpie, kelpie_study):
    with pytest.raises(ValueError, match=r"schedule\[0\].*no fixed tilt"):
        schedule_horizon_loss(sky_year(kelpie, IrradianceOptions()), "tracking",
                              kelpie_study.option("two-axis").schedule)
