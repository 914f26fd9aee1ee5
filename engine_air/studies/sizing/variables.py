"""Design variables: which numbers of the inlet a study may vary, their units, current values, edits and the
interval the project-file rules allow.

Names: the common keys (``capture_area_m2``, ``throat_area_m2``, ``face_area_m2``, ``duct_loss_coefficient``),
the inlet type's own (from its module in ``engine_air.inlets``: e.g. ``ramp_angles_deg[k]``,
``shock_on_lip_mach``, ``cone_half_angles_deg[k]``), airflow management (``bleed_fraction``, ``bypass_area_m2``,
``auxiliary_inlet_area_m2``) and schedule values (``schedule.KEY[i]``, ``schedule.ramp_angles_deg[i][k]``).
Indices count from 1. Bounds come from the one schema (``engine_air.project.schema``); rules between keys and
the inlet type's design checks are found by bisection on ``validate_project``.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace
from typing import Mapping

import numpy as np

from engine_air.inlets.registry import INLET_TYPES, inlet_type
from engine_air.project import schema as S
from engine_air.project import validate_project
from engine_air.project.errors import ProjectError
from engine_air.project.model import Project

COMMON_VARIABLES = ("capture_area_m2", "throat_area_m2", "face_area_m2", "duct_loss_coefficient")
AREA_VARIABLES = ("capture_area_m2", "throat_area_m2", "face_area_m2")
AIRFLOW_VARIABLES = ("bleed_fraction", "bypass_area_m2", "auxiliary_inlet_area_m2")
"""Airflow-management design variables (method section 12)."""

_LABELS = {
    "capture_area_m2": "Capture area A_c",
    "throat_area_m2": "Throat area A_th",
    "face_area_m2": "Face area A_2",
    "duct_loss_coefficient": "Duct loss coefficient K",
    "shock_on_lip_mach": "Shock-on-lip Mach number",
    "bleed_fraction": "Bleed fraction b",
    "bypass_area_m2": "Bypass door area",
    "auxiliary_inlet_area_m2": "Auxiliary door area",
    "internal_recovery_factor": "Internal recovery factor",
}
_INDEXED_LABELS = {"ramp_angles_deg": "Ramp {k} deflection", "cone_half_angles_deg": "Cone {k} half-angle"}
_INDEXED_RE = re.compile(r"^([a-z_0-9]+)\[(\d+)\]$")
_SCHEDULE_RE = re.compile(r"^schedule\.(throat_area_m2|shock_on_lip_mach|bleed_fraction|ramp_angles_deg)"
                          r"\[(\d+)\](?:\[(\d+)\])?$")
_TINY = 1e-9


def _key_of(variable: str) -> str:
    """The file key a variable edits: ``ramp_angles_deg[2]`` → ``ramp_angles_deg``."""
    m = _SCHEDULE_RE.match(variable)
    if m:
        return m.group(1)
    m = _INDEXED_RE.match(variable)
    return m.group(1) if m else variable


def _field(variable: str, inlet_type_name: str | None = None):
    return S.field(f"inlet.{_key_of(variable)}", inlet_type_name)


def _types_with(key: str) -> list[str]:
    return [name for name, kind in INLET_TYPES.items() if any(f.key == key for f in kind.fields)]


# -- names -------------------------------------------------------------------------

def design_variables(project: Project) -> list[str]:
    """The design variables that apply to ``project``'s inlet, e.g. ``["capture_area_m2", ..., "ramp_angles_deg[1]"]``."""
    inlet = project.inlet
    names = list(COMMON_VARIABLES) + list(inlet_type(inlet.type).design_variables(inlet)) + list(AIRFLOW_VARIABLES)
    sched = inlet.schedule
    if sched is not None:
        for key in ("throat_area_m2", "shock_on_lip_mach", "bleed_fraction"):
            if getattr(sched, key) is not None:
                names += [f"schedule.{key}[{i + 1}]" for i in range(len(sched.mach))]
        if sched.ramp_angles_deg is not None:
            names += [f"schedule.ramp_angles_deg[{i + 1}][{k + 1}]" for i, row in enumerate(sched.ramp_angles_deg)
                      for k in range(len(row))]
    return names


def _parse_schedule(project: Project, variable: str):
    """("schedule.KEY", (row, ramp or None)) from 0 for a schedule value; None when ``variable`` is not one."""
    m = _SCHEDULE_RE.match(variable)
    if m is None:
        return None
    key, row, ramp = m.group(1), int(m.group(2)), m.group(3)
    sched = project.inlet.schedule
    if sched is None or getattr(sched, key) is None:
        raise ProjectError(None, variable, None, f"the inlet has no [inlet.schedule] {key} list to vary")
    n = len(sched.mach)
    if not 1 <= row <= n:
        raise ProjectError(None, variable, None, f"schedule row must be from 1 to {n}")
    if (key == "ramp_angles_deg") != (ramp is not None):
        raise ProjectError(None, variable, None, "write schedule.ramp_angles_deg[row][ramp] for a ramp angle "
                                                 "and schedule.KEY[row] for the other schedule lists")
    if ramp is not None:
        n_ramps = len(sched.ramp_angles_deg[row - 1])
        if not 1 <= int(ramp) <= n_ramps:
            raise ProjectError(None, variable, None, f"ramp number must be from 1 to {n_ramps}")
        return f"schedule.{key}", (row - 1, int(ramp) - 1)
    return f"schedule.{key}", (row - 1, None)


def parse_variable(project: Project, variable: str) -> tuple[str, object]:
    """(key, index) of a design variable: index None for a plain key, k from 0 for ``key[k]``, (row, ramp)
    from 0 for a schedule value. ``ProjectError`` for an unknown variable or one of another inlet type."""
    names = design_variables(project)
    allowed = ", ".join(names)
    if not isinstance(variable, str):
        raise ProjectError(None, "variable", variable, f"must be one of {allowed}")
    scheduled_value = _parse_schedule(project, variable)
    if scheduled_value is not None:
        return scheduled_value
    key = _key_of(variable)
    if variable not in names:
        owners = _types_with(key)
        if owners and project.inlet.type not in owners:
            kinds = ", ".join(f'"{t}"' for t in owners)
            raise ProjectError(None, variable, None, f'applies to type = {kinds} inlets only; this one is '
                                                     f'"{project.inlet.type}". Choose one of {allowed}')
        m = _INDEXED_RE.match(variable)
        if m and owners:
            n = len(getattr(project.inlet, key))
            raise ProjectError(None, variable, None, f"{key} number must be from 1 to {n}; choose one of {allowed}")
        raise ProjectError(None, "variable", variable, f"unknown design variable; choose one of {allowed}")
    m = _INDEXED_RE.match(variable)
    return (key, int(m.group(2)) - 1) if m else (variable, None)


def variable_unit(variable: str) -> str:
    """SI unit of a design variable ("" for dimensionless), from the schema."""
    try:
        return _field(variable).unit
    except KeyError:
        return ""


def variable_label(variable: str) -> str:
    """Plain-words name, e.g. "Ramp 2 deflection" for ``ramp_angles_deg[2]``."""
    m = _SCHEDULE_RE.match(variable)
    if m:
        what = _LABELS.get(m.group(1), m.group(1)) if m.group(3) is None else f"Ramp {m.group(3)} deflection"
        return f"{what}, schedule row {m.group(2)}"
    m = _INDEXED_RE.match(variable)
    if m and m.group(1) in _INDEXED_LABELS:
        return _INDEXED_LABELS[m.group(1)].format(k=m.group(2))
    return _LABELS.get(variable, variable)


# -- values and edits --------------------------------------------------------------

def design_value(project: Project, variable: str) -> float:
    """The current value of ``variable`` in ``project`` (SI, see the module text)."""
    name, k = parse_variable(project, variable)
    if name.startswith("schedule."):
        table = getattr(project.inlet.schedule, name.split(".", 1)[1])
        row, ramp = k
        return float(table[row] if ramp is None else table[row][ramp])
    value = getattr(project.inlet, name)
    if k is not None:
        return float(value[k])
    if value is None:
        raise ProjectError(None, f"inlet.{name}", None, "is not set in this project")
    return float(value)


def finite_number(name: str, value) -> float:
    """``value`` as a finite float; ``ProjectError`` naming ``name`` otherwise."""
    if isinstance(value, bool) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise ProjectError(None, name, value, "must be a number")
    x = float(value)
    if not math.isfinite(x):
        raise ProjectError(None, name, value, "must be a finite number")
    return x


def with_design_values(project: Project, values: Mapping[str, float]) -> Project:
    """``project`` with several design variables set at once, validated once by the schema's rules.

    Setting them together matters when the rules tie them (a throat may not exceed the capture area): the
    intermediate states are never judged. Raises ``ProjectError`` (key path such as ``inlet.throat_area_m2``,
    the value and what is allowed) when the result breaks any project-file rule.

    Example: ``with_design_values(p, {"capture_area_m2": 0.3, "throat_area_m2": 0.25})``.
    """
    inlet = project.inlet
    changes: dict = {}
    indexed: dict[str, list] = {}
    schedule_changes: dict = {}
    for variable, value in values.items():
        name, k = parse_variable(project, variable)
        x = finite_number(variable, value)
        if name.startswith("schedule."):
            key = name.split(".", 1)[1]
            table = schedule_changes.get(key, getattr(inlet.schedule, key))
            row, ramp = k
            rows = list(table)
            rows[row] = x if ramp is None else tuple(x if j == ramp else v for j, v in enumerate(rows[row]))
            schedule_changes[key] = tuple(rows)
        elif k is None:
            changes[name] = x
        else:
            indexed.setdefault(name, list(getattr(inlet, name)))[k] = x
    for name, entries in indexed.items():
        changes[name] = tuple(entries)
    if schedule_changes:
        changes["schedule"] = replace(inlet.schedule, **schedule_changes)
    edited = replace(project, inlet=replace(inlet, **changes))
    validate_project(edited)
    return edited


def with_design_value(project: Project, variable: str, value: float) -> Project:
    """``project`` with one design variable set to ``value`` (SI units), validated.

    Raises ``ProjectError`` for an unknown variable, a variable that does not apply
    to the inlet type, or a value that breaks a rule, e.g.
    ``inlet.throat_area_m2 = 0.6: must not exceed capture_area_m2 = 0.55 m^2``.

    Example: ``with_design_value(p, "ramp_angles_deg[2]", 6.5)`` sets the second ramp to 6.5 deg.
    """
    return with_design_values(project, {variable: value})


def is_valid(project: Project, variable: str, value: float) -> bool:
    """True when setting ``variable`` to ``value`` keeps every project-file rule."""
    try:
        with_design_value(project, variable, value)
    except ProjectError:
        return False
    return True


def _bisect_valid_edge(project, variable, good: float, bad: float, iterations: int = 60) -> float:
    """The last valid value between ``good`` (valid) and ``bad`` (not), by bisection."""
    for _ in range(iterations):
        mid = 0.5 * (good + bad)
        if mid in (good, bad):
            break
        if is_valid(project, variable, mid):
            good = mid
        else:
            bad = mid
    return good


# -- what the rules allow ------------------------------------------------------------

@dataclass(frozen=True)
class AllowedRange:
    """What the project-file rules allow for a variable, the other values held."""

    lower: float
    upper: float
    lower_reason: str
    upper_reason: str


def allowed_range(project: Project, variable: str) -> AllowedRange:
    """The interval of values the project-file rules allow for ``variable`` (others held).

    The key's own bounds come from the schema (an open lower end is returned as a value just inside it);
    the rules between keys (a throat no larger than the capture area, a total ramp deflection) and the
    inlet type's design checks (shocks attached at the design Mach number, at every schedule row) narrow it,
    found by bisection on the rules from the current value.
    """
    name, k = parse_variable(project, variable)
    inlet = project.inlet
    f = _field(variable, inlet.type)
    key = _key_of(variable)
    lo = 0.0 if f.lo is None else float(f.lo)
    hi = math.inf if f.hi is None else float(f.hi)
    if f.lo_open or (f.unit == "m^2" and lo == 0.0):
        lo = lo + max(_TINY, _TINY * abs(lo)) if key != "throat_area_m2" else _TINY * inlet.capture_area_m2
    if f.hi_open:
        hi = hi - max(_TINY, _TINY * abs(hi))
    unit = f" {f.unit}" if f.unit else ""
    lo_reason = f"the file allows {f.bounds_text()}"
    hi_reason = f"largest value allowed, {hi:g}{unit}"
    if key in AREA_VARIABLES and f.lo == 0.0:
        lo_reason = "areas must be positive"
    if name == "capture_area_m2":
        sched = inlet.schedule
        largest = inlet.throat_area_m2
        if sched is not None and sched.throat_area_m2 is not None:
            largest = max(largest, max(sched.throat_area_m2))
        lo, lo_reason = largest, f"throat area {largest:g} m^2 (the throat may not exceed the capture area)"
        if sched is not None and sched.throat_area_m2 is not None and largest > inlet.throat_area_m2:
            lo_reason = f"largest scheduled throat area {largest:g} m^2 (the throat may not exceed the capture area)"
    if key == "throat_area_m2":
        hi, hi_reason = inlet.capture_area_m2, f"capture area {inlet.capture_area_m2:g} m^2 (the throat may not exceed it)"
    if name == "ramp_angles_deg":
        from engine_air.inlets.external_ramp import MAX_TOTAL_RAMP_DEG

        others = sum(inlet.ramp_angles_deg) - inlet.ramp_angles_deg[k]
        if MAX_TOTAL_RAMP_DEG - others < hi:
            hi, hi_reason = MAX_TOTAL_RAMP_DEG - others, f"total deflection at most {MAX_TOTAL_RAMP_DEG:g} deg"
        lo = max(lo, 1e-6)
    # rules between keys and design checks: bisect from the current value
    current = design_value(project, variable)
    if math.isfinite(hi) and not is_valid(project, variable, hi):
        if is_valid(project, variable, current):
            hi = _bisect_valid_edge(project, variable, good=current, bad=hi)
            hi_reason = _design_reason(inlet, key)
    if not is_valid(project, variable, lo):
        good = current if is_valid(project, variable, current) else hi
        lo = _bisect_valid_edge(project, variable, good=good, bad=lo)
        lo_reason = _design_reason(inlet, key, lower=True)
    return AllowedRange(lo, hi, lo_reason, hi_reason)


def _design_reason(inlet, key: str, lower: bool = False) -> str:
    if key == "shock_on_lip_mach" and lower:
        return "the shocks of this design stay attached only from this Mach number up"
    if inlet.schedule is not None:
        return "shocks stay attached at each schedule row's geometry"
    if inlet.shock_on_lip_mach is not None:
        return f"shocks stay attached at the shock-on-lip Mach {inlet.shock_on_lip_mach:g}"
    return "the project-file rules between keys"


def default_search_range(project: Project, variable: str) -> tuple[float, float]:
    """The search interval used when none is given: half to twice an area, 0 to max(0.2, 4K),
    the whole allowed range of an angle or a fraction, 1 + (M_d - 1)/2 to 1 + 2 (M_d - 1);
    clipped to the rules."""
    v = design_value(project, variable)
    allowed = allowed_range(project, variable)
    key = _key_of(variable)
    unit = variable_unit(variable)
    if unit == "m^2" and v > 0.0:
        lo, hi = 0.5 * v, 2.0 * v
    elif key == "duct_loss_coefficient":
        lo, hi = 0.0, max(0.2, 4.0 * v)
    elif key in ("ramp_angles_deg", "cone_half_angles_deg") and not variable.startswith("schedule."):
        lo, hi = min(0.5, v), allowed.upper
    elif key == "shock_on_lip_mach" and not variable.startswith("schedule."):
        lo, hi = 1.0 + 0.5 * (v - 1.0), 1.0 + 2.0 * (v - 1.0)
    else:
        lo, hi = allowed.lower, allowed.upper
    return max(lo, allowed.lower), min(hi, allowed.upper)
