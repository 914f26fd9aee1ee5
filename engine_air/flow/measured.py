"""Measured characteristics as a stage of the match (method §17): data over the model where they cover.

The chain (``engine_air.flow.chain.run_chain``) calls ``data_capture`` in place of the model's capture stage when
the project has a characteristics table, ``measured_drag`` after the drag stage and ``measured_fields`` on the
assembled points. At each point:

1. the curves around the flight condition (M0 and the case's incidence alpha, beta at M0) are located
   (``engine_air.characteristics.interpolate``);
2. the engine's demand gives c = W_c2·p_t0 / (p_ref·√θ2·(1 − b)·ρ0·V0·A_c) and the match on data solves
   MFR = c·π(MFR) (``engine_air.characteristics.root``), with the supercritical rule of §6 above the critical
   MFR;
3. where that is covered, the data's recovery (the whole π: it is measured at the face), critical MFR and
   stability limit replace the model's; the compression state passed on to the throat carries
   π_ext = π_data/π_duct (the model's duct loss taken back out) so that the throat sees the measured total
   pressure. Elsewhere (outside the tested conditions, below the smallest tested flow, low speed) the model
   stands, flagged ``outside-data``; at non-zero incidence without data the model (at zero incidence) stands,
   flagged ``incidence-not-modelled``.

Face Mach still comes from the engine's corrected flow (§3); the pre-entry and spillage drag from the model
unless the table gives ``additive_drag_coefficient``; DC(60) and the loss of surge margin (§18) from the table's
columns at the operating point where it has them.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from engine_air.characteristics.interpolate import column_at, locate
from engine_air.characteristics.root import match_on_data
from engine_air.flow import flags as F
from engine_air.flow.stages import ERRSTATE, Capture, Compression, capture
from engine_air.physics.constants import CRITICAL_BAND, GAMMA, P_REF
from engine_air.project.model import incidence_at


@dataclass(frozen=True)
class Measured:
    """What the data decided at each point (carried on ``Compression.measured`` to the later stages)."""

    used: np.ndarray  # bool: the data decide the point
    located: object  # Located
    fraction: np.ndarray  # MFR / MFR_crit on the data curve (NaN where not used)
    stable_flow_fraction: np.ndarray  # the data's stability limit / MFR_crit (NaN where none or not used)
    alpha_deg: np.ndarray
    beta_deg: np.ndarray


def data_capture(project, case, fs, dem, fc, comp: Compression) -> tuple[Compression, Capture]:
    """The capture stage on measured characteristics, the model's where the data do not cover."""
    model = capture(project.inlet, fs, dem, fc, comp)
    with np.errstate(**ERRSTATE):
        alpha = incidence_at(case.angle_of_attack_deg, fs.mach)
        beta = incidence_at(case.sideslip_deg, fs.mach)
        at = locate(project.characteristics, fs.mach, alpha, beta)
        coefficient = (fc.corrected_flow_kg_s * fs.inlet_total_pressure_pa / (P_REF * np.sqrt(dem.theta2))
                       / ((1.0 - comp.bleed_fraction) * model.capture_flow_kg_s))
        op = match_on_data(at, coefficient)
        used = op.covered & ~fs.low_speed
        pi = np.where(used, op.recovery, model.recovery)
        w = np.where(used, fc.corrected_flow_kg_s * pi * fs.inlet_total_pressure_pa / P_REF / np.sqrt(dem.theta2),
                     model.engine_flow_kg_s)
        crit = np.where(used, at.critical_mass_flow_ratio, comp.shocks.max_mass_flow_ratio)
        ratio = op.mass_flow_ratio / at.critical_mass_flow_ratio
        supercritical = np.where(used, fs.supersonic & op.supercritical, model.supercritical)
        critical = np.where(used, fs.supersonic & ~op.supercritical & (np.abs(ratio - 1.0) <= CRITICAL_BAND),
                            model.critical)
        pi_ext = np.where(used, pi / model.duct_recovery, comp.shocks.external_recovery)
        stable = np.where(used, at.stability_limit / at.critical_mass_flow_ratio, np.nan)
        bits = (F.flag_where(supercritical, F.SUPERCRITICAL) | F.flag_where(used, F.FROM_DATA)
                | F.flag_where(~used & ~fs.low_speed, F.OUTSIDE_DATA)
                | F.flag_where(~used & ((alpha != 0.0) | (beta != 0.0)), F.INCIDENCE_NOT_MODELLED)
                | F.flag_where(used & ~fs.supersonic & op.supercritical, F.THROAT_CHOKED))
        over = np.where(used, op.supercritical, model.over)
    shocks = dataclasses.replace(comp.shocks, external_recovery=pi_ext, max_mass_flow_ratio=crit)
    measured = Measured(used, at, np.where(used, op.fraction, np.nan), stable, alpha, beta)
    comp = dataclasses.replace(comp, shocks=shocks, measured=measured)
    return comp, Capture(model.duct_recovery, pi, w, model.capture_flow_kg_s, over, supercritical, critical, bits)


def measured_drag(comp: Compression, fs, thr, drag):
    """The drag stage with the table's ``additive_drag_coefficient`` where it has one at the operating point
    (D_add = C q0 A_c; spillage drag (1 - lip suction) D_add below MFR 1, 0 at and above, method §13)."""
    coefficient = column_at(comp.measured.located, "additive_drag_coefficient", comp.measured.fraction)
    if coefficient is None:
        return drag
    with np.errstate(**ERRSTATE):
        given = comp.measured.used & np.isfinite(coefficient)
        q0 = 0.5 * GAMMA * fs.static_pressure_pa * fs.mach * fs.mach
        d_add = np.where(given, coefficient * q0 * drag.capture_area_m2, drag.additive_drag_n)
        spill = np.where(given, np.where(thr.mass_flow_ratio >= 1.0, 0.0, (1.0 - drag.lip_suction_factor) * d_add),
                         drag.spillage_drag_n)
    return dataclasses.replace(drag, additive_drag_n=d_add, spillage_drag_n=spill,
                               additive_drag_coefficient=np.where(given, coefficient, drag.additive_drag_coefficient))


def measured_fields(points, comp: Compression, rating=None):
    """The assembled points with the data's own fields: where they decide, their stability fraction, the
    incidence, and DC(60), the loss of surge margin and (with the rating's stack-up) the remaining surge margin
    from the table's columns (None when it has none)."""
    m = comp.measured
    shape = np.shape(points.flags)
    values = {"from_data": np.broadcast_to(m.used, shape),
              "data_stable_flow_fraction": np.broadcast_to(m.stable_flow_fraction, shape),
              "angle_of_attack_deg": np.broadcast_to(m.alpha_deg, shape),
              "sideslip_deg": np.broadcast_to(m.beta_deg, shape)}
    for name in ("dc60", "surge_margin_loss"):
        column = column_at(m.located, name, m.fraction)
        if column is not None:
            values[name] = np.broadcast_to(np.where(m.used, column, np.nan), shape)
    stability = getattr(rating, "stability", None)
    if "surge_margin_loss" in values and stability is not None:  # the stack-up of method §18
        other = sum(v for _name, v in stability.other_losses)
        values["remaining_surge_margin"] = stability.available_surge_margin - values["surge_margin_loss"] - other
    return dataclasses.replace(points, **values)
