"""The project file: TOML text → validated ``Project`` (``load_project``, ``loads_project``).

This module reads the file as a whole: its size, its encoding, TOML syntax, and the two shapes of text that would
cost ``tomllib`` or the interpreter too much (dotted keys of very many parts, integers of very many digits).
Files are data only: they are parsed with ``tomllib`` (``tomli`` on Python 3.10) and nothing in them is ever
executed. The parsed tables are then checked key by key against the schema (``engine_air.project.schema``) by
``project_from_dict`` (``engine_air.project.read_tables``); any broken rule raises ``ProjectError`` (file,
dotted key path, value, what is allowed) at the first rule broken.

``project_from_dict``, ``validate_project`` (``engine_air.project.validate``: the same rules on a ``Project``
built or edited in code) and ``check_value`` are importable from here too.
"""

from __future__ import annotations

import os
import re

try:
    import tomllib
except ModuleNotFoundError:  # Python 3.10
    import tomli as tomllib  # type: ignore[no-redef]

from engine_air.project import schema as S
from engine_air.project.bounded_read import read_regular_file, utf8_text
from engine_air.project.errors import ProjectError
from engine_air.project.key_checks import check_value  # noqa: F401  (importable from here, as before)
from engine_air.project.model import Project
from engine_air.project.read_tables import project_from_dict
from engine_air.project.validate import validate_project  # noqa: F401  (importable from here, as before)

_KEY_PART = r"""(?:[A-Za-z0-9_-]+|"(?:[^"\\\n]|\\.)*"|'[^'\n]*')"""
_LONG_DOTTED_KEY = re.compile(r"""(?<![A-Za-z0-9_\-."'\\])""" + _KEY_PART
                              + rf"(?:[ \t]*\.[ \t]*{_KEY_PART}){{{S.MAX_KEY_PARTS}}}")
"""A run of more than MAX_KEY_PARTS dot-joined key parts (bare or quoted); linear-time to search."""

MAX_INT_DIGITS = 4300
"""Python's limit on the digits of an integer converted from text (``sys.get_int_max_str_digits``)."""


_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\]]+?)\s*\]\]?\s*(?:#.*)?$")
_KEY_LINE = re.compile(r"""^\s*([A-Za-z0-9_\-."' ]+?)\s*=""")
_STRINGS = re.compile(r'"""[\s\S]*?"""|\'\'\'[\s\S]*?\'\'\'|"(?:[^"\\\n]|\\.)*"|\'[^\'\n]*\'')
_LONG_INT = re.compile(r"(?<![0-9A-Za-z_.])[+-]?[0-9](?:_?[0-9]){%d,}" % MAX_INT_DIGITS)


def _long_integer(text: str) -> tuple[str, str, int] | None:
    """Where the file holds an integer of more than MAX_INT_DIGITS digits: (key path, value shown, digits)."""
    blanked = _STRINGS.sub(lambda m: re.sub(r"[^\n]", " ", m.group(0)), text)
    found = _LONG_INT.search(blanked)
    if found is None:
        return None
    table_path, key, counts = "", None, {}
    for line in blanked[: found.start()].split("\n") + [blanked[found.start(): found.end()]]:
        head = _HEADER.match(line)
        if head is not None:
            name = ".".join(part.strip().strip("\"'") for part in head.group(2).split("."))
            if head.group(1) == "[[":
                counts[name] = counts.get(name, -1) + 1
                table_path = f"{name}[{counts[name]}]"
            else:
                table_path = name
            key = None
            continue
        m = _KEY_LINE.match(line)
        if m is not None:
            key = ".".join(part.strip().strip("\"'") for part in m.group(1).split("."))
    digits = found.group(0).lstrip("+-").replace("_", "")
    shown = f"{digits[:12]}... ({len(digits)} digits)"
    path = ".".join(x for x in (table_path, key) if x) or "(file)"
    return path, shown, len(digits)


def loads_project(text: str, path: str | os.PathLike | None = None) -> Project:
    """Parse and validate project-file text; ``path`` names the file in messages."""
    p = None if path is None else os.fspath(path)
    long_key = _LONG_DOTTED_KEY.search(text)
    if long_key is not None:
        line = text.count("\n", 0, long_key.start()) + 1
        raise ProjectError(p, "(file)", None, f"line {line} has a dotted key or table name of more than "
                                              f"{S.MAX_KEY_PARTS} parts; keys may be nested at most "
                                              f"{S.MAX_KEY_PARTS} deep")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ProjectError(p, "(file)", None, f"is not valid TOML: {exc}") from exc
    except RecursionError as exc:
        raise ProjectError(p, "(file)", None, "is not a usable project file: values are nested too deeply") from exc
    except ValueError as exc:  # an integer the interpreter will not convert from text (more than 4300 digits)
        found = _long_integer(text)
        if found is None:
            raise ProjectError(p, "(file)", None, f"is not a usable project file: {exc}") from exc
        key, shown, n = found
        raise ProjectError(p, key, shown, f"an integer of {n} digits cannot be read (at most {MAX_INT_DIGITS} "
                                          "digits); no value of a project file needs so many") from exc
    return project_from_dict(data, p)


def load_project(path: str | os.PathLike) -> Project:
    """Read, parse and validate the project file at ``path``.

    Raises ``ProjectError`` (key ``"(file)"`` for problems with the file as a whole) when the file cannot be
    read, exceeds ``MAX_FILE_BYTES``, is not UTF-8 text, is not valid TOML, or breaks any project rule.
    """
    p = os.fspath(path)
    raw = read_regular_file(p, S.MAX_FILE_BYTES, "project file",
                            f"project files may be at most {S.MAX_FILE_BYTES} bytes (1 MiB)")
    return with_characteristics(loads_project(utf8_text(p, raw), p), p)


def with_characteristics(project: Project, path: str | os.PathLike) -> Project:
    """The project with its characteristics table read (``[characteristics] file``, relative to ``path``'s
    folder); unchanged without one. ``ProjectError`` names the table file, row and column of a bad cell."""
    if project.characteristics_file is None:
        return project
    import dataclasses

    from engine_air.characteristics.curves import find_curves
    from engine_air.characteristics.table import read_characteristics

    folder = os.path.dirname(os.path.abspath(os.fspath(path)))
    table_path = os.path.join(folder, project.characteristics_file)
    return dataclasses.replace(project, characteristics=find_curves(read_characteristics(table_path)))
