"""Text that is safe to print on a terminal: control and bidirectional characters escaped.

Names that come from files or the command line (project titles, case names,
unknown keys in warnings, paths) can hold escape sequences that clear the
screen or move the cursor, line breaks that fake a verdict line, or
bidirectional overrides that make text read differently from what it is.
``safe_text`` shows each such character as a visible escape, so that what is
printed is one line that reads as the bytes it stands for:

- C0 and C1 controls and DEL -> ``\\xNN`` (tab, line feed and carriage return
  included: the result is always one line);
- bidirectional marks, embeddings, overrides and isolates, the line and
  paragraph separators, and the zero-width characters -> ``\\uNNNN``;
- a byte that was not UTF-8 in a file name (kept by Python as a lone surrogate,
  ``surrogateescape``) -> ``\\xNN`` of that byte;
- a backslash itself is kept as is.

>>> safe_text("ISA\\x1b[2J+15")
'ISA\\\\x1b[2J+15'
>>> safe_text("a\\u202eb")
'a\\\\u202eb'
>>> safe_text("line\\nVERDICT: all hold")
'line\\\\x0aVERDICT: all hold'
"""

from __future__ import annotations

import os
import re

_BIDI_AND_INVISIBLE = (
    "\u061c\u200b\u200c\u200d\u200e\u200f\u2028\u2029\u202a\u202b\u202c\u202d\u202e"
    "\u2060\u2066\u2067\u2068\u2069\ufeff"
)
_UNSAFE = re.compile("[\x00-\x1f\x7f-\x9f" + _BIDI_AND_INVISIBLE + "\udc80-\udcff\ud800-\udfff]")


def _escape(match: re.Match) -> str:
    ch = match.group(0)
    code = ord(ch)
    if 0xDC80 <= code <= 0xDCFF:  # a byte that was not UTF-8 (surrogateescape)
        return f"\\x{code - 0xDC00:02x}"
    if code <= 0xFF:
        return f"\\x{code:02x}"
    return f"\\u{code:04x}"


def safe_text(text) -> str:
    """``text`` (any object, via ``str``) with control, bidirectional and invisible characters escaped."""
    return _UNSAFE.sub(_escape, str(text))


def safe_path(path) -> str:
    """A path (str, bytes or path-like) for a one-line message, every unsafe character escaped."""
    try:
        text = os.fsdecode(os.fspath(path))
    except TypeError:
        text = str(path)
    return safe_text(text)


def is_utf8_path(path) -> bool:
    """True when the path's text can be written as UTF-8 (no byte of another encoding in it)."""
    try:
        os.fsdecode(os.fspath(path)).encode("utf-8")
    except (UnicodeError, TypeError):
        return False
    return True


__all__ = ["is_utf8_path", "safe_path", "safe_text"]
