"""Parsed TOML (the dict ``tomllib`` gives) → validated ``Project``: ``project_from_dict``.

Each table is read against its keys in the schema (``engine_air.project.schema``): an unknown key is an error
with a "did you mean" suggestion, a key of another inlet type an error naming the types it belongs to; each
value is checked by ``engine_air.project.key_checks`` and the rules between tables by
``engine_air.project.project_rules``.
"""

from __future__ import annotations

import dataclasses
import os

from engine_air.project import schema as S
from engine_air.project.key_checks import MISSING, Reader, check_relations, check_value, kind_name
from engine_air.project.model import (Case, Envelope, Grid, Inlet, LimitRegion, Limits, Project, Rating, Schedule,
                                      Stability)
from engine_air.project.project_rules import case_count, check_region_name, project_rules
from engine_air.project.schema_field import Field


def _table(r: Reader, parent: dict, name: str, keypath: str, required: bool, missing: str | None = None):
    value = parent.get(name, MISSING)
    if value is MISSING:
        if required:
            r.fail(keypath, None, "missing; " + (missing or f"the file needs the table [{keypath}]"))
        return None
    if not isinstance(value, dict):
        r.fail(keypath, value, f"must be a table [{keypath}], not {kind_name(value)}")
    return value


def _table_array(r: Reader, parent: dict, name: str, keypath: str) -> list[dict]:
    header = f"[[{keypath}]]"
    value = parent.get(name, MISSING)
    if value is MISSING:
        r.fail(keypath, None, f"missing; at least one {header} table is required")
    if not isinstance(value, (list, tuple)):
        r.fail(keypath, value, f"must be a list of tables written {header}, not {kind_name(value)}")
    if len(value) == 0:
        r.fail(keypath, list(value), f"at least one {header} table is required")
    for i, item in enumerate(value):
        if not isinstance(item, dict):
            r.fail(f"{keypath}[{i}]", item, f"must be a table written {header}, not {kind_name(item)}")
    return list(value)


def refuse_unknown(r: Reader, data: dict, keypath: str, known, subtables=(), header: str | None = None,
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


def read_fields(r: Reader, data: dict, flds: tuple[Field, ...], keypath: str, lookup=lambda p: None):
    """Each field's normalised value (its default when absent), and the set of keys given."""
    values, given = {}, set()
    for f in flds:
        raw = data.get(f.key, MISSING)
        path = f"{keypath}.{f.key}"
        if raw is MISSING:
            if f.required:
                r.fail(path, None, "missing; required: " + f.allowed_text())
            values[f.key] = f.default
            continue
        values[f.key] = check_value(r, f, raw, path)
        given.add(f.key)
    check_relations(r, flds, values, keypath, given, lookup)
    return values, given


def dataclass_kwargs(cls, values: dict) -> dict:
    """The values that are fields of dataclass ``cls`` (keys absent from the file carry their defaults)."""
    names = {fld.name for fld in dataclasses.fields(cls)}
    return {k: v for k, v in values.items() if k in names}


def _read_inlet(r: Reader, data: dict) -> Inlet:
    t = _table(r, data, "inlet", "inlet", True)
    every = {f.key: f for f in S.inlet_fields()}
    kind_field = every["type"]
    kind = check_value(r, kind_field, t["type"], "inlet.type") if "type" in t else \
        r.fail("inlet.type", None, "missing; required: " + kind_field.allowed_text())
    flds = S.inlet_fields(kind)
    own = {f.key for f in flds}
    refuse_unknown(r, t, "inlet", [f.key for f in flds], S.subtables("inlet"),
                   other_types={k: f for k, f in every.items() if k not in own}, inlet_type=kind)
    values, _given = read_fields(r, t, flds, "inlet")
    schedule = None
    if "schedule" in t:
        schedule = _read_schedule(r, t, kind, values)
    return Inlet(schedule=schedule, **dataclass_kwargs(Inlet, values))


def _read_schedule(r: Reader, t: dict, kind: str, inlet_values: dict) -> Schedule:
    s = _table(r, t, "schedule", "inlet.schedule", False)
    flds = S.schedule_fields(kind)
    every = {f.key: f for f in S.schedule_fields()}
    own = {f.key for f in flds}
    refuse_unknown(r, s, "inlet.schedule", [f.key for f in flds],
                   other_types={k: f for k, f in every.items() if k not in own}, inlet_type=kind)
    values, given = read_fields(r, s, flds, "inlet.schedule",
                                lookup=lambda p: inlet_values.get(p.partition(".")[2]))
    if given == {"mach"}:
        r.fail("inlet.schedule", {"mach": list(values["mach"])},
               "schedules nothing: give at least one of " + ", ".join(f.key for f in flds if f.key != "mach"))
    return Schedule(**dataclass_kwargs(Schedule, values))


def _read_limits(r: Reader, data: dict) -> Limits:
    t = _table(r, data, "limits", "limits", True)
    flds = S.LIMIT_FIELDS
    refuse_unknown(r, t, "limits", [f.key for f in flds], S.subtables("limits"))
    values, _given = read_fields(r, t, flds, "limits")
    regions = _read_regions(r, t) if "region" in t else ()
    return Limits(regions=regions, **dataclass_kwargs(Limits, values))


def _read_regions(r: Reader, limits_table: dict) -> tuple[LimitRegion, ...]:
    """The ``[limits.region.NAME]`` tables, one per check name, in file order."""
    tables = _table(r, limits_table, "region", "limits.region", False)
    out = []
    for name, body in tables.items():
        keypath = f"limits.region.{name}"
        check_region_name(r, name, body)
        if not isinstance(body, dict):
            r.fail(keypath, body, f"must be a table [{keypath}] holding mach_range, altitude_range_m or both, "
                                  f"not {kind_name(body)}")
        flds = S.LIMIT_REGION_FIELDS
        refuse_unknown(r, body, keypath, [f.key for f in flds], header=f"[{keypath}]")
        values, _given = read_fields(r, body, flds, keypath)
        out.append(LimitRegion(check=name, **dataclass_kwargs(LimitRegion, values)))
    return tuple(out)


def _read_rows(r: Reader, items: list[dict], table_name: str, cls):
    flds = S.fields(table_name)
    out = []
    for i, t in enumerate(items):
        kp = f"{table_name}[{i}]"
        refuse_unknown(r, t, kp, [f.key for f in flds], S.subtables(table_name), header=f"[[{table_name}]]")
        values, _given = read_fields(r, t, flds, kp)
        if "stability" in S.subtables(table_name) and "stability" in t:
            values["stability"] = _read_stability(r, t, f"{kp}.stability")
        out.append(cls(**dataclass_kwargs(cls, values)))
    return tuple(out)


def _read_stability(r: Reader, t: dict, keypath: str) -> Stability:
    """``[engine.rating.stability]`` below one rating (method §18)."""
    s = _table(r, t, "stability", keypath, False)
    flds = S.fields("engine.rating.stability")
    refuse_unknown(r, s, keypath, [f.key for f in flds], header="[engine.rating.stability]")
    values, _given = read_fields(r, s, flds, keypath)
    values["other_losses"] = values["other_losses"] or ()
    return Stability(**dataclass_kwargs(Stability, values))


def _read_plain(r: Reader, data: dict, table_name: str, cls, required: bool):
    t = _table(r, data, table_name, table_name, required)
    if t is None:
        return cls() if cls is not None else None
    flds = S.fields(table_name)
    refuse_unknown(r, t, table_name, [f.key for f in flds])
    values, _given = read_fields(r, t, flds, table_name)
    return values if cls is None else cls(**dataclass_kwargs(cls, values))


def project_from_dict(data: dict, path: str | os.PathLike | None = None) -> Project:
    """Validate parsed project data (the dict ``tomllib`` gives) and build a ``Project``.

    ``path`` names the source file in messages. Raises ``ProjectError`` at the first broken rule.
    """
    r = Reader(path)
    if not isinstance(data, dict):
        r.fail("(file)", data, f"must be a table of project tables, not {kind_name(data)}")
    top = ("project", "limits", "inlet", "engine", "envelope", "grid", "case", "characteristics")
    for name in data:
        if name not in top:
            hint = S.suggestion(name, top)
            r.fail(str(name), data[name], "unknown table or key" + (f"; did you mean {hint}?" if hint else "")
                   + " (the file's tables are: " + ", ".join(f"[{t.name}]" if not t.array else f"[[{t.name}]]"
                                                             for t in S.TABLES if "." not in t.name or t.name == "engine.rating") + ")")
    meta = _read_plain(r, data, "project", None, True)
    limits = _read_limits(r, data)
    inlet = _read_inlet(r, data)
    engine = _table(r, data, "engine", "engine", True, missing="at least one [[engine.rating]] table is required")
    refuse_unknown(r, engine, "engine", (), subtables=("rating",))
    ratings = _read_rows(r, _table_array(r, engine, "rating", "engine.rating"), "engine.rating", Rating)
    envelope = _read_plain(r, data, "envelope", Envelope, True)
    grid = _read_plain(r, data, "grid", Grid, False)
    items = _table_array(r, data, "case", "case")
    case_count(r, len(items), grid)
    cases = _read_rows(r, items, "case", Case)
    data_table = _read_plain(r, data, "characteristics", None, False)
    project = Project(limits=limits, inlet=inlet, ratings=ratings, envelope=envelope, grid=grid, cases=cases,
                      title=meta["title"], notes=meta["notes"], format=meta["format"],
                      characteristics_file=None if data_table is None else data_table["file"])
    project_rules(r, project)
    return dataclasses.replace(project, warnings=tuple(r.warnings))

