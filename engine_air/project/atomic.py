"""Atomic file writes: a crash or a full disk never leaves half a file.

The bytes go to a temporary file beside the target, are flushed to disk, and the temporary file is then
renamed over the target, so the previous file survives a failed write. ``write_bytes_atomic`` takes the
bytes; ``atomic_path`` hands a temporary file name to a writer that wants a name (``engine_air.outputs.writer``
builds every output file on it).

A target that is a stream rather than a file (``stream_target``: a character device such as ``/dev/null`` or a
terminal, a named pipe, ``/dev/stdout`` on either) is written straight into: renaming a file over it would put a plain file
in place of the device (as root, in place of ``/dev/null`` itself). A block device or a socket is refused.
"""

from __future__ import annotations

import contextlib
import errno
import os
import stat
import tempfile
from typing import Iterator


def _default_mode() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


_NEW_FILE_MODE = _default_mode()


def stream_target(path: str | os.PathLike) -> bool:
    """True when ``path`` (links followed) is a stream to write straight into: a character device (``/dev/null``,
    a terminal, ``/dev/stdout`` on one) or a named pipe (``/dev/stdout`` into a pipe); False for a regular file or
    a name not yet taken. ``OSError`` for a block device or a socket: never written."""
    text = os.fspath(path)
    try:
        mode = os.stat(text).st_mode
    except OSError:
        return False
    if stat.S_ISBLK(mode) or stat.S_ISSOCK(mode):
        raise OSError(errno.EINVAL, "is a device or a socket, not a file; give a file name", text)
    if stat.S_ISDIR(mode):
        return False  # the callers refuse a folder in their own words
    return stat.S_ISCHR(mode) or stat.S_ISFIFO(mode)


def _target(path: str | os.PathLike, follow_links: bool) -> str:
    """The file the bytes end up in: links followed (the link is kept, its target replaced), or, with
    ``follow_links=False``, the name itself (a link there is replaced by the new file, its target untouched)."""
    text = os.fspath(path)
    return os.path.realpath(text) if follow_links else os.path.abspath(text)


def _mode_of(target: str, follow_links: bool) -> int:
    try:
        st = os.stat(target) if follow_links else os.lstat(target)
    except FileNotFoundError:
        return _NEW_FILE_MODE
    return stat.S_IMODE(st.st_mode) if stat.S_ISREG(st.st_mode) else _NEW_FILE_MODE


def _temporary(folder: str, target: str):
    """A new, exclusively created temporary file beside ``target`` (its name keeps the target's suffix)."""
    base = os.path.basename(target)
    suffix = os.path.splitext(base)[1][:16]
    return tempfile.NamedTemporaryFile("wb", dir=folder, prefix="." + base[:60] + ".", suffix=".tmp" + suffix,
                                       delete=False)


def _unlink_quietly(name: str | None) -> None:
    if name is not None:
        try:
            os.unlink(name)
        except OSError:
            pass


def write_bytes_atomic(path: str | os.PathLike, data: bytes, *, follow_links: bool = True) -> None:
    """Write ``data`` to ``path`` so that a crash never leaves half a file.

    The bytes go to a temporary file in the target's folder, are flushed and
    fsync'ed, then renamed over the target (``os.replace``); the target's
    permissions are kept. A symbolic link at ``path`` is followed (its target is
    replaced, the link kept) unless ``follow_links=False`` (the link itself is
    replaced and its target never written). On any ``OSError`` the temporary file
    is removed, the previous file is left as it was, and the ``OSError`` is raised.
    """
    if (follow_links or not os.path.islink(path)) and stream_target(path):
        with open(path, "wb") as f:
            f.write(data)
        return
    target = _target(path, follow_links)
    folder = os.path.dirname(target)
    tmp_name = None
    try:
        mode = _mode_of(target, follow_links)
        with _temporary(folder, target) as f:
            tmp_name = f.name
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
        os.chmod(tmp_name, mode)
        os.replace(tmp_name, target)
        tmp_name = None
    finally:
        _unlink_quietly(tmp_name)
    _sync_folder(folder)


@contextlib.contextmanager
def atomic_path(path: str | os.PathLike, *, follow_links: bool = True) -> Iterator[str]:
    """A temporary file name beside ``path`` for a writer that wants a file name (pyarrow, matplotlib, Qt).

    ``with atomic_path("out.csv") as tmp: writer(tmp)``: the writer fills ``tmp`` (an empty file, created
    exclusively in the target's folder, its name ending in the target's suffix); when the block ends without an
    exception the file is fsync'ed and renamed over ``path`` (``os.replace``), so the target is either the old
    file or the whole new one. On an exception (a full disk, a failed render) the temporary file is removed, the
    old file is left as it was, and the exception goes on. Links are treated as in ``write_bytes_atomic``. A
    stream (``stream_target``) is handed over as it is, to be written straight into.
    """
    if (follow_links or not os.path.islink(path)) and stream_target(path):
        yield os.fspath(path)
        return
    target = _target(path, follow_links)
    folder = os.path.dirname(target)
    tmp_name = None
    try:
        mode = _mode_of(target, follow_links)
        with _temporary(folder, target) as f:
            tmp_name = f.name
        yield tmp_name
        fd = os.open(tmp_name, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0))
        try:
            os.fsync(fd)
        finally:
            os.close(fd)
        os.chmod(tmp_name, mode)
        os.replace(tmp_name, target)
        tmp_name = None
    finally:
        _unlink_quietly(tmp_name)
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
