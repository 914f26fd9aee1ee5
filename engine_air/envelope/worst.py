"""The worst point of an envelope evaluation: the least relative margin over every check, envelope point and
case, and where it occurs (the one ranking of ``engine_air.envelope.ranking``). Sizing, sweeps and the review
pack all ask for it (``engine_air.studies.sizing`` re-exports it).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from engine_air.envelope.evaluate import MapResult
from engine_air.envelope.ranking import worst_point as _worst


@dataclass(frozen=True)
class WorstPoint:
    """The least relative margin over every check, envelope point and case of one evaluation.

    ``relative_margin`` >= 0 exactly when every limit holds (``holds``).
    ``check`` is None when no check applies anywhere.
    """

    relative_margin: float
    margin: float
    value: float
    check: str | None
    label: str
    limit_text: str
    mach: float
    altitude_m: float
    case: str
    holds: bool
    index: tuple = ()  # (row, column) into the map arrays; () when no check applies

    def where(self) -> str:
        return f"Mach {self.mach:.3f}, {self.altitude_m:.0f} m, case {self.case!r}"


def worst_point(result: MapResult) -> WorstPoint:
    """The worst relative margin of an envelope evaluation and where it occurs."""
    best = _worst([cm.points for cm in result.cases], result.inside)
    holds = result.holds  # a limit judged nowhere (outside its region everywhere) does not fail
    if best is None:
        return WorstPoint(math.inf, math.nan, math.nan, None, "", "", math.nan, math.nan, "", holds)
    cm = result.cases[best.case]
    chk, j = cm.points.checks[best.check], best.index
    rel = float(chk.relative_margin[j])
    return WorstPoint(
        relative_margin=rel, margin=float(chk.margin[j]), value=float(chk.value[j]), check=chk.name,
        label=chk.label, limit_text=chk.limit_text, mach=float(result.mach[j[1]]),
        altitude_m=float(result.altitude_m[j[0]]), case=cm.name, holds=holds, index=(int(j[0]), int(j[1])),
    )
