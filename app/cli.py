"""The ``tiltyard`` command line.

Exit status: 0 done, 2 bad input or usage (one line on stderr naming the file,
field and reason), 1 an internal fault. ``--verbose`` shows the traceback of a
fault for a problem report.
"""

from __future__ import annotations

import argparse
import os
import sys
import traceback

from .cli_args import (  # noqa: F401 (the command line's public names live on here)
    EXIT_FAULT,
    EXIT_INPUT,
    EXIT_OK,
    UserError,
    _one_line,
    _signals_as_exceptions,
    _Terminated,
    build_parser,
)
from .cli_commands import cmd_irradiance, cmd_sheet, cmd_sites, cmd_study, cmd_sun


def cmd_batch(args) -> int:
    from .cli_batch import cmd_batch as run

    return run(args)


COMMANDS = {"sites": cmd_sites, "sun": cmd_sun, "irradiance": cmd_irradiance,
            "study": cmd_study, "sheet": cmd_sheet, "batch": cmd_batch}


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
