"""Finding what a session that ended without a clean close left behind in the recovery folder."""

from __future__ import annotations

import datetime as _dt
import json
import logging
import os
from dataclasses import dataclass
from pathlib import Path

from PySide6.QtCore import QLockFile

from engine_air.project.errors import ProjectError
from engine_air.project.load import loads_project, with_characteristics
from engine_air.project.schema import MAX_FILE_BYTES

from .slot import MAX_SIDECAR_BYTES, Slot, reason_of, read_regular, recovery_dir, regular_or_missing

log = logging.getLogger(__name__)


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
        """The recovered project, checked by the loader's rules; raises ``ProjectError``.

        Read defensively (``read_regular``): a link, pipe or device in the slot's place, or a file over the
        project-file size limit, is a ``ProjectError``, never a hang or an unbounded read.
        """
        path = self.slot.project_file
        try:
            raw = read_regular(path, MAX_FILE_BYTES)
        except OSError as exc:
            raise ProjectError(path, "(file)", None, f"cannot be read: {reason_of(exc)}") from None
        try:
            text = raw.decode("utf-8-sig")
        except UnicodeDecodeError:
            raise ProjectError(path, "(file)", None, "is not UTF-8 text") from None
        return with_characteristics(loads_project(text, path), path)  # its table, named relative to the copy

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
    """The sidecar's fields; {} for a missing, unreadable, oversized or odd one (a link, a pipe, a device)."""
    try:
        data = json.loads(read_regular(path, MAX_SIDECAR_BYTES).decode("utf-8"))
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


def _candidates(folder: Path, notes: list) -> list[Path]:
    """The folder's ``*.toml`` slots that are regular files (``lstat``); anything else is noted and skipped."""
    found = []
    with os.scandir(folder) as it:
        for entry in it:
            if not entry.name.endswith(".toml") or entry.name.startswith("."):
                continue
            if entry.is_file(follow_symlinks=False):
                found.append(Path(entry.path))
            else:
                notes.append(f"skipped {entry.path}: not a plain file (a link, pipe, device or folder)")
    return sorted(found)


def find_recovered(folder: str | Path | None = None, exclude: set[str] | frozenset = frozenset(),
                   notes: list | None = None) -> list[Recovered]:
    """Unsaved work of sessions that ended without a clean close, newest first.

    Each returned entry's lock is now held by this process (so a second program starting at the same
    time does not offer it too); call ``discard()`` or ``release()`` on each. Never raises, never hangs: only
    regular files are read (a link, pipe or device in a slot's place is skipped), each read bounded by its
    size limit. What was skipped is appended to ``notes`` (and logged).
    """
    notes = [] if notes is None else notes
    folder = Path(folder) if folder is not None else recovery_dir()
    try:
        candidates = _candidates(folder, notes)
    except FileNotFoundError:
        return []
    except OSError as exc:
        log.warning("cannot list the recovery folder %s: %s", folder, exc)
        return []
    found = []
    for path in candidates:
        key = path.stem
        if key in exclude:
            continue
        slot = Slot(folder, key)
        odd = [p for p in (slot.lock_file, slot.sidecar_file) if not regular_or_missing(p)]
        if odd:  # a pipe as the lock would hang the lock check; a link as the sidecar could be written through
            notes.append(f"skipped recovery slot {key}: {odd[0]} is not a plain file")
            continue
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
            notes.append(f"skipped recovery slot {key}: it cannot be read")
            slot.release()
    for note in notes:
        log.warning("recovery: %s", note)
    far_past = _dt.datetime.min.replace(tzinfo=_dt.timezone.utc)
    found.sort(key=lambda e: e.saved_at or far_past, reverse=True)
    return found
