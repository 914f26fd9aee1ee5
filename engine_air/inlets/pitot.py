"""Pitot (normal-shock) inlet: one normal shock at the flight Mach number M0 (method §4, §6).

In supersonic flight a single normal shock stands at (subcritical: ahead of) the lip; the captured stream
tube is the free-stream tube, so MFR_max = 1. Spilling, the shock is a detached bow shock (method §10);
by Moeckel's construction (``engine_air.physics.detached_shock.moeckel_bow_shock``, body sonic point at the
lip) the shock's sonic point lies above the lip radius, so the captured stream tube (radius <= r_lip)
crosses the strong, nearly normal part of the bow shock. Its pre-entry (spillage) drag is therefore the
stream-tube momentum balance of method §7 from the free stream to the capture plane, with the total
pressure behind the normal shock (equal to ``ramp_layout.terminal_spill_drag`` with M_n = M0, tested);
zero at MFR = 1.

Example: at M0 = 2 the recovery of the shock system is 0.72087 (NACA Report 1135, normal-shock table).
"""

from __future__ import annotations

import numpy as np

from engine_air.inlets.base import CaptureState, ShockSystem, no_shocks
from engine_air.physics.shocks import normal_shock
from engine_air.spec.project import Inlet


class PitotInlet:
    name = "pitot"
    label = "pitot (normal shock)"
    fields = ()

    def check_design(self, inlet: Inlet) -> list[tuple[str, object, str]]:
        return []

    def shock_system(self, inlet: Inlet, flight_mach) -> ShockSystem:
        m0 = np.asarray(flight_mach, dtype=float)
        ns = normal_shock(m0)
        empty = no_shocks(m0)
        return ShockSystem(
            external_recovery=ns.total_pressure_ratio,
            terminal_upstream_mach=m0,
            terminal_downstream_mach=ns.downstream_mach,
            max_mass_flow_ratio=np.where(m0 > 1.0, 1.0, np.nan),
            detached=np.zeros(m0.shape, bool),
            inside_cowl=np.zeros(m0.shape, bool),
            ramp_wave_angle_rad=empty,
            ramp_downstream_mach=empty,
            ramp_total_pressure_ratio=empty,
            ramp_static_pressure_ratio=empty,
            oblique_ahead_of_cowl=np.zeros(m0.shape, bool),
        )

    def supersonic_pre_entry_drag(self, inlet: Inlet, shocks: ShockSystem, state: CaptureState):
        return state.momentum_balance_drag_n

    def design_variables(self, inlet: Inlet) -> list[str]:
        return []


INLET = PitotInlet()
