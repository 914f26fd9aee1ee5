"""A scheduled inlet's shock system, evaluated per unique flight Mach number (method section 12).

With ``[inlet.schedule]`` the geometry (ramp angles, shock-on-lip Mach, throat) changes with M0, so the shock
system at each Mach column is that of the fixed inlet at that Mach (``inlet_at(inlet, m)``). The loop runs over
the unique Mach numbers (a map's Mach columns), never over points; the results are stacked back onto the Mach
array's shape. An inlet type that handles its own schedule (``handles_schedule = True``, e.g. one whose
starting depends on the whole schedule) is called once with the scheduled inlet instead.
"""

from __future__ import annotations

from dataclasses import fields, replace
from functools import lru_cache

import numpy as np

from engine_air.inlets.base import CaptureState, InletType, ShockSystem
from engine_air.inlets.schedule import inlet_at
from engine_air.project.model import Inlet


def per_column(kind: InletType, inlet: Inlet) -> bool:
    """True when ``inlet`` is scheduled and its type does not handle the schedule itself."""
    return inlet.schedule is not None and not getattr(kind, "handles_schedule", False)


def scheduled_shock_system(kind: InletType, inlet: Inlet, flight_mach: np.ndarray) -> ShockSystem:
    """The shock system at each flight Mach number, geometry taken from the schedule at that Mach number."""
    m0 = np.asarray(flight_mach, dtype=float)
    if not per_column(kind, inlet):
        return kind.shock_system(inlet, m0)
    unique, inverse = np.unique(m0, return_inverse=True)
    inverse = inverse.reshape(m0.shape)
    parts = [column_shock_system(kind, inlet_at(inlet, float(u)), float(u)) for u in unique]
    values = {}
    for f in fields(ShockSystem):
        items = [getattr(p, f.name) for p in parts]
        if any(x is None for x in items):
            values[f.name] = None
            continue
        stacked = np.concatenate([np.asarray(x) for x in items], axis=-1)  # (..., n_unique)
        values[f.name] = stacked[..., inverse]
    return ShockSystem(**values)


@lru_cache(maxsize=4096)
def column_shock_system(kind: InletType, fixed: Inlet, mach: float) -> ShockSystem:
    """The shock system of the fixed inlet ``fixed`` at one flight Mach number (cached: every case of a map and
    the pre-entry drag share the columns)."""
    return kind.shock_system(fixed, np.array([mach]))


def scheduled_pre_entry_drag(kind: InletType, inlet: Inlet, flight_mach: np.ndarray, state: CaptureState):
    """Supersonic pre-entry drag (N) with each Mach column's own geometry; ``None`` where the type models none.

    ``state`` holds arrays of the full (broadcast) shape; ``flight_mach`` the Mach array of that shape.
    """
    m0 = np.asarray(flight_mach, dtype=float)
    out = np.full(m0.shape, np.nan)
    for u in np.unique(m0[m0 > 1.0]):
        mask = m0 == u
        fixed = inlet_at(inlet, float(u))
        m_sel = m0[mask]
        one = column_shock_system(kind, fixed, float(u))
        shocks = ShockSystem(**{f.name: None if getattr(one, f.name) is None else
                                np.broadcast_to(getattr(one, f.name), np.shape(getattr(one, f.name))[:-1] + m_sel.shape)
                                for f in fields(ShockSystem)})
        sub = replace(
            state,
            flight_mach=m_sel,
            static_pressure_pa=np.broadcast_to(state.static_pressure_pa, m0.shape)[mask],
            dynamic_pressure_pa=np.broadcast_to(state.dynamic_pressure_pa, m0.shape)[mask],
            mass_flow_ratio=np.broadcast_to(state.mass_flow_ratio, m0.shape)[mask],
            momentum_balance_drag_n=np.broadcast_to(state.momentum_balance_drag_n, m0.shape)[mask],
        )
        d = kind.supersonic_pre_entry_drag(fixed, shocks, sub)
        if d is None:
            return None
        out[mask] = d
    return out
