"""The quantities a map can be coloured by: key, label, SI unit and kind of scale.

``kind`` is "margin" (signed, zero is the limit: a diverging scale centred on
zero) or "level" (a sequential scale). Keys are attribute names of
``engine_air.flow.match.OperatingPoints`` and keys of the point JSON.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Quantity:
    key: str
    label: str
    unit: str  # SI unit, "" for dimensionless
    kind: str  # "margin" | "level"
    description: str


QUANTITIES: dict[str, Quantity] = {
    q.key: q
    for q in (
        Quantity("face_mach_margin", "Face Mach margin", "", "margin", "Face Mach limit minus engine-face Mach number M2"),
        Quantity("face_mach", "Face Mach number", "", "level", "Engine-face axial Mach number M2"),
        Quantity("recovery", "Total-pressure recovery", "", "level", "p_t2 / p_t0"),
        Quantity("recovery_minus_reference", "Recovery minus MIL-E-5008B", "", "margin",
                 "Recovery of the shock system (p_t2/p_t0 over the duct's own loss) less the MIL-E-5008B reference, "
                 "M0 > 1 only (what the reference-recovery check compares)"),
        Quantity("spillage_fraction", "Spillage fraction", "", "level", "max(0, 1 - mass-flow ratio)"),
        Quantity("mass_flow_ratio", "Mass-flow ratio", "", "level", "A0 / A_c, captured stream tube over capture area"),
        Quantity("throat_mach", "Throat Mach number", "", "level", "Average Mach number at the inlet throat"),
        Quantity("additive_drag_coefficient", "Additive drag coefficient", "", "level",
                 "Pre-entry (additive) drag over q0 A_c"),
        Quantity("face_static_to_ambient", "Face static / ambient pressure", "", "level", "p2 / p0"),
        Quantity("relative_tip_mach", "Blade relative tip Mach", "", "level", "sqrt(M2^2 + (U_tip/a2)^2)"),
    )
}

DEFAULT_QUANTITY = "face_mach_margin"
