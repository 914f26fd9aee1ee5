"""The characteristic at flight conditions as the outputs show it (method §16, §17): the curve from data where a
characteristics table covers the condition, else from the model, with the engine's operating points for every
case at that condition and whether every judged limit holds there.
"""

from __future__ import annotations

import numpy as np

from engine_air.characteristics.characteristic import Curve, data_curve, model_curve
from engine_air.project.model import incidence_at


def operating_points(project, mach: float, altitude_m: float) -> tuple[list[dict], bool | None]:
    """Each case's operating point at one condition: rating, case, MFR, recovery; and whether every judged limit
    holds at them (None where no limit is judged at any)."""
    from engine_air.outputs.point import evaluate_point

    points, verdicts = [], []
    for case in project.cases:
        record = evaluate_point(project, mach, altitude_m, case.name)
        points.append({"rating": case.rating, "case": case.name, "mass_flow_ratio": record["mass_flow_ratio"],
                       "recovery": record["recovery"], "judged": record.get("judged"),
                       "holds": record.get("holds")})
        if record.get("holds") is not None:
            verdicts.append(bool(record["holds"]))
    return points, (all(verdicts) if verdicts else None)


def characteristic_at(project, case, mach: float, altitude_m: float) -> Curve:
    """The characteristic shown at one condition for ``case`` (its incidence picks the data curve)."""
    model = model_curve(project, case, mach, altitude_m)
    curve = model
    if project.characteristics is not None:
        alpha = float(incidence_at(case.angle_of_attack_deg, np.float64(mach)))
        beta = float(incidence_at(case.sideslip_deg, np.float64(mach)))
        data = data_curve(project.characteristics, mach, alpha, beta, altitude_m, case.name)
        if data is not None:
            data.model_mass_flow_ratio, data.model_recovery = model.mass_flow_ratio, model.recovery
            curve = data
    curve.operating_points, curve.holds = operating_points(project, mach, altitude_m)
    return curve


def measured_rows(project, mach: float, case=None, tolerance: float = 1e-9) -> dict[str, np.ndarray] | None:
    """The characteristics table's rows at exactly this Mach number and the case's incidence there (for
    overlay), or None."""
    curves = project.characteristics
    if curves is None or getattr(curves, "table", None) is None:
        return None
    table = curves.table
    alpha = 0.0 if case is None else float(incidence_at(case.angle_of_attack_deg, np.float64(mach)))
    beta = 0.0 if case is None else float(incidence_at(case.sideslip_deg, np.float64(mach)))
    sel = ((np.abs(table.column("mach") - mach) <= tolerance) & (np.abs(table.column("alpha_deg") - alpha) <= 1e-9)
           & (np.abs(table.column("beta_deg") - beta) <= 1e-9))
    if not sel.any():
        return None
    return {name: table.column(name)[sel] for name in ("mass_flow_ratio", "recovery", "alpha_deg", "beta_deg")}
