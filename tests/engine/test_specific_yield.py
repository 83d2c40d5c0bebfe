"""Indicative specific yield (tiltyard.engine.specific_yield).

External references: pvlib 0.16.1 ``pvlib.temperature.faiman``, the reference
implementation of Faiman, D. (2008), Assessing the outdoor operating
temperature of photovoltaic modules, Progress in Photovoltaics 16(4),
307-315; worked checks of Faiman's equation ``Tc = Ta + E / (U0 + U1 v)``
by hand.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pvlib
import pytest

from tiltyard.engine.specific_yield import LABEL, specific_yield


def _hourly(values, start="2023-07-01 10:00", tz="Europe/Berlin"):
    idx = pd.date_range(start, periods=len(values), freq="h", tz=tz)
    return pd.Series(np.asarray(values, dtype=float), index=idx)


# inputs spanning night, low and high irradiance, cold and hot air, calm and wind
POA = _hourly([0.0, 50.0, 220.0, 480.0, 760.0, 990.0, 1120.0, 640.0, 310.0, 5.0])
TEMP_AIR = np.array([-12.0, -3.0, 4.0, 11.0, 19.0, 27.0, 35.0, 41.0, 22.0, 8.0])
WIND = np.array([0.0, 0.4, 1.0, 2.5, 4.0, 6.0, 9.0, 0.2, 3.0, 12.0])


def test_cell_temperature_equals_pvlib_faiman():
    r = specific_yield(POA, 1.0, TEMP_AIR, WIND, u0=27.5, u1=5.2)
    ref = pvlib.temperature.faiman(POA.to_numpy(), TEMP_AIR, WIND, u0=27.5, u1=5.2)
    # pvlib 0.16.1 temperature.faiman (Faiman 2008); tolerance 1e-12 C
    np.testing.assert_allclose(r.series["temp_cell"].to_numpy(), ref, rtol=0, atol=1e-12)
    assert r.temperature_model == "faiman"
    # and with pvlib's default coefficients and wind speed (1 m/s), the defaults here
    r0 = specific_yield(POA, 1.0, TEMP_AIR)
    ref0 = pvlib.temperature.faiman(POA.to_numpy(), TEMP_AIR)
    np.testing.assert_allclose(r0.series["temp_cell"].to_numpy(), ref0, rtol=0, atol=1e-12)
    assert any("1 m/s assumed" in n for n in r0.notes)


def test_worked_example_one_hour_at_1000_w_m2():
    # Worked check of Faiman (2008), Tc = Ta + E / (U0 + U1 v): E = 1000 W/m2,
    # Ta = 25 C, v = 1 m/s, U0 = 25.0, U1 = 6.84 (Faiman's values, as pvlib's
    # defaults): Tc = 25 + 1000 / 31.84 = 56.4070 C (hand arithmetic; 1e-4 C)
    r = specific_yield(_hourly([1000.0]), 1.0, temp_air=25.0, wind_speed=1.0)
    assert r.series["temp_cell"].iloc[0] == pytest.approx(56.4070, abs=1e-4)
    # dc factor 1 - 0.004 x 31.4070 = 0.874372 (hand; common practice, no
    # source, for the -0.4 %/K coefficient); 1 h at 1000 W/m2 is 1 kWh/kWp
    # at STC; times (1 - 0.14): 0.751960 kWh/kWp; tolerance 1e-6 kWh/kWp
    assert r.series["dc_kw_kwp"].iloc[0] == pytest.approx(0.874372, abs=1e-6)
    assert r.annual_kwh_kwp == pytest.approx(0.874372 * 0.86, abs=1e-6)
    # the temperature loss is the same 12.5628 % (one interval); 1e-4 %
    assert r.temperature_loss_pct == pytest.approx(12.5628, abs=1e-4)


def test_cold_cells_gain():
    # Worked check of Faiman (2008): E = 200 W/m2, Ta = -10 C, v = 1 m/s:
    # Tc = -10 + 200 / 31.84 = -3.7186 C; factor 1 + 0.004 x 28.7186 = 1.114874
    # (hand arithmetic), a negative loss of -11.4874 %; tolerance 1e-4 %
    r = specific_yield(_hourly([200.0]), 1.0, temp_air=-10.0, loss_fraction=0.0)
    assert r.temperature_loss_pct == pytest.approx(-11.4874, abs=1e-4)
    assert r.annual_kwh_kwp == pytest.approx(0.2 * 1.114874, abs=1e-6)


def test_loss_fraction_is_applied_exactly():
    # definition of the single loss fraction (common practice, no source):
    # yield scales by (1 - loss) exactly; relative tolerance 1e-12
    base = specific_yield(POA, 1.0, TEMP_AIR, WIND, loss_fraction=0.0)
    for loss in (0.05, 0.14, 0.3, 0.9):
        r = specific_yield(POA, 1.0, TEMP_AIR, WIND, loss_fraction=loss)
        assert r.annual_kwh_kwp == pytest.approx(base.annual_kwh_kwp * (1.0 - loss), rel=1e-12)
        np.testing.assert_allclose(r.monthly_kwh_kwp, np.array(base.monthly_kwh_kwp)
                                   * (1.0 - loss), rtol=1e-12)
        assert r.loss_fraction == loss


def test_without_air_temperature_no_correction():
    r = specific_yield(POA, 0.5, loss_fraction=0.2, wind_speed=3.0)
    poa_kwh_m2 = POA.sum() * 0.5 / 1000.0
    # 1 kWh/m2 = 1 kWh/kWp at STC (1000 W/m2; common practice, no source),
    # times (1 - loss); relative tolerance 1e-12
    assert r.annual_kwh_kwp == pytest.approx(poa_kwh_m2 * 0.8, rel=1e-12)
    assert r.temperature_model == "none"
    assert r.temperature_loss_pct == 0.0
    assert r.series["temp_cell"].isna().all()
    assert any("no temperature correction" in n for n in r.notes)
    assert any("wind speed ignored" in n for n in r.notes)


def test_no_loss_no_coefficient_gives_plane_irradiation():
    # 1 kWh/m2 of plane irradiation = 1 kWh/kWp by the STC definition of the
    # kWp at 1000 W/m2 (common practice, no source): with gamma 0 and no loss
    # the yield is the irradiation even with hot cells; rel. tolerance 1e-12
    dt = np.linspace(0.25, 1.0, len(POA))
    r = specific_yield(POA, dt, TEMP_AIR, WIND, loss_fraction=0.0, gamma_pdc=0.0)
    assert r.annual_kwh_kwp == pytest.approx(float(np.sum(POA.to_numpy() * dt)) / 1000.0,
                                             rel=1e-12)
    assert r.temperature_loss_pct == pytest.approx(0.0, abs=1e-12)


def test_monthly_values_by_local_calendar_month():
    # one hour a day at 500 W/m2 through a non-leap year: each month gets
    # 0.5 kWh/kWp per day (STC definition, common practice, no source) times
    # its number of days (Gregorian calendar); tolerance 1e-9 kWh/kWp
    days = pd.date_range("2023-01-01 12:00", "2023-12-31 12:00", freq="D", tz="Europe/Berlin")
    r = specific_yield(pd.Series(500.0, index=days), 1.0, loss_fraction=0.0)
    np.testing.assert_allclose(r.monthly_kwh_kwp, 0.5 * np.array(
        [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]), rtol=0, atol=1e-9)
    assert r.annual_kwh_kwp == pytest.approx(0.5 * 365, abs=1e-9)
    assert len(r.monthly_kwh_kwp) == 12
    # months of the index's own time zone: 00:30 on 1 February in Berlin is
    # still January in UTC, and counts for February here
    edge = pd.Series([1000.0], index=pd.DatetimeIndex(
        [pd.Timestamp("2023-02-01 00:30", tz="Europe/Berlin")]))
    r2 = specific_yield(edge, 1.0, loss_fraction=0.0)
    assert r2.monthly_kwh_kwp[1] == pytest.approx(1.0) and r2.monthly_kwh_kwp[0] == 0.0


def test_result_carries_its_label():
    r = specific_yield(POA, 1.0, TEMP_AIR)
    assert r.label == LABEL
    assert "indicative" in r.label and "not a system design" in r.label
    assert r.gamma_pdc == -0.004 and r.loss_fraction == 0.14
    assert (r.u0, r.u1) == (25.0, 6.84)


@pytest.mark.parametrize("kwargs, message", [
    (dict(loss_fraction=0.95), "loss_fraction = 0.95: must be between 0 and 0.9"),
    (dict(loss_fraction=-0.1), "loss_fraction = -0.1: must be between 0 and 0.9"),
    (dict(gamma_pdc=0.001), "gamma_pdc = 0.001: must be between -0.01 and 0 1/K"),
    (dict(gamma_pdc=-0.02), "gamma_pdc = -0.02: must be between -0.01 and 0 1/K"),
    (dict(temp_air=np.zeros(3)), "temp_air: has 3 values, must have 10"),
    (dict(temp_air=25.0, wind_speed=np.ones(4)), "wind_speed: has 4 values, must have 10"),
    (dict(temp_air=25.0, wind_speed=-1.0), "wind_speed = -1.0: must be between 0 and 75"),
    (dict(temp_air=120.0), "temp_air = 120.0: must be between -90 and 70"),
    (dict(interval_h=0.0), "interval_h = 0.0: must be greater than 0 and at most 24 h"),
    (dict(interval_h=np.ones(9)), "interval_h: has 9 values, must have 10"),
    (dict(u0=0.0, temp_air=25.0), "u0 = 0.0: must be greater than 0"),
    (dict(temp_air=pd.Series(20.0, index=POA.index + pd.Timedelta(hours=1))),
     "temp_air: its index differs from poa_global's index"),
])
def test_bad_inputs_name_the_field(kwargs, message):
    args = dict(interval_h=1.0)
    args.update(kwargs)
    with pytest.raises(ValueError) as err:
        specific_yield(POA, **args)
    assert message in str(err.value)


def test_bad_irradiance_series_is_refused():
    bad = POA.copy()
    bad.iloc[3] = -5.0
    with pytest.raises(ValueError, match=r"poa_global\[3\] \(2023-07-01T13:00:00\+02:00\) = "
                                         r"-5.0: must be between 0 and 2000 W/m2"):
        specific_yield(bad, 1.0)
    bad.iloc[3] = np.nan
    with pytest.raises(ValueError, match=r"poa_global\[3\]"):
        specific_yield(bad, 1.0)
    with pytest.raises(ValueError, match="timezone-aware"):
        specific_yield(POA.tz_localize(None), 1.0)
    with pytest.raises(ValueError, match="must be a pandas Series"):
        specific_yield(POA.to_numpy(), 1.0)
    with pytest.raises(ValueError, match="empty"):
        specific_yield(POA.iloc[:0], 1.0)
