"""Tests for the monthly-mean tilted-surface method (tiltyard.engine.monthly)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from pvlib import irradiance, solarposition

from tiltyard.engine.geometry import (
    DAYS_IN_MONTH,
    MEAN_DAY_OF_MONTH,
    declination_cooper_deg,
    sunset_hour_angle_deg,
)
from tiltyard.engine.monthly import (
    MonthlyTiltedIrradiation,
    erbs_monthly_diffuse_fraction,
    klein_monthly_beam_ratio,
    klein_monthly_tilted,
    monthly_mean_extraterrestrial_kwh_m2_day,
)

MJ_PER_KWH = 3.6

# Duffie, J. A. & Beckman, W. A. (2013), Solar Engineering of Thermal Processes,
# 4th ed., Example 2.19.1: Madison, WI (latitude 43 deg N), surface sloped 60 deg
# toward the south, isotropic sky, solar constant 1367 W/m2. Monthly values in
# MJ/m2 per day as transcribed (H0 and H to 0.01, H_T to 0.1 MJ/m2) in the test
# suite of DrylandEcology/SOILWAT2, tests/gtests/test_SW_Flow_Lib_PET.cc; the book
# itself could not be consulted here.
EX_2_19_1_H0_MJ = np.array(
    [13.37, 18.81, 26.03, 33.78, 39.42, 41.78, 40.56, 35.92, 28.80, 20.90, 14.62, 11.91]
)
EX_2_19_1_H_MJ = np.array(
    [6.44, 9.89, 12.86, 16.05, 21.36, 23.04, 22.58, 20.33, 14.59, 10.48, 6.37, 5.74]
)
EX_2_19_1_HT_MJ = np.array([13.7, 17.2, 15.8, 14.7, 16.6, 16.5, 16.8, 17.5, 15.6, 15.2, 11.4, 12.7])
# Duffie & Beckman (2013), Example 2.19.1: ground reflectance per month, read from
# the same copy of the book's table as above
# (0.7 with snow in Jan-Feb, 0.4 for the part-snow months Mar and Dec, 0.2
# otherwise). Consistency check: with 0.7 instead of 0.4 in Mar and Dec our H_T
# would miss the published value by ~1.0 and ~0.5 MJ/m2 there.
EX_2_19_1_ALBEDO = np.array([0.7, 0.7, 0.4, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.4])


def _madison_example():
    return klein_monthly_tilted(
        43.0,
        EX_2_19_1_H_MJ / MJ_PER_KWH,
        surface_tilt=60.0,
        surface_azimuth=180.0,
        albedo=EX_2_19_1_ALBEDO,
        solar_constant_w_m2=1367.0,
    )


def _rb_equator_facing_closed_form(latitude_deg, declination_deg, tilt_deg):
    """Duffie & Beckman (2013) eq. 2.19.3 and its southern-hemisphere form, written out here.

    R_b = [cos(phi') cos(d) sin(ws') + ws' sin(phi') sin(d)]
          / [cos(phi) cos(d) sin(ws) + ws sin(phi) sin(d)],
    phi' = phi - beta in the north, phi + beta in the south,
    ws' = min(ws, arccos(-tan(phi') tan(d))), angles in radians.
    """
    phi = np.radians(latitude_deg)
    d = np.radians(declination_deg)
    beta = np.radians(tilt_deg)
    phi_t = phi - beta if latitude_deg >= 0 else phi + beta
    ws = np.arccos(np.clip(-np.tan(phi) * np.tan(d), -1.0, 1.0))
    ws_t = np.minimum(ws, np.arccos(np.clip(-np.tan(phi_t) * np.tan(d), -1.0, 1.0)))
    num = np.cos(phi_t) * np.cos(d) * np.sin(ws_t) + ws_t * np.sin(phi_t) * np.sin(d)
    den = np.cos(phi) * np.cos(d) * np.sin(ws) + ws * np.sin(phi) * np.sin(d)
    return num / den


# ---------------------------------------------------------------------------
# Published worked example
# ---------------------------------------------------------------------------


def test_madison_example_extraterrestrial_matches_duffie_beckman():
    result = _madison_example()
    # Duffie & Beckman (2013) Example 2.19.1, column H0 (published to 0.01 MJ/m2);
    # tolerance 0.02 MJ/m2: rounding of the table plus rounding in the book's
    # own mean-day arithmetic.
    np.testing.assert_allclose(
        result.h0_kwh_m2_day * MJ_PER_KWH, EX_2_19_1_H0_MJ, rtol=0, atol=0.02
    )


def test_madison_example_tilted_total_matches_duffie_beckman():
    result = _madison_example()
    # Duffie & Beckman (2013) Example 2.19.1, column H_T (published to 0.1 MJ/m2);
    # tolerance 0.1 MJ/m2 per month.
    np.testing.assert_allclose(
        result.poa_global_kwh_m2_day * MJ_PER_KWH, EX_2_19_1_HT_MJ, rtol=0, atol=0.1
    )
    # Every month of the example lies inside the Erbs range (the published H/H0
    # columns of Duffie & Beckman 2013 Example 2.19.1 give K_T = 0.44-0.57), so
    # no note is due.
    assert result.notes == ()
    assert not result.erbs_out_of_range.any()


# ---------------------------------------------------------------------------
# Erbs et al. (1982) monthly diffuse fraction
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("kt", "ws_deg", "expected"),
    [
        # Erbs, Klein & Duffie (1982); Duffie & Beckman (2013) eq. 2.12.2, ws <= 81.4:
        # 1.391 - 3.560*0.5 + 4.189*0.25 - 2.137*0.125 = 0.391125 (by hand)
        (0.5, 70.0, 0.391125),
        # same branch, K = 0.7: 1.391 - 2.492 + 2.05261 - 0.732991 = 0.218619 (by hand)
        (0.7, 60.0, 0.218619),
        # the split value itself belongs to the first branch (eq. 2.12.2, "ws <= 81.4")
        (0.5, 81.4, 0.391125),
        # ws > 81.4: 1.311 - 3.022*0.5 + 3.427*0.25 - 1.821*0.125 = 0.429125 (by hand)
        (0.5, 81.5, 0.429125),
        # same branch, K = 0.7: 1.311 - 2.1154 + 1.67923 - 0.624603 = 0.250227 (by hand)
        (0.7, 100.0, 0.250227),
    ],
)
def test_erbs_branches_against_hand_values(kt, ws_deg, expected):
    # hand arithmetic on the published coefficients; tolerance 1e-9 (exact decimals)
    assert erbs_monthly_diffuse_fraction(kt, ws_deg) == pytest.approx(expected, abs=1e-9)


def test_erbs_vectorised_over_months():
    kt = np.array([0.5, 0.5, 0.7, 0.7])
    ws = np.array([70.0, 100.0, 70.0, 100.0])
    # same hand values as above (Duffie & Beckman 2013 eq. 2.12.2), tolerance 1e-9
    np.testing.assert_allclose(
        erbs_monthly_diffuse_fraction(kt, ws),
        [0.391125, 0.429125, 0.218619, 0.250227],
        rtol=0,
        atol=1e-9,
    )


def test_erbs_outside_fitted_range_is_held_at_range_end():
    # Duffie & Beckman (2013) sec. 2.12 give 0.3 <= K_T <= 0.8 as the range of the
    # fit; holding K_T at the range end outside it is common practice, no source.
    # Hand values at the ends, ws <= 81.4 branch:
    # K=0.3: 1.391 - 1.068 + 0.37701 - 0.057699 = 0.642311
    # K=0.8: 1.391 - 2.848 + 2.68096 - 1.094144 = 0.129816
    assert erbs_monthly_diffuse_fraction(0.1, 60.0) == pytest.approx(0.642311, abs=1e-9)
    assert erbs_monthly_diffuse_fraction(0.95, 60.0) == pytest.approx(0.129816, abs=1e-9)


@pytest.mark.parametrize(("kt", "ws_deg", "field"), [(1.2, 60.0, "kt_bar"), (0.5, -3.0, "sunset")])
def test_erbs_rejects_bad_input(kt, ws_deg, field):
    with pytest.raises(ValueError, match=field):
        erbs_monthly_diffuse_fraction(kt, ws_deg)


# ---------------------------------------------------------------------------
# Klein (1977) beam ratio
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("latitude_deg", "tilt_deg", "azimuth_deg"),
    [
        (43.0, 60.0, 180.0),
        (43.0, 20.0, 180.0),
        (20.0, 45.0, 180.0),
        (-33.9, 35.0, 0.0),
        (-43.0, 60.0, 0.0),
        (60.0, 90.0, 180.0),
    ],
)
def test_rb_equator_facing_equals_closed_form(latitude_deg, tilt_deg, azimuth_deg):
    declination = declination_cooper_deg(MEAN_DAY_OF_MONTH)
    rb = klein_monthly_beam_ratio(latitude_deg, declination, tilt_deg, azimuth_deg)
    expected = _rb_equator_facing_closed_form(latitude_deg, declination, tilt_deg)
    # Duffie & Beckman (2013) eq. 2.19.3 and southern form (Klein 1977, equator-facing
    # surfaces); same integral in closed form, tolerance 1e-10 (rounding only).
    np.testing.assert_allclose(rb, expected, rtol=0, atol=1e-10)


def _rb_numerical_pvlib(latitude_deg, declination_deg, tilt_deg, azimuth_deg, n=20_000):
    """R_b by brute-force quadrature over the day with pvlib's geometry.

    The grid runs from horizontal sunrise to sunset (D&B 2013 eq. 1.6.10), where
    the integrand may jump, so the trapezoid rule stays second order. ``n`` is
    even so that no node falls on solar noon, where pvlib's
    solar_azimuth_analytical returns 180 deg whatever the hemisphere.
    """
    lat = np.radians(latitude_deg)
    dec = np.radians(declination_deg)
    ws = np.arccos(np.clip(-np.tan(lat) * np.tan(dec), -1.0, 1.0))
    w = np.linspace(-ws, ws, n)
    zenith = solarposition.solar_zenith_analytical(lat, w, dec)
    azimuth = solarposition.solar_azimuth_analytical(lat, w, dec, zenith)
    proj = irradiance.aoi_projection(tilt_deg, azimuth_deg, np.degrees(zenith), np.degrees(azimuth))
    num = np.trapezoid(np.maximum(proj, 0.0), w)
    den = np.trapezoid(np.maximum(np.cos(zenith), 0.0), w)
    return num / den


@pytest.mark.parametrize(
    ("latitude_deg", "month", "tilt_deg", "azimuth_deg"),
    [
        (43.0, 1, 60.0, 180.0),  # textbook case
        (43.0, 6, 90.0, 90.0),  # east wall
        (43.0, 6, 90.0, 0.0),  # north wall at midsummer: sunlit morning and evening
        (43.0, 3, 35.0, 225.0),  # south-west roof
        (-33.9, 7, 30.0, 45.0),  # southern hemisphere, north-east roof
        (65.0, 6, 75.0, 350.0),  # high latitude, nearly north-facing
        (80.0, 6, 40.0, 200.0),  # polar day
        (10.0, 12, 15.0, 0.0),  # tropics, poleward tilt
    ],
)
def test_rb_any_azimuth_matches_pvlib_quadrature(latitude_deg, month, tilt_deg, azimuth_deg):
    declination = float(declination_cooper_deg(MEAN_DAY_OF_MONTH[month - 1]))
    rb = klein_monthly_beam_ratio(latitude_deg, declination, tilt_deg, azimuth_deg)
    expected = _rb_numerical_pvlib(latitude_deg, declination, tilt_deg, azimuth_deg)
    # Klein (1977) definition of R_b (ratio of daily extraterrestrial beam on the
    # surface to that on the horizontal) integrated numerically with pvlib's
    # solar_zenith/azimuth_analytical and aoi_projection (pvlib 0.16); trapezoid
    # rule with 2e4 steps (quadrature error below 1e-8), tolerance 1e-7 in R_b.
    assert float(rb) == pytest.approx(expected, abs=1e-7)


def test_rb_east_and_west_are_mirror_images():
    declination = declination_cooper_deg(MEAN_DAY_OF_MONTH)
    east = klein_monthly_beam_ratio(43.0, declination, 90.0, 90.0)
    west = klein_monthly_beam_ratio(43.0, declination, 90.0, 270.0)
    # cos(theta) of Duffie & Beckman (2013) eq. 1.6.2 is symmetric under
    # (gamma, w) -> (-gamma, -w); tolerance 1e-12 (rounding only)
    np.testing.assert_allclose(east, west, rtol=0, atol=1e-12)


@pytest.mark.parametrize("azimuth_north_deg", [180.0, 135.0, 90.0, 250.0, 0.0])
def test_rb_southern_hemisphere_is_exact_mirror(azimuth_north_deg):
    # Reflecting the site across the equator maps latitude -> -latitude,
    # declination -> -declination and a surface facing azimuth A to one facing
    # (180 - A) mod 360 (north <-> south, east and west kept): eq. 1.6.2 of
    # Duffie & Beckman (2013) is unchanged, so R_b must be identical.
    declination = declination_cooper_deg(MEAN_DAY_OF_MONTH)
    azimuth_south_deg = (180.0 - azimuth_north_deg) % 360.0
    north = klein_monthly_beam_ratio(43.0, declination, 60.0, azimuth_north_deg)
    south = klein_monthly_beam_ratio(-43.0, -declination, 60.0, azimuth_south_deg)
    # tolerance 1e-12 (rounding only)
    np.testing.assert_allclose(south, north, rtol=0, atol=1e-12)


def test_southern_hemisphere_with_months_shifted_by_six_is_similar():
    north = _madison_example()
    shifted = np.roll(np.arange(12), -6)  # southern month i mirrors northern month i+6
    h0_south = monthly_mean_extraterrestrial_kwh_m2_day(-43.0, 1367.0)
    # Same clearness index as the mirrored northern month, so that the
    # perihelion-related difference in H0 (about +-3.3 %, Duffie & Beckman 2013
    # eq. 1.4.1a) does not enter; what remains is geometry.
    ghi_south = north.kt_bar[shifted] * h0_south
    south = klein_monthly_tilted(
        -43.0, ghi_south, 60.0, 0.0, EX_2_19_1_ALBEDO[shifted], solar_constant_w_m2=1367.0
    )
    np.testing.assert_allclose(south.kt_bar, north.kt_bar[shifted], rtol=1e-12)
    np.testing.assert_allclose(south.diffuse_fraction, north.diffuse_fraction[shifted], rtol=1e-12)

    # The recommended mean days of months six apart are not exact mirror images:
    # their Cooper declinations (D&B 2013 eq. 1.6.1a, Table 1.6.1) differ in
    # magnitude by up to about 0.5 deg ...
    declination = declination_cooper_deg(MEAN_DAY_OF_MONTH)
    mismatch_deg = np.abs(declination + declination[shifted])
    assert mismatch_deg.max() < 0.51
    # ... and at 43 deg with a 60 deg slope a 0.51 deg change of declination
    # either way moves the closed-form R_b (eq. 2.19.3) by less than 2.5 %:
    for step_deg in (-0.51, 0.51):
        sensitivity = np.abs(
            _rb_equator_facing_closed_form(43.0, declination + step_deg, 60.0)
            / _rb_equator_facing_closed_form(43.0, declination, 60.0)
            - 1.0
        )
        assert sensitivity.max() < 0.025
    # Hence R_b, and R = H_T/H (whose other terms are now identical), agree
    # within 2.5 % relative.
    np.testing.assert_allclose(south.rb_bar, north.rb_bar[shifted], rtol=0.025)
    np.testing.assert_allclose(south.r_bar, north.r_bar[shifted], rtol=0.025)


# ---------------------------------------------------------------------------
# Entry function
# ---------------------------------------------------------------------------


@pytest.mark.parametrize("azimuth", [0.0, 180.0, 123.0])
def test_horizontal_surface_gives_ghi_exactly(azimuth):
    ghi = EX_2_19_1_H_MJ / MJ_PER_KWH
    result = klein_monthly_tilted(43.0, ghi, 0.0, azimuth, EX_2_19_1_ALBEDO, 1367.0)
    # Duffie & Beckman (2013) eq. 2.19.1 with beta = 0: R_b = 1, sky view 1,
    # ground view 0, so H_T = H identically (no tolerance).
    assert np.array_equal(result.rb_bar, np.ones(12))
    assert np.array_equal(result.poa_global_kwh_m2_day, ghi)
    assert np.array_equal(result.poa_ground_diffuse_kwh_m2_day, np.zeros(12))


def test_components_add_up_and_monthly_totals():
    result = _madison_example()
    parts = (
        result.poa_direct_kwh_m2_day
        + result.poa_sky_diffuse_kwh_m2_day
        + result.poa_ground_diffuse_kwh_m2_day
    )
    # eq. 2.19.1 of Duffie & Beckman (2013) is the sum of the three parts;
    # tolerance 1e-12 relative (rounding only)
    np.testing.assert_allclose(parts, result.poa_global_kwh_m2_day, rtol=1e-12)
    # days per month of a non-leap year (common practice, no source needed
    # beyond the Gregorian calendar): Jan 31, Feb 28, ...
    assert list(DAYS_IN_MONTH) == [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]
    np.testing.assert_allclose(
        result.poa_global_kwh_m2_month, result.poa_global_kwh_m2_day * DAYS_IN_MONTH, rtol=1e-15
    )
    assert result.poa_global_kwh_m2_year == pytest.approx(result.poa_global_kwh_m2_month.sum())
    # Example 2.19.1 of Duffie & Beckman (2013) in kWh/m2 over a year from its
    # published H_T column (sum of H_T x days / 3.6); tolerance 0.5 % for the
    # 0.1 MJ/m2 rounding of the column.
    published_year = float(np.sum(EX_2_19_1_HT_MJ * DAYS_IN_MONTH) / MJ_PER_KWH)
    assert result.poa_global_kwh_m2_year == pytest.approx(published_year, rel=0.005)


def test_result_is_immutable():
    result = _madison_example()
    assert isinstance(result, MonthlyTiltedIrradiation)
    with pytest.raises(ValueError):
        result.poa_global_kwh_m2_day[0] = 0.0
    with pytest.raises(AttributeError):
        result.surface_tilt = 10.0  # type: ignore[misc]


def test_month_outside_erbs_range_is_flagged():
    ghi = EX_2_19_1_H_MJ / MJ_PER_KWH
    h0 = monthly_mean_extraterrestrial_kwh_m2_day(43.0, 1367.0)
    ghi = ghi.copy()
    ghi[11] = 0.25 * h0[11]  # a very dull December, K_T = 0.25
    ghi[6] = 0.85 * h0[6]  # an implausibly clear July, K_T = 0.85
    result = klein_monthly_tilted(43.0, ghi, 60.0, 180.0, EX_2_19_1_ALBEDO, 1367.0)
    assert list(np.flatnonzero(result.erbs_out_of_range)) == [6, 11]
    assert len(result.notes) == 2
    assert result.notes[0].startswith("Jul") and "0.850" in result.notes[0]
    assert result.notes[1].startswith("Dec") and "0.250" in result.notes[1]
    ws = sunset_hour_angle_deg(43.0, declination_cooper_deg(MEAN_DAY_OF_MONTH))
    # held at the range end (Duffie & Beckman 2013 sec. 2.12: fitted for
    # 0.3 <= K_T <= 0.8; holding at the end is common practice, no source)
    assert result.diffuse_fraction[11] == pytest.approx(
        float(erbs_monthly_diffuse_fraction(0.3, ws[11])), abs=1e-12
    )
    assert result.diffuse_fraction[6] == pytest.approx(
        float(erbs_monthly_diffuse_fraction(0.8, ws[6])), abs=1e-12
    )


def test_polar_night_months_give_zero_and_a_note():
    h0 = monthly_mean_extraterrestrial_kwh_m2_day(75.0)
    # Duffie & Beckman (2013) eq. 1.6.10: at 75 deg N the mean days of Nov, Dec
    # and Jan have -tan(phi) tan(delta) > 1, i.e. no sunrise, so H0 = 0.
    assert list(np.flatnonzero(h0 == 0.0)) == [0, 10, 11]
    ghi = 0.5 * h0
    result = klein_monthly_tilted(75.0, ghi, 45.0, 180.0)
    for i in (0, 10, 11):
        assert result.poa_global_kwh_m2_day[i] == 0.0
        assert result.rb_bar[i] == 0.0
        assert result.r_bar[i] == 0.0
    assert [note[:3] for note in result.notes] == ["Jan", "Nov", "Dec"]
    assert all("polar night" in note for note in result.notes)
    bad = ghi.copy()
    bad[11] = 0.1
    with pytest.raises(ValueError, match=r"ghi_kwh_m2_day\[Dec\].*polar night"):
        klein_monthly_tilted(75.0, bad, 45.0, 180.0)


def _madison_kwargs(**changes):
    kwargs = dict(
        latitude_deg=43.0,
        ghi_kwh_m2_day=EX_2_19_1_H_MJ / MJ_PER_KWH,
        surface_tilt=60.0,
        surface_azimuth=180.0,
        albedo=0.2,
        solar_constant_w_m2=1367.0,
    )
    kwargs.update(changes)
    return kwargs


def _replace(values, index, value):
    out = np.array(values, dtype=float)
    out[index] = value
    return out


@pytest.mark.parametrize(
    ("changes", "pattern"),
    [
        ({"ghi_kwh_m2_day": np.ones(11)}, r"ghi_kwh_m2_day must be 12 monthly values.*\(11,\)"),
        ({"ghi_kwh_m2_day": 3.0}, r"ghi_kwh_m2_day must be 12 monthly values"),
        (
            {"ghi_kwh_m2_day": _replace(EX_2_19_1_H_MJ / MJ_PER_KWH, 5, 12.5)},
            r"ghi_kwh_m2_day\[Jun\] = 12\.5 is outside the allowed range 0 < value < 11\.6",
        ),
        (
            {"ghi_kwh_m2_day": _replace(EX_2_19_1_H_MJ / MJ_PER_KWH, 1, -1.0)},
            r"ghi_kwh_m2_day\[Feb\] = -1\.0 is outside the allowed range 0 < value",
        ),
        (
            {"ghi_kwh_m2_day": _replace(EX_2_19_1_H_MJ / MJ_PER_KWH, 2, 0.0)},
            r"ghi_kwh_m2_day\[Mar\] = 0\.0 is outside",
        ),
        (
            {"ghi_kwh_m2_day": _replace(EX_2_19_1_H_MJ / MJ_PER_KWH, 3, np.nan)},
            r"ghi_kwh_m2_day\[Apr\] = nan is not a finite number",
        ),
        (
            {"albedo": _replace(EX_2_19_1_ALBEDO, 2, 1.5)},
            r"albedo\[Mar\] = 1\.5 .* 0 <= value <= 1",
        ),
        ({"albedo": [0.2, 0.3]}, r"albedo must be a number or 12 monthly values"),
        (
            {"surface_tilt": 190.0},
            r"surface_tilt = 190\.0 is outside the allowed range 0\.0 to 180",
        ),
        ({"surface_azimuth": -10.0}, r"surface_azimuth = -10\.0 .* 0\.0 to 360"),
        ({"latitude_deg": 95.0}, r"latitude_deg = 95\.0 .* -90\.0 to 90"),
        ({"latitude_deg": "north"}, r"latitude_deg = 'north' is not a number"),
        ({"solar_constant_w_m2": 1000.0}, r"solar_constant_w_m2 = 1000\.0 .* 1300\.0 to 1450"),
    ],
)
def test_bad_input_names_field_value_and_range(changes, pattern):
    with pytest.raises(ValueError, match=pattern):
        klein_monthly_tilted(**_madison_kwargs(**changes))


def test_beam_ratio_rejects_bad_tilt():
    with pytest.raises(ValueError, match=r"surface_tilt = 200\.0"):
        klein_monthly_beam_ratio(43.0, 10.0, 200.0, 180.0)


# ---------------------------------------------------------------------------
# Property: valid input never gives NaN
# ---------------------------------------------------------------------------


@settings(max_examples=60, deadline=None)
@given(
    latitude_deg=st.floats(-90.0, 90.0),
    surface_tilt=st.floats(0.0, 180.0),
    surface_azimuth=st.floats(0.0, 360.0),
    albedo=st.floats(0.0, 1.0),
    kt=st.lists(st.floats(0.02, 0.98), min_size=12, max_size=12),
)
def test_valid_input_gives_finite_non_negative_values(
    latitude_deg, surface_tilt, surface_azimuth, albedo, kt
):
    h0 = monthly_mean_extraterrestrial_kwh_m2_day(latitude_deg)
    ghi = np.asarray(kt) * h0  # inside (0, H0), or 0 in polar night
    result = klein_monthly_tilted(latitude_deg, ghi, surface_tilt, surface_azimuth, albedo)
    for name in (
        "kt_bar",
        "diffuse_fraction",
        "rb_bar",
        "r_bar",
        "poa_global_kwh_m2_day",
        "poa_direct_kwh_m2_day",
        "poa_sky_diffuse_kwh_m2_day",
        "poa_ground_diffuse_kwh_m2_day",
        "poa_global_kwh_m2_month",
    ):
        values = getattr(result, name)
        assert values.shape == (12,), name
        assert np.all(np.isfinite(values)), name
        assert np.all(values >= 0.0), name
    parts = (
        result.poa_direct_kwh_m2_day
        + result.poa_sky_diffuse_kwh_m2_day
        + result.poa_ground_diffuse_kwh_m2_day
    )
    np.testing.assert_allclose(parts, result.poa_global_kwh_m2_day, rtol=1e-9, atol=1e-12)
