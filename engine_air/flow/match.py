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

Airflow management, the ledger and case regions (method sections 12-14) are kept in their own modules and
called from here: ``engine_air.flow.airflow`` (bleed, bypass doors, auxiliary doors),
``engine_air.flow.ledger`` (ram drag, installed thrust), ``engine_air.flow.schedule_columns`` (a scheduled
inlet's shock system per Mach column). The scheduled throat area and bleed fraction are arrays of the Mach
array's shape (``engine_air.inlets.schedule.scheduled``).

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
    mass_flow_parameter,
    mach_from_flow_ratio,
    pressure_ratio,
)
from engine_air.inlets.base import CaptureState
from engine_air.inlets.registry import inlet_type
from engine_air.inlets.schedule import scheduled
from engine_air.flow import airflow
from engine_air.flow.ledger import installation_ledger
from engine_air.flow.schedule_columns import per_column, scheduled_pre_entry_drag, scheduled_shock_system
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
    # airflow management (method section 12); fractions are of the captured flow
    captured_flow_kg_s: np.ndarray  # through the capture plane (what MFR counts)
    bleed_fraction: np.ndarray
    bleed_flow_kg_s: np.ndarray
    bypass_fraction: np.ndarray
    bypass_flow_kg_s: np.ndarray
    auxiliary_flow_kg_s: np.ndarray  # through the auxiliary doors (not through the capture plane)
    bypass_shortfall_kg_s: np.ndarray  # critical capture (x (1 - b)) that engine and doors do not take; M0 > 1
    tip_speed_m_s: np.ndarray  # physical fan tip speed used for the relative tip Mach (NaN without one)
    # the ledger (method section 13), newtons
    ram_drag_n: np.ndarray
    spillage_drag_n: np.ndarray
    bleed_drag_n: np.ndarray
    bypass_drag_n: np.ndarray
    net_thrust_n: np.ndarray
    installed_thrust_n: np.ndarray
    installation_loss_fraction: np.ndarray
    thrust_reference_recovery: np.ndarray
    # status
    regime: np.ndarray  # int index into REGIMES
    flags: np.ndarray  # int bits, see engine_air.envelope.flags
    checks: list[Check] = field(default_factory=list)
    limiting: np.ndarray | None = None  # int index into checks, -1 where nothing is judged
    ramp_wave_angle_rad: np.ndarray | None = None  # (n_ramps, ...)
    ramp_downstream_mach: np.ndarray | None = None
    oblique_ahead_of_cowl: np.ndarray | None = None  # bool: buzz is judged only there (method §10)
    started: np.ndarray | None = None  # bool, mixed compression only (method §11)
    self_start_contraction: np.ndarray | None = None  # Kantrowitz limit K(M_e) on A_th/A_e, mixed compression only
    entrance_area_m2: np.ndarray | None = None  # cowl entrance area A_e, mixed compression only (method §11)
    internal_contraction_ratio: np.ndarray | None = None  # CR = A_th/A_e, mixed compression only
    dc60: np.ndarray | None = None  # distortion DC(60) from data (method §18); None: no data, not judged
    surge_margin_loss: np.ndarray | None = None  # ΔPRS from data (method §18); None: no data, not judged

    @property
    def face_mach_margin(self) -> np.ndarray:
        return self.check("face-mach").margin

    @property
    def worst_relative_margin(self) -> np.ndarray:
        """Least relative margin over the checks judged at each point (NaN where none is judged)."""
        from engine_air.envelope.ranking import worst_relative_margin

        return worst_relative_margin(self.checks, np.shape(self.mach))

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

    def check(self, name: str) -> Check:
        for c in self.checks:
            if c.name == name:
                return c
        raise KeyError(name)

    def value(self, key: str) -> np.ndarray:
        """A quantity by its key (attribute name); NaN everywhere for one this inlet type does not carry (e.g.
        ``started`` of a pitot inlet)."""
        value = getattr(self, key)
        if value is None:
            return np.full(np.shape(self.mach), np.nan)
        return np.asarray(value)


def _per_ramp(values: np.ndarray, shape: tuple[int, ...]) -> np.ndarray:
    """Per-ramp array of shape (n_ramps, *mach.shape) broadcast to (n_ramps, *shape).

    The Mach array may have fewer dimensions than the broadcast shape (e.g. a 1-D
    row of Mach numbers against a column of altitudes), so the ramp axis is kept
    in front and the Mach axes are aligned on the right.
    """
    values = np.asarray(values)
    lead = len(shape) - (values.ndim - 1)
    return np.broadcast_to(values.reshape(values.shape[:1] + (1,) * lead + values.shape[1:]), values.shape[:1] + shape)


def _outside_case_region(case: Case, m0: np.ndarray, h: np.ndarray) -> np.ndarray:
    """Bool: outside the case's ``mach_range`` or ``altitude_range_m`` (bounds included, method section 14)."""
    out = np.zeros(np.broadcast_shapes(m0.shape, h.shape), bool)
    if case.mach_range is not None:
        lo, hi = case.mach_range
        out = out | (m0 < lo) | (m0 > hi)
    if case.altitude_range_m is not None:
        lo, hi = case.altitude_range_m
        out = out | (h < lo) | (h > hi)
    return out


def _tip_speed(rating, theta2):
    """Physical fan tip speed U (m/s): the rating's one speed, or U = U_c sqrt(theta2) from its corrected tip
    speed table against theta2 (linear, ends held; method section 14); None without either."""
    if rating.corrected_tip_speed_m_s is not None:
        corrected = np.interp(theta2, np.asarray(rating.theta, float), np.asarray(rating.corrected_tip_speed_m_s, float))
        return corrected * np.sqrt(theta2)
    return rating.fan_tip_speed_m_s


def _bypass(inlet, open_, needed, throat_room, duct_total_pressure, total_temperature, static_pressure, bits):
    """Bypass door flow (kg/s) where the doors are ``open_`` and the flags with ``bypass-insufficient`` added.

    The doors pass what is needed up to the lesser of their capacity and the throat's room (kg/s)."""
    if inlet.bypass_area_m2 <= 0.0:
        return np.zeros(np.shape(open_)), bits
    capacity = airflow.door_flow(inlet.bypass_area_m2, inlet.bypass_discharge_coefficient, duct_total_pressure,
                                 total_temperature, static_pressure)
    capacity = np.minimum(capacity, np.maximum(throat_room, 0.0))
    flow, short = airflow.bypass_flow(np.where(open_, needed, 0.0), capacity)
    flow = np.where(open_, flow, 0.0)
    return flow, bits | np.where(open_ & short, F.BYPASS_INSUFFICIENT, 0)


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
        bits |= np.where(_outside_case_region(case, m0, h), F.OUTSIDE_CASE_REGION, 0)
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
        shocks = scheduled_shock_system(kind, inlet, m0)  # per Mach column when scheduled
        bits |= np.where(shocks.detached, F.SHOCK_DETACHED, 0)
        bits |= np.where(shocks.inside_cowl, F.SHOCK_INSIDE_COWL, 0)
        pi_ext = shocks.external_recovery
        pi_duct = 1.0 - inlet.duct_loss_coefficient * dynamic_to_total_pressure(m2)
        pi = pi_ext * pi_duct
        # scheduled geometry (method section 12): arrays of the Mach array's shape
        throat_area = scheduled(inlet, "throat_area_m2", m0)
        bleed = scheduled(inlet, "bleed_fraction", m0)

        # 5. flow at that recovery, capture ratio
        sqrt_theta2 = np.sqrt(theta2)
        w = wc2_face * (pi * pt0_inlet / P_REF) / sqrt_theta2  # engine flow
        capture_flow = rho0 * v0 * inlet.capture_area_m2  # W at MFR = 1
        mfr_demand = np.where(low, np.nan, w / (1.0 - bleed) / capture_flow)  # captured = engine/(1 - b)

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
        # mixed compression (method §11): unstarted, or started with the demand below the capture
        started = None if shocks.started is None else supersonic & shocks.started
        if started is not None:
            bits |= np.where(supersonic & ~started, F.UNSTARTED, 0)

        # throat, with the auxiliary doors in parallel where they are open; it passes engine + bypass flow
        a_throat, aux_share, _ = airflow.auxiliary_share(throat_area, inlet.auxiliary_inlet_area_m2, m0,
                                                         inlet.auxiliary_door_mach_max)

        # bypass doors (supersonic, below critical): hold the inlet critical up to their capacity and as far as
        # the throat passes the extra air within its Mach limit (unchoked without one); the rest spills
        throat_mach_cap = (project.limits.throat_mach_max if project.limits.throat_mach_max is not None else 1.0) * (1.0 - 1e-9)
        throat_room = a_throat * pi_ext * pt0_inlet * mass_flow_parameter(throat_mach_cap) / np.sqrt(tt0) - w
        if started is not None:  # a started throat is supersonic: it passes the whole capture
            throat_room = np.where(started, np.inf, throat_room)
        doors_open = supersonic & ~over & ~low
        bypass_needed = np.where(doors_open, np.maximum(mfr_max_geom * capture_flow * (1.0 - bleed) - w, 0.0), 0.0)
        w_bp, bits = _bypass(inlet, doors_open, bypass_needed, throat_room, pi_ext * pt0_inlet, tt0, p0, bits)
        # what neither engine, bleed nor doors take of the critical capture: it spills (external compression)
        # or would unstart a mixed-compression inlet, whose type judges it
        bypass_shortfall = np.where(doors_open, np.maximum(bypass_needed - w_bp, 0.0), 0.0)
        throat_flow = w + w_bp
        throat_ratio = throat_flow * np.sqrt(tt0) / (a_throat * pi_ext * pt0_inlet) / mfp_star
        throat_choked = throat_ratio >= 1.0
        if started is not None:  # started: the throat is supersonic, the terminal shock just behind it
            throat_choked = throat_choked & ~started
        bits |= np.where(throat_choked, F.THROAT_CHOKED, 0)
        # a choked throat closes the bypass first, then starves the engine (recovery falls in proportion)
        choke_flow = throat_flow / throat_ratio
        w_bp_choked = np.maximum(w_bp - (throat_flow - choke_flow), 0.0)
        choke_scale = np.where(throat_choked, np.where(w_bp > 0.0, (choke_flow - w_bp_choked) / w, 1.0 / throat_ratio),
                               1.0)
        w_bp = np.where(throat_choked, w_bp_choked, w_bp)
        pi = pi * choke_scale
        w = w * choke_scale
        m_th = np.where(throat_choked, 1.0, mach_from_flow_ratio(np.minimum(throat_ratio, 1.0)))
        if inlet.auxiliary_inlet_area_m2 > 0.0:  # the doors' own loss on their share (one pass)
            pi_aux = airflow.auxiliary_recovery(aux_share, inlet.auxiliary_loss_coefficient, m_th)
            pi = pi * pi_aux
            w = w * pi_aux
        w_aux = aux_share * (w + w_bp)
        captured = (w + w_bp - w_aux) / (1.0 - bleed)  # through the capture plane; bleed = b x captured
        w_bleed = bleed * captured
        bypass_fraction = np.where(w_bp > 0.0, w_bp / captured, 0.0)
        held = supersonic & (w_bp > 0.0) & (np.abs(captured / capture_flow / mfr_max_geom - 1.0) <= CRITICAL_BAND)
        critical = (critical | held) & ~supercritical
        if started is not None:
            m_th = np.where(started, shocks.terminal_upstream_mach, m_th)
            # started with the capture (after any bypass) below the critical one: the shock may be expelled
            bits |= np.where(started & (captured / capture_flow / mfr_max_geom < 1.0 - CRITICAL_BAND),
                             F.UNSTART_RISK, 0)

        regime = np.where(
            supersonic,
            np.where(supercritical, SUPERCRITICAL, np.where(critical, CRITICAL, SUBCRITICAL)),
            SUBSONIC,
        )
        mfr = np.where(low, np.nan, captured / capture_flow)
        throat_choke_flow = throat_area * pi_ext * pt0_inlet * mfp_star / np.sqrt(tt0)
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
        a0_tube = captured / (rho0 * v0)
        pt1 = pi_ext * pt0_inlet
        capture_ratio = captured * np.sqrt(tt0) / (inlet.capture_area_m2 * pt1) / mfp_star
        m1 = mach_from_flow_ratio(np.minimum(capture_ratio, 1.0))
        p1 = pt1 * pressure_ratio(m1)
        a1 = inlet.capture_area_m2
        d_add = p1 * a1 * (1.0 + GAMMA * m1 * m1) - p0 * a0_tube * (1.0 + GAMMA * m0 * m0) - p0 * (a1 - a0_tube)
        q0 = 0.5 * GAMMA * p0 * m0 * m0
        if supersonic.any():
            state = CaptureState(m0, p0, q0, mfr, inlet.capture_area_m2, d_add)
            if per_column(kind, inlet):
                d_super = scheduled_pre_entry_drag(kind, inlet, np.broadcast_to(m0, shape), state)
            else:
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
        suction = np.where(supersonic, inlet.supersonic_lip_suction_factor, inlet.lip_suction_factor)
        c_spill = np.where(mfr >= 1.0, 0.0, (1.0 - suction) * c_add)  # as d_spill: 0 at MFR >= 1 (method §12)
        # spillage drag in newtons: 0 at MFR >= 1 and below M0 0.05 (q0 < 0.2 % of p0)
        d_spill = np.where(low | (mfr >= 1.0), 0.0, (1.0 - suction) * d_add)

        # face static to ambient
        p_face_static = pi * pt0_inlet * pressure_ratio(m2)
        face_static_to_ambient = p_face_static / p0

        # blade relative tip Mach
        u_tip = _tip_speed(rating, theta2)
        if u_tip is not None:
            t2 = tt0 / (1.0 + 0.5 * (GAMMA - 1.0) * m2 * m2)
            a2 = np.sqrt(GAMMA * R_AIR * t2)
            m_rel = np.sqrt(m2 * m2 + (u_tip / a2) ** 2)
        else:
            u_tip = np.nan
            m_rel = np.full(shape, np.nan)
            bits |= F.NO_TIP_SPEED

        # the installation ledger (method section 13)
        d_bleed = airflow.bleed_drag(w_bleed, v0, inlet.bleed_exit_velocity_ratio)
        d_bypass = airflow.bypass_drag(w_bp, v0, inlet.bypass_exit_velocity_ratio)
        ledger = installation_ledger(rating, m0, h, pi, w, v0, d_spill, d_bleed, d_bypass)
        if ledger.no_thrust_data:
            bits |= F.NO_THRUST_DATA

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
        captured_flow_kg_s=full(captured),
        bleed_fraction=full(bleed),
        bleed_flow_kg_s=full(w_bleed),
        bypass_fraction=full(bypass_fraction),
        bypass_flow_kg_s=full(w_bp),
        auxiliary_flow_kg_s=full(w_aux),
        bypass_shortfall_kg_s=full(bypass_shortfall),
        tip_speed_m_s=full(u_tip),
        ram_drag_n=full(ledger.ram_drag_n),
        spillage_drag_n=full(d_spill),
        bleed_drag_n=full(d_bleed),
        bypass_drag_n=full(d_bypass),
        net_thrust_n=full(ledger.net_thrust_n),
        installed_thrust_n=full(ledger.installed_thrust_n),
        installation_loss_fraction=full(ledger.installation_loss_fraction),
        thrust_reference_recovery=full(ledger.thrust_reference_recovery),
        regime=full(regime.astype(np.int8)),
        flags=bits,
        ramp_wave_angle_rad=_per_ramp(shocks.ramp_wave_angle_rad, shape),
        ramp_downstream_mach=_per_ramp(shocks.ramp_downstream_mach, shape),
        oblique_ahead_of_cowl=None if shocks.oblique_ahead_of_cowl is None else full(shocks.oblique_ahead_of_cowl),
        started=None if started is None else full(started),
        self_start_contraction=None if shocks.self_start_contraction is None else full(shocks.self_start_contraction),
        entrance_area_m2=None if shocks.entrance_area_m2 is None else full(shocks.entrance_area_m2),
        internal_contraction_ratio=(None if shocks.internal_contraction_ratio is None
                                    else full(shocks.internal_contraction_ratio)),
    )
    points.checks = build_checks(project.limits, points)
    points.limiting = limiting_index(points.checks, points.flags)
    return points
