"""Whole-envelope evaluation: every case of a project on the Mach x altitude grid, and the verdict.

``evaluate_project(project)`` builds the grid over the envelope's bounding box,
masks it by the envelope polygon and evaluates every (or the chosen) case with
the chain of ``engine_air.flow.chain.run_chain``, one vectorised call per case, and judges each case's
points against the limits (``engine_air.envelope.conditions.judge``).
Grid arrays have shape (altitude_points, mach_points): row i is altitude
``altitude_m[i]``, column j is Mach ``mach[j]``.

The summary gives, for each check, whether it holds at every envelope point of
every case, the worst value and margin and where, and the share of envelope
points (over all evaluated cases) at which it fails. Only *judged* points count
(method section 14): inside the envelope and inside the case's region
(``mach_range``, ``altitude_range_m``); a point outside its case's region is
computed, flagged ``outside-case-region`` and judged by no check, so it is in no
verdict and no failing share (failing share = failing judged / judged points).
A check with a region of its own (``[limits.region.NAME]``, method section 15)
is judged only inside it; a check judged at no point of the envelope has the
verdict "not judged anywhere" (``LimitSummary.holds`` is None), never "holds".
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from engine_air.envelope import flags as F
from engine_air.envelope import ranking
from engine_air.envelope.polygon import envelope_mask, grid_axes
from engine_air.project.errors import ProjectError
from engine_air.envelope.conditions import JudgedPoints, judge_ranked
from engine_air.flow.chain import run_chain
from engine_air.project.model import Project
from engine_air.project import MAX_AXIS_POINTS, MAX_CASE_POINTS, MAX_GRID_POINTS, MIN_AXIS_POINTS

WORST = "worst of all cases"


class Cancelled(Exception):
    """Raised inside ``evaluate_project`` when its ``cancelled`` callback says so."""


@dataclass
class CaseMap:
    name: str
    points: JudgedPoints  # arrays of shape (altitude_points, mach_points)


NOT_JUDGED = "not judged anywhere"
"""The verdict of a check judged at no point of the envelope (method section 15)."""


@dataclass
class LimitSummary:
    """One check over the whole envelope. ``holds`` is True or False where the check is judged somewhere,
    None where it is judged nowhere (``verdict`` says "not judged anywhere")."""

    name: str
    label: str
    limit_text: str
    holds: bool | None
    worst_value: float
    worst_margin: float
    worst_mach: float
    worst_altitude_m: float
    worst_case: str
    failing_share: float  # failing points / envelope points judged by this check, all cases
    judged_points: int

    @property
    def judged(self) -> bool:
        return self.holds is not None

    @property
    def fails(self) -> bool:
        return self.holds is False

    @property
    def verdict(self) -> str:
        """"holds", "FAILS" or "not judged anywhere"."""
        return NOT_JUDGED if self.holds is None else ("holds" if self.holds else "FAILS")


@dataclass
class MapResult:
    project: Project
    mach: np.ndarray  # (nx,)
    altitude_m: np.ndarray  # (ny,)
    inside: np.ndarray  # (ny, nx) bool: inside the envelope polygon
    cases: list[CaseMap]
    summary: list[LimitSummary] = field(default_factory=list)

    @property
    def holds(self) -> bool:
        """No limit fails anywhere (a limit judged nowhere does not fail: it is reported apart)."""
        return not any(s.fails for s in self.summary)

    @property
    def judged_summary(self) -> list[LimitSummary]:
        """The limits judged somewhere in the envelope (the ones a count of "limits hold" may count)."""
        return [s for s in self.summary if s.judged]

    @property
    def not_judged(self) -> list[LimitSummary]:
        """The limits judged at no point of the envelope."""
        return [s for s in self.summary if not s.judged]

    def case_map(self, name: str) -> CaseMap:
        for c in self.cases:
            if c.name == name:
                return c
        raise KeyError(name)

    def quantity(self, case: str, key: str) -> np.ndarray:
        """A (ny, nx) map of quantity ``key`` for ``case`` (or WORST), NaN outside the envelope.

        For WORST a margin takes the least value over the cases and a level
        quantity the value of the case whose limiting relative margin is least.
        """
        if case != WORST:
            values = np.array(self.case_map(case).points.value(key), dtype=float)
        else:
            values = self._worst(key)
        return np.where(self.inside, values, np.nan)

    def worst_case_index(self) -> np.ndarray:
        """(ny, nx) index of the case with the least limiting relative margin at each point."""
        return ranking.worst_case_index([c.points for c in self.cases], self.inside.shape)

    def _worst(self, key: str) -> np.ndarray:
        stack = np.stack([np.asarray(c.points.value(key), dtype=float) for c in self.cases])
        if key.endswith("margin") or key == "recovery_minus_reference":
            with np.errstate(invalid="ignore"):
                return np.nanmin(np.where(np.isnan(stack), np.inf, stack), axis=0)
        idx = self.worst_case_index()
        return np.take_along_axis(stack, idx[None], axis=0)[0]

    def flags(self, case: str) -> np.ndarray:
        """(ny, nx) flag bits; for WORST the union over cases."""
        if case != WORST:
            bits = self.case_map(case).points.flags
        else:
            bits = np.bitwise_or.reduce(np.stack([c.points.flags for c in self.cases]), axis=0)
        return np.where(self.inside, bits, bits | F.OUTSIDE_ENVELOPE)

    def judged(self, case: str) -> np.ndarray:
        """(ny, nx) bool: judged points (inside the envelope and the case's region); for WORST, judged in any case."""
        cases = self.cases if case == WORST else [self.case_map(case)]
        out = np.zeros(self.inside.shape, bool)
        for c in cases:
            out |= (c.points.flags & F.OUTSIDE_CASE_REGION) == 0
        return out & self.inside

    def failing(self, case: str, check: str | None = None) -> np.ndarray:
        """(ny, nx) bool: some (or the named) check fails at an envelope point."""
        cases = self.cases if case == WORST else [self.case_map(case)]
        out = np.zeros(self.inside.shape, bool)
        for c in cases:
            for chk in c.points.checks:
                if check is None or chk.name == check:
                    out |= chk.fails
        return out & self.inside


def verdict_text(result: MapResult, names: str = "label") -> str:
    """The overall verdict as one sentence: every judged limit holds, or how many of them fail and which; the
    limits judged at no envelope point are named apart and never counted as holding (method section 15).
    ``names``: "label" or "name" of the failing and unjudged limits."""
    judged, unjudged = result.judged_summary, result.not_judged
    failing = [s for s in judged if s.fails]
    if failing:
        text = (f"{len(failing)} of {len(judged)} limits FAIL somewhere in the envelope: "
                + ", ".join(getattr(s, names) for s in failing) + ".")
    elif judged:
        text = f"all {len(judged)} limits hold at every envelope point of every case."
    else:
        text = "no limit is judged anywhere in the envelope."
    if unjudged:
        one = len(unjudged) == 1
        text += (f" {len(unjudged)} limit{' is' if one else 's are'} not judged anywhere (at no envelope point "
                 f"does {'it' if one else 'any of them'} apply): " + ", ".join(getattr(s, names) for s in unjudged)
                 + ".")
    return text


def not_judged_reason(project: Project, summary: LimitSummary) -> str:
    """Why a limit is judged nowhere: outside its region (``[limits.region.NAME]``) at every envelope point, or
    nowhere in the envelope where the check applies at all (e.g. a supersonic-only check over a subsonic
    envelope)."""
    if project.limits.region(summary.name) is not None:
        return "outside its region (limits.region." + summary.name + ") at every envelope point"
    return "the check applies at no envelope point"


def check_grid_size(project: Project, n_cases: int | None = None) -> None:
    """Refuse a grid the project-file loader would refuse, before any array is allocated.

    A ``Project`` built in code (not read from a file) is not validated by the
    loader; its ``grid`` must still hold whole numbers of points from
    ``MIN_AXIS_POINTS`` to ``MAX_AXIS_POINTS`` per axis, at most
    ``MAX_GRID_POINTS`` per case, and at most ``MAX_CASE_POINTS`` over the
    ``n_cases`` cases evaluated (default: all of the project's). Raises
    ``ProjectError`` (a ``ValueError``) naming the key, the value and the limit.
    """
    grid = project.grid
    for key in ("mach_points", "altitude_points"):
        value = getattr(grid, key)
        if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
            raise ProjectError(None, f"grid.{key}", value,
                               f"must be a whole number from {MIN_AXIS_POINTS} to {MAX_AXIS_POINTS}")
        if not MIN_AXIS_POINTS <= value <= MAX_AXIS_POINTS:
            raise ProjectError(None, f"grid.{key}", value,
                               f"must be a whole number from {MIN_AXIS_POINTS} to {MAX_AXIS_POINTS}")
    points = int(grid.mach_points) * int(grid.altitude_points)
    if points > MAX_GRID_POINTS:
        raise ProjectError(None, "grid", points,
                           f"mach_points x altitude_points = {grid.mach_points} x {grid.altitude_points} = {points} "
                           f"points; at most {MAX_GRID_POINTS} per case are allowed")
    cases = len(project.cases) if n_cases is None else n_cases
    if points * cases > MAX_CASE_POINTS:
        raise ProjectError(None, "case", cases,
                           f"{cases} cases x {points} grid points = {points * cases} case-points; at most "
                           f"{MAX_CASE_POINTS} can be evaluated together: use fewer cases or a coarser grid")


def evaluate_project(
    project: Project,
    case_names: list[str] | None = None,
    progress: Callable[[float], None] | None = None,
    cancelled: Callable[[], bool] | None = None,
) -> MapResult:
    """Evaluate ``project`` over its envelope grid for every case (or those named).

    ``progress(fraction)`` is called after each case; ``cancelled()`` is polled
    before each case and ``Cancelled`` raised when it returns True.
    A grid beyond the file limits raises ``ProjectError`` (see ``check_grid_size``)
    before anything is allocated.
    """
    chosen = [c for c in project.cases if case_names is None or c.name in case_names]
    if case_names is not None:
        unknown = set(case_names) - {c.name for c in project.cases}
        if unknown:
            raise KeyError(f"no case named {sorted(unknown)}; cases are {[c.name for c in project.cases]}")
    check_grid_size(project, len(chosen))
    mach_1d, alt_1d = grid_axes(project.envelope, project.grid)
    inside = envelope_mask(project.envelope, mach_1d[None, :], alt_1d[:, None])
    maps, tallies = [], None
    for i, case in enumerate(chosen):
        if cancelled is not None and cancelled():
            raise Cancelled()
        points, ranked = judge_ranked(project, run_chain(project, case, mach_1d[None, :], alt_1d[:, None]), case)
        points.flags = np.where(inside, points.flags, points.flags | F.OUTSIDE_ENVELOPE)
        maps.append(CaseMap(case.name, points))
        tallies = tallies or [_Tally() for _ in points.checks]
        _tally(tallies, i, points, ranked, inside)  # the summary from the ranks the limiting check was found from
        del ranked
        if progress is not None:
            progress((i + 1) / len(chosen))
    result = MapResult(project, mach_1d, alt_1d, inside, maps)
    result.summary = summarise(result, tallies)
    return result


@dataclass
class _Tally:
    """One check over the cases evaluated so far: what its ``LimitSummary`` is made of."""

    label: str = ""
    limit_text: str = ""
    judged: int = 0
    failing: int = 0
    worst: ranking.Worst | None = None


def _tally(tallies: list[_Tally], n: int, points: JudgedPoints, ranked, inside: np.ndarray) -> None:
    """Add case number ``n`` (its ``points`` and each check's ``(rank, fails)``, unmasked) to ``tallies``: the
    judged and failing envelope points, and the worst point of each check (``ranking.worst_of_check``: the least
    rank inside the envelope, the first case of equal ranks)."""
    for k, chk in enumerate(points.checks):
        rank, fails = ranked[k]
        t = tallies[k]
        t.label, t.limit_text = chk.label, chk.limit_text
        applies = chk.applies & inside
        t.judged += int(applies.sum())
        t.failing += int((fails & applies).sum())
        rank = np.where(inside, rank, np.inf)  # = ranking.check_rank(chk, inside)
        j = ranking.argworst(rank)
        if j is not None and (t.worst is None or rank[j] < t.worst.rank):
            t.worst = ranking.Worst(float(rank[j]), n, k, j)


def summarise(result: MapResult, tallies: list[_Tally] | None = None) -> list[LimitSummary]:
    """Per check over every evaluated case: holds, worst value and where, failing share (from ``tallies`` when
    ``evaluate_project`` made them as it judged each case, else from the result's checks)."""
    if not result.cases:
        return []
    names = [c.name for c in result.cases[0].points.checks]
    if tallies is None:
        tallies = [_Tally() for _ in names]
        for n, cm in enumerate(result.cases):
            _tally(tallies, n, cm.points, [ranking.rank_and_fails(c) for c in cm.points.checks], result.inside)
    out = []
    for name, t in zip(names, tallies):
        if t.worst is None:
            out.append(LimitSummary(name, t.label, t.limit_text, None, np.nan, np.nan, np.nan, np.nan, "", 0.0, 0))
            continue
        case_name, j = result.cases[t.worst.case].name, t.worst.index
        chk = result.cases[t.worst.case].points.checks[t.worst.check].at(j)  # the one point: its margin alone
        out.append(
            LimitSummary(
                name=name,
                label=t.label,
                limit_text=t.limit_text,
                holds=t.failing == 0,
                worst_value=float(chk.value),
                worst_margin=float(chk.margin),
                worst_mach=float(result.mach[j[1]]),
                worst_altitude_m=float(result.altitude_m[j[0]]),
                worst_case=case_name,
                failing_share=t.failing / t.judged if t.judged else 0.0,
                judged_points=t.judged,
            )
        )
    return out
