"""An optimum of one design variable inside its feasible range (bounded scalar minimisation).

Objectives: ``"spillage_fraction"``, ``"additive_drag_coefficient"``, ``"spillage_drag_coefficient"`` at a named
point ``at = (mach, altitude_m, case)``, or ``"-worst_margin"`` (maximise the worst relative margin g).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.optimize import minimize_scalar

from engine_air.envelope import flags as F
from engine_air.envelope.evaluate import Cancelled, evaluate_project
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.project.errors import ProjectError
from engine_air.project.model import Project
from engine_air.studies.sizing.feasible import (
    DEFAULT_SCAN_POINTS,
    RTOL,
    Interval,
    SizingResult,
    WorstPoint,
    feasible_range,
    worst_point,
)
from engine_air.studies.sizing.limit_choice import chosen_limits, judged_by
from engine_air.studies.sizing.variables import finite_number, variable_unit, with_design_value

POINT_OBJECTIVES = ("spillage_fraction", "additive_drag_coefficient", "spillage_drag_coefficient")
OBJECTIVES = POINT_OBJECTIVES + ("-worst_margin",)


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


def resolve_point(project: Project, at) -> tuple[float, float, str]:
    if at is None:
        raise ProjectError(None, "at", None, "a point objective needs at = (mach, altitude_m, case)")
    try:
        mach, alt, *rest = at
    except (TypeError, ValueError):
        raise ProjectError(None, "at", at, "must be (mach, altitude_m) or (mach, altitude_m, case)") from None
    mach = finite_number("at.mach", mach)
    alt = finite_number("at.altitude_m", alt)
    if mach < 0:
        raise ProjectError(None, "at.mach", mach, "must be 0 or more")
    case = rest[0] if rest and rest[0] is not None else project.cases[0].name
    if case not in [c.name for c in project.cases]:
        raise ProjectError(None, "at.case", case, "must name a case: " + ", ".join(repr(c.name) for c in project.cases))
    return mach, alt, case


def point_objective(project: Project, objective: str, at) -> tuple[float, list[str]]:
    """The value of a point objective and the point's flag names (NaN when not defined there)."""
    mach, alt, case = resolve_point(project, at)
    pts = evaluate_conditions(project, project.case(case), np.array([mach]), np.array([alt]))
    return float(np.asarray(pts.value(objective))[0]), F.names_of(int(pts.flags[0]))


def _check_point_objective(project, variable, objective, at_resolved, sizing) -> None:
    """A point objective must be defined at its point (probed in the middle of the first feasible interval)."""
    iv = sizing.intervals[0]
    probe = 0.5 * (iv.lower.value + iv.upper.value)
    value0, names = point_objective(with_design_value(project, variable, probe), objective, at_resolved)
    if not math.isfinite(value0):
        why = "; ".join(F.DESCRIPTIONS[n] for n in names if n != "ok") or "not defined there"
        raise ProjectError(None, "objective", objective,
                           f"is not defined at Mach {at_resolved[0]:g}, {at_resolved[1]:g} m, case "
                           f"{at_resolved[2]!r}: {why}")


def _best_value(f, intervals) -> tuple[float, float, Interval]:
    """(objective, value, interval) of the least objective over the feasible intervals: each searched by
    ``minimize_scalar(method="bounded")``, its ends tried too."""
    best = None
    for iv in intervals:
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
    return best


def _sizing_for(project, variable, within, scan_points, case_names, limits, progress, cancelled) -> SizingResult:
    """The feasible range to search: ``within`` when it is one, else computed over ``within`` as a search
    interval (None: the default interval)."""
    if isinstance(within, SizingResult):
        if within.variable != variable:
            raise ProjectError(None, "within", within.variable,
                               f"is the feasible range of another variable, not {variable}")
        return within
    lo, hi = (None, None) if within is None else within
    return feasible_range(project, variable, lo, hi, scan_points=scan_points, case_names=case_names,
                          limits=limits, progress=progress, cancelled=cancelled)


def optimise(
    project: Project,
    variable: str,
    objective: str,
    at: tuple | None = None,
    within: SizingResult | tuple[float, float] | None = None,
    *,
    case_names: list[str] | None = None,
    limits: list[str] | tuple[str, ...] | None = None,
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
    limits : list of str, optional
        Judge only these checks (as ``feasible_range``); with ``within`` a
        ``SizingResult``, the checks it judged unless named here.

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
    at_resolved = resolve_point(project, at) if point else None
    if limits is None and isinstance(within, SizingResult) and within.limits_named:
        limits = within.limits
    named = chosen_limits(project, limits)
    sizing = _sizing_for(project, variable, within, scan_points, case_names, named,
                         None if progress is None else (lambda x: progress(0.7 * x)), cancelled)
    unit = variable_unit(variable)
    if not sizing.intervals:
        return OptimumResult(variable, unit, objective, at_resolved, None, math.nan, None, None, sizing, False,
                             "The feasible range is empty: no value makes every limit hold.",
                             sizing.evaluations, time.perf_counter() - t_start)
    count = [0]
    cache: dict[float, float] = {}

    def worst_at(v: float) -> WorstPoint:
        return worst_point(judged_by(evaluate_project(with_design_value(project, variable, v), case_names), named))

    def f(v: float) -> float:
        v = float(v)
        if v in cache:
            return cache[v]
        if cancelled is not None and cancelled():
            raise Cancelled()
        count[0] += 1
        if point:
            x, _ = point_objective(with_design_value(project, variable, v), objective, at_resolved)
        else:
            x = -worst_at(v).relative_margin
        cache[v] = x if math.isfinite(x) else 1e30  # undefined: never chosen over a defined value
        if progress is not None:
            progress(min(0.99, 0.7 + 0.3 * count[0] / (40 * len(sizing.intervals))))
        return cache[v]

    if point:
        _check_point_objective(project, variable, objective, at_resolved, sizing)
    fv, v, iv = _best_value(f, sizing.intervals)
    worst = worst_at(v)
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
