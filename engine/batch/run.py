"""Running a portfolio: one job per site on a local process pool or a Dask cluster, the
results written in chunks as they come back, each chunk atomically, resumable.

- :func:`plan_jobs` turns the readable rows into :class:`Job` s keyed by their inputs hash
  (the sheet's fingerprint, :func:`tiltyard.engine.batch.results.inputs_hash`).
- :func:`run_job` assesses one site in a worker and returns an :class:`Outcome` (its
  results row, or the reason it failed in the single-site command's words).
- :func:`run_batch` sends the jobs to the workers with a bounded number in flight, writes
  each ``chunk_size`` results as one chunk file beside RESULTS (whole or not at all,
  :mod:`tiltyard.engine.atomic_files`), and once every job is back merges the chunks, chunk
  by chunk, into RESULTS and writes RESULTS.errors.csv. A kill loses at most the chunk in
  flight; ``resume`` skips every site whose inputs hash is already in a chunk or in RESULTS.
"""

from __future__ import annotations

import os
import shutil
import sys
import time
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field, replace
from pathlib import Path

from ..assessment import Assessment
from ..atomic_files import atomic_file, remove_stale_temps_in, write_bytes_atomically
from .inputs import RowError
from .results import ERROR_COLUMNS, inputs_hash, result_columns, result_row, typed_frame

#: Results per chunk file (a kill loses at most this many finished sites).
DEFAULT_CHUNK_SIZE = 50
_CHUNK_DIR_SUFFIX = ".tiltyard-chunks"


@dataclass(frozen=True)
class Job:
    """One site to assess: its place in the input, key columns, assessment and hash."""

    line: int
    source: str
    key: dict
    assessment: Assessment
    inputs_hash: str
    notes: tuple = ()
    sheet_time_basis: str | None = None


@dataclass(frozen=True)
class Outcome:
    """What a worker sends back for one job: a results row or a row error; the worker's
    process id and peak resident memory (KiB), and the seconds the site took."""

    inputs_hash: str
    row: dict | None
    error: RowError | None
    pid: int
    peak_rss_kib: int | None
    seconds: float
    sheet_data: object = None
    job: Job | None = field(default=None, repr=False)


def planned_hash(a: Assessment) -> str:
    """The inputs hash :func:`run_job` will give ``a``, before assessing it: the basis,
    the sky options and the study options as :func:`tiltyard.engine.assess.assess` makes
    them (a weather file is read to hash its series)."""
    from ..assess import choose_basis, irradiance_options, load_weather
    from ..exports import input_digest

    basis = choose_basis(a)
    weather = load_weather(a)[0] if basis.kind == "file" else None
    irr = irradiance_options(a, basis, weather)
    return input_digest(a.site, a.study_options(irr), basis.kind, a.mounting_kind)


def plan_jobs(rows: Iterable, sheet_time_basis: str | None = None) -> tuple[list, list]:
    """Jobs for the readable rows, and the rows that cannot be planned (a basis the site
    cannot have, a weather file that cannot be read) or repeat an earlier row exactly.

    Returns
    -------
    (list of Job, list of RowError)
    """
    jobs, errors, seen = [], [], {}
    for r in rows:
        try:
            h = planned_hash(r.assessment)
        except Exception as err:  # noqa: BLE001 - a bad row never stops the batch
            errors.append(_row_error(r.line, r.source, err))
            continue
        if h in seen:
            errors.append(RowError(r.line, r.source, "(row)", "", f"the same site and "
                                   f"settings as line {seen[h]}; give each site once"))
            continue
        seen[h] = r.line
        key = dict(r.key, line=r.line, source=r.source)
        jobs.append(Job(r.line, r.source, key, r.assessment, h, tuple(r.notes),
                        sheet_time_basis))
    return jobs, errors


def _row_error(line: int, source: str, err: BaseException) -> RowError:
    """A failure of one row in the words the single-site command uses."""
    from ..assess import AssessmentError
    from ..site import SiteError
    from ..weather import WeatherImportError
    from ..weather_site import WeatherOptionError

    if isinstance(err, SiteError):
        value = "" if err.value is None else str(err.value)
        return RowError(line, source, err.field, value, err.reason)
    if isinstance(err, WeatherOptionError):
        return RowError(line, source, "sky", "" if err.value is None else str(err.value),
                        f"{err.option}: {err.reason}")
    if isinstance(err, (AssessmentError, WeatherImportError, OSError)):
        return RowError(line, source, "sky", "", " ".join(str(err).split()))
    if isinstance(err, ValueError):
        return RowError(line, source, "(settings)", "", " ".join(str(err).split()))
    return RowError(line, source, "(internal fault)", "",
                    f"{type(err).__name__}: {' '.join(str(err).split())} (report it)")


def _peak_rss_kib() -> int | None:
    try:
        import resource
    except ImportError:            # Windows
        return None
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return int(peak // 1024) if sys.platform == "darwin" else int(peak)   # macOS: bytes


def run_job(job: Job) -> Outcome:
    """Assess one site (in a worker process) and build its results row.

    A module-level function of the engine (no Qt), so a process pool or a Dask worker
    can run it. Every failure of the row is caught and returned as a :class:`RowError`.
    """
    from ..assess import assess

    start = time.perf_counter()
    row = error = sheet = None
    try:
        result = assess(job.assessment)
        row = result_row(result, job.key, job.notes)
        if row["inputs_hash"] != job.inputs_hash:   # one hash, planned and made
            raise RuntimeError("the inputs hash of the result differs from the planned one")
        if job.sheet_time_basis is not None:
            sheet = result.sheet_data(time_basis=job.sheet_time_basis)
    except Exception as err:  # noqa: BLE001 - a bad row never stops the batch
        error = _row_error(job.line, job.source, err)
        row = None
    return Outcome(job.inputs_hash, row, error, os.getpid(), _peak_rss_kib(),
                   time.perf_counter() - start, sheet)


# -- executors: results as they finish, a bounded number in flight ------------------------------

def _inline(jobs: list) -> Iterator[Outcome]:
    for job in jobs:
        yield run_job(job)


def _process_pool(jobs: list, workers: int) -> Iterator[Outcome]:
    import concurrent.futures as cf
    import multiprocessing

    ctx = multiprocessing.get_context("spawn")     # no fork of a threaded parent
    pending = iter(jobs)
    with cf.ProcessPoolExecutor(max_workers=workers, mp_context=ctx) as pool:
        in_flight = set()
        try:
            for job in _take(pending, 2 * workers):
                in_flight.add(pool.submit(run_job, job))
            while in_flight:
                done, in_flight = cf.wait(in_flight, return_when=cf.FIRST_COMPLETED)
                for fut in done:
                    for job in _take(pending, 1):
                        in_flight.add(pool.submit(run_job, job))
                    yield fut.result()
        except BaseException:
            pool.shutdown(wait=False, cancel_futures=True)
            raise


def _dask(jobs: list, client) -> Iterator[Outcome]:
    from distributed import as_completed

    pending = iter(jobs)
    workers = max(1, sum(client.nthreads().values()))
    futures = [client.submit(run_job, job, pure=False) for job in _take(pending, 2 * workers)]
    queue = as_completed(futures)
    try:
        for fut in queue:
            outcome = fut.result()
            fut.release()
            for job in _take(pending, 1):
                queue.add(client.submit(run_job, job, pure=False))
            yield outcome
    except BaseException:
        client.cancel(list(queue.futures))
        raise


def _take(it: Iterator, n: int) -> list:
    out = []
    for _ in range(n):
        try:
            out.append(next(it))
        except StopIteration:
            break
    return out


# -- chunks and the merged outputs -----------------------------------------------------------------

def errors_path(output) -> Path:
    """RESULTS.errors.csv beside RESULTS."""
    output = Path(output)
    return output.with_name(output.name + ".errors.csv")


def chunk_folder(output) -> Path:
    """The folder of RESULTS's chunks while a batch runs (removed once RESULTS is whole)."""
    output = Path(output)
    return output.with_name(f".{output.name}{_CHUNK_DIR_SUFFIX}")


def _is_parquet(path) -> bool:
    return Path(path).suffix.lower() == ".parquet"


def _frame(rows: list, columns: tuple):
    import pandas as pd

    return typed_frame(pd.DataFrame(rows), columns)


def _typed(df, columns: tuple):
    return typed_frame(df, columns)


def _frame_bytes(df, parquet: bool) -> bytes:
    if parquet:
        import io

        buf = io.BytesIO()
        df.to_parquet(buf, index=False, engine="pyarrow")
        return buf.getvalue()
    return df.to_csv(index=False, lineterminator="\n").encode("utf-8")


def _read_frames(path: Path, columns: tuple, batch_rows: int = 2000):
    """The rows of a results file or chunk, ``batch_rows`` at a time, typed as ``columns``."""
    import pandas as pd

    if _is_parquet(path):
        import pyarrow.parquet as pq

        for batch in pq.ParquetFile(path).iter_batches(batch_size=batch_rows):
            yield _typed(batch.to_pandas(), columns)
        return
    strings = [c for c, kind in columns if kind == "str"]
    for df in pd.read_csv(path, chunksize=batch_rows, keep_default_na=False,
                          na_values={c: [""] for c, kind in columns if kind != "str"},
                          dtype=dict.fromkeys(strings, str)):
        yield _typed(df, columns)


class ChunkStore:
    """RESULTS's chunk files: ``chunk-<n>.csv`` (or ``.parquet``), each written whole."""

    def __init__(self, output, columns: tuple):
        self.output = Path(output)
        self.folder = chunk_folder(output)
        self.columns = columns
        self.parquet = _is_parquet(output)
        self.suffix = ".parquet" if self.parquet else ".csv"

    def chunks(self) -> list[Path]:
        if not self.folder.is_dir():
            return []
        return sorted(p for p in self.folder.iterdir()
                      if p.name.startswith("chunk-") and p.suffix == self.suffix)

    def open(self, resume: bool) -> None:
        """Make the folder; without ``resume`` drop the chunks of an earlier run; remove
        temporary files left by a killed run."""
        if self.folder.exists() and not resume:
            shutil.rmtree(self.folder)
        self.folder.mkdir(exist_ok=True)
        remove_stale_temps_in(self.folder)

    def write(self, rows: list) -> None:
        n = len(self.chunks()) + 1
        while (self.folder / f"chunk-{n:06d}{self.suffix}").exists():
            n += 1
        data = _frame_bytes(_frame(rows, self.columns), self.parquet)
        write_bytes_atomically(self.folder / f"chunk-{n:06d}{self.suffix}", data)

    def done_hashes(self, also: Path | None = None) -> set:
        """Inputs hashes of every row already in a chunk (and in ``also``, RESULTS)."""
        done = set()
        sources = self.chunks() + ([also] if also is not None and also.is_file() else [])
        for path in sources:
            for df in _read_frames(path, self.columns):
                done.update(df["inputs_hash"].tolist())
        return done

    def remove(self) -> None:
        shutil.rmtree(self.folder, ignore_errors=True)


def _merge(store: ChunkStore, keep: set, previous: Path | None) -> int:
    """Write RESULTS from ``previous`` (RESULTS of an earlier run, on resume) and every
    chunk, frame by frame, each inputs hash once and only those in ``keep``; atomically.

    Returns the rows written."""
    sources = ([previous] if previous is not None and previous.is_file() else [])
    sources += store.chunks()
    written = set()
    count = 0
    names = [c for c, _ in store.columns]
    if store.parquet:
        import pyarrow as pa
        import pyarrow.parquet as pq

        schema = pa.Schema.from_pandas(_frame([], store.columns), preserve_index=False)
        with atomic_file(store.output, "wb") as fh:
            writer = pq.ParquetWriter(fh, schema)
            for df in _frames(sources, store.columns, keep, written):
                writer.write_table(pa.Table.from_pandas(df, schema=schema,
                                                        preserve_index=False))
                count += len(df)
            writer.close()
        return count
    with atomic_file(store.output, "w", encoding="utf-8", newline="") as fh:
        fh.write(",".join(names) + "\n")
        for df in _frames(sources, store.columns, keep, written):
            df.to_csv(fh, index=False, header=False, lineterminator="\n")
            count += len(df)
    return count


def _frames(sources, columns, keep: set, written: set):
    for path in sources:
        for df in _read_frames(path, columns):
            mask = df["inputs_hash"].isin(keep) & ~df["inputs_hash"].isin(written)
            df = df[mask].drop_duplicates("inputs_hash")
            written.update(df["inputs_hash"].tolist())
            if len(df):
                yield df


def write_errors(output, errors: list) -> Path:
    """RESULTS.errors.csv (header only when no row failed), atomically, in line order."""
    import csv
    import io

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(ERROR_COLUMNS)
    for e in sorted(errors, key=lambda e: (e.line, e.source)):
        w.writerow([e.line, e.source, e.field, e.value, e.reason])
    path = errors_path(output)
    write_bytes_atomically(path, buf.getvalue().encode("utf-8"))
    return path


# -- the run -----------------------------------------------------------------------------------

@dataclass
class BatchProgress:
    """Where a run is: sites done (succeeded or failed), failed, skipped, of total."""

    total: int
    skipped: int = 0
    done: int = 0
    failed: int = 0
    refused: int = 0
    started: float = field(default_factory=time.perf_counter)

    @property
    def elapsed_s(self) -> float:
        return time.perf_counter() - self.started

    @property
    def finished(self) -> int:
        """Sites accounted for: skipped, refused on reading, and run."""
        return self.skipped + self.refused + self.done

    @property
    def rate_per_s(self) -> float:
        """Sites run a second."""
        return self.done / self.elapsed_s if self.elapsed_s > 0 else 0.0


@dataclass(frozen=True)
class BatchSummary:
    """The end of a run, for ``--json`` and the benchmark."""

    results: str
    errors_file: str
    sites: int
    succeeded: int
    failed: int
    skipped: int
    ran: int
    rows_written: int
    seconds: float
    executor: str
    workers: int
    peak_rss_mib_by_worker: dict

    @property
    def sites_per_second(self) -> float:
        return self.ran / self.seconds if self.seconds > 0 else 0.0

    def to_json_dict(self) -> dict:
        from ..cautions import CAUTION

        return {"results": self.results, "errors_file": self.errors_file, "sites": self.sites,
                "succeeded": self.succeeded, "failed": self.failed, "skipped": self.skipped,
                "ran": self.ran, "rows_written": self.rows_written, "seconds": round(self.seconds, 3),
                "sites_per_second": round(self.sites_per_second, 3),
                "executor": self.executor, "workers": self.workers,
                "peak_rss_mib_by_worker": {str(k): round(v, 1) for k, v in
                                           self.peak_rss_mib_by_worker.items()},
                "caution": CAUTION}


def run_batch(jobs: list, input_errors: list, output, max_planes: int, *, workers: int = 0,
              client=None, resume: bool = False, chunk_size: int = DEFAULT_CHUNK_SIZE,
              progress: Callable[[BatchProgress], None] | None = None,
              on_outcome: Callable[[Outcome], RowError | None] | None = None) -> BatchSummary:
    """Run the jobs and write RESULTS, its chunks on the way, and RESULTS.errors.csv.

    Parameters
    ----------
    jobs : list of Job
        From :func:`plan_jobs`.
    input_errors : list of RowError
        Rows already refused (reading, planning); written to the errors file.
    output : path
        RESULTS: ``.csv``, or Parquet when it ends in ``.parquet``.
    max_planes : int
        Most site planes of any row (the ``planeN_`` columns).
    workers : int
        Local worker processes; 0 runs every job in this process. Ignored with ``client``.
    client : distributed.Client, optional
        Run the jobs on this Dask cluster.
    resume : bool
        Skip the jobs whose inputs hash is in the chunks of an earlier run or in RESULTS.
    chunk_size : int
        Results per chunk file.
    progress : callable, optional
        Called with a :class:`BatchProgress` after every site.
    on_outcome : callable, optional
        Called with each :class:`Outcome` as it arrives (the sheets); a returned
        :class:`RowError` counts the site as failed.
    """
    output = Path(output)
    columns = result_columns(max_planes)
    store = ChunkStore(output, columns)
    store.open(resume)
    previous = output if resume and output.is_file() else None
    done = store.done_hashes(previous) if resume else set()
    todo = [j for j in jobs if j.inputs_hash not in done]
    skipped = len(jobs) - len(todo)
    state = BatchProgress(total=len(jobs) + len(input_errors), skipped=skipped,
                          failed=len(input_errors), refused=len(input_errors))
    errors = list(input_errors)
    peaks: dict = {}
    buffer: list = []
    if client is not None:
        outcomes, executor, n_workers = _dask(todo, client), "dask", _dask_workers(client)
    elif workers and todo:
        outcomes, executor, n_workers = _process_pool(todo, workers), "processes", workers
    else:
        outcomes, executor, n_workers = _inline(todo), "this process", 0
    by_hash = {j.inputs_hash: j for j in todo}
    start = time.perf_counter()
    try:
        for out in outcomes:
            error = out.error
            if error is None and on_outcome is not None:
                error = on_outcome(replace(out, job=by_hash[out.inputs_hash]))
            if error is not None:
                errors.append(error)
                state.failed += 1
            else:
                buffer.append(out.row)
            state.done += 1
            if out.peak_rss_kib is not None:
                peaks[out.pid] = max(peaks.get(out.pid, 0.0), out.peak_rss_kib / 1024.0)
            if len(buffer) >= chunk_size:
                store.write(buffer)
                buffer = []
            if progress is not None:
                progress(state)
    finally:
        if hasattr(outcomes, "close"):
            outcomes.close()       # a stop shuts the pool or cancels the cluster's futures
        if buffer:                 # a stop (Ctrl-C, SIGTERM) keeps what is finished
            store.write(buffer)
    keep = {j.inputs_hash for j in jobs}
    rows = _merge(store, keep, previous)
    errors_file = write_errors(output, errors)
    store.remove()
    failed_here = state.failed - len(input_errors)
    return BatchSummary(str(output), str(errors_file), len(jobs) + len(input_errors),
                        skipped + state.done - failed_here, state.failed, skipped, state.done,
                        rows, time.perf_counter() - start, executor, n_workers, peaks)


def _dask_workers(client) -> int:
    return len(client.nthreads())


__all__ = ["DEFAULT_CHUNK_SIZE", "BatchProgress", "BatchSummary", "ChunkStore", "Job",
           "Outcome", "chunk_folder", "errors_path", "inputs_hash", "plan_jobs",
           "planned_hash", "run_batch", "run_job", "write_errors"]
