"""Axisymmetric external-compression spike inlet (``axisymmetric-spike``, method §9, §10, §13).

One or two cones (``cone_half_angles_deg``) compress the flow ahead of a circular cowl lip that lies on the
first cone's shock at the design Mach number M_d (``shock_on_lip_mach``). Capture area A_c = pi r_lip^2, the
full lip circle (spike included).

- First cone: Taylor-Maccoll conical flow (``engine_air.physics.conical``, weak solution): wave angle beta,
  cone-surface Mach M_c; total-pressure ratio = normal-shock ratio at M0 sin(beta).
- Second cone: a plane oblique shock at the first cone's surface Mach number turning the flow by the
  difference of the half-angles (the usual simplification of the isentropic-plus-shock flow about a
  biconic: the second cone's shock is taken as a wedge shock in a uniform stream at M_c).
- Terminal normal shock at the last surface Mach number.
- Maximum capture below M_d: the lip lies on the ray omega_L = beta(M_d) from the spike tip; the captured flow
  passes the cone-shaped surface of half-angle omega_L from tip to lip, so from the conical solution at M0
  MFR_max = rho(omega_L) |V_w(omega_L)| / (rho0 V0 sin omega_L); 1 at and above M_d (``shock-inside-cowl``
  above).
- A first cone above its detachment Mach number's limit (M0 below the cone's detachment Mach number) stands
  behind a bow shock (``shock-detached``): the compression is taken as one normal shock at M0 and the capture
  and pre-entry drag are carried linearly in M0 from their values at detachment to the normal-shock values at
  M0 = 1 (``engine_air.physics.detached_shock.detached_cone_capture_blend``), so that they are continuous.
  A second cone detached at M_c: the rest is a normal shock at M_c, as for ramps.
- Pre-entry drag in supersonic flight (§13): the conical pressure integrated along the conical stream line
  from the shock to the lip, int (p - p0) d(pi r^2), plus the momentum balance of the spillage behind the
  terminal shock (``ramp_layout.terminal_spill_drag``, from the last surface state); zero at MFR = 1. The
  second cone's shock is taken to lie inside the lip ray and adds nothing to the dividing stream surface.

Cost: the conical flow is solved once per flight Mach column (cached), never per point.

Example (NASA SP-3004 / NACA Report 1135 cone charts at chart precision): a 20 deg single cone at M0 = 2
has beta about 37.8 deg and a surface Mach number about 1.57; with M_d = 2 its MFR_max is 1 there.
"""

from __future__ import annotations

import math
import numpy as np

from engine_air.inlets.base import CaptureState, ShockSystem
from engine_air.inlets.external_ramp import SHOCK_ON_LIP_MACH
from engine_air.physics.shocks import normal_shock, oblique_shock
from engine_air.spec.project import Inlet
from engine_air.spec.field import REQUIRED, Field

MAX_CONES = 2
MAX_CONE_DEG = 40.0

CONE_HALF_ANGLES = Field(
    "cone_half_angles_deg", "inlet", "number list",
    "half-angle of each spike cone, tip cone first (the second cone turns the flow by the difference)",
    unit="deg", lo=0.0, hi=MAX_CONE_DEG, lo_open=True, length=(1, MAX_CONES), default=REQUIRED,
    inlet_types=("axisymmetric-spike",))

_ROUND = 9


def spike_problems(inlet: Inlet) -> list[tuple[str, object, str]]:
    """Design checks as (key, value, allowed): cones increasing, every cone shock attached at M_d."""
    cones = list(inlet.cone_half_angles_deg)
    md = inlet.shock_on_lip_mach
    key = "inlet.cone_half_angles_deg"
    if not 1 <= len(cones) <= MAX_CONES:
        return [(key, cones, f"one or two cone half-angles, each in (0, {MAX_CONE_DEG:g}] deg")]
    if len(cones) == 2 and not cones[1] > cones[0]:
        return [(key, cones, "the second cone must be steeper than the first (it turns the flow further)")]
    if md is None:
        return [("inlet.shock_on_lip_mach", None, "required for an axisymmetric-spike inlet")]
    from engine_air.physics.conical import cone_solution, detachment_mach  # the conical solver only where used

    first = cone_solution(md, cones[0])
    if first is None:
        return [(key, cones, f"the first cone's shock must stay attached at inlet.shock_on_lip_mach = {md:g}: "
                             f"a {cones[0]:g} deg cone needs M0 >= {detachment_mach(cones[0]):.3f}")]
    if len(cones) == 2:
        turn = math.radians(cones[1] - cones[0])
        second = oblique_shock(first.surface_mach, turn)
        if not bool(second.attached):
            return [(key, cones, f"the second cone's shock must stay attached at inlet.shock_on_lip_mach = {md:g}: "
                                 f"turning {cones[1] - cones[0]:g} deg at the first cone's surface Mach "
                                 f"{first.surface_mach:.3f} detaches")]
        if not float(second.downstream_mach) > 1.0:
            return [(key, cones, "the flow behind the second cone must stay supersonic at the design Mach number")]
    return []


def first_cone_columns(flight_mach, cone: float, design_mach: float) -> np.ndarray:
    """The first cone at flight Mach columns ``flight_mach`` (1-D, supersonic), all solved together
    (``engine_air.physics.conical.cone_columns``, cached per column): rows wave angle (rad), surface Mach,
    p_t ratio, p_c/p0, MFR_max and the pressure integral; the first four NaN where the cone's shock is detached,
    where capture and integral are carried linearly in M0 from just attached (1e-7 above the detachment Mach
    number) to their normal-shock values at M0 = 1."""
    from engine_air.physics.conical import cone_columns, detachment_mach
    from engine_air.physics.detached_shock import detached_cone_capture_blend

    m0 = np.asarray(flight_mach, dtype=float)
    m_det = detachment_mach(cone)
    just = round(m_det * (1.0 + 1e-7), _ROUND)  # just attached
    cols = cone_columns(np.append(m0, just), cone, design_mach)
    out, at_det = cols[:, :-1], cols[:, -1]
    detached = ~np.isfinite(out[0])
    if detached.any():
        ok = m_det < design_mach and np.isfinite(at_det[4])
        mfr_det, integral_det = (at_det[4], at_det[5]) if ok else (1.0, 0.0)
        out[4] = np.where(detached, detached_cone_capture_blend(m0, m_det, mfr_det, 1.0), out[4])
        out[5] = np.where(detached, detached_cone_capture_blend(m0, m_det, integral_det, 0.0), out[5])
    return out


class AxisymmetricSpikeInlet:
    name = "axisymmetric-spike"
    label = "axisymmetric spike (1-2 cones)"
    fields = (CONE_HALF_ANGLES, SHOCK_ON_LIP_MACH)

    def check_design(self, inlet: Inlet) -> list[tuple[str, object, str]]:
        return spike_problems(inlet)

    def _columns(self, inlet: Inlet, flight_mach):
        """Per flight Mach: (M0, scalars, per-shock arrays); scalars = recovery ahead of the terminal shock,
        entry Mach (NaN: the first cone detached, M0), entry flow angle, detached, MFR_max, integral."""
        m0 = np.asarray(flight_mach, dtype=float)
        cones = tuple(float(c) for c in inlet.cone_half_angles_deg)
        n = len(cones)
        design = float(inlet.shock_on_lip_mach)
        uniq, inverse = np.unique(np.round(m0, _ROUND), return_inverse=True)
        inverse = inverse.reshape(m0.shape)
        sup = uniq > 1.0
        first = np.full((6, uniq.size), np.nan)
        first[5] = 0.0
        if sup.any():
            first[:, sup] = first_cone_columns(uniq[sup], cones[0], design)
        beta1, mc, pt1, pc = first[:4]
        attached1 = np.isfinite(beta1)
        per = np.full((4, n, uniq.size), np.nan)
        per[:, 0] = first[:4]
        recovery = np.where(attached1, pt1, 1.0)
        entry = np.where(attached1, mc, np.where(sup, np.nan, uniq))
        angle = np.where(attached1, math.radians(cones[0]), 0.0)
        detached = sup & ~attached1
        if n == 2:
            # second cone: a plane oblique shock at the first cone's surface Mach (vectorised over columns)
            live = attached1 & (np.nan_to_num(mc) > 1.0)
            s2 = oblique_shock(np.where(live, mc, 2.0), math.radians(cones[1] - cones[0]))
            ok2 = live & s2.attached
            per[0, 1] = np.where(ok2, s2.wave_angle_rad, np.nan)
            per[1, 1] = np.where(ok2, s2.downstream_mach, np.nan)
            per[2, 1] = np.where(ok2, s2.total_pressure_ratio, np.nan)
            per[3, 1] = np.where(ok2, s2.static_pressure_ratio, np.nan)
            recovery = np.where(ok2, recovery * s2.total_pressure_ratio, recovery)
            entry = np.where(ok2, s2.downstream_mach, entry)
            angle = np.where(ok2, math.radians(cones[1]), angle)
            detached = detached | (live & ~s2.attached)
        # a flight Mach that rounds to 1 (less than 1e-9 above it) captures like a normal shock at M0 = 1: 1
        at_one = np.where(uniq == 1.0, 1.0, np.nan)
        scalars = np.stack([recovery, entry, angle, detached.astype(float), np.where(sup, first[4], at_one),
                            np.where(sup, first[5], 0.0)])
        return m0, scalars[:, inverse], per[:, :, inverse]

    def shock_system(self, inlet: Inlet, flight_mach) -> ShockSystem:
        m0, sc, per = self._columns(inlet, flight_mach)
        supersonic = m0 > 1.0
        recovery, entry = sc[0], np.where(np.isnan(sc[1]), m0, sc[1])  # NaN: first cone detached, M0
        terminal = normal_shock(entry)
        design = float(inlet.shock_on_lip_mach)
        return ShockSystem(
            external_recovery=recovery * terminal.total_pressure_ratio,
            terminal_upstream_mach=entry,
            terminal_downstream_mach=terminal.downstream_mach,
            max_mass_flow_ratio=np.where(supersonic, sc[4], np.nan),
            detached=supersonic & (sc[3] > 0.5),
            inside_cowl=supersonic & (m0 > design * (1.0 + 1e-9)),
            ramp_wave_angle_rad=per[0],
            ramp_downstream_mach=per[1],
            ramp_total_pressure_ratio=per[2],
            ramp_static_pressure_ratio=per[3],
            oblique_ahead_of_cowl=supersonic & np.isfinite(per[0][0]),
        )

    def supersonic_pre_entry_drag(self, inlet: Inlet, shocks: ShockSystem, state: CaptureState):
        from engine_air.inlets.ramp_layout import terminal_spill_drag

        m0, sc, _ = self._columns(inlet, state.flight_mach)
        recovery, entry, angle, integral = sc[0], np.where(np.isnan(sc[1]), m0, sc[1]), sc[2], sc[5]
        spill = terminal_spill_drag(m0, entry, recovery, angle, state.mass_flow_ratio, shocks.max_mass_flow_ratio)
        return (integral + spill) * state.static_pressure_pa * state.capture_area_m2

    def design_variables(self, inlet: Inlet) -> list[str]:
        return ["shock_on_lip_mach"] + [f"cone_half_angles_deg[{k + 1}]" for k in range(len(inlet.cone_half_angles_deg))]


INLET = AxisymmetricSpikeInlet()
