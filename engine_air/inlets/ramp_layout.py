"""Two-dimensional ramps laid out shock-on-lip: shock system and maximum capture (method §4, §6).

Ramps (two-dimensional, 1 to 3 ramps of given deflections): weak
oblique shocks in sequence, then a terminal normal shock at the Mach number
behind the last ramp. A ramp whose deflection exceeds the maximum for its local
Mach number detaches: the rest of the compression is taken as one normal shock at
that local Mach number (flag ``shock-detached``).

Shock-on-lip design. At the design Mach number M_d every ramp shock passes
through the cowl lip. With the first ramp's leading edge at the origin and the lip
at height H = 1 this fixes the lip (x_L = cot beta_1) and each ramp corner C_k
(the shock from C_k at absolute angle theta_k + beta_{k+1} passes through the lip)
from the ramp angles alone. Below M_d the shocks are steeper and stand ahead of
the lip; the dividing streamline is traced back from the lip through each shock
(parallel to the local ramp in each region) to the free stream, where its height
y_0 is the captured stream-tube height: MFR_max = y_0 / H < 1. At and above M_d
MFR_max = 1 (above it the shocks fall inside the cowl: ``shock-inside-cowl``).
Shock-shock intersections ahead of the lip are not modelled (each shock is taken
as straight up to the lip's height), as in the usual two-dimensional estimate
[Seddon & Goldsmith, Intake Aerodynamics, 2nd ed., ch. 5].

Worked example (one 10 degree ramp, M_d = 2, checked in the tests against the
closed-form intersection of the lip streamline with the ramp shock): at M0 = 1.8
the wave angle grows from 39.31 to 44.06 degrees and MFR_max = 0.9595.
"""

from __future__ import annotations

from dataclasses import dataclass, fields
from functools import lru_cache

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.detached_shock import max_deflection_shock
from engine_air.physics.isentropic import area_ratio, mach_from_flow_ratio, pressure_ratio
from engine_air.physics.shocks import max_deflection_rad, normal_shock, oblique_shock
from engine_air.inlets.base import ShockSystem


@dataclass(frozen=True)
class RampGeometry:
    """Shock-on-lip layout in units of the capture height H (origin at the first ramp's leading edge)."""

    lip: np.ndarray  # (2,) lip point (x, y)
    corners: np.ndarray  # (n, 2): start point of ramp k (row 0 is the leading edge)
    flow_angle_rad: np.ndarray  # (n + 1,): flow direction ahead of ramp 1 (0) and behind each ramp


def _cross(ax, ay, bx, by):
    return ax * by - ay * bx


def ramp_design_problems(ramp_angles_deg, design_mach) -> list[str]:
    """Why the ramps cannot be laid out shock-on-lip at ``design_mach`` (empty when they can).

    Each ramp's shock must stay attached at its local Mach number, theta_k <= theta_max(M_k)
    [NACA Report 1135, eq. 168], and the flow behind the last ramp must stay supersonic.

    Parameters
    ----------
    ramp_angles_deg : sequence of float
        Deflection of each ramp, deg, in flow order.
    design_mach : float
        Shock-on-lip design Mach number M_d (dimensionless).

    Returns
    -------
    list of str
        One plain-words reason per problem found (empty: the layout exists).

    Examples
    --------
    A 20 deg ramp at M = 1.5 is past the maximum deflection (about 12 deg, NACA Report 1135, Chart 2):

    >>> ramp_design_problems([20.0], 1.5)
    ['ramp 1 turns 20 deg but at its local Mach 1.500 a shock stays attached only up to 12.11 deg']
    >>> ramp_design_problems([8.0, 7.0], 2.0)
    []
    """
    problems = []
    m = np.asarray(float(design_mach))
    for k, angle in enumerate(ramp_angles_deg):
        if not m > 1.0:
            problems.append(f"the flow ahead of ramp {k + 1} is subsonic (Mach {float(m):.3f}) at the design Mach number")
            break
        theta_max = float(np.degrees(max_deflection_rad(m)))
        if angle > theta_max:
            problems.append(
                f"ramp {k + 1} turns {angle:g} deg but at its local Mach {float(m):.3f} a shock stays attached "
                f"only up to {theta_max:.2f} deg"
            )
            break
        m = oblique_shock(m, np.radians(angle)).downstream_mach
    else:
        if not float(m) > 1.0:
            problems.append("the flow behind the last ramp is not supersonic at the design Mach number")
    return problems


def ramp_design_geometry(ramp_angles_deg, design_mach) -> RampGeometry:
    """Corner and lip positions for shock-on-lip at ``design_mach``, in units of the capture height H.

    The first ramp's shock (wave angle beta_1 at M_d) meets the lip at height 1:
    x_L = cot(beta_1); each later corner C_k lies on the previous ramp, where the shock
    at absolute angle theta_k + beta_{k+1} passes through the lip (module text).

    Parameters
    ----------
    ramp_angles_deg : sequence of float
        Deflection of each ramp, deg, in flow order.
    design_mach : float
        Shock-on-lip design Mach number M_d (dimensionless).

    Returns
    -------
    RampGeometry
        ``lip`` (x, y), ``corners`` (one row per ramp, the first at the origin) and
        ``flow_angle_rad`` (flow direction ahead of and behind each ramp, rad).

    Raises
    ------
    ValueError
        When a ramp shock is detached at the design Mach number.

    Examples
    --------
    One 10 deg ramp at M_d = 2: beta_1 = 39.31 deg (NACA Report 1135, Chart 2, about 39.3 deg),
    so the lip stands cot(39.31 deg) = 1.22 capture heights behind the leading edge.

    >>> g = ramp_design_geometry([10.0], 2.0)
    >>> print(f"{g.lip[0]:.2f} {g.lip[1]:.2f}")
    1.22 1.00
    """
    return _design_geometry(tuple(float(a) for a in ramp_angles_deg), float(design_mach))


@lru_cache(maxsize=256)
def _design_geometry(ramp_angles_deg: tuple, design_mach: float) -> RampGeometry:
    """``ramp_design_geometry``, once per layout (the trace needs it at every call)."""
    problems = ramp_design_problems(ramp_angles_deg, design_mach)
    if problems:
        raise ValueError("; ".join(problems))
    deltas = np.radians(np.asarray(ramp_angles_deg, dtype=float))
    flow = np.concatenate([[0.0], np.cumsum(deltas)])
    m = float(design_mach)
    corners = [np.zeros(2)]
    lip = None
    for k, delta in enumerate(deltas):
        shock = oblique_shock(m, delta)
        phi = flow[k] + float(shock.wave_angle_rad)
        if k == 0:
            lip = np.array([1.0 / np.tan(phi), 1.0])
        else:
            # corner C_k = C_{k-1} + s e(flow[k]); (lip - C_k) parallel to e(phi).
            c = corners[-1]
            d = lip - c
            s = _cross(d[0], d[1], np.cos(phi), np.sin(phi)) / _cross(np.cos(flow[k]), np.sin(flow[k]), np.cos(phi), np.sin(phi))
            corners.append(c + s * np.array([np.cos(flow[k]), np.sin(flow[k])]))
        m = float(shock.downstream_mach)
    arrays = (lip, np.array(corners), flow)
    for a in arrays:  # shared by every caller (cached): read-only
        a.setflags(write=False)
    return RampGeometry(*arrays)


def cowl_entrance(geometry: RampGeometry) -> tuple[np.ndarray, float]:
    """The cowl entrance of a shock-on-lip layout: the flow section from the lip to the last ramp surface, normal
    to the post-ramp flow (method §11). Returns the foot F of that section on the last ramp (x, y) and its height
    h_e = |e x (L - C_n)| (e the last ramp's direction, C_n its corner, L the lip), in capture heights: for a 2-D
    inlet h_e = A_e/A_c.

    Parameters
    ----------
    geometry : RampGeometry
        A shock-on-lip layout (``ramp_design_geometry``), lengths in capture heights.

    Returns
    -------
    tuple
        (foot of the entrance section on the last ramp, shape (2,); entrance height h_e, capture heights).

    Examples
    --------
    Two 6 deg ramps laid out shock-on-lip at M_d = 2.4 (the continuity value of ``cowl_entrance_area_ratio``,
    0.67215, is the same height):

    >>> foot, h = cowl_entrance(ramp_design_geometry([6.0, 6.0], 2.4))
    >>> print(f"{h:.5f}")
    0.67215
    """
    corner = geometry.corners[-1]
    theta = float(geometry.flow_angle_rad[-1])
    e = np.array([np.cos(theta), np.sin(theta)])
    d = geometry.lip - corner
    return corner + float(d @ e) * e, float(abs(_cross(e[0], e[1], d[0], d[1])))


def cowl_entrance_area_ratio(ramp_angles_deg, design_mach) -> float:
    """Cowl entrance area over capture area A_e/A_c of ramps laid out shock-on-lip at ``design_mach`` (method §11),
    by continuity at the design Mach number: every ramp shock meets the lip, the whole capture stream tube passes
    the entrance in the uniform flow behind the last ramp shock (Mach M_e,d, total pressure pi_ramps p_t0), so

        A_e/A_c = (A/A*)(M_e,d) / ((A/A*)(M_d) pi_ramps(M_d))    [NACA Report 1135, eqs. 80, 132, 138]

    Parameters
    ----------
    ramp_angles_deg : sequence of float
        Deflection of each ramp, deg, in flow order.
    design_mach : float
        Shock-on-lip design Mach number M_d (dimensionless).

    Returns
    -------
    float
        A_e/A_c (dimensionless, 0 < value < 1).

    Raises
    ------
    ValueError
        When a ramp shock is detached at the design Mach number.

    Examples
    --------
    Method §11 check values: two 6 deg ramps at M_d 2.4 and 3.0, three 5 deg ramps at 3.0.

    >>> print(f"{cowl_entrance_area_ratio([6.0, 6.0], 2.4):.5f} {cowl_entrance_area_ratio([6.0, 6.0], 3.0):.5f} "
    ...       f"{cowl_entrance_area_ratio([5.0, 5.0, 5.0], 3.0):.5f}")
    0.67215 0.59437 0.53027
    """
    problems = ramp_design_problems(ramp_angles_deg, design_mach)
    if problems:
        raise ValueError("; ".join(problems))
    m = np.asarray(float(design_mach))
    recovery = 1.0
    for angle in ramp_angles_deg:
        shock = oblique_shock(m, np.radians(float(angle)))
        recovery *= float(shock.total_pressure_ratio)
        m = shock.downstream_mach
    return float(area_ratio(m) / (area_ratio(float(design_mach)) * recovery))


@dataclass(frozen=True)
class RampTrace:
    """The external ramps at each flight Mach number: attached shocks, the detached ramp's bow shock taken at
    maximum deflection, and the dividing stream line to the lip (heights in units of the capture height H)."""

    wave_angle_rad: np.ndarray  # (n, ...) attached shocks only, NaN elsewhere
    downstream_mach: np.ndarray  # (n, ...)
    total_pressure_ratio: np.ndarray  # (n, ...)
    static_pressure_ratio: np.ndarray  # (n, ...)
    entry_mach: np.ndarray  # Mach ahead of the terminal normal shock (behind the last attached ramp)
    entry_total_pressure_ratio: np.ndarray  # p_t there / p_t0 (attached oblique shocks)
    entry_flow_angle_rad: np.ndarray  # flow direction there
    detached: np.ndarray  # bool: supersonic and some ramp shock detached
    captured_height: np.ndarray  # y_0 of the stream line that meets the lip (clipped to [0, 1]); NaN M0 <= 1
    pressure_integral: np.ndarray  # sum over regions of (p_k/p0 - 1) dy_k along that stream line


def ramp_trace(ramp_angles_deg, design_mach, flight_mach) -> RampTrace:
    """Ramp shocks and the dividing stream line traced from the lip back to the free stream (method §6, §10,
    §13) for ramps laid out shock-on-lip at ``design_mach``, at flight Mach ``flight_mach`` (array).

    Attached ramps: weak oblique shocks [NACA Report 1135]. The first ramp whose shock detaches (its local
    Mach number still supersonic) stands behind a bow shock; the stream line to the lip is taken to cross it
    at its maximum-deflection part (``engine_air.physics.detached_shock``): a straight shock from the ramp's
    leading edge at the wave angle of maximum deflection, turning the flow by the maximum deflection. At
    attachment this is the attached shock itself, so the capture is continuous. Later ramps add nothing.

    ``pressure_integral`` = sum_k (p_k/p0 - 1) dy_k, dy_k the rise of the stream line in the region behind
    shock k (2-D: dA_x = span dy), i.e. the pre-entry drag at critical flow over p0 A_c (method §13).
    At and above the design Mach number the stream line meets no shock ahead of the lip: y_0 = 1, integral 0.

    Parameters
    ----------
    ramp_angles_deg : sequence of float
        Deflection of each ramp, deg, in flow order.
    design_mach : float
        Shock-on-lip design Mach number M_d (dimensionless).
    flight_mach : array_like
        Flight Mach number M0 (dimensionless), any shape.

    Returns
    -------
    RampTrace
        Per-ramp shock arrays (first axis: ramp), the state ahead of the terminal shock, the captured height
        y_0 = MFR_max and the pressure integral, arrays of the Mach array's shape.

    Examples
    --------
    The two-ramp layout (8 + 7 deg, M_d = 2): at M0 = 1.2 both ramps are detached and ramp 1's bow shock at
    maximum deflection already spills 7 %; at 1.8 both shocks are attached (tests/test_pre_entry_drag.py
    works this point by hand); at 2.0 the shocks meet the lip.

    >>> import numpy as np
    >>> t = ramp_trace([8.0, 7.0], 2.0, np.array([1.2, 1.8, 2.0]))
    >>> print(np.round(t.captured_height, 4), np.round(t.pressure_integral, 4), t.detached)
    [0.9301 0.937  1.    ] [0.0247 0.0655 0.    ] [ True False False]
    """
    m0 = np.asarray(flight_mach, dtype=float)
    if m0.size and np.all(m0 == m0.flat[0]):
        # one Mach number (a scheduled inlet's column): solved once per geometry and Mach, then broadcast
        one = _ramp_trace_at(tuple(float(a) for a in ramp_angles_deg), float(design_mach), float(m0.flat[0]))
        return RampTrace(**{f.name: _broadcast_trace_field(getattr(one, f.name), m0.shape) for f in fields(RampTrace)})
    angles = tuple(float(a) for a in ramp_angles_deg)
    if m0.size > _ROW_MAX:
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            return _ramp_trace(angles, design_mach, m0)
    # a map's row of Mach numbers: traced once for the shock system, its pre-entry drag and every case
    key = (angles, float(design_mach), m0.shape, m0.tobytes())
    if key not in _ROWS:
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            trace = _ramp_trace(angles, design_mach, m0)
        for f in fields(RampTrace):
            getattr(trace, f.name).setflags(write=False)
        while len(_ROWS) >= _ROWS_KEPT:
            _ROWS.pop(next(iter(_ROWS)))
        _ROWS[key] = trace
    return _ROWS[key]


_ROW_MAX, _ROWS_KEPT = 4096, 16
_ROWS: dict = {}
"""Traces of rows of at most ``_ROW_MAX`` Mach numbers, the ``_ROWS_KEPT`` newest (read-only arrays)."""


def clear_cache() -> None:
    """Forget every cached layout and trace (for timing from cold); the next call solves them again, to the same
    bits.

    Examples
    --------
    >>> clear_cache()
    >>> print(np.round(ramp_trace([10.0], 2.0, np.array([1.8])).captured_height, 4))
    [0.9595]
    """
    _ROWS.clear()
    _design_geometry.cache_clear()
    _ramp_trace_at.cache_clear()


@lru_cache(maxsize=4096)
def _ramp_trace_at(ramp_angles_deg: tuple, design_mach: float, mach: float) -> RampTrace:
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return _ramp_trace(ramp_angles_deg, design_mach, np.array([mach]))


def _broadcast_trace_field(value: np.ndarray, shape: tuple) -> np.ndarray:
    """A field of a one-Mach trace (shape (1,) or (n, 1)) spread over ``shape`` (or (n, *shape))."""
    value = np.asarray(value)
    lead = value.shape[:-1]
    return np.broadcast_to(value.reshape(lead + (1,) * len(shape)), lead + shape).copy()


def _ramp_trace(ramp_angles_deg, design_mach, flight_mach) -> RampTrace:
    m0 = np.asarray(flight_mach, dtype=float)
    supersonic = m0 > 1.0
    geometry = ramp_design_geometry(ramp_angles_deg, design_mach)
    deltas = np.radians(np.asarray(ramp_angles_deg, dtype=float))
    n = len(deltas)
    m_local = m0.copy()
    recovery = np.ones_like(m0)
    still_attached = supersonic.copy()
    betas, machs, pts, ps = [], [], [], []
    v_beta, v_delta, v_ps = [], [], []
    flow_angle = np.zeros_like(m0)
    for k in range(n):
        shock = oblique_shock(np.where(still_attached, m_local, 2.0), deltas[k])
        ok = still_attached & shock.attached
        first_detached = still_attached & ~shock.attached & (m_local > 1.0)
        bow = max_deflection_shock(np.where(first_detached, m_local, 2.0))
        v_beta.append(np.where(first_detached, bow.wave_angle_rad, np.nan))
        v_delta.append(np.where(first_detached, bow.deflection_rad, 0.0))
        v_ps.append(np.where(first_detached, bow.static_pressure_ratio, 1.0))
        betas.append(np.where(ok, shock.wave_angle_rad, np.nan))
        machs.append(np.where(ok, shock.downstream_mach, np.nan))
        pts.append(np.where(ok, shock.total_pressure_ratio, np.nan))
        ps.append(np.where(ok, shock.static_pressure_ratio, np.nan))
        recovery = np.where(ok, recovery * shock.total_pressure_ratio, recovery)
        m_local = np.where(ok, shock.downstream_mach, m_local)
        flow_angle = np.where(ok, geometry.flow_angle_rad[k + 1], flow_angle)
        still_attached = ok
    detached = supersonic & ~still_attached

    # static pressure over p0 ahead of each shock (attached shocks before it)
    p_ahead = [np.ones_like(m0)]
    for k in range(n - 1):
        p_ahead.append(p_ahead[-1] * np.where(np.isfinite(ps[k]), ps[k], 1.0))

    # Dividing streamline traced back from the lip through each attached shock (or the detached ramp's bow).
    px = np.full(m0.shape, geometry.lip[0])
    py = np.full(m0.shape, geometry.lip[1])
    integral = np.zeros_like(m0)
    for k in range(n - 1, -1, -1):
        attached_k = np.isfinite(betas[k])
        bow_k = np.isfinite(v_beta[k])
        phi = geometry.flow_angle_rad[k] + np.where(attached_k, betas[k], np.where(bow_k, v_beta[k], 0.0))
        cx, cy = geometry.corners[k]
        ex, ey = np.cos(phi), np.sin(phi)
        side = _cross(ex, ey, px - cx, py - cy)  # < 0: the point lies behind (downstream of) shock k
        theta = np.where(attached_k, geometry.flow_angle_rad[k + 1], geometry.flow_angle_rad[k] + v_delta[k])
        tx, ty = np.cos(theta), np.sin(theta)
        behind = (attached_k | bow_k) & (side < 0.0)
        t = np.where(behind, side / _cross(ex, ey, tx, ty), 0.0)
        p_region = p_ahead[k] * np.where(attached_k, ps[k], v_ps[k])
        integral = integral + np.where(behind, (p_region - 1.0) * t * ty, 0.0)
        px = px - t * tx
        py = py - t * ty
    design = float(design_mach)
    below = supersonic & (m0 < design)
    captured = np.where(supersonic, np.where(below, np.clip(py, 0.0, 1.0), 1.0), np.nan)
    integral = np.where(below, np.maximum(integral, 0.0), 0.0)
    return RampTrace(np.array(betas), np.array(machs), np.array(pts), np.array(ps), m_local, recovery,
                     flow_angle, detached, captured, integral)


def ramp_shock_system(ramp_angles_deg, design_mach, flight_mach) -> ShockSystem:
    """Ramp shocks, terminal normal shock and maximum capture at flight Mach ``flight_mach`` (array)
    for ramps laid out shock-on-lip at ``design_mach``.

    pi_ext = prod_k (p_t2/p_t1)_oblique,k x (p_t2/p_t1)_normal(M_last) [NACA Report 1135,
    eqs. 99, 132, 138]; a detached ramp ends the oblique sequence (one normal shock at its
    local Mach). MFR_max = y_0 / H from the dividing streamline traced back from the lip
    (``ramp_trace``; a detached ramp's bow shock taken at maximum deflection, method §10),
    1 at and above M_d (module text).

    Parameters
    ----------
    ramp_angles_deg : sequence of float
        Deflection of each ramp, deg, in flow order.
    design_mach : float
        Shock-on-lip design Mach number M_d (dimensionless).
    flight_mach : array_like
        Flight Mach number M0 (dimensionless), any shape.

    Returns
    -------
    ShockSystem
        External recovery pi_ext, terminal-shock Mach numbers, MFR_max (NaN in subsonic
        flight), detached / inside-cowl masks and the per-ramp wave angles (rad), Mach
        numbers and pressure ratios (first axis: ramp).

    Examples
    --------
    One 10 deg ramp, M_d = 2, at M0 = 2: the oblique shock (p_t2/p_t1 = 0.9846, M2 = 1.6405)
    and a normal shock at 1.6405 (0.8797, NACA Report 1135, Table II, interpolated) give 0.8662; at M0 = 1.8
    the steeper shock spills: MFR_max = 0.9595 (closed-form lip streamline, checked in the tests).

    >>> import numpy as np
    >>> s = ramp_shock_system([10.0], 2.0, np.array([2.0, 1.8]))
    >>> print(f"{s.external_recovery[0]:.4f} {s.max_mass_flow_ratio[0]:.4f} {s.max_mass_flow_ratio[1]:.4f}")
    0.8662 1.0000 0.9595
    """
    m0 = np.asarray(flight_mach, dtype=float)
    supersonic = m0 > 1.0
    tr = ramp_trace(ramp_angles_deg, design_mach, m0)
    terminal = normal_shock(tr.entry_mach)
    design = float(design_mach)
    return ShockSystem(
        external_recovery=tr.entry_total_pressure_ratio * terminal.total_pressure_ratio,
        terminal_upstream_mach=tr.entry_mach,
        terminal_downstream_mach=terminal.downstream_mach,
        max_mass_flow_ratio=tr.captured_height,
        detached=tr.detached,
        inside_cowl=supersonic & (m0 > design * (1.0 + 1e-9)),
        ramp_wave_angle_rad=tr.wave_angle_rad,
        ramp_downstream_mach=tr.downstream_mach,
        ramp_total_pressure_ratio=tr.total_pressure_ratio,
        ramp_static_pressure_ratio=tr.static_pressure_ratio,
        oblique_ahead_of_cowl=supersonic & np.isfinite(tr.wave_angle_rad[0]),
    )


def terminal_spill_drag(flight_mach, entry_mach, entry_total_pressure_ratio, entry_flow_angle_rad,
                        mass_flow_ratio, max_mass_flow_ratio):
    """Pre-entry drag over p0 A_c of the flow spilled behind the terminal normal shock (method §7, §13).

    The terminal shock stands ahead of the lip in the uniform flow behind the external compression
    (Mach M_n, total pressure pi_n p_t0; M_n = M0, pi_n = 1 for a pitot). The momentum balance of §7 is
    applied from that state to the entry, along the flow direction and projected on the axis (cos theta_n):

        A_e/A_c = MFR_max (A/A*)(M_n) / ((A/A*)(M0) pi_n)       entry (flow-normal) at critical flow
        A_n/A_e = MFR/MFR_max                                    captured tube ahead of the terminal shock
        A*/A_e behind it = (MFR/MFR_max) / ((A/A*)(M_n) pi_ns(M_n)), M1 its subsonic root
        D/(p0 A_c) = cos theta_n [p1/p0 (1 + g M1^2) A_e - p_n/p0 (1 + g M_n^2) A_n - (A_e - A_n)] / A_c

    (the last term is int (p_n - p0) dA plus the §7 term -p_n (A_e - A_n)). Zero at MFR >= MFR_max (to 1e-12).
    Sources: NACA Report 1135 (normal shock, isentropic relations); Seddon & Goldsmith, Intake Aerodynamics,
    2nd ed., ch. 3 (additive drag).

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach number M0 (dimensionless).
    entry_mach : array_like
        Mach number M_n ahead of the terminal shock (behind the external compression).
    entry_total_pressure_ratio : array_like
        Total pressure there over p_t0 (the external oblique or conical shocks), pi_n.
    entry_flow_angle_rad : array_like
        Flow direction there, rad (the last ramp's or cone's turning).
    mass_flow_ratio, max_mass_flow_ratio : array_like
        Captured MFR and MFR_max (dimensionless).

    Returns
    -------
    numpy.ndarray
        D_add / (p0 A_c), dimensionless, >= 0.

    Examples
    --------
    A pitot at M0 = 2 (M_n = M0, pi_n = 1, MFR_max = 1) spilling to MFR = 0.7: the §7 balance with the
    normal-shock total pressure (0.72087, NACA Report 1135), C_add = 1.1718 / (0.7 x 2^2) = 0.419.

    >>> print(f"{float(terminal_spill_drag(2.0, 2.0, 1.0, 0.0, 0.7, 1.0)):.4f}")
    1.1718
    """
    m0 = np.asarray(flight_mach, dtype=float)
    mn = np.asarray(entry_mach, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        ratio = np.clip(np.asarray(mass_flow_ratio, dtype=float) / max_mass_flow_ratio, 0.0, 1.0)
        ns = normal_shock(mn)
        a_e = max_mass_flow_ratio * area_ratio(mn) / (area_ratio(m0) * entry_total_pressure_ratio)
        a_n = a_e * ratio
        m1 = mach_from_flow_ratio(np.clip(ratio / (area_ratio(mn) * ns.total_pressure_ratio), 0.0, 1.0))
        pn = entry_total_pressure_ratio * pressure_ratio(mn) / pressure_ratio(m0)
        p1 = entry_total_pressure_ratio * ns.total_pressure_ratio * pressure_ratio(m1) / pressure_ratio(m0)
        d = np.cos(entry_flow_angle_rad) * (
            p1 * (1.0 + GAMMA * m1 * m1) * a_e - pn * (1.0 + GAMMA * mn * mn) * a_n - (a_e - a_n))
        return np.where(ratio < 1.0 - 1e-12, np.maximum(d, 0.0), 0.0)  # critical or beyond: no spillage


def ramp_pre_entry_drag(ramp_angles_deg, design_mach, shocks: ShockSystem, state) -> np.ndarray:
    """Supersonic pre-entry (additive) drag, N, of external ramps laid out shock-on-lip at ``design_mach``
    (method §13): D_add = int (p - p0) dA_x along the dividing stream surface from far upstream to the lip =
    p0 A_c [sum_k (p_k/p0 - 1) dy_k  (the ramp regions, ``ramp_trace``)  +  terminal_spill_drag(...)]
    with MFR_max from ``shocks`` and MFR from ``state`` (an ``engine_air.inlets.base.CaptureState``).

    Zero at MFR = 1 (then MFR_max = 1: no stream-line rise, no spillage). For a mixed-compression inlet pass
    its external ramps: the entry state is that behind the last attached external ramp.

    Parameters
    ----------
    ramp_angles_deg : sequence of float
        Deflection of each ramp, deg, in flow order.
    design_mach : float
        Shock-on-lip design Mach number M_d (dimensionless).
    shocks : ShockSystem
        The inlet's shock system at ``state.flight_mach`` (its ``max_mass_flow_ratio`` is used).
    state : CaptureState
        Free stream and captured stream tube: M0, p0 (Pa), MFR, A_c (m^2).

    Returns
    -------
    numpy.ndarray
        Pre-entry drag D_add, N, >= 0.

    Examples
    --------
    The two-ramp layout at M0 = 1.8, p0 = 22 632 Pa, A_c = 1 m^2, running critical (MFR = MFR_max): the
    pressure on the stream line behind the ramp shocks alone, 0.0655 p0 A_c.

    >>> import numpy as np
    >>> from engine_air.inlets.base import CaptureState
    >>> m0 = np.array([1.8])
    >>> shocks = ramp_shock_system([8.0, 7.0], 2.0, m0)
    >>> st = CaptureState(m0, np.array([22632.0]), 0.7 * 22632.0 * m0 ** 2, shocks.max_mass_flow_ratio, 1.0,
    ...                   np.zeros(1))
    >>> print(f"{float(ramp_pre_entry_drag([8.0, 7.0], 2.0, shocks, st)[0]):.0f}")
    1482
    """
    tr = ramp_trace(ramp_angles_deg, design_mach, state.flight_mach)
    spill = terminal_spill_drag(state.flight_mach, tr.entry_mach, tr.entry_total_pressure_ratio,
                                tr.entry_flow_angle_rad, state.mass_flow_ratio, shocks.max_mass_flow_ratio)
    return (tr.pressure_integral + spill) * state.static_pressure_pa * state.capture_area_m2
