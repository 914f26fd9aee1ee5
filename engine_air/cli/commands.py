"""Command line ``engine-air``: the parser and ``main``; each command lives in its own module.

Commands: ``check`` (engine_air.cli.check), ``map`` (maps), ``point`` (point),
``size`` (size), ``compare`` (compare), ``sweep`` (sweep), ``pack`` (pack), ``distortion``
(distortion).

Exit codes: 0 every limit holds, 1 some limit fails, 2 the input is unusable
(one-line message on stderr, never a traceback), 3 (``point`` only) the point
is not judged: it lies outside the envelope polygon.

Negative numbers are accepted after any option that takes a value, in every
spelling Python reads as a number (``--altitude-m -1000``, ``--lower -1e3``,
``--at-altitude-m -.5``).
"""

from __future__ import annotations

import argparse
import importlib
import sys

from engine_air import __version__
from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, EXIT_NOT_JUDGED, EXIT_UNUSABLE, UsageError, err,
                                   quiet_stdout)
from engine_air.outputs.safe_text import safe_path, safe_text
from engine_air.project.errors import ProjectError

EPILOG = ("exit codes: 0 every limit holds; 1 some limit fails; 2 the input is unusable (one line on stderr); "
          "3 point only: the point is not judged (outside the envelope polygon).")


class _Parser(argparse.ArgumentParser):
    """argparse with its error line escaped (a bad value is shown, never sent raw to the terminal)."""

    def error(self, message):
        self.print_usage(sys.stderr)
        print(safe_text(f"{self.prog}: error: {message}"), file=sys.stderr)
        sys.exit(EXIT_UNUSABLE)


COMMANDS = {"check": "check", "map": "maps", "point": "point", "characteristic": "characteristic",
            "calibrate": "calibrate", "size": "size", "compare": "compare", "sweep": "sweep", "pack": "pack",
            "distortion": "distortion"}
"""Each command and the module (in ``engine_air.cli``) that defines it."""


def _parser(argv=None) -> argparse.ArgumentParser:
    """The parser; with ``argv`` naming a command first, only that command's module is imported (start-up time)."""
    p = _Parser(
        prog="engine-air",
        description="Inlet operability over the flight envelope: face Mach, recovery, spillage, throat choking.",
        epilog=EPILOG,
    )
    p.add_argument("--version", action="version", version=f"engine-air {__version__}")
    sub = p.add_subparsers(dest="command", required=True)
    first = next((a for a in argv or () if not a.startswith("-")), None)
    names = [first] if first in COMMANDS else list(COMMANDS)
    for name in names:
        importlib.import_module(f"engine_air.cli.{COMMANDS[name]}").add_parser(sub)
    return p


def __getattr__(name: str):
    """Names kept importable from here, imported with their command's module on first use."""
    home = {"write_map_csv": "maps", "SIZE_OBJECTIVES": "size"}.get(name)
    if home is None:
        raise AttributeError(f"module 'engine_air.cli.commands' has no attribute {name!r}")
    return getattr(importlib.import_module(f"engine_air.cli.{home}"), name)


def _value_options(parser: argparse.ArgumentParser) -> set[str]:
    """Every option string (of the parser and its sub-parsers) that takes exactly one value."""
    found: set[str] = set()
    for action in parser._actions:  # noqa: SLF001 - argparse offers no public walk of its options
        if isinstance(action, argparse._SubParsersAction):  # noqa: SLF001
            for child in action.choices.values():
                found |= _value_options(child)
        elif action.option_strings and action.nargs is None and not isinstance(
                action, (argparse._StoreConstAction, argparse._StoreTrueAction, argparse._StoreFalseAction,
                         argparse._HelpAction, argparse._VersionAction, argparse._CountAction)):  # noqa: SLF001
            found |= set(action.option_strings)
    return found


def _looks_negative(token: str) -> bool:
    if not token.startswith("-") or token == "-":
        return False
    try:
        float(token)
    except ValueError:
        return False
    return True


def join_negative_values(argv: list[str], options: set[str]) -> list[str]:
    """``["--altitude-m", "-1e3"]`` -> ``["--altitude-m=-1e3"]`` for every option that takes a value, so that
    argparse never takes a negative number for an option."""
    out: list[str] = []
    k = 0
    while k < len(argv):
        token = argv[k]
        if token == "--":
            out.extend(argv[k:])
            break
        if token in options and k + 1 < len(argv) and _looks_negative(argv[k + 1]):
            out.append(f"{token}={argv[k + 1]}")
            k += 2
            continue
        out.append(token)
        k += 1
    return out


def main(argv=None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    argv = [a if isinstance(a, str) else safe_path(a) for a in argv]
    parser = _parser(argv)
    try:
        args = parser.parse_args(join_negative_values(argv, _value_options(parser)))
    except SystemExit as exc:  # argparse's own usage message (exit 2) or --help/--version (exit 0)
        return int(exc.code or 0) if isinstance(exc.code, int) else EXIT_UNUSABLE
    try:
        return args.handler(args)
    except BrokenPipeError:  # stdout's reader has gone (``| head``): stop quietly, no traceback, no message
        quiet_stdout()
        return EXIT_HOLDS
    except ProjectError as exc:
        err(f"engine-air: {exc}")
    except UsageError as exc:
        err(f"engine-air: {exc}")
    except UnicodeError as exc:
        err(f"engine-air: a file name or text is not valid UTF-8 ({safe_text(exc.reason)}); rename the file")
    except OSError as exc:
        where = safe_path(exc.filename) if getattr(exc, "filename", None) else ""
        err(f"engine-air: {where}: {exc.strerror or exc}")
    except MemoryError:
        err("engine-air: not enough memory for this grid; reduce grid.mach_points or grid.altitude_points")
    except Exception as exc:  # last resort: never a traceback
        writer = sys.modules.get("engine_air.outputs.writer")  # imported only by commands that write
        if writer is not None and isinstance(exc, writer.OutputIsInputError):
            err(f"engine-air: {exc}")
            return EXIT_UNUSABLE
        err(f"engine-air: internal error ({type(exc).__name__}: {exc}); please report it with the project file")
    return EXIT_UNUSABLE


__all__ = ["EXIT_FAILS", "EXIT_HOLDS", "EXIT_NOT_JUDGED", "EXIT_UNUSABLE", "SIZE_OBJECTIVES", "UsageError",
           "join_negative_values", "main", "write_map_csv"]

if __name__ == "__main__":
    sys.exit(main())
