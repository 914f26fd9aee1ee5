"""The inlet characteristic at a flight condition (method §16), from the model or from data (§17).

At one flight condition (M0, altitude, case) the characteristic is the total-pressure recovery π = p_t2/p_t0
against the captured mass-flow ratio MFR as the engine's corrected flow is varied from a small value to just
below face choking: the same station chain as a map point (``engine_air.flow``) with the demand replaced by
that sweep. For M0 > 1 it has the subcritical branch (MFR < MFR_max), the critical point and the supercritical
branch (captured flow held at MFR_max, π falling: a vertical line); the stability (buzz) boundary
MFR = stable_flow_fraction·MFR_max where §10 judges buzz (an oblique or conical shock ahead of the cowl).
Subsonic: π against MFR up to throat choking.

Every term of the chain scales with p0 and T0 at fixed M0 (MFR = W_c2·π·p_t0/(p_ref·√θ2·ρ0·V0·A_c) and
p_t0/(√θ2·ρ0·V0) does not depend on altitude), so the characteristic does not depend on altitude: a test shows it.

Where a characteristics table covers the condition the curve shown is the data's (interpolated in Mach and
incidence, §17) with ``source`` "data"; the model's is computed as well for comparison.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from engine_air.physics.isentropic import choked_mass_flow_parameter
from engine_air.project.model import incidence_at
from engine_air.physics.constants import P_REF, T_REF

SWEEP_POINTS = 200
SWEEP_LOW, SWEEP_HIGH = 0.02, 0.995
"""The demand swept: face corrected flow from 2 % to 99.5 % of the face's choking corrected flow."""


@dataclass
class Curve:
    mach: float
    altitude_m: float
    case: str
    source: str  # "model" | "data"
    mass_flow_ratio: np.ndarray
    recovery: np.ndarray
    critical_mass_flow_ratio: float
    critical_recovery: float
    stability_limit_mass_flow_ratio: float | None
    operating_points: list[dict] = field(default_factory=list)
    model_mass_flow_ratio: np.ndarray | None = None  # the model's curve beside data
    model_recovery: np.ndarray | None = None
    holds: bool | None = None  # every judged limit holds at the operating points (None: none judged)

    def as_json(self) -> dict:
        def clean(values):
            return [None if not np.isfinite(v) else float(v) for v in np.asarray(values, float)]

        def one(v):
            return None if v is None or not np.isfinite(v) else float(v)

        return {
            "mach": float(self.mach), "altitude_m": float(self.altitude_m), "case": self.case, "source": self.source,
            "mass_flow_ratio": clean(self.mass_flow_ratio), "recovery": clean(self.recovery),
            "critical_mass_flow_ratio": one(self.critical_mass_flow_ratio),
            "critical_recovery": one(self.critical_recovery),
            "stability_limit_mass_flow_ratio": one(self.stability_limit_mass_flow_ratio),
            "operating_points": [{k: (one(v) if isinstance(v, float) else v) for k, v in p.items()}
                                 for p in self.operating_points],
        }


def demand_sweep(project, points: int = SWEEP_POINTS) -> np.ndarray:
    """Corrected flows W_c2 (kg/s) from 2 % to 99.5 % of the face's choking corrected flow."""
    choke = choked_mass_flow_parameter() * P_REF * project.inlet.face_area_m2 / np.sqrt(T_REF)
    return np.linspace(SWEEP_LOW, SWEEP_HIGH, points) * choke


def model_sweep(project, case, mach: float, altitude_m: float, points: int = SWEEP_POINTS):
    """The chain's operating points along the demand sweep at one condition (arrays of length ``points``)."""
    from engine_air.flow.chain import characteristic

    return characteristic(project, case, np.float64(mach), np.float64(altitude_m), demand_sweep(project, points),
                          data=False)


def subcritical_branch(ops) -> tuple[np.ndarray, np.ndarray, float, float]:
    """(MFR, π) along the sweep below the critical point, closed by the critical point itself, and
    (MFR_max, π_crit).

    Points where the captured flow is held (supercritical, or a choked throat) are left out; the critical
    recovery is the branch carried on linearly from its last two points to MFR_max (the sweep is dense: the
    last point lies within about 1 % of it)."""
    from engine_air.flow import flags as F

    mfr, rec = np.asarray(ops.mass_flow_ratio, float), np.asarray(ops.recovery, float)
    held = (np.asarray(ops.regime) == 3) | ((np.asarray(ops.flags) & F.THROAT_CHOKED) != 0)
    finite_max = np.asarray(ops.max_mass_flow_ratio, float)
    mfr_max = float(np.nanmax(finite_max)) if np.isfinite(finite_max).any() else float("nan")
    keep = np.isfinite(mfr) & np.isfinite(rec) & ~held & (mfr < mfr_max * (1.0 - 1e-9))  # held at MFR_max: out
    x, y = mfr[keep], rec[keep]
    if len(x) >= 2 and np.isfinite(mfr_max):
        slope = (y[-1] - y[-2]) / (x[-1] - x[-2])
        crit = float(y[-1] + slope * (mfr_max - x[-1]))
        x, y = np.append(x, mfr_max), np.append(y, crit)
    else:
        crit = float(y[-1]) if len(y) else float("nan")
    return x, y, mfr_max, crit


def model_curve(project, case, mach: float, altitude_m: float, points: int = SWEEP_POINTS) -> Curve:
    """The model's characteristic at one condition, in the order of the sweep (demand rising)."""
    ops = model_sweep(project, case, mach, altitude_m, points)
    mfr, rec = np.asarray(ops.mass_flow_ratio, float), np.asarray(ops.recovery, float)
    _, _, mfr_max, crit = subcritical_branch(ops)
    stability = None
    fraction = project.limits.stable_flow_fraction
    oblique = getattr(ops, "oblique_ahead_of_cowl", None)
    if mach > 1.0 and fraction is not None and oblique is not None and bool(np.any(oblique)):
        stability = fraction * mfr_max
    return Curve(float(mach), float(altitude_m), case.name, "model", mfr, rec, mfr_max, crit, stability)


def data_curve(curves, mach: float, alpha_deg: float, beta_deg: float, altitude_m: float, case_name: str):
    """The interpolated data curve at one condition, or None where the table does not cover it.

    Subcritical branch from the smallest tested fraction to the critical point, then the supercritical branch
    down to 70 % of the critical recovery (a vertical line at MFR_crit)."""
    from engine_air.characteristics.interpolate import locate, recovery_at

    at = locate(curves, np.array([mach]), alpha_deg, beta_deg)
    if not bool(at.covered[0]):
        return None
    neighbours = at.index[0][at.weight[0] > 0.0]
    grid = np.unique(np.concatenate([curves.nodes[i] for i in neighbours]))
    grid = grid[grid >= at.min_fraction[0] - 1e-12]  # the neighbours' own points: every kink of the blend
    rec = recovery_at(at, grid)  # the one located condition broadcast along the fraction grid
    crit_mfr, crit_rec = float(at.critical_mass_flow_ratio[0]), float(at.critical_recovery[0])
    tail = np.linspace(crit_rec, 0.7 * crit_rec, 8)[1:]
    stab = float(at.stability_limit[0])
    return Curve(float(mach), float(altitude_m), case_name, "data",
                 np.concatenate([grid * crit_mfr, np.full(len(tail), crit_mfr)]), np.concatenate([rec, tail]),
                 crit_mfr, crit_rec, stab if np.isfinite(stab) else None)

def operating_points(project, mach: float, altitude_m: float) -> tuple[list[dict], bool | None]:
    """Each case's operating point at one condition: rating, case, MFR, recovery; and whether every judged limit
    holds at them (None where no limit is judged at any; a point outside the envelope polygon is not judged)."""
    from engine_air.envelope.conditions import evaluate_conditions
    from engine_air.envelope.polygon import polygon_contains

    m, h = np.array([float(mach)]), np.array([float(altitude_m)])
    inside = bool(polygon_contains(project.envelope.mach, project.envelope.altitude_m, m, h)[0])
    points, verdicts = [], []
    for case in project.cases:
        judged = evaluate_conditions(project, case, m, h)
        applies = [bool(np.asarray(c.applies)[0]) for c in judged.checks]
        holds = None
        if inside and any(applies):
            holds = not any(bool(np.asarray(c.fails)[0]) for c in judged.checks)
            verdicts.append(holds)
        mfr, rec = float(np.asarray(judged.mass_flow_ratio)[0]), float(np.asarray(judged.recovery)[0])
        points.append({"rating": case.rating, "case": case.name,
                       "mass_flow_ratio": mfr if np.isfinite(mfr) else None,
                       "recovery": rec if np.isfinite(rec) else None, "judged": holds is not None, "holds": holds})
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
