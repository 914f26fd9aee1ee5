"""The one worst-point ranking and the one nearest-grid-point lookup.

Ranking rule (method §8): at a point, a check that is judged there (``applies``)
has a *rank* equal to its relative margin; a failing check ranks below every
holding one (its rank is min(relative margin, 0) - ``FAIL_OFFSET``); a check that
is not judged has rank +inf. The *limiting* check at a point is the one of least
rank; the *worst point* of a set of points (a map, a map over several cases) is
the one of least rank. Relative margins of failing checks are negative and those
of holding checks are 0 or more, so the offset only settles ties and NaN edge
cases: it keeps "failing beats holding" explicit.

Everything here works on whole arrays (no loop over points); loops run over the
handful of checks and cases only.

>>> import numpy as np
>>> from engine_air.envelope.checks import Check
>>> a = Check("a", "A", "", np.zeros(3), np.array([0.5, -0.1, 0.2]), np.array([0.5, -0.1, 0.2]),
...           np.array([True, True, False]), np.array([False, True, False]))
>>> worst_relative_margin([a]).tolist()
[0.5, -0.1, nan]
>>> limiting_index([a]).tolist()
[0, 0, -1]
>>> nearest_index(np.array([0.0, 0.5, 1.0]), np.array([0.0, 1000.0]), 0.6, 900.0)
(1, 1)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

FAIL_OFFSET = 1e6
"""Subtracted from a failing check's rank so that it outranks every holding check."""


def check_rank(check, mask=None) -> np.ndarray:
    """Rank array of one check (see the module text); ``mask`` (bool) further restricts where it is judged."""
    return rank_and_fails(check, mask)[0]


def rank_and_fails(check, mask=None) -> tuple[np.ndarray, np.ndarray]:
    """``(check_rank(check, mask), check.fails)``: the check's margin computed once for both."""
    rel, fails = check.relative_and_fails()
    return _rank_of(check.applies, rel, fails, mask), fails


def _rank_of(applies, rel, fails, mask=None) -> np.ndarray:
    """where(applies, where(fails, min(rel, 0) - FAIL_OFFSET, rel), +inf), in place where the shapes allow."""
    rel = np.asarray(rel, dtype=float)
    applies = np.asarray(applies, dtype=bool)
    if mask is not None:
        applies = applies & mask
    fails = np.asarray(fails, dtype=bool)
    with np.errstate(invalid="ignore"):
        if rel.ndim and rel.shape == applies.shape == fails.shape:
            rank = np.minimum(rel, 0.0)
            rank -= FAIL_OFFSET
            np.copyto(rank, rel, where=~fails)
            np.copyto(rank, np.inf, where=~applies)
            return rank
        return np.where(applies, np.where(fails, np.minimum(rel, 0.0) - FAIL_OFFSET, rel), np.inf)


def _ranked(checks, mask=None) -> tuple[list[np.ndarray], list[np.ndarray]]:
    """Each check's rank and relative margin, its margin computed once for both."""
    ranks, rels = [], []
    for c in checks:
        rel, fails = c.relative_and_fails()
        ranks.append(_rank_of(c.applies, rel, fails, mask))
        rels.append(rel)
    return ranks, rels


def _least(ranks: list[np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
    """(index, value) of the least of several rank arrays of one shape at each point: ``numpy.argmin`` and
    ``numpy.min`` along a stacking axis (the first of equal ranks; a NaN, the first, wins, as in numpy),
    without stacking them or reducing along a strided axis."""
    if any(np.isnan(np.sum(r)) for r in ranks):  # a NaN somewhere (ranks hold no -inf): numpy's own rule
        stack = np.stack(ranks)
        return np.argmin(stack, axis=0), np.min(stack, axis=0)
    best, index = ranks[0], np.zeros(np.shape(ranks[0]), np.intp)
    for k, rank in enumerate(ranks[1:], 1):
        better = rank < best
        best, index = np.where(better, rank, best), np.where(better, k, index)
    return index, best


def limiting_index(checks, shape=None, mask=None) -> np.ndarray:
    """Index into ``checks`` of the limiting check at each point (int16); -1 where no check is judged."""
    if not checks:
        return np.full(() if shape is None else shape, -1, dtype=np.int16)
    return limiting_of_ranks([check_rank(c, mask) for c in checks])


def limiting_of_ranks(ranks: list[np.ndarray]) -> np.ndarray:
    """``limiting_index`` from the checks' rank arrays (``check_rank``), at least one."""
    index, least = _least(ranks)
    return np.where(np.isposinf(least), -1, index).astype(np.int16)


def worst_relative_margin(checks, shape=None, mask=None) -> np.ndarray:
    """Least relative margin over the checks judged at each point (the limiting check's); NaN where none is."""
    if not checks:
        return np.full(() if shape is None else shape, np.nan)
    return _case_ranking(checks, mask)[2]


def _case_ranking(checks, mask=None) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """``(limiting_index, limiting_rank, worst_relative_margin)`` of one point set's ``checks`` (at least one),
    each check's margin computed once for the three."""
    ranks, rels = _ranked(checks, mask)
    index, least = _least(ranks)
    rel = np.stack([np.broadcast_to(np.asarray(r, dtype=float), index.shape) for r in rels])
    worst = np.take_along_axis(rel, index[None], axis=0)[0]
    nothing = np.isposinf(least)
    return np.where(nothing, -1, index).astype(np.int16), least, np.where(nothing, np.nan, worst)


def limiting_rank(checks, shape=None, mask=None) -> np.ndarray:
    """Least rank over the checks at each point (+inf where nothing is judged)."""
    if not checks:
        return np.full(() if shape is None else shape, np.inf)
    return _least([check_rank(c, mask) for c in checks])[1]


def argworst(rank: np.ndarray) -> tuple[int, ...] | None:
    """Index (tuple) of the least rank; None where every rank is +inf (nothing judged)."""
    rank = np.asarray(rank, dtype=float)
    if rank.size == 0:
        return None
    flat = int(np.argmin(rank))
    if np.isposinf(rank.flat[flat]):
        return None
    return tuple(int(i) for i in np.unravel_index(flat, rank.shape))


@dataclass(frozen=True)
class Worst:
    """The worst point of a ranking: which case (position), which check (position) and where."""

    rank: float
    case: int  # position in the sequence of point sets ranked
    check: int  # position in that point set's checks
    index: tuple[int, ...]


def worst_of_check(point_sets, k: int, mask=None) -> Worst | None:
    """Worst point of check number ``k`` over several point sets (e.g. one per case); ``mask`` restricts it."""
    best = None
    for n, pts in enumerate(point_sets):
        rank = check_rank(pts.checks[k], mask)
        j = argworst(rank)
        if j is not None and (best is None or rank[j] < best.rank):
            best = Worst(float(rank[j]), n, k, j)
    return best


def worst_point(point_sets, mask=None) -> Worst | None:
    """Worst point over every check of several point sets (e.g. one per case); None when nothing is judged."""
    best = None
    for n, pts in enumerate(point_sets):
        for k, chk in enumerate(pts.checks):
            rank = check_rank(chk, mask)
            j = argworst(rank)
            if j is not None and (best is None or rank[j] < best.rank):
                best = Worst(float(rank[j]), n, k, j)
    return best


def worst_case_index(point_sets, shape=None, mask=None) -> np.ndarray:
    """At each point, the position of the point set (case) whose limiting check ranks least (ties: the first)."""
    return _least([limiting_rank(p.checks, shape if shape is not None else np.shape(p.mach), mask)
                   for p in point_sets])[0]


def limiting_map(result, case: str) -> tuple[np.ndarray, np.ndarray, list[str], list[str]]:
    """The least-margin map of a ``MapResult`` for ``case`` (or ``WORST``) and what limits it.

    Returns ``(margin, index, names, labels)``: ``margin`` (ny, nx) is the least
    relative margin over every judged check (for WORST, over every case too), NaN
    outside the envelope or where nothing is judged (flags ``outside-envelope`` /
    ``outside-atmosphere`` say which); ``index`` (ny, nx) points into ``names``
    and ``labels`` (the check's name and label), -1 where ``margin`` is NaN.
    """
    from engine_air.envelope.evaluate import WORST

    cases = result.cases if case == WORST else [result.case_map(case)]
    inside = np.asarray(result.inside, dtype=bool)
    shape = inside.shape
    if not cases or not cases[0].points.checks:
        return np.full(shape, np.nan), np.full(shape, -1, dtype=np.int16), [], []
    ranked = [_case_ranking(c.points.checks) for c in cases]  # each check's margin once per case
    pick = _least([least for _i, least, _w in ranked])[0] if len(cases) > 1 else np.zeros(shape, dtype=np.intp)
    margins = np.stack([np.broadcast_to(worst, shape) for _i, _l, worst in ranked])
    indices = np.stack([np.broadcast_to(index, shape) for index, _l, _w in ranked])
    margin = np.take_along_axis(margins, pick[None], axis=0)[0]
    index = np.take_along_axis(indices, pick[None], axis=0)[0]
    margin = np.where(inside, margin, np.nan)
    index = np.where(np.isfinite(margin), index, -1).astype(np.int16)
    checks = cases[0].points.checks
    return margin, index, [c.name for c in checks], [c.label for c in checks]


def nearest_index(mach_axis, altitude_axis, mach: float, altitude_m: float) -> tuple[int, int]:
    """Grid (row i along the altitude axis, column j along the Mach axis) nearest to a flight condition."""
    i = int(np.argmin(np.abs(np.asarray(altitude_axis, dtype=float) - altitude_m)))
    j = int(np.argmin(np.abs(np.asarray(mach_axis, dtype=float) - mach)))
    return i, j


__all__ = ["FAIL_OFFSET", "Worst", "argworst", "check_rank", "limiting_index", "limiting_map", "limiting_of_ranks",
           "limiting_rank", "nearest_index", "rank_and_fails",
           "worst_case_index", "worst_of_check", "worst_point", "worst_relative_margin"]
