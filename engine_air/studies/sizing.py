"""Design answers for one design variable: the feasible range and an optimum inside it.

A *design variable* is one number of the inlet that the designer chooses:

==========================  =====  ==============================================
name                        unit   meaning
==========================  =====  ==============================================
``capture_area_m2``         m^2    capture (highlight) area A_c, station 1
``throat_area_m2``          m^2    inlet throat area A_th
``face_area_m2``            m^2    engine-face flow area A_2 (hub removed)
``duct_loss_coefficient``   -      K of the duct loss pi_duct = 1 - K q2/p_t2
``ramp_angles_deg[k]``      deg    deflection of ramp k (k = 1..n), ramp inlets
``shock_on_lip_mach``       -      shock-on-lip design Mach number, ramp inlets
``bleed_fraction``          -      bleed b, fraction of the captured flow
``bypass_area_m2``          m^2    bypass door area (supersonic flight)
``auxiliary_inlet_area_m2`` m^2    auxiliary take-off door area
``schedule.KEY[i]``         (KEY)  row i (1..n) of ``[inlet.schedule]`` KEY: ``throat_area_m2``,
                                   ``shock_on_lip_mach``, ``bleed_fraction``
``schedule.ramp_angles_deg[i][k]`` deg  ramp k of schedule row i
==========================  =====  ==============================================

``with_design_value(project, variable, value)`` makes the edited project and
validates it with the project-file rules (``ProjectError`` for a value out of
rule, e.g. a throat larger than the capture area).

``feasible_range(project, variable, lower, upper)`` answers "for which values
does every limit hold at every envelope point of every case?". It uses the
*worst relative margin*

    g(v) = min over cases c, envelope points (M0, H), checks k of  m_k / |L_k|

(``m_k`` the check's margin in its own units, ``L_k`` its limit; a choked face or
throat counts as -1 or less), so that g(v) >= 0 exactly when every limit holds.
g is scanned at ``scan_points`` evenly spaced values (each one full vectorised
envelope evaluation), and every change between feasible and infeasible
neighbours is refined by ``scipy.optimize.brentq`` on g, then closed by
bisection, to a bracket narrower than ``rtol`` (1e-6) times the value. Each end of
a feasible interval names the limit and the point (Mach, altitude, case) that
fails just beyond it. A feasible interval narrower than the scan spacing can be
missed: raise ``scan_points`` when that matters.

``optimise(project, variable, objective, at, within)`` minimises a figure inside
the feasible range with ``scipy.optimize.minimize_scalar(method="bounded")``,
and also tries the interval's ends (a monotone figure is best at an end).
Objectives: ``"spillage_fraction"``, ``"additive_drag_coefficient"``,
``"spillage_drag_coefficient"`` at a named point ``at = (mach, altitude_m, case)``,
or ``"-worst_margin"`` (maximise g over the whole envelope).

Worked example (checked in the tests): a pitot inlet with generous capture and
throat areas whose engine demands at most W_c2 = 100 kg/s, and a face Mach limit
of 0.4. The face Mach follows from the corrected flow per unit face area alone
(method section 3): MFP(0.4) p_ref / sqrt(T_ref) = 151.708920543 kg/(s m^2), so the
smallest face area is A_2 = 100 / 151.708920543 = 0.65916 m^2::

    >>> from engine_air.project.toml_file import project_from_dict
    >>> project = project_from_dict({
    ...     "project": {"format": 1, "title": "worked example"},
    ...     "limits": {"face_mach_max": 0.4},
    ...     "inlet": {"type": "pitot", "capture_area_m2": 5.0, "throat_area_m2": 4.5,
    ...               "face_area_m2": 1.0, "duct_loss_coefficient": 0.0},
    ...     "engine": {"rating": [{"name": "max", "theta": [0.8, 1.2],
    ...                            "corrected_flow_kg_s": [100.0, 100.0]}]},
    ...     "envelope": {"mach": [0.2, 0.8, 0.8, 0.2],
    ...                  "altitude_m": [0.0, 0.0, 10000.0, 10000.0]},
    ...     "grid": {"mach_points": 9, "altitude_points": 7},
    ...     "case": [{"name": "std", "rating": "max"}]})
    >>> r = feasible_range(project, "face_area_m2", 0.3, 1.5)
    >>> low = r.intervals[0].lower
    >>> print(f"{low.value:.5f} m^2, bounded by {low.check}")
    0.65916 m^2, bounded by face-mach
"""

from __future__ import annotations

import math
import re
import time
from dataclasses import dataclass, field, replace
from typing import Callable, Mapping

import numpy as np
from scipy.optimize import brentq, minimize_scalar

from engine_air.envelope import flags as F
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import Cancelled, MapResult, evaluate_project
from engine_air.flow.match import evaluate_conditions
from engine_air.project.model import Project
from engine_air.project import MAX_AREA_M2, MAX_RAMP_DEG, MAX_TOTAL_RAMP_DEG, project_from_dict, project_to_dict

AREA_VARIABLES = ("capture_area_m2", "throat_area_m2", "face_area_m2")
SCALAR_VARIABLES = AREA_VARIABLES + ("duct_loss_coefficient", "shock_on_lip_mach")
UNITS = {
    "capture_area_m2": "m^2",
    "throat_area_m2": "m^2",
    "face_area_m2": "m^2",
    "duct_loss_coefficient": "",
    "ramp_angles_deg": "deg",
    "shock_on_lip_mach": "",
}
LABELS = {
    "capture_area_m2": "Capture area A_c",
    "throat_area_m2": "Throat area A_th",
    "face_area_m2": "Face area A_2",
    "duct_loss_coefficient": "Duct loss coefficient K",
    "ramp_angles_deg": "Ramp deflection",
    "shock_on_lip_mach": "Shock-on-lip Mach number",
}
POINT_OBJECTIVES = ("spillage_fraction", "additive_drag_coefficient", "spillage_drag_coefficient")
OBJECTIVES = POINT_OBJECTIVES + ("-worst_margin",)
"""Figures ``optimise`` can minimise (the first three at a named point)."""

DEFAULT_SCAN_POINTS = 25
MIN_SCAN_POINTS, MAX_SCAN_POINTS = 3, 201
RTOL = 1e-6
"""Relative width to which each boundary of the feasible range is closed."""

_RAMP_RE = re.compile(r"^ramp_angles_deg\[(\d+)\]$")
AIRFLOW_VARIABLES = ("bleed_fraction", "bypass_area_m2", "auxiliary_inlet_area_m2")
"""Airflow-management design variables (method section 12)."""
_SCHEDULE_RE = re.compile(r"^schedule\.(throat_area_m2|shock_on_lip_mach|bleed_fraction|ramp_angles_deg)"
                          r"\[(\d+)\](?:\[(\d+)\])?$")
UNITS.update({"bleed_fraction": "", "bypass_area_m2": "m^2", "auxiliary_inlet_area_m2": "m^2"})
LABELS.update({"bleed_fraction": "Bleed fraction b", "bypass_area_m2": "Bypass door area",
               "auxiliary_inlet_area_m2": "Auxiliary door area"})


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


def _schedule_value(project: Project, name: str, k) -> float:
    table = getattr(project.inlet.schedule, name.split(".", 1)[1])
    row, ramp = k
    return float(table[row] if ramp is None else table[row][ramp])


# -- variables -------------------------------------------------------------------

def _parse(project: Project, variable: str) -> tuple[str, int | None]:
    """(field name, ramp index from 0 or None); ProjectError for an unknown or inapplicable variable."""
    allowed = ", ".join(design_variables(project))
    if not isinstance(variable, str):
        raise ProjectError(None, "variable", variable, f"must be one of {allowed}")
    scheduled_value = _parse_schedule(project, variable)
    if scheduled_value is not None:
        return scheduled_value
    if variable in AIRFLOW_VARIABLES:
        return variable, None
    if variable in SCALAR_VARIABLES:
        if variable == "shock_on_lip_mach" and project.inlet.type != "external-ramp":
            raise ProjectError(None, variable, None,
                               f'applies to type = "external-ramp" inlets only; this one is "{project.inlet.type}". '
                               f"Choose one of {allowed}")
        return variable, None
    m = _RAMP_RE.match(variable)
    if m:
        k = int(m.group(1))
        n = len(project.inlet.ramp_angles_deg)
        if project.inlet.type != "external-ramp" or n == 0:
            raise ProjectError(None, variable, None,
                               f'applies to type = "external-ramp" inlets only; this one is "{project.inlet.type}". '
                               f"Choose one of {allowed}")
        if not 1 <= k <= n:
            raise ProjectError(None, variable, None, f"ramp number must be from 1 to {n}; choose one of {allowed}")
        return "ramp_angles_deg", k - 1
    raise ProjectError(None, "variable", variable, f"unknown design variable; choose one of {allowed}")


def design_variables(project: Project) -> list[str]:
    """The design variables that apply to ``project``'s inlet, e.g. ``["capture_area_m2", ..., "ramp_angles_deg[1]"]``."""
    names = list(SCALAR_VARIABLES[:4])
    if project.inlet.type == "external-ramp":
        names += [f"ramp_angles_deg[{k + 1}]" for k in range(len(project.inlet.ramp_angles_deg))]
        names.append("shock_on_lip_mach")
    names += list(AIRFLOW_VARIABLES)
    sched = project.inlet.schedule
    if sched is not None:
        for key in ("throat_area_m2", "shock_on_lip_mach", "bleed_fraction"):
            if getattr(sched, key) is not None:
                names += [f"schedule.{key}[{i + 1}]" for i in range(len(sched.mach))]
        if sched.ramp_angles_deg is not None:
            names += [f"schedule.ramp_angles_deg[{i + 1}][{k + 1}]" for i, row in enumerate(sched.ramp_angles_deg)
                      for k in range(len(row))]
    return names


def variable_unit(variable: str) -> str:
    """SI unit of a design variable ("" for dimensionless)."""
    m = _SCHEDULE_RE.match(variable)
    if m:
        return UNITS[m.group(1)]
    return UNITS["ramp_angles_deg" if variable.startswith("ramp_angles_deg") else variable]


def variable_label(variable: str) -> str:
    """Plain-words name, e.g. "Ramp 2 deflection" for ``ramp_angles_deg[2]``."""
    m = _RAMP_RE.match(variable)
    if m:
        return f"Ramp {m.group(1)} deflection"
    m = _SCHEDULE_RE.match(variable)
    if m:
        what = LABELS[m.group(1)] if m.group(3) is None else f"Ramp {m.group(3)} deflection"
        return f"{what}, schedule row {m.group(2)}"
    return LABELS.get(variable, variable)


def design_value(project: Project, variable: str) -> float:
    """The current value of ``variable`` in ``project`` (SI, see the module table)."""
    name, k = _parse(project, variable)
    if name.startswith("schedule."):
        return _schedule_value(project, name, k)
    if k is not None:
        return float(project.inlet.ramp_angles_deg[k])
    value = getattr(project.inlet, name)
    if value is None:
        raise ProjectError(None, f"inlet.{name}", None, "is not set in this project")
    return float(value)


def _finite(variable: str, value) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise ProjectError(None, variable, value, "must be a number")
    x = float(value)
    if not math.isfinite(x):
        raise ProjectError(None, variable, value, "must be a finite number")
    return x


def with_design_values(project: Project, values: Mapping[str, float]) -> Project:
    """``project`` with several design variables set at once, validated once.

    Setting them together matters when the rules tie them (a throat may not
    exceed the capture area): the intermediate states are never judged. Raises
    ``ProjectError`` (key path such as ``inlet.throat_area_m2``, the value and what
    is allowed) when the result breaks any project-file rule.

    Example: ``with_design_values(p, {"capture_area_m2": 0.3, "throat_area_m2": 0.25})``.
    """
    inlet = project.inlet
    changes: dict = {}
    ramps = list(inlet.ramp_angles_deg)
    schedule_changes: dict = {}
    for variable, value in values.items():
        name, k = _parse(project, variable)
        x = _finite(variable, value)
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
            ramps[k] = x
    if tuple(ramps) != inlet.ramp_angles_deg:
        changes["ramp_angles_deg"] = tuple(ramps)
    if schedule_changes:
        changes["schedule"] = replace(inlet.schedule, **schedule_changes)
    edited = replace(project, inlet=replace(inlet, **changes))
    # Every project-file rule, with the loader's own messages (the data of a
    # loaded project is valid, so only the edit can break a rule).
    project_from_dict(project_to_dict(edited))
    return edited


def with_design_value(project: Project, variable: str, value: float) -> Project:
    """``project`` with one design variable set to ``value`` (SI units), validated.

    Raises ``ProjectError`` for an unknown variable, a variable that does not apply
    to the inlet type, or a value that breaks a rule, e.g.
    ``inlet.throat_area_m2 = 0.6: must not exceed capture_area_m2 = 0.55 m^2``.

    Example: ``with_design_value(p, "ramp_angles_deg[2]", 6.5)`` sets the second ramp to 6.5 deg.
    """
    return with_design_values(project, {variable: value})


def _valid(project: Project, variable: str, value: float) -> bool:
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
        if _valid(project, variable, mid):
            good = mid
        else:
            bad = mid
    return good


@dataclass(frozen=True)
class AllowedRange:
    """What the project-file rules allow for a variable, the other values held."""

    lower: float
    upper: float
    lower_reason: str
    upper_reason: str


def allowed_range(project: Project, variable: str) -> AllowedRange:
    """The interval of values the project-file rules allow for ``variable`` (others held).

    Areas: 0 < A <= 100 m^2 and A_th <= A_c. K: 0..2. A ramp: 0 < delta_k <= 25 deg,
    total <= 40 deg, and every ramp shock attached at the shock-on-lip Mach number
    (found by bisection on the rule). Shock-on-lip Mach: 1 < M_d <= 5 and the ramp
    shocks attached at M_d. An open lower end is returned as a value just inside it.
    """
    name, k = _parse(project, variable)
    inlet = project.inlet
    tiny = 1e-9
    if name.startswith("schedule.") or name in AIRFLOW_VARIABLES:
        return _airflow_allowed_range(project, variable, name)
    if name == "capture_area_m2":
        sched = inlet.schedule
        if sched is not None and sched.throat_area_m2 is not None and max(sched.throat_area_m2) > inlet.throat_area_m2:
            largest = max(sched.throat_area_m2)
            return AllowedRange(largest, MAX_AREA_M2, f"largest scheduled throat area {largest:g} m^2 (the throat "
                                "may not exceed the capture area)", f"largest area allowed, {MAX_AREA_M2:g} m^2")
        return AllowedRange(inlet.throat_area_m2, MAX_AREA_M2, f"throat area {inlet.throat_area_m2:g} m^2 "
                            "(the throat may not exceed the capture area)", f"largest area allowed, {MAX_AREA_M2:g} m^2")
    if name == "throat_area_m2":
        return AllowedRange(tiny * inlet.capture_area_m2, inlet.capture_area_m2, "areas must be positive",
                            f"capture area {inlet.capture_area_m2:g} m^2 (the throat may not exceed it)")
    if name == "face_area_m2":
        return AllowedRange(tiny, MAX_AREA_M2, "areas must be positive", f"largest area allowed, {MAX_AREA_M2:g} m^2")
    if name == "duct_loss_coefficient":
        return AllowedRange(0.0, 2.0, "K may not be negative", "largest K allowed, 2")
    if name == "ramp_angles_deg":
        others = sum(inlet.ramp_angles_deg) - inlet.ramp_angles_deg[k]
        cap = min(MAX_RAMP_DEG, MAX_TOTAL_RAMP_DEG - others)
        reason = (f"largest single ramp, {MAX_RAMP_DEG:g} deg" if cap == MAX_RAMP_DEG
                  else f"total deflection at most {MAX_TOTAL_RAMP_DEG:g} deg")
        lo = 1e-6
        if not _valid(project, variable, cap):
            cap = _bisect_valid_edge(project, variable, good=lo, bad=cap)
            reason = f"ramp shocks stay attached at the shock-on-lip Mach {inlet.shock_on_lip_mach:g}"
        return AllowedRange(lo, cap, "a ramp must turn the flow (deflection > 0)", reason)
    # shock_on_lip_mach
    hi = 5.0
    lo = 1.0 + 1e-6
    reason = "the design Mach number must exceed 1"
    if not _valid(project, variable, lo):
        lo = _bisect_valid_edge(project, variable, good=hi, bad=lo)
        reason = f"ramp shocks of {list(inlet.ramp_angles_deg)} deg stay attached only from this Mach number up"
    return AllowedRange(lo, hi, reason, "largest design Mach number allowed, 5")


def _airflow_allowed_range(project: Project, variable: str, name: str) -> AllowedRange:
    """What the file rules allow for an airflow or schedule variable (others held), by bisection on the rules
    where the design checks (attached shocks at each scheduled geometry) bound it."""
    inlet = project.inlet
    if name in ("bleed_fraction", "schedule.bleed_fraction"):
        return AllowedRange(0.0, 0.5, "bleed may not be negative", "largest bleed fraction allowed, 0.5")
    if name in ("bypass_area_m2", "auxiliary_inlet_area_m2"):
        return AllowedRange(0.0, MAX_AREA_M2, "a door area may not be negative", f"largest area allowed, {MAX_AREA_M2:g} m^2")
    if name == "schedule.throat_area_m2":
        return AllowedRange(1e-9 * inlet.capture_area_m2, inlet.capture_area_m2, "areas must be positive",
                            f"capture area {inlet.capture_area_m2:g} m^2 (the throat may not exceed it)")
    lo, hi = (1e-6, MAX_RAMP_DEG) if name == "schedule.ramp_angles_deg" else (1.0 + 1e-6, 5.0)
    lo_reason = "a ramp must turn the flow" if name == "schedule.ramp_angles_deg" else "the design Mach number must exceed 1"
    hi_reason = f"largest value allowed, {hi:g}"
    current = design_value(project, variable)
    if not _valid(project, variable, hi):
        hi = _bisect_valid_edge(project, variable, good=current, bad=hi)
        hi_reason = "ramp shocks stay attached at this schedule row's geometry"
    if not _valid(project, variable, lo):
        lo = _bisect_valid_edge(project, variable, good=current, bad=lo)
        lo_reason = "ramp shocks stay attached at this schedule row's geometry"
    return AllowedRange(lo, hi, lo_reason, hi_reason)


def default_search_range(project: Project, variable: str) -> tuple[float, float]:
    """The search interval used when none is given: half to twice an area, 0 to max(0.2, 4K),
    the whole allowed range of a ramp, 1 + (M_d - 1)/2 to 1 + 2 (M_d - 1); clipped to the rules."""
    v = design_value(project, variable)
    allowed = allowed_range(project, variable)
    name, _ = _parse(project, variable)
    if name.startswith("schedule.") or name in AIRFLOW_VARIABLES:
        if name in ("schedule.throat_area_m2", "bypass_area_m2", "auxiliary_inlet_area_m2") and v > 0.0:
            lo, hi = 0.5 * v, 2.0 * v
        else:
            lo, hi = allowed.lower, allowed.upper
    elif name in AREA_VARIABLES:
        lo, hi = 0.5 * v, 2.0 * v
    elif name == "duct_loss_coefficient":
        lo, hi = 0.0, max(0.2, 4.0 * v)
    elif name == "ramp_angles_deg":
        lo, hi = min(0.5, v), allowed.upper
    else:
        lo, hi = 1.0 + 0.5 * (v - 1.0), 1.0 + 2.0 * (v - 1.0)
    return max(lo, allowed.lower), min(hi, allowed.upper)


# -- the worst relative margin ---------------------------------------------------

@dataclass(frozen=True)
class WorstPoint:
    """The least relative margin over every check, envelope point and case of one evaluation.

    ``relative_margin`` >= 0 exactly when every limit holds (``holds``).
    ``check`` is None when no check applies anywhere.
    """

    relative_margin: float
    margin: float
    value: float
    check: str | None
    label: str
    limit_text: str
    mach: float
    altitude_m: float
    case: str
    holds: bool
    index: tuple = ()  # (row, column) into the map arrays; () when no check applies

    def where(self) -> str:
        return f"Mach {self.mach:.3f}, {self.altitude_m:.0f} m, case {self.case!r}"


def worst_point(result: MapResult) -> WorstPoint:
    """The worst relative margin of an envelope evaluation and where it occurs."""
    from engine_air.envelope.ranking import worst_point as _worst

    best = _worst([cm.points for cm in result.cases], result.inside)
    holds = all(s.holds for s in result.summary)
    if best is None:
        return WorstPoint(math.inf, math.nan, math.nan, None, "", "", math.nan, math.nan, "", holds)
    cm = result.cases[best.case]
    chk, j = cm.points.checks[best.check], best.index
    rel = float(chk.relative_margin[j])
    return WorstPoint(
        relative_margin=rel, margin=float(chk.margin[j]), value=float(chk.value[j]), check=chk.name,
        label=chk.label, limit_text=chk.limit_text, mach=float(result.mach[j[1]]),
        altitude_m=float(result.altitude_m[j[0]]), case=cm.name, holds=holds, index=(int(j[0]), int(j[1])),
    )


class _Evaluator:
    """g(v) with a cache, an evaluation count, progress and cancel."""

    def __init__(self, project, variable, case_names, cancelled):
        self.project, self.variable, self.case_names = project, variable, case_names
        self.cancelled = cancelled
        self.cache: dict[float, WorstPoint] = {}
        self.count = 0

    def worst(self, value: float) -> WorstPoint:
        value = float(value)
        hit = self.cache.get(value)
        if hit is not None:
            return hit
        if self.cancelled is not None and self.cancelled():
            raise Cancelled()
        edited = with_design_value(self.project, self.variable, value)
        w = worst_point(evaluate_project(edited, self.case_names))
        self.cache[value] = w
        self.count += 1
        return w

    def g(self, value: float) -> float:
        # Clipped so that brentq always sees finite numbers (no check applies -> +inf).
        return float(np.clip(self.worst(value).relative_margin, -1e6, 1e6))


def worst_margin(project: Project, variable: str, value: float, case_names: list[str] | None = None) -> WorstPoint:
    """g(value): the worst relative margin over the envelope with ``variable`` set to ``value``."""
    return worst_point(evaluate_project(with_design_value(project, variable, value), case_names))


# -- the feasible range ----------------------------------------------------------

@dataclass(frozen=True)
class Bound:
    """One end of a feasible interval.

    ``kind``: ``"limit"`` (a limit fails just beyond: ``check``/``label``/
    ``limit_text`` and the point where it fails), ``"search"`` (the end of the
    search interval; the fields describe the closest limit there), or ``"rule"``
    (the end of what the project-file rules allow, ``reason`` says which).
    ``value`` always lies on the feasible side; ``outside`` is the evaluated
    value just beyond (NaN unless ``kind == "limit"``).
    """

    value: float
    kind: str
    check: str | None
    label: str
    limit_text: str
    mach: float
    altitude_m: float
    case: str
    relative_margin_inside: float
    relative_margin_outside: float = math.nan
    outside: float = math.nan
    reason: str = ""

    def describe(self) -> str:
        if self.kind == "limit":
            return (f"{self.label} ({self.limit_text}) fails just beyond, at Mach {self.mach:.3f}, "
                    f"{self.altitude_m:.0f} m, case {self.case!r}")
        if self.kind == "rule":
            return f"end of what the rules allow: {self.reason}"
        closest = f"; closest limit there: {self.label} ({self.limit_text}) at Mach {self.mach:.3f}, " \
                  f"{self.altitude_m:.0f} m, case {self.case!r}, relative margin {self.relative_margin_inside:+.4f}" \
            if self.check else ""
        return "end of the search range (the range may extend beyond it)" + closest


@dataclass(frozen=True)
class Interval:
    lower: Bound
    upper: Bound

    @property
    def width(self) -> float:
        return self.upper.value - self.lower.value

    def contains(self, value: float) -> bool:
        return self.lower.value <= value <= self.upper.value


@dataclass
class SizingResult:
    """The feasible range of one design variable (values in SI, see ``unit``)."""

    variable: str
    unit: str
    current_value: float
    lower: float  # search interval actually scanned
    upper: float
    scan_values: np.ndarray
    scan_margin: np.ndarray  # worst relative margin g at each scanned value
    scan_check: list  # limiting check name at each scanned value
    intervals: list[Interval]
    notes: list[str] = field(default_factory=list)
    evaluations: int = 0
    seconds: float = 0.0
    current: WorstPoint | None = None

    @property
    def feasible(self) -> bool:
        """True when some value in the search interval makes every limit hold."""
        return bool(self.intervals)

    def describe(self) -> list[str]:
        """The answer in plain words, one line each."""
        u = f" {self.unit}" if self.unit else ""
        out = [f"{variable_label(self.variable)} ({self.variable}), searched from {self.lower:.6g} to "
               f"{self.upper:.6g}{u} ({len(self.scan_values)} scan values, {self.evaluations} envelope evaluations, "
               f"{self.seconds:.2f} s)."]
        out.append(f"Current value {self.current_value:.6g}{u}: "
                   + ("every limit holds." if self.current and self.current.holds else
                      (f"{self.current.label} fails ({self.current.where()})." if self.current and self.current.check
                       else "not evaluated.")))
        if not self.intervals:
            worst = int(np.nanargmax(self.scan_margin)) if np.isfinite(self.scan_margin).any() else 0
            out.append("No feasible value: some limit fails somewhere in the envelope for every value scanned. "
                       f"Best scanned value {self.scan_values[worst]:.6g}{u}, worst relative margin "
                       f"{self.scan_margin[worst]:+.4f} ({self.scan_check[worst]}).")
        for i, iv in enumerate(self.intervals):
            out.append(f"Feasible interval {i + 1}: {iv.lower.value:.6g} to {iv.upper.value:.6g}{u}.")
            out.append(f"  lower end {iv.lower.value:.6g}{u}: {iv.lower.describe()}")
            out.append(f"  upper end {iv.upper.value:.6g}{u}: {iv.upper.describe()}")
        out += [f"Note: {n}" for n in self.notes]
        return out


def _check_count(name: str, n) -> int:
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or not MIN_SCAN_POINTS <= n <= MAX_SCAN_POINTS:
        raise ProjectError(None, name, n, f"must be a whole number from {MIN_SCAN_POINTS} to {MAX_SCAN_POINTS}")
    return int(n)


def _search_interval(project, variable, lower, upper, notes) -> tuple[float, float, AllowedRange]:
    allowed = allowed_range(project, variable)
    d_lo, d_hi = default_search_range(project, variable)
    lo = d_lo if lower is None else _finite("lower", lower)
    hi = d_hi if upper is None else _finite("upper", upper)
    if not lo < hi:
        raise ProjectError(None, "lower, upper", (lo, hi), "the search range needs lower < upper")
    if hi < allowed.lower or lo > allowed.upper:
        low_text = "just above 0" if 0 < allowed.lower < 1e-5 else f"{allowed.lower:.6g}"
        raise ProjectError(None, variable, (lo, hi),
                           f"the search range lies outside what the rules allow, {low_text} to "
                           f"{allowed.upper:.6g} ({allowed.lower_reason}; {allowed.upper_reason})")
    if lo < allowed.lower:
        notes.append(f"lower end {lo:.6g} raised to {allowed.lower:.6g}: {allowed.lower_reason}")
        lo = allowed.lower
    if hi > allowed.upper:
        notes.append(f"upper end {hi:.6g} lowered to {allowed.upper:.6g}: {allowed.upper_reason}")
        hi = allowed.upper
    if not lo < hi:
        raise ProjectError(None, variable, (lo, hi), "the search range is empty once clipped to the rules")
    return lo, hi, allowed


def _refine(ev: _Evaluator, good: float, bad: float) -> tuple[float, float]:
    """A bracket (feasible value, infeasible value) around the boundary between ``good`` and ``bad``,
    narrower than RTOL times the value: brentq on g, then bisection on the evaluated points."""
    scale = max(abs(good), abs(bad), 1e-12)
    a, b = sorted((good, bad))
    try:
        brentq(ev.g, a, b, xtol=0.25 * RTOL * scale, rtol=max(0.25 * RTOL, 4 * np.finfo(float).eps), maxiter=100)
    except ValueError:
        pass  # no sign change in the clipped g; bisection below still closes the bracket
    # Among the values evaluated between the two ends, the sign change nearest ``good``
    # with the same orientation (feasible on good's side) is the bracket to keep.
    direction = 1.0 if bad > good else -1.0
    pts = sorted((v for v in ev.cache if a <= v <= b), key=lambda v: direction * (v - good))
    for u, v in zip(pts, pts[1:]):
        if not ev.worst(v).holds:  # the first infeasible value met going from good towards bad
            good, bad = u, v
            break
    while abs(bad - good) > RTOL * max(abs(good), abs(bad)) and abs(bad - good) > 4e-16 * scale:
        mid = 0.5 * (good + bad)
        if mid in (good, bad):
            break
        if ev.worst(mid).holds:
            good = mid
        else:
            bad = mid
    return good, bad


def feasible_range(
    project: Project,
    variable: str,
    lower: float | None = None,
    upper: float | None = None,
    *,
    scan_points: int = DEFAULT_SCAN_POINTS,
    case_names: list[str] | None = None,
    progress: Callable[[float], None] | None = None,
    cancelled: Callable[[], bool] | None = None,
) -> SizingResult:
    """The values of ``variable`` in [lower, upper] for which every limit holds everywhere.

    Parameters
    ----------
    project : Project
        The design; every other value is held.
    variable : str
        A design variable (module table), e.g. ``"face_area_m2"`` (m^2).
    lower, upper : float, optional
        Search interval in the variable's unit; defaults from
        ``default_search_range``. Clipped to what the project-file rules allow
        (noted in ``SizingResult.notes``).
    scan_points : int
        Values scanned evenly from lower to upper (3 to 201; 25 by default).
    case_names : list of str, optional
        Judge only these cases (default: every case).
    progress, cancelled : callables, optional
        ``progress(fraction)`` after each envelope evaluation; ``cancelled()``
        polled before each, raising ``engine_air.envelope.evaluate.Cancelled``.

    Returns
    -------
    SizingResult
        ``intervals`` (possibly empty: ``feasible`` is False and ``describe()``
        says so), each end a ``Bound`` naming the limit and the point that fail
        just beyond it; ``scan_values``/``scan_margin`` for a plot of g(v).

    Each boundary is closed to a bracket narrower than 1e-6 times its value; the
    reported end is the feasible side of the bracket, where every limit holds.
    """
    t_start = time.perf_counter()
    _parse(project, variable)
    n = _check_count("scan_points", scan_points)
    notes: list[str] = []
    lo, hi, allowed = _search_interval(project, variable, lower, upper, notes)
    ev = _Evaluator(project, variable, case_names, cancelled)
    expected = n + 1 + 2 * 16

    def tick():
        if progress is not None:
            progress(min(0.99, ev.count / expected))

    values = np.linspace(lo, hi, n)
    worsts = []
    for v in values:
        worsts.append(ev.worst(v))
        tick()
    current_value = design_value(project, variable)
    current = worst_point(evaluate_project(project, case_names))
    ok = np.array([w.holds for w in worsts])
    transitions = int(np.count_nonzero(ok[1:] != ok[:-1]))
    expected = n + 1 + transitions * 16

    def limit_bound(good, bad) -> Bound:
        wi, wo = ev.worst(good), ev.worst(bad)
        return Bound(value=good, kind="limit", check=wo.check, label=wo.label, limit_text=wo.limit_text,
                     mach=wo.mach, altitude_m=wo.altitude_m, case=wo.case, relative_margin_inside=wi.relative_margin,
                     relative_margin_outside=wo.relative_margin, outside=bad)

    def end_bound(value, at_rule: bool, reason: str) -> Bound:
        w = ev.worst(value)
        return Bound(value=value, kind="rule" if at_rule else "search", check=w.check, label=w.label,
                     limit_text=w.limit_text, mach=w.mach, altitude_m=w.altitude_m, case=w.case,
                     relative_margin_inside=w.relative_margin, reason=reason)

    intervals: list[Interval] = []
    i = 0
    while i < n:
        if not ok[i]:
            i += 1
            continue
        j = i
        while j + 1 < n and ok[j + 1]:
            j += 1
        if i == 0:
            low = end_bound(values[0], values[0] == allowed.lower, allowed.lower_reason)
        else:
            good, bad = _refine(ev, values[i], values[i - 1])
            tick()
            low = limit_bound(good, bad)
        if j == n - 1:
            high = end_bound(values[-1], values[-1] == allowed.upper, allowed.upper_reason)
        else:
            good, bad = _refine(ev, values[j], values[j + 1])
            tick()
            high = limit_bound(good, bad)
        intervals.append(Interval(low, high))
        i = j + 1
    if progress is not None:
        progress(1.0)
    return SizingResult(
        variable=variable, unit=variable_unit(variable), current_value=current_value, lower=lo, upper=hi,
        scan_values=values, scan_margin=np.array([w.relative_margin for w in worsts]),
        scan_check=[w.check for w in worsts], intervals=intervals, notes=notes, evaluations=ev.count + 1,
        seconds=time.perf_counter() - t_start, current=current,
    )


# -- the optimum -----------------------------------------------------------------

@dataclass
class OptimumResult:
    """The best value of ``variable`` for ``objective`` inside the feasible range.

    ``value`` is None when there is no feasible value (``message`` says so).
    ``objective_value`` is the minimised figure: for ``"-worst_margin"`` it is
    minus the worst relative margin g.
    """

    variable: str
    unit: str
    objective: str
    at: tuple | None
    value: float | None
    objective_value: float
    worst: WorstPoint | None
    interval: Interval | None
    sizing: SizingResult
    success: bool
    message: str
    evaluations: int = 0
    seconds: float = 0.0

    def describe(self) -> list[str]:
        u = f" {self.unit}" if self.unit else ""
        if self.value is None:
            return [f"Optimum of {self.objective}: none. {self.message}"]
        where = ""
        if self.at is not None and self.objective in POINT_OBJECTIVES:
            where = f" at Mach {self.at[0]:g}, {self.at[1]:g} m, case {self.at[2]!r}"
        shown = -self.objective_value if self.objective == "-worst_margin" else self.objective_value
        name = "worst relative margin (maximised)" if self.objective == "-worst_margin" else self.objective
        lines = [f"Optimum {self.variable} = {self.value:.6g}{u}: {name}{where} = {shown:.6g}."]
        if self.worst is not None and self.worst.check:
            lines.append(f"  worst relative margin there {self.worst.relative_margin:+.4f}: {self.worst.label} "
                         f"({self.worst.limit_text}) at {self.worst.where()}")
        if self.message:
            lines.append(f"  {self.message}")
        return lines


def _resolve_at(project: Project, at) -> tuple[float, float, str]:
    if at is None:
        raise ProjectError(None, "at", None, "a point objective needs at = (mach, altitude_m, case)")
    try:
        mach, alt, *rest = at
    except (TypeError, ValueError):
        raise ProjectError(None, "at", at, "must be (mach, altitude_m) or (mach, altitude_m, case)") from None
    mach = _finite("at.mach", mach)
    alt = _finite("at.altitude_m", alt)
    if mach < 0:
        raise ProjectError(None, "at.mach", mach, "must be 0 or more")
    case = rest[0] if rest and rest[0] is not None else project.cases[0].name
    if case not in [c.name for c in project.cases]:
        raise ProjectError(None, "at.case", case, "must name a case: " + ", ".join(repr(c.name) for c in project.cases))
    return mach, alt, case


def point_objective(project: Project, objective: str, at) -> tuple[float, list[str]]:
    """The value of a point objective and the point's flag names (NaN when not defined there)."""
    mach, alt, case = _resolve_at(project, at)
    pts = evaluate_conditions(project, project.case(case), np.array([mach]), np.array([alt]))
    return float(np.asarray(pts.value(objective))[0]), F.names_of(int(pts.flags[0]))


def optimise(
    project: Project,
    variable: str,
    objective: str,
    at: tuple | None = None,
    within: SizingResult | tuple[float, float] | None = None,
    *,
    case_names: list[str] | None = None,
    scan_points: int = DEFAULT_SCAN_POINTS,
    progress: Callable[[float], None] | None = None,
    cancelled: Callable[[], bool] | None = None,
) -> OptimumResult:
    """Minimise ``objective`` over the feasible values of ``variable``.

    Parameters
    ----------
    objective : str
        ``"spillage_fraction"`` (1 - MFR, -), ``"additive_drag_coefficient"``
        (D_add/(q0 A_c), -) or ``"spillage_drag_coefficient"`` ((1 - lip suction)
        C_add, -) at the point ``at``; or ``"-worst_margin"``: minus the worst
        relative margin g over the whole envelope (maximises the least margin).
    at : (mach, altitude_m, case) or None
        The named point for a point objective (case default: the first case);
        ignored for ``"-worst_margin"``.
    within : SizingResult, (lower, upper) or None
        The feasible range to search: a result of ``feasible_range``, a search
        interval passed to it, or None for the default search interval.

    Each feasible interval is searched with ``minimize_scalar(method="bounded")``
    (absolute tolerance 1e-6 times the interval's larger end) and its two ends
    are tried too; the best feasible value wins.

    Example: ``optimise(p, "capture_area_m2", "spillage_fraction", at=(0.8, 11000, "cruise"))``
    gives the capture area with the least cruise spillage for which every limit
    still holds (usually the lower end of the feasible range).
    """
    t_start = time.perf_counter()
    if objective not in OBJECTIVES:
        raise ProjectError(None, "objective", objective, "must be one of " + ", ".join(OBJECTIVES))
    point = objective in POINT_OBJECTIVES
    at_resolved = _resolve_at(project, at) if point else None

    def sub_progress(lo, hi):
        return None if progress is None else (lambda f: progress(lo + (hi - lo) * f))

    if isinstance(within, SizingResult):
        sizing = within
        if sizing.variable != variable:
            raise ProjectError(None, "within", sizing.variable, f"is the feasible range of another variable, not {variable}")
    else:
        lo, hi = (None, None) if within is None else within
        sizing = feasible_range(project, variable, lo, hi, scan_points=scan_points, case_names=case_names,
                                progress=sub_progress(0.0, 0.7), cancelled=cancelled)
    unit = variable_unit(variable)
    if not sizing.intervals:
        return OptimumResult(variable, unit, objective, at_resolved, None, math.nan, None, None, sizing, False,
                             "The feasible range is empty: no value makes every limit hold.",
                             sizing.evaluations, time.perf_counter() - t_start)

    count = [0]
    cache: dict[float, float] = {}

    def f(v: float) -> float:
        v = float(v)
        if v in cache:
            return cache[v]
        if cancelled is not None and cancelled():
            raise Cancelled()
        edited = with_design_value(project, variable, v)
        count[0] += 1
        if point:
            x, _ = point_objective(edited, objective, at_resolved)
        else:
            x = -worst_point(evaluate_project(edited, case_names)).relative_margin
        x = x if math.isfinite(x) else 1e30  # undefined: never chosen over a defined value
        cache[v] = x
        if progress is not None:
            progress(min(0.99, 0.7 + 0.3 * count[0] / (40 * len(sizing.intervals))))
        return x

    if point:
        mid_iv = sizing.intervals[0]
        probe = 0.5 * (mid_iv.lower.value + mid_iv.upper.value)
        value0, names = point_objective(with_design_value(project, variable, probe), objective, at_resolved)
        if not math.isfinite(value0):
            why = "; ".join(F.DESCRIPTIONS[n] for n in names if n != "ok") or "not defined there"
            raise ProjectError(None, "objective", objective,
                               f"is not defined at Mach {at_resolved[0]:g}, {at_resolved[1]:g} m, case "
                               f"{at_resolved[2]!r}: {why}")

    best = None
    for iv in sizing.intervals:
        a, b = iv.lower.value, iv.upper.value
        candidates = [a, b]
        if b > a:
            res = minimize_scalar(f, bounds=(a, b), method="bounded",
                                  options={"xatol": RTOL * max(abs(a), abs(b)), "maxiter": 200})
            candidates.append(float(res.x))
        for v in candidates:
            fv = f(v)
            if best is None or fv < best[0]:
                best = (fv, v, iv)
    fv, v, iv = best
    worst = worst_point(evaluate_project(with_design_value(project, variable, v), case_names))
    message = ""
    if v in (iv.lower.value, iv.upper.value):
        end = iv.lower if v == iv.lower.value else iv.upper
        message = f"The optimum lies at an end of the feasible range: {end.describe()}."
    if fv >= 1e30:
        return OptimumResult(variable, unit, objective, at_resolved, None, math.nan, None, iv, sizing, False,
                             "The objective is not defined anywhere in the feasible range.", count[0],
                             time.perf_counter() - t_start)
    if progress is not None:
        progress(1.0)
    return OptimumResult(variable, unit, objective, at_resolved, v, fv, worst, iv, sizing, worst.holds, message,
                         sizing.evaluations + count[0] + 1, time.perf_counter() - t_start)


__all__ = [
    "OBJECTIVES", "POINT_OBJECTIVES", "AllowedRange", "Bound", "Interval", "OptimumResult", "SizingResult",
    "WorstPoint", "allowed_range", "default_search_range", "design_value", "design_variables", "feasible_range",
    "optimise", "point_objective", "variable_label", "variable_unit", "with_design_value", "with_design_values",
    "worst_margin", "worst_point",
]
