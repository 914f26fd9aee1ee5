"""Declarations of type-specific ``[inlet]`` keys for inlet types whose modules list them in ``fields``.

The keys of the external-ramp inlet are declared in ``engine_air.inlets.external_ramp``. The keys below are
those of the axisymmetric-spike and mixed-compression types of the interfaces document ("Additions"); a type
module lists them in its ``fields`` (``fields = (CONE_HALF_ANGLES, SHOCK_ON_LIP_MACH)``), and the schema
(``engine_air.project.schema``) accepts a key in a file only for the registered types that list it. A key
declared here but listed by no registered type yet is documented with the types named here.

This module imports nothing of ``engine_air.inlets`` (the type modules import it).
"""

from __future__ import annotations

from engine_air.project.schema_field import REQUIRED, Field

MAX_CONES = 2
MAX_CONE_HALF_ANGLE_DEG = 40.0
"""Cone half-angles up to 40 deg: the conical shock stays attached up to about 40 deg at high Mach numbers
in NASA SP-3004's and NACA Report 1135's cone charts (the attachment limit there is about 37 deg at M = 2,
approaching 45 deg as M grows); a spike's working cones lie well inside this (from memory: 10-30 deg)."""

CONE_HALF_ANGLES = Field(
    "cone_half_angles_deg", "inlet", "number list",
    "half-angle of each conical surface of the spike from its axis, tip cone first",
    unit="deg", lo=0.0, hi=MAX_CONE_HALF_ANGLE_DEG, lo_open=True, length=(1, MAX_CONES), default=REQUIRED,
    inlet_types=("axisymmetric-spike",), decimals=2, step=0.25)

INTERNAL_RECOVERY_FACTOR = Field(
    "internal_recovery_factor", "inlet", "number",
    "factor on the total-pressure recovery of the internal (cowl and duct) supersonic compression for losses "
    "the shock relations do not hold (boundary layer, shock reflections); 1 is ideal",
    lo=0.0, hi=1.0, lo_open=True, default=1.0, inlet_types=("mixed-compression",), decimals=3, step=0.01)

DECLARED = (CONE_HALF_ANGLES, INTERNAL_RECOVERY_FACTOR)
"""Type-specific keys declared here for types that may not be registered yet."""
