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

#: Each subcommand, its module in :mod:`tiltyard.app` and its function, imported only
#: when that subcommand runs (``--help`` and ``--version`` import no engine module).
COMMANDS = {"sites": ("cli_commands", "cmd_sites"), "sun": ("cli_commands", "cmd_sun"),
            "irradiance": ("cli_commands", "cmd_irradiance"),
            "study": ("cli_commands", "cmd_study"), "sheet": ("cli_commands", "cmd_sheet"),
            "batch": ("cli_batch", "cmd_batch")}


def _run_command(name: str, args) -> int:
    import importlib

    module, function = COMMANDS[name]
    return getattr(importlib.import_module(f"{__package__}.{module}"), function)(args)


def _command_word(argv: list[str]) -> str:
    """The subcommand named in ``argv`` ("" for none): the first word that is not an
    option (the options before a subcommand take no values)."""
    for word in argv:
        if word == "--":
            break
        if not word.startswith("-"):
            return word if word in COMMANDS else ""
    return ""


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit status (also for usage errors,
    ``--help`` and ``--version``, which argparse reports by raising SystemExit).

    SIGTERM and SIGINT give 143 and 130 from the first line of a subcommand's run to its
    last (see :func:`_exit_signals`)."""
    if getattr(sys, "frozen", False):   # a frozen app's engine worker processes start here
        import multiprocessing
        multiprocessing.freeze_support()
    whole_process = argv is None        # the program itself, not a call from a script
    argv = sys.argv[1:] if argv is None else argv
    if not argv or (not argv[0].startswith("-") and argv[0] not in COMMANDS):
        return _open_app(argv[0] if argv else None)
    with _exit_signals(whole_process) as stopped:
        return _run(argv)
    return _Terminated.code_of(stopped.stop)    # stopped: the with block swallowed it


class _exit_signals:
    """SIGTERM raises :class:`_Terminated` (SIGINT KeyboardInterrupt) anywhere in the
    block, before any heavy import, and the block ends with the one-line report and 143
    (130); the unfinished step has removed its temporary file on the way out.

    For the program itself (``whole_process``) the handlers are not put back afterwards:
    SIGTERM and SIGINT are ignored from the block's end, so one that comes while the
    interpreter shuts down cannot kill it with a bare signal status (-15) once every output
    is written. A caller in the same process (a script, a test) gets its handlers back."""

    def __init__(self, whole_process: bool):
        self.whole_process = whole_process
        self.stop = None

    def __enter__(self):
        import signal

        self._old = None
        try:
            self._old = signal.signal(signal.SIGTERM, _signals_as_exceptions._raise)
        except ValueError:          # not the main thread (a test runner's thread)
            pass
        return self

    def _quiet(self):
        import signal

        if self._old is None:
            return
        if self.whole_process:
            signal.signal(signal.SIGTERM, signal.SIG_IGN)
            signal.signal(signal.SIGINT, signal.SIG_IGN)
        else:
            signal.signal(signal.SIGTERM, self._old)

    def __exit__(self, kind, stop, tb):
        try:
            self._quiet()
        except (KeyboardInterrupt, _Terminated):   # it came after the run had ended
            self._quiet()
        if not isinstance(stop, (KeyboardInterrupt, _Terminated)):
            return False
        self.stop = stop
        code = _Terminated.code_of(stop)
        sys.stderr.write(f"tiltyard: stopped by {'SIGINT' if code == 130 else 'SIGTERM'}; "
                         "no output was changed by the unfinished step\n")
        return True


def _run(argv: list[str]) -> int:
    """One subcommand (or --help, --version) from its arguments to its exit status."""
    parser = build_parser(_command_word(argv))
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
            return _run_command(args.command, args)
    except (UserError, SiteError) as err:
        sys.stderr.write(f"tiltyard: {_one_line(err)}\n")
        return EXIT_INPUT
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

    from tiltyard.engine.demo_sites import resolve_site
    from tiltyard.engine.site import SiteError

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
