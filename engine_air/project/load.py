"""TOML text → validated ``Project``, and ``validate_project`` for projects built or edited in code.

Every rule comes from the schema (``engine_air.project.schema``): the keys a table may hold, each key's
type, bounds and shape, and the rules between keys a ``Field`` names. Loading checks every rule and raises
``ProjectError`` (file, dotted key path, value, what is allowed) at the first rule broken. An unknown key is
an error with a "did you mean" suggestion; a key of another inlet type is an error naming the types it
belongs to. Files are data only: they are parsed with ``tomllib`` (``tomli`` on Python 3.10) and nothing in
them is ever executed.

The same per-key and cross-key checks run on the dataclasses in ``validate_project``, so an edit in the
program is checked by the schema, not by a round trip through the file layout.
"""

from __future__ import annotations

import dataclasses
import os
import re
import stat

try:
    import tomllib
except ModuleNotFoundError:  # Python 3.10
    import tomli as tomllib  # type: ignore[no-redef]

from datetime import date, datetime, time

from engine_air.project.polygon import polygon_area, polygon_crossing_edges, vertices_collinear
from engine_air.project import schema as S
from engine_air.project.errors import ProjectError
from engine_air.project.model import (
    Case,
    Envelope,
    Grid,
    Inlet,
    Limits,
    Project,
    Rating,
    Schedule,
)
from engine_air.project.schema_field import Field, finite_float

_MISSING = object()

_KEY_PART = r"""(?:[A-Za-z0-9_-]+|"(?:[^"\\\n]|\\.)*"|'[^'\n]*')"""
_LONG_DOTTED_KEY = re.compile(r"""(?<![A-Za-z0-9_\-."'\\])""" + _KEY_PART
                              + rf"(?:[ \t]*\.[ \t]*{_KEY_PART}){{{S.MAX_KEY_PARTS}}}")
"""A run of more than MAX_KEY_PARTS dot-joined key parts (bare or quoted); linear-time to search."""

MAX_INT_DIGITS = 4300
"""Python's limit on the digits of an integer converted from text (``sys.get_int_max_str_digits``)."""


def _kind(value: object) -> str:
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


def _g(x: float) -> str:
    return f"{x:g}"


class _Reader:
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

def _number(r: _Reader, f: Field, value: object, keypath: str, name: str) -> float:
    x = finite_float(value)
    if x is None:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            r.fail(keypath, value, f"must be a number, not {_kind(value)}")
        r.fail(keypath, value, "must be a finite number with " + f.bounds_text(name))
    too_low = f.lo is not None and (x <= f.lo if f.lo_open else x < f.lo)
    too_high = f.hi is not None and (x >= f.hi if f.hi_open else x > f.hi)
    if too_low or too_high:
        r.fail(keypath, value, "must be a finite number with " + f.bounds_text(name))
    return x


def _sequence(r: _Reader, f: Field, value: object, keypath: str, noun: str) -> list:
    if not isinstance(value, (list, tuple)):
        r.fail(keypath, value, f"must be {noun} in square brackets, not {_kind(value)}")
    if f.length is not None:
        least, most = f.length
        if len(value) < least or (most is not None and len(value) > most):
            what = "entry" if (most or least) == 1 else "entries"
            r.fail(keypath, list(value), f"must have {f.length_text()} {what}; it has {len(value)}")
    return list(value)


def _ordered(r: _Reader, f: Field, values: tuple, keypath: str) -> None:
    for k in range(1, len(values)):
        if f.order == "increasing" and not values[k] > values[k - 1]:
            r.fail(f"{keypath}[{k}]", values[k], f"must be greater than {f.key}[{k - 1}] = {_g(values[k - 1])} "
                                                 f"({f.key} must increase strictly)")
        if f.order == "non-decreasing" and values[k] < values[k - 1]:
            r.fail(f"{keypath}[{k}]", values[k], f"must not be less than {f.key}[{k - 1}] = {_g(values[k - 1])} "
                                                 "(give the lower bound first)")


def check_value(r: _Reader, f: Field, value: object, keypath: str):
    """``value`` of key ``f`` checked against the key's own rules; returns it normalised (floats, tuples)."""
    k = f.kind
    if k == "number":
        return _number(r, f, value, keypath, f.key)
    if k == "integer":
        if f.path == "project.format":
            return _format(r, value)
        if isinstance(value, bool) or not isinstance(value, int):
            r.fail(keypath, value, f"must be {f.allowed_text()}, not {_kind(value)}")
        if not f.lo <= value <= f.hi:
            r.fail(keypath, value, f"must be {f.allowed_text()}")
        return int(value)
    if k == "text":
        if not isinstance(value, str):
            r.fail(keypath, value, f"must be text (in quotes), not {_kind(value)}")
        if f.length and not value.strip():
            r.fail(keypath, value, "must be non-empty text")
        return value
    if k == "boolean":
        if not isinstance(value, bool):
            r.fail(keypath, value, f"must be true or false, not {_kind(value)}")
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
            r.fail(keypath, value, f"must be {f.allowed_text()}, not {_kind(value)}")
        x = finite_float(value)
        too_low = x is None or (f.lo is not None and (x <= f.lo if f.lo_open else x < f.lo))
        too_high = x is not None and f.hi is not None and (x >= f.hi if f.hi_open else x > f.hi)
        if too_low or too_high:
            r.fail(keypath, value, f"must be {f.allowed_text()}")
        return x
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
                r.fail(f"{keypath}[{i}]", row, f"must be a row of numbers in square brackets, not {_kind(row)}")
            if len(row) == 0:
                r.fail(f"{keypath}[{i}]", list(row), "must have at least 1 entry; it has 0")
            out.append(tuple(_number(r, f, v, f"{keypath}[{i}][{j}]", f.key) for j, v in enumerate(row)))
        return tuple(out)
    raise AssertionError(f"unknown kind {k!r} of {f.path}")


def _format(r: _Reader, fmt: object) -> int:
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

def _relations(r: _Reader, flds: tuple[Field, ...], values: dict, keypath: str, given: set, lookup) -> None:
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


# -- tables from parsed TOML -----------------------------------------------------------------------------------------

def _table(r: _Reader, parent: dict, name: str, keypath: str, required: bool, missing: str | None = None):
    value = parent.get(name, _MISSING)
    if value is _MISSING:
        if required:
            r.fail(keypath, None, "missing; " + (missing or f"the file needs the table [{keypath}]"))
        return None
    if not isinstance(value, dict):
        r.fail(keypath, value, f"must be a table [{keypath}], not {_kind(value)}")
    return value


def _table_array(r: _Reader, parent: dict, name: str, keypath: str) -> list[dict]:
    header = f"[[{keypath}]]"
    value = parent.get(name, _MISSING)
    if value is _MISSING:
        r.fail(keypath, None, f"missing; at least one {header} table is required")
    if not isinstance(value, (list, tuple)):
        r.fail(keypath, value, f"must be a list of tables written {header}, not {_kind(value)}")
    if len(value) == 0:
        r.fail(keypath, list(value), f"at least one {header} table is required")
    for i, item in enumerate(value):
        if not isinstance(item, dict):
            r.fail(f"{keypath}[{i}]", item, f"must be a table written {header}, not {_kind(item)}")
    return list(value)


def _unknown(r: _Reader, data: dict, keypath: str, known, subtables=(), header: str | None = None,
             other_types: dict[str, Field] | None = None, inlet_type: str | None = None) -> None:
    """An unknown key is an error naming the key, with the closest known key as a suggestion."""
    known = tuple(known)
    for name in data:
        if name in known or name in subtables:
            continue
        path = f"{keypath}.{name}" if keypath else str(name)
        if other_types and name in other_types:
            types = other_types[name].inlet_types
            r.fail(path, data[name],
                   f"applies to inlet types {', '.join(repr(t) for t in types)} only; this inlet is type "
                   f"{inlet_type!r}: remove the key or change inlet.type")
        hint = S.suggestion(name, known + tuple(subtables))
        where = header or f"[{keypath}]"
        listing = ", ".join(known + tuple(subtables)) or "none"
        r.fail(path, data[name], "unknown key" + (f"; did you mean {hint}?" if hint else "")
               + f" (the keys of {where} are: {listing})")


def _read_fields(r: _Reader, data: dict, flds: tuple[Field, ...], keypath: str, lookup=lambda p: None):
    """Each field's normalised value (its default when absent), and the set of keys given."""
    values, given = {}, set()
    for f in flds:
        raw = data.get(f.key, _MISSING)
        path = f"{keypath}.{f.key}"
        if raw is _MISSING:
            if f.required:
                r.fail(path, None, "missing; required: " + f.allowed_text())
            values[f.key] = f.default
            continue
        values[f.key] = check_value(r, f, raw, path)
        given.add(f.key)
    _relations(r, flds, values, keypath, given, lookup)
    return values, given


def _dataclass_kwargs(cls, values: dict) -> dict:
    """The values that are fields of dataclass ``cls`` (keys absent from the file carry their defaults)."""
    names = {fld.name for fld in dataclasses.fields(cls)}
    return {k: v for k, v in values.items() if k in names}


def _default_of(cls, name: str):
    for fld in dataclasses.fields(cls):
        if fld.name == name:
            if fld.default is not dataclasses.MISSING:
                return fld.default
            return _MISSING
    return _MISSING


def _read_inlet(r: _Reader, data: dict) -> Inlet:
    t = _table(r, data, "inlet", "inlet", True)
    every = {f.key: f for f in S.inlet_fields()}
    kind_field = every["type"]
    kind = check_value(r, kind_field, t["type"], "inlet.type") if "type" in t else \
        r.fail("inlet.type", None, "missing; required: " + kind_field.allowed_text())
    flds = S.inlet_fields(kind)
    own = {f.key for f in flds}
    _unknown(r, t, "inlet", [f.key for f in flds], S.subtables("inlet"),
             other_types={k: f for k, f in every.items() if k not in own}, inlet_type=kind)
    values, _given = _read_fields(r, t, flds, "inlet")
    schedule = None
    if "schedule" in t:
        schedule = _read_schedule(r, t, kind, values)
    return Inlet(schedule=schedule, **_dataclass_kwargs(Inlet, values))


def _read_schedule(r: _Reader, t: dict, kind: str, inlet_values: dict) -> Schedule:
    s = _table(r, t, "schedule", "inlet.schedule", False)
    flds = S.schedule_fields(kind)
    every = {f.key: f for f in S.schedule_fields()}
    own = {f.key for f in flds}
    _unknown(r, s, "inlet.schedule", [f.key for f in flds],
             other_types={k: f for k, f in every.items() if k not in own}, inlet_type=kind)
    values, given = _read_fields(r, s, flds, "inlet.schedule",
                                 lookup=lambda p: inlet_values.get(p.partition(".")[2]))
    if given == {"mach"}:
        r.fail("inlet.schedule", {"mach": list(values["mach"])},
               "schedules nothing: give at least one of " + ", ".join(f.key for f in flds if f.key != "mach"))
    return Schedule(**_dataclass_kwargs(Schedule, values))


def _read_rows(r: _Reader, items: list[dict], table_name: str, cls):
    flds = S.fields(table_name)
    out = []
    for i, t in enumerate(items):
        kp = f"{table_name}[{i}]"
        _unknown(r, t, kp, [f.key for f in flds], header=f"[[{table_name}]]")
        values, _given = _read_fields(r, t, flds, kp)
        out.append(cls(**_dataclass_kwargs(cls, values)))
    return tuple(out)


def _read_plain(r: _Reader, data: dict, table_name: str, cls, required: bool):
    t = _table(r, data, table_name, table_name, required)
    if t is None:
        return cls() if cls is not None else None
    flds = S.fields(table_name)
    _unknown(r, t, table_name, [f.key for f in flds])
    values, _given = _read_fields(r, t, flds, table_name)
    return values if cls is None else cls(**_dataclass_kwargs(cls, values))


def project_from_dict(data: dict, path: str | os.PathLike | None = None) -> Project:
    """Validate parsed project data (the dict ``tomllib`` gives) and build a ``Project``.

    ``path`` names the source file in messages. Raises ``ProjectError`` at the first broken rule.
    """
    r = _Reader(path)
    if not isinstance(data, dict):
        r.fail("(file)", data, f"must be a table of project tables, not {_kind(data)}")
    top = ("project", "limits", "inlet", "engine", "envelope", "grid", "case")
    for name in data:
        if name not in top:
            hint = S.suggestion(name, top)
            r.fail(str(name), data[name], "unknown table or key" + (f"; did you mean {hint}?" if hint else "")
                   + " (the file's tables are: " + ", ".join(f"[{t.name}]" if not t.array else f"[[{t.name}]]"
                                                             for t in S.TABLES if t.name != "inlet.schedule") + ")")
    meta = _read_plain(r, data, "project", None, True)
    limits = _read_plain(r, data, "limits", Limits, True)
    inlet = _read_inlet(r, data)
    engine = _table(r, data, "engine", "engine", True, missing="at least one [[engine.rating]] table is required")
    _unknown(r, engine, "engine", (), subtables=("rating",))
    ratings = _read_rows(r, _table_array(r, engine, "rating", "engine.rating"), "engine.rating", Rating)
    envelope = _read_plain(r, data, "envelope", Envelope, True)
    grid = _read_plain(r, data, "grid", Grid, False)
    items = _table_array(r, data, "case", "case")
    _case_count(r, len(items), grid)
    cases = _read_rows(r, items, "case", Case)
    project = Project(limits=limits, inlet=inlet, ratings=ratings, envelope=envelope, grid=grid, cases=cases,
                      title=meta["title"], notes=meta["notes"], format=meta["format"])
    _project_rules(r, project)
    return dataclasses.replace(project, warnings=tuple(r.warnings))


# -- the dataclasses, checked by the same rules -------------------------------------------------------------------

def _check_object(r: _Reader, obj, flds: tuple[Field, ...], keypath: str, lookup=lambda p: None) -> None:
    values, given = {}, set()
    for f in flds:
        value = getattr(obj, f.key)
        if isinstance(value, list):
            value = tuple(value)
        if value is None:
            if f.required:
                r.fail(f"{keypath}.{f.key}", None, "missing; required: " + f.allowed_text())
            values[f.key] = None
            continue
        values[f.key] = check_value(r, f, value, f"{keypath}.{f.key}")
        given.add(f.key)
    _relations(r, flds, values, keypath, given, lookup)


def validate_project(project: Project, path: str | os.PathLike | None = None) -> None:
    """Check a ``Project`` built or edited in code by every rule of the file; raises ``ProjectError``.

    The same rules as loading: each key's type, bounds and shape, the rules between keys, and the design
    checks of the inlet type. A key of another inlet type must be at its default (it would not be saved).
    """
    r = _Reader(path)
    if not isinstance(project, Project):
        r.fail("(project)", type(project).__name__, "must be an engine_air Project")
    _check_object(r, project, S.PROJECT_FIELDS, "project")
    _check_object(r, project.limits, S.LIMIT_FIELDS, "limits")
    inlet = project.inlet
    kind = check_value(r, S.field("inlet.type"), inlet.type, "inlet.type")
    flds = S.inlet_fields(kind)
    own = {f.key for f in flds}
    for f in S.inlet_fields():
        if f.key not in own:
            value, default = getattr(inlet, f.key), _default_of(Inlet, f.key)
            if value != default:
                r.fail(f"inlet.{f.key}", value, f"applies to inlet types {', '.join(repr(t) for t in f.inlet_types)} "
                                                f"only; this inlet is type {kind!r}")
    _check_object(r, inlet, flds, "inlet")
    if inlet.schedule is not None:
        sflds = S.schedule_fields(kind)
        sown = {f.key for f in sflds}
        for f in S.schedule_fields():
            if f.key not in sown and getattr(inlet.schedule, f.key) is not None:
                r.fail(f"inlet.schedule.{f.key}", getattr(inlet.schedule, f.key),
                       f"applies to inlet types {', '.join(repr(t) for t in f.inlet_types)} only; this inlet is "
                       f"type {kind!r}")
        _check_object(r, inlet.schedule, sflds, "inlet.schedule", lookup=lambda p: getattr(inlet, p.partition(".")[2]))
        if all(getattr(inlet.schedule, f.key) is None for f in sflds if f.key != "mach"):
            r.fail("inlet.schedule", {"mach": list(inlet.schedule.mach)},
                   "schedules nothing: give at least one of " + ", ".join(f.key for f in sflds if f.key != "mach"))
    if not project.ratings:
        r.fail("engine.rating", [], "at least one [[engine.rating]] table is required")
    for i, rating in enumerate(project.ratings):
        _check_object(r, rating, S.RATING_FIELDS, f"engine.rating[{i}]")
    _check_object(r, project.envelope, S.ENVELOPE_FIELDS, "envelope")
    _check_object(r, project.grid, S.GRID_FIELDS, "grid")
    if not project.cases:
        r.fail("case", [], "at least one [[case]] table is required")
    _case_count(r, len(project.cases), project.grid)
    for i, case in enumerate(project.cases):
        _check_object(r, case, S.CASE_FIELDS, f"case[{i}]")
    _project_rules(r, project)


# -- rules across tables ----------------------------------------------------------------------------------------------

def _case_count(r: _Reader, n: int, grid: Grid) -> None:
    """The grid size, the number of cases and the case-points they make together."""
    if grid.mach_points * grid.altitude_points > S.MAX_GRID_POINTS:
        m, a = grid.mach_points, grid.altitude_points
        r.fail("grid", m * a,
               f"mach_points x altitude_points = {m} x {a} = {m * a} points; at most {S.MAX_GRID_POINTS} per case "
               "are allowed, because every case keeps a few dozen arrays of that size in memory")
    if n > S.MAX_CASES:
        r.fail("case", n, f"the file has {n} [[case]] tables; at most {S.MAX_CASES} are allowed")
    points = grid.mach_points * grid.altitude_points
    if points * n > S.MAX_CASE_POINTS:
        r.fail("case", n,
               f"{n} cases x {points} grid points = {points * n} case-points; at most "
               f"{S.MAX_CASE_POINTS} are allowed, because every case keeps a few dozen arrays of the grid's size in "
               "memory: use fewer cases or a coarser [grid]")


def _project_rules(r: _Reader, p: Project) -> None:
    """Rules between tables: throat and capture, the schedule rows, the inlet type's design checks, unique
    names, cases naming known ratings, the grid size and the envelope polygon."""
    inlet = p.inlet
    if inlet.throat_area_m2 > inlet.capture_area_m2:
        r.fail("inlet.throat_area_m2", inlet.throat_area_m2,
               f"must not exceed capture_area_m2 = {_g(inlet.capture_area_m2)} m^2")
    if inlet.auxiliary_inlet_area_m2 > 0.0 and inlet.auxiliary_door_mach_max is None:
        r.fail("inlet.auxiliary_door_mach_max", None,
               "missing; required when auxiliary_inlet_area_m2 > 0: the flight Mach number above which the doors "
               "are closed, 0 < auxiliary_door_mach_max <= 1")
    _check_design(r, inlet)
    names: dict[str, int] = {}
    for i, rating in enumerate(p.ratings):
        if rating.name in names:
            r.fail(f"engine.rating[{i}].name", rating.name,
                   f"must be unique: engine.rating[{names[rating.name]}] has the same name")
        names[rating.name] = i
    seen: dict[str, int] = {}
    for i, case in enumerate(p.cases):
        if case.name in seen:
            r.fail(f"case[{i}].name", case.name, f"must be unique: case[{seen[case.name]}] has the same name")
        seen[case.name] = i
        if case.rating not in names:
            r.fail(f"case[{i}].rating", case.rating,
                   "must name one of the engine ratings: " + ", ".join(repr(x) for x in names))
    _envelope_rules(r, p.envelope)
    lim = p.limits
    if lim.relative_tip_mach_max is not None and all(
            x.fan_tip_speed_m_s is None and x.corrected_tip_speed_m_s is None for x in p.ratings):
        r.warn("limits.relative_tip_mach_max",
               "no rating gives fan_tip_speed_m_s or corrected_tip_speed_m_s, so this limit cannot be checked")
    if lim.installation_loss_max is not None and all(x.net_thrust_n is None for x in p.ratings):
        r.warn("limits.installation_loss_max", "no rating gives net_thrust_n, so this limit cannot be checked")


def _check_design(r: _Reader, inlet: Inlet) -> None:
    """The inlet type's own design checks (``check_design`` of its registry entry), on the fixed geometry and
    on the geometry at each schedule row (e.g. ramp shocks attached at that row's own shock-on-lip Mach)."""
    from engine_air.inlets.registry import inlet_type
    from engine_air.inlets.schedule import SCHEDULED_KEYS, is_scheduled

    kind = inlet_type(inlet.type)
    fixed = dataclasses.replace(inlet, schedule=None)
    for key, value, allowed in kind.check_design(fixed):
        r.fail(key, value, allowed)
    if inlet.schedule is not None:
        sch = inlet.schedule
        for i, m in enumerate(sch.mach):
            row = {key: getattr(sch, key)[i] for key in SCHEDULED_KEYS if is_scheduled(inlet, key)}
            where = f"at inlet.schedule row {i} (mach = {_g(m)})"
            if "throat_area_m2" in row and row["throat_area_m2"] > inlet.capture_area_m2:
                r.fail(f"inlet.schedule.throat_area_m2[{i}]", row["throat_area_m2"],
                       f"must not exceed capture_area_m2 = {_g(inlet.capture_area_m2)} m^2")
            if not row.keys() - {"bleed_fraction"}:
                continue
            at_row = dataclasses.replace(fixed, **{k: (tuple(v) if isinstance(v, tuple) else v) for k, v in row.items()})
            for key, value, allowed in kind.check_design(at_row):
                base = key.split("[")[0].removeprefix("inlet.")
                if base in row:
                    r.fail(f"inlet.schedule.{base}[{i}]", row[base], f"{where}: {allowed}")
                r.fail(key, value, f"{where}: {allowed}")


def _envelope_rules(r: _Reader, env: Envelope) -> None:
    mach, alt = env.mach, env.altitude_m
    if vertices_collinear(mach, alt):
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)},
               "the vertices all lie on one line, so the polygon encloses no area")
    n = len(mach)
    for i in range(n):
        j = (i + 1) % n
        if mach[i] == mach[j] and alt[i] == alt[j]:
            r.fail("envelope", (mach[j], alt[j]),
                   f"vertex {j} repeats vertex {i}; neighbouring vertices must differ "
                   "(the polygon closes itself: do not repeat the first vertex at the end)")
    crossing = polygon_crossing_edges(mach, alt)
    if crossing is not None:
        a, b = crossing
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)},
               f"the polygon crosses itself (edge {a}-{(a + 1) % n} meets edge {b}-{(b + 1) % n}); "
               "list the vertices in order around the boundary")
    if polygon_area(mach, alt) <= 1e-9:
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)}, "the polygon encloses no area")


# -- files -----------------------------------------------------------------------------------------------------------

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
    limit = f"project files may be at most {S.MAX_FILE_BYTES} bytes (1 MiB)"
    try:
        info = os.stat(p)
        if stat.S_ISDIR(info.st_mode):
            raise ProjectError(p, "(file)", None, "is a folder, not a project file")
        if not stat.S_ISREG(info.st_mode):
            raise ProjectError(p, "(file)", None, "is not a regular file")
        if info.st_size > S.MAX_FILE_BYTES:
            raise ProjectError(p, "(file)", info.st_size, f"the file has {info.st_size} bytes; {limit}")
        with open(p, "rb") as f:
            raw = f.read(S.MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise ProjectError(p, "(file)", None, f"cannot be read: {exc.strerror or exc}") from exc
    if len(raw) > S.MAX_FILE_BYTES:
        raise ProjectError(p, "(file)", None, f"the file has more than {S.MAX_FILE_BYTES} bytes; {limit}")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise ProjectError(p, "(file)", None, f"is not UTF-8 text: byte 0x{raw[exc.start]:02x} on line {line} "
                                              "cannot be decoded; save the file as UTF-8") from exc
    return loads_project(text, p)
