"""What a project file on disk was when it was opened or last saved, so a save never overwrites someone else's.

``file_fingerprint(path)`` records the file's size, modification time and SHA-256 (links followed; None for a
missing file). ``save_project(..., expected=fingerprint)`` compares the file on disk with it first and raises
``FileChangedError`` when another program (or a second window) changed it since, unless ``overwrite=True``.

Two fingerprints are the same file when size and hash agree: a file only touched (new time, same bytes) holds
nothing that a save could lose. The time is kept to tell the user when the file changed.
"""

from __future__ import annotations

import datetime as _dt
import errno
import hashlib
import os
import stat
from dataclasses import dataclass

from engine_air.project.errors import ProjectSaveError

_CHUNK = 1 << 16
MAX_HASHED_BYTES = 64 << 20
"""A file larger than this is compared by size and time only (no project file comes near it)."""


@dataclass(frozen=True)
class Fingerprint:
    """A regular file as it was: size in bytes, modification time (ns since the epoch) and SHA-256 (hex)."""

    size: int
    mtime_ns: int
    sha256: str

    def same_file(self, other: "Fingerprint | None") -> bool:
        if other is None or other.size != self.size:
            return False
        if not self.sha256 or not other.sha256:
            return other.mtime_ns == self.mtime_ns
        return other.sha256 == self.sha256

    @property
    def modified(self) -> _dt.datetime:
        return _dt.datetime.fromtimestamp(self.mtime_ns / 1e9).astimezone()


def file_fingerprint(path: str | os.PathLike) -> Fingerprint | None:
    """The fingerprint of the file at ``path`` (links followed); None when there is no file.

    A path that is not a regular file (a folder, a device, a pipe) gets a fingerprint without a hash and is
    never read. Raises ``OSError`` when the file exists but cannot be read.
    """
    p = os.fspath(path)
    try:
        st = os.stat(p)
    except (FileNotFoundError, NotADirectoryError):
        return None
    if not stat.S_ISREG(st.st_mode) or st.st_size > MAX_HASHED_BYTES:
        return Fingerprint(st.st_size, st.st_mtime_ns, "")
    digest = hashlib.sha256()
    fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    with os.fdopen(fd, "rb") as fh:
        left = MAX_HASHED_BYTES + 1
        while left > 0:
            chunk = fh.read(min(_CHUNK, left))
            if not chunk:
                break
            digest.update(chunk)
            left -= len(chunk)
    return Fingerprint(st.st_size, st.st_mtime_ns, digest.hexdigest())


def bytes_fingerprint(path: str | os.PathLike, data: bytes) -> Fingerprint | None:
    """The fingerprint of ``path`` just written with ``data``: its size and time from disk, the hash of ``data``."""
    try:
        st = os.stat(os.fspath(path))
    except OSError:
        return None
    return Fingerprint(st.st_size, st.st_mtime_ns, hashlib.sha256(data).hexdigest())


class FileChangedError(ProjectSaveError):
    """The file was changed on disk since it was opened or last saved; nothing was written.

    ``expected`` is the fingerprint recorded then, ``found`` the one on disk now
    (None: the file is gone).
    """

    def __init__(self, path, expected: Fingerprint, found: Fingerprint | None) -> None:
        if found is None:
            reason = "the file was deleted or moved since it was opened or last saved"
        else:
            reason = (f"the file was changed on disk since it was opened or last saved (now "
                      f"{found.size} bytes, modified {found.modified:%Y-%m-%d %H:%M:%S})")
        super().__init__(path, reason + "; it was not overwritten: reload it, save under another name, or save "
                                        "again with overwrite", errno.EEXIST)
        self.expected = expected
        self.found = found

    def __reduce__(self):
        return (type(self), (self.path, self.expected, self.found))


def check_unchanged(path: str | os.PathLike, expected: Fingerprint) -> None:
    """Raise ``FileChangedError`` unless the file at ``path`` is still the one ``expected`` describes."""
    try:
        found = file_fingerprint(path)
    except OSError as exc:
        raise ProjectSaveError(os.fspath(path), f"cannot read the file on disk to check it: "
                                                f"{exc.strerror or exc}", exc.errno) from exc
    if not expected.same_file(found):
        raise FileChangedError(path, expected, found)


__all__ = ["FileChangedError", "Fingerprint", "MAX_HASHED_BYTES", "bytes_fingerprint", "check_unchanged",
           "file_fingerprint"]
