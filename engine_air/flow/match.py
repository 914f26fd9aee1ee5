"""Inlet-engine match at flight conditions: the whole station-by-station chain (method §1-§8).

``evaluate_conditions(project, case, mach, altitude_m)`` works on numpy arrays
of any shape (they broadcast) with no Python loop over points. The chain:

1. Free stream from the 1976 standard atmosphere with the case's ISA offset:
   T_t0 = T0 (1 + (g-1)/2 M0^2), p_t0 = p0 (1 + (g-1)/2 M0^2)^(g/(g-1)).
2. Demand: corrected flow W_c2 at theta2 = T_t0/T_ref from the rating's table.
3. Face Mach M2 from W_c2 sqrt(T_ref)/(p_ref A2) = MFP(M2) (subsonic root); at or
   above the choking value 241.24 kg/(s m^2) the face is choked (M2 taken as 1).
4. Recovery pi = pi_ext pi_duct, pi_duct = 1 - K q2/p_t2.
5. Physical flow W = W_c2 (pi p_t0/p_ref)/sqrt(theta2); MFR = W/(rho0 V0 A_c).
6. Supersonic regime: MFR above MFR_max is supercritical (captured flow held at
   MFR_max, pi -> pi MFR_max/MFR); the throat MFP = W sqrt(T_t0)/(A_th pi_ext p_t0)
   above choking holds W at the choked flow and lowers pi in proportion.
7. Additive drag from the stream-tube momentum balance between stations 0 and 1.
8. Flags and the limiting check.

Low speed (M0 < 0.05): stream tube, MFR, spillage and drag coefficients are not
defined (NaN, flag ``low-speed``); face and throat Mach use p_t0 = p0.

Example (checked in the tests): a pitot inlet at M0 = 2 with K = 0 has
recovery 0.72087, the normal-shock total-pressure ratio.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from engine_air.envelope import flags as F
from engine_air.physics.atmosphere import standard_atmosphere
from engine_air.physics.constants import CRITICAL_BAND, GAMMA, LOW_SPEED_MACH, P_REF, R_AIR, T_REF
from engine_air.flow.demand import corrected_flow_demand
from engine_air.physics.isentropic import (
    choked_mass_flow_parameter,
    dynamic_to_total_pressure,
    mach_from_flow_ratio,
    pressure_ratio,
)
from engine_air.inlets.base import CaptureState
from engine_air.inlets.registry import inlet_type
from engine_air.envelope.checks import Check, build_checks, limiting_index
from engine_air.project.model import Case, Project
from engine_air.physics.reference_recovery import mil_e_5008b_recovery

REGIMES = ("subsonic", "subcritical", "critical", "supercritical")
SUBSONIC, SUBCRITICAL, CRITICAL, SUPERCRITICAL = range(4)


@dataclass
class OperatingPoints:
    """Every computed quantity at a set of flight conditions (arrays of one shape, SI units)."""

    mach: np.ndarray
    altitude_m: np.ndarray
    # free stream, station 0
    static_pressure_pa: np.ndarray
    static_temperature_k: np.ndarray
    total_pressure_pa: np.ndarray
    total_temperature_k: np.ndarray
    velocity_m_s: np.ndarray
    density_kg_m3: np.ndarray
    speed_of_sound_m_s: np.ndarray
    # demand and flow
    theta2: np.ndarray
    corrected_flow_kg_s: np.ndarray  # W_c2 demanded by the engine
    mass_flow_kg_s: np.ndarray  # W delivered
    stream_tube_area_m2: np.ndarray  # A0
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
    mass_flow_ratio: np.ndarray
    max_mass_flow_ratio: np.ndarray
    spillage_fraction: np.ndarray
    additive_drag_n: np.ndarray
    additive_drag_coefficient: np.ndarray
    spillage_drag_coefficient: np.ndarray
    face_static_to_ambient: np.ndarray
    relative_tip_mach: np.ndarray
    # status
    regime: np.ndarray  # int index into REGIMES
    flags: np.ndarray  # int bits, see engine_air.envelope.flags
    checks: list[Check] = field(default_factory=list)
    limiting: np.ndarray | None = None  # int index into checks, -1 where nothing is judged
    ramp_wave_angle_rad: np.ndarray | None = None  # (n_ramps, ...)
    ramp_downstream_mach: np.ndarray | None = None
    oblique_ahead_of_cowl: np.ndarray | None = None  # bool: buzz is judged only there (method §10)

    @property
    def face_mach_margin(self) -> np.ndarray:
        return self.check("face-mach").margin

    @property
    def recovery_minus_reference(self) -> np.ndarray:
        return self.recovery - self.reference_recovery

    def check(self, name: str) -> Check:
        for c in self.checks:
            if c.name == name:
                return c
        raise KeyError(name)

    def value(self, key: str) -> np.ndarray:
        """A quantity by its key (attribute name)."""
        return np.asarray(getattr(self, key))


def _per_ramp(values: np.ndarray, shape: tuple[int, ...]) -> np.ndarray:
    """Per-ramp array of shape (n_ramps, *mach.shape) broadcast to (n_ramps, *shape).

    The Mach array may have fewer dimensions than the broadcast shape (e.g. a 1-D
    row of Mach numbers against a column of altitudes), so the ramp axis is kept
    in front and the Mach axes are aligned on the right.
    """
    values = np.asarray(values)
    lead = len(shape) - (values.ndim - 1)
    return np.broadcast_to(values.reshape(values.shape[:1] + (1,) * lead + values.shape[1:]), values.shape[:1] + shape)


def evaluate_conditions(project: Project, case: Case, mach, altitude_m) -> OperatingPoints:
    """Evaluate the inlet-engine match of ``project`` for ``case`` at flight Mach ``mach`` and
    geopotential altitude ``altitude_m`` (m). Arrays broadcast; returns arrays of the common shape.

    A negative Mach number is taken as 0. A Mach number that is NaN or infinite
    raises ``ValueError`` (there is no flag for it and every result would be an
    unexplained NaN); an altitude outside the atmosphere model, NaN or infinite
    included, and an ISA offset that leaves no positive temperature are flagged
    ``outside-atmosphere`` instead."""
    inlet = project.inlet
    rating = project.rating(case.rating)
    # Mach-only quantities (shock system, reference recovery) are computed on the
    # Mach array's own shape and altitude-only ones on the altitude's: a grid
    # passed as a row of Mach numbers and a column of altitudes costs one
    # evaluation per column or row for them. Everything is broadcast at the end.
    m_in = np.asarray(mach, dtype=float)
    if not np.isfinite(m_in).all():
        bad = m_in[~np.isfinite(m_in)].ravel()[0]
        raise ValueError(f"flight Mach number must be a finite number, not {bad!r}: no state can be computed "
                         "from it (altitude outside the atmosphere model is flagged instead)")
    m0 = np.maximum(m_in, 0.0)
    h = np.asarray(altitude_m, dtype=float)
    shape = np.broadcast_shapes(m0.shape, h.shape)
    bits = np.zeros(shape, dtype=np.int64)

    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        # 1. free stream
        atm = standard_atmosphere(h, case.isa_offset_K)
        bits |= np.where(atm.inside_model, 0, F.OUTSIDE_ATMOSPHERE)
        t0, p0, rho0, a0 = atm.temperature_k, atm.pressure_pa, atm.density_kg_m3, atm.speed_of_sound_m_s
        base0 = 1.0 + 0.5 * (GAMMA - 1.0) * m0 * m0
        tt0 = t0 * base0
        pt0 = p0 * base0 ** (GAMMA / (GAMMA - 1.0))
        v0 = m0 * a0
        low = m0 < LOW_SPEED_MACH
        bits |= np.where(low, F.LOW_SPEED, 0)
        pt0_inlet = np.where(low, p0, pt0)
        supersonic = m0 > 1.0

        # 2. demand
        theta2 = tt0 / T_REF
        wc2, extrapolated = corrected_flow_demand(rating, theta2)
        bits |= np.where(extrapolated & atm.inside_model, F.DEMAND_EXTRAPOLATED, 0)

        # 3. face Mach from corrected flow per unit area
        mfp_star = choked_mass_flow_parameter()
        face_ratio = wc2 * np.sqrt(T_REF) / (P_REF * inlet.face_area_m2) / mfp_star
        face_choked = face_ratio >= 1.0
        bits |= np.where(face_choked, F.FACE_CHOKED, 0)
        m2 = np.where(face_choked, 1.0, mach_from_flow_ratio(np.minimum(face_ratio, 1.0)))
        wc2_face = np.where(face_choked, wc2 / face_ratio, wc2)  # what a choked face passes

        # 4. recovery ahead of any regime correction
        kind = inlet_type(inlet.type)
        shocks = kind.shock_system(inlet, m0)
        bits |= np.where(shocks.detached, F.SHOCK_DETACHED, 0)
        bits |= np.where(shocks.inside_cowl, F.SHOCK_INSIDE_COWL, 0)
        pi_ext = shocks.external_recovery
        pi_duct = 1.0 - inlet.duct_loss_coefficient * dynamic_to_total_pressure(m2)
        pi = pi_ext * pi_duct

        # 5. flow at that recovery, capture ratio
        sqrt_theta2 = np.sqrt(theta2)
        w = wc2_face * (pi * pt0_inlet / P_REF) / sqrt_theta2
        capture_flow = rho0 * v0 * inlet.capture_area_m2  # W at MFR = 1
        mfr_demand = np.where(low, np.nan, w / capture_flow)

        # 6. supersonic regime
        mfr_max_geom = shocks.max_mass_flow_ratio
        ratio = mfr_demand / mfr_max_geom
        supercritical = supersonic & (ratio > 1.0 + CRITICAL_BAND)
        critical = supersonic & (np.abs(ratio - 1.0) <= CRITICAL_BAND)
        # Above MFR_max the captured flow is held at MFR_max (also inside the
        # critical band, so that the capture never exceeds what the shocks allow).
        over = supersonic & (ratio > 1.0)
        scale = np.where(over, 1.0 / np.where(over, ratio, 1.0), 1.0)  # MFR_max / MFR
        pi = pi * scale
        w = w * scale
        bits |= np.where(supercritical, F.SUPERCRITICAL, 0)

        # throat
        throat_ratio = w * np.sqrt(tt0) / (inlet.throat_area_m2 * pi_ext * pt0_inlet) / mfp_star
        throat_choked = throat_ratio >= 1.0
        bits |= np.where(throat_choked, F.THROAT_CHOKED, 0)
        choke_scale = np.where(throat_choked, 1.0 / throat_ratio, 1.0)
        pi = pi * choke_scale
        w = w * choke_scale
        m_th = np.where(throat_choked, 1.0, mach_from_flow_ratio(np.minimum(throat_ratio, 1.0)))

        regime = np.where(
            supersonic,
            np.where(supercritical, SUPERCRITICAL, np.where(critical, CRITICAL, SUBCRITICAL)),
            SUBSONIC,
        )
        mfr = np.where(low, np.nan, w / capture_flow)
        throat_choke_flow = inlet.throat_area_m2 * pi_ext * pt0_inlet * mfp_star / np.sqrt(tt0)
        mfr_max = np.where(supersonic, mfr_max_geom, np.where(low, np.nan, throat_choke_flow / capture_flow))
        stable_fraction = project.limits.stable_flow_fraction
        if stable_fraction is not None:
            # buzz needs an oblique or conical shock ahead of the cowl (method §10); with only a normal
            # shock ahead (pitot, or every ramp shock detached) subcritical spillage is stable
            buzz = supersonic & ~supercritical & ~critical & (mfr / mfr_max_geom < stable_fraction)
            if shocks.oblique_ahead_of_cowl is not None:
                buzz = buzz & shocks.oblique_ahead_of_cowl
            bits |= np.where(buzz, F.BUZZ_RISK, 0)
        spillage = np.where(low, np.nan, np.maximum(0.0, 1.0 - mfr))

        # 7. additive drag, stream tube 0 -> capture plane 1 (A1 = A_c, p_t1 = pi_ext p_t0)
        a0_tube = w / (rho0 * v0)
        pt1 = pi_ext * pt0_inlet
        capture_ratio = w * np.sqrt(tt0) / (inlet.capture_area_m2 * pt1) / mfp_star
        m1 = mach_from_flow_ratio(np.minimum(capture_ratio, 1.0))
        p1 = pt1 * pressure_ratio(m1)
        a1 = inlet.capture_area_m2
        d_add = p1 * a1 * (1.0 + GAMMA * m1 * m1) - p0 * a0_tube * (1.0 + GAMMA * m0 * m0) - p0 * (a1 - a0_tube)
        q0 = 0.5 * GAMMA * p0 * m0 * m0
        if supersonic.any():
            state = CaptureState(m0, p0, q0, mfr, inlet.capture_area_m2, d_add)
            d_super = kind.supersonic_pre_entry_drag(inlet, shocks, state)
        else:
            d_super = d_add
        if d_super is None:
            not_modelled = supersonic
            bits |= np.where(not_modelled, F.ADDITIVE_DRAG_NOT_MODELLED, 0)
        else:
            not_modelled = np.zeros(shape, bool)
            d_add = np.where(supersonic, d_super, d_add)
        d_add = np.where(low | not_modelled, np.nan, d_add)
        c_add = d_add / (q0 * inlet.capture_area_m2)
        suction = np.where(supersonic, 0.0, inlet.lip_suction_factor)
        c_spill = (1.0 - suction) * c_add

        # face static to ambient
        p_face_static = pi * pt0_inlet * pressure_ratio(m2)
        face_static_to_ambient = p_face_static / p0

        # blade relative tip Mach
        if rating.fan_tip_speed_m_s is not None:
            t2 = tt0 / (1.0 + 0.5 * (GAMMA - 1.0) * m2 * m2)
            a2 = np.sqrt(GAMMA * R_AIR * t2)
            m_rel = np.sqrt(m2 * m2 + (rating.fan_tip_speed_m_s / a2) ** 2)
        else:
            m_rel = np.full(shape, np.nan)
            bits |= F.NO_TIP_SPEED

        reference = mil_e_5008b_recovery(m0)
        terminal = np.where(supersonic & (shocks.terminal_upstream_mach > 1.0), shocks.terminal_upstream_mach, np.nan)

    full = lambda a: np.broadcast_to(a, shape)  # noqa: E731
    points = OperatingPoints(
        mach=full(m0),
        altitude_m=full(h),
        static_pressure_pa=full(p0),
        static_temperature_k=full(t0),
        total_pressure_pa=full(pt0),
        total_temperature_k=full(tt0),
        velocity_m_s=full(v0),
        density_kg_m3=full(rho0),
        speed_of_sound_m_s=full(a0),
        theta2=full(theta2),
        corrected_flow_kg_s=full(wc2),
        mass_flow_kg_s=full(w),
        stream_tube_area_m2=full(np.where(low, np.nan, a0_tube)),
        external_recovery=full(pi_ext),
        duct_recovery=full(pi_duct),
        recovery=full(pi),
        reference_recovery=full(reference),
        capture_mach=full(m1),
        throat_mach=full(m_th),
        face_mach=full(m2),
        terminal_shock_mach=full(terminal),
        mass_flow_ratio=full(mfr),
        max_mass_flow_ratio=full(mfr_max),
        spillage_fraction=full(spillage),
        additive_drag_n=full(d_add),
        additive_drag_coefficient=full(c_add),
        spillage_drag_coefficient=full(c_spill),
        face_static_to_ambient=full(face_static_to_ambient),
        relative_tip_mach=full(m_rel),
        regime=full(regime.astype(np.int8)),
        flags=bits,
        ramp_wave_angle_rad=_per_ramp(shocks.ramp_wave_angle_rad, shape),
        ramp_downstream_mach=_per_ramp(shocks.ramp_downstream_mach, shape),
        oblique_ahead_of_cowl=None if shocks.oblique_ahead_of_cowl is None else full(shocks.oblique_ahead_of_cowl),
    )
    points.checks = build_checks(project.limits, points)
    points.limiting = limiting_index(points.checks, points.flags)
    return points
