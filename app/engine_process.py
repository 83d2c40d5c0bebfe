"""Engine calls in separate worker processes, so the GUI thread keeps its core.

Engine work in a thread of the GUI process competes with the GUI thread for
Python's global interpreter lock: every time a chart is painted, each of the
many small calls pyqtgraph makes has to wait for the worker to let go of the
lock, and a repaint that takes 10 ms alone can take ten times that. Engine
calls therefore run in a small pool of child processes (``spawn`` start
method: nothing of Qt is copied into them) and only their results, pickled,
come back.

An :class:`EngineCall` names a module-level engine function and its
arguments, all picklable. The child gives the function a ``progress``
callable that writes the fraction done into a shared slot and raises
:class:`Cancelled` once the parent has set that slot's cancel flag, so a
superseded computation stops at its next stage, as it does in a thread.

This module imports no Qt: the children load only it and the engine.
"""

from __future__ import annotations

import atexit
import multiprocessing
import os
import pickle
import threading
import traceback
from collections.abc import Callable
from concurrent.futures import ProcessPoolExecutor
from concurrent.futures import TimeoutError as FutureTimeout
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field

#: Worker processes in the pool (this machine class has 2 cores; one stays with the GUI
#: most of the time because the children run at a lower scheduling priority).
WORKERS = 2
#: Cancel/progress slots shared with the children: the most calls in flight at once.
SLOTS = 64
#: Environment switch: "threads" runs engine calls in the GUI process's worker threads.
MODE_ENV = "TILTYARD_ENGINE_WORKERS"
#: Engine modules a child imports as it starts, so the first real call is not slowed.
PRELOAD = ("tiltyard.engine.tilt", "tiltyard.engine.sunchart", "tiltyard.engine.daycurves",
           "tiltyard.engine.horizon_loss")


class Cancelled(Exception):
    """Raised inside a computation once its task has been cancelled."""


@dataclass(frozen=True)
class EngineCall:
    """A picklable engine call: ``func(*args, **kwargs, <progress_arg>=progress)``.

    ``func`` must be a module-level function; ``progress_arg`` names the
    keyword its progress callable goes in, or is None when it takes none.
    """

    func: Callable
    args: tuple = ()
    kwargs: dict = field(default_factory=dict)
    progress_arg: str | None = "progress"

    def run(self, progress: Callable) -> object:
        kwargs = dict(self.kwargs)
        if self.progress_arg:
            kwargs[self.progress_arg] = progress
        return self.func(*self.args, **kwargs)


# -- the child's side -------------------------------------------------------------------
_child_cancel = None
_child_progress = None


def _child_init(cancel, progress) -> None:
    global _child_cancel, _child_progress
    _child_cancel, _child_progress = cancel, progress
    try:
        os.nice(10)               # the GUI process comes first when both want the CPU
    except (AttributeError, OSError):
        pass
    from importlib import import_module
    for name in PRELOAD:
        import_module(name)


def _child_run(call: EngineCall, slot: int) -> object:
    def progress(fraction: float, stage: str = "") -> None:
        if _child_cancel[slot]:
            raise Cancelled()
        _child_progress[slot] = float(fraction)

    try:
        return call.run(progress)
    except Exception as exc:
        try:
            pickle.dumps(exc)
        except Exception:  # noqa: BLE001 - an exception the parent could not unpickle
            text = f"{type(exc).__name__}: {exc}\n{traceback.format_exc()}"
            raise RuntimeError(text) from None
        raise


def _child_ping() -> int:
    return os.getpid()


# -- the parent's side ------------------------------------------------------------------
class _Pool:
    def __init__(self) -> None:
        self._lock = threading.Lock()
        self._executor: ProcessPoolExecutor | None = None
        self._free = list(range(SLOTS))
        ctx = multiprocessing.get_context("spawn")
        self._ctx = ctx
        self._cancel = ctx.Array("b", SLOTS, lock=False)
        self._progress = ctx.Array("d", SLOTS, lock=False)

    def executor(self) -> ProcessPoolExecutor:
        with self._lock:
            if self._executor is None:
                self._executor = ProcessPoolExecutor(
                    max_workers=WORKERS, mp_context=self._ctx, initializer=_child_init,
                    initargs=(self._cancel, self._progress))
            return self._executor

    def start(self) -> None:
        """Start the children now (they take about a second to load the engine)."""
        ex = self.executor()
        for _ in range(WORKERS):
            ex.submit(_child_ping)

    def slot(self) -> int:
        with self._lock:
            if not self._free:
                raise RuntimeError("too many engine computations at once")
            slot = self._free.pop()
        self._cancel[slot] = 0
        self._progress[slot] = 0.0
        return slot

    def release(self, slot: int) -> None:
        with self._lock:
            self._free.append(slot)

    def discard_broken(self, executor: ProcessPoolExecutor) -> None:
        with self._lock:
            if self._executor is executor:
                self._executor = None
        executor.shutdown(wait=False, cancel_futures=True)

    def shutdown(self) -> None:
        with self._lock:
            ex, self._executor = self._executor, None
        if ex is not None:
            for i in range(SLOTS):
                self._cancel[i] = 1
            ex.shutdown(wait=True, cancel_futures=True)


_pool: _Pool | None = None
_pool_lock = threading.Lock()


def _get_pool() -> _Pool:
    global _pool
    with _pool_lock:
        if _pool is None:
            _pool = _Pool()
            atexit.register(_pool.shutdown)
        return _pool


def use_processes() -> bool:
    """True unless ``TILTYARD_ENGINE_WORKERS=threads`` asks for in-process threads."""
    return os.environ.get(MODE_ENV, "processes").strip().lower() != "threads"


def start_pool() -> None:
    """Start the worker processes ahead of the first call (no-op in thread mode)."""
    if use_processes():
        _get_pool().start()


def shutdown_pool() -> None:
    """Stop the worker processes (running calls are asked to cancel first)."""
    with _pool_lock:
        pool = _pool
    if pool is not None:
        pool.shutdown()


def run_call(call: EngineCall, progress: Callable, poll_s: float = 0.1) -> object:
    """Run ``call`` in a worker process and wait for its result (in a worker thread).

    ``progress(fraction, stage)`` is called from the waiting thread every
    ``poll_s`` with the child's latest fraction; when it raises
    :class:`Cancelled` the child is told to stop and the exception is re-raised.
    In thread mode, or if no process can be started, the call runs right here.
    """
    if not use_processes():
        return call.run(progress)
    pool = _get_pool()
    try:
        executor = pool.executor()
    except OSError:
        return call.run(progress)
    slot = pool.slot()
    try:
        try:
            future = executor.submit(_child_run, call, slot)
        except (BrokenProcessPool, RuntimeError):
            pool.discard_broken(executor)
            executor = pool.executor()
            future = executor.submit(_child_run, call, slot)
        while True:
            try:
                return future.result(timeout=poll_s)
            except FutureTimeout:
                pass
            except BrokenProcessPool:
                pool.discard_broken(executor)
                raise RuntimeError("an engine worker process stopped unexpectedly; "
                                   "the next computation starts a new one") from None
            try:
                progress(pool._progress[slot], "")
            except Cancelled:
                pool._cancel[slot] = 1
                if not future.cancel():
                    try:
                        future.result()         # let the child stop before its slot is reused
                    except BaseException:  # noqa: BLE001,S110 - it was cancelled; its outcome is dropped
                        pass
                raise
    finally:
        pool.release(slot)
