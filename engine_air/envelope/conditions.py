"""The judged match at arrays of conditions: the chain of ``engine_air.flow`` and the checks of the envelope.

``evaluate_conditions(project, case, mach, altitude_m, demand=None)`` runs ``engine_air.flow.chain.run_chain``
and judges its ``OperatingPoints`` against the project's limits (``engine_air.envelope.checks``): the result is
a ``JudgedPoints``, the same quantities with the checks, the limiting check at each point and the margins the
maps and tables show. ``demand`` (corrected flow W_c2, kg/s) replaces the rating's table (method §16).

Example (checked in the tests): a pitot inlet at M0 = 2 with K = 0 has recovery 0.72087, the normal-shock
total-pressure ratio.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields

import numpy as np

from engine_air.envelope.checks import Check, build_checks, limiting_index
from engine_air.envelope.ranking import limiting_of_ranks, rank_and_fails, worst_relative_margin
from engine_air.flow.chain import run_chain
from engine_air.flow.points import OperatingPoints
from engine_air.project.model import Case, Project

CHECK_ARRAYS = ("value", "margin", "relative_margin", "applies", "fails")  # what a Check gives at each point


@dataclass
class JudgedPoints(OperatingPoints):
    """``OperatingPoints`` with the limits judged: ``checks`` (one ``Check`` per limit) and ``limiting``."""

    checks: list[Check] = field(default_factory=list)
    limiting: np.ndarray | None = None  # int index into checks, -1 where nothing is judged

    @property
    def face_mach_margin(self) -> np.ndarray:
        return self.check("face-mach").margin

    @property
    def worst_relative_margin(self) -> np.ndarray:
        """Least relative margin over the checks judged at each point (NaN where none is judged)."""
        return worst_relative_margin(self.checks, np.shape(self.mach))

    def at(self, index) -> "JudgedPoints":
        """The points and their checks at ``index`` alone (see ``OperatingPoints.at``)."""
        one = super().at(index)
        idx = index if isinstance(index, tuple) else (index,)
        one.checks = [c.at(idx) for c in self.checks]
        return one

    def check(self, name: str) -> Check:
        for c in self.checks:
            if c.name == name:
                return c
        raise KeyError(name)


def judge(project: Project, points: OperatingPoints, case: Case | None = None) -> JudgedPoints:
    """``points`` with every check the project's limits ask for, and the limiting one at each point."""
    return judge_ranked(project, points, case)[0]


def judge_ranked(project: Project, points: OperatingPoints,
                 case: Case | None = None) -> tuple[JudgedPoints, list[tuple[np.ndarray, np.ndarray]]]:
    """``judge``, and each check's ``(rank, fails)`` arrays (``engine_air.envelope.ranking.rank_and_fails``) that
    the limiting check was found from, for a summary to reuse rather than compute again (not kept)."""
    judged = JudgedPoints(**{f.name: getattr(points, f.name) for f in fields(OperatingPoints)})
    stability = None if case is None else project.rating(case.rating).stability  # the surge-margin stack-up
    judged.checks = build_checks(project.limits, judged, stability)
    if not judged.checks:
        judged.limiting = limiting_index(judged.checks, judged.flags)
        return judged, []
    ranked = [rank_and_fails(c) for c in judged.checks]
    judged.limiting = limiting_of_ranks([r for r, _f in ranked])
    return judged, ranked


def evaluate_conditions(project: Project, case: Case, mach, altitude_m, demand=None, **sources) -> JudgedPoints:
    """Evaluate and judge the inlet-engine match of ``project`` for ``case`` at flight Mach ``mach`` and
    geopotential altitude ``altitude_m`` (m). Arrays broadcast; returns arrays of the common shape.

    A negative Mach number is taken as 0. A Mach number that is NaN or infinite raises ``ValueError`` (there is
    no flag for it and every result would be an unexplained NaN); an altitude outside the atmosphere model, NaN
    or infinite included, and an ISA offset that leaves no positive temperature are flagged
    ``outside-atmosphere`` instead. ``demand``: corrected flow W_c2 (kg/s) in place of the rating's table;
    ``sources``: ``compression_source`` and ``recovery_law`` of ``engine_air.flow.chain.run_chain``."""
    return judge(project, run_chain(project, case, mach, altitude_m, demand, **sources), case)
