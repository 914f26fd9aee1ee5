"""The recovery folder and one session's slot in it: the autosaved project, its sidecar and its lock."""

from __future__ import annotations

import datetime as _dt
import errno
import json
import os
import stat
import tempfile
import uuid
from dataclasses import dataclass, field
from pathlib import Path

from PySide6.QtCore import QLockFile, QStandardPaths

from engine_air.project.atomic import write_bytes_atomic
from engine_air.project.errors import ProjectSaveError
from engine_air.project.save import dumps_project, table_path_from


ENV_DIR = "ENGINE_AIR_RECOVERY_DIR"
AUTOSAVE_MS = 60_000
SIDECAR_FORMAT = 1
MAX_SIDECAR_BYTES = 65_536


def recovery_dir() -> Path:
    """``$ENGINE_AIR_RECOVERY_DIR``, else the per-user application data folder / "recovery"."""
    env = os.environ.get(ENV_DIR)
    if env:
        return Path(env)
    base = QStandardPaths.writableLocation(QStandardPaths.AppDataLocation)
    if not base:
        base = str(Path(tempfile.gettempdir()) / "engine-air-desk")
    return Path(base) / "recovery"


def new_key() -> str:
    return f"{_dt.datetime.now():%Y%m%d-%H%M%S}-{os.getpid()}-{uuid.uuid4().hex[:8]}"


def _now() -> _dt.datetime:
    return _dt.datetime.now().astimezone()


_NOFOLLOW = getattr(os, "O_NOFOLLOW", 0)
_NONBLOCK = getattr(os, "O_NONBLOCK", 0)


class NotRegularError(OSError):
    """A file in the recovery folder that is not a plain file (a link, a pipe, a device, a folder)."""


def regular_or_missing(path: Path) -> bool:
    """True when nothing is at ``path`` or a regular file is (``lstat``: a link is not followed)."""
    try:
        return stat.S_ISREG(os.lstat(path).st_mode)
    except FileNotFoundError:
        return True
    except OSError:
        return False


def read_regular(path: Path, limit: int) -> bytes:
    """At most ``limit`` bytes of the regular file at ``path``, read defensively.

    Opened without following a link (``O_NOFOLLOW``) and without waiting for a writer (``O_NONBLOCK``: a pipe
    never hangs the program); anything but a regular file raises ``NotRegularError``; more than ``limit`` bytes
    (counted by reading ``limit + 1``, whatever the size on disk says) raise ``OSError(EFBIG)``.
    """
    try:
        fd = os.open(path, os.O_RDONLY | _NOFOLLOW | _NONBLOCK)
    except OSError as exc:
        if exc.errno == errno.ELOOP:
            raise NotRegularError(errno.ELOOP, "is a link, not a plain file", str(path)) from None
        raise
    with os.fdopen(fd, "rb") as fh:
        if not stat.S_ISREG(os.fstat(fd).st_mode):
            raise NotRegularError(errno.EINVAL, "is not a plain file", str(path))
        data = fh.read(limit + 1)
    if len(data) > limit:
        raise OSError(errno.EFBIG, f"is larger than {limit} bytes", str(path))
    return data


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
        """The project, then its sidecar, each atomically (temporary file + rename) and never through a link:
        a link planted at a slot's name is replaced, the file it points at never written."""
        self.folder.mkdir(parents=True, exist_ok=True)
        self.acquire()
        try:
            # a characteristics table named relative to this copy, so that it is found again wherever the
            # project's own file lives (method §17)
            text = dumps_project(table_path_from(project, self.project_file))
            write_bytes_atomic(self.project_file, text.encode("utf-8"), follow_links=False)
        except OSError as exc:
            raise ProjectSaveError(self.project_file, exc.strerror or str(exc), exc.errno) from exc
        meta = {
            "format": SIDECAR_FORMAT,
            "original_path": None if original_path is None else str(Path(original_path).resolve()),
            "saved_at": _now().isoformat(timespec="seconds"),
            "title": project.title,
            "pid": os.getpid(),
        }
        write_text_atomic(self.sidecar_file, json.dumps(meta, indent=1) + "\n")

    def remove_files(self) -> None:
        for path in (self.project_file, self.sidecar_file):
            try:
                path.unlink()
            except (FileNotFoundError, NotADirectoryError):  # never written (or no folder): nothing to remove
                pass


def write_text_atomic(path: Path, text: str) -> None:
    write_bytes_atomic(path, text.encode("utf-8"), follow_links=False)
