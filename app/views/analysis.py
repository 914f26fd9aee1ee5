"""Small read-only helpers over an ``engine_air.envelope.evaluate.MapResult`` for the views.

Only the documented names of the analysis package are used: ``MapResult``
(mach, altitude_m, inside, cases, quantity, failing, flags, summary),
``OperatingPoints.checks`` and ``Check`` (relative_margin, applies, fails).
"""

from __future__ import annotations

import numpy as np

from engine_air.envelope import ranking
from engine_air.envelope.evaluate import WORST


def least_relative_margin(points) -> np.ndarray:
    """(ny, nx) least relative margin over the checks that apply; NaN where none applies.

    Failing checks rank first (``engine_air.envelope.ranking``), so the zero
    level of this field is the boundary of the region where some limit fails.
    """
    return ranking.worst_relative_margin(points.checks, np.shape(points.mach))


def limiting_field(result, case: str) -> np.ndarray:
    """Least relative margin over checks (and over cases for WORST), NaN outside the envelope."""
    cases = result.cases if case == WORST else [result.case_map(case)]
    with np.errstate(invalid="ignore"):
        stack = np.stack([least_relative_margin(c.points) for c in cases])
        filled = np.where(np.isnan(stack), np.inf, stack)
        out = np.min(filled, axis=0)
    out = np.where(np.isinf(out), np.nan, out)
    return np.where(result.inside, out, np.nan)


def case_at(result, case: str, index) -> str:
    """The case to show at grid ``index``: ``case`` itself, or for WORST the case with the least margin there."""
    if case != WORST:
        return case
    idx = ranking.worst_case_index([c.points for c in result.cases], np.shape(result.inside))
    return result.cases[int(idx[index])].name


def limiting_at(points, index) -> tuple[str, bool] | None:
    """(label, fails) of the limiting check at grid ``index``; None when no check applies."""
    k = int(ranking.limiting_index(points.checks, np.shape(points.mach))[index])
    if k < 0:
        return None
    c = points.checks[k]
    return c.label, bool(np.asarray(c.fails)[index])


def nearest_index(result, mach: float, altitude_m: float) -> tuple[int, int]:
    """Grid (row i, column j) nearest to a flight condition."""
    return ranking.nearest_index(result.mach, result.altitude_m, mach, altitude_m)


def failing_count(result) -> tuple[int, int]:
    """(checks failing, checks judged somewhere) over the summary; a check judged nowhere is in neither."""
    judged = [s for s in result.summary if s.holds is not None]
    return sum(1 for s in judged if not s.holds), len(judged)


def source_text(project, case, record: dict) -> str:
    """Plain text: where the point's recovery, MFR_max and stability come from (measured characteristics or the
    model, method §17), and the case's incidence when it gives one ("incidence not modelled" where flagged)."""
    from pathlib import Path

    curves = getattr(project, "characteristics", None)
    table = getattr(curves, "table", None)
    what = "Recovery, MFR_max and stability: "
    if curves is None:
        line = what + "model (no characteristics table)"
    elif record.get("data_source") == "data":
        name = Path(table.path).name if table is not None and getattr(table, "path", None) else "in the project"
        line = what + f"measured characteristics (table {name})"
    else:
        line = what + "model (outside the tested conditions)"
    given = case is not None and (case.angle_of_attack_deg is not None or case.sideslip_deg is not None)
    if given:
        alpha, beta = record.get("angle_of_attack_deg"), record.get("sideslip_deg")
        line += f"\nIncidence: alpha = {_deg(alpha)}, beta = {_deg(beta)}"
    if "incidence-not-modelled" in record.get("flags", ()):
        line += ("; " if given else "\n") + "incidence not modelled (the model's numbers are for zero incidence)"
    return line


def _deg(value) -> str:
    return "—" if value is None or not np.isfinite(value) else f"{float(value):.1f}°"
