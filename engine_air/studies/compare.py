"""Two design variants side by side: maps on one grid, difference maps and both verdicts.

``compare_projects(a, b, grid_from="a")`` evaluates both projects at the *same*
flight conditions, so that a difference is a difference of designs and never of
grids:

- ``grid_from="a"`` (default): the Mach and altitude axes of project A
  (``grid_axes(a.envelope, a.grid)``), i.e. exactly the points of
  ``engine-air check A``;
- ``grid_from="b"``: the axes of project B;
- ``grid_from="union"``: axes spanning the bounding box of both envelopes, with
  the larger of the two projects' point counts along each axis.

Each project is judged inside its *own* envelope polygon on that grid
(``inside_a``, ``inside_b``) and, for a case with a region (``mach_range``,
``altitude_range_m``, method §14), inside that region only; a difference is defined
where both projects judge the point (``judged_both``) and is NaN elsewhere, so a
difference far outside a case's region (a take-off case at Mach 2) is never
reported. The verdicts (``verdicts``) are therefore those
of each project on the common grid: with ``grid_from="a"`` A's verdict is that of
``engine-air check A``; B's may differ from its own check at points its own grid
has and A's has not.

Differences are B - A, per case name present in both projects and for
``WORST`` (the worst of *all* of each project's cases, as in its own verdict:
for a margin the least margin over the cases, for a level quantity the value of
the case whose limiting relative margin is least; that case can differ between
A and B at a point). Both projects go through the same evaluation code, so
comparing a project with itself gives exactly zero wherever a quantity is
defined.

A project with a characteristics table (method §17; ``Project.characteristics``, read by ``load_project``) is
evaluated on its data where they cover, like its own map. ``data_region(case)`` marks the points both judge where
A's or B's data decide the match (flag ``from-data``), and ``data_stat(case, key)`` gives B - A there only: the
differences a table makes against the model, or between two tables.

Example::

    c = compare_projects(load_project("v1.toml"), load_project("v2.toml"))
    d = c.difference(WORST, "face_mach_margin")   # (altitude, Mach) array, B - A
    for row in c.verdicts: print(row.label, row.change)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from engine_air.envelope import flags as F
from engine_air.envelope.polygon import envelope_mask, grid_axes
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import WORST, CaseMap, LimitSummary, MapResult, summarise
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.project.model import Project
from engine_air.project import schema as _pf
from engine_air.project import MAX_AXIS_POINTS, MAX_GRID_POINTS
from engine_air.outputs.quantities import QUANTITIES

GRID_CHOICES = ("a", "b", "union")
DIFFERENCE_QUANTITIES = (
    "worst_relative_margin", "face_mach_margin", "recovery", "spillage_fraction", "mass_flow_ratio", "throat_mach",
    "face_mach",
    "recovery_minus_reference", "additive_drag_n", "spillage_drag_n",
)
"""Quantities whose difference maps and statistics ``compare_projects`` prepares; the first is the default.

The default is the least relative margin over every judged limit: any design change that moves any limit shows in
it, where a single quantity (e.g. the face Mach margin, which a ramp angle does not change) can be zero everywhere
and give a blank difference map. Drags are compared in newtons: a drag coefficient divides by q0, which goes to zero
at the low-speed end of the envelope, where a small difference in newtons becomes an enormous one in coefficient."""


def judged_value(result: MapResult, case: str, key: str) -> np.ndarray:
    """The map of ``key`` for ``case`` (or WORST) where it is judged, NaN elsewhere: outside the envelope and
    outside the case's region (``mach_range``, ``altitude_range_m``; method §14). For WORST the worst over the cases
    judged at each point (least margin; for a level quantity the value of the case whose limiting margin is least)."""
    if case != WORST:
        values = np.asarray(result.quantity(case, key), dtype=float)
        return np.where(result.judged(case), values, np.nan)
    stack = np.stack([np.where(result.judged(c.name), np.asarray(result.quantity(c.name, key), dtype=float), np.nan)
                      for c in result.cases])
    if key.endswith("margin") or key == "recovery_minus_reference":
        least = np.min(np.where(np.isnan(stack), np.inf, stack), axis=0)
        return np.where(np.isposinf(least), np.nan, least)
    pick = result.worst_case_index()  # a judged case ranks before one that is not
    return np.take_along_axis(stack, pick[None], axis=0)[0]


def evaluate_on_axes(project: Project, mach_1d, altitude_1d, case_names: list[str] | None = None) -> MapResult:
    """Evaluate ``project`` at the grid ``mach_1d`` x ``altitude_1d`` (not necessarily its own).

    The same steps as ``engine_air.envelope.evaluate.evaluate_project``: one vectorised
    ``evaluate_conditions`` call per case, ``outside-envelope`` flagged by the
    project's own polygon, then the per-limit summary. On the project's own axes
    the result equals ``evaluate_project(project)``.
    """
    mach_1d = np.asarray(mach_1d, dtype=float)
    altitude_1d = np.asarray(altitude_1d, dtype=float)
    chosen = [c for c in project.cases if case_names is None or c.name in case_names]
    points = mach_1d.size * altitude_1d.size
    limit = getattr(_pf, "MAX_CASE_POINTS", 2_000_000)
    if points > MAX_GRID_POINTS or points * len(chosen) > limit:
        raise ProjectError(None, "grid", points * len(chosen),
                           f"{len(chosen)} cases x {points} grid points is more than can be evaluated together "
                           f"(at most {MAX_GRID_POINTS} points per case and {limit} case-points)")
    mach_2d, alt_2d = np.meshgrid(mach_1d, altitude_1d)
    inside = envelope_mask(project.envelope, mach_2d, alt_2d)
    maps = []
    for case in chosen:
        points = evaluate_conditions(project, case, mach_1d[None, :], altitude_1d[:, None])
        points.flags = np.where(inside, points.flags, points.flags | F.OUTSIDE_ENVELOPE)
        maps.append(CaseMap(case.name, points))
    result = MapResult(project, mach_1d, altitude_1d, inside, maps)
    result.summary = summarise(result)
    return result


def common_axes(a: Project, b: Project, grid_from: str = "a") -> tuple[np.ndarray, np.ndarray]:
    """The Mach and altitude axes both projects are evaluated on (see the module text)."""
    if grid_from == "a":
        return grid_axes(a.envelope, a.grid)
    if grid_from == "b":
        return grid_axes(b.envelope, b.grid)
    if grid_from != "union":
        raise ProjectError(None, "grid_from", grid_from, "must be one of " + ", ".join(repr(g) for g in GRID_CHOICES))
    m = np.concatenate([a.envelope.mach, b.envelope.mach])
    h = np.concatenate([a.envelope.altitude_m, b.envelope.altitude_m])
    nx = min(MAX_AXIS_POINTS, max(a.grid.mach_points, b.grid.mach_points))
    ny = min(MAX_AXIS_POINTS, max(a.grid.altitude_points, b.grid.altitude_points))
    if nx * ny > MAX_GRID_POINTS:
        scale = math.sqrt(MAX_GRID_POINTS / (nx * ny))
        nx, ny = max(2, int(nx * scale)), max(2, int(ny * scale))
    return np.linspace(m.min(), m.max(), nx), np.linspace(h.min(), h.max(), ny)


@dataclass(frozen=True)
class DifferenceStats:
    """B - A of one quantity for one case over the points both projects judge (inside both envelopes and the
    case's region)."""

    case: str
    quantity: str
    label: str
    points: int  # points compared (judged by both: inside both envelopes and the case's region; defined in both)
    min: float
    max: float
    mean: float
    max_abs: float
    max_abs_mach: float
    max_abs_altitude_m: float

    @property
    def identical(self) -> bool:
        return self.max_abs == 0.0 or self.points == 0


@dataclass(frozen=True)
class VerdictRow:
    """One limit, judged for both projects on the common grid (None: the project has no such check)."""

    name: str
    label: str
    a: LimitSummary | None
    b: LimitSummary | None

    @property
    def change(self) -> str:
        if self.a is None:
            return f"only in B ({self.b.verdict.lower()})"
        if self.b is None:
            return f"only in A ({self.a.verdict.lower()})"
        if not self.a.judged or not self.b.judged:
            if self.a.judged == self.b.judged:
                return "not judged anywhere in either"
            return "not judged anywhere in " + ("A" if not self.a.judged else "B")
        if self.a.holds and self.b.holds:
            return "holds in both"
        if not self.a.holds and not self.b.holds:
            return "fails in both"
        return "now fails" if self.a.holds else "now holds"


@dataclass
class CompareResult:
    """Both projects on one grid; see the module text for the conventions."""

    a: Project
    b: Project
    grid_from: str
    mach: np.ndarray
    altitude_m: np.ndarray
    result_a: MapResult
    result_b: MapResult
    cases: list[str]  # case names present in both, in A's order, then WORST
    only_a: list[str]
    only_b: list[str]
    verdicts: list[VerdictRow]
    stats: list[DifferenceStats] = field(default_factory=list)

    @property
    def inside_a(self) -> np.ndarray:
        return self.result_a.inside

    @property
    def inside_b(self) -> np.ndarray:
        return self.result_b.inside

    @property
    def both(self) -> np.ndarray:
        return self.result_a.inside & self.result_b.inside

    @property
    def has_data(self) -> bool:
        """True when A or B has a characteristics table read (method §17)."""
        return self.a.characteristics is not None or self.b.characteristics is not None

    def data_region(self, case: str) -> np.ndarray:
        """(ny, nx) bool: points both projects judge for ``case`` (WORST: in some case) where A's or B's
        characteristics table decides the match (flag ``from-data``); all False without a table."""
        return self.judged_both(case) & (from_data(self.result_a, case) | from_data(self.result_b, case))

    def data_stat(self, case: str, key: str) -> DifferenceStats:
        """B - A of ``key`` for ``case`` over ``data_region(case)`` only (no points: NaN statistics)."""
        return _stats(self, case, key, self.data_region(case))

    @property
    def holds_a(self) -> bool:
        return self.result_a.holds

    @property
    def holds_b(self) -> bool:
        return self.result_b.holds

    def judged_both(self, case: str) -> np.ndarray:
        """(ny, nx) bool: both projects judge the point for ``case`` (inside both envelopes and the case's region in
        each; for WORST, judged in some case of each)."""
        return self.result_a.judged(case) & self.result_b.judged(case)

    def value(self, side: str, case: str, key: str) -> np.ndarray:
        """The map of ``key`` for ``case`` of project ``side`` ("a" or "b"), NaN where that project does not judge
        it (outside its envelope or the case's region)."""
        result = {"a": self.result_a, "b": self.result_b}[side]
        return judged_value(result, case, key)

    def difference(self, case: str, key: str) -> np.ndarray:
        """B - A of quantity ``key`` for ``case`` (or WORST): NaN where either project does not judge the point
        (outside its envelope or the case's region) or the quantity is not defined."""
        if case != WORST and case not in self.cases:
            raise KeyError(f"case {case!r} is not in both projects; shared cases are {self.cases}")
        da = self.value("a", case, key)
        db = self.value("b", case, key)
        with np.errstate(invalid="ignore"):
            return np.where(self.both, db - da, np.nan)

    def shared_levels(self, case: str, key: str) -> tuple[float, float]:
        """One colour scale for A's and B's maps of ``key`` (symmetric about 0 for margins)."""
        from engine_air.outputs.colours import levels_for

        both = np.concatenate([self.value("a", case, key).ravel(), self.value("b", case, key).ravel()])
        return levels_for(QUANTITIES[key].kind if key in QUANTITIES else "level", both)

    def stat(self, case: str, key: str) -> DifferenceStats:
        for s in self.stats:
            if s.case == case and s.quantity == key:
                return s
        return _stats(self, case, key)

    @property
    def identical(self) -> bool:
        """True when every prepared difference is zero and every verdict is the same."""
        same_verdicts = all(
            r.a is not None and r.b is not None and r.a.holds == r.b.holds and
            _same(r.a.worst_margin, r.b.worst_margin) for r in self.verdicts
        )
        return same_verdicts and all(s.identical for s in self.stats)


def _same(x: float, y: float) -> bool:
    return x == y or (math.isnan(x) and math.isnan(y))


def from_data(result: MapResult, case: str) -> np.ndarray:
    """(ny, nx) bool: where the project's characteristics table decides the match for ``case`` (WORST: in any
    case) and the point is judged; all False for a project without one."""
    out = np.zeros(result.inside.shape, bool)
    for cm in result.cases:
        if case in (WORST, cm.name):
            out |= (np.asarray(cm.points.flags) & F.FROM_DATA) != 0
    return out & result.judged(case)


def _stats(c: CompareResult, case: str, key: str, where: np.ndarray | None = None) -> DifferenceStats:
    d = c.difference(case, key)
    if where is not None:
        d = np.where(where, d, np.nan)
    ok = np.isfinite(d)
    label = QUANTITIES[key].label if key in QUANTITIES else key
    if not ok.any():
        nan = math.nan
        return DifferenceStats(case, key, label, 0, nan, nan, nan, nan, nan, nan)
    absd = np.where(ok, np.abs(d), -1.0)
    j = np.unravel_index(int(np.argmax(absd)), d.shape)
    vals = d[ok]
    return DifferenceStats(
        case=case, quantity=key, label=label, points=int(ok.sum()), min=float(vals.min()), max=float(vals.max()),
        mean=float(vals.mean()), max_abs=float(absd[j]), max_abs_mach=float(c.mach[j[1]]),
        max_abs_altitude_m=float(c.altitude_m[j[0]]),
    )


def compare_projects(
    a: Project,
    b: Project,
    grid_from: str = "a",
    quantities: tuple[str, ...] = DIFFERENCE_QUANTITIES,
) -> CompareResult:
    """Evaluate ``a`` and ``b`` on one grid and compare them (B - A).

    Parameters
    ----------
    a, b : Project
        The two variants (e.g. loaded with ``load_project``).
    grid_from : {"a", "b", "union"}
        Whose grid to use (module text).
    quantities : tuple of str
        Keys of ``engine_air.outputs.quantities.QUANTITIES`` for which ``stats`` is
        prepared (``difference`` works for any key at any time).

    Returns
    -------
    CompareResult
        ``difference(case, key)`` maps, ``stats`` per (case, quantity),
        ``verdicts`` per limit for both, shared ``cases`` (and WORST), the
        cases found in one project only.
    """
    for key in quantities:
        if key not in QUANTITIES:
            raise ProjectError(None, "quantities", key, "must be keys of engine_air.outputs.quantities.QUANTITIES: "
                               + ", ".join(QUANTITIES))
    mach, alt = common_axes(a, b, grid_from)
    ra = evaluate_on_axes(a, mach, alt)
    rb = evaluate_on_axes(b, mach, alt)
    names_b = {c.name for c in b.cases}
    names_a = {c.name for c in a.cases}
    shared = [c.name for c in a.cases if c.name in names_b]
    only_a = [c.name for c in a.cases if c.name not in names_b]
    only_b = [c.name for c in b.cases if c.name not in names_a]
    by_name_b = {s.name: s for s in rb.summary}
    verdicts = [VerdictRow(s.name, s.label, s, by_name_b.get(s.name)) for s in ra.summary]
    seen = {s.name for s in ra.summary}
    verdicts += [VerdictRow(s.name, s.label, None, s) for s in rb.summary if s.name not in seen]
    result = CompareResult(a, b, grid_from, mach, alt, ra, rb, shared + [WORST], only_a, only_b, verdicts)
    result.stats = [_stats(result, case, key) for case in result.cases for key in quantities]
    return result


def compare_columns(c: CompareResult, quantities: tuple[str, ...] = DIFFERENCE_QUANTITIES) -> dict:
    """The compare table: every common grid point inside either envelope, per shared case and WORST:
    ``case, mach, altitude_m, inside_a, inside_b`` then ``<q>_a, <q>_b, <q>_delta`` per quantity."""
    mach_2d, alt_2d = np.meshgrid(c.mach, c.altitude_m)
    keep = np.nonzero((c.inside_a | c.inside_b).ravel())[0]
    n = keep.size
    cols: dict = {"case": [name for name in c.cases for _ in range(n)]}
    cols["mach"] = np.tile(mach_2d.ravel()[keep], len(c.cases))
    cols["altitude_m"] = np.tile(alt_2d.ravel()[keep], len(c.cases))
    cols["inside_a"] = np.tile(c.inside_a.ravel()[keep].astype(np.int8), len(c.cases))
    cols["inside_b"] = np.tile(c.inside_b.ravel()[keep].astype(np.int8), len(c.cases))
    for q in quantities:
        for suffix, get in (("a", lambda case: c.value("a", case, q)), ("b", lambda case: c.value("b", case, q)),
                            ("delta", lambda case: c.difference(case, q))):
            cols[f"{q}_{suffix}"] = np.concatenate([np.asarray(get(case), dtype=float).ravel()[keep]
                                                    for case in c.cases]) if c.cases else np.zeros(0)
    return cols


def write_compare_csv(c: CompareResult, path, quantities: tuple[str, ...] = DIFFERENCE_QUANTITIES,
                      inputs=()) -> int:
    """``compare_columns`` written as CSV by ``engine_air.outputs.table`` (whole or not at all; never over one of
    ``inputs``, e.g. the two project files). Empty fields are values that are not defined. Returns the number of
    rows written."""
    from engine_air.outputs.table import write_table

    return write_table(compare_columns(c, quantities), path, "csv", inputs)


__all__ = [
    "DIFFERENCE_QUANTITIES", "GRID_CHOICES", "CompareResult", "DifferenceStats", "VerdictRow", "common_axes",
    "compare_columns", "compare_projects", "evaluate_on_axes", "from_data", "judged_value", "write_compare_csv",
]
