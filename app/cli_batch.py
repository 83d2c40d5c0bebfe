"""``tiltyard batch INPUT -o RESULTS``: a portfolio of sites, one results row each.

The engine does the work (:mod:`tiltyard.engine.batch`, imported inside the command); this
module reads the flags, shows progress (a tqdm bar on a terminal, a plain line every N
sites otherwise), writes the sheets with ``--sheets DIR`` and sets the exit status: 0 every
row succeeded, 3 some rows failed (RESULTS.errors.csv), 2 the input itself or an option is
unusable.
"""

from __future__ import annotations

import json
import os
import re
import sys
from pathlib import Path

EXIT_SOME_ROWS_FAILED = 3

_BATCH_DESCRIPTION = (
    "Screen a portfolio: the tilt study of every site of INPUT, one results row per site. "
    "INPUT is a CSV of sites (a header row: name, latitude_deg, longitude_deg, and optional "
    "id, elevation_m, timezone, albedo, ghi_jan_kwh_m2_day ... ghi_dec_kwh_m2_day, "
    "plane1_tilt_deg, plane1_azimuth_deg, plane1_mounting, ...), a GeoJSON "
    "FeatureCollection of points with those properties, or a folder of site files. Every "
    "study and sky flag of 'tiltyard study' applies to every site. Rows that are not sites "
    "go to RESULTS.errors.csv with their line, field and reason; the others are written "
    "in chunks as they finish, so --resume after a stop skips the sites already done. "
    "Figures are preliminary feasibility estimates, not a design.")
_BATCH_EPILOG = (
    "Exit status: 0 every site succeeded, 3 some rows failed (see RESULTS.errors.csv), "
    "2 the input cannot be read or an option is wrong. On a Dask cluster: start 'dask "
    "scheduler' on one machine and 'dask worker ADDRESS' on each worker machine (with "
    "Tiltyard installed), then pass --scheduler ADDRESS.")


def _count(text: str) -> int:
    import argparse

    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r}: expected a whole number") from None
    if n < 0:
        raise argparse.ArgumentTypeError(f"{text}: must be 0 or more")
    return n


def add_batch_parser(sub, add_sky_options, add_study_options, options: bool = True) -> None:
    """Register ``batch`` with the command line's parser (the study's flags included);
    its options only when ``options`` (``tiltyard --help`` imports no engine module)."""
    s = sub.add_parser("batch", help="screen a portfolio of sites (CSV, GeoJSON or a folder "
                                     "of site files) into one results table",
                       description=_BATCH_DESCRIPTION, epilog=_BATCH_EPILOG)
    if not options:
        return
    from tiltyard.engine.choices import TIME_BASES

    s.add_argument("input", metavar="INPUT",
                   help="a .csv of sites, a .geojson FeatureCollection or a folder of site files")
    s.add_argument("-o", "--output", metavar="RESULTS", required=True,
                   help="results table: RESULTS.csv, or RESULTS.parquet for Parquet; rows "
                        "that failed go to RESULTS.errors.csv beside it")
    s.add_argument("--workers", type=_count, default=None, metavar="N",
                   help=f"local worker processes (default: the number of cores, "
                        f"{os.cpu_count() or 1} here; 0 runs in this process)")
    s.add_argument("--scheduler", default=None, metavar="ADDRESS",
                   help="run on an existing Dask cluster, e.g. tcp://10.0.0.5:8786 (see "
                        "'dask scheduler' and 'dask worker ADDRESS')")
    s.add_argument("--resume", action="store_true",
                   help="skip the sites already in RESULTS or in the chunks of a stopped run "
                        "(matched by each site's inputs hash)")
    s.add_argument("--sheets", metavar="DIR", default=None,
                   help="also write each site's feasibility sheet (PDF) into the folder DIR")
    s.add_argument("--paper", choices=("a4", "letter"), default="a4",
                   help="paper size of the sheets (default a4)")
    s.add_argument("--times", choices=TIME_BASES, default="clock",
                   help="time basis of the sheets' sun-path hour lines (default clock)")
    s.add_argument("--chunk-size", type=_count, default=None, metavar="N",
                   help="sites per chunk written (default 50): a stop loses at most one chunk")
    s.add_argument("--progress-every", type=_count, default=100, metavar="N",
                   help="without a terminal, print a progress line every N sites (default "
                        "100; 0: none)")
    s.add_argument("--json", action="store_true",
                   help="print a JSON summary of the run to stdout at the end")
    add_sky_options(s)
    add_study_options(s)


# -- progress ------------------------------------------------------------------------------------

class _Progress:
    """A tqdm bar on a terminal; otherwise a plain line every ``every`` sites."""

    def __init__(self, total: int, every: int, stream=None):
        self.stream = stream or sys.stderr
        self.every = every
        self.bar = None
        self._last = 0
        if self.stream.isatty():
            try:
                from tqdm import tqdm
            except ImportError:        # installed without the batch extra: plain lines
                return
            self.bar = tqdm(total=total, unit="site", file=self.stream, dynamic_ncols=True,
                            desc="sites")

    def __call__(self, state) -> None:
        if self.bar is not None:
            self.bar.set_postfix(failed=state.failed, refresh=False)
            self.bar.update(state.finished - self.bar.n)
            return
        if self.every and (state.done - self._last >= self.every
                           or state.finished == state.total):
            self._last = state.done
            left = state.total - state.finished
            rate = state.rate_per_s
            eta = f"{left / rate:.0f} s" if rate > 0 else "-"
            self.stream.write(f"tiltyard batch: {state.finished}/{state.total} sites, "
                              f"{state.failed} failed, {rate:.2f} sites/s, ETA {eta}\n")
            self.stream.flush()

    def close(self) -> None:
        if self.bar is not None:
            self.bar.close()


# -- sheets ---------------------------------------------------------------------------------------

def _slug(text: str) -> str:
    s = re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-").lower()
    return s[:60] or "site"


class _SheetWriter:
    """Lays out and writes each site's sheet from the sheet data its worker made (the
    sheet command's path: engine part in the worker, layout and PDF here, with Qt)."""

    def __init__(self, folder: Path, paper: str, time_basis: str):
        import datetime

        from .cli_args import _signals_as_exceptions
        from .cli_commands import _ensure_gui_app, _sheet_preferences

        self.folder, self.paper = folder, paper
        self._deferred = _signals_as_exceptions.deferred
        with self._deferred():
            prefs = _sheet_preferences()
            _ensure_gui_app()
            from tiltyard.app.sheet import SheetMeta

        self.meta = SheetMeta(preparer=prefs.preparer, organisation=prefs.organisation,
                              prepared=datetime.date.today(), time_basis=time_basis)

    def path_for(self, job) -> Path:
        name = job.key.get("id") or job.key.get("name") or "site"
        return self.folder / f"{_slug(str(name))}-{job.inputs_hash[:8]}.pdf"

    def __call__(self, outcome):
        from tiltyard.app.sheet import lay_out, pdf_bytes
        from tiltyard.engine.atomic_files import write_bytes_atomically
        from tiltyard.engine.batch.inputs import RowError

        job = outcome.job
        try:
            with self._deferred():
                laid = lay_out(outcome.sheet_data, self.meta, self.paper)
                data = pdf_bytes(laid.document)
            write_bytes_atomically(self.path_for(job), data)
        except (OSError, ValueError) as err:
            return RowError(job.line, job.source, "--sheets", str(self.path_for(job)),
                            " ".join(str(err).split()))
        return None


# -- the command -----------------------------------------------------------------------------------

def _check_paths(args) -> tuple[Path, Path | None]:
    from .cli_args import UserError
    from .cli_commands import _check_output

    out = Path(args.output)
    if out.suffix.lower() not in (".csv", ".parquet"):
        raise UserError(f"-o {args.output}: the results must be a .csv or a .parquet file")
    _check_output("-o", args.output)
    if out.suffix.lower() == ".parquet":
        try:
            import pyarrow  # noqa: F401
        except ImportError:
            raise UserError(f"-o {args.output}: Parquet needs pyarrow (pip install "
                            "\"tiltyard[batch]\"); or write a .csv") from None
    sheets = None
    if args.sheets is not None:
        sheets = Path(args.sheets)
        if sheets.exists() and not sheets.is_dir():
            raise UserError(f"--sheets {args.sheets}: is a file, not a folder")
        where = sheets if sheets.exists() else sheets.parent
        if not where.is_dir():
            raise UserError(f"--sheets {args.sheets}: the folder {where} does not exist")
        if not os.access(where, os.W_OK | os.X_OK):
            raise UserError(f"--sheets {args.sheets}: the folder {where} is not writable")
    return out, sheets


def _refuse_over_inputs(args, out: Path, portfolio, base) -> None:
    """No output (RESULTS, its errors file) may be an input: INPUT, a site file of an INPUT
    folder, or a weather file (the single-site commands' rule, reused)."""
    from tiltyard.engine.batch.run import errors_path

    from .cli_commands import _refuse_outputs_over_inputs

    wanted = [("-o", str(out)), ("-o (its errors file)", str(errors_path(out)))]
    _refuse_outputs_over_inputs(wanted, args.input, base, "the input")
    if portfolio.kind == "folder":
        for row in portfolio.rows:
            _refuse_outputs_over_inputs(wanted, str(Path(args.input) / row.source),
                                        row.assessment, "a site file of the input")


def _client(address: str):
    from .cli_args import UserError

    try:
        from distributed import Client
    except ImportError:
        raise UserError("--scheduler: needs the Dask distributed package (pip install "
                        "\"tiltyard[batch]\")") from None
    try:
        return Client(address, timeout="20s")
    except (OSError, TimeoutError, ValueError) as err:
        raise UserError(f"--scheduler {address}: cannot connect ({' '.join(str(err).split())})"
                        ) from None


def cmd_batch(args) -> int:
    from dataclasses import replace

    from tiltyard.engine.assessment import Assessment
    from tiltyard.engine.batch.inputs import PortfolioError, RowError, read_portfolio
    from tiltyard.engine.batch.run import DEFAULT_CHUNK_SIZE, plan_jobs, run_batch
    from tiltyard.engine.cautions import CAUTION
    from tiltyard.engine.site import Site

    from .cli_args import EXIT_OK, UserError, with_flags

    out, sheets = _check_paths(args)
    # the flags alone, on a plain site: a wrong flag is one line and exit 2, before any work
    base = with_flags(args, Assessment(Site("flag check", 0.0, 0.0)))
    try:
        portfolio = read_portfolio(args.input)
    except PortfolioError as err:
        raise UserError(str(err)) from None
    _refuse_over_inputs(args, out, portfolio, base)
    rows, errors = [], list(portfolio.errors)
    for row in portfolio.rows:
        try:
            rows.append(replace(row, assessment=with_flags(args, row.assessment)))
        except UserError as err:
            errors.append(RowError(row.line, row.source, "(options)", "", str(err)))
    jobs, planned_errors = plan_jobs(rows, args.times if sheets is not None else None)
    errors += planned_errors
    if sheets is not None:
        sheets.mkdir(exist_ok=True)          # made once the input has been read
        writer = _SheetWriter(sheets, args.paper, args.times)
    client = _client(args.scheduler) if args.scheduler else None
    workers = (os.cpu_count() or 1) if args.workers is None else args.workers
    progress = _Progress(len(jobs) + len(errors), args.progress_every)
    try:
        summary = run_batch(
            jobs, errors, out, portfolio.max_planes, workers=workers, client=client,
            resume=args.resume, chunk_size=args.chunk_size or DEFAULT_CHUNK_SIZE,
            progress=progress, on_outcome=writer if sheets is not None else None)
    finally:
        progress.close()
        if client is not None:
            client.close()
    if args.json:
        doc = summary.to_json_dict()
        doc["input"] = str(args.input)
        doc["sheets"] = None if sheets is None else str(sheets)
        sys.stdout.write(json.dumps(doc, indent=2, ensure_ascii=False) + "\n")
    else:
        print(f"wrote {summary.results} ({summary.rows_written} sites; "
              f"{summary.succeeded} succeeded, {summary.skipped} of them already done)")
        print(f"wrote {summary.errors_file} ({summary.failed} rows failed)")
        print(f"  {summary.ran} sites in {summary.seconds:.1f} s "
              f"({summary.sites_per_second:.2f} sites/s, {summary.executor})")
        print(f"  {CAUTION}")
    return EXIT_SOME_ROWS_FAILED if summary.failed else EXIT_OK
