"""A reduced rake set judged against a project: the stack-up of a rating and the limits ``dc60_max`` and
``surge_margin_min`` (method §18).

A limit is judged at the points that give its quantity: DC(60) needs the point's ``face_mach``; the remaining
surge margin needs the rating's ``[engine.rating.stability]``. Points without it are not judged (null).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.distortion.descriptors import RakeDescriptors
from engine_air.distortion.stack_up import build_stack_up
from engine_air.project.errors import ProjectError
from engine_air.project.model import Limits, Project, Rating, Stability


@dataclass(frozen=True)
class LimitVerdict:
    """One limit over the rake set: the judged value per point (NaN where not judged)."""

    name: str  # "dc60" or "surge-margin", as the map's checks
    limit_text: str
    value: np.ndarray
    fails: np.ndarray  # bool (P,)
    judged: np.ndarray  # bool (P,)

    @property
    def holds(self) -> bool | None:
        return None if not self.judged.any() else not bool(self.fails.any())


@dataclass(frozen=True)
class Assessment:
    descriptors: RakeDescriptors
    rating: str | None
    stability: Stability | None
    surge_margin_loss: np.ndarray  # (P,) NaN without stability
    remaining_surge_margin: np.ndarray
    verdicts: tuple[LimitVerdict, ...]

    @property
    def holds(self) -> bool | None:
        judged = [v.holds for v in self.verdicts if v.holds is not None]
        return None if not judged else all(judged)


def _rating(project: Project, name: str | None, path) -> tuple[int, Rating] | tuple[None, None]:
    if name is None:
        for i, r in enumerate(project.ratings):
            if r.stability is not None:
                return i, r
        return None, None
    for i, r in enumerate(project.ratings):
        if r.name == name:
            if r.stability is None:
                raise ProjectError(path, f"engine.rating[{i}].stability", None,
                                   f"missing: rating {name!r} has no [engine.rating.stability] table, so the surge "
                                   "margin cannot be stacked up")
            return i, r
    raise ProjectError(path, "engine.rating", name, "no such rating; the project has "
                       + ", ".join(repr(r.name) for r in project.ratings))


def _verdicts(limits: Limits | None, dc60: np.ndarray, remaining: np.ndarray) -> tuple[LimitVerdict, ...]:
    out = []
    if limits is not None and limits.dc60_max is not None:
        judged = np.isfinite(dc60)
        out.append(LimitVerdict("dc60", f"DC(60) <= {limits.dc60_max:g}", dc60,
                                judged & (dc60 > limits.dc60_max), judged))
    if limits is not None and limits.surge_margin_min is not None:
        judged = np.isfinite(remaining)
        out.append(LimitVerdict("surge-margin", f"remaining surge margin >= {limits.surge_margin_min:g}", remaining,
                                judged & (remaining < limits.surge_margin_min), judged))
    return tuple(out)


def assess(descriptors: RakeDescriptors, project: Project | None = None, rating: str | None = None,
           project_path=None) -> Assessment:
    """The stack-up of ``rating`` (default: the first rating with a stability table) and the project's
    distortion limits at every point."""
    n = descriptors.rakes.points
    loss, remaining = np.full(n, np.nan), np.full(n, np.nan)
    index, chosen = (None, None) if project is None else _rating(project, rating, project_path)
    if chosen is not None:
        key = f"engine.rating[{index}].stability"
        for g in descriptors.groups:
            stack = build_stack_up(chosen.stability, g.circumferential_intensity, g.radial_intensity, key,
                                   project_path)
            loss[g.group.point_index] = stack.distortion_loss
            remaining[g.group.point_index] = stack.remaining
    verdicts = _verdicts(None if project is None else project.limits, descriptors.per_point("dc60"), remaining)
    return Assessment(descriptors, None if chosen is None else chosen.name,
                      None if chosen is None else chosen.stability, loss, remaining, verdicts)
