"""``Project`` → TOML text in the file layout, and saving it atomically.

The text follows the schema (``engine_air.project.schema``): tables and keys in schema order, only the keys
of the project's inlet type, and keys at their default value left out (the [grid] table is always written); loading it gives back an equal
``Project`` (every float is written with the digits that read back to the same number).
"""

from __future__ import annotations

import errno
import json
import os
import re
from typing import TYPE_CHECKING

import tomli_w

from engine_air.project import schema as S
from engine_air.project.atomic import is_read_only, write_bytes_atomic
from engine_air.project.errors import ProjectSaveError
from engine_air.project.model import Project
from engine_air.project.schema_field import REQUIRED, Field

if TYPE_CHECKING:
    from engine_air.project.fingerprint import Fingerprint


def _plain(value):
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    return value


def _at_default(f: Field, value) -> bool:
    if value is None:
        return True
    if f.default is REQUIRED or f.default is None:
        return False
    return value == f.default and type(value) is not bool or (isinstance(value, bool) and value is f.default)


def _body(obj, flds, keep_defaults: bool = False) -> dict:
    return {f.key: _plain(getattr(obj, f.key)) for f in flds
            if getattr(obj, f.key) is not None and (keep_defaults or not _at_default(f, getattr(obj, f.key)))}


def project_to_dict(project: Project) -> dict:
    """The project as a plain dict in the file layout: only the inlet type's keys, keys at default left out
    (the [grid] keys are always written)."""
    kind = project.inlet.type
    inlet = _body(project.inlet, S.inlet_fields(kind))
    if project.inlet.schedule is not None:
        inlet["schedule"] = _body(project.inlet.schedule, S.schedule_fields(kind))
    limits = _body(project.limits, S.LIMIT_FIELDS)
    if project.limits.regions:
        limits["region"] = {r.check: _body(r, S.LIMIT_REGION_FIELDS) for r in project.limits.regions}
    out = {
        "project": _body(project, S.PROJECT_FIELDS),
        "limits": limits,
        "inlet": inlet,
        "engine": {"rating": [_rating_body(x) for x in project.ratings]},
        "envelope": _body(project.envelope, S.ENVELOPE_FIELDS),
        "grid": _body(project.grid, S.GRID_FIELDS, keep_defaults=True),  # the resolution is always shown
        "case": [_incidence_tables(_body(c, S.CASE_FIELDS)) for c in project.cases],
    }
    if project.characteristics_file is not None:
        out["characteristics"] = {"file": project.characteristics_file}
    return out


def _incidence_tables(body: dict) -> dict:
    """An incidence held as (mach list, deg list) is written as the inline table { mach = [...], deg = [...] }."""
    for key in ("angle_of_attack_deg", "sideslip_deg"):
        value = body.get(key)
        if isinstance(value, list):
            body[key] = {"mach": value[0], "deg": value[1]}
    return body


def _rating_body(rating) -> dict:
    body = _body(rating, S.RATING_FIELDS)
    if rating.stability is not None:
        stability = _body(rating.stability, S.fields("engine.rating.stability"))
        stability["other_losses"] = dict(rating.stability.other_losses)
        body["stability"] = stability
    return body


_HEADER = "# engine-air project file. SI units: m, m^2, kg/s, m/s, K; angles in degrees. Keys: docs/project-file.md"
_ITEMS_PER_LINE = 8


def _toml_value(value: object) -> str:
    """One TOML value: scalars formatted by ``tomli_w``, lists written inline (wrapped when long)."""
    if isinstance(value, (list, tuple)):
        items = [_toml_value(v) for v in value]
        if len(items) <= _ITEMS_PER_LINE and sum(len(x) for x in items) < 100:
            return "[" + ", ".join(items) + "]"
        per_line = 1 if any(isinstance(v, (list, tuple)) for v in value) else _ITEMS_PER_LINE
        rows = [", ".join(items[i:i + per_line]) for i in range(0, len(items), per_line)]
        return "[\n    " + ",\n    ".join(rows) + ",\n]"
    if isinstance(value, dict):  # a small table of name = number, written inline
        return "{ " + ", ".join(f"{_toml_key(k)} = {_toml_value(v)}" for k, v in value.items()) + " }"
    return tomli_w.dumps({"v": value})[len("v = "):].rstrip("\n")


def _toml_key(key: str) -> str:
    return key if re.fullmatch(r"[A-Za-z0-9_-]+", key) else json.dumps(key)


def dumps_project(project: Project) -> str:
    """The project as TOML text in the file layout; loads back to an equal ``Project``."""
    d = project_to_dict(project)
    out = [_HEADER, ""]

    def table(header: str, body: dict, inline_tables: bool = False) -> None:
        out.append(header)
        out.extend(f"{key} = {_toml_value(value)}" for key, value in body.items()
                   if inline_tables or not isinstance(value, dict) or header == "[[case]]")
        out.append("")

    table("[project]", d["project"])
    table("[limits]", d["limits"])
    for name, body in d["limits"].get("region", {}).items():
        table(f"[limits.region.{name}]", body)
    table("[inlet]", d["inlet"])
    if "schedule" in d["inlet"]:
        table("[inlet.schedule]", d["inlet"]["schedule"])
    for item in d["engine"]["rating"]:
        table("[[engine.rating]]", item)
        if "stability" in item:
            table("[engine.rating.stability]", item["stability"], inline_tables=True)
    table("[envelope]", d["envelope"])
    table("[grid]", d["grid"])
    for item in d["case"]:
        table("[[case]]", item)
    if "characteristics" in d:
        table("[characteristics]", d["characteristics"])
    return "\n".join(out)


def table_path_from(project: Project, path: str | os.PathLike) -> Project:
    """The project with its characteristics table named relative to ``path``'s folder (Save As to another
    folder keeps pointing at the same table); unchanged when no table was read."""
    table = getattr(project.characteristics, "table", None)
    if project.characteristics_file is None or table is None:
        return project
    import dataclasses

    folder = os.path.dirname(os.path.abspath(os.fspath(path)))
    try:
        relative = os.path.relpath(os.path.abspath(table.path), folder).replace(os.sep, "/")
    except ValueError:  # another drive (Windows): no relative path exists, the absolute one still reads
        relative = os.path.abspath(table.path).replace(os.sep, "/")
    return dataclasses.replace(project, characteristics_file=relative)


def save_project(project: Project, path: str | os.PathLike, overwrite_read_only: bool = False, *,
                 expected: Fingerprint | None = None, overwrite: bool = False) -> Fingerprint | None:
    """Write ``project`` to ``path`` atomically (``write_bytes_atomic``); returns the new file's ``Fingerprint``.

    A read-only file at ``path`` is not replaced: ``ProjectSaveError`` says so, unless
    ``overwrite_read_only=True`` (the program asks the user first); the new file keeps the old permissions.
    ``expected``: the fingerprint of the file when it was opened or last saved (``file_fingerprint``, or what
    the last ``save_project`` returned); when the file on disk is no longer that file (another program or
    window saved it since), ``FileChangedError`` (a ``ProjectSaveError``) is raised and nothing is written,
    unless ``overwrite=True``. Without ``expected`` the file is not compared.
    On any ``OSError`` the previous file is left as it was and ``ProjectSaveError`` is raised.
    """
    from engine_air.project.fingerprint import bytes_fingerprint, check_unchanged  # only when saving

    if expected is not None and not overwrite:
        check_unchanged(path, expected)
    if not overwrite_read_only and is_read_only(path):
        raise ProjectSaveError(os.fspath(path), "the file is read-only; it was not replaced (save under another "
                                                "name, or make the file writable first)", errno.EACCES)
    data = dumps_project(table_path_from(project, path)).encode("utf-8")
    try:
        write_bytes_atomic(path, data)
    except OSError as exc:
        raise ProjectSaveError(os.fspath(path), exc.strerror or str(exc), exc.errno) from exc
    return bytes_fingerprint(path, data)
