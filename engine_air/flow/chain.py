"""The match as a chain of stages, in the order of the stations (method §1-§16); the only place that knows it.

    FreeStream  = free_stream(case, mach, altitude)                    §1   engine_air.flow.stages
    Demand      = demand(rating, free_stream) | swept_demand(...)      §2, §16
    Face        = face(inlet, rating, free_stream, demand)             §3, §14
    Compression = compression(project, free_stream, source)            §4, §9-§12, §17 (pluggable source)
    Capture     = capture(inlet, free_stream, demand, face, compression)        §5, §6
    Throat      = throat_and_doors(inlet, limits, free_stream, compression, capture)   §6, §11, §12   .throat
    Drag        = pre_entry_drag(kind, inlet, free_stream, compression, throat)       §7, §13        .drag
    Ledger      = ledger(rating, inlet, free_stream, throat, drag)                     §13            .ledger
    OperatingPoints = assemble(...)                                     the public result, no checks inside

``run_chain(project, case, mach, altitude_m, demand=None)`` runs it at arrays of conditions that broadcast
(a map passes ``mach[None, :]`` and ``altitude[:, None]``); ``demand`` replaces the rating's table by a given
corrected flow W_c2 (kg/s). ``characteristic`` sweeps W_c2 along a new first axis (method §16): the same chain,
no second model. The checks are judged by ``engine_air.envelope`` (``engine_air.evaluate_conditions``).

Memory: ``assemble`` keeps each quantity on the axes it varies over (broadcast views) and keeps a quantity that
holds one value at every point as that value (``lean``), so a map retains only what varies over it.

>>> import numpy as np
>>> from engine_air.project import load_project
>>> from pathlib import Path
>>> p = load_project(Path(__file__).parents[2] / "sample_projects" / "subsonic_transport_nacelle.toml")
>>> pts = run_chain(p, p.cases[0], np.array([0.3, 0.8]), np.array([[0.0], [10000.0]]))
>>> pts.recovery.shape
(2, 2)
"""

from __future__ import annotations

import numpy as np

from engine_air.flow import flags as F
from engine_air.flow.drag import Drag, pre_entry_drag
from engine_air.flow.ledger import Ledger, ledger
from engine_air.flow.points import OperatingPoints
from engine_air.flow.stages import (
    ERRSTATE,
    Capture,
    Compression,
    CompressionSource,
    Demand,
    Face,
    FreeStream,
    RecoveryLaw,
    capture,
    compression,
    demand as rating_demand,
    face,
    free_stream,
    swept_demand,
)
from engine_air.flow.throat import Throat, throat_and_doors
from engine_air.inlets.registry import inlet_type
from engine_air.physics.reference_recovery import mil_e_5008b_recovery
from engine_air.project.model import Case, Project


def run_chain(project: Project, case: Case, mach, altitude_m, demand=None, *,
              compression_source: CompressionSource | None = None,
              recovery_law: RecoveryLaw | None = None, data: bool = True) -> OperatingPoints:
    """The inlet-engine match of ``project`` for ``case`` at flight Mach ``mach`` and geopotential altitude
    ``altitude_m`` (m), arrays that broadcast; the rating's demand, or corrected flow ``demand`` (kg/s, an
    array that broadcasts against the conditions). Returns ``OperatingPoints`` of the common shape, unjudged.

    ``compression_source`` replaces the inlet type's model of the compression system and ``recovery_law`` the
    capture's recovery law. A project with a characteristics table (method §17) has its capture stage from the
    data wherever they cover (``engine_air.flow.measured``) unless ``data`` is False (the model alone).
    See ``free_stream`` for bad input."""
    inlet, rating = project.inlet, project.rating(case.rating)
    if demand is not None:  # the free stream takes the sweep's shape, so every stage sees one shape
        shape = np.broadcast_shapes(np.shape(mach), np.shape(altitude_m), np.shape(demand))
        mach, altitude_m = np.broadcast_to(mach, shape), np.broadcast_to(altitude_m, shape)
    else:  # a grid given as full arrays: each on its own axes, so the shock system is solved per Mach column
        mach, altitude_m = own_axes(mach, altitude_m)
    fs = free_stream(case, mach, altitude_m)
    dem = rating_demand(rating, fs) if demand is None else swept_demand(fs, demand)
    fc = face(inlet, rating, fs, dem)
    comp = compression(project, fs, compression_source)
    measured = data and project.characteristics is not None and recovery_law is None
    if measured:  # measured characteristics over the model where they cover (method §17)
        from engine_air.flow.measured import data_capture

        comp, cap = data_capture(project, case, fs, dem, fc, comp)
    else:
        cap = capture(inlet, fs, dem, fc, comp, recovery_law)
    thr = throat_and_doors(inlet, project.limits, fs, comp, cap)
    drag = pre_entry_drag(inlet_type(inlet.type), inlet, fs, comp, thr)
    if measured:
        from engine_air.flow.measured import measured_drag

        drag = measured_drag(comp, fs, thr, drag)
    led = ledger(rating, inlet, fs, thr, drag)
    points = assemble(fs, dem, fc, comp, cap, thr, drag, led)
    if case.angle_of_attack_deg is not None or case.sideslip_deg is not None:  # the case's incidence (§17)
        points = _with_incidence(points, case, fs)
    if measured:
        from engine_air.flow.measured import measured_fields

        points = measured_fields(points, comp, rating)
    return points


def _constant_along(a: np.ndarray, axis: int) -> bool:
    """True when every slice of ``a`` along ``axis`` holds the same values as the first, bit for bit (a broadcast
    view, stride 0, at no cost)."""
    if a.strides[axis] == 0:
        return True
    first = np.take(a, [0], axis=axis)
    if not (np.take(a, [1], axis=axis) == first).all():  # the usual answer for an axis it varies along, cheaply
        return False
    return bool(((a == first) & (np.signbit(a) == np.signbit(first))).all())


def own_axes(mach, altitude_m) -> tuple[np.ndarray, np.ndarray]:
    """Flight Mach and altitude each reduced to the axes it varies along, their broadcast shape kept: a map given
    as two full arrays (``numpy.broadcast_arrays``, ``numpy.meshgrid``) becomes a row of Mach numbers and a column
    of altitudes, so the quantities of the Mach number alone (the shock system, its pre-entry drag terms) and of
    the altitude alone (the atmosphere) are computed once per column or row and broadcast, to the same bits.

    >>> m, h = own_axes(*np.meshgrid([0.5, 2.0, 3.0], [0.0, 1e4]))
    >>> m.shape, h.shape
    ((1, 3), (2, 1))
    """
    m, h = np.asarray(mach, dtype=float), np.asarray(altitude_m, dtype=float)
    shape = np.broadcast_shapes(m.shape, h.shape)
    m, h = np.broadcast_to(m, shape), np.broadcast_to(h, shape)
    for axis, n in enumerate(shape):
        if n > 1:
            m_const, h_const = _constant_along(m, axis), _constant_along(h, axis)
            if m_const != h_const:  # the one that does not vary there keeps one slice (both: the shape is kept)
                cut = (slice(None),) * axis + (slice(0, 1),)
                m, h = (m[cut], h) if m_const else (m, h[cut])
    return m, h


def _with_incidence(points: OperatingPoints, case: Case, fs: FreeStream) -> OperatingPoints:
    """The points with the case's angle of attack and sideslip at each flight Mach number (degrees)."""
    from dataclasses import replace

    from engine_air.project.model import incidence_at

    shape = np.shape(points.flags)
    return replace(points, angle_of_attack_deg=lean(incidence_at(case.angle_of_attack_deg, fs.mach), shape),
                   sideslip_deg=lean(incidence_at(case.sideslip_deg, fs.mach), shape))


def characteristic(project: Project, case: Case, mach, altitude_m, corrected_flow_kg_s,
                   data: bool = True) -> OperatingPoints:
    """The inlet characteristic (method §16): the chain at the conditions (``mach``, ``altitude_m``, arrays that
    broadcast to a shape S) with the demand swept over ``corrected_flow_kg_s`` (a 1-D array of W_c2, kg/s) along
    a new first axis: points of shape (len(corrected_flow_kg_s), *S). Recovery against mass-flow ratio at
    each condition; at fixed M0 and W_c2 it does not depend on altitude."""
    wc2 = np.asarray(corrected_flow_kg_s, dtype=float)
    if wc2.ndim != 1:
        raise ValueError(f"corrected_flow_kg_s must be a 1-D array of corrected flows, not shape {wc2.shape}")
    shape = np.broadcast_shapes(np.shape(mach), np.shape(altitude_m))
    sweep = wc2.reshape(wc2.shape + (1,) * len(shape))
    return run_chain(project, case, np.asarray(mach, float)[None, ...], np.asarray(altitude_m, float)[None, ...],
                     demand=sweep, data=data)


def lean(value, shape: tuple[int, ...]) -> np.ndarray:
    """``value`` as a read-only array of ``shape`` that costs memory only for what varies: a broadcast view of
    it, and of one element where every element has the same bits (NaN included).

    >>> a = lean(np.zeros((300, 200)), (300, 200))
    >>> a.shape, a.base.nbytes if a.base is not None else a.nbytes
    ((300, 200), 8)
    """
    a = np.asarray(value)
    if a.ndim and a.size > 1 and a.flags.c_contiguous and a.dtype.kind in "fiub" and a.itemsize in (1, 2, 4, 8):
        flat = a.reshape(-1).view(f"u{a.itemsize}")  # the bits, so that NaN equals NaN and -0.0 is not 0.0
        # two samples first: an array that varies is (almost always) told without a pass over it
        if flat[-1] == flat[0] and flat[flat.size // 2] == flat[0] and (flat == flat[0]).all():
            a = a.reshape(-1)[:1].copy().reshape(())
    return np.broadcast_to(a, shape)


def _per_ramp(values: np.ndarray, shape: tuple[int, ...]) -> np.ndarray:
    """Per-ramp array of shape (n_ramps, *mach.shape) broadcast to (n_ramps, *shape): the ramp axis in front,
    the Mach axes aligned on the right (a 1-D row of Mach numbers against a column of altitudes)."""
    values = np.asarray(values)
    lead = len(shape) - (values.ndim - 1)
    return np.broadcast_to(values.reshape(values.shape[:1] + (1,) * lead + values.shape[1:]), values.shape[:1] + shape)


def assemble(fs: FreeStream, dem: Demand, fc: Face, comp: Compression, cap: Capture, thr: Throat, drag: Drag,
             led: Ledger) -> OperatingPoints:
    """The public result from the stages' states: every quantity on the points' shape (lean views), the flag
    bits of every stage in one ``FLAG_DTYPE`` array."""
    shape = np.broadcast_shapes(fs.shape, np.shape(dem.corrected_flow_kg_s), np.shape(thr.recovery))
    bits = np.zeros(shape, F.FLAG_DTYPE)
    for state in (fs, dem, fc, comp, cap, thr, drag, led):
        bits |= state.flags
    shocks = comp.shocks
    with np.errstate(**ERRSTATE):
        terminal = np.where(fs.supersonic & (shocks.terminal_upstream_mach > 1.0), shocks.terminal_upstream_mach, np.nan)
        values = dict(
            mach=fs.mach, altitude_m=fs.altitude_m, static_pressure_pa=fs.static_pressure_pa,
            static_temperature_k=fs.static_temperature_k, density_kg_m3=fs.density_kg_m3,
            speed_of_sound_m_s=fs.speed_of_sound_m_s, corrected_flow_kg_s=dem.corrected_flow_kg_s,
            mass_flow_kg_s=thr.engine_flow_kg_s, external_recovery=shocks.external_recovery,
            duct_recovery=cap.duct_recovery, recovery=thr.recovery,
            reference_recovery=mil_e_5008b_recovery(fs.mach), capture_mach=drag.capture_mach,
            throat_mach=thr.throat_mach, face_mach=fc.mach, terminal_shock_mach=terminal,
            max_mass_flow_ratio=thr.max_mass_flow_ratio, additive_drag_n=drag.additive_drag_n,
            relative_tip_mach=fc.relative_tip_mach, capture_area_m2=drag.capture_area_m2,
            lip_suction_factor=drag.lip_suction_factor,
            bleed_fraction=comp.bleed_fraction,
            bypass_flow_kg_s=thr.bypass_flow_kg_s, auxiliary_flow_kg_s=thr.auxiliary_flow_kg_s,
            bypass_shortfall_kg_s=thr.bypass_shortfall_kg_s, tip_speed_m_s=fc.tip_speed_m_s,
            spillage_drag_n=drag.spillage_drag_n, bleed_drag_n=led.bleed_drag_n,
            bypass_drag_n=led.bypass_drag_n, net_thrust_n=led.net_thrust_n, installed_thrust_n=led.installed_thrust_n,
            installation_loss_fraction=led.installation_loss_fraction,
            thrust_reference_recovery=led.thrust_reference_recovery, regime=thr.regime,
        )
    optional = {"oblique_ahead_of_cowl": shocks.oblique_ahead_of_cowl, "started": comp.started,
                "self_start_contraction": shocks.self_start_contraction, "entrance_area_m2": shocks.entrance_area_m2,
                "internal_contraction_ratio": shocks.internal_contraction_ratio}
    values.update({k: None if v is None else lean(v, shape) for k, v in optional.items()})
    values = {k: v if k in optional else lean(v, shape) for k, v in values.items()}
    return OperatingPoints(**values, flags=bits, ramp_wave_angle_rad=_per_ramp(shocks.ramp_wave_angle_rad, shape),
                           ramp_downstream_mach=_per_ramp(shocks.ramp_downstream_mach, shape))


__all__ = ["run_chain", "characteristic", "assemble", "lean", "OperatingPoints", "FreeStream", "Demand", "Face",
           "Compression", "Capture", "Throat", "Drag", "Ledger"]
