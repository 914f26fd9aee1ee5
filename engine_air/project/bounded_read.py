"""Reading a user's file whole, bounded: a regular file only, at most a given size, never a hang.

``read_regular_file(path, max_bytes, kind, limit_text)`` is what the project loader and the rake-file reader
share. The size the file system reports is checked first and then not trusted: at most ``max_bytes + 1`` bytes
are read. The file is opened without blocking, so a pipe put where a file stood after the check reads as empty
instead of waiting for a writer that never comes (the window would freeze). Every refusal is a ``ProjectError``
naming the file (key ``"(file)"``) and what is allowed.
"""

from __future__ import annotations

import os
import stat

from engine_air.project.errors import ProjectError


def read_regular_file(path: str, max_bytes: int, kind: str, limit_text: str) -> bytes:
    """The bytes of the regular file ``path`` (a ``kind`` such as "project file"), at most ``max_bytes``.

    ``limit_text`` ends the message of a file too large ("project files may be at most 1048576 bytes (1 MiB)").

    >>> import tempfile
    >>> with tempfile.NamedTemporaryFile(delete=False) as f:
    ...     _ = f.write(b"abc")
    >>> read_regular_file(f.name, 10, "test file", "at most 10 bytes")
    b'abc'
    >>> try:
    ...     read_regular_file(f.name, 2, "test file", "at most 2 bytes")
    ... except ProjectError as exc:
    ...     print(exc.allowed)
    the file has 3 bytes; at most 2 bytes
    """
    try:
        info = os.stat(path)
        if stat.S_ISDIR(info.st_mode):
            raise ProjectError(path, "(file)", None, f"is a folder, not a {kind}")
        if not stat.S_ISREG(info.st_mode):
            raise ProjectError(path, "(file)", None, "is not a regular file")
        if info.st_size > max_bytes:
            raise ProjectError(path, "(file)", info.st_size, f"the file has {info.st_size} bytes; {limit_text}")
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
        with os.fdopen(fd, "rb") as f:
            raw = f.read(max_bytes + 1)
    except OSError as exc:
        raise ProjectError(path, "(file)", None, f"cannot be read: {exc.strerror or exc}") from exc
    if len(raw) > max_bytes:
        raise ProjectError(path, "(file)", None, f"the file has more than {max_bytes} bytes; {limit_text}")
    return raw


def utf8_text(path: str, raw: bytes, save_as: str = "UTF-8") -> str:
    """``raw`` decoded as UTF-8 (a byte-order mark dropped); else a ``ProjectError`` naming the first byte that is
    not and its line, and how to save the file (``save_as``).

    >>> utf8_text("f.toml", b"a = 1\\n")
    'a = 1\\n'
    >>> try:
    ...     utf8_text("f.toml", b"a = 1\\nb = '\\xe9'\\n")
    ... except ProjectError as exc:
    ...     print(exc.allowed)
    is not UTF-8 text: byte 0xe9 on line 2 cannot be decoded; save the file as UTF-8
    """
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise ProjectError(path, "(file)", None, f"is not UTF-8 text: byte 0x{raw[exc.start]:02x} on line {line} "
                                                 f"cannot be decoded; save the file as {save_as}") from exc


__all__ = ["read_regular_file", "utf8_text"]
