"""Plain-words account of why a check fails (or how close it is) at one point, with the numbers.

``mechanism(project, points, index, check_name)`` returns one sentence for a
design review, e.g. "the engine asks W_c2/A2 = 194.4 kg/(s m^2) at the face; the
limit M2 = 0.55 allows 191.9 (theta2 = 0.79)".
"""

from __future__ import annotations

import numpy as np

from engine_air.envelope import flags as F
from engine_air.physics.isentropic import choked_corrected_flow_per_area, mass_flow_parameter, choked_mass_flow_parameter
from engine_air.flow.match import REGIMES, OperatingPoints
from engine_air.project.model import Project


def _flow_per_area_at(mach: float) -> float:
    return float(choked_corrected_flow_per_area() * mass_flow_parameter(mach) / choked_mass_flow_parameter())


def mechanism(project: Project, points: OperatingPoints, index, check_name: str) -> str:
    """One sentence on what drives ``check_name`` at the point ``index``."""
    v = lambda name: float(np.asarray(getattr(points, name))[index])  # noqa: E731
    bits = int(np.asarray(points.flags)[index])
    regime = REGIMES[int(np.asarray(points.regime)[index])]
    inlet, limits = project.inlet, project.limits
    if bits & F.OUTSIDE_ATMOSPHERE:
        return F.DESCRIPTIONS["outside-atmosphere"]
    if check_name == "face-mach":
        demand = v("corrected_flow_kg_s") / inlet.face_area_m2
        text = (f"the engine asks W_c2/A2 = {demand:.1f} kg/(s m^2) at the face (W_c2 = {v('corrected_flow_kg_s'):.1f} kg/s, "
                f"theta2 = {v('theta2'):.3f}); M2 = {limits.face_mach_max:g} allows {_flow_per_area_at(limits.face_mach_max):.1f}")
        if bits & F.FACE_CHOKED:
            text += f"; the face chokes at {choked_corrected_flow_per_area():.2f}"
        return text
    if check_name == "throat-mach":
        if bits & F.THROAT_CHOKED:
            return (f"the throat is choked: it passes at most the sonic flow through A_th = {inlet.throat_area_m2:g} m^2, "
                    f"so recovery falls to {v('recovery'):.4f} to meet the engine's corrected demand")
        return (f"the flow {v('mass_flow_kg_s'):.1f} kg/s through A_th = {inlet.throat_area_m2:g} m^2 runs at M_th = "
                f"{v('throat_mach'):.3f} (corrected demand {v('corrected_flow_kg_s'):.1f} kg/s at theta2 = {v('theta2'):.3f})")
    if check_name == "recovery":
        text = (f"recovery {v('recovery'):.4f} (shock system {v('external_recovery'):.4f}, duct {v('duct_recovery'):.4f}) "
                f"against MIL-E-5008B {v('reference_recovery'):.4f} at Mach {v('mach'):.3f}")
        if bits & F.SUPERCRITICAL:
            text += "; supercritical: the engine asks more air than the shocks capture, the terminal shock is in the duct"
        if bits & F.THROAT_CHOKED:
            text += "; the throat is choked"
        return text
    if check_name == "stability":
        return (f"subcritical operation with MFR/MFR_max = {v('mass_flow_ratio') / v('max_mass_flow_ratio'):.3f} "
                f"(MFR {v('mass_flow_ratio'):.3f} of MFR_max {v('max_mass_flow_ratio'):.3f}): the engine takes too little "
                f"of the capture area's air at this Mach number and the spilled flow risks buzz")
    if check_name == "relative-tip-mach":
        return f"blade relative tip Mach {v('relative_tip_mach'):.3f} with face Mach {v('face_mach'):.3f}"
    if check_name == "spillage":
        return f"mass-flow ratio {v('mass_flow_ratio'):.3f}: spillage {v('spillage_fraction'):.3f} ({regime} operation)"
    if check_name == "started":
        from engine_air.inlets.mixed_compression import starting_machs

        start, unstart = starting_machs(inlet)
        history = ("it does not self-start below Mach 5" if start is None else
                   f"accelerating it self-starts at Mach {start:.3f}, decelerating it stays started down to Mach {unstart:.3f}")
        if bits & F.UNSTARTED:
            return (f"unstarted: internal contraction A_th/A_e = {v('internal_contraction_ratio'):.4f} (cowl entrance "
                    f"A_e = {v('entrance_area_m2'):.4g} m^2) against the self-start (Kantrowitz) limit "
                    f"{v('self_start_contraction'):.4f} on A_th/A_e at the post-ramp Mach; {history}")
        if bits & F.UNSTART_RISK:
            return (f"started, but the engine takes MFR {v('mass_flow_ratio'):.3f} of the {v('max_mass_flow_ratio'):.3f} "
                    "captured: without bleed or bypass for the excess the terminal shock would be expelled")
        return f"started ({history})"
    if check_name in ("dc60", "surge-margin"):
        return (f"engine-face distortion from the characteristics data at mass-flow ratio {v('mass_flow_ratio'):.3f} "
                f"({regime} operation): DC(60) and the ring intensities load the engine's surge-margin stack-up")
    return f"{regime} operation"


QUIET_FLAGS = ("ok", "additive-drag-not-modelled", "no-tip-speed", "outside-envelope")
"""Flags that say nothing about why a limit is reached (left out of a finding's flag list)."""


def finding_mechanism(project: Project, result, summary) -> tuple[str, str, str]:
    """(regime, flags, mechanism) of one finding (a ``LimitSummary`` of ``result``) at *its own* worst point.

    The mechanism is ``mechanism(project, points, index, check)`` for that row's
    check, case and point, so each row says what drives its own limit, with its
    own numbers; a check judged nowhere gives ("–", "–", "the check applies at
    no envelope point").
    """
    from engine_air.envelope.ranking import nearest_index

    if not summary.worst_case:
        return "–", "–", "the check applies at no envelope point"
    points = result.case_map(summary.worst_case).points
    j = nearest_index(result.mach, result.altitude_m, summary.worst_mach, summary.worst_altitude_m)
    regime = REGIMES[int(np.asarray(points.regime)[j])]
    names = [n for n in F.names_of(int(np.asarray(points.flags)[j])) if n not in QUIET_FLAGS]
    return regime, ", ".join(names) or "ok", mechanism(project, points, j, summary.name)
