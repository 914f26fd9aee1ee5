"""Atomic file writes: a crash or a full disk never leaves half a file.

The bytes go to a temporary file beside the target, are flushed to disk, and the temporary file is then
renamed over the target, so the previous file survives a failed write.
"""

from __future__ import annotations

import os
import stat
import tempfile


def _default_mode() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


_NEW_FILE_MODE = _default_mode()


def write_bytes_atomic(path: str | os.PathLike, data: bytes) -> None:
    """Write ``data`` to ``path`` so that a crash never leaves half a file.

    The bytes go to a temporary file in the target's folder, are flushed and
    fsync'ed, then renamed over the target (``os.replace``); the target's
    permissions are kept. A symbolic link at ``path`` is followed. On any
    ``OSError`` the temporary file is removed, the previous file is left as it
    was, and the ``OSError`` is raised.
    """
    target = os.path.realpath(os.fspath(path))
    folder = os.path.dirname(target)
    tmp_name = None
    try:
        try:
            mode = stat.S_IMODE(os.stat(target).st_mode)
        except FileNotFoundError:
            mode = _NEW_FILE_MODE
        with tempfile.NamedTemporaryFile("wb", dir=folder, prefix="." + os.path.basename(target) + ".",
                                         suffix=".tmp", delete=False) as f:
            tmp_name = f.name
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
        os.chmod(tmp_name, mode)
        os.replace(tmp_name, target)
        tmp_name = None
    finally:
        if tmp_name is not None:
            try:
                os.unlink(tmp_name)
            except OSError:
                pass
    _sync_folder(folder)


def is_read_only(path: str | os.PathLike) -> bool:
    """True when a file exists at ``path`` (links followed) and is read-only: no owner write permission, or
    this process may not write it. A missing file is not read-only."""
    target = os.path.realpath(os.fspath(path))
    try:
        mode = os.stat(target).st_mode
    except OSError:
        return False
    if not stat.S_ISREG(mode):
        return False
    return not (mode & stat.S_IWUSR) or not os.access(target, os.W_OK)


def _sync_folder(folder: str) -> None:
    """Best effort: make the rename itself durable (POSIX only)."""
    if not hasattr(os, "O_DIRECTORY"):
        return
    try:
        fd = os.open(folder, os.O_RDONLY | os.O_DIRECTORY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
