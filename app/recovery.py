"""Autosave of unsaved edits and recovery after a session that ended without a clean close.

The recovery folder is ``$ENGINE_AIR_RECOVERY_DIR`` if set, else ``QStandardPaths.AppDataLocation /
"recovery"``. Every window owns one *slot* there, named by a key unique to the session::

    <key>.toml   the project, written with ``engine_air.project.save_project`` (temporary file,
                 fsync, rename: a crash never leaves half a file)
    <key>.json   a small sidecar: the project's own file (or null if never saved), the time, the title
    <key>.lock   a ``QLockFile`` held while the window runs

The window writes its slot at intervals while it holds unsaved work, and removes the files on a clean
save, on Discard and on a clean close. Files that stay behind belong to a session that crashed or was
killed; their lock is no longer held by a running process, so at the next start ``find_recovered``
offers them back (``offer_recovery``: Restore / Discard / Later). The slot of another window that is
still running is never offered: its lock is held.

All writing and removing runs in order on one background thread (``RecoveryStore``), so a slow or
failing disk never holds up the window. The outcome comes back as ``RecoveryStore.reported(action,
ok, message)`` on the GUI thread; a failure becomes a note in the status bar, never a dialog.
"""

from __future__ import annotations

import concurrent.futures
import datetime as _dt
import json
import logging
import os
import tempfile
import uuid
from dataclasses import dataclass, field
from pathlib import Path

from PySide6.QtCore import QLockFile, QObject, QStandardPaths, Signal
from PySide6.QtWidgets import QMessageBox

from engine_air.project.errors import ProjectError, ProjectSaveError
from engine_air.project import load_project, save_project, write_bytes_atomic

log = logging.getLogger(__name__)

ENV_DIR = "ENGINE_AIR_RECOVERY_DIR"
AUTOSAVE_MS = 60_000
SIDECAR_FORMAT = 1
MAX_SIDECAR_BYTES = 65_536

RESTORE, DISCARD, LATER = "restore", "discard", "later"


def recovery_dir() -> Path:
    """``$ENGINE_AIR_RECOVERY_DIR``, else the per-user application data folder / "recovery"."""
    env = os.environ.get(ENV_DIR)
    if env:
        return Path(env)
    base = QStandardPaths.writableLocation(QStandardPaths.AppDataLocation)
    if not base:
        base = str(Path(tempfile.gettempdir()) / "engine-air-desk")
    return Path(base) / "recovery"


def _new_key() -> str:
    return f"{_dt.datetime.now():%Y%m%d-%H%M%S}-{os.getpid()}-{uuid.uuid4().hex[:8]}"


def _now() -> _dt.datetime:
    return _dt.datetime.now().astimezone()


def reason_of(exc: BaseException) -> str:
    """A short, one-line reason for a failed file operation."""
    if isinstance(exc, ProjectSaveError):
        text = exc.reason
    elif isinstance(exc, OSError):
        text = exc.strerror or str(exc)
        if exc.filename:
            text = f"{text}: {exc.filename}"
    else:
        text = f"{type(exc).__name__}: {exc}"
    return " ".join(str(text).split()) or type(exc).__name__


@dataclass
class Slot:
    """The files of one session in the recovery folder, and the lock that says the session is alive."""

    folder: Path
    key: str
    lock: QLockFile | None = field(default=None, repr=False)

    @property
    def project_file(self) -> Path:
        return self.folder / f"{self.key}.toml"

    @property
    def sidecar_file(self) -> Path:
        return self.folder / f"{self.key}.json"

    @property
    def lock_file(self) -> Path:
        return self.folder / f"{self.key}.lock"

    def acquire(self) -> bool:
        """Take the slot's lock (best effort: a folder where no lock can be made still gets the files)."""
        if self.lock is not None:
            return True
        lock = QLockFile(str(self.lock_file))
        lock.setStaleLockTime(0)  # stale only when the owning process is gone, however long it runs
        if lock.tryLock(0):
            self.lock = lock
            return True
        return False

    def release(self) -> None:
        if self.lock is not None:
            self.lock.unlock()
            self.lock = None

    def write(self, project, original_path) -> None:
        """The project (atomically, by ``save_project``), then its sidecar (atomically too)."""
        self.folder.mkdir(parents=True, exist_ok=True)
        self.acquire()
        save_project(project, self.project_file)
        meta = {
            "format": SIDECAR_FORMAT,
            "original_path": None if original_path is None else str(Path(original_path).resolve()),
            "saved_at": _now().isoformat(timespec="seconds"),
            "title": project.title,
            "pid": os.getpid(),
        }
        _write_text_atomic(self.sidecar_file, json.dumps(meta, indent=1) + "\n")

    def remove_files(self) -> None:
        for path in (self.project_file, self.sidecar_file):
            try:
                path.unlink()
            except (FileNotFoundError, NotADirectoryError):  # never written (or no folder): nothing to remove
                pass


def _write_text_atomic(path: Path, text: str) -> None:
    write_bytes_atomic(path, text.encode("utf-8"))


# -- finding what a crashed session left behind -------------------------------------------------------------

@dataclass
class Recovered:
    """Unsaved work left by a session that is no longer running; this process holds its lock."""

    slot: Slot
    original_path: Path | None
    saved_at: _dt.datetime | None
    title: str

    @property
    def key(self) -> str:
        return self.slot.key

    def load(self):
        """The recovered project, checked by the loader's rules; raises ``ProjectError``."""
        return load_project(self.slot.project_file)

    def original_changed_since(self) -> bool:
        """True if the project's own file was modified after this copy was autosaved."""
        if self.original_path is None or self.saved_at is None:
            return False
        try:
            mtime = _dt.datetime.fromtimestamp(self.original_path.stat().st_mtime).astimezone()
        except OSError:
            return False
        return mtime > self.saved_at + _dt.timedelta(seconds=1)

    def discard(self) -> None:
        """Delete the recovered copy (raises ``OSError`` if it cannot be deleted) and let go of it."""
        try:
            self.slot.remove_files()
        finally:
            self.slot.release()

    def release(self) -> None:
        """Keep the files for a later start ("Later")."""
        self.slot.release()


def _read_sidecar(path: Path) -> dict:
    try:
        if path.stat().st_size > MAX_SIDECAR_BYTES:
            return {}
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    return data if isinstance(data, dict) else {}


def _entry(slot: Slot) -> Recovered:
    meta = _read_sidecar(slot.sidecar_file)
    original = meta.get("original_path")
    original = Path(original) if isinstance(original, str) and original.strip() else None
    saved_at = None
    text = meta.get("saved_at")
    if isinstance(text, str):
        try:
            saved_at = _dt.datetime.fromisoformat(text)
            if saved_at.tzinfo is None:
                saved_at = saved_at.astimezone()
        except ValueError:
            saved_at = None
    if saved_at is None:
        try:
            saved_at = _dt.datetime.fromtimestamp(slot.project_file.stat().st_mtime).astimezone()
        except OSError:
            saved_at = None
    title = meta.get("title")
    return Recovered(slot=slot, original_path=original, saved_at=saved_at,
                     title=title if isinstance(title, str) else "")


def find_recovered(folder: str | Path | None = None, exclude: set[str] | frozenset = frozenset()) -> list[Recovered]:
    """Unsaved work of sessions that ended without a clean close, newest first.

    Each returned entry's lock is now held by this process (so a second program starting at the same
    time does not offer it too); call ``discard()`` or ``release()`` on each. Never raises.
    """
    folder = Path(folder) if folder is not None else recovery_dir()
    try:
        candidates = sorted(p for p in folder.glob("*.toml") if p.is_file())
    except OSError as exc:
        log.warning("cannot list the recovery folder %s: %s", folder, exc)
        return []
    found = []
    for path in candidates:
        key = path.stem
        if key in exclude or key.startswith("."):
            continue
        slot = Slot(folder, key)
        lock = QLockFile(str(slot.lock_file))
        lock.setStaleLockTime(0)
        if lock.tryLock(0):
            slot.lock = lock
        elif lock.error() == QLockFile.LockFailedError:
            continue  # the session that wrote it is still running
        # else: no lock can be made here (read-only folder): offer it all the same
        try:
            found.append(_entry(slot))
        except Exception:  # noqa: BLE001 - a strange file is skipped, never fatal
            log.exception("skipping recovery file %s", path)
            slot.release()
    far_past = _dt.datetime.min.replace(tzinfo=_dt.timezone.utc)
    found.sort(key=lambda e: e.saved_at or far_past, reverse=True)
    return found


# -- the window's own slot ---------------------------------------------------------------------------------

class RecoveryStore(QObject):
    """The running window's recovery slot; every file operation runs in order on one background thread.

    ``write(project, original_path)`` and ``remove()`` return at once. ``reported(action, ok, message)``
    (action "write" or "remove") arrives on the GUI thread when each has been done.
    """

    reported = Signal(str, bool, str)

    def __init__(self, folder: str | Path | None = None, parent=None) -> None:
        super().__init__(parent)
        self.folder = Path(folder) if folder is not None else recovery_dir()
        self._slot = Slot(self.folder, _new_key())
        self._executor = concurrent.futures.ThreadPoolExecutor(max_workers=1,
                                                               thread_name_prefix="engine-air-autosave")
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

    def _emit(self, action: str, ok: bool, message: str) -> None:
        try:
            self.reported.emit(action, ok, message)
        except RuntimeError:  # the window is gone already
            pass

    def _run(self, action: str, job, *args) -> None:  # background thread
        try:
            job(*args)
        except Exception as exc:  # noqa: BLE001 - a failed autosave is a note, never an error
            log.debug("recovery %s failed: %s", action, exc)  # the window logs it once and shows it
            self._emit(action, False, reason_of(exc))
        else:
            self._emit(action, True, "")

    def _submit(self, action: str, job, *args):
        if self._closed:
            return None
        try:
            return self._executor.submit(self._run, action, job, *args)
        except RuntimeError:  # interpreter shutting down
            return None

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
        future = self._submit("wait", lambda: None)
        if future is None:
            return True
        try:
            future.result(timeout)
        except concurrent.futures.TimeoutError:
            return False
        return True

    def close(self, remove: bool = True, timeout: float = 10.0) -> bool:
        """End the session: remove the files (clean close), let go of the lock, stop the thread."""
        if self._closed:
            return True
        if remove:
            self.remove()
        self._submit("release", self._slot.release)
        done = self.wait(timeout)
        self._closed = True
        self._executor.shutdown(wait=False)
        return done


# -- asking the user ---------------------------------------------------------------------------------------

def _when(entry: Recovered) -> str:
    return entry.saved_at.strftime("%Y-%m-%d %H:%M:%S") if entry.saved_at is not None else "unknown time"


def recovery_dialog(parent, entry: Recovered, error: str | None = None, index: int = 0,
                    count: int = 1) -> QMessageBox:
    """The question for one recovered project; buttons Restore (unless unreadable), Discard, Later."""
    box = QMessageBox(parent)
    box.setIcon(QMessageBox.Warning if error else QMessageBox.Question)
    box.setWindowTitle("Recover unsaved work")
    which = f" ({index + 1} of {count})" if count > 1 else ""
    box.setText(f"Unsaved work was found from a session that did not close normally{which}.")
    where = str(entry.original_path) if entry.original_path is not None else "never saved (untitled)"
    lines = [f"Project: {entry.title or '(no title)'}", f"File: {where}", f"Autosaved: {_when(entry)}", ""]
    if error:
        lines += [f"The recovered copy cannot be read: {error}", "",
                  "Discard deletes it; Later keeps it and asks again at the next start."]
    else:
        if entry.original_changed_since():
            lines += [f"Note: {entry.original_path.name} was changed after this copy was autosaved.", ""]
        lines += ["Restore opens it marked unsaved; Save writes it to the file above.",
                  "Discard deletes the recovered copy.",
                  "Later keeps it and asks again at the next start."]
    box.setInformativeText("\n".join(lines))
    restore = None
    if not error:
        restore = box.addButton("Restore", QMessageBox.AcceptRole)
    discard = box.addButton("Discard", QMessageBox.DestructiveRole)
    later = box.addButton("Later", QMessageBox.RejectRole)
    box.setDefaultButton(restore if restore is not None else later)
    box.setEscapeButton(later)
    box._choices = {RESTORE: restore, DISCARD: discard, LATER: later}  # noqa: SLF001 - for tests
    return box


def ask_recovery(parent, entry: Recovered, error: str | None = None, index: int = 0, count: int = 1) -> str:
    """Show ``recovery_dialog`` and return RESTORE, DISCARD or LATER (closing the box means Later)."""
    box = recovery_dialog(parent, entry, error, index, count)
    box.exec()
    clicked = box.clickedButton()
    for choice, button in box._choices.items():  # noqa: SLF001
        if button is not None and clicked is button:
            return choice
    return LATER


def offer_recovery(window, open_window=None) -> list[tuple[str, str]]:
    """Offer back every recovered project (newest first); returns [(key, choice)].

    The first restored project goes into ``window``; further ones into ``open_window()`` (a new
    window), if given, else they are kept for later. Never raises.
    """
    outcomes = []
    try:
        entries = find_recovered(window.recovery.folder, exclude={window.recovery.key})
    except Exception:  # noqa: BLE001
        log.exception("looking for recovery files failed")
        return outcomes
    target = window
    for k, entry in enumerate(entries):
        choice = LATER
        try:
            try:
                project, error = entry.load(), None
            except ProjectError as exc:
                project, error = None, str(exc)
            choice = ask_recovery(window, entry, error, k, len(entries))
            if choice == RESTORE and project is not None:
                if target is None:
                    target = open_window() if open_window is not None else None
                if target is None or not target.restore_recovered(entry, project):
                    choice = LATER
                    entry.release()
                else:
                    target = None
            elif choice == DISCARD:
                try:
                    entry.discard()
                except OSError as exc:
                    window.statusBar().showMessage(
                        f"Could not delete the recovered copy {entry.slot.project_file}: {reason_of(exc)}", 15000)
            else:
                choice = LATER
                entry.release()
        except Exception:  # noqa: BLE001 - never stop the program from starting
            log.exception("recovery of %s failed", entry.key)
            entry.release()
        outcomes.append((entry.key, choice))
    return outcomes
