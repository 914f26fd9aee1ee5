"""Starting of a supersonic internal contraction: self-start limit, isentropic limit, started throat Mach.

A duct that contracts a supersonic stream (a mixed-compression inlet, a supersonic diffuser) has two
area ratios that bound its throat-to-entrance ratio A_th/A_c:

- Isentropic contraction limit, A_th/A_c >= (A*/A)(M): the smallest throat through which a stream of Mach M
  at the entrance can pass without a shock (the throat is then sonic) [1, eq. 80].
- Self-start (Kantrowitz-Donaldson) limit, A_th/A_c >= (A*/A)(M)/pi_ns(M): with a normal shock standing at
  the entrance (the unstarted state, or the state while the stream is being established) the flow behind it
  has total pressure pi_ns(M) p_t, so its sonic area is A*/pi_ns; the throat passes all of it, and the shock
  is swallowed, only when A_th is at least that [2]. At M = 2 the limit is 0.8220 (A*/A = 0.59259,
  pi_ns = 0.72087 from NACA Report 1135 [1]).

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
    """Smallest throat-to-entrance area ratio A_th/A_c passing a stream of entrance Mach ``mach`` without a
    shock: A*/A(M) = M [ (2/(g+1)) (1 + (g-1)/2 M^2) ]^(-(g+1)/(2(g-1))), dimensionless [1, eq. 80].

    1 where M <= 1 (a subsonic entrance has no supersonic contraction).

    >>> round(float(isentropic_contraction_limit(2.0)), 4)   # NACA Report 1135: A/A* = 1.6875 at M = 2
    0.5926
    """
    m = np.asarray(mach, dtype=float)
    sup = m > 1.0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        value = 1.0 / area_ratio(np.where(sup, m, 2.0), gamma)
    return np.where(sup, value, 1.0)


def self_start_contraction(mach, gamma=GAMMA):
    """Kantrowitz-Donaldson self-start limit on A_th/A_c for an entrance Mach number ``mach`` [2]:

        (A_th/A_c)_start = (A*/A)(M) / pi_ns(M)

    with A*/A the isentropic area ratio [1, eq. 80] and pi_ns the normal-shock total-pressure ratio
    [1, eq. 99]: the throat must pass, sonic, the whole stream behind a normal shock at the entrance.
    Dimensionless; 1 where M <= 1 (the limit tends to 1 as M -> 1 from above). It falls monotonically
    with M: 0.9144 at M = 1.5, 0.8220 at M = 2, 0.7192 at M = 3, towards about 0.600 at very high Mach
    numbers (g = 1.4).

    >>> round(float(self_start_contraction(2.0)), 4)   # 0.59259 / 0.72087, NACA Report 1135 tables
    0.822
    """
    m = np.asarray(mach, dtype=float)
    sup = m > 1.0
    ms = np.where(sup, m, 2.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        value = 1.0 / area_ratio(ms, gamma) / normal_shock(ms, gamma).total_pressure_ratio
    return np.where(sup, value, 1.0)


def started_throat_mach(contraction, entrance_mach, gamma=GAMMA):
    """Supersonic throat Mach number M_th of a started isentropic contraction, dimensionless:

        A(M_th)/A* = (A_th/A_c) A(M1)/A*,   supersonic root  [1, eq. 80]

    ``contraction`` = A_th/A_c, ``entrance_mach`` = M1 (supersonic, at area A_c). Uses the inverse of the
    flow function (``engine_air.physics.isentropic.mach_from_flow_ratio``, supersonic branch).
    NaN where there is no supersonic root (the contraction is tighter than the isentropic limit, or M1 <= 1):
    the contraction cannot run started there.

    >>> round(float(started_throat_mach(1.0, 2.0)), 6)   # no contraction: the Mach number is kept
    2.0
    >>> round(float(started_throat_mach(1.6875 / 1.25, 2.0)), 4) > 1.0   # A/A* = 1.25 at the throat
    True
    """
    c = np.asarray(contraction, dtype=float)
    m1 = np.asarray(entrance_mach, dtype=float)
    c, m1 = np.broadcast_arrays(c, m1)
    ok = (m1 > 1.0) & (c > 0.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        flow_ratio = 1.0 / (np.where(ok, c, 1.0) * area_ratio(np.where(ok, m1, 2.0), gamma))
        ok = ok & (flow_ratio <= 1.0)
        m_th = mach_from_flow_ratio(np.where(ok, flow_ratio, 0.5), supersonic=True, gamma=gamma)
    return np.where(ok, m_th, np.nan)
