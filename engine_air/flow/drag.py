"""Pre-entry (additive) drag and spillage drag (method §7, §13): the stage between the throat and the ledger.

Subsonic flight: the stream-tube momentum balance between station 0 and the capture plane 1 (A1 = A_c,
p_t1 = pi_ext p_t0, M1 the subsonic root of the captured flow):

    D_add = p1 A1 (1 + g M1^2) - p0 A0 (1 + g M0^2) - p0 (A1 - A0)        [NACA Report 1135 momentum relations]

Supersonic flight: the inlet type's own pre-entry drag (ramp or cone pressure on the dividing streamline plus the
spillage behind the terminal shock, method §13), per Mach column when the geometry is scheduled; a type that
models none flags ``additive-drag-not-modelled``. C_add = D_add/(q0 A_c); the spillage drag is the part the lip
suction does not recover: (1 - K_lip) D_add, zero at MFR >= 1 and below M0 0.05 (its coefficient zero at
MFR >= 1 likewise).
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np

from engine_air.flow import flags as F
from engine_air.flow.schedule_columns import per_column, scheduled_pre_entry_drag
from engine_air.flow.stages import ERRSTATE, Compression, FreeStream
from engine_air.flow.throat import Throat
from engine_air.inlets.base import CaptureState, InletType, ShockSystem
from engine_air.physics.constants import GAMMA
from engine_air.physics.isentropic import choked_mass_flow_parameter, mach_from_flow_ratio, pressure_ratio
from engine_air.project.model import Inlet


@dataclass(frozen=True)
class Drag:
    """Station 1 and the drag of the spilled stream tube (N; coefficients on q0 A_c)."""

    stream_tube_area_m2: np.ndarray  # A0 of the captured flow; NaN at low speed
    capture_mach: np.ndarray  # M1
    additive_drag_n: np.ndarray
    additive_drag_coefficient: np.ndarray
    spillage_drag_coefficient: np.ndarray
    spillage_drag_n: np.ndarray
    capture_area_m2: float  # A_c
    lip_suction_factor: np.ndarray  # the factor that applies: supersonic or subsonic (Mach only)
    flags: np.ndarray | int


def pre_entry_drag(kind: InletType, inlet: Inlet, fs: FreeStream, comp: Compression, thr: Throat) -> Drag:
    """Additive and spillage drag at every point; see the module text for the relations."""
    m0, p0, low, supersonic = fs.mach, fs.static_pressure_pa, fs.low_speed, fs.supersonic
    captured, mfr = thr.captured_flow_kg_s, thr.mass_flow_ratio
    with np.errstate(**ERRSTATE):
        a0_tube = captured / (fs.density_kg_m3 * fs.velocity_m_s)
        pt1 = comp.shocks.external_recovery * fs.inlet_total_pressure_pa
        capture_ratio = captured * np.sqrt(fs.total_temperature_k) / (inlet.capture_area_m2 * pt1) / choked_mass_flow_parameter()
        m1 = mach_from_flow_ratio(np.minimum(capture_ratio, 1.0))
        a1 = inlet.capture_area_m2
        d_add = (pt1 * pressure_ratio(m1) * a1 * (1.0 + GAMMA * m1 * m1) - p0 * a0_tube * (1.0 + GAMMA * m0 * m0)
                 - p0 * (a1 - a0_tube))
        q0 = 0.5 * GAMMA * p0 * m0 * m0
        d_super = d_add
        if np.any(supersonic):
            state = CaptureState(m0, p0, q0, mfr, inlet.capture_area_m2, d_add)
            if per_column(kind, inlet):
                d_super = scheduled_pre_entry_drag(kind, inlet, np.broadcast_to(m0, fs.shape), state)
            else:
                d_super = _supersonic_drag(kind, inlet, comp.shocks, state, fs.shape)
        bits = 0
        if d_super is None:
            not_modelled = supersonic
            bits = F.flag_where(not_modelled, F.ADDITIVE_DRAG_NOT_MODELLED)
        else:
            not_modelled = False
            d_add = np.where(supersonic, d_super, d_add)
        d_add = np.where(low | not_modelled, np.nan, d_add)
        c_add = d_add / (q0 * inlet.capture_area_m2)
        suction = np.where(supersonic, inlet.supersonic_lip_suction_factor, inlet.lip_suction_factor)
        return Drag(
            stream_tube_area_m2=np.where(low, np.nan, a0_tube), capture_mach=m1, additive_drag_n=d_add,
            additive_drag_coefficient=c_add,
            spillage_drag_coefficient=np.where(mfr >= 1.0, 0.0, (1.0 - suction) * c_add),  # as the drag (§12)
            # 0 at MFR >= 1 and below M0 0.05 (q0 < 0.2 % of p0)
            spillage_drag_n=np.where(low | (mfr >= 1.0), 0.0, (1.0 - suction) * d_add),
            capture_area_m2=inlet.capture_area_m2, lip_suction_factor=suction, flags=bits,
        )


def _supersonic_columns(m0, shape: tuple[int, ...]) -> slice | None:
    """The columns (a slice of the last axis) of the supersonic points when the Mach numbers are one row along the
    last axis of the points (a map) and the supersonic ones are adjacent, some of the row subsonic; else None."""
    m = np.asarray(m0)
    if m.ndim != len(shape) or m.ndim == 0 or m.size != m.shape[-1] or m.shape[-1] != shape[-1]:
        return None
    idx = np.flatnonzero(m.reshape(-1) > 1.0)
    if idx.size in (0, m.size) or idx[-1] - idx[0] + 1 != idx.size:
        return None
    return slice(int(idx[0]), int(idx[-1]) + 1)


def _supersonic_drag(kind: InletType, inlet: Inlet, shocks: ShockSystem, state: CaptureState, shape):
    """The type's supersonic pre-entry drag, on the supersonic columns of a map only (the same relations point by
    point; the subsonic columns keep the momentum balance), at every point otherwise."""
    cols = _supersonic_columns(state.flight_mach, shape)
    if cols is None:
        return kind.supersonic_pre_entry_drag(inlet, shocks, state)

    def part(a):  # an array along the Mach row (or per ramp, the ramp axis first), or one constant along it
        return a[..., cols] if isinstance(a, np.ndarray) and a.ndim and a.shape[-1] == shape[-1] else a

    sub_shocks = ShockSystem(**{f.name: part(getattr(shocks, f.name)) for f in fields(ShockSystem)})
    sub = CaptureState(part(np.asarray(state.flight_mach)), part(np.asarray(state.static_pressure_pa)),
                       part(np.asarray(state.dynamic_pressure_pa)), part(np.asarray(state.mass_flow_ratio)),
                       state.capture_area_m2, part(np.asarray(state.momentum_balance_drag_n)))
    d_sub = kind.supersonic_pre_entry_drag(inlet, sub_shocks, sub)
    if d_sub is None:
        return None
    out = np.array(np.broadcast_to(state.momentum_balance_drag_n, shape))
    out[..., cols] = d_sub
    return out
