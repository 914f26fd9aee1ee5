"""The first stages of the match, in station order (method §1-§6): free stream, demand, face, compression, capture.

Each stage is a plain function of the states built so far that returns its own small frozen dataclass of numpy
arrays (SI units). Arrays keep the shape they need: a quantity of the altitude only (the atmosphere) has the
altitude array's shape, one of the Mach number only (the shock system) the Mach array's, and the two broadcast
where they meet. Each state carries the flag bits it sets (``flags``, ``engine_air.flow.flags``), broadcastable
to the points' shape. Nothing here knows about checks, files or grids; ``engine_air.flow.chain`` is the only
place that knows the order.

The compression system is *pluggable*: ``compression`` takes a source, by default ``model_compression`` (the
inlet type's shock system, ``engine_air.inlets``); a source of measured characteristics (method §17) gives the
same ``Compression`` where its data cover. Capture's recovery law is pluggable the same way (``recovery_law``).

>>> import numpy as np
>>> from engine_air.project.model import Case
>>> fs = free_stream(Case("c", "r"), np.array([0.0, 2.0]), np.array([11000.0]))
>>> [round(float(x), 2) for x in fs.total_temperature_k]   # T0 (1 + 0.2 M0^2), US Std Atmosphere 1976
[216.65, 389.97]
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Protocol

import numpy as np

from engine_air.flow import flags as F
from engine_air.flow.demand import corrected_flow_demand
from engine_air.flow.schedule_columns import scheduled_shock_system
from engine_air.inlets.base import ShockSystem
from engine_air.inlets.registry import inlet_type
from engine_air.inlets.schedule import scheduled
from engine_air.physics.atmosphere import standard_atmosphere
from engine_air.physics.constants import CRITICAL_BAND, GAMMA, LOW_SPEED_MACH, P_REF, R_AIR, T_REF
from engine_air.physics.isentropic import choked_mass_flow_parameter, dynamic_to_total_pressure, mach_from_flow_ratio
from engine_air.project.model import Case, Inlet, Project, Rating

ERRSTATE = dict(divide="ignore", invalid="ignore", over="ignore")
"""Undefined values are NaN with a flag that says why (never a warning)."""


@dataclass(frozen=True)
class FreeStream:
    """Station 0 (method §1): the 1976 standard atmosphere with the case's ISA offset, and the totals."""

    mach: np.ndarray  # M0 >= 0, the Mach array's shape
    altitude_m: np.ndarray  # the altitude array's shape
    static_temperature_k: np.ndarray
    static_pressure_pa: np.ndarray
    density_kg_m3: np.ndarray
    speed_of_sound_m_s: np.ndarray
    total_temperature_k: np.ndarray  # T0 (1 + (g-1)/2 M0^2)
    total_pressure_pa: np.ndarray  # p0 (1 + (g-1)/2 M0^2)^(g/(g-1))
    velocity_m_s: np.ndarray
    inlet_total_pressure_pa: np.ndarray  # p_t0, or p0 at low speed (static suction)
    low_speed: np.ndarray  # bool, M0 < 0.05
    supersonic: np.ndarray  # bool, M0 > 1
    inside_atmosphere: np.ndarray  # bool
    shape: tuple[int, ...]  # the points' (broadcast) shape
    flags: np.ndarray


def _outside_case_region(case: Case, m0: np.ndarray, h: np.ndarray) -> np.ndarray:
    """Bool: outside the case's ``mach_range`` or ``altitude_range_m`` (bounds included, method section 14)."""
    out = np.zeros(np.broadcast_shapes(m0.shape, h.shape), bool)
    if case.mach_range is not None:
        lo, hi = case.mach_range
        out = out | (m0 < lo) | (m0 > hi)
    if case.altitude_range_m is not None:
        lo, hi = case.altitude_range_m
        out = out | (h < lo) | (h > hi)
    return out


def free_stream(case: Case, mach, altitude_m) -> FreeStream:
    """The free stream at flight Mach ``mach`` and geopotential altitude ``altitude_m`` (m); arrays broadcast.

    A negative Mach number is taken as 0; one that is NaN or infinite raises ``ValueError`` (no flag could
    explain the result). An altitude outside the atmosphere model (NaN included) is flagged
    ``outside-atmosphere``. T_t0 = T0 (1 + (g-1)/2 M0^2), p_t0 = p0 (1 + (g-1)/2 M0^2)^(g/(g-1)) (NACA Report
    1135, isentropic relations; method §1).
    """
    m_in = np.asarray(mach, dtype=float)
    if not np.isfinite(m_in).all():
        bad = m_in[~np.isfinite(m_in)].ravel()[0]
        raise ValueError(f"flight Mach number must be a finite number, not {bad!r}: no state can be computed "
                         "from it (altitude outside the atmosphere model is flagged instead)")
    m0 = np.maximum(m_in, 0.0)
    h = np.asarray(altitude_m, dtype=float)
    with np.errstate(**ERRSTATE):
        atm = standard_atmosphere(h, case.isa_offset_K)
        t0, p0, a0 = atm.temperature_k, atm.pressure_pa, atm.speed_of_sound_m_s
        base0 = 1.0 + 0.5 * (GAMMA - 1.0) * m0 * m0
        pt0 = p0 * base0 ** (GAMMA / (GAMMA - 1.0))
        low = m0 < LOW_SPEED_MACH
        bits = (F.flag_where(~np.asarray(atm.inside_model), F.OUTSIDE_ATMOSPHERE)
                | F.flag_where(_outside_case_region(case, m0, h), F.OUTSIDE_CASE_REGION) | F.flag_where(low, F.LOW_SPEED))
        return FreeStream(
            mach=m0, altitude_m=h, static_temperature_k=t0, static_pressure_pa=p0, density_kg_m3=atm.density_kg_m3,
            speed_of_sound_m_s=a0, total_temperature_k=t0 * base0, total_pressure_pa=pt0, velocity_m_s=m0 * a0,
            inlet_total_pressure_pa=np.where(low, p0, pt0), low_speed=low, supersonic=m0 > 1.0,
            inside_atmosphere=np.asarray(atm.inside_model), shape=np.broadcast_shapes(m0.shape, h.shape), flags=bits,
        )


@dataclass(frozen=True)
class Demand:
    """The engine's corrected-flow demand at the face (method §2): W_c2 at theta2 = T_t0/T_ref."""

    theta2: np.ndarray
    corrected_flow_kg_s: np.ndarray
    flags: np.ndarray | int = 0


def demand(rating: Rating, fs: FreeStream) -> Demand:
    """W_c2(theta2) from the rating's table (linear, ends held and flagged ``demand-extrapolated``)."""
    with np.errstate(**ERRSTATE):
        theta2 = fs.total_temperature_k / T_REF
        wc2, extrapolated = corrected_flow_demand(rating, theta2)
        return Demand(theta2, wc2, F.flag_where(extrapolated & fs.inside_atmosphere, F.DEMAND_EXTRAPOLATED))


def swept_demand(fs: FreeStream, corrected_flow_kg_s) -> Demand:
    """A demand given as corrected flow W_c2 (kg/s) instead of the rating's table: the characteristic's sweep
    (method §16). ``corrected_flow_kg_s`` broadcasts against the free stream's shape."""
    with np.errstate(**ERRSTATE):
        return Demand(fs.total_temperature_k / T_REF, np.asarray(corrected_flow_kg_s, dtype=float), 0)


@dataclass(frozen=True)
class Face:
    """Station 2, the engine face (method §3, §14): M2, the corrected flow it passes, the relative tip Mach."""

    mach: np.ndarray  # M2; 1 where choked
    choked: np.ndarray  # bool
    corrected_flow_kg_s: np.ndarray  # what the face passes (the choked flow where choked)
    tip_speed_m_s: np.ndarray | float  # physical fan tip speed; NaN without one
    relative_tip_mach: np.ndarray | float  # NaN without a tip speed
    flags: np.ndarray | int


def _tip_speed(rating: Rating, theta2):
    """Physical fan tip speed U (m/s): the rating's one speed, or U = U_c sqrt(theta2) from its corrected tip
    speed table against theta2 (linear, ends held; method section 14); None without either."""
    if rating.corrected_tip_speed_m_s is not None:
        corrected = np.interp(theta2, np.asarray(rating.theta, float), np.asarray(rating.corrected_tip_speed_m_s, float))
        return corrected * np.sqrt(theta2)
    return rating.fan_tip_speed_m_s


def face(inlet: Inlet, rating: Rating, fs: FreeStream, dem: Demand) -> Face:
    """Face Mach from W_c2 sqrt(T_ref)/(p_ref A2) = MFP(M2), the subsonic root (the mass-flow function
    of method §3); at or above the choking value (241.24 kg/(s m^2)) the face is choked and M2 taken as 1.
    Relative tip Mach M_rel = sqrt(M2^2 + (U/a2)^2), a2 = sqrt(g R T2), T2 = T_t0/(1 + (g-1)/2 M2^2)."""
    with np.errstate(**ERRSTATE):
        wc2 = dem.corrected_flow_kg_s
        face_ratio = wc2 * np.sqrt(T_REF) / (P_REF * inlet.face_area_m2) / choked_mass_flow_parameter()
        choked = face_ratio >= 1.0
        m2 = np.where(choked, 1.0, mach_from_flow_ratio(np.minimum(face_ratio, 1.0)))
        bits = F.flag_where(choked, F.FACE_CHOKED)
        u_tip = _tip_speed(rating, dem.theta2)
        if u_tip is None:
            u_tip, m_rel = np.nan, np.nan
            bits = bits | F.FLAG_DTYPE(F.NO_TIP_SPEED)
        else:
            t2 = fs.total_temperature_k / (1.0 + 0.5 * (GAMMA - 1.0) * m2 * m2)
            m_rel = np.sqrt(m2 * m2 + (u_tip / np.sqrt(GAMMA * R_AIR * t2)) ** 2)
        return Face(m2, choked, np.where(choked, wc2 / face_ratio, wc2), u_tip, m_rel, bits)


@dataclass(frozen=True)
class Compression:
    """The compression system ahead of the subsonic duct (method §4, §9-§12, §17), on the Mach array's shape."""

    shocks: ShockSystem  # recovery, MFR_max, terminal shock, per-ramp arrays, buzz and starting fields
    throat_area_m2: np.ndarray  # scheduled in M0 (method §12)
    bleed_fraction: np.ndarray  # of the captured flow, scheduled in M0
    started: np.ndarray | None  # bool (supersonic and started), mixed compression only
    flags: np.ndarray | int
    measured: object | None = None  # where measured characteristics decide (method §17): see flow.measured


class CompressionSource(Protocol):
    """Where the compression system comes from: the inlet type's model, or measured characteristics (§17)."""

    def __call__(self, project: Project, fs: FreeStream) -> Compression: ...


def model_compression(project: Project, fs: FreeStream) -> Compression:
    """The inlet type's own model (``engine_air.inlets``): its shock system per Mach column when scheduled."""
    inlet = project.inlet
    with np.errstate(**ERRSTATE):
        shocks = scheduled_shock_system(inlet_type(inlet.type), inlet, fs.mach)
        bits = F.flag_where(shocks.detached, F.SHOCK_DETACHED) | F.flag_where(shocks.inside_cowl, F.SHOCK_INSIDE_COWL)
        started = None if shocks.started is None else fs.supersonic & shocks.started
        if started is not None:
            bits = bits | F.flag_where(fs.supersonic & ~started, F.UNSTARTED)
        return Compression(shocks, scheduled(inlet, "throat_area_m2", fs.mach),
                           scheduled(inlet, "bleed_fraction", fs.mach), started, bits)


def compression(project: Project, fs: FreeStream, source: CompressionSource | None = None) -> Compression:
    """The compression system from ``source`` (default ``model_compression``)."""
    return (source or model_compression)(project, fs)


RecoveryLaw = Callable[[Inlet, FreeStream, Demand, Face, "Compression"], tuple[np.ndarray, np.ndarray]]
"""(inlet, free stream, demand, face, compression) -> (pi_duct, pi) ahead of the supercritical rule. A law from
measured pi(MFR) (method §17) solves MFR = W(pi(MFR))/(rho0 V0 A_c) here, from the same states."""


def model_recovery(inlet: Inlet, fs: FreeStream, dem: Demand, fc: Face, comp: Compression):
    """(pi_duct, pi) ahead of any regime correction (method §4): pi = pi_ext pi_duct, pi_duct = 1 - K q2/p_t2."""
    pi_duct = 1.0 - inlet.duct_loss_coefficient * dynamic_to_total_pressure(fc.mach)
    return pi_duct, comp.shocks.external_recovery * pi_duct


@dataclass(frozen=True)
class Capture:
    """Flow, capture ratio and regime ahead of the throat (method §5, §6)."""

    duct_recovery: np.ndarray
    recovery: np.ndarray  # pi after the supercritical rule
    engine_flow_kg_s: np.ndarray  # W after the supercritical rule
    capture_flow_kg_s: np.ndarray  # rho0 V0 A_c: the flow at MFR = 1
    over: np.ndarray  # bool: demand above MFR_max (captured flow held there)
    supercritical: np.ndarray  # bool
    critical: np.ndarray  # bool: within the critical band of MFR_max
    flags: np.ndarray | int


def capture(inlet: Inlet, fs: FreeStream, dem: Demand, fc: Face, comp: Compression,
            recovery_law: RecoveryLaw | None = None) -> Capture:
    """W = W_c2 (pi p_t0/p_ref)/sqrt(theta2) [method §5]; MFR = W/((1 - b) rho0 V0 A_c). Supersonic, above MFR_max
    (supercritical beyond the critical band): captured flow held at MFR_max, pi and W scaled by MFR_max/MFR [§6]."""
    with np.errstate(**ERRSTATE):
        pi_duct, pi = (recovery_law or model_recovery)(inlet, fs, dem, fc, comp)
        w = fc.corrected_flow_kg_s * (pi * fs.inlet_total_pressure_pa / P_REF) / np.sqrt(dem.theta2)
        capture_flow = fs.density_kg_m3 * fs.velocity_m_s * inlet.capture_area_m2
        mfr_demand = np.where(fs.low_speed, np.nan, w / (1.0 - comp.bleed_fraction) / capture_flow)
        ratio = mfr_demand / comp.shocks.max_mass_flow_ratio
        supercritical = fs.supersonic & (ratio > 1.0 + CRITICAL_BAND)
        critical = fs.supersonic & (np.abs(ratio - 1.0) <= CRITICAL_BAND)
        # above MFR_max (inside the critical band too) the capture never exceeds what the shocks allow
        over = fs.supersonic & (ratio > 1.0)
        scale = np.where(over, 1.0 / np.where(over, ratio, 1.0), 1.0)  # MFR_max / MFR
        return Capture(pi_duct, pi * scale, w * scale, capture_flow, over, supercritical, critical,
                       F.flag_where(supercritical, F.SUPERCRITICAL))
