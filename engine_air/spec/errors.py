"""The error types raised for unusable project files and failed saves.

``ProjectError`` is the one type raised for any project input that breaks a
rule (missing key, wrong type, value out of range, file too large, bad TOML).
It carries the file, the dotted key path, the offending value and a plain
statement of what is allowed, and prints as a single line:

    study.toml: inlet.throat_area_m2 = 1.5: must not exceed capture_area_m2 = 1.2 m^2

``ProjectSaveError`` is raised when a project cannot be written to disk; the
file that was there before is left as it was.
"""

from __future__ import annotations

import os

_MAX_VALUE_REPR = 120  # characters of repr(value) shown in the one-line message


def _short_repr(value: object) -> str:
    """``repr(value)`` on one line, cut to a readable length."""
    text = repr(value).replace("\n", "\\n").replace("\r", "\\r")
    if len(text) > _MAX_VALUE_REPR:
        text = text[: _MAX_VALUE_REPR - 3] + "..."
    return text


class ProjectError(ValueError):
    """A project file or project data breaks a rule.

    Attributes
    ----------
    path : str or None
        The file the data came from; None for data not read from a file.
    key : str or None
        Dotted key path of the offending entry, e.g. ``inlet.throat_area_m2``,
        ``engine.rating[1].theta`` or ``case[0].rating``; ``"(file)"`` for a
        problem with the file as a whole.
    value : object or None
        The offending value as found (None when the key is missing or there is
        no single value to show).
    allowed : str or None
        What is allowed, in plain words.
    """

    def __init__(
        self,
        path: str | os.PathLike | None,
        key: str | None,
        value: object = None,
        allowed: str | None = None,
    ) -> None:
        self.path = None if path is None else os.fspath(path)
        self.key = key
        self.value = value
        self.allowed = allowed
        super().__init__(self._message())

    def _message(self) -> str:
        head = ""
        if self.key is not None:
            head = self.key
            if self.value is not None:
                head += f" = {_short_repr(self.value)}"
        elif self.value is not None:
            head = _short_repr(self.value)
        parts = [p for p in (self.path, head, self.allowed) if p]
        return ": ".join(parts) if parts else "invalid project"

    def __str__(self) -> str:
        return self._message()

    def __reduce__(self):
        return (type(self), (self.path, self.key, self.value, self.allowed))


class ProjectSaveError(OSError):
    """A project could not be written to ``path``; any earlier file is intact.

    Attributes
    ----------
    path : str
        The file that was to be written.
    reason : str
        What went wrong, e.g. the operating system's message.
    """

    def __init__(self, path: str | os.PathLike, reason: str, errno: int | None = None) -> None:
        self.path = os.fspath(path)
        self.reason = " ".join(str(reason).split())  # one line
        super().__init__(errno, self.reason)
        self.filename = self.path

    def __str__(self) -> str:
        return f"could not save the project to {self.path}: {self.reason} (the previous file, if any, is unchanged)"

    def __reduce__(self):
        return (type(self), (self.path, self.reason, self.errno))
