"""Cuts through an envelope map: one quantity along Mach at one altitude, or along altitude at one Mach.

``cut(result, quantity_key, altitude_m=...)`` (or ``mach=...``) takes the grid
row (or column) nearest to the asked altitude (or Mach number) and returns a
``Section``: the axis values along the cut, and for every case (and the worst
of all cases when there are several) the values, a *judged* mask and a
*failing* mask. The limit of the quantity (zero for a margin; the project's
limit for a level quantity that a check judges, e.g. the face Mach limit for
the face Mach number) comes with it. Qt-free: the review pack draws sections
with matplotlib (``engine_air.outputs.pictures.section_figure``) and the GUI
can draw the same arrays.

*Judged* means: inside the envelope, the value finite, and — when a check
judges this quantity — that check applies there (e.g. recovery against
MIL-E-5008B only above Mach 1). *Failing* means: judged and that check fails;
for a quantity no check judges, some limit fails at the point.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.envelope.evaluate import WORST, MapResult
from engine_air.outputs.quantities import QUANTITIES
from engine_air.project.model import REFERENCE_RECOVERY_NAME
from engine_air.envelope.ranking import nearest_index

MACH = "mach"
ALTITUDE = "altitude"


def check_of(result: MapResult, quantity_key: str) -> str | None:
    """Name of the check that judges ``quantity_key`` in this project, or None."""
    q = QUANTITIES[quantity_key]
    named = getattr(q, "check", None)  # a registry that records it wins
    limits = result.project.limits
    if named is None:
        recovery_is_reference = limits.recovery_min == REFERENCE_RECOVERY_NAME
        named = {
            "face_mach_margin": "face-mach",
            "face_mach": "face-mach",
            "throat_mach": "throat-mach",
            "recovery": None if limits.recovery_min is None or recovery_is_reference else "recovery",
            "recovery_minus_reference": "recovery" if recovery_is_reference else None,
            "spillage_fraction": "spillage",
            "relative_tip_mach": "relative-tip-mach",
            "installation_loss_fraction": "installation-loss",
            "started": "started",
        }.get(quantity_key)
    if named is None or not result.cases:
        return None
    names = {c.name for c in result.cases[0].points.checks}
    return named if named in names else None


def limit_of(result: MapResult, quantity_key: str) -> float | None:
    """The limit line of a quantity: 0 for a margin, the project's limit for a judged level quantity, else None."""
    q = QUANTITIES[quantity_key]
    if q.kind == "margin":
        return 0.0
    check = check_of(result, quantity_key)
    if check is None:
        return None
    lim = result.project.limits
    value = {
        "face-mach": lim.face_mach_max,
        "throat-mach": lim.throat_mach_max if lim.throat_mach_max is not None else 1.0,
        "recovery": lim.recovery_min,
        "spillage": lim.spillage_fraction_max,
        "relative-tip-mach": lim.relative_tip_mach_max,
        "installation-loss": getattr(lim, "installation_loss_max", None),
    }.get(check)
    try:
        return float(value)
    except (TypeError, ValueError):
        return None


def judged_map(result: MapResult, case: str, quantity_key: str) -> np.ndarray:
    """(ny, nx) bool: the quantity is judged at the point (see the module text)."""
    values = result.quantity(case, quantity_key)
    with np.errstate(invalid="ignore"):
        judged = result.inside & np.isfinite(values)
    check = check_of(result, quantity_key)
    if check is not None:
        cases = result.cases if case == WORST else [result.case_map(case)]
        applies = np.zeros(result.inside.shape, bool)
        for c in cases:
            for chk in c.points.checks:
                if chk.name == check:
                    applies |= np.asarray(chk.applies, bool)
        judged &= applies
    return judged


def failing_map(result: MapResult, case: str, quantity_key: str) -> np.ndarray:
    """(ny, nx) bool: the quantity's own check fails there (any limit, for a quantity no check judges)."""
    return result.failing(case, check_of(result, quantity_key))


@dataclass(frozen=True)
class CaseSection:
    case: str
    values: np.ndarray  # along the cut, SI units of the quantity; NaN outside the envelope
    judged: np.ndarray  # bool
    failing: np.ndarray  # bool


@dataclass(frozen=True)
class Section:
    """One cut. ``axis`` is ``"mach"`` (x = Mach numbers, at ``at`` = altitude in m) or ``"altitude"``
    (x = altitudes in m, at ``at`` = Mach number); ``index`` is the grid row (or column) used."""

    quantity: str
    axis: str
    at: float
    index: int
    x: np.ndarray
    cases: tuple[CaseSection, ...]
    limit: float | None
    kind: str

    @property
    def case_names(self) -> list[str]:
        return [c.case for c in self.cases]

    def case(self, name: str) -> CaseSection:
        for c in self.cases:
            if c.case == name:
                return c
        raise KeyError(name)


def section_cases(result: MapResult) -> list[str]:
    """Every case, then the worst of all cases when there are several."""
    names = [c.name for c in result.cases]
    return names + ([WORST] if len(names) > 1 else [])


def cut(
    result: MapResult,
    quantity_key: str,
    *,
    altitude_m: float | None = None,
    mach: float | None = None,
    cases: list[str] | None = None,
) -> Section:
    """The cut of ``quantity_key`` at the grid altitude nearest ``altitude_m`` (values against Mach) or at
    the grid Mach number nearest ``mach`` (values against altitude); give exactly one of the two.

    ``cases`` defaults to ``section_cases(result)``. KeyError for an unknown quantity or case,
    ValueError when neither or both positions are given or the position is not finite.
    """
    q = QUANTITIES[quantity_key]
    if (altitude_m is None) == (mach is None):
        raise ValueError("give exactly one of altitude_m (a cut along Mach) or mach (a cut along altitude)")
    where = float(altitude_m if altitude_m is not None else mach)
    if not np.isfinite(where):
        raise ValueError(f"the cut position must be a finite number, got {where!r}")
    names = section_cases(result) if cases is None else list(cases)
    if altitude_m is not None:
        i = nearest_index(result.mach, result.altitude_m, 0.0, where)[0]
        axis, at, x, take = MACH, float(result.altitude_m[i]), np.asarray(result.mach, float), (lambda a: a[i, :])
        index = i
    else:
        j = nearest_index(result.mach, result.altitude_m, where, 0.0)[1]
        axis, at, x, take = ALTITUDE, float(result.mach[j]), np.asarray(result.altitude_m, float), (lambda a: a[:, j])
        index = j
    out = []
    for name in names:
        values = take(result.quantity(name, quantity_key)).astype(float)
        judged = take(judged_map(result, name, quantity_key)).copy()
        failing = take(failing_map(result, name, quantity_key)) & judged
        out.append(CaseSection(name, values, judged, failing))
    return Section(quantity_key, axis, at, index, x.copy(), tuple(out), limit_of(result, quantity_key), q.kind)


def stretches(mask) -> list[tuple[int, int]]:
    """Runs of True in a 1-D bool array as (first, last) index pairs, inclusive."""
    m = np.asarray(mask, bool).astype(np.int8)
    d = np.diff(np.concatenate([[0], m, [0]]))
    starts = np.flatnonzero(d == 1)
    ends = np.flatnonzero(d == -1) - 1
    return list(zip(starts.tolist(), ends.tolist()))


__all__ = ["ALTITUDE", "MACH", "CaseSection", "Section", "check_of", "cut", "failing_map", "judged_map",
           "limit_of", "section_cases", "stretches"]
