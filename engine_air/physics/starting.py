"""Starting of a supersonic internal contraction: self-start limit, isentropic limit, started throat Mach.

A duct that contracts a supersonic stream (a mixed-compression inlet, a supersonic diffuser) has two
area ratios that bound its internal contraction ratio CR = A_th/A_e (throat over entrance, the entrance being
the flow section where the internal contraction begins: for a mixed-compression inlet the cowl entrance A_e,
not the capture area A_c, method §11):

- Isentropic contraction limit, A_th/A_e >= (A*/A)(M): the smallest throat through which a stream of Mach M
  at the entrance can pass without a shock (the throat is then sonic) [1, eq. 80].
- Self-start (Kantrowitz-Donaldson) limit, A_th/A_e >= K(M) = (A*/A)(M)/pi_ns(M): with a normal shock standing
  at the entrance (the unstarted state, or the state while the stream is being established) the flow behind it
  has total pressure pi_ns(M) p_t, so its sonic area is A*/pi_ns; the throat passes all of it, and the shock
  is swallowed, only when A_th is at least that [2]. At M = 2 the limit is 0.8220 (A*/A = 0.59259,
  pi_ns = 0.72087 from NACA Report 1135 [1]).

Once started, the throat Mach follows from continuity of the flow the inlet captured
(``started_throat_mach_by_continuity``).

Between the two limits the contraction can run started (once started) but cannot start itself: the
hysteresis of every fixed-geometry mixed-compression inlet.

Arrays of any shape broadcast; gamma = 1.4 unless told otherwise.

[1] NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953).
[2] Kantrowitz, A., and Donaldson, C. duP., "Preliminary investigation of supersonic diffusers",
    NACA ACR L5D20 (1945) (report number from memory).
"""

from __future__ import annotations

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.isentropic import area_ratio, mach_from_flow_ratio
from engine_air.physics.shocks import normal_shock


def isentropic_contraction_limit(mach, gamma=GAMMA):
    """Isentropic contraction limit: the smallest throat-to-entrance area ratio A_th/A_e that passes a stream of
    entrance Mach M without a shock (the throat is then sonic) [1, eq. 80].

    (A_th/A_e)_min = A*/A(M) = M [ (2/(g+1)) (1 + (g-1)/2 M^2) ]^(-(g+1)/(2(g-1)))

    Parameters
    ----------
    mach : array_like
        Entrance Mach number M (dimensionless).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        A*/A (dimensionless, 0 < value <= 1), the shape of ``mach``; 1 where M <= 1 (a subsonic entrance has no
        supersonic contraction).

    Examples
    --------
    NACA Report 1135, Table I: A/A* = 1.6875 at M = 2, so A*/A = 0.5926.

    >>> print(f"{float(isentropic_contraction_limit(2.0)):.4f}")
    0.5926
    """
    m = np.asarray(mach, dtype=float)
    sup = m > 1.0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        value = 1.0 / area_ratio(np.where(sup, m, 2.0), gamma)
    return np.where(sup, value, 1.0)


def self_start_contraction(mach, gamma=GAMMA):
    """Kantrowitz-Donaldson self-start limit K(M) on the internal contraction ratio CR = A_th/A_e [2]: with a
    normal shock at the entrance (Mach M ahead of it), the throat must pass, sonic, the whole stream behind it.

    K(M) = (A_th/A_e)_start = (A*/A)(M) / pi_ns(M)

    with A*/A the isentropic area ratio [1, eq. 80] and pi_ns the normal-shock total-pressure ratio [1, eq. 99].
    It falls monotonically with M: 0.9144 at M = 1.5, 0.8220 at M = 2, 0.7192 at M = 3, towards about 0.600 at
    very high Mach numbers (g = 1.4); it tends to 1 as M -> 1 from above.

    Parameters
    ----------
    mach : array_like
        Entrance Mach number M ahead of the (starting) normal shock (dimensionless).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        The self-start limit (dimensionless, 0.6 < value <= 1), the shape of ``mach``; 1 where M <= 1.

    Examples
    --------
    NACA Report 1135, Tables I and II at M = 2: (1/1.6875)/0.72087 = 0.8220.

    >>> print(f"{float(self_start_contraction(2.0)):.4f}")
    0.8220
    """
    m = np.asarray(mach, dtype=float)
    sup = m > 1.0
    ms = np.where(sup, m, 2.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        value = 1.0 / area_ratio(ms, gamma) / normal_shock(ms, gamma).total_pressure_ratio
    return np.where(sup, value, 1.0)


def started_throat_mach(contraction, entrance_mach, gamma=GAMMA):
    """Supersonic throat Mach number M_th of a started isentropic contraction from an entrance of Mach M1 whose
    whole stream reaches the throat [1, eq. 80]:

    A(M_th)/A* = (A_th/A_1) A(M1)/A*,   supersonic root

    solved with the inverse of the flow function (``engine_air.physics.isentropic.mach_from_flow_ratio``,
    supersonic branch).

    Parameters
    ----------
    contraction : array_like
        Throat-to-entrance area ratio A_th/A_1 (dimensionless, > 0).
    entrance_mach : array_like
        Mach number M1 at the entrance area A_1 (dimensionless, supersonic).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        M_th (dimensionless, 1 <= M_th <= M1), the broadcast shape; NaN where there is no supersonic root (the
        contraction is tighter than the isentropic limit A*/A(M1), or M1 <= 1): it cannot run started there.

    Examples
    --------
    M1 = 2 (A/A* = 1.6875, NACA Report 1135 Table I) through A_th/A_1 = 0.8: A/A* = 1.35 at the throat, the
    supersonic root of which is M_th = 1.7130; no contraction keeps M1.

    >>> print(f"{float(started_throat_mach(0.8, 2.0)):.4f} {float(started_throat_mach(1.0, 2.0)):.4f}")
    1.7130 2.0000
    >>> bool(np.isnan(started_throat_mach(0.5, 2.0)))   # tighter than A*/A = 0.5926
    True
    """
    c = np.asarray(contraction, dtype=float)
    m1 = np.asarray(entrance_mach, dtype=float)
    c, m1 = np.broadcast_arrays(c, m1)
    ok = (m1 > 1.0) & (c > 0.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        target = np.where(ok, c * area_ratio(np.where(ok, m1, 2.0), gamma), np.nan)
    return _supersonic_root(target, gamma)


def _supersonic_root(throat_area_ratio, gamma=GAMMA):
    """Supersonic Mach number with A/A* = ``throat_area_ratio``; NaN where it is below 1 or not finite."""
    target = np.asarray(throat_area_ratio, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        ok = np.isfinite(target) & (target >= 1.0)
        m_th = mach_from_flow_ratio(np.where(ok, 1.0 / np.where(ok, target, 1.0), 0.5), supersonic=True, gamma=gamma)
    return np.where(ok, m_th, np.nan)


def started_throat_mach_by_continuity(throat_to_capture, flight_mach, recovery, max_mass_flow_ratio, gamma=GAMMA):
    """Supersonic throat Mach number M_th of a started inlet from continuity of the flow it captures [1, eq. 80]
    (method §11): the captured flow W = MFR_max rho0 V0 A_c passes the throat at the total pressure pi p_t0
    left by the shocks ahead of it (ramps and cowl shock), so MFP(M_th) = W sqrt(T_t0) / (A_th pi p_t0), i.e.

    (A/A*)(M_th) = (A_th/A_c) pi (A/A*)(M0) / MFR_max,   supersonic root

    (rho0 V0 A_c = p_t0 A_c MFP(M0)/sqrt(T_t0) and MFP is inversely proportional to A/A*).

    Parameters
    ----------
    throat_to_capture : array_like
        Throat area over capture area A_th/A_c (dimensionless, > 0).
    flight_mach : array_like
        Flight Mach number M0 (dimensionless, supersonic).
    recovery : array_like
        Total-pressure ratio pi of the shocks ahead of the throat (dimensionless, 0 < pi <= 1).
    max_mass_flow_ratio : array_like
        Captured flow over rho0 V0 A_c, MFR_max (dimensionless, 0 < MFR_max <= 1).
    gamma : float
        Ratio of specific heats (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        M_th (dimensionless, >= 1), the broadcast shape; NaN where there is no supersonic root (the captured flow
        does not pass the throat supersonically: it cannot run started), or M0 <= 1.

    Examples
    --------
    M0 = 3 (A/A* = 4.2346, NACA Report 1135 Table I), all the flow captured, shocks keeping pi = 0.9, throat
    A_th/A_c = 0.30: (A/A*)(M_th) = 0.30 x 0.9 x 4.2346 = 1.1433, whose supersonic root is M_th = 1.4490.

    >>> print(f"{float(started_throat_mach_by_continuity(0.30, 3.0, 0.9, 1.0)):.4f}")
    1.4490
    >>> bool(np.isnan(started_throat_mach_by_continuity(0.20, 3.0, 0.9, 1.0)))   # 0.762 < 1: no root
    True
    """
    c = np.asarray(throat_to_capture, dtype=float)
    m0 = np.asarray(flight_mach, dtype=float)
    pi = np.asarray(recovery, dtype=float)
    mfr = np.asarray(max_mass_flow_ratio, dtype=float)
    sup = m0 > 1.0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        target = np.where(sup & (c > 0.0) & (mfr > 0.0),
                          c * pi * area_ratio(np.where(sup, m0, 2.0), gamma) / mfr, np.nan)
    return _supersonic_root(target, gamma)
