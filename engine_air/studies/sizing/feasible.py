"""The feasible range of one design variable: the worst relative margin over the envelope, scanned and refined.

g(v) = min over cases, envelope points and checks of the relative margin; every limit holds exactly where
g(v) >= 0. g is scanned at evenly spaced values and each change between feasible and infeasible neighbours is
refined by Brent's method, then closed by bisection (see the package text of ``engine_air.studies.sizing``).
With ``limits`` only the named checks are judged (``engine_air.studies.sizing.limit_choice``); every check is
judged only inside its region (method section 15). The answer says, per judged limit, which end of the
feasible range it bounds.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from typing import Callable

import numpy as np
from scipy.optimize import brentq

from engine_air.envelope.evaluate import Cancelled, MapResult, evaluate_project
from engine_air.envelope.worst import WorstPoint, worst_point  # noqa: F401  (re-exported by studies.sizing)
from engine_air.project.errors import ProjectError
from engine_air.project.model import Project
from engine_air.studies.sizing.limit_choice import chosen_limits, judged_by
from engine_air.studies.sizing.variables import (
    AllowedRange,
    allowed_range,
    default_search_range,
    design_value,
    finite_number,
    parse_variable,
    variable_label,
    variable_unit,
    with_design_value,
)

DEFAULT_SCAN_POINTS = 25
MIN_SCAN_POINTS, MAX_SCAN_POINTS = 3, 201
"""Values scanned before refining, unless told otherwise."""
RTOL = 1e-6
"""Relative width to which each end of a feasible interval is closed."""


class _Evaluator:
    """g(v) with a cache, an evaluation count, progress and cancel."""

    def __init__(self, project, variable, case_names, cancelled, limits=None):
        self.project, self.variable, self.case_names = project, variable, case_names
        self.cancelled, self.limits = cancelled, limits
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
        w = worst_point(judged_by(evaluate_project(edited, self.case_names), self.limits))
        self.cache[value] = w
        self.count += 1
        return w

    def g(self, value: float) -> float:
        # Clipped so that brentq always sees finite numbers (no check applies -> +inf).
        return float(np.clip(self.worst(value).relative_margin, -1e6, 1e6))


def worst_margin(project: Project, variable: str, value: float, case_names: list[str] | None = None,
                 limits: tuple[str, ...] | None = None) -> WorstPoint:
    """g(value): the worst relative margin over the envelope with ``variable`` set to ``value`` (over the checks
    named in ``limits`` only, when given)."""
    return worst_point(judged_by(evaluate_project(with_design_value(project, variable, value), case_names),
                                 chosen_limits(project, limits)))


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
    limits: tuple[str, ...] = ()  # the checks judged (every check of the project unless some were named)
    limits_named: bool = False  # True when only the named checks were judged

    @property
    def feasible(self) -> bool:
        """True when some value in the search interval makes every limit hold."""
        return bool(self.intervals)

    def limit_ends(self) -> dict[str, list[tuple[int, str, float]]]:
        """Per judged check, the ends of the feasible intervals it bounds: (interval number from 1, "lower" or
        "upper", value); an empty list for a check that bounds no end in the search range."""
        ends: dict[str, list[tuple[int, str, float]]] = {name: [] for name in self.limits}
        for i, iv in enumerate(self.intervals):
            for side, bound in (("lower", iv.lower), ("upper", iv.upper)):
                if bound.kind == "limit" and bound.check is not None:
                    ends.setdefault(bound.check, []).append((i + 1, side, bound.value))
        return ends

    def describe_limits(self) -> list[str]:
        """One line per judged check: which end of the feasible range it bounds."""
        u = f" {self.unit}" if self.unit else ""
        several = len(self.intervals) > 1
        out = ["Limits judged: " + ("only " if self.limits_named else "every check: ") + ", ".join(self.limits)
               + "."]
        for name, ends in self.limit_ends().items():
            if ends:
                text = "; ".join(f"the {side} end" + (f" of interval {i}" if several else "") + f" ({v:.6g}{u})"
                                 for i, side, v in ends)
                out.append(f"  {name}: bounds {text}.")
            elif not self.intervals:
                count = sum(1 for c in self.scan_check if c == name)
                out.append(f"  {name}: the limiting check at {count} of {len(self.scan_check)} values scanned.")
            else:
                out.append(f"  {name}: bounds no end of the feasible range in the search range.")
        return out

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
        out += self.describe_limits()
        out += [f"Note: {n}" for n in self.notes]
        return out


def _check_count(name: str, n) -> int:
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or not MIN_SCAN_POINTS <= n <= MAX_SCAN_POINTS:
        raise ProjectError(None, name, n, f"must be a whole number from {MIN_SCAN_POINTS} to {MAX_SCAN_POINTS}")
    return int(n)


def _search_interval(project, variable, lower, upper, notes) -> tuple[float, float, AllowedRange]:
    allowed = allowed_range(project, variable)
    d_lo, d_hi = default_search_range(project, variable)
    lo = d_lo if lower is None else finite_number("lower", lower)
    hi = d_hi if upper is None else finite_number("upper", upper)
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


def _limit_bound(ev: _Evaluator, good: float, bad: float) -> Bound:
    """The end of a feasible interval where a limit fails just beyond (``bad``)."""
    wi, wo = ev.worst(good), ev.worst(bad)
    return Bound(value=good, kind="limit", check=wo.check, label=wo.label, limit_text=wo.limit_text,
                 mach=wo.mach, altitude_m=wo.altitude_m, case=wo.case, relative_margin_inside=wi.relative_margin,
                 relative_margin_outside=wo.relative_margin, outside=bad)


def _end_bound(ev: _Evaluator, value: float, at_rule: bool, reason: str) -> Bound:
    """The end of a feasible interval at the end of the search range (or of what the rules allow)."""
    w = ev.worst(value)
    return Bound(value=value, kind="rule" if at_rule else "search", check=w.check, label=w.label,
                 limit_text=w.limit_text, mach=w.mach, altitude_m=w.altitude_m, case=w.case,
                 relative_margin_inside=w.relative_margin, reason=reason)


def _intervals(ev: _Evaluator, values: np.ndarray, ok: np.ndarray, allowed: AllowedRange, tick) -> list[Interval]:
    """The feasible intervals from the scan: each run of feasible scan values, its ends refined where a limit
    fails beyond them and kept where the scan (or the rules) end."""
    n = len(values)
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
            low = _end_bound(ev, values[0], values[0] == allowed.lower, allowed.lower_reason)
        else:
            low = _limit_bound(ev, *_refine(ev, values[i], values[i - 1]))
            tick()
        if j == n - 1:
            high = _end_bound(ev, values[-1], values[-1] == allowed.upper, allowed.upper_reason)
        else:
            high = _limit_bound(ev, *_refine(ev, values[j], values[j + 1]))
            tick()
        intervals.append(Interval(low, high))
        i = j + 1
    return intervals


def feasible_range(
    project: Project,
    variable: str,
    lower: float | None = None,
    upper: float | None = None,
    *,
    scan_points: int = DEFAULT_SCAN_POINTS,
    case_names: list[str] | None = None,
    limits: list[str] | tuple[str, ...] | None = None,
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
    limits : list of str, optional
        Judge only these checks (``point --json`` ``checks[].name``; default:
        every check of the project). ``ProjectError`` for a name the project
        has not.
    progress, cancelled : callables, optional
        ``progress(fraction)`` after each envelope evaluation; ``cancelled()``
        polled before each, raising ``engine_air.envelope.evaluate.Cancelled``.

    Returns
    -------
    SizingResult
        ``intervals`` (possibly empty: ``feasible`` is False and ``describe()``
        says so), each end a ``Bound`` naming the limit and the point that fail
        just beyond it; ``scan_values``/``scan_margin`` for a plot of g(v);
        ``limit_ends()`` which end each judged limit bounds.

    Each boundary is closed to a bracket narrower than 1e-6 times its value; the
    reported end is the feasible side of the bracket, where every limit holds.
    """
    t_start = time.perf_counter()
    parse_variable(project, variable)
    n = _check_count("scan_points", scan_points)
    named = chosen_limits(project, limits)
    notes: list[str] = []
    lo, hi, allowed = _search_interval(project, variable, lower, upper, notes)
    ev = _Evaluator(project, variable, case_names, cancelled, named)
    expected = [n + 1 + 2 * 16]

    def tick():
        if progress is not None:
            progress(min(0.99, ev.count / expected[0]))

    values = np.linspace(lo, hi, n)
    worsts = []
    for v in values:
        worsts.append(ev.worst(v))
        tick()
    current_value = design_value(project, variable)
    current_result = judged_by(evaluate_project(project, case_names), named)
    current = worst_point(current_result)
    ok = np.array([w.holds for w in worsts])
    expected[0] = n + 1 + int(np.count_nonzero(ok[1:] != ok[:-1])) * 16
    intervals = _intervals(ev, values, ok, allowed, tick)
    if progress is not None:
        progress(1.0)
    return SizingResult(
        variable=variable, unit=variable_unit(variable), current_value=current_value, lower=lo, upper=hi,
        scan_values=values, scan_margin=np.array([w.relative_margin for w in worsts]),
        scan_check=[w.check for w in worsts], intervals=intervals, notes=notes, evaluations=ev.count + 1,
        seconds=time.perf_counter() - t_start, current=current,
        limits=tuple(s.name for s in current_result.summary), limits_named=named is not None,
    )
