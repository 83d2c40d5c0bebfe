"""The ``tiltyard`` command line.

Exit status: 0 done, 2 bad input or usage (one line on stderr naming the file,
field and reason), 1 an internal fault. ``--verbose`` shows the traceback of a
fault for a problem report.
"""

from __future__ import annotations

import argparse
import contextlib
import datetime as _dt
import json
import os
import re
import sys
import traceback
from dataclasses import replace
from pathlib import Path

from tiltyard import __version__
from tiltyard.engine.words import MONTH_ABBR, model_name, mounting_words, schedule_words

EXIT_OK, EXIT_FAULT, EXIT_INPUT = 0, 1, 2
SITE_HELP = "a site file (.json) or the name of a bundled demo site (see 'tiltyard sites')"


class UserError(Exception):
    """Bad input: reported in one line, exit status 2."""


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2
        sys.stderr.write(f"{self.prog}: {_one_line(message)} (see '{self.prog} --help')\n")
        raise SystemExit(EXIT_INPUT)


#: Dates ``--date`` takes (the years ``--year`` takes).
DATE_RANGE = (_dt.date(1900, 1, 1), _dt.date(2100, 12, 31))


def _date(text: str) -> _dt.date:
    if not re.fullmatch(r"[0-9]{4}-[0-9]{2}-[0-9]{2}", text):
        raise argparse.ArgumentTypeError(f"{text!r}: expected a date as YYYY-MM-DD")
    try:
        return _dt.date.fromisoformat(text)
    except ValueError as err:  # e.g. "day is out of range for month"
        raise argparse.ArgumentTypeError(f"{text!r}: no such date ({err})") from None


def _sun_date(text: str) -> _dt.date:
    day = _date(text)
    if not DATE_RANGE[0] <= day <= DATE_RANGE[1]:
        raise argparse.ArgumentTypeError(f"{text}: must be between {DATE_RANGE[0]} and "
                                         f"{DATE_RANGE[1]}")
    return day


def build_parser() -> argparse.ArgumentParser:
    from tiltyard.engine.plane import TRANSPOSITION_MODELS
    from tiltyard.engine.sky import CLEARSKY_MODELS, SOLAR_CONSTANT_W_M2
    from tiltyard.engine.tilt import OPTION_KINDS
    from tiltyard.engine.timegrid import REFERENCE_YEAR, STEPS_MIN, TIME_BASES

    p = _Parser(prog="tiltyard",
                usage="tiltyard [SITE]                 open the desktop app\n"
                      "       tiltyard [--version] [--verbose] COMMAND [options]",
                description="Solar site assessment: sun path, horizon, irradiance on any plane. "
                            "Figures are preliminary feasibility estimates, not a design.",
                epilog="SITE is a site file (.json) or the name of a bundled demo site "
                       "(see 'tiltyard sites'). With no subcommand the desktop app opens.")
    p.add_argument("--version", action="version", version=f"tiltyard {__version__}")
    p.add_argument("--verbose", action="store_true",
                   help="show the full traceback of an internal fault (for problem reports)")
    sub = p.add_subparsers(dest="command", parser_class=_Parser, metavar="COMMAND", prog="tiltyard")

    s = sub.add_parser("sites", help="list the bundled demo sites")
    s.add_argument("--json", action="store_true", help="write JSON to stdout")

    s = sub.add_parser("sun", help="sunrise, sunset, solar noon and the sun's path on a date",
                       description="Sun events and path for one local date. Times are local "
                                   "clock time with the zone's daylight saving.")
    s.add_argument("site", metavar="SITE", help=SITE_HELP)
    s.add_argument("--date", type=_sun_date, required=True,
                   help=f"local date, YYYY-MM-DD, {DATE_RANGE[0]} to {DATE_RANGE[1]}")
    s.add_argument("--step", type=float, default=10.0, metavar="MIN",
                   help="path sampling step in minutes (default 10)")
    s.add_argument("--json", action="store_true", help="write one JSON document to stdout")

    s = sub.add_parser("irradiance", help="a year of irradiation on one plane, by month",
                       description="Monthly and annual irradiation on a plane of given tilt and "
                                   "azimuth (degrees clockwise from true north, south = 180).")
    s.add_argument("site", metavar="SITE", help=SITE_HELP)
    s.add_argument("--tilt", type=float, required=True, metavar="DEG",
                   help="plane tilt from horizontal, 0-90")
    s.add_argument("--azimuth", type=float, required=True, metavar="DEG",
                   help="plane azimuth clockwise from north, 0-360 (south = 180)")
    _add_sky_options(s)
    s.add_argument("--model", choices=TRANSPOSITION_MODELS, default=None,
                   help="sky diffuse model (default perez)")
    s.add_argument("--clearsky", choices=CLEARSKY_MODELS, default=None,
                   help="clear-sky model (default ineichen)")
    s.add_argument("--solar-constant", type=float, default=None, metavar="W_M2",
                   help=f"solar constant in W/m2 (default {SOLAR_CONSTANT_W_M2:g})")
    s.add_argument("--year", type=int, default=None,
                   help=f"year (default {REFERENCE_YEAR}, a non-leap reference year)")
    s.add_argument("--step", type=int, default=None, choices=STEPS_MIN, metavar="MIN",
                   help="interval of a clear or monthly sky in minutes: "
                        + ", ".join(map(str, STEPS_MIN))
                        + " (default 60; a weather file keeps its own interval)")
    s.add_argument("--json", action="store_true", help="write one JSON document to stdout")

    s = sub.add_parser("study", help="compare fixed, seasonal and monthly tilts (the tilt study)",
                       description="Which tilt, and is adjusting it with the seasons worth it? "
                                   "Compares horizontal, each site plane, the rule of thumb, the "
                                   "optimal fixed plane, optimal two- and four-season and monthly "
                                   "schedules, and two-axis tracking as a ceiling.")
    s.add_argument("site", metavar="SITE", help=SITE_HELP)
    _add_sky_options(s)
    _add_study_options(s)
    s.add_argument("--json", action="store_true", help="write one JSON document to stdout")

    s = sub.add_parser(
        "sheet", help="the feasibility sheet as PDF (A4 or US Letter), with CSV and JSON data",
        description="The feasibility sheet for the client: key figures of the recommended "
                    "option, the sun path with the horizon, the monthly irradiation of the "
                    "compared options, the options and monthly tables, assumptions and "
                    "cautions, on two pages. Runs the same tilt study as 'tiltyard study' with "
                    "the same flags. Works without a display. Every file is written whole or "
                    "not at all (a temporary file in the same folder, then renamed).",
        epilog="Data exports (any combination, with or without -o): --csv-monthly FILE "
               "(monthly and annual irradiation of every option, kWh/m2), --csv-options FILE "
               "(the options table), --csv-hourly FILE (interval plane-of-array irradiance in "
               "W/m2 of the options chosen with --hourly-options), --json-out FILE (the same "
               "document as 'tiltyard study --json'). Preparer, organisation and paper default "
               "to the desktop app's preferences.")
    s.add_argument("site", metavar="SITE", help=SITE_HELP)
    s.add_argument("-o", "--output", metavar="FILE.pdf", default=None,
                   help="write the sheet as a PDF file")
    s.add_argument("--paper", choices=("a4", "letter"), default=None,
                   help="paper size (default: the app's preference, else a4)")
    s.add_argument("--preparer", default=None, metavar="NAME",
                   help="who prepared the sheet (default: the app's preference)")
    s.add_argument("--organisation", "--organization", dest="organisation", default=None,
                   metavar="NAME", help="the preparer's organisation (default: the app's "
                                        "preference)")
    s.add_argument("--prepared", type=_date, default=None, metavar="YYYY-MM-DD",
                   help="date prepared (default: today)")
    s.add_argument("--client", default=None, metavar="NAME",
                   help="who the sheet is prepared for (default: the site file's)")
    s.add_argument("--address", default=None, metavar="TEXT",
                   help="the site's address on the sheet (default: the site file's)")
    s.add_argument("--reference", default=None, metavar="TEXT",
                   help="your job or quote reference on the sheet (default: the site file's)")
    s.add_argument("--times", choices=TIME_BASES, default=None,
                   help="time basis of the sun-path hour lines: clock (local clock time with "
                        "daylight saving), standard or solar (default: the app's preference, "
                        "else clock)")
    s.add_argument("--csv-monthly", metavar="FILE", default=None,
                   help="write the monthly and annual table as CSV")
    s.add_argument("--csv-options", metavar="FILE", default=None,
                   help="write the options table as CSV")
    s.add_argument("--csv-hourly", metavar="FILE", default=None,
                   help="write the interval plane-of-array irradiance of the chosen options "
                        "as CSV")
    s.add_argument("--hourly-options", metavar="KIND,...", default=None,
                   help="options in --csv-hourly: " + ", ".join(OPTION_KINDS)
                        + " or recommended (default: every option)")
    s.add_argument("--json-out", metavar="FILE", default=None,
                   help="write the study as JSON (the document of 'tiltyard study --json')")
    _add_sky_options(s)
    _add_study_options(s)
    for sp in sub.choices.values():      # --verbose works after the subcommand too
        sp.add_argument("--verbose", action="store_true", default=argparse.SUPPRESS,
                        help="show the full traceback of an internal fault")
    return p


def _add_study_options(s) -> None:
    """The tilt study's flags (study and sheet take the same ones). Flags left out keep the
    site file's saved settings (its ``assessment`` section), else the defaults."""
    from tiltyard.engine.plane import TRANSPOSITION_MODELS
    from tiltyard.engine.site import MOUNTINGS
    from tiltyard.engine.sky import CLEARSKY_MODELS
    from tiltyard.engine.timegrid import REFERENCE_YEAR, STEPS_MIN

    s.add_argument("--model", choices=TRANSPOSITION_MODELS, default=None,
                   help="sky diffuse model (default perez)")
    s.add_argument("--clearsky", choices=CLEARSKY_MODELS, default=None,
                   help="clear-sky model (default ineichen, up to 4000 m elevation)")
    s.add_argument("--objective", default=None, metavar="OBJ",
                   help="annual (default), worst-month, or months=11,12,1")
    s.add_argument("--mounting", choices=MOUNTINGS, default=None,
                   help="how the panels are held: flush (on the roof, as it is), fixed-rack, "
                        "adjustable (seasonal tilts), ground-rows, flat-roof-rows (default: the "
                        "site's planes' mounting, flush for a roof plane; fixed-rack for a site "
                        "without planes)")
    s.add_argument("--max-positions", type=int, default=None, metavar="N",
                   help="tilt positions a year an adjustable mounting allows: 2, 4 or 12 "
                        "(default 12)")
    s.add_argument("--tilt-range", default=None, metavar="MIN:MAX",
                   help="tilts the racking allows, degrees (default 0:90)")
    s.add_argument("--tilt-step", type=float, default=None, metavar="DEG",
                   help="tilt step of an adjustable rack, degrees (default 1)")
    s.add_argument("--azimuth", default=None, metavar="free|DEG",
                   help="free (optimised) or a fixed azimuth, degrees clockwise from north")
    s.add_argument("--min-days", type=int, default=None, metavar="DAYS",
                   help="minimum days between adjustments (default 30)")
    s.add_argument("--switch-dates", default=None, metavar="MM-DD,MM-DD",
                   help="fix the two-season switch dates instead of optimising them")
    s.add_argument("--row-tilt", type=float, default=None, metavar="DEG",
                   help="tilt of rows on a flat roof or field for the spacing figures "
                        "(default: the fixed optimum)")
    s.add_argument("--row-length", type=float, default=None, metavar="M",
                   help="slant length of one row's collector, m (default 1: figures per metre)")
    s.add_argument("--row-date", default=None, metavar="MM-DD",
                   help="design day for row spacing (default: winter solstice), noon +/- 3 h")
    s.add_argument("--loss", type=float, default=None, metavar="FRACTION",
                   help="system loss fraction for the indicative specific yield (default 0.14)")
    s.add_argument("--year", type=int, default=None,
                   help=f"year (default {REFERENCE_YEAR}, a non-leap reference year)")
    s.add_argument("--step", type=int, default=None, choices=STEPS_MIN, metavar="MIN",
                   help="interval of a clear or monthly sky in minutes: "
                        + ", ".join(map(str, STEPS_MIN))
                        + " (default 60; a weather file keeps its own interval)")


def _add_sky_options(s) -> None:
    """--sky and the options for reading a weather CSV file (irradiance, study, sheet)."""
    s.add_argument("--sky", default=None, metavar="auto|clear|monthly|FILE",
                   help="sky basis: auto (default: the site's weather file if it names one, "
                        "else its 12 monthly mean daily GHI values if it has them, else clear "
                        "sky), clear (an upper bound), monthly, or a weather file: TMY3, TMY2, "
                        "EPW, or any CSV file with --columns and --time-label")
    s.add_argument("--columns", default=None, metavar="KEY=NAME,...",
                   help="for a CSV weather file: which header names hold which quantity, "
                        "e.g. timestamp=Time,ghi=GHI,dni=DNI,dhi=DHI,temp_air=T2m,"
                        "wind_speed=WS (keys: timestamp or date and time; ghi, dni, dhi in "
                        "W/m2 or Wh/m2 or kJ/m2 per interval, decided from the values; "
                        "temp_air in degC; wind_speed in m/s)")
    s.add_argument("--time-label", default=None, choices=("start", "end", "centre"),
                   help="for a CSV weather file: what each timestamp marks in its interval")
    s.add_argument("--time-zone", default=None, metavar="ZONE",
                   help="for a CSV weather file: zone of timestamps without a UTC offset, an "
                        "IANA name (Europe/London) or a fixed offset (+01:00)")
    s.add_argument("--accept-weather-warnings", action="store_true",
                   help="use a weather file even though it was recorded more than 50 km from "
                        "the site or holds light with the sun down (the warning stays on every "
                        "output)")


#: Command-line option for each keyword of load_weather_for_site.
_WEATHER_FLAGS = {"columns": "--columns", "timestamp_label": "--time-label",
                  "timezone": "--time-zone"}


def _parse_columns(text: str) -> dict:
    """'key=Name,key=Name' -> {key: Name}; syntax only (the engine checks the keys)."""
    out = {}
    for item in text.split(","):
        key, sep, name = item.partition("=")
        key, name = key.strip(), name.strip()
        if not sep or not key or not name:
            raise UserError(f"--columns {text}: {item.strip()!r} is not KEY=NAME; expected e.g. "
                            "timestamp=Time,ghi=GHI")
        if key in out:
            raise UserError(f"--columns {text}: key {key!r} is given twice")
        out[key] = name
    return out


def _sky_changes(args, a) -> dict:
    """Assessment changes from --sky and the weather-file flags."""
    from tiltyard.engine.assessment import WeatherSource

    csv_flags = {"columns": args.columns, "timestamp_label": args.time_label,
                 "timezone": args.time_zone}
    changes = {}
    sky = args.sky
    if sky in (None, "auto", "clear", "monthly"):
        for option, value in csv_flags.items():
            if value is not None:
                raise UserError(f"{_WEATHER_FLAGS[option]} {value}: only for a weather file "
                                f"(--sky FILE), not with --sky {sky or 'auto'}")
        if sky is not None:
            changes["sky"] = sky
        if args.accept_weather_warnings and a.weather is not None:
            changes["weather"] = replace(a.weather, accept_warnings=True)
        return changes
    cols = _parse_columns(args.columns) if args.columns is not None else {}
    try:
        changes["weather"] = WeatherSource(os.path.abspath(sky), tuple(cols.items()),
                                           args.time_label, args.time_zone,
                                           accept_warnings=args.accept_weather_warnings)
    except ValueError as err:
        raise UserError(f"--sky {sky}: {err}") from None
    changes["sky"] = "file"
    return changes


def _study_changes(args, a) -> dict:
    """Assessment changes from the study flags; flags not given keep the saved settings."""
    from tiltyard.engine.assessment import Mounting

    study, rows = {}, {}
    if args.objective is not None:
        obj, months = args.objective, ()
        if obj.startswith("months="):
            try:
                months = tuple(int(x) for x in obj[len("months="):].split(",") if x.strip())
            except ValueError:
                raise UserError(f"--objective = {obj!r}: months must be numbers, e.g. "
                                "months=11,12,1") from None
            obj = "months"
        study.update(objective=obj, months=months)
    if args.tilt_range is not None:
        try:
            lo, hi = (float(x) for x in args.tilt_range.split(":"))
        except ValueError:
            raise UserError(f"--tilt-range = {args.tilt_range!r}: expected MIN:MAX in degrees, "
                            "e.g. 10:60") from None
        study.update(tilt_min_deg=lo, tilt_max_deg=hi)
    if args.tilt_step is not None:
        study["tilt_step_deg"] = args.tilt_step
    if args.azimuth is not None:
        azimuth = None
        if args.azimuth != "free":
            try:
                azimuth = float(args.azimuth)
            except ValueError:
                raise UserError(f"--azimuth = {args.azimuth!r}: expected 'free' or degrees "
                                "clockwise from north") from None
        study["azimuth_deg"] = azimuth
    if args.min_days is not None:
        study["min_days_between"] = args.min_days
    if args.switch_dates:
        study["switch_dates"] = tuple(x.strip() for x in args.switch_dates.split(","))
    for flag, key in (("row_tilt", "row_tilt_deg"), ("row_length", "collector_length_m"),
                      ("row_date", "row_design_date"), ("loss", "loss_fraction")):
        if getattr(args, flag) is not None:
            rows[key] = getattr(args, flag)
    changes = {"study": replace(a.study, **study), "rows": replace(a.rows, **rows)}
    if args.mounting is not None or args.max_positions is not None:
        changes["mounting"] = Mounting(args.mounting or a.mounting.kind,
                                       args.max_positions or a.mounting.max_positions)
    for flag, key in (("model", "model"), ("year", "year"), ("step", "interval_min"),
                      ("clearsky", "clearsky_model")):
        if getattr(args, flag, None) is not None:
            changes[key] = getattr(args, flag)
    return changes


#: The command-line option that sets each engine setting, for messages in the user's words.
_OPTION_OF_SETTING = {
    "tilt range": "--tilt-range", "tilt_step_deg": "--tilt-step", "azimuth_deg": "--azimuth",
    "min_days_between": "--min-days", "switch_dates": "--switch-dates",
    "objective": "--objective", "months": "--objective months", "row_tilt_deg": "--row-tilt",
    "collector_length_m": "--row-length", "row_design_date": "--row-date",
    "loss_fraction": "--loss", "year": "--year", "solar_constant_w_m2": "--solar-constant",
    "max_positions": "--max-positions", "model": "--model", "clearsky_model": "--clearsky"}
_SETTING_RE = re.compile(r"\b(" + "|".join(map(re.escape, _OPTION_OF_SETTING)) + r")( = |\))")


def _in_option_words(text: str) -> str:
    """An engine message about a setting given on the command line, naming the option
    (``--tilt-step 0: ...``) instead of the internal field (``tilt_step_deg = 0: ...``)."""
    return _SETTING_RE.sub(lambda m: _OPTION_OF_SETTING[m.group(1)]
                           + (" " if m.group(2) == " = " else ")"), text)


def _assessment(args, study: bool = True):
    """The SITE argument's assessment with the command line's flags applied."""
    from tiltyard.engine.assessment import resolve_assessment

    a = resolve_assessment(args.site)
    try:
        changes = _sky_changes(args, a)
        if study:
            changes.update(_study_changes(args, replace(a, **changes)))
        return replace(a, **changes)
    except ValueError as err:
        raise UserError(_in_option_words(str(err))) from None


def _assess(a, site_arg: str):
    """assess(a) with every bad-input failure as one line for the user, naming the site
    file (or demo) when the site is at fault, the weather file when the file is."""
    from tiltyard.engine.allsky import WeatherOptionError
    from tiltyard.engine.assess import AssessmentError, assess
    from tiltyard.engine.weather import WeatherImportError

    where = f"--sky {a.weather.path}" if a.weather is not None else "--sky"
    try:
        return assess(a)
    except WeatherOptionError as err:
        value = dict(a.weather.columns) if err.option == "columns" else err.value
        shown = "" if value is None else f" {value}"
        raise UserError(f"{where}: {_WEATHER_FLAGS[err.option]}{shown}: {err.reason}") from None
    except WeatherImportError as err:
        hint = ""
        if "column mapping" in err.reason:
            hint = " (options --columns, --time-label, --time-zone)"
        raise UserError(f"{where}: {err}{hint}") from None
    except (AssessmentError, OSError) as err:
        about_site = a.sky == "monthly" and a.site.monthly_ghi_kwh_m2_day is None
        raise UserError(f"{site_arg}: {err}" if about_site else str(err)) from None
    except ValueError as err:        # the site's own values (its elevation, its monthly GHI)
        raise UserError(f"{site_arg}: {err}") from None


def _weather_report(result) -> None:
    """Import findings and accepted site-fit warnings of a weather file, one line each on
    stderr (the JSON document carries them instead)."""
    weather = result.weather
    if weather is None:
        return
    for f in weather.findings:
        where = f", line {f.line}" if f.line is not None else ""
        sys.stderr.write(f"tiltyard: {weather.source}{where}: {f.severity} ({f.kind}): "
                         f"{_one_line(f.message)}\n")
    for w in result.weather_warnings:
        sys.stderr.write(f"tiltyard: accepted weather warning: {_one_line(w)}\n")


def _print_basis(result) -> None:
    b = result.basis
    print(f"  Sky basis: {b.words} ({b.reason}); mounting: {mounting_words(result.mounting)}")
    for w in result.weather_warnings:
        print(f"  Warning (accepted): {w}")


def cmd_study(args) -> int:
    from tiltyard.engine.exports import study_json_text
    from tiltyard.engine.jobs import CAUTION

    result = _assess(_assessment(args), args.site)
    try:
        st = result.study()
    except ValueError as err:
        raise UserError(str(err)) from None
    if args.json:
        # one shared builder: the sheet's --json-out and the app's export write the same text
        sys.stdout.write(study_json_text(st, result))
        return EXIT_OK
    _weather_report(result)
    site, opts = result.site, st.options_used
    d = st.to_json_dict()
    print(f"Tilt study for {site.name}  ({site.latitude_deg:.4f}, {site.longitude_deg:.4f})")
    _print_basis(result)
    print(f"  model: {model_name(opts.irradiance.model)}, year {opts.irradiance.year}, "
          f"{opts.irradiance.step_min}-min intervals; objective: {opts.objective_label} "
          f"({d['objective_units']}); tilts {opts.tilt_min_deg:g}-{opts.tilt_max_deg:g} by "
          f"{opts.tilt_step_deg:g} deg; azimuth "
          f"{'free' if opts.azimuth_deg is None else f'{opts.azimuth_deg:g} deg'}")
    print()
    print(f"  {'option':52} {'objective':>9} {'vs hor':>7} {'vs best':>8} {'of track':>8} "
          f"{'annual':>8} {'adj/yr':>6}")
    print(f"  {'':52} {'kWh/m2':>9} {'%':>7} {'%':>8} {'%':>8} {'kWh/m2':>8} {'':>6}")

    def pct(v, sign="+"):
        return "-" if v is None else f"{v:{sign}.1f}"
    for row in d["options"]:
        print(f"  {row['label'][:52]:52} {row['objective_value_kwh_m2']:9.1f} "
              f"{pct(row['gain_vs_horizontal_pct']):>7} "
              f"{pct(row['gain_vs_fixed_optimal_pct']):>8} "
              f"{pct(row['share_of_tracking_pct'], ''):>8} {row['annual_kwh_m2']:8.1f} "
              f"{row['adjustments_per_year']:6d}")
    print(f"  (objective, gains and shares on the {opts.objective_label} objective; 'vs best': "
          "over the best fixed plane for the site)")
    print()
    print("  Schedules:")
    for opt in st.options:
        print(f"    {opt.label[:40]:40} {schedule_words(opt, opts.irradiance.year, plain=True)}")
    _print_recommendation(result, st, d)
    _print_rows_and_yield(st, d)
    for w in st.warnings:
        print(f"  Note: {w}")
    print(f"  {CAUTION}")
    return EXIT_OK


def _rec_words(st) -> str:
    return schedule_words(st.recommended, st.options_used.irradiance.year, plain=True)


def _print_recommendation(result, st, d) -> None:
    rec = st.recommended
    print()
    if st.mounting == "flush":
        loss = result.option_horizon_loss(rec)
        print(f"  This roof as it is: {rec.label} - {_rec_words(st)}: "
              f"{rec.annual_kwh_m2:.0f} kWh/m2 a year, {st.share_pct(rec, 'fixed-optimal'):.0f} "
              f"% of the best plane for the site on the {st.options_used.objective_label} "
              f"objective, {loss.loss_pct:.1f} % lost to the horizon")
    else:
        print(f"  Recommended: {rec.label} - {_rec_words(st)}")
    print(f"  (rule: {st.recommendation_rule})")
    bound = result.clear_sky_bound()
    if bound is not None:
        print(f"  Clear-sky upper bound for it: {bound[rec.label]:.0f} kWh/m2 a year (not an "
              "expected value)")
    go = d["grid_optimum"]
    print(f"  Best plane on the tilt x azimuth grid: {go['tilt_deg']:g} deg, azimuth "
          f"{go['azimuth_deg']:g} deg, {go['objective_kwh_m2']:.1f} kWh/m2 "
          f"({d['objective_units']})")


def _print_rows_and_yield(st, d) -> None:
    rows, yld, mm = d["rows"], d["specific_yield"], d["monthly_method"]
    by_kind = {(y["label"], y["kind"]): y for y in yld["options"]}
    print()
    if st.mounting == "flush":      # panels follow the roof: no rows to lay out
        print("  Indicative specific yield:")
        for y in yld["options"]:
            print(f"    {y['label'][:40]:40} {y['annual_kwh_kwp']:8.0f} kWh/kWp")
        _print_yield_and_method(yld, mm)
        return
    print("  Rows on flat ground (beam shading-free in the design window):")
    ch = rows["chosen"]
    if ch is None:
        print(f"    not laid out: {rows['chosen_note']}")
    else:
        print(f"    {ch['tilt_deg']:g} deg rows facing {ch['azimuth_deg']:g} deg, "
              f"{ch['collector_length_m']:g} m slant length, design day {ch['design_date']} "
              f"{ch['window_start'][11:16]}-{ch['window_end'][11:16]}: pitch "
              f"{ch['pitch_m']:.2f} m, gap {ch['row_gap_m']:.2f} m, GCR {ch['gcr']:.3f}, "
              f"ground cover {ch['ground_cover_fraction']:.3f}")
    print(f"    {'option':40} {'pitch m':>8} {'GCR':>6} {'per m2 ground':>14} "
          f"{'yield kWh/kWp':>14}")
    for r in rows["options"]:
        lay = r["layout"]
        y = by_kind.get((r["label"], r["kind"]))
        pitch = "-" if lay is None else f"{lay['pitch_m']:.2f}"
        gcr = "-" if lay is None else f"{lay['gcr']:.3f}"
        ground = "-" if r["per_ground_kwh_m2"] is None else f"{r['per_ground_kwh_m2']:.0f}"
        yv = "-" if y is None else f"{y['annual_kwh_kwp']:.0f}"
        print(f"    {r['label'][:40]:40} {pitch:>8} {gcr:>6} {ground:>14} {yv:>14}")
    print(f"    GCR: {rows['definitions']}")
    print(f"    {rows['limitation']}")
    _print_yield_and_method(yld, mm)


def _print_yield_and_method(yld, mm) -> None:
    print(f"    Yield: {yld['label']}; loss {100 * yld['loss_fraction']:g} %, temperature "
          f"model {yld['temperature_model']}; " + "; ".join(yld["notes"]))
    if mm is not None:
        print()
        print(f"  Same monthly GHI values by the monthly-mean method: {mm['method']}")
        for c in mm["options"]:
            diff = c["difference_vs_hourly_pct"]
            print(f"    {c['label'][:40]:40} {c['annual_kwh_m2']:8.1f} kWh/m2 "
                  f"(hourly year {'-' if diff is None else f'{diff:+.1f}'} %)")


def _load_site(arg: str):
    from tiltyard.engine.site import resolve_site
    return resolve_site(arg)


def _fmt_time(ts) -> str:
    return "-" if ts is None else ts.strftime("%H:%M:%S")


def cmd_sites(args) -> int:
    from tiltyard.engine.site import demo_site_names, load_demo

    rows = []
    for name in demo_site_names():
        s = load_demo(name)
        rows.append({"name": name, "title": s.name, "latitude_deg": s.latitude_deg,
                     "longitude_deg": s.longitude_deg, "elevation_m": s.elevation_m,
                     "timezone": s.timezone})
    if args.json:
        print(json.dumps({"sites": rows}, indent=2, ensure_ascii=False))
        return EXIT_OK
    print(f"{'name':20} {'lat deg':>8} {'lon deg':>8} {'elev m':>7}  {'time zone':20} title")
    for r in rows:
        print(f"{r['name']:20} {r['latitude_deg']:8.2f} {r['longitude_deg']:8.2f} "
              f"{r['elevation_m']:7.0f}  {r['timezone']:20} {r['title']}")
    return EXIT_OK


def cmd_sun(args) -> int:
    from tiltyard.engine.jobs import sun_day

    if not 0.5 <= args.step <= 120:
        raise UserError(f"--step = {args.step:g}: must be between 0.5 and 120 minutes")
    site = _load_site(args.site)
    day = sun_day(site, args.date, step_min=args.step)
    if args.json:
        print(json.dumps({"sun": day.to_json_dict()}, indent=2, ensure_ascii=False))
        return EXIT_OK
    print(f"Sun at {site.name}  ({site.latitude_deg:.4f}, {site.longitude_deg:.4f}, "
          f"{site.elevation_m:.0f} m)")
    print(f"Date {args.date.isoformat()}, local clock time, zone {site.timezone}")
    if day.polar == "day":
        print("Polar day: the sun stays above the horizon all day.")
    elif day.polar == "night":
        print("Polar night: the sun stays below the horizon all day.")
    print(f"  sunrise           {_fmt_time(day.sunrise)}")
    print(f"  solar noon        {_fmt_time(day.solar_noon)}")
    print(f"  sunset            {_fmt_time(day.sunset)}")
    print(f"  day length        {day.day_length_h:.2f} h")
    print(f"  max elevation     {day.max_elevation_deg:.2f} deg")
    print("  (sunrise/sunset: sun centre at -0.8333 deg, NREL SPA)")
    if len(day.path):
        print()
        print(f"  {'time':8} {'azimuth deg':>11} {'elevation deg':>13}  site horizon")
        for t, a, e, v in zip(day.path["time"], day.path["azimuth_deg"],
                              day.path["elevation_deg"], day.path["visible"], strict=True):
            if t.minute == 0 or len(day.path) <= 30:
                print(f"  {t.strftime('%H:%M'):8} {a:11.1f} {e:13.1f}  "
                      f"{'sun visible' if v else 'behind horizon'}")
    return EXIT_OK


def cmd_irradiance(args) -> int:
    from tiltyard.engine.jobs import CAUTION

    if not 0 <= args.tilt <= 90:
        raise UserError(f"--tilt = {args.tilt:g}: must be between 0 and 90 deg")
    if not 0 <= args.azimuth <= 360:
        raise UserError(f"--azimuth = {args.azimuth:g}: must be between 0 and 360 deg "
                        "(clockwise from north)")
    a = _assessment(args, study=False)
    changes = {key: getattr(args, flag) for flag, key in (
        ("model", "model"), ("clearsky", "clearsky_model"),
        ("solar_constant", "solar_constant_w_m2"), ("year", "year"), ("step", "interval_min"))
        if getattr(args, flag) is not None}
    try:
        a = replace(a, **changes)
    except ValueError as err:
        raise UserError(_in_option_words(str(err))) from None
    result = _assess(a, args.site)
    try:
        res = result.irradiance(args.tilt, args.azimuth)
    except ValueError as err:
        raise UserError(str(err)) from None
    site, opts = result.site, result.irradiance_options
    doc = {"assessment": result.header(), "irradiance": res.to_json_dict()}
    if args.json:
        if result.weather is not None:
            from tiltyard.engine.allsky import weather_json_dict

            doc["weather"] = weather_json_dict(result.weather)
        print(json.dumps(doc, indent=2, ensure_ascii=False))
        return EXIT_OK
    _weather_report(result)
    print(f"Irradiation on a plane at {site.name}")
    _print_basis(result)
    print(f"  tilt {res.surface_tilt:g} deg, azimuth {res.surface_azimuth:g} deg "
          "(clockwise from north)")
    sky_text = f"clear ({model_name(opts.clearsky_model)})" if opts.sky == "clear" else opts.sky
    if opts.sky == "file":
        sky_text = f"weather file {result.weather.source}"
    print(f"  sky: {sky_text}, transposition: {model_name(opts.model)}, "
          f"solar constant {opts.solar_constant_w_m2:g} W/m2, year {opts.year}, "
          f"{opts.step_min}-min intervals")
    print(f"  Linke turbidity: {res.turbidity_source}")
    print(f"  sky-view factor with horizon {res.shading.sky_view_factor:.3f} "
          f"(open {res.shading.sky_view_factor_open:.3f})")
    print()
    cols = [("H0 hor", "extraterrestrial_horizontal_kwh_m2"), ("GHI", "ghi_kwh_m2"),
            ("POA", "poa_kwh_m2"), ("beam", "poa_beam_kwh_m2"),
            ("sky dif", "poa_sky_diffuse_kwh_m2"), ("ground", "poa_ground_kwh_m2"),
            ("hor loss", "horizon_loss_kwh_m2")]
    print("  month  " + " ".join(f"{c:>9}" for c, _ in cols) + "   (kWh/m2)")
    for m in range(1, 13):
        row = res.monthly.loc[m]
        print(f"  {MONTH_ABBR[m - 1]:5}  " + " ".join(f"{row[k]:9.1f}" for _, k in cols))
    print("  year   " + " ".join(f"{res.annual[k]:9.1f}" for _, k in cols))
    print()
    print(f"  Horizon loss {res.horizon_loss_pct:.1f} % of the open-horizon plane irradiation: "
          f"beam {res.annual['horizon_loss_beam_kwh_m2']:.1f}, circumsolar "
          f"{res.annual['horizon_loss_circumsolar_kwh_m2']:.1f}, isotropic sky "
          f"{res.annual['horizon_loss_isotropic_kwh_m2']:.1f}, horizon band "
          f"{res.annual['horizon_loss_horizon_band_kwh_m2']:.1f} kWh/m2")
    for note in res.notes:
        print(f"  Note: {note}.")
    print(f"  {CAUTION}")
    return EXIT_OK


# -- sheet --------------------------------------------------------------------------------

def _check_output(flag: str, path: str) -> Path:
    """Refuse an output path that cannot be written, before any work is done."""
    p = Path(path)
    if not path or p.name in ("", ".", ".."):
        raise UserError(f"{flag} {path!r}: not a file name")
    if p.is_dir():
        raise UserError(f"{flag} {path}: is a folder, not a file")
    folder = p.parent if str(p.parent) else Path(".")
    if not folder.exists():
        raise UserError(f"{flag} {path}: the folder {folder} does not exist")
    if not folder.is_dir():
        raise UserError(f"{flag} {path}: {folder} is not a folder")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise UserError(f"{flag} {path}: the folder {folder} is not writable")
    return p


def _refuse_outputs_over_inputs(wanted, site_arg: str, assessment) -> None:
    """Refuse, before any work, an output path that is one of the inputs (the site file, the
    weather file), compared as files (device and inode, links followed), not as text."""
    inputs = []
    if os.path.exists(site_arg):
        inputs.append(("the site file", site_arg))
    if assessment.weather is not None:
        inputs.append(("the weather file", assessment.weather.path))
    for flag, path in wanted:
        for what, source in inputs:
            try:
                same = os.path.exists(path) and os.path.samefile(path, source)
            except OSError:
                same = False
            if same or os.path.realpath(path) == os.path.realpath(source):
                raise UserError(f"{flag} {path}: is {what} ({source}); writing there would "
                                "replace an input: choose another file name")


def _ensure_gui_app():
    """A Qt application for fonts and the PDF writer; Qt's offscreen platform when there is
    no display (so the sheet works on a server or in CI)."""
    if (sys.platform not in ("win32", "darwin") and not os.environ.get("QT_QPA_PLATFORM")
            and not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY")):
        os.environ["QT_QPA_PLATFORM"] = "offscreen"
    # a QApplication (not only a QGuiApplication): widgets created later in the same
    # process, as in the test suite, need one, and there is only ever one instance
    from PySide6.QtWidgets import QApplication

    return QApplication.instance() or QApplication(["tiltyard"])


def _sheet_preferences():
    """The desktop app's saved preferences, or the defaults when they cannot be read."""
    try:
        from tiltyard.app.settings import load_preferences

        return load_preferences()
    except Exception:  # noqa: BLE001 - preferences are a convenience, never a failure
        from tiltyard.app.settings import Preferences

        return Preferences()


def cmd_sheet(args) -> int:
    import datetime

    from tiltyard.engine.exports import (
        check_option_kinds,
        hourly_csv_text,
        monthly_csv_text,
        options_csv_text,
        select_options,
        study_json_text,
    )
    from tiltyard.engine.site import write_files_atomically

    wanted = [("-o", args.output), ("--csv-monthly", args.csv_monthly),
              ("--csv-options", args.csv_options), ("--csv-hourly", args.csv_hourly),
              ("--json-out", args.json_out)]
    wanted = [(flag, path) for flag, path in wanted if path is not None]
    if not wanted:
        raise UserError("sheet: nothing to write; give -o FILE.pdf and/or --csv-monthly, "
                        "--csv-options, --csv-hourly, --json-out FILE")
    seen = {}
    for flag, path in wanted:
        key = os.path.abspath(path)
        if key in seen:
            raise UserError(f"{flag} {path}: the same file as {seen[key]}")
        seen[key] = flag
        _check_output(flag, path)
    if args.hourly_options is not None and args.csv_hourly is None:
        raise UserError(f"--hourly-options {args.hourly_options}: only with --csv-hourly FILE")
    kinds = None
    if args.hourly_options is not None:
        kinds = [k.strip() for k in args.hourly_options.split(",") if k.strip()]
        if not kinds:
            raise UserError(f"--hourly-options {args.hourly_options!r}: give option kinds")
        try:
            check_option_kinds(kinds)
        except ValueError as err:
            raise UserError(f"--hourly-options {args.hourly_options}: {err}") from None
    assessment = _assessment(args)
    _refuse_outputs_over_inputs(wanted, args.site, assessment)
    given = {k: getattr(args, k).strip() for k in ("client", "address", "reference")
             if getattr(args, k) is not None}
    if given:                   # who the sheet is for: no figure changes with it
        from tiltyard.engine.site import SiteError

        try:
            assessment = assessment.with_site(assessment.site.with_changes(**given))
        except SiteError as err:
            raise UserError(f"--{err.field.split('.')[-1]}: {err.reason}") from None
    prefs = None
    if None in (args.preparer, args.organisation, args.paper, args.times):
        with _signals_as_exceptions.deferred():     # the preferences are read with Qt
            prefs = _sheet_preferences()
    paper = args.paper or (prefs.paper if prefs is not None else "a4")
    basis = args.times or (prefs.time_basis if prefs is not None else "clock")
    with _signals_as_exceptions.deferred():
        _ensure_gui_app()
        from tiltyard.app.sheet import SheetMeta, lay_out, pdf_bytes

    meta = SheetMeta(
        preparer=args.preparer if args.preparer is not None else prefs.preparer,
        organisation=args.organisation if args.organisation is not None else prefs.organisation,
        prepared=args.prepared or datetime.date.today(), time_basis=basis)
    assessed = _assess(assessment, args.site)
    site = assessed.site
    try:
        with _signals_as_exceptions.deferred():
            result = lay_out(assessed.sheet_data(time_basis=basis), meta, paper)
        chosen = select_options(result.study, kinds)
    except ValueError as err:
        raise UserError(str(err)) from None
    _weather_report(assessed)
    # everything in memory first: a failure leaves no file behind and no file changed
    data = {}
    for flag, _path in wanted:
        if flag == "-o":
            with _signals_as_exceptions.deferred():
                data[flag] = pdf_bytes(result.document)
        elif flag == "--csv-monthly":
            data[flag] = monthly_csv_text(result.study).encode("utf-8")
        elif flag == "--csv-options":
            data[flag] = options_csv_text(result.study).encode("utf-8")
        elif flag == "--csv-hourly":
            data[flag] = hourly_csv_text(result.sky, site, chosen).encode("utf-8")
        else:
            data[flag] = study_json_text(result.study, assessed).encode("utf-8")
    # every file to a temporary file first, then all renamed: a failure while writing
    # (a full disk, a signal) leaves every output as it was
    try:
        write_files_atomically([(path, data[flag]) for flag, path in wanted])
    except OSError as err:
        target = getattr(err, "target", None)
        where = next((f"{flag} {path}" for flag, path in wanted if str(Path(path)) == target),
                     "the outputs")
        raise UserError(f"{where}: cannot write ({err.strerror or err}); no output was "
                        "changed") from None
    for flag, path in wanted:
        what = (f"feasibility sheet, {result.document.page_count} pages, "
                f"{'A4' if paper == 'a4' else 'US Letter'}" if flag == "-o" else flag[2:])
        print(f"wrote {path} ({what})")
    return EXIT_OK


COMMANDS = {"sites": cmd_sites, "sun": cmd_sun, "irradiance": cmd_irradiance,
            "study": cmd_study, "sheet": cmd_sheet}


def _one_line(text) -> str:
    return " ".join(str(text).split())


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit status (also for usage errors,
    ``--help`` and ``--version``, which argparse reports by raising SystemExit)."""
    import multiprocessing
    multiprocessing.freeze_support()    # a frozen app's engine worker processes start here
    argv = sys.argv[1:] if argv is None else argv
    if not argv or (not argv[0].startswith("-") and argv[0] not in COMMANDS):
        return _open_app(argv[0] if argv else None)
    parser = build_parser()
    try:
        args = parser.parse_args(_negative_values_joined(parser, argv))
    except SystemExit as stop:
        code = stop.code
        return code if isinstance(code, int) else (EXIT_OK if code is None else EXIT_INPUT)
    from tiltyard.engine.site import SiteError

    if not args.verbose:   # library warnings (pandas, pvlib, numpy) are for --verbose only
        import warnings
        warnings.simplefilter("ignore")
    try:
        if args.command is None:
            return _open_app(None)
        with _signals_as_exceptions():
            return COMMANDS[args.command](args)
    except (UserError, SiteError) as err:
        sys.stderr.write(f"tiltyard: {_one_line(err)}\n")
        return EXIT_INPUT
    except (KeyboardInterrupt, _Terminated) as stop:
        # the write in progress has removed its temporary file on the way out
        code = _Terminated.code_of(stop)
        sys.stderr.write(f"tiltyard: stopped by {'SIGINT' if code == 130 else 'SIGTERM'}; "
                         "no output was changed by the unfinished step\n")
        return code
    except BrokenPipeError:
        return EXIT_OK
    except Exception as err:  # an internal fault: one line, traceback on request
        if args.verbose:
            traceback.print_exc()
        sys.stderr.write(f"tiltyard: internal fault: {type(err).__name__}: {_one_line(err)} "
                         "(run again with --verbose and report it)\n")
        return EXIT_FAULT


class _Terminated(BaseException):
    """SIGTERM during a command: unwinds like Ctrl-C, so temporary files are removed."""

    @staticmethod
    def code_of(stop: BaseException) -> int:
        return 143 if isinstance(stop, _Terminated) else 130


class _signals_as_exceptions:
    """SIGTERM raises :class:`_Terminated` while a command runs (SIGINT raises
    KeyboardInterrupt already); the previous handler comes back afterwards.

    Inside :meth:`deferred` (Qt's import and painting, where an exception raised by a
    signal handler aborts the interpreter) SIGTERM waits until the block ends."""

    _depth = 0
    _pending = False

    @classmethod
    @contextlib.contextmanager
    def deferred(cls):
        cls._depth += 1
        try:
            yield
        finally:
            cls._depth -= 1
        if cls._depth == 0 and cls._pending:
            cls._pending = False
            raise _Terminated()

    def __enter__(self):
        import signal

        self._old = None
        try:
            self._old = signal.signal(signal.SIGTERM, self._raise)
        except ValueError:          # not the main thread (a test runner's thread)
            pass
        return self

    @classmethod
    def _raise(cls, signum, frame):
        if cls._depth:
            cls._pending = True
            return
        raise _Terminated()

    def __exit__(self, *exc):
        import signal

        if self._old is not None:
            signal.signal(signal.SIGTERM, self._old)
        return False


def _negative_values_joined(parser, argv: list[str]) -> list[str]:
    """``--time-zone -05:00`` as ``--time-zone=-05:00``: argparse takes any word starting
    with '-' after an option for another option (unless it is a plain negative number), so
    a value that starts with '-' is joined to the option that takes it."""
    takes_value, known = set(), set()
    parsers = [parser] + [a for act in parser._actions
                          if isinstance(act, argparse._SubParsersAction)
                          for a in act.choices.values()]
    for p in parsers:
        for act in p._actions:
            known.update(act.option_strings)
            if act.option_strings and act.nargs is None:
                takes_value.update(act.option_strings)
    out, i = [], 0
    while i < len(argv):
        word = argv[i]
        if word == "--":
            out += argv[i:]
            break
        following = argv[i + 1] if i + 1 < len(argv) else None
        if (word in takes_value and following is not None and following.startswith("-")
                and following != "-" and following.split("=", 1)[0] not in known):
            out.append(f"{word}={following}")
            i += 2
            continue
        out.append(word)
        i += 1
    return out


def _open_app(site_arg: str | None) -> int:
    """``tiltyard [SITE]``: open the desktop app (on SITE if given)."""
    import os

    from tiltyard.engine.site import SiteError, resolve_site

    if site_arg is not None:
        try:
            resolve_site(site_arg)           # a bad site is one line, before any window
        except SiteError as err:
            if not os.path.splitext(site_arg)[1] and os.sep not in site_arg:
                sys.stderr.write(f"tiltyard: {site_arg!r} is neither a subcommand ("
                                 f"{', '.join(sorted(COMMANDS))}) nor a site file or demo "
                                 "site (see 'tiltyard --help')\n")
            else:
                sys.stderr.write(f"tiltyard: {_one_line(err)}\n")
            return EXIT_INPUT
    if (sys.platform.startswith("linux") and not os.environ.get("QT_QPA_PLATFORM")
            and not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY")):
        sys.stderr.write("tiltyard: no display to open the desktop app on; use a subcommand "
                         "(see 'tiltyard --help')\n")
        return EXIT_INPUT
    from tiltyard.app.desktop import run
    return run(site_arg)


if __name__ == "__main__":
    raise SystemExit(main())
