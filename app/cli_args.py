"""The command line's options: the parser, and the Assessment a SITE and its flags make.

Flags left out keep the site file's saved settings. Bad input is a :class:`UserError`:
one line naming the file, the field or the option, and the reason.
"""

from __future__ import annotations

import argparse
import contextlib
import datetime as _dt
import os
import re
import sys
from dataclasses import replace

EXIT_OK, EXIT_FAULT, EXIT_INPUT = 0, 1, 2
SITE_HELP = "a site file (.json) or the name of a bundled demo site (see 'tiltyard sites')"


class UserError(Exception):
    """Bad input: reported in one line, exit status 2."""


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2
        sys.stderr.write(f"{self.prog}: {_one_line(message)} (see '{self.prog} --help')\n")
        raise SystemExit(EXIT_INPUT)

    def parse_args(self, args=None, namespace=None):
        # argparse joins stray words unquoted, so an empty one ('') was named by nothing
        args, extras = self.parse_known_args(args, namespace)
        if extras:
            import shlex

            self.error("unrecognized arguments: " + " ".join(
                shlex.quote(w) if w.isprintable() else repr(w) for w in extras))
        return args


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


class _VersionAction(argparse.Action):
    """``--version``: the installed version, looked up only when asked for."""

    def __init__(self, option_strings, dest=argparse.SUPPRESS, default=argparse.SUPPRESS,
                 help="show program's version number and exit"):
        super().__init__(option_strings=option_strings, dest=dest, default=default, nargs=0,
                         help=help)

    def __call__(self, parser, namespace, values, option_string=None):
        from tiltyard import __version__

        parser._print_message(f"tiltyard {__version__}\n", sys.stdout)
        parser.exit()


def build_parser(command: str | None = None) -> argparse.ArgumentParser:
    """The command line's parser. With ``command`` (a subcommand's name, or ``""`` for
    none) only that subcommand's options are added, so that ``tiltyard --help`` and
    ``--version`` import no engine module; the help texts are the same either way."""
    p = _Parser(prog="tiltyard",
                usage="tiltyard [SITE]                 open the desktop app\n"
                      "       tiltyard [--version] [--verbose] COMMAND [options]",
                description="Solar site assessment: sun path, horizon, irradiance on any plane. "
                            "Figures are preliminary feasibility estimates, not a design.",
                epilog="SITE is a site file (.json) or the name of a bundled demo site "
                       "(see 'tiltyard sites'). With no subcommand the desktop app opens.")
    p.add_argument("--version", action=_VersionAction)
    p.add_argument("--verbose", action="store_true",
                   help="show the full traceback of an internal fault (for problem reports)")
    sub = p.add_subparsers(dest="command", parser_class=_Parser, metavar="COMMAND", prog="tiltyard")
    for name, add in SUBCOMMANDS.items():
        add(sub, options=command is None or command == name)
    for sp in sub.choices.values():      # --verbose works after the subcommand too
        sp.add_argument("--verbose", action="store_true", default=argparse.SUPPRESS,
                        help="show the full traceback of an internal fault")
    return p


def _sites_parser(sub, options: bool = True) -> None:
    """``tiltyard sites``: list the demo sites; its options only when ``options``."""
    s = sub.add_parser("sites", help="list the bundled demo sites")
    if not options:
        return
    s.add_argument("--json", action="store_true", help="write JSON to stdout")


def _sun_parser(sub, options: bool = True) -> None:
    """``tiltyard sun``: one date's sun events and path; its options only when ``options``."""
    s = sub.add_parser("sun", help="sunrise, sunset, solar noon and the sun's path on a date",
                       description="Sun events and path for one local date. Times are local "
                                   "clock time with the zone's daylight saving.")
    if not options:
        return
    s.add_argument("site", metavar="SITE", help=SITE_HELP)
    s.add_argument("--date", type=_sun_date, required=True,
                   help=f"local date, YYYY-MM-DD, {DATE_RANGE[0]} to {DATE_RANGE[1]}")
    s.add_argument("--step", type=float, default=10.0, metavar="MIN",
                   help="path sampling step in minutes (default 10)")
    s.add_argument("--json", action="store_true", help="write one JSON document to stdout")


def _irradiance_parser(sub, options: bool = True) -> None:
    """``tiltyard irradiance``: a year on one plane; its options only when ``options``."""
    s = sub.add_parser("irradiance", help="a year of irradiation on one plane, by month",
                       description="Monthly and annual irradiation on a plane of given tilt and "
                                   "azimuth (degrees clockwise from true north, south = 180).")
    if not options:
        return
    from tiltyard.engine.choices import SOLAR_CONSTANT_W_M2

    s.add_argument("site", metavar="SITE", help=SITE_HELP)
    s.add_argument("--tilt", type=float, required=True, metavar="DEG",
                   help="plane tilt from horizontal, 0-90")
    s.add_argument("--azimuth", type=float, required=True, metavar="DEG",
                   help="plane azimuth clockwise from north, 0-360 (south = 180)")
    _add_sky_options(s)
    _add_model_options(s)
    s.add_argument("--solar-constant", type=float, default=None, metavar="W_M2",
                   help=f"solar constant in W/m2 (default {SOLAR_CONSTANT_W_M2:g})")
    s.add_argument("--json", action="store_true", help="write one JSON document to stdout")


def _study_parser(sub, options: bool = True) -> None:
    """``tiltyard study``: the tilt study; its options only when ``options``."""
    s = sub.add_parser("study", help="compare fixed, seasonal and monthly tilts (the tilt study)",
                       description="Which tilt, and is adjusting it with the seasons worth it? "
                                   "Compares horizontal, each site plane, the rule of thumb, the "
                                   "optimal fixed plane, optimal two- and four-season and monthly "
                                   "schedules, and two-axis tracking as a ceiling.")
    if not options:
        return
    s.add_argument("site", metavar="SITE", help=SITE_HELP)
    _add_sky_options(s)
    _add_study_options(s)
    s.add_argument("--json", action="store_true", help="write one JSON document to stdout")


def _sheet_parser(sub, options: bool = True) -> None:
    """``tiltyard sheet``: the feasibility sheet and its data files; its options only when ``options``."""
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
    if not options:
        return
    from tiltyard.engine.choices import OPTION_KINDS, TIME_BASES

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


def _batch_parser(sub, options: bool = True) -> None:
    """``tiltyard batch``: a portfolio of sites; its options only when ``options``."""
    from .cli_batch import add_batch_parser

    add_batch_parser(sub, _add_sky_options, _add_study_options, options=options)


#: The subcommands, in the order of the help, each with the function that adds its parser.
SUBCOMMANDS = {"sites": _sites_parser, "sun": _sun_parser, "irradiance": _irradiance_parser,
               "study": _study_parser, "sheet": _sheet_parser, "batch": _batch_parser}


def _add_study_options(s) -> None:
    """The tilt study's flags (study and sheet take the same ones). Flags left out keep the
    site file's saved settings (its ``assessment`` section), else the defaults."""
    from tiltyard.engine.choices import MOUNTINGS

    _add_model_options(s)
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


def _add_model_options(s) -> None:
    """The sky's models, year and interval (irradiance, study and sheet take the same)."""
    from tiltyard.engine.choices import (
        CLEARSKY_MODELS,
        REFERENCE_YEAR,
        STEPS_MIN,
        TRANSPOSITION_MODELS,
    )

    s.add_argument("--model", choices=TRANSPOSITION_MODELS, default=None,
                   help="sky diffuse model (default perez)")
    s.add_argument("--clearsky", choices=CLEARSKY_MODELS, default=None,
                   help="clear-sky model (default ineichen, up to 4000 m elevation)")
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
    if not os.path.isfile(sky):
        what = "is a folder" if os.path.isdir(sky) else "no such file"
        raise UserError(f"--sky {sky}: {what}; give auto, clear, monthly or the path of a "
                        "weather file")
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
    return changes


#: The flags that set an assessment's sky models, year and interval directly.
_MODEL_FLAGS = (("model", "model"), ("clearsky", "clearsky_model"),
                ("solar_constant", "solar_constant_w_m2"), ("year", "year"),
                ("step", "interval_min"))


def _model_changes(args) -> dict:
    """Assessment changes from the model flags a subcommand takes and the user gave."""
    return {key: getattr(args, flag) for flag, key in _MODEL_FLAGS
            if getattr(args, flag, None) is not None}


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

    return with_flags(args, resolve_assessment(args.site), study)


def with_flags(args, a, study: bool = True):
    """``a`` with the command line's sky, model (and study) flags applied; flags left out
    keep its own settings. The batch applies them to every site this way."""
    try:
        changes = _sky_changes(args, a)
        changes.update(_model_changes(args))
        if study:
            changes.update(_study_changes(args, replace(a, **changes)))
        return replace(a, **changes)
    except ValueError as err:
        raise UserError(_in_option_words(str(err))) from None


def _assess(a, site_arg: str):
    """assess(a) with every bad-input failure as one line for the user, naming the site
    file (or demo) when the site is at fault, the weather file when the file is."""
    from tiltyard.engine.assess import AssessmentError, assess
    from tiltyard.engine.weather import WeatherImportError
    from tiltyard.engine.weather_site import WeatherOptionError

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



def _one_line(text) -> str:
    return " ".join(str(text).split())


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
