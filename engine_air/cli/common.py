"""What every command of ``engine-air`` shares: exit codes, the usage error, safe printing, option checks.

Everything a command prints that came from a file or the command line (titles,
case names, warnings, paths) goes through ``engine_air.outputs.safe_text``: control
and bidirectional characters are shown escaped and every message is one line.
"""

from __future__ import annotations

import math
import os
import sys

from engine_air.outputs.safe_text import is_utf8_path, safe_path, safe_text

EXIT_HOLDS, EXIT_FAILS, EXIT_UNUSABLE, EXIT_NOT_JUDGED = 0, 1, 2, 3

FT = 0.3048  # m per foot, exact


class UsageError(Exception):
    """Input that is unusable for a reason other than the project file's content."""


def quiet_stdout() -> None:
    """The reader of stdout has gone (``engine-air point ... | head``): send the rest of the output nowhere, so
    that neither this write nor the flush at exit reports a broken pipe; the command runs to its own exit code."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError, AttributeError):  # stdout is no real file (a test's capture): nothing to redirect
        pass


def out(text: str = "") -> None:
    """Print one line on stdout (the text is built by the command; names in it must be ``name()``-d). A reader
    that stopped reading (a closed pipe) ends the output quietly, as Unix tools do."""
    try:
        print(text, flush=True)
    except BrokenPipeError:
        quiet_stdout()


def err(text: str) -> None:
    """Print one line on stderr, every unsafe character escaped."""
    print(safe_text(text), file=sys.stderr)


def name(text) -> str:
    """A name from a file or the command line, safe to print."""
    return safe_text(text)


def path_text(path) -> str:
    """A path, safe to print on one line."""
    return safe_path(path)


def check_input_path(path, option: str = "project") -> None:
    """A path given on the command line must be text that UTF-8 can hold."""
    if not is_utf8_path(path):
        raise UsageError(f"{option} {safe_path(path)}: the file name is not valid UTF-8; rename the file "
                         "(or use a link with a UTF-8 name)")


def check_output_path(path, option: str, inputs=()) -> None:
    """Refuse, before any work, an output file that cannot be written: non-UTF-8 name, one of the run's
    ``inputs`` (links followed: ``engine_air.outputs.writer.check_not_input``), a folder, a missing or read-only
    parent folder."""
    check_input_path(path, option)
    check_not_inputs(path, option, inputs)
    text = os.fsdecode(os.fspath(path))
    if not text:
        raise UsageError(f"{option}: an empty file name")
    if os.path.isdir(text):
        raise UsageError(f"{option} {safe_path(text)}: is a folder, not a file")
    parent = os.path.dirname(os.path.abspath(text))
    if not os.path.isdir(parent):
        raise UsageError(f"{option} {safe_path(text)}: the folder {safe_path(parent)} does not exist")
    if not os.access(parent, os.W_OK) or (os.path.exists(text) and not os.access(text, os.W_OK)):
        raise UsageError(f"{option} {safe_path(text)}: cannot write there (permission denied)")


def with_tables(inputs, *projects) -> tuple:
    """The run's inputs once its projects are read: each project's characteristics table is read too, so an
    output must not be it either."""
    tables = [p.characteristics.table.path for p in projects
              if getattr(getattr(p, "characteristics", None), "table", None) is not None]
    return tuple(inputs) + tuple(tables)


def recheck_outputs(outputs, inputs, folder_option: str | None = None) -> None:
    """``check_not_inputs`` again for each (option, path) once every input is known (after loading)."""
    for option, path in outputs:
        if path:
            check_not_inputs(path, option, inputs, folder=option == folder_option)


def check_not_inputs(path, option: str, inputs=(), folder: bool = False) -> None:
    """UsageError when the output ``path`` is (or, for a folder, holds) one of the run's ``inputs``."""
    from engine_air.outputs.writer import OutputIsInputError, check_not_input

    try:
        check_not_input(path, inputs, option=option, folder=folder)
    except OutputIsInputError as exc:
        raise UsageError(safe_text(str(exc))) from None


def finite(value: float | None, option: str) -> None:
    if value is not None and not math.isfinite(value):
        raise UsageError(f"{option} {value}: must be a finite number")


def cases(project, names):
    """The chosen case names (None: every case); UsageError for a name the project has not."""
    if not names:
        return None
    known = [c.name for c in project.cases]
    for n in names:
        if n not in known:
            raise UsageError(f"--case {safe_text(repr(n))}: no such case; the project has "
                             f"{safe_text(', '.join(repr(k) for k in known))}")
    return names


def fmt(x, digits=4) -> str:
    return "-" if x is None or not math.isfinite(x) else f"{x:.{digits}f}"


def warn(project) -> None:
    for w in project.warnings:
        err(f"warning: {w}")


def load(path, option: str = "project"):
    from engine_air.project.load import load_project

    check_input_path(path, option)
    project = load_project(path)
    warn(project)
    return project


def progress_printer(what: str):
    """A progress callback writing "what: 40%" lines to stderr at most every 10 % (or 0.5 s on a terminal)."""
    import time

    state = {"last": -1.0, "t": 0.0}
    tty = sys.stderr.isatty()

    def report(fraction: float) -> None:
        pct = 100.0 * fraction
        now = time.monotonic()
        if tty:
            if now - state["t"] >= 0.5 or fraction >= 1.0:
                state["t"] = now
                print(f"\r{what}: {pct:5.1f}%", end="\n" if fraction >= 1.0 else "", file=sys.stderr, flush=True)
        elif pct >= state["last"] + 10.0 or (fraction >= 1.0 and state["last"] < 100.0):
            state["last"] = pct if fraction < 1.0 else 100.0
            print(f"{what}: {pct:.0f}%", file=sys.stderr, flush=True)

    return report


def write_error(path, what: str, exc: OSError) -> UsageError:
    return UsageError(f"{safe_path(path)}: cannot write the {what}: {exc.strerror or exc}")


__all__ = ["EXIT_FAILS", "EXIT_HOLDS", "EXIT_NOT_JUDGED", "EXIT_UNUSABLE", "FT", "UsageError", "cases",
           "check_input_path", "check_not_inputs", "check_output_path", "err", "finite", "fmt", "load", "name", "out",
           "path_text", "progress_printer", "quiet_stdout", "recheck_outputs", "warn", "with_tables", "write_error"]
