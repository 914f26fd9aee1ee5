"""Measured characteristics as a stage of the match (method §17): data over the model where they cover.

The chain (``engine_air.flow.chain``) calls ``data_capture`` in place of the model's capture stage when the
project has a characteristics table. At each point:

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

Face Mach still comes from the engine's corrected flow (§3); spillage drag from the model unless the table
gives ``additive_drag_coefficient`` (``data_columns``).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from engine_air.characteristics.interpolate import column_at, locate
from engine_air.characteristics.root import match_on_data
from engine_air.flow import flags as F
from engine_air.flow.stages import ERRSTATE, Capture, Compression, capture
from engine_air.physics.constants import CRITICAL_BAND, P_REF
from engine_air.project.model import incidence_at


@dataclass(frozen=True)
class DataState:
    """What the data decided at each point (for the outputs and the later stages)."""

    used: np.ndarray  # bool: the data decide the point
    located: object  # Located
    fraction: np.ndarray  # MFR / MFR_crit on the data curve (NaN where not used)
    stable_flow_fraction: np.ndarray  # the data's stability limit / MFR_crit (NaN where none)
    alpha_deg: np.ndarray
    beta_deg: np.ndarray


def data_capture(project, case, fs, dem, fc, comp: Compression) -> tuple[Compression, Capture, DataState]:
    """The capture stage on measured characteristics, the model's where the data do not cover."""
    inlet = project.inlet
    model = capture(inlet, fs, dem, fc, comp)
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
        over = np.where(used, op.supercritical, model.over)
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
    shocks = dataclasses.replace(comp.shocks, external_recovery=pi_ext, max_mass_flow_ratio=crit)
    comp = dataclasses.replace(comp, shocks=shocks)
    cap = Capture(model.duct_recovery, pi, w, model.capture_flow_kg_s, over, supercritical, critical, bits)
    return comp, cap, DataState(used, at, np.where(used, op.fraction, np.nan), stable, alpha, beta)


def data_columns(state: DataState, names=("additive_drag_coefficient", "dc60", "surge_margin_loss")) -> dict:
    """The table's other columns at each point's operating fraction, NaN where the data do not decide it;
    absent columns are left out."""
    out = {}
    for name in names:
        values = column_at(state.located, name, state.fraction)
        if values is not None:
            out[name] = np.where(state.used, values, np.nan)
    return out
