"""Which limits a sizing judges: every check of the project, or only the named ones.

A capture-area sizing asks about the limits the capture area moves (face Mach, stability, spillage); a limit it
cannot move (e.g. the fan's relative tip Mach, set by the engine) would fail at every value and empty the range.
``feasible_range(..., limits=["face-mach", "stability"])`` judges only the named checks (the names of
``engine-air point --json`` ``checks[].name``); each check is still judged only inside its own region
(``[limits.region.NAME]``, method section 15).

``project_check_names(project)`` lists the checks the project has, ``chosen_limits`` checks a choice against
them (``ProjectError`` naming the allowed names), ``judged_by`` keeps only the chosen checks of an evaluated
envelope and sums it up again.
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np

from engine_air.envelope.evaluate import MapResult, summarise
from engine_air.envelope.ranking import limiting_index
from engine_air.project.errors import ProjectError
from engine_air.project.model import Project


def project_check_names(project: Project) -> tuple[str, ...]:
    """The names of the checks ``project`` is judged by, in check order (one point evaluated: which checks
    exist depends on the limits given and the inlet type, not on the point)."""
    from engine_air.envelope.conditions import evaluate_conditions

    case = project.cases[0]
    points = evaluate_conditions(project, case, np.array([project.envelope.mach[0]]),
                                 np.array([project.envelope.altitude_m[0]]))
    return tuple(c.name for c in points.checks)


def chosen_limits(project: Project, names: Iterable[str] | None) -> tuple[str, ...] | None:
    """``names`` checked against the project's checks, without repeats, in the order given; None (every check)
    when ``names`` is None. ``ProjectError`` (key ``limits``) for an empty choice or a name the project has not."""
    if names is None:
        return None
    names = tuple(dict.fromkeys(str(n).strip() for n in names))
    allowed = project_check_names(project)
    listing = ", ".join(allowed)
    if not names or names == ("",):
        raise ProjectError(None, "limits", "", f"name at least one check of this project: {listing}")
    for name in names:
        if name not in allowed:
            raise ProjectError(None, "limits", name, f"is not a check of this project; its checks are: {listing}")
    return names


def judged_by(result: MapResult, names: tuple[str, ...] | None) -> MapResult:
    """``result`` judged by the checks named in ``names`` only (None: every check), its summary made again.

    The result's point sets are changed in place (the sizing evaluates a fresh envelope for every value).
    """
    if names is None:
        return result
    wanted = set(names)
    for cm in result.cases:
        cm.points.checks = [c for c in cm.points.checks if c.name in wanted]
        cm.points.limiting = limiting_index(cm.points.checks, np.shape(cm.points.mach))
    result.summary = summarise(result)
    return result


__all__ = ["chosen_limits", "judged_by", "project_check_names"]
