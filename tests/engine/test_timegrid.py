"""The year's intervals and the midpoint convention."""

import numpy as np
import pandas as pd
import pytest

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.jobs import IrradianceOptions, irradiance_year
from tiltyard.engine.site import Site
from tiltyard.engine.solarpos import solar_position
from tiltyard.engine.sun import evaluation_points
from tiltyard.engine.timegrid import (
    REFERENCE_YEAR,
    STEPS_MIN,
    apparent_solar_time_h,
    standard_offset,
    to_display,
    year_grid,
)


@pytest.mark.parametrize("step", STEPS_MIN)
def test_grid_counts_and_bounds(step):
    g = year_grid("Europe/London", REFERENCE_YEAR, step)
    assert REFERENCE_YEAR % 4 != 0  # the reference year is not a leap year
    # a non-leap year has 525600 minutes whatever daylight saving does
    assert len(g) == 525600 // step
    loc = g.start_local
    assert loc[0] == pd.Timestamp(f"{REFERENCE_YEAR}-01-01 00:00", tz="Europe/London")
    last_end = g.boundaries_utc[-1].tz_convert("Europe/London")
    assert last_end == pd.Timestamp(f"{REFERENCE_YEAR + 1}-01-01 00:00", tz="Europe/London")
    assert str(g.start_utc.tz) == "UTC"
    assert (np.diff(g.start_utc.asi8) > 0).all()


def test_grid_rejects_bad_step_and_year():
    with pytest.raises(ValueError, match="interval = 7 min"):
        year_grid("UTC", 2023, 7)


@pytest.mark.parametrize("step", [2, 3, 4, 6, 12, 20])
def test_grid_takes_every_interval_that_divides_an_hour(step):
    # a year has 525600 minutes (365 days; 2023 is not a leap year: common practice, no source)
    g = year_grid("Europe/Berlin", 2023, step)
    assert len(g) == 525600 // step
    assert (g.start_utc[1] - g.start_utc[0]) == pd.Timedelta(minutes=step)
    with pytest.raises(ValueError, match="year"):
        year_grid("UTC", 1800, 60)


def test_half_hour_zone_grid_starts_on_local_midnight():
    g = year_grid("Asia/Kathmandu", 2023, 60)
    assert g.start_local[0].strftime("%H:%M %z") == "00:00 +0545"


def test_standard_and_clock_display():
    # Sydney is on daylight saving in January (UTC+11); standard time is UTC+10.
    # IANA tz database (common practice, no source).
    assert standard_offset("Australia/Sydney", 2023) == pd.Timedelta(hours=10)
    t = pd.DatetimeIndex([pd.Timestamp("2023-01-15 02:00", tz="UTC")])
    assert to_display(t, "Australia/Sydney", "clock")[0].hour == 13
    assert to_display(t, "Australia/Sydney", "standard")[0].hour == 12


def test_apparent_solar_time_is_noon_at_transit():
    site = Site("solar time", 40.0, -75.0, 0.0, "America/New_York")
    from tiltyard.engine.sunevents import sun_events
    ev = sun_events(site, ["2023-02-11", "2023-11-03"]).table
    t = pd.DatetimeIndex(ev["solar_noon"]).tz_convert("UTC")
    eot = solar_position(t, site)["equation_of_time"].to_numpy()
    # Duffie & Beckman (2013) eq. 1.5.2: solar time at transit is 12:00;
    # within 0.5 min.
    assert np.allclose(apparent_solar_time_h(t, site.longitude_deg, eot), 12.0, atol=0.5 / 60)


def test_sunrise_intervals_use_the_sun_up_part():
    site = Site("fractions", 50.0, 0.0, 0.0, "UTC")
    g = year_grid("UTC", 2023, 60)
    ep = evaluation_points(g, site)
    frac = ep.sun_up_fraction
    assert ((frac >= 0) & (frac <= 1)).all()
    partial = (frac > 0) & (frac < 1)
    # two partial intervals a day (sunrise and sunset) at 50 N
    assert partial.sum() == pytest.approx(2 * 365, abs=4)
    # where the sun is partly up, the evaluation instant has the sun up
    el = ep.position["elevation"].to_numpy()
    assert (el[partial] > -0.05).all()
    # the sum of sun-up time equals the geometric day length summed over the
    # year to within 0.1 % (sampled at 1 min as an independent check)
    t = pd.date_range("2023-01-01", "2024-01-01", freq="1min", tz="UTC", inclusive="left")
    up_min = (solar_position(t, site)["elevation"].to_numpy() > 0).sum()
    assert frac.sum() * 60 == pytest.approx(up_min, rel=1e-3)


def test_hourly_totals_match_one_minute_year():
    # The midpoint convention: an hourly year's totals agree with a 1-minute
    # year's within 0.5 % (the brief's acceptance criterion). Demo site with a
    # horizon and obstacles, Perez, a south-facing 35 deg plane.
    site = load_demo("larkmoor-dairy")
    hourly = irradiance_year(site, 35.0, 180.0, IrradianceOptions(step_min=60))
    minute = irradiance_year(site, 35.0, 180.0, IrradianceOptions(step_min=1))
    for key in ("extraterrestrial_horizontal_kwh_m2", "ghi_kwh_m2", "poa_kwh_m2",
                "poa_beam_kwh_m2", "poa_sky_diffuse_kwh_m2"):
        assert hourly.annual[key] == pytest.approx(minute.annual[key], rel=5e-3), key


def test_hourly_totals_match_ten_minute_year_in_the_arctic():
    site = load_demo("tarnvik-cabin")
    hourly = irradiance_year(site, 60.0, 180.0, IrradianceOptions(step_min=60))
    fine = irradiance_year(site, 60.0, 180.0, IrradianceOptions(step_min=10))
    for key in ("extraterrestrial_horizontal_kwh_m2", "ghi_kwh_m2", "poa_kwh_m2"):
        assert hourly.annual[key] == pytest.approx(fine.annual[key], rel=5e-3), key
