"""Engine work off the GUI thread: debounced, cancellable, one live task per channel.

A view asks for a result by channel name ("sun path", "study", ...). The
request waits out a short debounce (edits arrive in bursts); when it starts,
any older task on the same channel is cancelled and its result, should it
still arrive, is dropped. Engine functions that take a ``progress`` callable
get one that reports to the status bar and raises :class:`Cancelled` once the
task has been cancelled, so long work stops at its next stage.

Engine computations go through :meth:`TaskRunner.submit_call` and run in
worker processes (:mod:`tiltyard.app.engine_process`): the thread that waits
for them holds no lock the GUI thread needs. Work that needs Qt (laying out
and rendering the sheet) or is light goes through :meth:`TaskRunner.submit`
and runs in a thread.

Errors in a worker are caught and delivered as a message with the traceback
kept for reporting; nothing is raised into Qt's event loop.
"""

from __future__ import annotations

import inspect
import itertools
import threading
import traceback
from collections.abc import Callable
from dataclasses import dataclass, field

from PySide6.QtCore import QObject, QRunnable, QThreadPool, QTimer, Signal

from tiltyard.engine.site import SiteError

from .engine_process import Cancelled, EngineCall, run_call

__all__ = ["Cancelled", "DEBOUNCE_MS", "EngineCall", "TaskRunner"]

#: Debounce between the last edit and the start of the computation, ms.
DEBOUNCE_MS = 150

#: Delay between two drawing steps, ms. Not 0: a zero-delay single shot is a posted
#: event, and Qt delivers every posted event (those posted meanwhile too) before it
#: looks at timers and input again, so zero-delay steps would all run in one turn.
TURN_MS = 1


@dataclass
class _Task:
    channel: str
    generation: int
    fn: Callable
    on_result: Callable | None
    label: str
    cancel_event: threading.Event = field(default_factory=threading.Event)

    def progress(self, fraction: float, stage: str = "") -> None:
        if self.cancel_event.is_set():
            raise Cancelled()


class _Bridge(QObject):
    """Lives in the GUI thread; worker threads emit through it (queued)."""

    done = Signal(object, object)          # task, result
    failed = Signal(object, str, str)      # task, message, traceback
    progressed = Signal(object, float, str)
    cancelled = Signal(object)


class _Runnable(QRunnable):
    def __init__(self, task: _Task, bridge: _Bridge):
        super().__init__()
        self.setAutoDelete(True)
        self._task = task
        self._bridge = bridge

    def run(self):  # worker thread
        task = self._task

        def progress(fraction: float, stage: str = ""):
            task.progress(fraction, stage)
            self._bridge.progressed.emit(task, float(fraction), stage)

        try:
            if task.cancel_event.is_set():
                raise Cancelled()
            result = task.fn(progress)
        except Cancelled:
            self._bridge.cancelled.emit(task)
        except (SiteError, ValueError) as exc:
            self._bridge.failed.emit(task, str(exc), traceback.format_exc())
        except Exception as exc:  # noqa: BLE001 - every worker fault becomes a visible message
            self._bridge.failed.emit(task, f"internal fault: {type(exc).__name__}: {exc}",
                                     traceback.format_exc())
        else:
            self._bridge.done.emit(task, result)


class TaskRunner(QObject):
    """Runs engine jobs in a thread pool, one live task per channel.

    Signals
    -------
    busy(bool)
        True while any task is queued or running.
    progress(str, float, str)
        Channel label, fraction 0..1 and stage text.
    error(str, str, str)
        Channel, one-line message and traceback of a failed task.
    succeeded(str)
        Label of a task whose result was shown without error.
    """

    busy = Signal(bool)
    progress = Signal(str, float, str)
    error = Signal(str, str, str)
    finished = Signal(str)
    succeeded = Signal(str)

    def __init__(self, parent=None, max_threads: int = 2):
        super().__init__(parent)
        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(max_threads)
        self._bridge = _Bridge(self)
        self._bridge.done.connect(self._on_done)
        self._bridge.failed.connect(self._on_failed)
        self._bridge.progressed.connect(self._on_progress)
        self._bridge.cancelled.connect(self._on_cancelled)
        self._gen = itertools.count(1)
        self._live: dict[str, _Task] = {}
        self._running: set[int] = set()
        self._pending: dict[str, tuple] = {}
        self._timers: dict[str, QTimer] = {}
        self._closed = False
        self._drawing = 0
        self._stage_gen: dict[str, int] = {}

    # -- requests -------------------------------------------------------------
    def submit(self, channel: str, fn: Callable, on_result: Callable | None = None,
               label: str | None = None, debounce_ms: int = DEBOUNCE_MS) -> None:
        """Ask for ``fn(progress)`` to run on ``channel`` after the debounce.

        A later submit on the same channel replaces this one (if it has not
        started) or cancels it (if it has).
        """
        if self._closed:
            return
        self._pending[channel] = (fn, on_result, label or channel)
        timer = self._timers.get(channel)
        if timer is None:
            timer = QTimer(self)
            timer.setSingleShot(True)
            timer.timeout.connect(lambda ch=channel: self._start(ch))
            self._timers[channel] = timer
        timer.start(max(0, int(debounce_ms)))
        self._emit_busy()

    def submit_call(self, channel: str, call: EngineCall, on_result: Callable | None = None,
                    label: str | None = None, debounce_ms: int = DEBOUNCE_MS) -> None:
        """As :meth:`submit`, for an engine call run in a worker process."""
        self.submit(channel, lambda progress: run_call(call, progress), on_result, label,
                    debounce_ms)

    def cancel(self, channel: str | None = None) -> None:
        """Cancel the pending and running task of a channel (all channels if None)."""
        channels = list(self._live) + list(self._pending) if channel is None else [channel]
        for ch in channels:
            self._pending.pop(ch, None)
            timer = self._timers.get(ch)
            if timer is not None:
                timer.stop()
            task = self._live.get(ch)
            if task is not None:
                task.cancel_event.set()
        self._emit_busy()

    @property
    def closed(self) -> bool:
        """True once :meth:`shutdown` has been called."""
        return self._closed

    def is_busy(self) -> bool:
        return bool(self._pending) or bool(self._running) or self._drawing > 0

    def run_in_stages(self, owner: str, steps) -> None:
        """Run GUI-side drawing ``steps`` one per event-loop turn.

        A result that takes long to draw is split so the event loop (input,
        repaints) gets a turn between steps. A step that returns a generator
        is split further: each of its ``yield`` points ends a turn. A newer
        call for the same ``owner`` abandons the rest of an older one. The
        runner counts as busy until the last step has run.
        """
        gen = self._stage_gen.get(owner, 0) + 1
        self._stage_gen[owner] = gen
        steps = list(steps)
        self._drawing += 1
        self._emit_busy()

        def advance(i, pending):
            """Run one turn: the next part of a split step, or step i."""
            if pending is not None:
                try:
                    next(pending)
                    return i, pending
                except StopIteration:
                    return i + 1, None
            out = steps[i]()
            if inspect.isgenerator(out):
                return advance(i, out)
            return i + 1, None

        def run(i, pending=None):
            try:
                if self._closed or self._stage_gen.get(owner) != gen or i >= len(steps):
                    return self._done_drawing()
                try:
                    i, pending = advance(i, pending)
                except Exception as exc:  # noqa: BLE001 - a view fault must not kill the app
                    self.error.emit(owner, f"could not show the result: {exc}",
                                    traceback.format_exc())
                    return self._done_drawing()
                if i >= len(steps):
                    return self._done_drawing()
                QTimer.singleShot(TURN_MS, lambda: run(i, pending))
            except RuntimeError:       # the runner was deleted while steps were queued
                return None

        run(0)

    def _done_drawing(self) -> None:
        self._drawing = max(0, self._drawing - 1)
        self._emit_busy()

    def shutdown(self, timeout_ms: int = 30000) -> bool:
        """Cancel everything and wait for the worker threads to finish."""
        self._closed = True
        self.cancel(None)
        for timer in self._timers.values():
            timer.stop()
        return self._pool.waitForDone(timeout_ms)

    def active_thread_count(self) -> int:
        return self._pool.activeThreadCount()

    # -- internals ------------------------------------------------------------
    def _start(self, channel: str) -> None:
        item = self._pending.pop(channel, None)
        if item is None or self._closed:
            self._emit_busy()
            return
        fn, on_result, label = item
        old = self._live.get(channel)
        if old is not None:
            old.cancel_event.set()
        task = _Task(channel, next(self._gen), fn, on_result, label)
        self._live[channel] = task
        self._running.add(task.generation)
        self.progress.emit(label, 0.0, "started")
        self._pool.start(_Runnable(task, self._bridge))
        self._emit_busy()

    def _current(self, task: _Task) -> bool:
        return self._live.get(task.channel) is task and not task.cancel_event.is_set()

    def _retire(self, task: _Task) -> None:
        self._running.discard(task.generation)
        if self._live.get(task.channel) is task:
            del self._live[task.channel]
        self._emit_busy()

    def _on_done(self, task: _Task, result) -> None:
        current = self._current(task)
        self._retire(task)
        if current and not self._closed:
            ok = True
            if task.on_result is not None:
                try:
                    task.on_result(result)
                except Exception as exc:  # noqa: BLE001 - a view fault must not kill the app
                    ok = False
                    self.error.emit(task.label, f"could not show the result: {exc}",
                                    traceback.format_exc())
            if ok:
                self.succeeded.emit(task.label)
            self.progress.emit(task.label, 1.0, "done")
            self.finished.emit(task.channel)

    def _on_failed(self, task: _Task, message: str, tb: str) -> None:
        current = self._current(task)
        self._retire(task)
        if current and not self._closed:
            self.error.emit(task.label, message, tb)
            self.finished.emit(task.channel)

    def _on_progress(self, task: _Task, fraction: float, stage: str) -> None:
        if self._current(task):
            self.progress.emit(task.label, fraction, stage)

    def _on_cancelled(self, task: _Task) -> None:
        self._retire(task)

    def _emit_busy(self) -> None:
        self.busy.emit(self.is_busy())
