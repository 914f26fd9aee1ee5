"""The throat and the airflow doors (method §6, §11, §12): bypass, choking, auxiliary doors, bleed, the regime.

``throat_and_doors`` takes the capture state (engine flow W and recovery pi after the supercritical rule) and
adds what the throat and the doors do to it:

1. bypass doors (supersonic, below critical) hold the inlet critical up to their capacity and as far as the
   throat passes the extra air within its Mach limit; the rest spills (``bypass-insufficient``);
2. the throat MFP = (W + W_bp) sqrt(T_t0)/(A_th pi_ext p_t0) at or above choking holds the flow at the choked
   value: the bypass closes first, then W and pi fall in proportion (``throat-choked``); a started
   mixed-compression throat is supersonic and passes the whole capture;
3. auxiliary doors in parallel with the throat take their area's share and lose K_aux q/p_t on it;
4. captured flow = (W + W_bp - W_aux)/(1 - b), bleed = b x captured, MFR = captured/(rho0 V0 A_c);
5. the regime (an inlet the doors hold at MFR_max is critical), buzz risk (method §10), unstart risk (§11).

An inlet without bypass doors keeps its bypass flow as the scalar 0.0 (no array is made for it).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.flow import airflow
from engine_air.flow import flags as F
from engine_air.flow.stages import ERRSTATE, Capture, Compression, FreeStream
from engine_air.physics.constants import CRITICAL_BAND
from engine_air.physics.isentropic import choked_mass_flow_parameter, mach_from_flow_ratio, mass_flow_parameter
from engine_air.project.model import Inlet, Limits

REGIMES = ("subsonic", "subcritical", "critical", "supercritical")
SUBSONIC, SUBCRITICAL, CRITICAL, SUPERCRITICAL = range(4)


@dataclass(frozen=True)
class Throat:
    """Flows through the capture plane, the throat and the doors, and the regime (arrays, kg/s)."""

    recovery: np.ndarray  # pi delivered to the face
    engine_flow_kg_s: np.ndarray
    throat_mach: np.ndarray  # M_th; the supersonic throat Mach of a started inlet
    captured_flow_kg_s: np.ndarray
    bleed_flow_kg_s: np.ndarray
    bypass_flow_kg_s: np.ndarray | float
    bypass_fraction: np.ndarray | float
    bypass_shortfall_kg_s: np.ndarray
    auxiliary_flow_kg_s: np.ndarray
    mass_flow_ratio: np.ndarray
    max_mass_flow_ratio: np.ndarray
    spillage_fraction: np.ndarray
    regime: np.ndarray  # int8 index into REGIMES
    flags: np.ndarray | int


def _bypass(inlet: Inlet, fs: FreeStream, comp: Compression, cap: Capture, a_throat, limits: Limits):
    """(bypass flow, shortfall, flags) of the bypass doors (method §12): they pass what holds the inlet critical
    up to the lesser of their capacity and the throat's room below its Mach limit (unchoked without one)."""
    pi_ext, pt0 = comp.shocks.external_recovery, fs.inlet_total_pressure_pa
    mach_cap = (limits.throat_mach_max if limits.throat_mach_max is not None else 1.0) * (1.0 - 1e-9)
    doors_open = fs.supersonic & ~cap.over & ~fs.low_speed
    if not np.any(doors_open):  # subsonic flight, or every point above MFR_max: nothing to hold, nothing short
        return 0.0, np.zeros(np.shape(doors_open)), 0
    needed = np.where(doors_open, np.maximum(comp.shocks.max_mass_flow_ratio * cap.capture_flow_kg_s
                                             * (1.0 - comp.bleed_fraction) - cap.engine_flow_kg_s, 0.0), 0.0)
    if inlet.bypass_area_m2 <= 0.0:
        return 0.0, np.where(doors_open, np.maximum(needed - 0.0, 0.0), 0.0), 0
    room = a_throat * pi_ext * pt0 * mass_flow_parameter(mach_cap) / np.sqrt(fs.total_temperature_k) - cap.engine_flow_kg_s
    if comp.started is not None:  # a started throat is supersonic: it passes the whole capture
        room = np.where(comp.started, np.inf, room)
    capacity = airflow.door_flow(inlet.bypass_area_m2, inlet.bypass_discharge_coefficient, pi_ext * pt0,
                                 fs.total_temperature_k, fs.static_pressure_pa)
    capacity = np.minimum(capacity, np.maximum(room, 0.0))
    flow, short = airflow.bypass_flow(np.where(doors_open, needed, 0.0), capacity)
    flow = np.where(doors_open, flow, 0.0)
    shortfall = np.where(doors_open, np.maximum(needed - flow, 0.0), 0.0)
    return flow, shortfall, F.flag_where(doors_open & short, F.BYPASS_INSUFFICIENT)


def _choke(fs: FreeStream, comp: Compression, cap: Capture, a_throat, w_bp):
    """(pi, W, W_bp, M_th, flags) after throat choking: a choked throat closes the bypass first, then starves the
    engine (recovery falls in proportion)."""
    w, pi = cap.engine_flow_kg_s, cap.recovery
    throat_flow = w + w_bp
    throat_ratio = (throat_flow * np.sqrt(fs.total_temperature_k)
                    / (a_throat * comp.shocks.external_recovery * fs.inlet_total_pressure_pa) / choked_mass_flow_parameter())
    choked = throat_ratio >= 1.0
    if comp.started is not None:  # started: the throat is supersonic, the terminal shock just behind it
        choked = choked & ~comp.started
    if np.ndim(w_bp) or w_bp != 0.0:
        choke_flow = throat_flow / throat_ratio
        w_bp_choked = np.maximum(w_bp - (throat_flow - choke_flow), 0.0)
        scale = np.where(choked, np.where(w_bp > 0.0, (choke_flow - w_bp_choked) / w, 1.0 / throat_ratio), 1.0)
        w_bp = np.where(choked, w_bp_choked, w_bp)
    else:  # no bypass doors: the same relations with W_bp = 0
        scale = np.where(choked, 1.0 / throat_ratio, 1.0)
    m_th = np.where(choked, 1.0, mach_from_flow_ratio(np.minimum(throat_ratio, 1.0)))
    return pi * scale, w * scale, w_bp, m_th, F.flag_where(choked, F.THROAT_CHOKED)


def _buzz(limits: Limits, fs: FreeStream, comp: Compression, cap: Capture, critical, mfr):
    """Buzz risk (method §10): subcritical below the stable fraction of MFR_max, where an oblique or conical shock
    stands ahead of the cowl (with only a normal shock ahead, pitot or every ramp shock detached, subcritical
    spillage is stable). Where measured characteristics decide (§17) their own stability limit replaces both the
    fraction and the shock rule (no limit measured there: no buzz judged)."""
    shocks = comp.shocks
    below = fs.supersonic & ~cap.supercritical & ~critical
    buzz = below & (mfr / shocks.max_mass_flow_ratio < limits.stable_flow_fraction)
    if shocks.oblique_ahead_of_cowl is not None:
        buzz = buzz & shocks.oblique_ahead_of_cowl
    if comp.measured is not None:
        measured = comp.measured
        buzz = np.where(measured.used, below & (mfr / shocks.max_mass_flow_ratio < measured.stable_flow_fraction),
                        buzz)
    return buzz


def throat_and_doors(inlet: Inlet, limits: Limits, fs: FreeStream, comp: Compression, cap: Capture) -> Throat:
    """The throat, the doors and the regime; see the module text for the relations."""
    shocks, bleed = comp.shocks, comp.bleed_fraction
    with np.errstate(**ERRSTATE):
        a_throat, aux_share, _ = airflow.auxiliary_share(comp.throat_area_m2, inlet.auxiliary_inlet_area_m2,
                                                         fs.mach, inlet.auxiliary_door_mach_max)
        w_bp, shortfall, bits = _bypass(inlet, fs, comp, cap, a_throat, limits)
        pi, w, w_bp, m_th, choke_bits = _choke(fs, comp, cap, a_throat, w_bp)
        bits = bits | choke_bits
        if inlet.auxiliary_inlet_area_m2 > 0.0:  # the doors' own loss on their share (one pass)
            pi_aux = airflow.auxiliary_recovery(aux_share, inlet.auxiliary_loss_coefficient, m_th)
            pi, w = pi * pi_aux, w * pi_aux
        w_aux = aux_share * (w + w_bp)
        captured = (w + w_bp - w_aux) / (1.0 - bleed)  # through the capture plane; bleed = b x captured
        capture_ratio = captured / cap.capture_flow_kg_s / shocks.max_mass_flow_ratio
        if np.ndim(w_bp) or w_bp > 0.0:  # bypass doors passing air hold the inlet critical
            held = fs.supersonic & (w_bp > 0.0) & (np.abs(capture_ratio - 1.0) <= CRITICAL_BAND)
            critical = (cap.critical | held) & ~cap.supercritical
        else:
            critical = cap.critical & ~cap.supercritical
        if comp.started is not None:
            m_th = np.where(comp.started, shocks.terminal_upstream_mach, m_th)
            # started with the capture (after any bypass) below the critical one: the shock may be expelled
            bits = bits | F.flag_where(comp.started & (capture_ratio < 1.0 - CRITICAL_BAND), F.UNSTART_RISK)
        regime = np.where(fs.supersonic, np.where(cap.supercritical, SUPERCRITICAL,
                                                  np.where(critical, CRITICAL, SUBCRITICAL)), SUBSONIC)
        mfr = np.where(fs.low_speed, np.nan, captured / cap.capture_flow_kg_s)
        choke_flow = (comp.throat_area_m2 * shocks.external_recovery * fs.inlet_total_pressure_pa
                      * choked_mass_flow_parameter() / np.sqrt(fs.total_temperature_k))
        mfr_max = np.where(fs.supersonic, shocks.max_mass_flow_ratio,
                           np.where(fs.low_speed, np.nan, choke_flow / cap.capture_flow_kg_s))
        if comp.measured is not None:  # measured characteristics: their critical flow at every Mach number
            mfr_max = np.where(comp.measured.used, shocks.max_mass_flow_ratio, mfr_max)
        if limits.stable_flow_fraction is not None:
            bits = bits | F.flag_where(_buzz(limits, fs, comp, cap, critical, mfr), F.BUZZ_RISK)
        return Throat(
            recovery=pi, engine_flow_kg_s=w, throat_mach=m_th, captured_flow_kg_s=captured,
            bleed_flow_kg_s=bleed * captured, bypass_flow_kg_s=w_bp,
            bypass_fraction=np.where(w_bp > 0.0, w_bp / captured, 0.0) if np.ndim(w_bp) else 0.0,
            bypass_shortfall_kg_s=shortfall, auxiliary_flow_kg_s=w_aux, mass_flow_ratio=mfr,
            max_mass_flow_ratio=mfr_max, spillage_fraction=np.where(fs.low_speed, np.nan, np.maximum(0.0, 1.0 - mfr)),
            regime=regime.astype(np.int8), flags=bits,
        )
