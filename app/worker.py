"""The one way the desktop program runs work off the GUI thread, and the one debounce.

``Worker`` runs tasks ``fn(progress, cancelled) -> result`` on a private ``QThreadPool`` and numbers
each request (its *generation*). Every result, progress report and error comes back as a signal on
the GUI thread, tagged with its generation:

- ``started(generation)``, ``progress(fraction)`` (newest generation only),
  ``finished(generation, result)``, ``failed(generation, message)``.

Two policies, chosen when the worker is made:

- ``supersede=True`` (the map, the design dialogs): a new request sets every older request's cancel
  flag (``cancelled()`` returns True; the analysis polls it and raises ``Cancelled``), and whatever an
  older request still delivers is *dropped* (counted in ``dropped``), so only the newest request can
  reach the views.
- ``supersede=False`` (autosave): every request runs to its end, one after another in the order asked
  (``threads=1``), and every outcome is reported.

A task that raises never kills the worker: the error becomes ``failed(generation, message)`` with a
one-line message (``describe_error(exc)``) and the next request works as usual.

``MapRunner`` is the worker the main window uses for the envelope map. Without an ``evaluate`` argument
it calls ``engine_air.envelope.evaluate.evaluate_project`` as found in that module at the time of each
request (so a test can replace it there).

``Debouncer`` collects bursts of calls (typing "0.45" into a spin box) into one call after a quiet
interval; ``flush()`` makes the pending call at once, ``cancel()`` forgets it.
"""

from __future__ import annotations

import logging
import threading
import traceback
from collections import deque
from typing import Callable

from PySide6.QtCore import QObject, QRunnable, QThreadPool, QTimer, Signal

from engine_air.envelope import evaluate as _evaluate_module
from engine_air.envelope.evaluate import Cancelled
from engine_air.project.errors import ProjectError

log = logging.getLogger(__name__)

Task = Callable[[Callable[[float], None], Callable[[], bool]], object]


def one_line_error(exc: BaseException) -> str:
    """The message of a failed task on one line: the loader's own text, else "Type: text"."""
    text = " ".join(str(exc).split())
    if isinstance(exc, ProjectError):
        return text or type(exc).__name__
    return f"{type(exc).__name__}: {text}" if text else type(exc).__name__


class _JobSignals(QObject):
    """Lives on the GUI thread; the job emits through it (queued across threads)."""

    progress = Signal(int, float)
    done = Signal(int, object)
    error = Signal(int, str)
    cancelled = Signal(int)


class _Job(QRunnable):
    def __init__(self, generation: int, fn: Task, stop: threading.Event, signals: _JobSignals,
                 describe_error: Callable[[BaseException], str]) -> None:
        super().__init__()
        self.setAutoDelete(True)
        self.generation = generation
        self.fn = fn
        self.stop = stop
        self.signals = signals
        self.describe_error = describe_error

    def run(self) -> None:  # worker thread
        gen, sig = self.generation, self.signals
        try:
            if self.stop.is_set():
                raise Cancelled()
            result = self.fn(lambda f: sig.progress.emit(gen, float(f)), self.stop.is_set)
        except Cancelled:
            sig.cancelled.emit(gen)
        except Exception as exc:  # noqa: BLE001 - reported to the user, never fatal
            if not isinstance(exc, (ProjectError, OSError)):
                log.error("task %d failed:\n%s", gen, traceback.format_exc())
            sig.error.emit(gen, self.describe_error(exc))
        else:
            sig.done.emit(gen, result)


class Worker(QObject):
    """Runs tasks ``fn(progress, cancelled)`` off the GUI thread; see the module text for the policies."""

    started = Signal(int)
    progress = Signal(float)
    finished = Signal(int, object)
    failed = Signal(int, str)
    cancelled = Signal(int)

    def __init__(self, parent=None, threads: int = 1, supersede: bool = True,
                 describe_error: Callable[[BaseException], str] = one_line_error) -> None:
        super().__init__(parent)
        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(max(1, threads))
        self._supersede = supersede
        self._describe_error = describe_error
        self._generation = 0
        self._stops: dict[int, threading.Event] = {}
        self._signals: dict[int, _JobSignals] = {}
        self.shown_generation = 0  # the newest generation whose result was delivered
        self.dropped: deque[int] = deque(maxlen=1000)  # the latest stale generations whose outcome was dropped
        self.dropped_total = 0

    @property
    def generation(self) -> int:
        """The newest request's number (0 before the first)."""
        return self._generation

    @property
    def busy(self) -> bool:
        """Some request has not reported back yet."""
        return bool(self._stops)

    def submit(self, fn: Task) -> int:
        """Start ``fn(progress, cancelled)``; returns its generation. Supersedes older requests if so set."""
        if self._supersede:
            self.cancel()
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
        self._pool.start(_Job(gen, fn, stop, sig, self._describe_error))
        self.started.emit(gen)
        return gen

    def cancel(self) -> None:
        """Ask every running or queued request to stop."""
        for stop in self._stops.values():
            stop.set()

    def wait(self, msecs: int = 5000) -> bool:
        """Block until every request has ended on its thread (shutdown and tests); False on timeout."""
        return self._pool.waitForDone(int(msecs))

    def shutdown(self, msecs: int = 10000) -> bool:
        """Cancel (superseding worker only: autosave requests are finished) and wait for the threads."""
        if self._supersede:
            self.cancel()
        return self._pool.waitForDone(int(msecs))

    # -- GUI thread --------------------------------------------------------
    def _stale(self, gen: int) -> bool:
        return self._supersede and gen != self._generation

    def _drop(self, gen: int) -> None:
        self.dropped.append(gen)
        self.dropped_total += 1
        log.debug("dropped stale outcome of request %d (newest is %d)", gen, self._generation)

    def _forget(self, gen: int) -> None:
        self._stops.pop(gen, None)
        sig = self._signals.pop(gen, None)
        if sig is not None:
            sig.deleteLater()

    def _on_progress(self, gen: int, fraction: float) -> None:
        if not self._stale(gen):
            self.progress.emit(fraction)

    def _on_done(self, gen: int, result) -> None:
        self._forget(gen)
        if self._stale(gen):
            self._drop(gen)
            return
        self.shown_generation = max(self.shown_generation, gen)
        self.finished.emit(gen, result)

    def _on_error(self, gen: int, message: str) -> None:
        self._forget(gen)
        if self._stale(gen):
            self._drop(gen)
            return
        self.failed.emit(gen, message)

    def _on_cancelled(self, gen: int) -> None:
        self._forget(gen)
        if self._stale(gen):
            self._drop(gen)
            return
        self.cancelled.emit(gen)


class MapRunner(Worker):
    """The envelope map's worker: ``request(project)`` evaluates the whole envelope, newest request wins."""

    def __init__(self, parent=None, evaluate=None, threads: int = 2) -> None:
        super().__init__(parent, threads=threads, supersede=True)
        self._evaluate = evaluate

    def request(self, project) -> int:
        """Start evaluating ``project``; cancels every older request. Returns the new generation."""
        evaluate = self._evaluate if self._evaluate is not None else _evaluate_module.evaluate_project

        def task(progress, cancelled):
            return evaluate(project, progress=progress, cancelled=cancelled)

        return self.submit(task)


class Debouncer(QObject):
    """Calls ``slot()`` once, ``ms`` milliseconds after the last of a burst of ``trigger()`` calls."""

    def __init__(self, ms: int, slot: Callable[[], object], parent=None) -> None:
        super().__init__(parent)
        self._slot = slot
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(int(ms))
        self._timer.timeout.connect(self._fire)

    @property
    def pending(self) -> bool:
        return self._timer.isActive()

    def trigger(self) -> None:
        """(Re)start the quiet interval."""
        self._timer.start()

    def cancel(self) -> None:
        """Forget a pending call."""
        self._timer.stop()

    def flush(self):
        """Make the pending call now (if any); returns its value, or None."""
        if not self._timer.isActive():
            return None
        self._timer.stop()
        return self._slot()

    def _fire(self) -> None:
        self._slot()


__all__ = ["Debouncer", "MapRunner", "Worker", "one_line_error"]
