"""Two-dimensional mixed-compression inlet (``mixed-compression``, method §11).

Layout: external ramps laid out shock-on-lip at ``shock_on_lip_mach`` M_d exactly as for the
``external-ramp`` type (``engine_air.inlets.ramp_layout``); the cowl entrance e, the flow section from the
cowl lip to the last ramp surface normal to the post-ramp flow; inside the cowl a cowl shock that turns the
flow back by the sum of the ramp angles (a plane oblique shock at the post-ramp Mach M_e); a supersonic
contraction from the entrance A_e to the throat A_th (``throat_area_m2``, which ``[inlet.schedule]`` may
schedule in M0); a terminal normal shock just downstream of the throat.

Cowl entrance (fixed by the layout; continuity at M_d, all ramp shocks on the lip):
    A_e/A_c = (A/A*)(M_e,d) / ((A/A*)(M_d) pi_ramps(M_d))      (``ramp_layout.cowl_entrance_area_ratio``)
  the same as the lip's distance from the last ramp surface in the layout (``ramp_layout.cowl_entrance``).
  Internal contraction ratio CR = A_th/A_e. (An earlier form of this model used A_th/A_c as the contraction,
  which breaks continuity: the captured flow did not fit the throat it was given.)
Started (the terminal shock behind the throat): continuity of the captured flow W = MFR_max rho0 V0 A_c through
  the ramp and cowl shocks,
    (A/A*)(M_th) = (A_th/A_c) pi_ramps pi_cowl (A/A*)(M0) / MFR_max,   supersonic root [NACA Report 1135, eq. 80]
  (below M_d the same as CR pi_cowl (A/A*)(M_e): the entrance passes exactly the captured flow);
    pi_ext = pi_ramps pi_cowl pi_ns(M_th) eta_int               (eta_int = ``internal_recovery_factor``).
  It cannot run started where a ramp or the cowl shock is detached, the flow behind the cowl shock is not
  supersonic or the relation has no supersonic root (``starting.started_throat_mach_by_continuity``).
Self-starting (Kantrowitz-Donaldson, NACA ACR L5D20): with the normal shock at the cowl entrance at M_e
  the inlet swallows it when CR = A_th/A_e >= K(M_e) = (A*/A)(M_e)/pi_ns(M_e) (``self_start_contraction``).
History: along each altitude row the aircraft accelerates from Mach 1: the inlet is unstarted until it
  self-starts, then started while it can run started; once it cannot, unstarted again until it self-starts
  again. Geometry depends on M0 only (the throat schedule), so the state is found once per Mach number by a
  running scan along a dense Mach axis (``SCAN_STEP``) that contains every asked Mach number, and is the
  same on every altitude row. Decelerating from the started state it stays started down to the unstart
  Mach (``starting_machs``), below the self-start Mach: the hysteresis band.
Unstarted: a normal shock stands ahead of the cowl at M_e (pi_ext = pi_ramps pi_ns(M_e), as the
  external-ramp inlet), the excess air spills subsonically; the maximum capture is the external trace with
  the normal shock at the lip. The match flags the point ``unstarted``.

Simplifications (stated in the README): one-dimensional internal flow (no reflected cowl shock, no boundary
layer except through eta_int), the cowl shock as a plane oblique shock at the mean post-ramp Mach, the
terminal shock taken at the throat, ramp angles and the shock-on-lip Mach fixed (only the throat area is
read from a schedule), pre-entry drag of the external ramps only (as for the external-ramp type).

Example (checked in tests/test_mixed_compression.py shock by shock with NACA Report 1135 relations): ramps
[5, 5] deg, M_d = 2.5 (A_e/A_c = 0.69931), A_th/A_c = 0.59 (CR = 0.84369), eta_int = 0.97. Accelerating, it
self-starts at M0 = 2.2374 (where K(M_e) falls to CR); at M0 = 2.5, started, M_th = 1.8712 and
pi_ext = 0.7399; decelerating it stays started down to M0 = 1.8799 (the hysteresis band).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.inlets.base import CaptureState, ShockSystem
from engine_air.inlets.external_ramp import RAMP_ANGLES, SHOCK_ON_LIP_MACH, ramp_problems
from engine_air.inlets.schedule import is_scheduled, scheduled
from engine_air.physics.shocks import normal_shock, oblique_shock
from engine_air.spec.project import Inlet
from engine_air.spec.field import Field

SCAN_START = 1.0
"""Mach number at which every history starts (unstarted): supersonic flight begins here."""
SCAN_STEP = 0.0025
"""Spacing of the dense Mach axis of the running scan (the asked Mach numbers are added to it)."""
TOP_MACH = 5.0
"""Highest Mach number searched for the self-start and unstart Mach numbers (the shock-on-lip bound)."""

INTERNAL_RECOVERY = Field(
    "internal_recovery_factor", "inlet", "number",
    "total-pressure factor for the internal (supersonic contraction and terminal shock) losses not in the "
    "shock relations, started only", lo=0.0, hi=1.0, lo_open=True, default=1.0,
    inlet_types=("mixed-compression",))


@dataclass(frozen=True)
class MixedState:
    """Everything about the inlet that depends on the flight Mach number alone (arrays of its shape)."""

    ramps: ShockSystem  # the external ramps, terminal shock at the post-ramp Mach (the unstarted inlet)
    entrance_mach: np.ndarray  # M_e, behind the last ramp (ahead of the cowl)
    ramp_recovery: np.ndarray  # product of the ramp shocks' total-pressure ratios
    cowl: object  # ObliqueShock of the cowl at M_e turning by the ramp sum
    entrance_area_ratio: float  # A_e/A_c of the cowl entrance (fixed by the shock-on-lip layout)
    contraction: np.ndarray  # internal contraction ratio CR = A_th/A_e (throat scheduled in M0)
    throat_mach: np.ndarray  # supersonic throat Mach when started; NaN where it cannot run started
    can_run: np.ndarray  # bool: it can run started at this Mach number
    self_start_limit: np.ndarray  # Kantrowitz limit K(M_e) on CR (1 where M_e <= 1)
    starts: np.ndarray  # bool: can run started and self-starts here


def entrance_area_m2(inlet: Inlet) -> float:
    """Cowl entrance area A_e (m^2) of a mixed-compression ``inlet``: A_c times the continuity ratio of its
    shock-on-lip layout (``ramp_layout.cowl_entrance_area_ratio``, method §11).

    Parameters
    ----------
    inlet : Inlet
        A mixed-compression inlet (ramps, shock-on-lip Mach, capture area in m^2).

    Returns
    -------
    float
        A_e, m^2.

    Examples
    --------
    >>> from engine_air.spec.project import Inlet
    >>> inlet = Inlet(type="mixed-compression", capture_area_m2=2.0, throat_area_m2=1.0, face_area_m2=1.5,
    ...               ramp_angles_deg=(6.0, 6.0), shock_on_lip_mach=2.4)
    >>> print(f"{entrance_area_m2(inlet):.5f}")
    1.34431
    """
    from engine_air.inlets.ramp_layout import cowl_entrance_area_ratio

    return inlet.capture_area_m2 * cowl_entrance_area_ratio(inlet.ramp_angles_deg, inlet.shock_on_lip_mach)


def mixed_state(inlet: Inlet, flight_mach) -> MixedState:
    """The Mach-only state of the mixed-compression ``inlet`` at flight Mach numbers ``flight_mach`` (method §11).

    Ramps as ``ramp_layout.ramp_shock_system`` (post-ramp Mach M_e, MFR_max from the lip-streamline trace), the
    cowl shock turning by the ramp sum at M_e [NACA Report 1135, eqs. 132, 138], the cowl entrance A_e/A_c from
    continuity at M_d (``ramp_layout.cowl_entrance_area_ratio``), the internal contraction ratio
    CR = A_th(M0)/A_e, the started throat Mach by continuity of the captured flow through the ramp and cowl shocks
    (supersonic root of (A/A*)(M_th) = (A_th/A_c) pi_ramps pi_cowl (A/A*)(M0)/MFR_max,
    ``starting.started_throat_mach_by_continuity``), can-run-started (ramps and cowl shock attached, supersonic
    behind the cowl shock, a root), the Kantrowitz limit K(M_e) (``starting.self_start_contraction``) and
    self-starting (can run started and CR >= K(M_e)).

    Parameters
    ----------
    inlet : Inlet
        A mixed-compression inlet (ramps, shock-on-lip Mach, capture area; throat area fixed or scheduled).
    flight_mach : array_like
        Flight Mach number M0 (dimensionless), any shape.

    Returns
    -------
    MixedState
        Arrays of the shape of ``flight_mach`` (the ramp shock system's per-ramp arrays lead with the ramp axis).

    Examples
    --------
    Two 5 deg ramps (M_d = 2.5: A_e/A_c = 0.69931) at M0 = 2.0 turn the flow to M_e = 1.649 (two NACA 1135
    oblique shocks); the Kantrowitz limit there is 0.8837 and the scheduled contraction 0.62/0.69931 = 0.8866 is
    just above it: it can run started and starts itself.

    >>> from engine_air.spec.project import Inlet, Schedule
    >>> inlet = Inlet(type="mixed-compression", capture_area_m2=1.0, throat_area_m2=0.50, face_area_m2=0.9,
    ...               ramp_angles_deg=(5.0, 5.0), shock_on_lip_mach=2.5,
    ...               schedule=Schedule(mach=(2.0, 2.5), throat_area_m2=(0.62, 0.50)))
    >>> st = mixed_state(inlet, 2.0)
    >>> print(f"{st.entrance_area_ratio:.5f} {float(st.entrance_mach):.3f} {float(st.self_start_limit):.4f} "
    ...       f"{float(st.contraction):.4f}")
    0.69931 1.649 0.8837 0.8866
    >>> bool(st.can_run), bool(st.starts)
    (True, True)
    """
    from engine_air.inlets.ramp_layout import cowl_entrance_area_ratio, ramp_shock_system  # physics where used
    from engine_air.physics.starting import self_start_contraction, started_throat_mach_by_continuity

    m0 = np.asarray(flight_mach, dtype=float)
    supersonic = m0 > 1.0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        ramps = ramp_shock_system(inlet.ramp_angles_deg, inlet.shock_on_lip_mach, m0)
        m_e = ramps.terminal_upstream_mach
        ramps_ok = supersonic & ~ramps.detached & (m_e > 1.0)
        pts = np.asarray(ramps.ramp_total_pressure_ratio)
        ramp_recovery = np.prod(np.where(np.isfinite(pts), pts, 1.0), axis=0) if pts.shape[0] else np.ones_like(m0)
        turn = np.radians(float(sum(inlet.ramp_angles_deg)))
        cowl = oblique_shock(np.where(ramps_ok, m_e, 2.0), turn)
        cowl_ok = ramps_ok & cowl.attached & (cowl.downstream_mach > 1.0)
        entrance = cowl_entrance_area_ratio(inlet.ramp_angles_deg, inlet.shock_on_lip_mach)
        throat_to_capture = scheduled(inlet, "throat_area_m2", m0) / inlet.capture_area_m2
        contraction = throat_to_capture / entrance
        m_th = started_throat_mach_by_continuity(
            throat_to_capture, m0, ramp_recovery * np.where(cowl_ok, cowl.total_pressure_ratio, np.nan),
            ramps.max_mass_flow_ratio)
        can_run = cowl_ok & np.isfinite(m_th)
        limit = self_start_contraction(np.where(supersonic, m_e, 1.0))
        starts = can_run & (contraction >= limit)
    return MixedState(ramps, m_e, ramp_recovery, cowl, entrance, contraction, np.where(can_run, m_th, np.nan),
                      can_run, limit, starts)


def _scan(can_run: np.ndarray, starts: np.ndarray) -> np.ndarray:
    """Started state along a history sampled at nodes (1-D, in time order), unstarted at its beginning:
    started at node i when it can run started there and a self-start happened since the last node at
    which it could not (a running maximum of node indices, no Python loop)."""
    idx = np.arange(can_run.size)
    last_start = np.maximum.accumulate(np.where(starts, idx, -1))
    last_block = np.maximum.accumulate(np.where(~can_run, idx, -1))
    return can_run & (last_start > last_block)


def started_along(inlet: Inlet, mach_history) -> np.ndarray:
    """Started state at each Mach number of a flight history ``mach_history`` (1-D, in time order; the
    flight Mach varies linearly between its entries, sampled every ``SCAN_STEP``). The history begins
    unstarted at Mach 1 (or at its first entry if that is lower) and accelerates to its first entry.

    Use it for a deceleration: a history up past the self-start Mach and back down stays started down to the
    unstart Mach; an acceleration alone does not start it until the self-start Mach.

    Parameters
    ----------
    inlet : Inlet
        A mixed-compression inlet.
    mach_history : array_like
        Flight Mach numbers (dimensionless) in time order, 1-D.

    Returns
    -------
    ndarray of bool
        Started at each entry of ``mach_history``.

    Examples
    --------
    The throat schedule below self-starts the inlet at M0 1.984 and keeps it started, decelerating, to 1.795:

    >>> from engine_air.spec.project import Inlet, Schedule
    >>> inlet = Inlet(type="mixed-compression", capture_area_m2=1.0, throat_area_m2=0.50, face_area_m2=0.9,
    ...               ramp_angles_deg=(5.0, 5.0), shock_on_lip_mach=2.5,
    ...               schedule=Schedule(mach=(2.0, 2.5), throat_area_m2=(0.62, 0.50)))
    >>> started_along(inlet, [1.9, 2.1, 1.9, 1.7]).tolist()
    [False, True, True, False]
    """
    path = np.asarray(mach_history, dtype=float).ravel()
    pieces = [np.array([min(SCAN_START, path[0]) if path.size else SCAN_START])]
    ends = []
    start = pieces[0][0]
    for target in path:
        n = max(1, int(np.ceil(abs(target - start) / SCAN_STEP)))
        pieces.append(np.linspace(start, target, n + 1)[1:])
        ends.append(sum(p.size for p in pieces) - 1)
        start = target
    dense = np.concatenate(pieces)
    state = mixed_state(inlet, dense)
    return _scan(state.can_run, state.starts)[np.array(ends, dtype=int)]


def started_accelerating(inlet: Inlet, flight_mach) -> np.ndarray:
    """Started state at each flight Mach number for an inlet that accelerated from Mach 1 along its geometry
    schedule (method §11 history): one running scan along a dense Mach axis (every ``SCAN_STEP``) that contains
    every asked Mach number, read back per Mach number (the same on every altitude row).

    Parameters
    ----------
    inlet : Inlet
        A mixed-compression inlet.
    flight_mach : array_like
        Flight Mach number M0 (dimensionless), any shape.

    Returns
    -------
    ndarray of bool
        Started, the shape of ``flight_mach``; False where M0 <= 1.

    Examples
    --------
    >>> from engine_air.spec.project import Inlet, Schedule
    >>> inlet = Inlet(type="mixed-compression", capture_area_m2=1.0, throat_area_m2=0.50, face_area_m2=0.9,
    ...               ramp_angles_deg=(5.0, 5.0), shock_on_lip_mach=2.5,
    ...               schedule=Schedule(mach=(2.0, 2.5), throat_area_m2=(0.62, 0.50)))
    >>> started_accelerating(inlet, [0.9, 1.9, 2.0, 3.0]).tolist()
    [False, False, True, True]
    """
    m0 = np.asarray(flight_mach, dtype=float)
    sup = m0 > SCAN_START
    if not sup.any():
        return np.zeros(m0.shape, bool)
    asked = np.unique(m0[sup])
    top = float(asked[-1])
    axis = np.union1d(np.arange(SCAN_START, top + SCAN_STEP, SCAN_STEP), asked)
    axis = axis[axis <= top]
    state = mixed_state(inlet, axis)
    started_axis = _scan(state.can_run, state.starts)
    where = np.searchsorted(axis, np.where(sup, m0, SCAN_START))
    return sup & started_axis[np.clip(where, 0, axis.size - 1)]


def _first_true(inlet: Inlet, lo: float, hi: float, key: str) -> float:
    """Refine, between Mach ``lo`` (false) and ``hi`` (true), where the state's ``key`` turns true (~1e-5)."""
    fine = np.linspace(lo, hi, 257)
    values = getattr(mixed_state(inlet, fine), key)
    return float(fine[np.argmax(values)])


def starting_machs(inlet: Inlet, top_mach: float = TOP_MACH) -> tuple[float | None, float | None]:
    """The self-start and unstart flight Mach numbers of the mixed-compression ``inlet`` (the same on every
    altitude row: its geometry depends on M0 only).

    Self-start Mach: accelerating from Mach 1, the lowest Mach number at which it starts itself.
    Unstart Mach: decelerating from there, the lowest Mach number down to which it still runs started
    (at or below the self-start Mach; the band between them is the hysteresis band). ``(None, None)``
    when it does not start below ``top_mach``. Resolved to about SCAN_STEP/256.

    Parameters
    ----------
    inlet : Inlet
        A mixed-compression inlet.
    top_mach : float
        Highest flight Mach number searched (dimensionless).

    Returns
    -------
    tuple
        (self-start Mach, unstart Mach), floats or ``None``.

    Examples
    --------
    >>> from engine_air.spec.project import Inlet, Schedule
    >>> inlet = Inlet(type="mixed-compression", capture_area_m2=1.0, throat_area_m2=0.50, face_area_m2=0.9,
    ...               ramp_angles_deg=(5.0, 5.0), shock_on_lip_mach=2.5,
    ...               schedule=Schedule(mach=(2.0, 2.5), throat_area_m2=(0.62, 0.50)))
    >>> print("%.3f %.3f" % starting_machs(inlet))
    1.984 1.795
    """
    axis = np.arange(SCAN_START, top_mach + SCAN_STEP / 2, SCAN_STEP)
    state = mixed_state(inlet, axis)
    if not state.starts.any():
        return None, None
    i = int(np.argmax(state.starts))
    start = float(axis[i]) if i == 0 else _first_true(inlet, float(axis[i - 1]), float(axis[i]), "starts")
    blocked = np.nonzero(~state.can_run[:i + 1])[0]
    if blocked.size == 0:
        return start, float(axis[0])
    j = int(blocked[-1])
    unstart = _first_true(inlet, float(axis[j]), float(axis[j + 1]), "can_run")
    return start, min(unstart, start)


class MixedCompressionInlet:
    name = "mixed-compression"
    handles_schedule = True  # its starting history needs the whole throat schedule (method §11)
    label = "mixed compression (2-D)"
    fields = (RAMP_ANGLES, SHOCK_ON_LIP_MACH, INTERNAL_RECOVERY)

    def check_design(self, inlet: Inlet) -> list[tuple[str, object, str]]:
        problems = ramp_problems(inlet)
        if problems:
            return problems
        if not 0.0 < inlet.internal_recovery_factor <= 1.0:
            problems.append(("inlet.internal_recovery_factor", inlet.internal_recovery_factor,
                             "must be a number with 0 < internal_recovery_factor <= 1"))
        if not is_scheduled(inlet, "throat_area_m2"):
            a_e = entrance_area_m2(inlet)
            if not inlet.throat_area_m2 < a_e:
                problems.append(("inlet.throat_area_m2", inlet.throat_area_m2,
                                 f"a mixed-compression inlet contracts inside the cowl: must be below the cowl "
                                 f"entrance area A_e = {a_e:.6g} m^2 (A_e/A_c = {a_e / inlet.capture_area_m2:.5f} "
                                 f"from the ramps laid out shock-on-lip at Mach {inlet.shock_on_lip_mach:g})"))
        return problems

    def shock_system(self, inlet: Inlet, flight_mach) -> ShockSystem:
        m0 = np.asarray(flight_mach, dtype=float)
        supersonic = m0 > 1.0
        state = mixed_state(inlet, m0)
        started = supersonic & started_accelerating(inlet, m0)
        ramps = state.ramps
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            m_th = np.where(started, state.throat_mach, 2.0)
            terminal = normal_shock(m_th)
            pi_started = (state.ramp_recovery * np.where(started, state.cowl.total_pressure_ratio, 1.0)
                          * terminal.total_pressure_ratio * inlet.internal_recovery_factor)
        return ShockSystem(
            external_recovery=np.where(started, pi_started, ramps.external_recovery),
            terminal_upstream_mach=np.where(started, m_th, ramps.terminal_upstream_mach),
            terminal_downstream_mach=np.where(started, terminal.downstream_mach, ramps.terminal_downstream_mach),
            max_mass_flow_ratio=ramps.max_mass_flow_ratio,
            detached=ramps.detached,
            inside_cowl=ramps.inside_cowl,
            ramp_wave_angle_rad=ramps.ramp_wave_angle_rad,
            ramp_downstream_mach=ramps.ramp_downstream_mach,
            ramp_total_pressure_ratio=ramps.ramp_total_pressure_ratio,
            ramp_static_pressure_ratio=ramps.ramp_static_pressure_ratio,
            oblique_ahead_of_cowl=ramps.oblique_ahead_of_cowl & ~started,
            started=started,
            self_start_contraction=state.self_start_limit,
            entrance_area_m2=np.broadcast_to(state.entrance_area_ratio * inlet.capture_area_m2, m0.shape).copy(),
            internal_contraction_ratio=state.contraction,
        )

    def supersonic_pre_entry_drag(self, inlet: Inlet, shocks: ShockSystem, state: CaptureState):
        # the external ramps' pressure along the dividing stream line, and the spillage behind the normal shock
        # at the cowl entrance (unstarted, or started with excess air): method section 13
        from engine_air.inlets.ramp_layout import ramp_pre_entry_drag

        return ramp_pre_entry_drag(inlet.ramp_angles_deg, inlet.shock_on_lip_mach, shocks, state)

    def design_variables(self, inlet: Inlet) -> list[str]:
        # the internal contraction is the throat area, a design variable of every type
        return [f"ramp_angles_deg[{k + 1}]" for k in range(len(inlet.ramp_angles_deg))] + ["shock_on_lip_mach"]


INLET = MixedCompressionInlet()
