"""``validate_project``: a ``Project`` built or edited in code, checked by every rule of the file.

The same per-key checks (``engine_air.project.key_checks``) and rules between tables
(``engine_air.project.project_rules``) as loading, applied to the dataclasses directly, so that an edit in the
program is checked by the schema and not by a round trip through the file layout.
"""

from __future__ import annotations

import dataclasses
import os

from engine_air.project import schema as S
from engine_air.project.key_checks import MISSING, Reader, check_relations, check_value
from engine_air.project.model import Inlet, Project
from engine_air.project.project_rules import case_count, check_region_name, project_rules
from engine_air.project.schema_field import Field


def _default_of(cls, name: str):
    for fld in dataclasses.fields(cls):
        if fld.name == name:
            if fld.default is not dataclasses.MISSING:
                return fld.default
            return MISSING
    return MISSING



def _check_object(r: Reader, obj, flds: tuple[Field, ...], keypath: str, lookup=lambda p: None) -> None:
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
    check_relations(r, flds, values, keypath, given, lookup)


def validate_project(project: Project, path: str | os.PathLike | None = None) -> None:
    """Check a ``Project`` built or edited in code by every rule of the file; raises ``ProjectError``.

    The same rules as loading: each key's type, bounds and shape, the rules between keys, and the design
    checks of the inlet type. A key of another inlet type must be at its default (it would not be saved).
    """
    r = Reader(path)
    if not isinstance(project, Project):
        r.fail("(project)", type(project).__name__, "must be an engine_air Project")
    _check_object(r, project, S.PROJECT_FIELDS, "project")
    _check_object(r, project.limits, S.LIMIT_FIELDS, "limits")
    for region in project.limits.regions:
        check_region_name(r, region.check, region)
        _check_object(r, region, S.LIMIT_REGION_FIELDS, f"limits.region.{region.check}")
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
        if rating.stability is not None:
            _check_object(r, rating.stability, S.fields("engine.rating.stability"), f"engine.rating[{i}].stability")
    _check_object(r, project.envelope, S.ENVELOPE_FIELDS, "envelope")
    _check_object(r, project.grid, S.GRID_FIELDS, "grid")
    if not project.cases:
        r.fail("case", [], "at least one [[case]] table is required")
    case_count(r, len(project.cases), project.grid)
    for i, case in enumerate(project.cases):
        _check_object(r, case, S.CASE_FIELDS, f"case[{i}]")
    project_rules(r, project)

