"""The running window's recovery slot: autosave and removal, in order, on the program's worker."""

from __future__ import annotations

import logging
from pathlib import Path

from PySide6.QtCore import QObject, Signal

from ..worker import Worker

from .found import Recovered
from .slot import Slot, new_key, reason_of, recovery_dir

log = logging.getLogger(__name__)


class RecoveryStore(QObject):
    """The running window's recovery slot; every file operation runs in order on one background thread.

    The thread is the program's one worker pattern (``app.worker.Worker``) in its ordered mode: every
    operation runs to its end, one after another, and each outcome is reported. ``write(project,
    original_path)`` and ``remove()`` return at once; ``reported(action, ok, message)`` (action "write"
    or "remove") arrives on the GUI thread when each has been done.
    """

    reported = Signal(str, bool, str)

    def __init__(self, folder: str | Path | None = None, parent=None) -> None:
        super().__init__(parent)
        self.folder = Path(folder) if folder is not None else recovery_dir()
        self._slot = Slot(self.folder, new_key())
        self._worker = Worker(self, threads=1, supersede=False, describe_error=reason_of)
        self._worker.finished.connect(lambda gen, _r: self._report(gen, True, ""))
        self._worker.failed.connect(lambda gen, message: self._report(gen, False, message))
        self._actions: dict[int, str] = {}
        self._has_files = False  # a write was asked for (or a slot adopted) and not removed since
        self._closed = False

    @property
    def key(self) -> str:
        return self._slot.key

    @property
    def project_file(self) -> Path:
        return self._slot.project_file

    @property
    def sidecar_file(self) -> Path:
        return self._slot.sidecar_file

    @property
    def has_files(self) -> bool:
        return self._has_files

    @property
    def closed(self) -> bool:
        return self._closed

    def _report(self, gen: int, ok: bool, message: str) -> None:  # GUI thread
        action = self._actions.pop(gen, "")
        if not ok:
            log.debug("recovery %s failed: %s", action, message)  # the window logs it once and shows it
        if action in ("write", "remove"):
            self.reported.emit(action, ok, message)

    def _submit(self, action: str, job, *args) -> int | None:
        if self._closed:
            return None
        gen = self._worker.submit(lambda _progress, _cancelled: job(*args))
        self._actions[gen] = action
        return gen

    def write(self, project, original_path=None):
        """Autosave ``project`` (frozen, so safe to hand to the thread) into this window's slot."""
        if self._closed:
            return None
        self._has_files = True
        return self._submit("write", self._slot.write, project, original_path)

    def remove(self):
        """Delete this window's recovery files (after a clean save, Discard, or a clean close)."""
        if self._closed or not self._has_files:
            return None
        self._has_files = False
        return self._submit("remove", self._slot.remove_files)

    def adopt(self, entry: Recovered) -> None:
        """Make a restored entry's files (and lock) this window's slot; the window's old slot is dropped."""
        old = self._slot
        if self._has_files:
            self._submit("remove", old.remove_files)
        self._submit("release", old.release)
        self._slot = entry.slot
        self._has_files = True

    def wait(self, timeout: float = 10.0) -> bool:
        """Block until every operation asked for so far is done (tests, shutdown)."""
        if self._closed:
            return True
        return self._worker.wait(int(timeout * 1000))

    def close(self, remove: bool = True, timeout: float = 10.0) -> bool:
        """End the session: remove the files (clean close), let go of the lock, stop the thread."""
        if self._closed:
            return True
        if remove:
            self.remove()
        self._submit("release", self._slot.release)
        done = self.wait(timeout)
        self._closed = True
        return done
