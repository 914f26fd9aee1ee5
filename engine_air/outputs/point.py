"""One flight condition, judged as the map would judge it: the point record of ``engine-air point --json``.

``evaluate_point(project, mach, altitude_m, case=None)`` evaluates the named case (default: the first) at one
flight Mach number and geopotential altitude, marks the point ``outside-envelope`` when it lies outside the
envelope polygon (then it is computed but not judged: ``holds`` is None), and returns the JSON-ready record
(``engine_air.outputs.point_record.point_record``). It lives with the outputs because the record is one: the
envelope judges, the outputs write.
"""

from __future__ import annotations

import numpy as np

from engine_air.envelope import flags as F
from engine_air.envelope.polygon import polygon_contains
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.outputs.point_record import point_record
from engine_air.project.model import Project


def evaluate_point(project: Project, mach: float, altitude_m: float, case: str | None = None) -> dict:
    """The point record at flight Mach ``mach`` and altitude ``altitude_m`` (m) for ``case`` (a case name).

    ``KeyError`` for an unknown case; ``ValueError`` for a Mach number that is not finite.
    """
    chosen = project.cases[0] if case is None else project.case(case)
    m = np.array([float(mach)])
    h = np.array([float(altitude_m)])
    points = evaluate_conditions(project, chosen, m, h)
    env = project.envelope
    if not bool(polygon_contains(env.mach, env.altitude_m, m, h)[0]):
        points.flags = points.flags | F.OUTSIDE_ENVELOPE
    return point_record(points, 0, chosen.name)
