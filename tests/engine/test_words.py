"""Wording of tiltyard.engine.words: each function's forms on a few cases.

These pin words, not physics: the expected strings are the wording we chose
(regression values of our own text).
"""

from __future__ import annotations

import datetime as dt

import numpy as np
import pandas as pd
import pytest

from tiltyard.engine.site import MOUNTINGS
from tiltyard.engine.tilt import Period, StudyOption
from tiltyard.engine.words import (
    COMPASS_8,
    COMPASS_16,
    MONTH_ABBR,
    MONTH_NAMES,
    basis_label,
    basis_words,
    bearing,
    compass,
    compass_tick,
    day_month,
    day_words,
    degree_text,
    degrees,
    model_name,
    month_list,
    mounting_sentence,
    mounting_words,
    objective_words,
    option_name,
    plane_words,
    schedule_code,
    schedule_sentence,
    schedule_summary,
    schedule_words,
    sky_choice_words,
    time_basis_words,
    whole_month,
)

YEAR = 2023

#: A two-season schedule whose winter period runs past 31 December.
WRAP = (Period("04-01", "09-30", 12.0, 180.0), Period("10-01", "03-31", 34.0, 180.0))
#: One period, all year.
FIXED = (Period("01-01", "12-31", 37.0, 196.0),)
#: The two-axis tracker.
TRACKER = (Period("01-01", "12-31", None, None),)
_LAST = (31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31)
#: Twelve calendar months, 10° a month steeper.
MONTHLY = tuple(Period(f"{m:02d}-01", f"{m:02d}-{d}", 10.0 * m, 0.0)
                for m, d in zip(range(1, 13), _LAST, strict=True))


def _option(kind: str, schedule) -> StudyOption:
    return StudyOption(f"{kind} option", kind, schedule, np.zeros(12), 0.0)


# -- months -----------------------------------------------------------------------------

def test_months_january_first():
    assert (MONTH_NAMES[0], MONTH_NAMES[11]) == ("January", "December")
    assert MONTH_ABBR == ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct",
                          "Nov", "Dec")
    assert month_list([12, 1, 2]) == "Dec, Jan, Feb"


def test_day_words_and_day_month():
    assert day_words("04-01") == "1 Apr"
    assert day_words("12-31", YEAR) == "31 Dec"
    assert day_words("02-29") == "29 Feb"            # no year given: any day of some year
    with pytest.raises(ValueError, match="02-29"):
        day_words("02-29", YEAR)                     # not in a non-leap year
    with pytest.raises(ValueError, match="13-01"):
        day_words("13-01")
    assert day_month(dt.date(2023, 12, 21)) == "21 Dec"
    assert day_month(pd.Timestamp(2023, 6, 5), full=True) == "5 June"


# -- degrees and the compass ------------------------------------------------------------

def test_degrees_whole_or_to_a_tenth():
    assert degrees(34.0) == "34°"
    assert degrees(34.04) == "34°"
    assert degrees(37.5) == "37.5°"
    assert degrees(12.0, plain=True) == "12 deg"
    assert degree_text("37 deg facing 180 deg") == "37° facing 180°"


@pytest.mark.parametrize(("azimuth", "points", "name"), [
    (0.0, 16, "N"), (360.0, 16, "N"), (359.9, 16, "N"), (-10.0, 16, "N"),
    (11.24, 16, "N"), (11.25, 16, "NNE"),            # half-way goes clockwise
    (348.74, 16, "NNW"), (348.75, 16, "N"),          # the north sector wraps through 360
    (180.0, 16, "S"), (191.25, 16, "SSW"), (196.0, 16, "SSW"), (720.0 + 90.0, 16, "E"),
    (22.49, 8, "N"), (22.5, 8, "NE"), (337.5, 8, "N"), (337.49, 8, "NW"), (135.0, 8, "SE"),
])
def test_compass_points_and_boundaries(azimuth, points, name):
    assert compass(azimuth, points) == name


def test_compass_tables_and_refusals():
    assert len(COMPASS_16) == 16 and COMPASS_16[::2] == COMPASS_8
    assert compass(11.25) == "NNE"                   # 16 points by default
    with pytest.raises(ValueError, match="points"):
        compass(10.0, 4)
    with pytest.raises(ValueError, match="finite"):
        compass(float("nan"))


def test_bearing_and_ticks():
    assert bearing(180.0) == "180° (S)"
    assert bearing(359.7) == "0° (N)"                # rounded, then taken within 0-360
    assert bearing(93.46, decimals=1) == "93.5° (E)"
    assert bearing(196.0, plain=True) == "196 deg (SSW)"
    assert compass_tick(135.0) == "SE 135°"
    assert compass_tick(-180.0) == "S 180°"
    assert compass_tick(360.0, sep="\n") == "N\n0°"


# -- models, bases, mountings, objectives ------------------------------------------------

def test_model_names():
    assert model_name("perez") == "Perez 1990"
    assert model_name("haydavies") == "Hay-Davies"
    assert model_name("isotropic", capital=True) == "Isotropic (Liu-Jordan)"
    assert model_name("ineichen") == "Ineichen-Perez"
    with pytest.raises(ValueError, match="model = 'klucher'"):
        model_name("klucher")


def test_sky_basis_words():
    assert basis_words("clear") == "clear sky: upper bound only"
    assert basis_words("monthly") == "on the site's monthly irradiation values"
    assert basis_words("file", "larkmoor-2019.csv") == "on the weather file larkmoor-2019.csv"
    assert basis_words("file") == "on the weather file"
    assert basis_label("clear") == "clear sky (upper bound)"
    assert basis_label("monthly") == "monthly GHI values"
    assert basis_label("file", "tmy.epw") == "weather file tmy.epw"
    assert sky_choice_words("auto", capital=True).startswith("Best available (weather file")
    with pytest.raises(ValueError, match="sky = 'auto'"):
        basis_words("auto")                          # a basis used is never "auto"


def test_mounting_words_cover_every_kind():
    assert [mounting_words(k) for k in MOUNTINGS] == [
        "flush on the roof", "fixed rack", "adjustable rack", "ground rows", "flat-roof rows"]
    assert all(mounting_sentence(k) for k in MOUNTINGS)
    assert mounting_sentence("fixed-rack") == "a fixed rack: one tilt all year"
    with pytest.raises(ValueError, match="mounting"):
        mounting_words("pole")


def test_objective_time_basis_and_option_names():
    assert objective_words("annual") == "the annual total"
    assert objective_words("worst-month") == "the weakest month"
    assert objective_words("months", (11, 12, 1)) == "the total of Nov, Dec, Jan"
    assert time_basis_words("solar") == "apparent solar time"
    assert option_name(_option("two-axis", TRACKER)) == "Two-axis (ceiling)"
    plane = StudyOption("shed roof, south slope", "plane", FIXED, np.zeros(12), 0.0)
    assert option_name(plane) == "shed roof, south slope"


# -- schedules ---------------------------------------------------------------------------

def test_whole_month_needs_the_whole_calendar_month():
    assert whole_month(Period("02-01", "02-28", 20.0, 180.0), 2023) == 2
    assert whole_month(Period("02-01", "02-28", 20.0, 180.0), 2024) is None   # leap year
    assert whole_month(WRAP[1], YEAR) is None


def test_schedule_words_table_form():
    # the wording asked for in the study view's brief ("34° 1 Oct–31 Mar, 12° 1 Apr–30 Sep")
    two = _option("two-season", WRAP)
    assert schedule_words(two, YEAR) == "12° 1 Apr–30 Sep, 34° 1 Oct–31 Mar; facing 180° (S)"
    assert schedule_words(WRAP, YEAR) == schedule_words(two, YEAR)   # a bare schedule too
    assert schedule_words(FIXED, YEAR) == "37° all year, facing 196° (SSW)"
    assert schedule_words((Period("01-01", "12-31", 0.0, 0.0),), YEAR) == \
        "0° all year, facing 0° (N)"
    assert schedule_words(MONTHLY, YEAR).startswith("Jan 10°, Feb 20°, Mar 30°")
    assert schedule_words(MONTHLY, YEAR).endswith("Dec 120°; facing 0° (N)")
    assert schedule_words(TRACKER, YEAR) == "follows the sun all year (two-axis tracker)"


def test_schedule_words_plain_for_the_command_line():
    text = schedule_words(WRAP, YEAR, plain=True)
    assert text == "12 deg 1 Apr-30 Sep, 34 deg 1 Oct-31 Mar; facing 180 deg (S)"
    assert text.isascii()
    assert schedule_words(FIXED, YEAR, plain=True) == "37 deg all year, facing 196 deg (SSW)"


def test_schedule_sentence_sheet_form():
    assert schedule_sentence(WRAP, YEAR) == ("12° from 1 Apr to 30 Sep, 34° from 1 Oct to "
                                             "31 Mar; facing 180° (S)")
    # one period, whole months and the tracker read as in the table form
    assert schedule_sentence(FIXED, YEAR) == "37° all year, facing 196° (SSW)"
    assert schedule_sentence(MONTHLY, YEAR) == schedule_words(MONTHLY, YEAR)
    assert schedule_sentence(_option("two-axis", TRACKER), YEAR) == \
        "follows the sun all year (two-axis tracker)"


def test_plane_words():
    assert plane_words(22.0, 196.0) == "22° facing 196° (SSW)"
    assert plane_words(0.0, 180.0) == "0° (flat)"
    assert plane_words(90.0, 359.6) == "90° facing 0° (N)"


def test_schedule_summary_one_cell_form():
    assert schedule_summary((Period("01-01", "12-31", 0.0, 180.0),)) == "0° (flat)"
    assert schedule_summary(FIXED) == "37° facing 196° (SSW)"
    assert schedule_summary(WRAP) == "2 periods: 12/34° facing 180° (S)"
    assert schedule_summary(MONTHLY) == "12 periods: 10° to 120° facing 0° (N)"
    assert schedule_summary(TRACKER) == "follows the sun"


def test_schedule_code_csv_form():
    assert schedule_code(WRAP) == "04-01..09-30 12/180; 10-01..03-31 34/180"
    assert schedule_code(FIXED) == "01-01..12-31 37/196"
    assert schedule_code(TRACKER) == "tracking"
    # the study's JSON document holds periods as mappings
    doc = [{"start": "10-01", "end": "03-31", "tilt_deg": 34.5, "azimuth_deg": 0.0}]
    assert schedule_code(doc) == "10-01..03-31 34.5/0"
    with pytest.raises(ValueError, match="at least one period"):
        schedule_code(())


# -- one formatter per figure kind: thousands, azimuth, day length, dashes --------------

def test_thousands_are_separated_by_one_rule():
    from tiltyard.engine.words import NO_VALUE, THOUSANDS_SEP, number
    assert THOUSANDS_SEP == ","
    assert number(1767.4) == "1,767" and number(999.4) == "999" and number(999.6) == "1,000"
    assert number(1234567.891, 1) == "1,234,567.9" and number(-2350) == "-2,350"
    assert number(None) == NO_VALUE and number(float("nan")) == NO_VALUE
    assert number(None, plain=True) == "-"


def test_an_azimuth_rounds_the_same_in_a_table_a_chart_and_a_tick():
    from tiltyard.engine.words import azimuth, bearing, compass_tick
    # half up everywhere (Python's round and format go half to even: 178.5 -> "178")
    assert azimuth(178.5) == "179°" and azimuth(179.5) == "180°"
    assert bearing(179.5) == "180° (S)" and bearing(178.5) == "179° (S)"
    assert azimuth(359.7) == "0°" and bearing(359.7) == "0° (N)"
    assert azimuth(93.45, 1) == "93.5°" and azimuth(12, plain=True) == "12 deg"
    # the compass name is that of the figure shown: 11.24 shows as 11°, which is N
    # (N owns 348.75-11.25 with 16 points; common practice, no source)
    assert bearing(11.24) == "11° (N)" and bearing(11.5) == "12° (NNE)"
    assert compass_tick(135) == "SE 135°" and compass_tick(-45) == "NW 315°"
    for az in np.arange(0.0, 360.0, 0.25):
        shown = azimuth(az)
        assert bearing(az).startswith(shown + " ") and compass_tick(az).endswith(" " + shown)


def test_day_length_is_hours_and_minutes_everywhere():
    from tiltyard.engine.words import NO_VALUE, day_length
    assert day_length(14.53) == "14 h 32 min"       # 0.53 h = 31.8 min -> 32
    assert day_length(9.0 + 5 / 60) == "9 h 05 min"
    assert day_length(24.0) == "24 h 00 min" and day_length(0.0) == "0 h 00 min"
    assert day_length(23.9999) == "24 h 00 min"
    assert day_length(float("nan")) == NO_VALUE and day_length(None) == NO_VALUE


def test_a_dash_means_one_thing():
    from tiltyard.engine.words import NO_VALUE, RANGE_DASH, schedule_words, value_range
    assert NO_VALUE == "—" and RANGE_DASH == "–"
    assert value_range(0, 360, "°") == "0–360°" and value_range(1, 120, "days") == "1–120 days"
    assert value_range(0, 360, "°", plain=True) == "0-360 deg"
    periods = [{"start": "04-01", "end": "09-30", "tilt_deg": 12, "azimuth_deg": 180},
               {"start": "10-01", "end": "03-31", "tilt_deg": 34, "azimuth_deg": 180}]
    assert "1 Apr–30 Sep" in schedule_words(periods, 2023) and "—" not in schedule_words(
        periods, 2023)
