"""The envelope computation off the GUI thread.

``MapRunner.request(project)`` starts ``evaluate_project`` on a private
``QThreadPool`` and returns the request's generation number. A newer request
sets every older request's cancel flag (polled by ``evaluate_project`` between
cases), and any result, progress or error that arrives from an older
generation is dropped, so only the newest request can ever reach the views.

Signals (all on the GUI thread): ``started(generation)``, ``progress(fraction)``,
``finished(generation, MapResult)``, ``failed(generation, message)``.
A failure never kills the runner: the next request works as usual.

Without an ``evaluate`` argument the runner calls
``engine_air.envelope.evaluate.evaluate_project`` as found in that module at the
time of each request (so a test can replace it there).
"""

from __future__ import annotations

import logging
import threading
from collections import deque
import traceback

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

from engine_air.envelope import evaluate as _evaluate_module
from engine_air.envelope.evaluate import Cancelled

log = logging.getLogger(__name__)


class _JobSignals(QObject):
    """Lives on the GUI thread; the job emits through it (queued across threads)."""

    progress = Signal(int, float)
    done = Signal(int, object)
    error = Signal(int, str)
    cancelled = Signal(int)


class _Job(QRunnable):
    def __init__(self, generation, project, evaluate, stop: threading.Event, signals: _JobSignals):
        super().__init__()
        self.setAutoDelete(True)
        self.generation = generation
        self.project = project
        self.evaluate = evaluate
        self.stop = stop
        self.signals = signals

    def run(self) -> None:  # worker thread
        gen, sig = self.generation, self.signals
        try:
            if self.stop.is_set():
                raise Cancelled()
            result = self.evaluate(
                self.project,
                progress=lambda f: sig.progress.emit(gen, float(f)),
                cancelled=self.stop.is_set,
            )
        except Cancelled:
            sig.cancelled.emit(gen)
        except Exception as exc:  # noqa: BLE001 - reported to the user, never fatal
            log.error("computation %d failed:\n%s", gen, traceback.format_exc())
            text = " ".join(str(exc).split())
            sig.error.emit(gen, f"{type(exc).__name__}: {text}" if text else type(exc).__name__)
        else:
            sig.done.emit(gen, result)


class MapRunner(QObject):
    """Runs one envelope evaluation at a time for the views; newer requests supersede older ones."""

    started = Signal(int)
    progress = Signal(float)
    finished = Signal(int, object)
    failed = Signal(int, str)

    def __init__(self, parent=None, evaluate=None, threads: int = 2) -> None:
        super().__init__(parent)
        self._evaluate = evaluate
        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(max(1, threads))
        self._generation = 0
        self._stops: dict[int, threading.Event] = {}
        self._signals: dict[int, _JobSignals] = {}
        self.shown_generation = 0
        self.dropped: deque[int] = deque(maxlen=1000)  # the latest stale generations whose results were dropped
        self.dropped_total = 0

    @property
    def generation(self) -> int:
        """The newest request's number (0 before the first)."""
        return self._generation

    @property
    def busy(self) -> bool:
        return bool(self._stops)

    def request(self, project) -> int:
        """Start evaluating ``project``; cancels every older request. Returns the new generation."""
        for stop in self._stops.values():
            stop.set()
        self._generation += 1
        gen = self._generation
        stop = threading.Event()
        sig = _JobSignals()
        sig.progress.connect(self._on_progress)
        sig.done.connect(self._on_done)
        sig.error.connect(self._on_error)
        sig.cancelled.connect(self._on_cancelled)
        self._stops[gen] = stop
        self._signals[gen] = sig
        evaluate = self._evaluate if self._evaluate is not None else _evaluate_module.evaluate_project
        self._pool.start(_Job(gen, project, evaluate, stop, sig))
        self.started.emit(gen)
        return gen

    def cancel(self) -> None:
        for stop in self._stops.values():
            stop.set()

    def wait(self, msecs: int = 5000) -> bool:
        """Block until every job has ended (used at shutdown and in tests)."""
        return self._pool.waitForDone(msecs)

    def shutdown(self) -> None:
        self.cancel()
        self._pool.waitForDone(10000)

    # -- GUI thread --------------------------------------------------------
    def _drop(self, gen: int) -> None:
        self.dropped.append(gen)
        self.dropped_total += 1

    def _forget(self, gen: int) -> None:
        self._stops.pop(gen, None)
        sig = self._signals.pop(gen, None)
        if sig is not None:
            sig.deleteLater()

    def _on_progress(self, gen: int, fraction: float) -> None:
        if gen == self._generation:
            self.progress.emit(fraction)

    def _on_done(self, gen: int, result) -> None:
        self._forget(gen)
        if gen != self._generation:
            self._drop(gen)
            log.debug("dropped stale result of computation %d (newest is %d)", gen, self._generation)
            return
        self.shown_generation = gen
        self.finished.emit(gen, result)

    def _on_error(self, gen: int, message: str) -> None:
        self._forget(gen)
        if gen != self._generation:
            self._drop(gen)
            return
        self.failed.emit(gen, message)

    def _on_cancelled(self, gen: int) -> None:
        self._forget(gen)
        if gen != self._generation:
            self._drop(gen)
