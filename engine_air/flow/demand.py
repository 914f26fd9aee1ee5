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
    """Corrected flow (kg/s) demanded at ``theta2`` and a bool array: outside the table."""
    th = np.asarray(theta2, dtype=float)
    table_theta = np.asarray(rating.theta, dtype=float)
    table_flow = np.asarray(rating.corrected_flow_kg_s, dtype=float)
    flow = np.interp(th, table_theta, table_flow)
    outside = (th < table_theta[0]) | (th > table_theta[-1])
    return flow, outside
