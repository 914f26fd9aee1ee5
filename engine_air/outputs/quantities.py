"""The one registry of output quantities: key, label, SI unit, US unit and conversion, kind, where it is judged.

Every output that lists quantities reads this module, so a quantity is added in
one place:

- the point JSON (``engine_air.outputs.point_record``): ``JSON_KEYS`` (with the
  free-stream ones grouped under ``"freestream"``),
- the columns of ``engine-air map --csv`` / ``--parquet`` and of the program's
  CSV export: ``TABLE_KEYS`` (``engine_air.outputs.point_table``),
- the quantities a map can be coloured by (the program's quantity list, the
  review pack, ``map --png``): ``QUANTITIES`` (keys ``MAP_KEYS``),
- compare's difference maps and the US text of ``check`` / ``point --units us``.

``kind`` is "margin" (signed, zero is the limit: a diverging scale centred on
zero) or "level" (a sequential scale). ``judged_by`` names the check of
``engine_air.envelope.checks`` that judges the quantity (None: not judged).
Keys are attribute names of ``engine_air.flow.points.OperatingPoints``.

US customary display: ``us_value = si_value / us_factor`` where ``us_factor`` is the
SI value of one US unit (all conversions are linear; one degree Rankine is 1/1.8 K).

>>> REGISTRY["altitude_m"].to_us(3048.0)
10000.0
>>> QUANTITIES["face_mach_margin"].kind
'margin'
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

FT = 0.3048  # m, exact
LBM = 0.45359237  # kg, exact
LBF = 4.4482216152605  # N, exact (lbm x standard gravity)
PSI = 6894.757293168361  # Pa per lbf/in^2
SLUG_FT3 = LBM * 9.80665 / FT / FT ** 3  # kg/m^3 per slug/ft^3 (515.379...)


@dataclass(frozen=True)
class Quantity:
    key: str
    label: str
    unit: str  # SI unit, "" for dimensionless
    kind: str  # "margin" | "level"
    description: str
    us_unit: str = ""  # US customary unit ("" when dimensionless or the same)
    us_factor: float = 1.0  # SI value of one US unit: US value = SI value / us_factor
    judged_by: str | None = None  # name of the check that judges this quantity, None when none does
    group: str = ""  # "freestream": listed under that key in the point JSON
    in_table: bool = True  # a column of map --csv / --parquet
    in_json: bool = True  # a key of the point JSON

    def to_us(self, value):
        """The value in US customary units (arrays or scalars; None stays None)."""
        if value is None:
            return None
        if isinstance(value, np.ndarray):
            return value / self.us_factor
        return float(value) / self.us_factor

    def display_unit(self, units: str = "si") -> str:
        return self.us_unit if units == "us" and self.us_unit else self.unit

    def values(self, points) -> np.ndarray:
        """The quantity's array from an ``OperatingPoints`` (NaN where the points do not carry it at all, e.g. a
        mixed-compression quantity of another inlet type)."""
        value = getattr(points, self.key)
        if value is None:
            return np.full(np.shape(points.mach), np.nan)
        return np.asarray(value, dtype=float)


def _q(key, label, unit, description, kind="level", us=("", 1.0), judged_by=None, group="", table=True,
       json=True) -> Quantity:
    return Quantity(key, label, unit, kind, description, us[0], us[1], judged_by, group, table, json)


_PA = ("psia", PSI)
_K = ("°R", 1.0 / 1.8)
_MS = ("ft/s", FT)
_KGS = ("lbm/s", LBM)
_N = ("lbf", LBF)

# Registry order is the column order of the map table (the first 26 are the historic columns).
_ALL = (
    _q("mach", "Flight Mach number", "", "Flight (free-stream) Mach number M0"),
    _q("altitude_m", "Altitude", "m", "Geopotential pressure altitude", us=("ft", FT)),
    _q("static_pressure_pa", "Static pressure p0", "Pa", "Free-stream static pressure", us=_PA, group="freestream"),
    _q("static_temperature_k", "Static temperature T0", "K", "Free-stream static temperature (with the ISA offset)",
       us=_K, group="freestream"),
    _q("total_pressure_pa", "Total pressure p_t0", "Pa", "Free-stream total pressure", us=_PA, group="freestream"),
    _q("total_temperature_k", "Total temperature T_t0", "K", "Free-stream total temperature", us=_K,
       group="freestream"),
    _q("velocity_m_s", "Flight speed V0", "m/s", "True air speed", us=_MS, group="freestream"),
    _q("density_kg_m3", "Density rho0", "kg/m^3", "Free-stream density", us=("slug/ft^3", SLUG_FT3),
       group="freestream"),
    _q("theta2", "theta2", "", "Face total temperature over the standard-day reference, T_t2 / 288.15 K"),
    _q("corrected_flow_kg_s", "Corrected flow demand", "kg/s", "Engine corrected-flow demand W_c2 at theta2", us=_KGS),
    _q("mass_flow_kg_s", "Mass flow", "kg/s", "Physical mass flow W delivered to the engine", us=_KGS),
    _q("recovery", "Total-pressure recovery", "", "p_t2 / p_t0", judged_by="recovery"),
    _q("external_recovery", "Shock-system recovery", "", "Total-pressure ratio of the external shock system"),
    _q("duct_recovery", "Duct recovery", "", "1 - K q2 / p_t2 (subsonic duct friction)"),
    _q("reference_recovery", "MIL-E-5008B recovery", "", "MIL-E-5008B reference recovery at the flight Mach number"),
    _q("face_mach", "Face Mach number", "", "Engine-face axial Mach number M2", judged_by="face-mach"),
    _q("face_mach_margin", "Face Mach margin", "", "Face Mach limit minus engine-face Mach number M2", kind="margin",
       judged_by="face-mach"),
    _q("throat_mach", "Throat Mach number", "", "Average Mach number at the inlet throat", judged_by="throat-mach"),
    _q("capture_mach", "Capture-plane Mach number", "", "Mach number M1 at the capture plane (subsonic side)"),
    _q("mass_flow_ratio", "Mass-flow ratio", "", "A0 / A_c, captured stream tube over capture area"),
    _q("max_mass_flow_ratio", "Maximum mass-flow ratio", "", "Largest mass-flow ratio the shock system captures"),
    _q("spillage_fraction", "Spillage fraction", "", "max(0, 1 - mass-flow ratio)", judged_by="spillage"),
    _q("additive_drag_coefficient", "Additive drag coefficient", "", "Pre-entry (additive) drag over q0 A_c"),
    _q("spillage_drag_coefficient", "Spillage drag coefficient", "",
       "Additive drag less lip suction over q0 A_c; 0 at a mass-flow ratio of 1 or more, as the spillage drag"),
    _q("face_static_to_ambient", "Face static / ambient pressure", "", "p2 / p0"),
    _q("relative_tip_mach", "Blade relative tip Mach", "", "sqrt(M2^2 + (U_tip/a2)^2)",
       judged_by="relative-tip-mach"),
    # added after the historic columns
    _q("speed_of_sound_m_s", "Speed of sound a0", "m/s", "Free-stream speed of sound", us=_MS, group="freestream"),
    _q("additive_drag_n", "Additive drag", "N", "Pre-entry (additive) drag force", us=_N),
    _q("recovery_minus_reference", "Recovery minus MIL-E-5008B", "",
       "Recovery of the shock system (p_t2/p_t0 over the duct's own loss) less the MIL-E-5008B reference, "
       "M0 > 1 only (what the reference-recovery check compares)", kind="margin", judged_by="recovery", table=False,
       json=False),
    # airflow management (method section 12); fractions are of the captured flow
    _q("captured_flow_kg_s", "Captured flow", "kg/s", "Mass flow through the capture plane (what MFR counts)", us=_KGS),
    _q("bleed_fraction", "Bleed fraction", "", "Bleed flow over the captured flow"),
    _q("bleed_flow_kg_s", "Bleed flow", "kg/s", "Boundary-layer bleed mass flow", us=_KGS),
    _q("bypass_fraction", "Bypass fraction", "", "Bypass-door flow over the captured flow"),
    _q("bypass_flow_kg_s", "Bypass flow", "kg/s", "Mass flow through the bypass doors", us=_KGS),
    _q("auxiliary_flow_kg_s", "Auxiliary-door flow", "kg/s",
       "Mass flow through the auxiliary (take-off) doors, not through the capture plane", us=_KGS),
    _q("bypass_shortfall_kg_s", "Bypass shortfall", "kg/s",
       "Critical capture that engine, bleed and doors do not take (M0 > 1)", us=_KGS),
    _q("tip_speed_m_s", "Fan tip speed", "m/s", "Physical fan tip speed used for the relative tip Mach", us=_MS),
    # the installation ledger (method section 13)
    _q("ram_drag_n", "Ram drag", "N", "Momentum of the captured stream tube, W V0", us=_N),
    _q("spillage_drag_n", "Spillage drag", "N", "Additive drag less lip suction", us=_N),
    _q("bleed_drag_n", "Bleed drag", "N", "Drag of the bleed flow", us=_N),
    _q("bypass_drag_n", "Bypass drag", "N", "Drag of the bypass flow", us=_N),
    _q("net_thrust_n", "Net thrust", "N", "Engine net thrust from the rating's table", us=_N),
    _q("installed_thrust_n", "Installed thrust", "N", "Net thrust less the installation losses", us=_N),
    _q("installation_loss_fraction", "Installation loss fraction", "",
       "Installation losses over the net thrust", judged_by="installation-loss"),
    _q("thrust_reference_recovery", "Thrust reference recovery", "",
       "Recovery the engine's thrust table assumes"),
    _q("self_start_contraction", "Self-start contraction", "",
       "Kantrowitz limit K(M_e) on the internal contraction ratio A_th / A_e at the post-ramp Mach M_e "
       "(mixed compression only)"),
    _q("entrance_area_m2", "Cowl entrance area", "m^2",
       "Cowl entrance area A_e: the flow section from the lip to the last ramp, from continuity at the "
       "shock-on-lip Mach (mixed compression only)", us=("ft^2", FT * FT)),
    _q("internal_contraction_ratio", "Internal contraction ratio", "",
       "A_th / A_e, throat over cowl entrance; the inlet self-starts where it reaches the self-start contraction "
       "(mixed compression only)"),
    # measured characteristics and distortion (method sections 17 and 18): from the data where they decide
    _q("angle_of_attack_deg", "Angle of attack", "deg", "The case's angle of attack at the point (picks the "
       "characteristics-table curves; the model is at zero incidence)"),
    _q("sideslip_deg", "Sideslip", "deg", "The case's sideslip angle at the point"),
    _q("dc60", "Distortion DC(60)", "", "Face distortion coefficient DC(60) at the operating point, from the "
       "characteristics table's distortion columns (method 18); not defined without them", judged_by="dc60"),
    _q("surge_margin_loss", "Loss of surge margin", "", "Loss of surge pressure ratio from distortion, "
       "sum of KC (dPC/P) + KR (dPR/P), from the characteristics table (method 18)"),
    _q("remaining_surge_margin", "Remaining surge margin", "", "Available surge margin less the distortion loss "
       "and the other stack-up items of the rating (method 18)", judged_by="surge-margin"),
    _q("worst_relative_margin", "Least relative margin (all limits)", "",
       "Least relative margin (margin over the limit's magnitude) over every check judged at the point; a failing "
       "check ranks first. Not defined (NaN / null) where nothing is judged: outside the atmosphere model "
       "(flag outside-atmosphere) or outside the envelope (flag outside-envelope) on a map",
       kind="margin", judged_by="*"),
    _q("started", "Started (mixed compression)", "",
       "1 where a mixed-compression inlet runs started, 0 where it is unstarted or the flight is subsonic "
       "(not defined for the other inlet types)", table=False, json=False),
)

REGISTRY: dict[str, Quantity] = {q.key: q for q in _ALL}
"""Every output quantity, by key, in table-column order."""

TABLE_KEYS: tuple[str, ...] = tuple(q.key for q in _ALL if q.in_table)
"""Numeric columns of the map table, in order (``case`` and ``inside_envelope`` come first)."""

HISTORIC_TABLE_KEYS: tuple[str, ...] = TABLE_KEYS[:26]
"""The numeric columns of the first map table: they keep their places, before ``regime, limiting, holds, flags``;
columns added since follow ``flags``, so a reader that counts columns is not disturbed."""

JSON_KEYS: tuple[str, ...] = tuple(q.key for q in _ALL if q.in_json)
"""Numeric keys of the point JSON (those with ``group`` nested under it)."""

MAP_KEYS: tuple[str, ...] = (
    "face_mach_margin", "worst_relative_margin", "face_mach", "recovery", "recovery_minus_reference",
    "spillage_fraction", "mass_flow_ratio", "throat_mach", "additive_drag_coefficient", "face_static_to_ambient",
    "relative_tip_mach",
    # mixed compression (method §11) and the installation ledger (method §13)
    "started", "self_start_contraction", "internal_contraction_ratio", "ram_drag_n", "additive_drag_n", "spillage_drag_n", "bleed_drag_n",
    "bypass_drag_n", "net_thrust_n", "installed_thrust_n", "installation_loss_fraction",
    # from measured characteristics (method §17, §18): defined only where the data decide
    "dc60", "remaining_surge_margin",
)
"""The quantities a map can be coloured by, in the order offered."""

QUANTITIES: dict[str, Quantity] = {k: REGISTRY[k] for k in MAP_KEYS}
"""The map quantities (the program's quantity list, the review pack, ``map --png``, compare)."""

DEFAULT_QUANTITY = "face_mach_margin"

TEXT_COLUMNS = ("case", "regime", "limiting", "flags")
"""Text columns of the map table (neutralised against spreadsheet formulas by ``engine_air.outputs.table``)."""


def quantity(key: str) -> Quantity:
    """The registry entry of ``key``; KeyError naming the known keys otherwise."""
    try:
        return REGISTRY[key]
    except KeyError:
        raise KeyError(f"unknown quantity {key!r}; known: {', '.join(REGISTRY)}") from None


__all__ = ["DEFAULT_QUANTITY", "HISTORIC_TABLE_KEYS", "JSON_KEYS", "MAP_KEYS", "QUANTITIES", "REGISTRY", "TABLE_KEYS",
           "TEXT_COLUMNS",
           "Quantity", "quantity"]
