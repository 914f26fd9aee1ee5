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

from dataclasses import dataclass

import numpy as np

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
    return RampGeometry(lip, np.array(corners), flow)


def ramp_shock_system(ramp_angles_deg, design_mach, flight_mach) -> ShockSystem:
    """Ramp shocks, terminal normal shock and maximum capture at flight Mach ``flight_mach`` (array)
    for ramps laid out shock-on-lip at ``design_mach``.

    pi_ext = prod_k (p_t2/p_t1)_oblique,k x (p_t2/p_t1)_normal(M_last) [NACA Report 1135,
    eqs. 99, 132, 138]; a detached ramp ends the oblique sequence (one normal shock at its
    local Mach). MFR_max = y_0 / H from the dividing streamline traced back from the lip,
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
    geometry = ramp_design_geometry(ramp_angles_deg, design_mach)
    deltas = np.radians(np.asarray(ramp_angles_deg, dtype=float))
    n = len(deltas)
    m_local = m0.copy()
    recovery = np.ones_like(m0)
    still_attached = supersonic.copy()
    betas, machs, pts, ps = [], [], [], []
    for k in range(n):
        shock = oblique_shock(np.where(still_attached, m_local, 2.0), deltas[k])
        ok = still_attached & shock.attached
        betas.append(np.where(ok, shock.wave_angle_rad, np.nan))
        machs.append(np.where(ok, shock.downstream_mach, np.nan))
        pts.append(np.where(ok, shock.total_pressure_ratio, np.nan))
        ps.append(np.where(ok, shock.static_pressure_ratio, np.nan))
        recovery = np.where(ok, recovery * shock.total_pressure_ratio, recovery)
        m_local = np.where(ok, shock.downstream_mach, m_local)
        still_attached = ok
    detached = supersonic & ~still_attached
    terminal = normal_shock(m_local)
    recovery = recovery * terminal.total_pressure_ratio

    # Dividing streamline traced back from the lip through each attached shock.
    px = np.full(m0.shape, geometry.lip[0])
    py = np.full(m0.shape, geometry.lip[1])
    for k in range(n - 1, -1, -1):
        beta = betas[k]
        attached_k = np.isfinite(beta)
        phi = geometry.flow_angle_rad[k] + np.where(attached_k, beta, 0.0)
        cx, cy = geometry.corners[k]
        ex, ey = np.cos(phi), np.sin(phi)
        side = _cross(ex, ey, px - cx, py - cy)  # < 0: the point lies behind (downstream of) shock k
        theta = geometry.flow_angle_rad[k + 1]
        tx, ty = np.cos(theta), np.sin(theta)
        behind = attached_k & (side < 0.0)
        t = np.where(behind, side / _cross(ex, ey, tx, ty), 0.0)
        px = px - t * tx
        py = py - t * ty
    design = float(design_mach)
    mfr_max = np.where(supersonic, np.where(m0 >= design, 1.0, np.clip(py, 0.0, 1.0)), np.nan)
    return ShockSystem(
        external_recovery=recovery,
        terminal_upstream_mach=m_local,
        terminal_downstream_mach=terminal.downstream_mach,
        max_mass_flow_ratio=mfr_max,
        detached=detached,
        inside_cowl=supersonic & (m0 > design * (1.0 + 1e-9)),
        ramp_wave_angle_rad=np.array(betas),
        ramp_downstream_mach=np.array(machs),
        ramp_total_pressure_ratio=np.array(pts),
        ramp_static_pressure_ratio=np.array(ps),
        oblique_ahead_of_cowl=supersonic & np.isfinite(betas[0]),
    )
