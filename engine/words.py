"""Words: how Tiltyard writes months, compass points, models, bases, mountings and schedules.

One place for the text that the command line, the desktop views and the
feasibility sheet show, so the same thing reads the same everywhere. Nothing
here computes: every function turns a value it is given into text.

Schedules come in four forms, one per kind of place they appear:

- :func:`schedule_words`, the short form of a table cell
  (``"12° 1 Apr–30 Sep, 34° 1 Oct–31 Mar; facing 180° (S)"``), also in plain
  ASCII for the command line (``plain=True``: ``"12 deg 1 Apr-30 Sep, ..."``);
- :func:`schedule_sentence`, the sentence of the printed sheet
  (``"12° from 1 Apr to 30 Sep, 34° from 1 Oct to 31 Mar; facing 180° (S)"``);
- :func:`schedule_summary`, one narrow cell (``"2 periods: 12/34° facing 180° (S)"``);
- :func:`schedule_code`, the machine-readable CSV code
  (``"04-01..09-30 12/180; 10-01..03-31 34/180"``).

A schedule is a sequence of periods, each with ``start`` and ``end``
(``"MM-DD"``, inclusive, a period may run past 31 December), ``tilt_deg`` and
``azimuth_deg`` (degrees; azimuth clockwise from true north). A period whose
tilt is None follows the sun (the two-axis tracker). Periods may be objects
with those attributes (:class:`tiltyard.engine.tilt.Period`) or mappings with
those keys (a study's JSON document); an object with a ``schedule`` attribute
(a :class:`tiltyard.engine.tilt.StudyOption`) stands for its schedule.

No Qt here: the engine and the app both import this module.
"""

from __future__ import annotations

import calendar
import math
import re
from collections.abc import Mapping, Sequence

#: Month names, January first.
MONTH_NAMES = ("January", "February", "March", "April", "May", "June", "July", "August",
               "September", "October", "November", "December")

#: Three-letter month abbreviations, January first (table rows, chart axes).
MONTH_ABBR = tuple(m[:3] for m in MONTH_NAMES)

#: The eight compass points, clockwise from north.
COMPASS_8 = ("N", "NE", "E", "SE", "S", "SW", "W", "NW")

#: The sixteen compass points, clockwise from north.
COMPASS_16 = ("N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W",
              "WNW", "NW", "NNW")

#: Transposition and clear-sky models as the trade writes them.
MODEL_NAMES = {"perez": "Perez 1990", "haydavies": "Hay-Davies",
               "isotropic": "isotropic (Liu-Jordan)", "ineichen": "Ineichen-Perez",
               "simplified_solis": "simplified Solis", "haurwitz": "Haurwitz"}

#: The sky bases a user can choose, as a menu offers them (``file`` opens a file dialog).
SKY_CHOICE_WORDS = {"auto": "best available (weather file, else monthly values, else clear sky)",
                    "clear": "clear sky (upper bound)", "monthly": "monthly GHI values",
                    "file": "weather file…"}

#: How panels are held (the engine's mounting kinds, :data:`tiltyard.engine.site.MOUNTINGS`).
MOUNTING_WORDS = {"flush": "flush on the roof", "fixed-rack": "fixed rack",
                  "adjustable": "adjustable rack", "ground-rows": "ground rows",
                  "flat-roof-rows": "flat-roof rows"}

#: What each mounting means, as the sheet's assumptions state it.
MOUNTING_SENTENCES = {
    "flush": "panels flush on the roof: the roof's own tilt and direction, no seasonal "
             "adjustment",
    "fixed-rack": "a fixed rack: one tilt all year",
    "adjustable": "an adjustable rack: seasonal tilt schedules",
    "ground-rows": "fixed racks in rows on the ground",
    "flat-roof-rows": "fixed racks in rows on a flat roof"}

#: The clock that times are shown in.
TIME_BASIS_WORDS = {"clock": "local clock time (with daylight saving)",
                    "standard": "local standard time", "solar": "apparent solar time"}

#: What a tilt study's objective measures.
OBJECTIVE_WORDS = {"annual": "the annual total", "worst-month": "the weakest month",
                   "months": "the chosen months"}

#: Short names of the tilt study's option kinds (a site plane keeps its own label).
OPTION_NAMES = {"horizontal": "Horizontal", "rule-of-thumb": "Rule of thumb",
                "fixed-optimal": "Optimal fixed", "two-season": "Two-season",
                "four-season": "Four-season", "monthly": "Monthly",
                "two-axis": "Two-axis (ceiling)"}


#: Between the ends of a range, and only there: ``"1 Apr–30 Sep"``, ``"0–360°"`` (en dash).
RANGE_DASH = "–"

#: A cell or figure with no value, and only that (em dash). The command line writes ``"-"``.
NO_VALUE = "—"

#: Between the thousands of every figure of 1,000 or more, in the app, on the sheet and at
#: the command line alike: a comma (``"1,767 kWh/m²"``), plain ASCII, so the command line's
#: text keeps the same rule; decimals take a point.
THOUSANDS_SEP = ","


# -- figures ----------------------------------------------------------------------------

def number(value, decimals: int = 0, plain: bool = False) -> str:
    """A figure with its thousands separated (:data:`THOUSANDS_SEP`): ``1767.4`` ->
    ``"1,767"``, ``number(1767.44, 1)`` -> ``"1,767.4"``; :data:`NO_VALUE` for None or
    NaN (``"-"`` with ``plain``, the command line's ASCII)."""
    if value is None or not math.isfinite(float(value)):
        return "-" if plain else NO_VALUE
    return f"{float(value):,.{decimals}f}".replace(",", THOUSANDS_SEP)


def figure(value) -> str:
    """A limit or a setting in its shortest form with thousands separated: ``9000`` ->
    ``"9,000"``, ``0.1`` -> ``"0.1"``, ``-500`` -> ``"-500"``."""
    return f"{float(value):,g}".replace(",", THOUSANDS_SEP)


def value_range(lo, hi, unit: str = "", plain: bool = False) -> str:
    """A range of values: ``"0–360°"``, ``"1–120 days"``; ``"0-360 deg"`` with ``plain``."""
    dash = "-" if plain else RANGE_DASH
    if unit in ("°", "deg"):
        unit = " deg" if plain else "°"
    elif unit:
        unit = f" {unit}"
    return f"{figure(lo)}{dash}{figure(hi)}{unit}"


def day_length(hours) -> str:
    """A length of time within a day in hours and minutes, to the minute: ``14.53`` ->
    ``"14 h 32 min"``, ``24`` -> ``"24 h 00 min"``; :data:`NO_VALUE` for None or NaN.

    Day length, direct sun and any other duration of the app, the sheet and the command
    line (plain ASCII already) are written this way.
    """
    if hours is None or not math.isfinite(float(hours)):
        return NO_VALUE
    m = int(math.floor(float(hours) * 60.0 + 0.5))
    return f"{m // 60} h {m % 60:02d} min"


# -- months, degrees, directions ------------------------------------------------------

def day_words(mmdd: str, year: int | None = None) -> str:
    """A ``"MM-DD"`` date as day and month abbreviation: ``"04-01"`` -> ``"1 Apr"``.

    Parameters
    ----------
    mmdd : str
        Month and day, ``"MM-DD"``.
    year : int, optional
        When given, the date must exist in that year (``"02-29"`` only in a leap year).

    Raises
    ------
    ValueError
        Not a date of the year.
    """
    m, d = (int(x) for x in mmdd.split("-"))
    last = calendar.monthrange(year if year is not None else 2024, m)[1] if 1 <= m <= 12 else 0
    if not 1 <= d <= last:
        raise ValueError(f"date = {mmdd!r}: not a day of the year")
    return f"{d} {MONTH_ABBR[m - 1]}"


def day_month(day, full: bool = False) -> str:
    """A date's day and month, whatever the locale: ``"21 Dec"``, ``"21 December"`` (``full``).

    ``day`` is anything with ``day`` and ``month`` attributes (a ``datetime.date``,
    a ``pandas.Timestamp``).
    """
    return f"{day.day} {(MONTH_NAMES if full else MONTH_ABBR)[day.month - 1]}"


def month_list(months: Sequence[int]) -> str:
    """Month numbers (1-12) as abbreviations: ``[12, 1, 2]`` -> ``"Dec, Jan, Feb"``."""
    return ", ".join(MONTH_ABBR[int(m) - 1] for m in months)


def degrees(value: float, plain: bool = False) -> str:
    """An angle to the degree, or to a tenth where it is not whole: ``"34°"``, ``"37.5°"``.

    Within 0.05° of a whole number the angle is written whole. ``plain`` writes
    ``"34 deg"`` (ASCII, for the command line's tables).
    """
    text = f"{value:.0f}" if abs(value - round(value)) < 0.05 else f"{value:.1f}"
    return text + (" deg" if plain else "°")


def degree_text(text: str) -> str:
    """An engine label with ``" deg"`` written as the degree sign: ``"37 deg"`` -> ``"37°"``.

    Only the whole word ``deg`` is replaced: ``"1 degree"`` stays as it is.
    """
    return re.sub(r" deg\b", "°", text)


def plural(n: int, word: str, many: str | None = None) -> str:
    """A count and its noun: ``plural(1, "obstacle")`` -> ``"1 obstacle"``, ``"2 obstacles"``.

    ``many`` is the plural form where it is not ``word + "s"``.
    """
    n = int(n)
    return f"{n} {word if n == 1 else (many or word + 's')}"


#: Program words that engine messages may carry, and how a user reads them.
_USER_REWRITES = (
    (re.compile(r"\s*\(pass reference_year= to choose another\)"), ""),
    (re.compile(r"timestamp_label='(start|end|middle)'"), r"timestamps marking the interval \1"),
    (re.compile(r"\btimezone='([^'\n]+)'"), r"time zone “\1”"),
    (re.compile(r"\s*\(coefficients '[^']*'\)"), ""),
    # a value quoted as code ('Europe/London', 'x') in typographic quotes
    (re.compile(r"(?<![\w'])'([^'\n]+?)'(?![\w'])"), "“\\1”"),
)

#: Trade abbreviations and program names a client reads written out.
_CLIENT_REWRITES = (
    (re.compile(r"\bfrom the ineichen clear sky\b"), "from the Ineichen-Perez clear-sky model"),
    (re.compile(r"\bpvlib monthly climatology\b"), "monthly climatology"),
    (re.compile(r"(?<!“)\bGHI\b"), "global horizontal irradiation"),
)


def user_text(text: str) -> str:
    """An engine message as the app shows it: degree signs for ``deg``
    (:func:`degree_text`), no program parameter names (``timestamp_label='end'``
    becomes "timestamps marking the interval end"), values quoted as code
    (``'x'``) in typographic quotes (“x”)."""
    text = degree_text(text)
    for pattern, repl in _USER_REWRITES:
        text = pattern.sub(repl, text)
    return text


def client_text(text: str) -> str:
    """An engine statement as a client reads it on the sheet: :func:`user_text`, and
    trade abbreviations written out."""
    text = user_text(text)
    for pattern, repl in _CLIENT_REWRITES:
        text = pattern.sub(repl, text)
    return text


def field_message(value, reason: str, name: str = "") -> str:
    """What a form says of a text it refused, in the user's words.

    ``reason`` is a :class:`~tiltyard.engine.site.SiteError` reason and ``name``
    its field. A reason that names its field itself (starts with a capital:
    ``"Distance must be at least 0.1 m"``) is kept. Otherwise the field's name
    leads when it is words (``"Latitude must be between -90° and 90°"``; a
    program name such as ``tilt_deg`` is left out), and a reason that judges
    the value follows the typed text in quotes (``"“high” is not a number"``,
    ``"Elevation: “x” is not a number"``). No program names, no repr.
    """
    reason = degree_text(str(reason).strip())
    if reason[:1].isupper():
        return reason
    label = name.strip() if name and re.fullmatch(r"[A-Za-z][A-Za-z .()]*", name) else ""
    label = label[:1].upper() + label[1:]
    shown = str(value).strip() if value is not None else ""
    if reason.startswith("is ") and shown:
        return f"{label}: “{shown}” {reason}" if label else f"“{shown}” {reason}"
    if label:
        return f"{label} {reason}"
    reason = reason.removeprefix("is ")
    return reason[:1].upper() + reason[1:]


def compass(azimuth_deg: float, points: int = 16) -> str:
    """The compass point nearest an azimuth.

    Parameters
    ----------
    azimuth_deg : float
        Degrees clockwise from true north; any value (taken modulo 360).
    points : {16, 8}
        Sixteen points (22.5° sectors) or eight (45° sectors).

    Returns
    -------
    str
        ``"N"``, ``"NNE"``, ... Each point owns the sector centred on it; an
        azimuth exactly half-way between two points goes to the clockwise one
        (rounding half up): with 16 points 11.25° is NNE and 348.75° is N,
        with 8 points 22.5° is NE.

    Raises
    ------
    ValueError
        ``points`` not 8 or 16, or the azimuth not a finite number.
    """
    if points not in (8, 16):
        raise ValueError(f"points = {points!r}: must be 8 or 16")
    az = float(azimuth_deg)
    if not math.isfinite(az):
        raise ValueError(f"azimuth_deg = {azimuth_deg!r}: must be a finite number")
    names = COMPASS_16 if points == 16 else COMPASS_8
    return names[int(math.floor((az % 360.0) / (360.0 / points) + 0.5)) % points]


def _azimuth_shown(azimuth_deg: float, decimals: int) -> float:
    """The azimuth as written: rounded half up to ``decimals`` (179.5 -> 180, never the
    half-to-even 178.5 -> 178 of Python's round), then taken within 0-360."""
    az = float(azimuth_deg)
    if not math.isfinite(az):
        raise ValueError(f"azimuth_deg = {azimuth_deg!r}: must be a finite number")
    scale = 10.0 ** decimals
    return (math.floor(az * scale + 0.5) / scale) % 360.0


def azimuth(azimuth_deg: float, decimals: int = 0, plain: bool = False) -> str:
    """An azimuth as every table, chart and readout writes it: ``"180°"``, ``"93.5°"``.

    The one rounding of an azimuth (half up, then within 0-360: 359.7° reads ``"0°"``
    to the degree), so a table and a chart show the same direction the same way.
    ``plain`` writes ``"180 deg"`` (the command line).
    """
    return f"{_azimuth_shown(azimuth_deg, decimals):.{decimals}f}" + (" deg" if plain else "°")


def bearing(azimuth_deg: float, plain: bool = False, decimals: int = 0) -> str:
    """An azimuth with its 16-point compass name: ``"180° (S)"``, ``"93.5° (E)"``.

    The number is :func:`azimuth`'s; the compass name is that of the number shown
    (:func:`compass`), so the same figure always carries the same name. ``plain``
    writes ``"180 deg (S)"``.
    """
    return (f"{azimuth(azimuth_deg, decimals, plain)} "
            f"({compass(_azimuth_shown(azimuth_deg, decimals))})")


def plane_words(tilt_deg: float, azimuth_deg: float) -> str:
    """A fixed plane: ``"22° facing 196° (SSW)"``; a horizontal one ``"0° (flat)"``."""
    return "0° (flat)" if tilt_deg == 0 else f"{degrees(tilt_deg)} facing {bearing(azimuth_deg)}"


def compass_tick(azimuth_deg: float, sep: str = " ") -> str:
    """A chart tick at a multiple of 45°: ``"SE 135°"`` (8 points, the number as
    :func:`azimuth` writes it)."""
    return f"{compass(_azimuth_shown(azimuth_deg, 0), 8)}{sep}{azimuth(azimuth_deg)}"


# -- models, bases, mountings, options ----------------------------------------------------

def _lookup(table: Mapping[str, str], key: str, what: str) -> str:
    try:
        return table[key]
    except KeyError:
        raise ValueError(f"{what} = {key!r}: must be one of {', '.join(table)}") from None


def _capital(text: str, capital: bool) -> str:
    return text[:1].upper() + text[1:] if capital else text


def model_name(key: str, capital: bool = False) -> str:
    """A model key as the trade writes it: ``"perez"`` -> ``"Perez 1990"``.

    ``capital`` capitalises the first letter (a menu item). Raises ValueError
    for an unknown key.
    """
    return _capital(_lookup(MODEL_NAMES, key, "model"), capital)


def sky_choice_words(key: str, capital: bool = False) -> str:
    """A sky-basis choice as a menu offers it (:data:`SKY_CHOICE_WORDS`)."""
    return _capital(_lookup(SKY_CHOICE_WORDS, key, "sky"), capital)


def basis_words(kind: str, weather_name: str | None = None) -> str:
    """The sky basis used, as a header or a sentence says it.

    ``"clear sky: upper bound only"``, ``"on the site's monthly irradiation
    values"``, ``"on the weather file NAME"`` (``"on the weather file"`` without
    a name).
    """
    if kind == "file":
        return "on the weather file" + (f" {weather_name}" if weather_name else "")
    if kind == "monthly":
        return "on the site's monthly irradiation values"
    if kind == "clear":
        return "clear sky: upper bound only"
    raise ValueError(f"sky = {kind!r}: must be one of clear, monthly, file")


def basis_label(kind: str, weather_name: str | None = None) -> str:
    """The sky basis used, as a table cell or a chart title names it.

    ``"clear sky (upper bound)"``, ``"monthly GHI values"``, ``"weather file NAME"``.
    """
    if kind == "file":
        return "weather file" + (f" {weather_name}" if weather_name else "")
    if kind in ("clear", "monthly"):
        return SKY_CHOICE_WORDS[kind]
    raise ValueError(f"sky = {kind!r}: must be one of clear, monthly, file")


def mounting_words(kind: str) -> str:
    """A mounting kind in the user's words: ``"fixed-rack"`` -> ``"fixed rack"``."""
    return _lookup(MOUNTING_WORDS, kind, "mounting")


def mounting_sentence(kind: str) -> str:
    """What a mounting means, in a sentence for the sheet's assumptions."""
    return _lookup(MOUNTING_SENTENCES, kind, "mounting")


def time_basis_words(key: str) -> str:
    """The clock times are shown in: ``"solar"`` -> ``"apparent solar time"``."""
    return _lookup(TIME_BASIS_WORDS, key, "time_basis")


def objective_words(objective: str, months: Sequence[int] = ()) -> str:
    """What a study's objective measures: ``"the weakest month"``, ``"the total of Dec, Jan"``."""
    if objective == "months":
        return "the total of " + month_list(months)
    return _lookup(OBJECTIVE_WORDS, objective, "objective")


def option_name(option, mounting: str | None = None) -> str:
    """Short name of a study option by its kind (a site plane keeps its own label); under a
    ``flush`` mounting the fixed optimum is the best plane for the site, a reference."""
    if option.kind == "fixed-optimal" and mounting == "flush":
        return "Best plane"
    return OPTION_NAMES.get(option.kind, option.label)



# -- the feasibility sheet's sentences -------------------------------------------------

#: Lowest tilt of an optimised option by default, degrees: rain rinses panels and water runs
#: off from about this tilt (common practice, no source).
MIN_TILT_DEFAULT_DEG = 10.0


def key_heading(mounting: str, objective: str, months: Sequence[int], basis: str) -> str:
    """The key-figure box's heading: what the figures are of, for the mounting, and the basis.

    ``"This roof as it is · on the site's monthly irradiation values"`` (flush);
    ``"Best fixed tilt for the annual total · ..."`` (a fixed rack or rows);
    ``"Recommended for the weakest month · clear sky: upper bound only"`` (adjustable).
    """
    goal = objective_words(objective, months)
    if mounting == "flush":
        what = "This roof as it is"
    elif mounting == "adjustable":
        what = f"Recommended for {goal}"
    else:
        _lookup(MOUNTING_WORDS, mounting, "mounting")
        what = f"Best fixed tilt for {goal}"
    return f"{what} · {basis}"


def clear_sky_advice() -> str:
    """What the key box says when only a clear sky is known for a site."""
    return ("Only a clear sky is known for this site, so every figure here is an upper bound, "
            "not an expected value. The site's twelve monthly mean daily irradiation values "
            "(from a solar atlas or a local table) or a typical-year weather file would give "
            "an expected value.")


def min_tilt_sentence(tilt_min_deg: float, mounting: str) -> str:
    """The sheet's line on the lowest tilt the optimised options may take."""
    if tilt_min_deg <= 0:
        return ("No minimum tilt was set: an optimised option may lie flat, where rain does "
                "not rinse the panels and water can stand on them.")
    held = (f"the optimised options compared are held at {degrees(tilt_min_deg)} or steeper, "
            "so that rain rinses the panels and water runs off (common practice; the limit "
            "can be changed)")
    if mounting == "flush":
        return f"The roof is taken as it is; {held}."
    return held[0].upper() + held[1:] + "."


def month_names(months: Sequence[int]) -> str:
    """Month numbers as full names joined in prose: ``[12, 1]`` -> ``"December and January"``."""
    names = [MONTH_NAMES[int(m) - 1] for m in months]
    if len(names) <= 1:
        return "".join(names)
    return ", ".join(names[:-1]) + " and " + names[-1]


def weakest_month_sentence(month: int, kwh_m2: float, dark_months: Sequence[int] = (),
                           polar_night: tuple | None = None, year: int | None = None) -> str:
    """The weakest month with useful daylight, the months with little or no sun, polar night.

    ``"Weakest month: December, 18 kWh/m² on this plane."``; for a polar site
    ``"Weakest sunlit month: February, 76 kWh/m² on this plane. December and
    January get almost no sun (under 1 % of the best month on a horizontal
    plane); the sun does not rise from 27 Nov to 15 Jan."``
    """
    which = "Weakest sunlit month" if dark_months or polar_night else "Weakest month"
    text = f"{which}: {MONTH_NAMES[int(month) - 1]}, {kwh_m2:.0f} kWh/m² on this plane."
    if dark_months:
        verb = "gets" if len(dark_months) == 1 else "get"
        text += (f" {month_names(dark_months)} {verb} almost no sun (under 1 % of the best "
                 "month on a horizontal plane)")
        text += ";" if polar_night else "."
    if polar_night:
        lead = " the sun" if dark_months else " The sun"
        text += (f"{lead} does not rise at all from {day_words(polar_night[0], year)} to "
                 f"{day_words(polar_night[1], year)}.")
    return text


def prepared_for_words(client: str = "", address: str = "", reference: str = "") -> str:
    """Who the sheet is for, the blank fields left out: ``"Hollin Farm · Moor Lane ·
    reference LM-14"``; ``""`` when all three are blank (no label then either)."""
    parts = [x.strip() for x in (client, address) if x and x.strip()]
    if reference and reference.strip():
        parts.append(f"reference {reference.strip()}")
    return " · ".join(" ".join(p.split()) for p in parts)

# -- schedules ------------------------------------------------------------------------

def _get(period, key: str):
    return period[key] if isinstance(period, Mapping) else getattr(period, key)


def _periods(schedule) -> list:
    periods = list(getattr(schedule, "schedule", schedule))
    if not periods:
        raise ValueError("schedule = (): must hold at least one period")
    return periods


def _tracking(periods: list) -> bool:
    return any(_get(p, "tilt_deg") is None for p in periods)


def whole_month(period, year: int) -> int | None:
    """The month number (1-12) if ``period`` is exactly one calendar month of ``year``."""
    sm, sd = (int(x) for x in _get(period, "start").split("-"))
    em, ed = (int(x) for x in _get(period, "end").split("-"))
    if sd != 1 or sm != em:
        return None
    return sm if ed == calendar.monthrange(year, sm)[1] else None


def _facing(periods: list, plain: bool) -> str:
    az = _get(periods[0], "azimuth_deg")
    return "" if az is None else f"facing {bearing(az, plain)}"


def schedule_words(schedule, year: int, plain: bool = False) -> str:
    """A schedule in the short form of a table cell.

    ``"34° all year, facing 180° (S)"``; ``"12° 1 Apr–30 Sep, 34° 1 Oct–31 Mar;
    facing 180° (S)"``; whole calendar months as ``"Jan 62°, Feb 55°, ...;
    facing 180° (S)"``; ``"follows the sun all year (two-axis tracker)"``.
    ``plain`` writes ASCII for the command line (``"34 deg"``, ``"1 Apr-30 Sep"``).
    The facing direction is the first period's (a study's periods share one).
    """
    periods = _periods(schedule)
    if _tracking(periods):
        return "follows the sun all year (two-axis tracker)"
    facing = _facing(periods, plain)
    if len(periods) == 1:
        return f"{degrees(_get(periods[0], 'tilt_deg'), plain)} all year" + (
            f", {facing}" if facing else "")
    months = [whole_month(p, year) for p in periods]
    if all(m is not None for m in months):
        parts = [f"{MONTH_ABBR[m - 1]} {degrees(_get(p, 'tilt_deg'), plain)}"
                 for m, p in zip(months, periods, strict=True)]
    else:
        dash = "-" if plain else "–"
        parts = [f"{degrees(_get(p, 'tilt_deg'), plain)} {day_words(_get(p, 'start'), year)}"
                 f"{dash}{day_words(_get(p, 'end'), year)}" for p in periods]
    return ", ".join(parts) + (f"; {facing}" if facing else "")


def schedule_sentence(schedule, year: int) -> str:
    """A schedule as the sheet's sentence.

    ``"12° from 1 Apr to 30 Sep, 34° from 1 Oct to 31 Mar; facing 180° (S)"``;
    one period, whole calendar months and the tracker read as in
    :func:`schedule_words`.
    """
    periods = _periods(schedule)
    if (_tracking(periods) or len(periods) == 1
            or all(whole_month(p, year) is not None for p in periods)):
        return schedule_words(periods, year)
    parts = [f"{degrees(_get(p, 'tilt_deg'))} from {day_words(_get(p, 'start'), year)} to "
             f"{day_words(_get(p, 'end'), year)}" for p in periods]
    facing = _facing(periods, False)
    return ", ".join(parts) + (f"; {facing}" if facing else "")


def schedule_summary(schedule) -> str:
    """A schedule in one narrow cell, without dates.

    ``"0° (flat)"``; ``"37° facing 180° (S)"``; ``"2 periods: 34/12° facing
    180° (S)"``; five periods or more as their range, ``"12 periods: 10° to 62°
    facing 180° (S)"``; ``"follows the sun"``.
    """
    periods = _periods(schedule)
    if _tracking(periods):
        return "follows the sun"
    tilts = [_get(p, "tilt_deg") for p in periods]
    facing = _facing(periods, False)
    if len(periods) == 1:
        return plane_words(tilts[0], _get(periods[0], "azimuth_deg"))
    if len(periods) <= 4:
        which = "/".join(degrees(t)[:-1] for t in tilts) + "°"
    else:
        which = f"{degrees(min(tilts))} to {degrees(max(tilts))}"
    return f"{len(periods)} periods: {which} {facing}"


def schedule_code(schedule) -> str:
    """A schedule as the CSV code ``MM-DD..MM-DD tilt/azimuth`` per period, ``"; "`` between.

    ``"01-01..12-31 37/180"``; ``"tracking"`` for the two-axis tracker. Numbers
    in Python's ``g`` format (shortest form, no unit).
    """
    periods = _periods(schedule)
    if _tracking(periods):
        return "tracking"
    return "; ".join(f"{_get(p, 'start')}..{_get(p, 'end')} {_get(p, 'tilt_deg'):g}/"
                     f"{_get(p, 'azimuth_deg'):g}" for p in periods)


__all__ = ["NO_VALUE", "RANGE_DASH", "THOUSANDS_SEP", "azimuth", "day_length", "figure",
           "number",
           "value_range", "COMPASS_16", "COMPASS_8", "MIN_TILT_DEFAULT_DEG", "MODEL_NAMES", "MONTH_ABBR",
           "MONTH_NAMES", "clear_sky_advice", "client_text", "key_heading", "min_tilt_sentence",
           "month_names", "plural", "prepared_for_words", "weakest_month_sentence",
           "MOUNTING_SENTENCES", "MOUNTING_WORDS", "OBJECTIVE_WORDS", "OPTION_NAMES", "SKY_CHOICE_WORDS",
           "TIME_BASIS_WORDS", "basis_label", "basis_words", "bearing", "compass",
           "compass_tick", "day_month", "field_message", "user_text", "day_words", "degree_text", "degrees", "model_name", "month_list",
           "mounting_sentence", "mounting_words", "objective_words", "option_name", "plane_words", "schedule_code",
           "schedule_sentence", "schedule_summary", "schedule_words", "sky_choice_words",
           "time_basis_words", "whole_month"]
