"""Small read-only helpers over an ``engine_air.envelope.evaluate.MapResult`` for the views.

Only the documented names of the analysis package are used: ``MapResult``
(mach, altitude_m, inside, cases, quantity, failing, flags, summary),
``OperatingPoints.checks`` and ``Check`` (relative_margin, applies, fails).
"""

from __future__ import annotations

import numpy as np

from engine_air.envelope.evaluate import WORST

_FAIL_OFFSET = 1e6  # a failing check outranks every holding one


def least_relative_margin(points) -> np.ndarray:
    """(ny, nx) least relative margin over the checks that apply; NaN where none applies.

    Failing checks rank first (their value is kept, capped at 0), so the zero
    level of this field is the boundary of the region where some limit fails.
    """
    if not points.checks:
        return np.full(np.shape(points.mach), np.nan)
    stack = []
    for c in points.checks:
        rel = np.asarray(c.relative_margin, dtype=float)
        stack.append(np.where(c.applies, np.where(c.fails, np.minimum(rel, 0.0), rel), np.inf))
    out = np.min(np.stack(stack), axis=0)
    return np.where(np.isinf(out), np.nan, out)


def limiting_field(result, case: str) -> np.ndarray:
    """Least relative margin over checks (and over cases for WORST), NaN outside the envelope."""
    cases = result.cases if case == WORST else [result.case_map(case)]
    with np.errstate(invalid="ignore"):
        stack = np.stack([least_relative_margin(c.points) for c in cases])
        filled = np.where(np.isnan(stack), np.inf, stack)
        out = np.min(filled, axis=0)
    out = np.where(np.isinf(out), np.nan, out)
    return np.where(result.inside, out, np.nan)


def _rank_at(points, index) -> float:
    best = np.inf
    for c in points.checks:
        if not bool(np.asarray(c.applies)[index]):
            continue
        rel = float(np.asarray(c.relative_margin)[index])
        if bool(np.asarray(c.fails)[index]):
            rel = min(rel, 0.0) - _FAIL_OFFSET
        best = min(best, rel)
    return best


def case_at(result, case: str, index) -> str:
    """The case to show at grid ``index``: ``case`` itself, or for WORST the case with the least margin there."""
    if case != WORST:
        return case
    ranks = [_rank_at(c.points, index) for c in result.cases]
    return result.cases[int(np.argmin(ranks))].name


def limiting_at(points, index) -> tuple[str, bool] | None:
    """(label, fails) of the limiting check at grid ``index``; None when no check applies."""
    best = None
    for c in points.checks:
        if not bool(np.asarray(c.applies)[index]):
            continue
        rel = float(np.asarray(c.relative_margin)[index])
        fails = bool(np.asarray(c.fails)[index])
        rank = (min(rel, 0.0) - _FAIL_OFFSET) if fails else rel
        if best is None or rank < best[0]:
            best = (rank, c.label, fails)
    return None if best is None else (best[1], best[2])


def nearest_index(result, mach: float, altitude_m: float) -> tuple[int, int]:
    """Grid (row i, column j) nearest to a flight condition."""
    i = int(np.argmin(np.abs(np.asarray(result.altitude_m) - altitude_m)))
    j = int(np.argmin(np.abs(np.asarray(result.mach) - mach)))
    return i, j


def failing_count(result) -> tuple[int, int]:
    """(checks failing, checks judged) over the summary."""
    total = len(result.summary)
    return sum(1 for s in result.summary if not s.holds), total
