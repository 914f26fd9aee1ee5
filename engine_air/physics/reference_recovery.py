"""Reference ram recovery of MIL-E-5008B (1959), the standard inlet recovery of engine specifications.

    pi_ref = 1                              M0 <= 1
    pi_ref = 1 - 0.075 (M0 - 1)^1.35        1 < M0 < 5
    pi_ref = 800 / (M0^4 + 935)             M0 >= 5

Example: pi_ref(2) = 0.925.

[1] MIL-E-5008B, Military Specification, Engines, aircraft, turbojet and turbofan (1959), ram recovery.
"""

from __future__ import annotations

import numpy as np


def mil_e_5008b_recovery(flight_mach):
    """Reference total-pressure recovery pi_ref = p_t2/p_t0 of MIL-E-5008B [1].

        pi_ref = 1                              M0 <= 1
        pi_ref = 1 - 0.075 (M0 - 1)^1.35        1 < M0 < 5
        pi_ref = 800 / (M0^4 + 935)             M0 >= 5

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach number M0 (dimensionless).

    Returns
    -------
    ndarray
        pi_ref (dimensionless), the shape of ``flight_mach``.

    Examples
    --------
    MIL-E-5008B [1]: 1 in subsonic flight, 1 - 0.075 = 0.925 at M0 = 2, 800/2231 = 0.35858 at M0 = 6.

    >>> print(" ".join(f"{x:.5f}" for x in mil_e_5008b_recovery([0.8, 2.0, 6.0])))
    1.00000 0.92500 0.35858
    """
    m = np.asarray(flight_mach, dtype=float)
    with np.errstate(invalid="ignore"):
        mid = 1.0 - 0.075 * np.maximum(m - 1.0, 0.0) ** 1.35
        high = 800.0 / (m**4 + 935.0)
    return np.where(m <= 1.0, 1.0, np.where(m < 5.0, mid, high))
