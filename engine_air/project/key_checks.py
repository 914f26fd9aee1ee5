"""One value of the project file against its ``Field``, and the rules between the keys of one table.

``check_value`` checks a value's type, bounds, length and order (the rules a ``Field`` states about one value)
and returns it normalised (floats, tuples); ``check_relations`` checks ``same_length_as``, ``row_length_as``,
``excludes`` and ``requires`` between the keys of one table. ``Reader`` carries the file's path for messages
and the warnings met; ``Reader.fail`` raises ``ProjectError`` (file, key path, value, what is allowed).
The loader (``engine_air.project.read_tables``) and ``validate_project`` (``engine_air.project.validate``)
both use these, so a file and a project edited in code are checked by the same rules.
"""

from __future__ import annotations

import os
from datetime import date, datetime, time

from engine_air.project import schema as S
from engine_air.project.errors import ProjectError
from engine_air.project.schema_field import Field, finite_float

MISSING = object()
"""Marks a key the file does not give."""


def kind_name(value: object) -> str:
    """Plain-words name of a TOML value's type, for messages."""
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, int):
        return "a whole number"
    if isinstance(value, float):
        return "a number"
    if isinstance(value, str):
        return "text"
    if isinstance(value, (list, tuple)):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, (datetime, date, time)):
        return "a date/time"
    return type(value).__name__


def number_text(x: float) -> str:
    return f"{x:g}"


class Reader:
    """Validation state for one file or project: its path and the warnings met so far."""

    def __init__(self, path: str | os.PathLike | None) -> None:
        self.path = None if path is None else os.fspath(path)
        self.warnings: list[str] = []

    def fail(self, key: str, value: object, allowed: str):
        raise ProjectError(self.path, key, value, allowed)

    def warn(self, key: str, text: str) -> None:
        prefix = f"{self.path}: " if self.path is not None else ""
        self.warnings.append(f"{prefix}{key}: {text}")


# -- one value against its Field ------------------------------------------------------------------------------------

def _number(r: Reader, f: Field, value: object, keypath: str, name: str) -> float:
    x = finite_float(value)
    if x is None:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            r.fail(keypath, value, f"must be a number, not {kind_name(value)}")
        r.fail(keypath, value, "must be a finite number with " + f.bounds_text(name))
    too_low = f.lo is not None and (x <= f.lo if f.lo_open else x < f.lo)
    too_high = f.hi is not None and (x >= f.hi if f.hi_open else x > f.hi)
    if too_low or too_high:
        r.fail(keypath, value, "must be a finite number with " + f.bounds_text(name))
    return x


def _sequence(r: Reader, f: Field, value: object, keypath: str, noun: str) -> list:
    if not isinstance(value, (list, tuple)):
        r.fail(keypath, value, f"must be {noun} in square brackets, not {kind_name(value)}")
    if f.length is not None:
        least, most = f.length
        if len(value) < least or (most is not None and len(value) > most):
            what = "entry" if (most or least) == 1 else "entries"
            r.fail(keypath, list(value), f"must have {f.length_text()} {what}; it has {len(value)}")
    return list(value)


def _ordered(r: Reader, f: Field, values: tuple, keypath: str) -> None:
    for k in range(1, len(values)):
        if f.order == "increasing" and not values[k] > values[k - 1]:
            r.fail(f"{keypath}[{k}]", values[k], f"must be greater than {f.key}[{k - 1}] = {number_text(values[k - 1])} "
                                                 f"({f.key} must increase strictly)")
        if f.order == "non-decreasing" and values[k] < values[k - 1]:
            r.fail(f"{keypath}[{k}]", values[k], f"must not be less than {f.key}[{k - 1}] = {number_text(values[k - 1])} "
                                                 "(give the lower bound first)")


def check_value(r: Reader, f: Field, value: object, keypath: str):
    """``value`` of key ``f`` checked against the key's own rules; returns it normalised (floats, tuples)."""
    k = f.kind
    if k == "number":
        return _number(r, f, value, keypath, f.key)
    if k == "integer":
        if f.path == "project.format":
            return _format(r, value)
        if isinstance(value, bool) or not isinstance(value, int):
            r.fail(keypath, value, f"must be {f.allowed_text()}, not {kind_name(value)}")
        if not f.lo <= value <= f.hi:
            r.fail(keypath, value, f"must be {f.allowed_text()}")
        return int(value)
    if k == "text":
        if not isinstance(value, str):
            r.fail(keypath, value, f"must be text (in quotes), not {kind_name(value)}")
        if f.length and not value.strip():
            r.fail(keypath, value, "must be non-empty text")
        return value
    if k == "boolean":
        if not isinstance(value, bool):
            r.fail(keypath, value, f"must be true or false, not {kind_name(value)}")
        return value
    if k == "choice":
        if not isinstance(value, str):
            r.fail(keypath, value, f"must be text: {f.allowed_text()}")
        if value not in f.names:
            hint = S.suggestion(value, f.names)
            r.fail(keypath, value, f"must be {f.allowed_text()}" + (f'; did you mean "{hint}"?' if hint else ""))
        return value
    if k == "number or name":
        if isinstance(value, str):
            name = value.strip().lower()
            if name not in f.names:
                r.fail(keypath, value, f"must be {f.allowed_text()}")
            return name
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            r.fail(keypath, value, f"must be {f.allowed_text()}, not {kind_name(value)}")
        x = finite_float(value)
        too_low = x is None or (f.lo is not None and (x <= f.lo if f.lo_open else x < f.lo))
        too_high = x is not None and f.hi is not None and (x >= f.hi if f.hi_open else x > f.hi)
        if too_low or too_high:
            r.fail(keypath, value, f"must be {f.allowed_text()}")
        return x
    if k == "number or Mach table":
        return _number_or_mach_table(r, f, value, keypath)
    if k == "number list":
        items = _sequence(r, f, value, keypath, "a list of numbers")
        out = tuple(_number(r, f, v, f"{keypath}[{i}]", f.key) for i, v in enumerate(items))
        _ordered(r, f, out, keypath)
        return out
    if k == "number table":
        rows = _sequence(r, f, value, keypath, "a list of rows (lists of numbers)")
        out = []
        for i, row in enumerate(rows):
            if not isinstance(row, (list, tuple)):
                r.fail(f"{keypath}[{i}]", row, f"must be a row of numbers in square brackets, not {kind_name(row)}")
            if len(row) == 0:
                r.fail(f"{keypath}[{i}]", list(row), "must have at least 1 entry; it has 0")
            out.append(tuple(_number(r, f, v, f"{keypath}[{i}][{j}]", f.key) for j, v in enumerate(row)))
        return tuple(out)
    if k == "named numbers":
        return _named_numbers(r, f, value, keypath)
    raise AssertionError(f"unknown kind {k!r} of {f.path}")


def _number_or_mach_table(r: Reader, f: Field, value: object, keypath: str):
    """A number, or ``{ mach = [...], deg = [...] }`` (two lists, or the pair of tuples a Project holds)."""
    if isinstance(value, tuple) and len(value) == 2 and all(isinstance(v, (list, tuple)) for v in value):
        value = {"mach": list(value[0]), "deg": list(value[1])}
    if not isinstance(value, dict):
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            r.fail(keypath, value, f"must be {f.allowed_text()}, not {kind_name(value)}")
        return _number(r, f, value, keypath, f.key)
    if set(value) != {"mach", "deg"}:
        r.fail(keypath, value, f"must be {f.allowed_text()}; the table has the keys {', '.join(map(str, value))}")
    machs = _sequence(r, f, value["mach"], f"{keypath}.mach", "a list of numbers")
    degs = _sequence(r, f, value["deg"], f"{keypath}.deg", "a list of numbers")
    mach_field = Field("mach", f.table, "number list", "", lo=0.0, hi=S.MAX_MACH, order="increasing")
    m = tuple(_number(r, mach_field, v, f"{keypath}.mach[{i}]", "mach") for i, v in enumerate(machs))
    d = tuple(_number(r, f, v, f"{keypath}.deg[{i}]", "deg") for i, v in enumerate(degs))
    _ordered(r, mach_field, m, f"{keypath}.mach")
    if len(m) < 2 or len(m) != len(d):
        r.fail(keypath, value, f"must be {f.allowed_text()}")
    return (m, d)


def _named_numbers(r: Reader, f: Field, value: object, keypath: str) -> tuple[tuple[str, float], ...]:
    """A TOML table of name = number (or the (name, number) pairs of a ``Project``) as pairs in order."""
    if isinstance(value, dict):
        items = list(value.items())
    elif isinstance(value, (list, tuple)) and all(isinstance(x, (list, tuple)) and len(x) == 2 for x in value):
        items = [tuple(x) for x in value]
    else:
        r.fail(keypath, value, f"must be {f.allowed_text()}, not {kind_name(value)}")
    most = f.length[1] if f.length else None
    if most is not None and len(items) > most:
        r.fail(keypath, len(items), f"must have at most {most} names; it has {len(items)}")
    seen = set()
    for name, _x in items:
        if not isinstance(name, str) or not name.strip():
            r.fail(keypath, name, "each name must be non-empty text")
        if name in seen:
            r.fail(f"{keypath}.{name}", name, "each name once")
        seen.add(name)
    return tuple((name, _number(r, f, x, f"{keypath}.{name}", name)) for name, x in items)


def _format(r: Reader, fmt: object) -> int:
    supported = ", ".join(str(x) for x in S.SUPPORTED_FORMATS)
    if isinstance(fmt, bool) or not isinstance(fmt, int):
        r.fail("project.format", fmt, f"must be a whole number (this program reads format {supported})")
    if fmt not in S.SUPPORTED_FORMATS:
        if fmt > max(S.SUPPORTED_FORMATS):
            why = (f"this program reads format {supported}; the file says format {fmt} \u2014 it was written by a "
                   "newer version")
        else:
            why = f"this program reads format {supported}; format {fmt} is not a valid format number"
        r.fail("project.format", fmt, why)
    return int(fmt)


# -- rules between the keys of one table (named by the Fields) ---------------------------------------------------

def check_relations(r: Reader, flds: tuple[Field, ...], values: dict, keypath: str, given: set, lookup) -> None:
    """``same_length_as``, ``row_length_as``, ``excludes`` and ``requires`` of the fields of one table.

    ``values``: normalised values by key; ``given``: keys the table gives (not defaulted); ``lookup(path)``:
    the value of a key of another table (``inlet.ramp_angles_deg``)."""

    def other(name):
        return lookup(name) if "." in name else values.get(name)

    def shown(name):  # "envelope.mach", but "theta" inside engine.rating[0]
        return name if "." in name or "[" in keypath else f"{keypath}.{name}"

    for f in flds:
        if f.key not in given:
            continue
        for name in f.excludes:
            if name in given:
                r.fail(f"{keypath}.{f.key}", values[f.key], f"give either {f.key} or {name}, not both")
        for name in f.requires:
            if name not in given:
                r.fail(f"{keypath}.{f.key}", values[f.key],
                       f"needs {name} in the same table (" + ", ".join((f.key,) + f.requires) + " go together)")
        v = values[f.key]
        if f.same_length_as:
            ref = other(f.same_length_as)
            if ref is not None and len(v) != len(ref):
                noun = "row" if f.kind == "number table" else "entry"
                r.fail(f"{keypath}.{f.key}", list(v),
                       f"must have one {noun} per {shown(f.same_length_as)} value ({len(ref)}); it has {len(v)}")
        if f.row_length_as:
            ref = other(f.row_length_as)
            if ref is not None:
                for i, row in enumerate(v):
                    if len(row) != len(ref):
                        r.fail(f"{keypath}.{f.key}[{i}]", list(row),
                               f"must have one value per {shown(f.row_length_as)} value ({len(ref)}); it has {len(row)}")

