"""Airflow management (method section 12): bleed, bypass doors and auxiliary take-off doors.

Flows at one set of points (numpy arrays that broadcast), all in kg/s:

- captured flow ``W_cap``: the air that enters the capture plane (what the mass-flow ratio counts);
- bleed ``W_b = b W_cap``: leaves behind the terminal shock, ahead of the throat, and changes no recovery.
  Without bypass the captured flow is ``W_cap = W_e / (1 - b)`` (``W_e`` the engine flow);
- bypass ``W_bp``: leaves through doors in the subsonic duct (behind the throat, ahead of the face) in
  supersonic flight only. The doors hold the inlet critical (MFR = MFR_max) when the engine and bleed take
  less: needed ``W_bp = (1 - b) W_cap,crit - W_e`` with ``W_cap,crit = MFR_max rho0 V0 A_c``, up to the doors'
  capacity; beyond it the rest spills ahead of the cowl (flag ``bypass-insufficient``);
- the throat passes ``W_cap - W_b = W_e + W_bp``;
- auxiliary (take-off) doors, open below their Mach number, sit in parallel with the throat and share its flow
  in proportion to area at the throat's Mach number; their extra loss is on their own share.

Door capacity (choked-orifice relation, NACA Report 1135 [1], isentropic flow function)::

    W_door = C_d A p_t MFP(M_e) / sqrt(T_t),
    M_e = 1 where p0/p_t <= (2/(g+1))^(g/(g-1)) = 0.52828 (choked),
    M_e = sqrt(2/(g-1) ((p_t/p0)^((g-1)/g) - 1)) otherwise (0 where p_t <= p0),

with the duct total pressure p_t = pi_ext p_t0 (behind the terminal shock) and T_t = T_t0.

[1] NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953), eqs. 43-45 (isentropic
    pressure ratio), the mass-flow function at M = 1.
"""

from __future__ import annotations

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.isentropic import dynamic_to_total_pressure, mass_flow_parameter

CRITICAL_PRESSURE_RATIO = (2.0 / (GAMMA + 1.0)) ** (GAMMA / (GAMMA - 1.0))
"""p*/p_t = 0.528282 for air: below it (p0/p_t) a door or orifice is choked (NACA Report 1135)."""


def exit_mach(static_to_total):
    """Exit Mach number of a door discharging from total pressure p_t to static p0, ``static_to_total = p0/p_t``.

    M_e = sqrt(2/(g-1) ((p_t/p0)^((g-1)/g) - 1)), 1 where p0/p_t <= 0.52828 (choked), 0 where p0 >= p_t.

    >>> float(exit_mach(0.3))
    1.0
    >>> round(float(exit_mach(0.7)), 4)   # NACA 1135 isentropic table: p/p_t = 0.7 at M = 0.7324
    0.7324
    """
    r = np.asarray(static_to_total, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        m = np.sqrt(np.maximum(2.0 / (GAMMA - 1.0) * (np.power(1.0 / r, (GAMMA - 1.0) / GAMMA) - 1.0), 0.0))
    return np.where(r <= CRITICAL_PRESSURE_RATIO, 1.0, np.where(r >= 1.0, 0.0, m))


def door_flow(area_m2, discharge_coefficient, total_pressure_pa, total_temperature_k, static_pressure_pa):
    """Mass flow (kg/s) a door of ``area_m2`` (m^2) passes from ``total_pressure_pa``/``total_temperature_k``
    (Pa, K) to ``static_pressure_pa`` (Pa): W = C_d A p_t MFP(M_e)/sqrt(T_t), choked above the critical ratio.

    Example: C_d = 1, A = 1 m^2, p_t = 101325 Pa, T_t = 288.15 K into p0 = 20 kPa (choked) passes
    MFP* p_ref/sqrt(T_ref) = 241.24 kg/s (method section 3).

    >>> round(float(door_flow(1.0, 1.0, 101325.0, 288.15, 20000.0)), 2)
    241.24
    """
    pt = np.asarray(total_pressure_pa, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        m_e = exit_mach(np.asarray(static_pressure_pa, dtype=float) / pt)
        return discharge_coefficient * area_m2 * pt * mass_flow_parameter(m_e) / np.sqrt(total_temperature_k)


def bypass_flow(needed_kg_s, capacity_kg_s):
    """(door flow, insufficient): the doors pass what is needed up to their capacity (kg/s).

    >>> flow, short = bypass_flow([5.0, 12.0], 10.0)
    >>> flow.tolist(), short.tolist()
    ([5.0, 10.0], [False, True])
    """
    need = np.maximum(np.asarray(needed_kg_s, dtype=float), 0.0)
    cap = np.maximum(np.asarray(capacity_kg_s, dtype=float), 0.0)
    with np.errstate(invalid="ignore"):
        insufficient = need > cap * (1.0 + 1e-12)
    return np.minimum(need, cap), insufficient


def auxiliary_share(throat_area_m2, auxiliary_area_m2, flight_mach, door_mach_max):
    """(effective area, door share of the throat flow, open) for auxiliary doors open where M0 < ``door_mach_max``.

    Doors and throat at one Mach number pass flow in proportion to area: share = A_aux/(A_th + A_aux).

    >>> area, share, open_ = auxiliary_share(0.2, 0.1, [0.2, 0.5], 0.35)
    >>> area.tolist(), [round(float(x), 6) for x in share], open_.tolist()
    ([0.30000000000000004, 0.2], [0.333333, 0.0], [True, False])
    """
    m0 = np.asarray(flight_mach, dtype=float)
    if door_mach_max is None or auxiliary_area_m2 <= 0.0:
        open_ = np.zeros(m0.shape, bool)
    else:
        open_ = m0 < door_mach_max
    a_aux = np.where(open_, auxiliary_area_m2, 0.0)
    a_eff = throat_area_m2 + a_aux
    return a_eff, a_aux / a_eff, open_


def auxiliary_recovery(share, loss_coefficient, throat_mach):
    """Mass-averaged recovery factor of the throat plane with doors: 1 - share K_aux q/p_t at the throat Mach.

    The doors' air loses K_aux times its dynamic pressure (q/p_t = (g/2) M^2 (1 + (g-1)/2 M^2)^(-g/(g-1)));
    the throat's air loses nothing more; mixed by mass (the shares are mass shares at one Mach number).

    Example: a third of the flow through doors of K_aux = 0.6 at M = 0.5 (q/p_t = 0.7 x 0.25 x 0.84302 = 0.14753,
    NACA 1135 isentropic table p/p_t = 0.84302 at M = 0.5):

    >>> round(float(auxiliary_recovery(1.0 / 3.0, 0.6, 0.5)), 5)
    0.97049
    """
    return 1.0 - share * loss_coefficient * dynamic_to_total_pressure(throat_mach)


def bleed_drag(bleed_flow_kg_s, velocity_m_s, exit_velocity_ratio):
    """Bleed drag (N) from the momentum relation: D_b = W_b (V0 - r_b V0) = W_b V0 (1 - r_b).

    ``bleed_flow_kg_s`` in kg/s, ``velocity_m_s`` V0 in m/s, ``exit_velocity_ratio`` r_b. Source: momentum
    theorem on the bled stream tube (Seddon & Goldsmith, bleed drag).

    >>> float(bleed_drag(2.0, 500.0, 0.25))
    750.0
    """
    return bleed_flow_kg_s * velocity_m_s * (1.0 - exit_velocity_ratio)


def bypass_drag(bypass_flow_kg_s, velocity_m_s, exit_velocity_ratio):
    """Bypass drag (N): D_bp = W_bp V0 (1 - r_bp), as the bleed drag (kg/s, m/s).

    >>> float(bypass_drag(4.0, 600.0, 0.0))
    2400.0
    """
    return bypass_flow_kg_s * velocity_m_s * (1.0 - exit_velocity_ratio)
