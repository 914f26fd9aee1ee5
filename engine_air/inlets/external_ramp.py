"""Two-dimensional external-compression ramp inlet (``external-ramp``, method §4, §6).

One to three ramps turn the flow through weak oblique shocks laid out shock-on-lip at
``shock_on_lip_mach``; a terminal normal shock stands at the lip (subcritical: ahead of it). The geometry,
the shock system and the dividing-streamline trace for the maximum capture are in
``engine_air.inlets.ramp_layout``.

Pre-entry drag in supersonic flight (method §13): ``ramp_layout.ramp_pre_entry_drag``, the pressure on the
dividing stream line behind each ramp shock plus the momentum balance of the spillage behind the terminal
shock; zero at MFR = 1.

Example (one 10 deg ramp, M_d = 2, NACA Report 1135 oblique-shock relations): at M0 = 1.8 the wave angle
is 44.06 deg and MFR_max = 0.9595.
"""

from __future__ import annotations

import numpy as np

from engine_air.inlets.base import CaptureState, ShockSystem
from engine_air.spec.project import Inlet
from engine_air.spec.field import REQUIRED, Field

MAX_RAMPS = 3
MAX_RAMP_DEG = 25.0
MAX_TOTAL_RAMP_DEG = 40.0

RAMP_ANGLES = Field(
    "ramp_angles_deg", "inlet", "number list",
    "deflection of each external ramp, first ramp first", unit="deg", lo=0.0, hi=MAX_RAMP_DEG, decimals=2, step=0.25,
    length=(1, MAX_RAMPS), default=REQUIRED, inlet_types=("external-ramp", "mixed-compression"))
SHOCK_ON_LIP_MACH = Field(
    "shock_on_lip_mach", "inlet", "number",
    "design flight Mach number at which every ramp (or cone) shock meets the cowl lip", lo=1.0, hi=5.0,
    lo_open=True, default=REQUIRED, inlet_types=("external-ramp", "mixed-compression", "axisymmetric-spike"),
    decimals=3, step=0.05)


def ramp_problems(inlet: Inlet) -> list[tuple[str, object, str]]:
    """The total deflection and shock attachment at the design Mach number, as (key, value, allowed)."""
    if sum(inlet.ramp_angles_deg) > MAX_TOTAL_RAMP_DEG:
        return [("inlet.ramp_angles_deg", list(inlet.ramp_angles_deg),
                 f"total deflection {sum(inlet.ramp_angles_deg):g} deg exceeds {MAX_TOTAL_RAMP_DEG:g} deg")]
    from engine_air.inlets.ramp_layout import ramp_design_problems  # the shock physics only where used

    problems = ramp_design_problems(inlet.ramp_angles_deg, inlet.shock_on_lip_mach)
    if not problems:
        return []
    return [("inlet.ramp_angles_deg", list(inlet.ramp_angles_deg),
             "every ramp shock must stay attached at inlet.shock_on_lip_mach "
             f"= {inlet.shock_on_lip_mach:g}: " + "; ".join(problems))]


class ExternalRampInlet:
    name = "external-ramp"
    label = "external-compression ramps (2-D)"
    fields = (RAMP_ANGLES, SHOCK_ON_LIP_MACH)

    def check_design(self, inlet: Inlet) -> list[tuple[str, object, str]]:
        return ramp_problems(inlet)

    def shock_system(self, inlet: Inlet, flight_mach) -> ShockSystem:
        from engine_air.inlets.ramp_layout import ramp_shock_system

        return ramp_shock_system(inlet.ramp_angles_deg, inlet.shock_on_lip_mach, flight_mach)

    def supersonic_pre_entry_drag(self, inlet: Inlet, shocks: ShockSystem, state: CaptureState):
        from engine_air.inlets.ramp_layout import ramp_pre_entry_drag

        return ramp_pre_entry_drag(inlet.ramp_angles_deg, inlet.shock_on_lip_mach, shocks, state)

    def design_variables(self, inlet: Inlet) -> list[str]:
        return [f"ramp_angles_deg[{k + 1}]" for k in range(len(inlet.ramp_angles_deg))] + ["shock_on_lip_mach"]


INLET = ExternalRampInlet()
