"""Geometry scheduled against flight Mach number (method §12): linear in M0, end values held.

``scheduled(inlet, key, flight_mach)`` gives the value of ``key`` at each flight Mach number: the
schedule's interpolated value where ``[inlet.schedule]`` gives ``key``, the fixed key's value otherwise
(the fixed key stays required as the value outside any schedule).

Example: schedule mach = [1.5, 2.0], throat_area_m2 = [0.40, 0.30]: at M0 = 1.75 the throat is 0.35 m^2,
at M0 = 1.0 it is 0.40 m^2 (end held) and at M0 = 2.5 it is 0.30 m^2.
"""

from __future__ import annotations

import numpy as np

from engine_air.spec.project import Inlet

SCHEDULED_KEYS = ("throat_area_m2", "shock_on_lip_mach", "ramp_angles_deg", "bleed_fraction")


def is_scheduled(inlet: Inlet, key: str) -> bool:
    """True when ``[inlet.schedule]`` gives ``key``."""
    return inlet.schedule is not None and getattr(inlet.schedule, key) is not None


def scheduled(inlet: Inlet, key: str, flight_mach) -> np.ndarray:
    """Value of ``key`` at flight Mach numbers ``flight_mach`` (array).

    Scalars keys give an array of the Mach array's shape; ``ramp_angles_deg`` gives shape
    (n_ramps, *mach.shape).
    """
    m0 = np.asarray(flight_mach, dtype=float)
    if not is_scheduled(inlet, key):
        fixed = np.asarray(getattr(inlet, key), dtype=float)
        if fixed.ndim == 0:
            return np.broadcast_to(fixed, m0.shape).copy()
        return np.broadcast_to(fixed.reshape(fixed.shape + (1,) * m0.ndim), fixed.shape + m0.shape).copy()
    xs = np.asarray(inlet.schedule.mach, dtype=float)
    table = np.asarray(getattr(inlet.schedule, key), dtype=float)
    if table.ndim == 1:
        return np.interp(m0, xs, table)
    return np.stack([np.interp(m0, xs, table[:, k]) for k in range(table.shape[1])])


def inlet_at(inlet: Inlet, flight_mach: float) -> Inlet:
    """The fixed-geometry inlet equal to the scheduled one at one flight Mach number."""
    from dataclasses import replace

    if inlet.schedule is None:
        return inlet
    values = {}
    for key in SCHEDULED_KEYS:
        if is_scheduled(inlet, key):
            value = scheduled(inlet, key, float(flight_mach))
            values[key] = tuple(float(v) for v in value) if key == "ramp_angles_deg" else float(value)
    return replace(inlet, schedule=None, **values)
