"""The one output writer: every file the program writes goes through here.

Two promises, for tables (CSV, Parquet), pictures (PNG, SVG, PDF), texts, JSON, sweep and compare tables, the
program's exports and the review pack:

1. **An output is never an input.** ``check_not_input(path, inputs)`` resolves the output (links followed,
   hard links recognised) and raises ``OutputIsInputError`` when it is any input of the run: the project file(s)
   and whatever else a command reads (characteristics, rake files: a command passes the set of paths it reads).
   A folder output (the review pack) may not hold an input either. Commands call it for every output before any
   work; the writers call it again at the moment of writing.
2. **A failed write leaves no partial file.** ``output_path(path, inputs)`` hands the writer a temporary file
   beside the target (``engine_air.project.atomic.atomic_path``); it is renamed over the target only when the
   writer finished, so a full disk or a failed render leaves the old file exactly as it was and no partial file.
   ``staged_folder(folder, inputs)`` does the same for a folder: it is assembled in a temporary folder beside the
   target and moved into place whole.

Example::

    with output_path("map.csv", inputs={"study.toml"}) as tmp:
        pyarrow.csv.write_csv(table, tmp)
"""

from __future__ import annotations

import contextlib
import errno
import os
import secrets
import shutil
from typing import Iterable, Iterator

from engine_air.project.atomic import atomic_path, stream_target, write_bytes_atomic

Paths = Iterable["str | os.PathLike"]


class OutputIsInputError(ValueError):
    """An output path names an input of the run (after following links); nothing was written.

    Attributes: ``output`` (as given), ``input`` (the input it would overwrite, as given), ``option`` (the
    command-line option or export that named the output, if known).
    """

    def __init__(self, output, input_path, option: str | None = None, inside: bool = False) -> None:
        self.output = os.fspath(output)
        self.input = os.fspath(input_path)
        self.option = option
        self.inside = inside
        super().__init__(self._message())

    def _message(self) -> str:
        head = f"{self.option} {self.output}" if self.option else self.output
        if self.inside:
            what = f"the folder holds {self.input}, an input of this run; writing there could replace it"
        else:
            what = f"is the input {self.input} (links followed); writing it would overwrite the input"
        return f"{head}: {what}. Choose another output name; nothing was written"

    def __str__(self) -> str:
        return self._message()

    def __reduce__(self):
        return (type(self), (self.output, self.input, self.option, self.inside))


def resolved(path) -> str:
    """The absolute path with every link followed."""
    return os.path.realpath(os.fspath(path))


def _same(a: str, b: str) -> bool:
    if a == b:
        return True
    try:
        return os.path.samefile(a, b)  # hard links, bind mounts
    except OSError:
        return False


def check_not_input(path, inputs: Paths = (), *, option: str | None = None, folder: bool = False) -> str:
    """The resolved output ``path``; ``OutputIsInputError`` when it is one of ``inputs`` (links followed).

    With ``folder=True`` the output is a folder, refused also when an input lies inside it.
    """
    stream_target(path)  # a block device or a socket: OSError, before any work
    out = resolved(path)
    for given in inputs:
        if given is None:
            continue
        inp = resolved(given)
        if _same(out, inp):
            raise OutputIsInputError(path, given, option)
        if folder and (inp.startswith(out.rstrip(os.sep) + os.sep)):
            raise OutputIsInputError(path, given, option, inside=True)
    return out


def check_outputs(outputs: Iterable[tuple[str | None, object]], inputs: Paths = ()) -> None:
    """Every ``(option, path)`` output checked against the inputs; None paths skipped."""
    inputs = [p for p in inputs if p is not None]
    for option, path in outputs:
        if path is not None:
            check_not_input(path, inputs, option=option)


@contextlib.contextmanager
def output_path(path, inputs: Paths = ()) -> Iterator[str]:
    """A temporary file name for a writer that wants a name; renamed over ``path`` when the block succeeds.

    Refuses an input (``OutputIsInputError``) before anything is created. On any exception in the block the
    temporary file is removed and ``path`` is left as it was.
    """
    check_not_input(path, inputs)
    with atomic_path(path) as tmp:
        yield tmp


def write_output_bytes(path, data: bytes, inputs: Paths = ()) -> None:
    """``data`` into ``path``, whole or not at all; never over an input."""
    check_not_input(path, inputs)
    write_bytes_atomic(path, data)


def write_output_text(path, text: str, inputs: Paths = ()) -> None:
    """``text`` as UTF-8 into ``path``, whole or not at all; never over an input."""
    write_output_bytes(path, text.encode("utf-8"), inputs)


@contextlib.contextmanager
def staged_folder(folder, inputs: Paths = ()) -> Iterator[str]:
    """A temporary folder beside ``folder`` to assemble in; moved into place when the block succeeds.

    The old folder (if any) is renamed aside, the new one renamed into its place, then the old one removed; a
    failure in the block removes the temporary folder and leaves ``folder`` as it was. A link in place of
    ``folder`` is refused (``OSError``): the folder is replaced, never written through.
    """
    target = os.path.abspath(os.fspath(folder))
    check_not_input(target, inputs, folder=True)
    if os.path.islink(target):
        raise OSError(errno.ELOOP, "is a symbolic link; give the real folder", target)
    parent, name = os.path.split(target)
    if not os.path.isdir(parent):
        os.makedirs(parent)
    staging = os.path.join(parent, f".{name[:60]}.{secrets.token_hex(6)}.tmp")
    os.mkdir(staging)
    try:
        yield staging
        _swap_in(staging, target)
        staging = None
    finally:
        if staging is not None:
            shutil.rmtree(staging, ignore_errors=True)


def _swap_in(staging: str, target: str) -> None:
    """Put the finished ``staging`` folder at ``target``; the old folder goes only after the new one is there."""
    if not os.path.lexists(target):
        os.rename(staging, target)
        return
    if not os.path.isdir(target) or os.path.islink(target):
        raise OSError(errno.ENOTDIR, "exists and is not a folder", target)
    aside = f"{staging}.old"
    os.rename(target, aside)
    try:
        os.rename(staging, target)
    except OSError:
        os.rename(aside, target)  # put the old pack back
        raise
    shutil.rmtree(aside, ignore_errors=True)


__all__ = ["OutputIsInputError", "check_not_input", "check_outputs", "output_path", "resolved", "staged_folder",
           "write_output_bytes", "write_output_text"]
