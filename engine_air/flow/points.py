"""The result of the match at a set of flight conditions: ``OperatingPoints`` (the public result, no checks).

Built by ``engine_air.flow.chain.assemble`` from the stages' states; judged by ``engine_air.envelope``.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

from engine_air.flow import flags as F
from engine_air.physics.constants import GAMMA, LOW_SPEED_MACH, T_REF
from engine_air.physics.isentropic import pressure_ratio
from engine_air.flow.throat import CRITICAL, REGIMES, SUBCRITICAL, SUBSONIC, SUPERCRITICAL  # noqa: F401

_QUIET = dict(divide="ignore", invalid="ignore", over="ignore")  # NaN with a flag that says why, no warning


@dataclass
class OperatingPoints:
    """Every computed quantity at a set of flight conditions (arrays of one shape, SI units).

    Arrays may be read-only broadcast views: a quantity that is one value at every point (a bypass flow of an
    inlet without doors, the tip speed of a rating without one) is kept as that value, and a quantity of the
    altitude or the Mach number only is kept on its own axis, so a map costs memory only for what varies over
    it. Write ``np.array(points.x)`` (or ``value(key)``) for an array of one's own. Quantities that are one
    elementwise relation of kept ones (the totals, V0, theta2, captured flow, MFR, A0, the spillage fraction,
    the drag coefficients, p2/p0, bleed flow, bypass fraction, the ram drag) are computed when read, by the
    chain's own relations in the same order, to the same bits. The limits are judged by
    ``engine_air.envelope`` (``engine_air.envelope.conditions.JudgedPoints`` adds the checks)."""

    mach: np.ndarray
    altitude_m: np.ndarray
    # free stream, station 0
    static_pressure_pa: np.ndarray
    static_temperature_k: np.ndarray
    density_kg_m3: np.ndarray
    speed_of_sound_m_s: np.ndarray
    # demand and flow
    corrected_flow_kg_s: np.ndarray  # W_c2 demanded by the engine
    mass_flow_kg_s: np.ndarray  # W delivered
    # recovery
    external_recovery: np.ndarray  # after the external shock system
    duct_recovery: np.ndarray  # 1 - K q2/p_t2
    recovery: np.ndarray  # p_t2/p_t0 delivered
    reference_recovery: np.ndarray  # MIL-E-5008B
    # stations
    capture_mach: np.ndarray  # M1 (subsonic side of the capture plane)
    throat_mach: np.ndarray
    face_mach: np.ndarray
    terminal_shock_mach: np.ndarray  # Mach ahead of the terminal normal shock (NaN when subsonic)
    # capture and spillage
    max_mass_flow_ratio: np.ndarray
    additive_drag_n: np.ndarray
    relative_tip_mach: np.ndarray
    capture_area_m2: np.ndarray  # A_c (one value)
    lip_suction_factor: np.ndarray  # the lip suction factor that applies: supersonic or subsonic (Mach only)
    # airflow management (method section 12); fractions are of the captured flow
    bleed_fraction: np.ndarray
    bypass_flow_kg_s: np.ndarray
    auxiliary_flow_kg_s: np.ndarray  # through the auxiliary doors (not through the capture plane)
    bypass_shortfall_kg_s: np.ndarray  # critical capture (x (1 - b)) that engine and doors do not take; M0 > 1
    tip_speed_m_s: np.ndarray  # physical fan tip speed used for the relative tip Mach (NaN without one)
    # the ledger (method section 13), newtons
    spillage_drag_n: np.ndarray
    bleed_drag_n: np.ndarray
    bypass_drag_n: np.ndarray
    net_thrust_n: np.ndarray
    installed_thrust_n: np.ndarray
    installation_loss_fraction: np.ndarray
    thrust_reference_recovery: np.ndarray
    # status
    regime: np.ndarray  # int index into REGIMES
    flags: np.ndarray  # int bits (FLAG_DTYPE), see engine_air.flow.flags
    ramp_wave_angle_rad: np.ndarray | None = None  # (n_ramps, ...)
    ramp_downstream_mach: np.ndarray | None = None
    oblique_ahead_of_cowl: np.ndarray | None = None  # bool: buzz is judged only there (method §10)
    started: np.ndarray | None = None  # bool, mixed compression only (method §11)
    self_start_contraction: np.ndarray | None = None  # Kantrowitz limit K(M_e) on A_th/A_e, mixed compression only
    entrance_area_m2: np.ndarray | None = None  # cowl entrance area A_e, mixed compression only (method §11)
    internal_contraction_ratio: np.ndarray | None = None  # CR = A_th/A_e, mixed compression only
    dc60: np.ndarray | None = None  # distortion DC(60) from data (method §18); None: no data, not judged
    surge_margin_loss: np.ndarray | None = None  # ΔPRS from data (method §18); None: no data, not judged
    # measured characteristics (method §17); None without a characteristics table
    from_data: np.ndarray | None = None  # bool: the data decide recovery, MFR_max and stability here
    data_stable_flow_fraction: np.ndarray | None = None  # the data's stability limit / MFR_crit (NaN: none)
    angle_of_attack_deg: np.ndarray | None = None  # the case's incidence at the point
    sideslip_deg: np.ndarray | None = None
    remaining_surge_margin: np.ndarray | None = None  # available - ΔPRS - other items (method §18), from data

    # quantities computed when read (the same relations, in the same order, as the chain's stages)
    @property
    def _total_ratio(self) -> np.ndarray:
        with np.errstate(**_QUIET):
            return 1.0 + 0.5 * (GAMMA - 1.0) * self.mach * self.mach

    @property
    def total_temperature_k(self) -> np.ndarray:
        """T_t0 = T0 (1 + (g-1)/2 M0^2) (K)."""
        with np.errstate(**_QUIET):
            return self.static_temperature_k * self._total_ratio

    @property
    def total_pressure_pa(self) -> np.ndarray:
        """p_t0 = p0 (1 + (g-1)/2 M0^2)^(g/(g-1)) (Pa)."""
        with np.errstate(**_QUIET):
            return self.static_pressure_pa * self._total_ratio ** (GAMMA / (GAMMA - 1.0))

    @property
    def velocity_m_s(self) -> np.ndarray:
        """V0 = M0 a0 (m/s)."""
        with np.errstate(**_QUIET):
            return self.mach * self.speed_of_sound_m_s

    @property
    def theta2(self) -> np.ndarray:
        """theta2 = T_t0/T_ref."""
        with np.errstate(**_QUIET):
            return self.total_temperature_k / T_REF

    @property
    def inlet_total_pressure_pa(self) -> np.ndarray:
        """p_t0, or p0 at low speed (static suction): what the inlet's stations refer to (Pa)."""
        return np.where(self.mach < LOW_SPEED_MACH, self.static_pressure_pa, self.total_pressure_pa)

    @property
    def captured_flow_kg_s(self) -> np.ndarray:
        """Through the capture plane (what MFR counts): (W + W_bypass - W_auxiliary)/(1 - bleed fraction) (kg/s)."""
        with np.errstate(**_QUIET):
            return (self.mass_flow_kg_s + self.bypass_flow_kg_s - self.auxiliary_flow_kg_s) / (1.0 - self.bleed_fraction)

    @property
    def mass_flow_ratio(self) -> np.ndarray:
        """MFR = captured flow/(rho0 V0 A_c); NaN at low speed."""
        with np.errstate(**_QUIET):
            return np.where(self.mach < LOW_SPEED_MACH, np.nan, self.captured_flow_kg_s
                            / (self.density_kg_m3 * self.velocity_m_s * self.capture_area_m2))

    @property
    def bleed_flow_kg_s(self) -> np.ndarray:
        """Bleed fraction x captured flow (kg/s)."""
        with np.errstate(**_QUIET):
            return self.bleed_fraction * self.captured_flow_kg_s

    @property
    def bypass_fraction(self) -> np.ndarray:
        """Bypass flow over the captured flow (0 where the doors pass nothing)."""
        with np.errstate(**_QUIET):
            return np.where(self.bypass_flow_kg_s > 0.0, self.bypass_flow_kg_s / self.captured_flow_kg_s, 0.0)

    @property
    def additive_drag_coefficient(self) -> np.ndarray:
        """C_add = D_add/(q0 A_c), q0 = g/2 p0 M0^2."""
        with np.errstate(**_QUIET):
            q0 = 0.5 * GAMMA * self.static_pressure_pa * self.mach * self.mach
            return self.additive_drag_n / (q0 * self.capture_area_m2)

    @property
    def spillage_drag_coefficient(self) -> np.ndarray:
        """(1 - lip suction factor) C_add; 0 at MFR >= 1, as the spillage drag (method §12)."""
        with np.errstate(**_QUIET):
            return np.where(self.mass_flow_ratio >= 1.0, 0.0,
                            (1.0 - self.lip_suction_factor) * self.additive_drag_coefficient)

    @property
    def face_static_to_ambient(self) -> np.ndarray:
        """p2/p0 = pi p_t0 (p/p_t)(M2)/p0."""
        with np.errstate(**_QUIET):
            return self.recovery * self.inlet_total_pressure_pa * pressure_ratio(self.face_mach) / self.static_pressure_pa

    @property
    def stream_tube_area_m2(self) -> np.ndarray:
        """A0 = captured flow/(rho0 V0) (m^2); NaN at low speed."""
        with np.errstate(**_QUIET):
            return np.where(self.mach < LOW_SPEED_MACH, np.nan,
                            self.captured_flow_kg_s / (self.density_kg_m3 * self.velocity_m_s))

    @property
    def spillage_fraction(self) -> np.ndarray:
        """max(0, 1 - MFR); NaN at low speed."""
        with np.errstate(**_QUIET):
            return np.where(self.mach < LOW_SPEED_MACH, np.nan, np.maximum(0.0, 1.0 - self.mass_flow_ratio))

    @property
    def ram_drag_n(self) -> np.ndarray:
        """D_ram = W V0 (N)."""
        with np.errstate(**_QUIET):
            return self.mass_flow_kg_s * self.velocity_m_s

    @property
    def recovery_minus_reference(self) -> np.ndarray:
        """What the MIL-E-5008B recovery check compares: the recovery of the shock system and its regime
        corrections (pi / pi_duct) less the reference, in supersonic flight only; NaN (not judged) at M0 <= 1."""
        with np.errstate(divide="ignore", invalid="ignore"):
            shock_recovery = self.recovery / self.duct_recovery
        return np.where(self.mach > 1.0, shock_recovery - self.reference_recovery, np.nan)

    @property
    def judged(self) -> np.ndarray:
        """Bool: the point is judged (inside the envelope and inside its case's region, method section 14)."""
        return (self.flags & (F.OUTSIDE_ENVELOPE | F.OUTSIDE_CASE_REGION)) == 0

    @property
    def shape(self) -> tuple[int, ...]:
        return np.shape(self.flags)

    def at(self, index) -> "OperatingPoints":
        """The points at ``index`` alone (a tuple, or an int for 1-D points), of the same type: what a point
        record reads, so that the quantities computed when read cost one point, not the whole map."""
        idx = index if isinstance(index, tuple) else (index,)
        values = {}
        for f in fields(self):
            v = getattr(self, f.name)
            if isinstance(v, np.ndarray):
                v = v[(slice(None),) + idx] if f.name.startswith("ramp_") else v[idx]
            values[f.name] = v
        return replace(self, **values)

    def value(self, key: str) -> np.ndarray:
        """A quantity by its key (attribute name); NaN everywhere for one this inlet type does not carry (e.g.
        ``started`` of a pitot inlet)."""
        value = getattr(self, key)
        if value is None:
            return np.full(np.shape(self.flags), np.nan)
        return np.asarray(value)
