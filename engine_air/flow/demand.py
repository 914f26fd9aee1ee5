"""Engine airflow demand: corrected flow at the face against theta2 (method §2).

The engine sets corrected flow W_c2 = W sqrt(theta2)/delta2 at its face, not
physical flow. A rating gives W_c2 (kg/s) as a table against
theta2 = T_t2 / T_ref (T_t2 = T_t0, adiabatic inlet), interpolated linearly.
Outside the table the end value is held and the point is marked
``demand-extrapolated``.

Example: table theta = [0.8, 1.0], W_c2 = [92, 88] kg/s gives 90 kg/s at theta2 = 0.9
and 88 kg/s (extrapolated) at theta2 = 1.2.
"""

from __future__ import annotations

import numpy as np

from engine_air.project.model import Rating


def corrected_flow_demand(rating: Rating, theta2) -> tuple[np.ndarray, np.ndarray]:
    """Corrected flow demanded at the engine face, linear in theta2 (method §2).

        W_c2(theta2) = W_c2,i + (W_c2,i+1 - W_c2,i) (theta2 - theta_i) / (theta_i+1 - theta_i)

    with theta2 = T_t2 / T_ref (T_ref = 288.15 K) and W_c2 = W sqrt(theta2) / delta2,
    delta2 = p_t2 / p_ref (p_ref = 101 325 Pa): the corrected-flow similarity in which
    engine ratings are given (common practice). Outside the table the end value is held.

    Parameters
    ----------
    rating : Rating
        The engine rating: ``theta`` (increasing, dimensionless) and ``corrected_flow_kg_s`` (kg/s).
    theta2 : array_like
        Face total-temperature ratio theta2 = T_t2 / T_ref (dimensionless), any shape.

    Returns
    -------
    (ndarray, ndarray)
        Corrected flow W_c2 in kg/s, and a bool array: True where theta2 is outside the
        table (the caller flags ``demand-extrapolated``).

    Examples
    --------
    A table theta = [0.8, 1.0], W_c2 = [92, 88] kg/s gives 90 kg/s at theta2 = 0.9 (halfway,
    worked by hand) and holds 88 kg/s at theta2 = 1.2:

    >>> from engine_air.project.model import Rating
    >>> flow, outside = corrected_flow_demand(Rating("max", (0.8, 1.0), (92.0, 88.0)), [0.9, 1.2])
    >>> print(flow.tolist(), outside.tolist())
    [90.0, 88.0] [False, True]
    """
    th = np.asarray(theta2, dtype=float)
    table_theta = np.asarray(rating.theta, dtype=float)
    table_flow = np.asarray(rating.corrected_flow_kg_s, dtype=float)
    flow = np.interp(th, table_theta, table_flow)
    outside = (th < table_theta[0]) | (th > table_theta[-1])
    return flow, outside
