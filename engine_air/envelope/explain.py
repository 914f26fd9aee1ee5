"""Plain-words account of why a check fails (or how close it is) at one point, with the point's own numbers.

``mechanism(project, points, index, check_name, units="si")`` returns one sentence
for a design review, e.g. "the engine asks W_c2/A2 = 194.4 kg/(s m^2) at the face;
the limit M2 = 0.55 allows 191.9 (theta2 = 0.79)".

Every number is the point's own: the geometry scheduled at its flight Mach number
(method §12: a scheduled throat area, not the fixed key), the flow that actually
passes each station (the throat passes the engine's flow and the bypass flow; the
auxiliary doors' share goes beside it), the ledger's own items (method §13). With
``units="us"`` flows, areas, flow per area and forces are in lbm/s, ft^2,
lbm/(s ft^2) and lbf.
"""

from __future__ import annotations

import numpy as np

from engine_air.envelope import flags as F
from engine_air.physics.isentropic import choked_corrected_flow_per_area, mass_flow_parameter, choked_mass_flow_parameter
from engine_air.flow.match import REGIMES, OperatingPoints
from engine_air.project.model import Project

_FT, _LBM, _LBF = 0.3048, 0.45359237, 4.4482216152605  # exact definitions of the foot, pound mass and pound force
_UNITS = {  # SI unit -> (US unit, US value of one SI unit)
    "kg/s": ("lbm/s", 1.0 / _LBM),
    "m^2": ("ft^2", 1.0 / _FT ** 2),
    "kg/(s m^2)": ("lbm/(s ft^2)", _FT ** 2 / _LBM),
    "N": ("lbf", 1.0 / _LBF),
}


def amount(value: float, unit: str, units: str = "si", digits: int = 1) -> str:
    """``value`` (SI ``unit``) as text in the chosen units, e.g. ``amount(100.0, "kg/s", "us")``.

    >>> amount(100.0, "kg/s", "us")
    '220.5 lbm/s'
    >>> amount(1.15, "m^2", digits=3)
    '1.150 m^2'
    """
    force = unit == "N"
    if str(units).lower() == "us" and unit in _UNITS:
        unit, factor = _UNITS[unit]
        value = value * factor
    if force:  # whole newtons (pounds), thousands apart by a space
        return f"{value:,.0f} {unit}".replace(",", " ")
    return f"{value:.{digits}f} {unit}"


def _flow_per_area_at(mach: float) -> float:
    return float(choked_corrected_flow_per_area() * mass_flow_parameter(mach) / choked_mass_flow_parameter())


class _At:
    """One point of ``points``: values by name, flags, the project and the display units."""

    def __init__(self, project: Project, points: OperatingPoints, index, units: str) -> None:
        self.project, self.points, self.index, self.units = project, points, index, units
        self.bits = int(np.asarray(points.flags)[index])
        self.regime = REGIMES[int(np.asarray(points.regime)[index])]

    def __call__(self, name: str) -> float:
        value = getattr(self.points, name, None)
        return float("nan") if value is None else float(np.broadcast_to(value, np.shape(self.points.mach))[self.index])

    def has(self, flag: int) -> bool:
        return bool(self.bits & flag)

    def q(self, value: float, unit: str, digits: int = 1) -> str:
        return amount(value, unit, self.units, digits)

    def throat_area(self) -> float:
        from engine_air.inlets.schedule import scheduled

        return float(scheduled(self.project.inlet, "throat_area_m2", self("mach")))


def _face(at: _At) -> str:
    limits = at.project.limits
    demand = at("corrected_flow_kg_s") / at.project.inlet.face_area_m2
    text = (f"the engine asks W_c2/A2 = {at.q(demand, 'kg/(s m^2)')} at the face (W_c2 = "
            f"{at.q(at('corrected_flow_kg_s'), 'kg/s')}, theta2 = {at('theta2'):.3f}); M2 = {limits.face_mach_max:g} "
            f"allows {at.q(_flow_per_area_at(limits.face_mach_max), 'kg/(s m^2)')}")
    if at.has(F.FACE_CHOKED):
        text += f"; the face chokes at {at.q(choked_corrected_flow_per_area(), 'kg/(s m^2)', 2)}"
    return text


def _throat(at: _At) -> str:
    from engine_air.inlets.schedule import is_scheduled

    area = at.throat_area()
    a_text = f"A_th = {at.q(area, 'm^2', 3)}" + (
        f" (scheduled at Mach {at('mach'):.3f})" if is_scheduled(at.project.inlet, "throat_area_m2") else "")
    engine, bypass, aux = at("mass_flow_kg_s"), at("bypass_flow_kg_s"), at("auxiliary_flow_kg_s")
    bypass = bypass if np.isfinite(bypass) else 0.0
    aux = aux if np.isfinite(aux) else 0.0
    through = engine + bypass - aux
    split = f"engine {at.q(engine, 'kg/s')}" + (f" + bypass {at.q(bypass, 'kg/s')}" if bypass > 0.0 else "")
    if aux > 0.0:
        split += f", less {at.q(aux, 'kg/s')} through the auxiliary doors beside it"
    if at.points.started is not None and bool(np.asarray(at.points.started)[at.index]):
        return (f"started: the throat {a_text} runs supersonic at M_th = {at('throat_mach'):.3f}, the terminal shock "
                f"just behind it; it passes {at.q(through, 'kg/s')} ({split})")
    if at.has(F.THROAT_CHOKED):
        return (f"the throat is choked: {a_text} passes at most the sonic flow, {at.q(through, 'kg/s')} ({split}), "
                f"so recovery falls to {at('recovery'):.4f} to meet the engine's corrected demand")
    return (f"the flow {at.q(through, 'kg/s')} ({split}) through {a_text} runs at M_th = {at('throat_mach'):.3f} "
            f"(corrected demand {at.q(at('corrected_flow_kg_s'), 'kg/s')} at theta2 = {at('theta2'):.3f})")


def _recovery(at: _At) -> str:
    text = (f"recovery {at('recovery'):.4f} (shock system {at('external_recovery'):.4f}, duct "
            f"{at('duct_recovery'):.4f}) against MIL-E-5008B {at('reference_recovery'):.4f} at Mach {at('mach'):.3f}")
    if at.has(F.SUPERCRITICAL):
        text += "; supercritical: the engine asks more air than the shocks capture, the terminal shock is in the duct"
    if at.has(F.THROAT_CHOKED):
        text += "; the throat is choked"
    return text


def _stability(at: _At) -> str:
    mfr, top = at("mass_flow_ratio"), at("max_mass_flow_ratio")
    return (f"subcritical operation with MFR/MFR_max = {mfr / top:.3f} (MFR {mfr:.3f} of MFR_max {top:.3f}): the "
            "engine takes too little of the capture area's air at this Mach number and the spilled flow risks buzz")


def _started(at: _At) -> str:
    from engine_air.inlets.mixed_compression import starting_machs

    m0 = at("mach")
    start, unstart = starting_machs(at.project.inlet)
    if start is None:
        history = "it does not self-start below Mach 5 at any point of its schedule"
    else:
        history = (f"accelerating it self-starts at Mach {start:.3f}, decelerating it stays started down to "
                   f"Mach {unstart:.3f}")
    if at.has(F.UNSTARTED):
        kantrowitz = (f"internal contraction A_th/A_e = {at('internal_contraction_ratio'):.4f} (cowl entrance A_e = "
                      f"{at.q(at('entrance_area_m2'), 'm^2', 4)}) against the self-start (Kantrowitz) limit "
                      f"{at('self_start_contraction'):.4f} on A_th/A_e at the post-ramp Mach")
        if start is not None and m0 < unstart:
            return (f"unstarted by design at Mach {m0:.3f}, below the unstart Mach {unstart:.3f}: no started flow "
                    f"exists here ({kantrowitz}); {history}, so the started check means something only above "
                    f"Mach {unstart:.3f}")
        if start is not None and m0 < start:
            return (f"unstarted at Mach {m0:.3f}, inside the hysteresis band: {history}; accelerating from below it "
                    f"has not started yet ({kantrowitz})")
        return f"unstarted: {kantrowitz}; {history}"
    if at.has(F.UNSTART_RISK):
        return (f"started, but the engine takes MFR {at('mass_flow_ratio'):.3f} of the {at('max_mass_flow_ratio'):.3f} "
                f"captured: without bleed or bypass for the excess the terminal shock would be expelled ({history})")
    return f"started ({history})"


def _installation(at: _At) -> str:
    f_n, f_inst = at("net_thrust_n"), at("installed_thrust_n")
    if not (np.isfinite(f_n) and np.isfinite(f_inst)) or f_n == 0.0:
        return "no thrust data: installation loss is not computed"
    pi, pi_ref = at("recovery"), at("thrust_reference_recovery")
    drags = [(name, at(key)) for name, key in (("spillage", "spillage_drag_n"), ("bleed", "bleed_drag_n"),
                                                ("bypass", "bypass_drag_n"))]
    drags = [(name, d if np.isfinite(d) else 0.0) for name, d in drags]
    penalty = f_n - f_inst - sum(d for _, d in drags)  # F_n X (1 - pi/pi_ref), the ledger's remainder (method §13)

    def item(name, value):
        return f"{name} {at.q(value, 'N')} ({100.0 * value / f_n:.1f} %)"

    items = [item(f"recovery penalty (pi {pi:.4f} against pi_ref {pi_ref:.4f})", penalty)]
    items += [item(f"{name} drag", d) for name, d in drags]
    return (f"installation loss {at('installation_loss_fraction'):.4f} of the net thrust F_n = {at.q(f_n, 'N')}: "
            + ", ".join(items) + f"; installed thrust {at.q(f_inst, 'N')}")


def _distortion(at: _At) -> str:
    return (f"engine-face distortion from the characteristics data at mass-flow ratio {at('mass_flow_ratio'):.3f} "
            f"({at.regime} operation): DC(60) and the ring intensities load the engine's surge-margin stack-up")


def _generic(at: _At, check_name: str) -> str:
    try:
        chk = at.points.check(check_name)
    except KeyError:
        return f"{at.regime} operation"
    value = float(np.broadcast_to(chk.value, np.shape(at.points.mach))[at.index])
    margin = float(np.broadcast_to(chk.margin, np.shape(at.points.mach))[at.index])
    return f"{chk.label} {value:.4g} against {chk.limit_text} (margin {margin:+.4g})"


_TEXTS = {"face-mach": _face, "throat-mach": _throat, "recovery": _recovery, "stability": _stability,
          "started": _started, "installation-loss": _installation, "dc60": _distortion, "surge-margin": _distortion}


def mechanism(project: Project, points: OperatingPoints, index, check_name: str, units: str = "si") -> str:
    """One sentence on what drives ``check_name`` at the point ``index``, in ``units`` ("si" or "us")."""
    at = _At(project, points, index, str(units).lower())
    if at.has(F.OUTSIDE_ATMOSPHERE):
        return F.DESCRIPTIONS["outside-atmosphere"]
    if check_name in _TEXTS:
        return _TEXTS[check_name](at)
    if check_name == "relative-tip-mach":
        return f"blade relative tip Mach {at('relative_tip_mach'):.3f} with face Mach {at('face_mach'):.3f}"
    if check_name == "spillage":
        return (f"mass-flow ratio {at('mass_flow_ratio'):.3f}: spillage {at('spillage_fraction'):.3f} "
                f"({at.regime} operation)")
    return _generic(at, check_name)


QUIET_FLAGS = ("ok", "additive-drag-not-modelled", "no-tip-speed", "outside-envelope")
"""Flags that say nothing about why a limit is reached (left out of a finding's flag list)."""


def finding_mechanism(project: Project, result, summary, units: str = "si") -> tuple[str, str, str]:
    """(regime, flags, mechanism) of one finding (a ``LimitSummary`` of ``result``) at *its own* worst point.

    The mechanism is ``mechanism(project, points, index, check, units)`` for that
    row's check, case and point, so each row says what drives its own limit, with
    its own numbers; a check judged nowhere gives ("–", "–", "not judged anywhere:
    " and why: outside its region, or the check applies at no envelope point).
    """
    from engine_air.envelope.ranking import nearest_index

    if not summary.worst_case:
        from engine_air.envelope.evaluate import not_judged_reason

        return "–", "–", "not judged anywhere: " + not_judged_reason(project, summary)
    points = result.case_map(summary.worst_case).points
    j = nearest_index(result.mach, result.altitude_m, summary.worst_mach, summary.worst_altitude_m)
    regime = REGIMES[int(np.asarray(points.regime)[j])]
    names = [n for n in F.names_of(int(np.asarray(points.flags)[j])) if n not in QUIET_FLAGS]
    return regime, ", ".join(names) or "ok", mechanism(project, points, j, summary.name, units)


__all__ = ["QUIET_FLAGS", "amount", "finding_mechanism", "mechanism"]
