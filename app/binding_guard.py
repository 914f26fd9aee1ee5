"""Guard against a Qt-binding reference-count bug that would crash the program after a while.

PySide6 6.12.0 on Python 3.11 and older drops one reference to ``None`` each
time a wrapped Qt function returns nothing (``setText``, ``setData``, ...), and
some paths do the same to ``True``/``False``. From Python 3.12 on these
objects are immortal and the loss is harmless; before 3.12 the count of
``None`` (a few thousand at start-up) reaches zero after some seconds of use
and the interpreter aborts ("deallocating None"). The guard gives ``None``,
``True`` and ``False`` the same very large count Python 3.12 gives them, so it
can never reach zero. It does nothing on Python 3.12+ or on other binding versions.
"""

from __future__ import annotations

import ctypes
import sys

_TOP_UP = 1 << 40


def _binding_version() -> tuple[int, ...]:
    try:
        import PySide6
    except ImportError:
        return ()
    parts = []
    for p in str(getattr(PySide6, "__version__", "0")).split(".")[:2]:
        digits = "".join(ch for ch in p if ch.isdigit())
        parts.append(int(digits or 0))
    return tuple(parts)


def needed() -> bool:
    return sys.version_info < (3, 12) and _binding_version() >= (6, 12)


def apply() -> bool:
    """Make the reference counts of None, True and False effectively infinite (affected binding only)."""
    if not needed() or sys.implementation.name != "cpython":
        return False
    for obj in (None, True, False):
        count = ctypes.c_ssize_t.from_address(id(obj))
        if count.value < _TOP_UP:
            count.value += _TOP_UP
    return True
