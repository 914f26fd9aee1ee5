"""The installed-thrust ledger (method section 13): ram drag, drags of spillage, bleed and bypass, installed thrust.

    D_ram  = W V0                                   (inside F_n: F_n = F_g - W V0; shown, not subtracted again)
    F_inst = F_n (1 - X (1 - pi/pi_ref)) - D_spill - D_bleed - D_bypass
    installation loss = 1 - F_inst / F_n

F_n is the engine maker's net thrust of the rating at (M0, H), given at the reference recovery pi_ref
(``thrust_reference_recovery``: "mil-e-5008b" or a number), interpolated bilinearly in the table
``net_thrust_n`` over ``thrust_mach`` x ``thrust_altitude_m``, end values held outside it. The table is used
as given on every day: no correction for the case's ISA offset is made. X (``recovery_thrust_exchange``) is
dF/F per dpi/pi from the engine maker. Without a table (or exchange rate) F_n, F_inst and the loss are NaN and
the points carry ``no-thrust-data``.

Example: F_n = 50 kN, X = 1.3, pi = 0.90 against pi_ref = 0.925, drags of 1 000 + 300 + 200 N:
F_inst = 50 000 (1 - 1.3 (1 - 0.90/0.925)) - 1 500 = 46 743.2 N, loss 0.065135.

>>> import numpy as np
>>> f = installed_thrust(np.array(50000.0), 1.3, np.array(0.90), np.array(0.925), 1000.0, 300.0, 200.0)
>>> round(float(f), 1)
46743.2

Source: Seddon & Goldsmith, Intake Aerodynamics (1999), the thrust/drag bookkeeping of an intake;
Mattingly, Heiser & Pratt, Aircraft Engine Design (2002), installation losses.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from engine_air.flow import airflow
from engine_air.flow.flags import NO_THRUST_DATA

from engine_air.physics.reference_recovery import mil_e_5008b_recovery
from engine_air.project.model import REFERENCE_RECOVERY_NAME, Rating


def has_thrust_data(rating: Rating) -> bool:
    """True when the rating gives a thrust table and a recovery exchange rate."""
    return (rating.net_thrust_n is not None and rating.thrust_mach is not None
            and rating.thrust_altitude_m is not None and rating.recovery_thrust_exchange is not None)


def _bracket(axis: np.ndarray, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Lower index and weight of ``x`` on an increasing ``axis``, ends held (weight in [0, 1])."""
    if axis.size == 1:
        return np.zeros(x.shape, int), np.zeros(x.shape)
    xc = np.clip(x, axis[0], axis[-1])
    i = np.clip(np.searchsorted(axis, xc, side="right") - 1, 0, axis.size - 2)
    w = (xc - axis[i]) / (axis[i + 1] - axis[i])
    return i, w


def bilinear_held(x_axis, y_axis, table, x, y) -> np.ndarray:
    """Bilinear interpolation in ``table[j][i]`` (row j at ``y_axis[j]``, column i at ``x_axis[i]``), end values
    held outside the axes. ``x``, ``y`` broadcast.

    >>> float(bilinear_held([0.0, 1.0], [0.0, 10.0], [[0.0, 1.0], [10.0, 11.0]], 0.5, 5.0))
    5.5
    >>> float(bilinear_held([0.0, 1.0], [0.0, 10.0], [[0.0, 1.0], [10.0, 11.0]], 2.0, -3.0))
    1.0
    """
    xa = np.asarray(x_axis, dtype=float)
    ya = np.asarray(y_axis, dtype=float)
    t = np.asarray(table, dtype=float).reshape(ya.size, xa.size)
    x, y = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(y, dtype=float))
    i, wx = _bracket(xa, x)
    j, wy = _bracket(ya, y)
    i1 = np.minimum(i + 1, xa.size - 1)
    j1 = np.minimum(j + 1, ya.size - 1)
    lower = t[j, i] * (1.0 - wx) + t[j, i1] * wx
    upper = t[j1, i] * (1.0 - wx) + t[j1, i1] * wx
    return lower * (1.0 - wy) + upper * wy


def net_thrust(rating: Rating, flight_mach, altitude_m) -> np.ndarray:
    """Uninstalled net thrust F_n (N) of ``rating`` at (M0, H) from its table; NaN without thrust data.

    >>> from engine_air.project.model import Rating
    >>> r = Rating("r", (1.0,), (50.0,), thrust_mach=(0.0, 1.0), thrust_altitude_m=(0.0,),
    ...            net_thrust_n=((10000.0, 12000.0),), thrust_reference_recovery=1.0, recovery_thrust_exchange=1.0)
    >>> float(net_thrust(r, 0.25, 5000.0))
    10500.0
    """
    m0, h = np.broadcast_arrays(np.asarray(flight_mach, dtype=float), np.asarray(altitude_m, dtype=float))
    if not has_thrust_data(rating):
        return np.full(m0.shape, np.nan)
    with np.errstate(invalid="ignore"):
        return bilinear_held(rating.thrust_mach, rating.thrust_altitude_m, rating.net_thrust_n, m0, h)


def reference_recovery_of(rating: Rating, flight_mach) -> np.ndarray:
    """pi_ref of the thrust table: MIL-E-5008B at M0 for "mil-e-5008b", else the given number.

    >>> from engine_air.project.model import Rating
    >>> float(reference_recovery_of(Rating("r", (1.0,), (50.0,), thrust_reference_recovery="mil-e-5008b"), 2.0))
    0.925
    """
    m0 = np.asarray(flight_mach, dtype=float)
    ref = rating.thrust_reference_recovery
    if ref is None or ref == REFERENCE_RECOVERY_NAME:
        return mil_e_5008b_recovery(m0)
    return np.full(m0.shape, float(ref))


def installed_thrust(f_n, exchange, recovery, reference, d_spill, d_bleed, d_bypass):
    """F_inst = F_n (1 - X (1 - pi/pi_ref)) - D_spill - D_bleed - D_bypass (N)."""
    return f_n * (1.0 - exchange * (1.0 - recovery / reference)) - d_spill - d_bleed - d_bypass


@dataclass(frozen=True)
class Ledger:
    """The ledger's items at each point (N), the chain's stage after the drag (``ledger``)."""

    ram_drag_n: np.ndarray
    net_thrust_n: np.ndarray
    installed_thrust_n: np.ndarray
    installation_loss_fraction: np.ndarray
    thrust_reference_recovery: np.ndarray
    no_thrust_data: bool
    bleed_drag_n: np.ndarray | float = 0.0
    bypass_drag_n: np.ndarray | float = 0.0
    flags: np.ndarray | int = 0


def installation_ledger(rating: Rating, flight_mach, altitude_m, recovery, engine_flow_kg_s, velocity_m_s,
                        spillage_drag_n, bleed_drag_n, bypass_drag_n) -> Ledger:
    """The ledger at each point (arrays broadcast); see the module text for the relations."""
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        ram = engine_flow_kg_s * velocity_m_s
        f_n = net_thrust(rating, flight_mach, altitude_m)
        ref = reference_recovery_of(rating, flight_mach)
        if has_thrust_data(rating):
            f_inst = installed_thrust(f_n, rating.recovery_thrust_exchange, recovery, ref,
                                      spillage_drag_n, bleed_drag_n, bypass_drag_n)
            loss = 1.0 - f_inst / f_n
        else:
            f_inst = np.full(np.shape(f_n), np.nan)
            loss = f_inst
    return Ledger(ram, f_n, f_inst, loss, ref, not has_thrust_data(rating))


def ledger(rating: Rating, inlet, fs, thr, drag) -> Ledger:
    """The chain's ledger stage: bleed and bypass drag W_x V0 (1 - V_exit/V0) (``engine_air.flow.airflow``) and
    ``installation_ledger`` on the throat's flows (``thr``, an ``engine_air.flow.throat.Throat``), the free
    stream ``fs`` and the spillage drag of ``drag``; ``no-thrust-data`` without a thrust table."""
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        d_bleed = airflow.bleed_drag(thr.bleed_flow_kg_s, fs.velocity_m_s, inlet.bleed_exit_velocity_ratio)
        d_bypass = airflow.bypass_drag(thr.bypass_flow_kg_s, fs.velocity_m_s, inlet.bypass_exit_velocity_ratio)
    out = installation_ledger(rating, fs.mach, fs.altitude_m, thr.recovery, thr.engine_flow_kg_s, fs.velocity_m_s,
                              drag.spillage_drag_n, d_bleed, d_bypass)
    return replace(out, bleed_drag_n=d_bleed, bypass_drag_n=d_bypass, flags=NO_THRUST_DATA if out.no_thrust_data else 0)
