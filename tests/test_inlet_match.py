"""Inlet and match (method §2-§8): worked cases built by hand from the relations, and properties.

Tiny projects are built inline from the ``engine_air.project.model`` dataclasses. Every expected number is
computed here from the method's relations (with ``math`` and ``scipy``), not from engine_air.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from pygasflow.shockwave import beta_from_mach_theta
from scipy.optimize import brentq

from engine_air.envelope import flags as F
from engine_air.inlets.ramp_layout import ramp_design_problems
from engine_air.inlets.registry import inlet_type


def external_shocks(inlet, mach):
    return inlet_type(inlet.type).shock_system(inlet, mach)
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.flow.match import REGIMES
from engine_air.project.model import Case, Envelope, Inlet, Limits, Project, Rating
from engine_air.physics.reference_recovery import mil_e_5008b_recovery
from engine_air.outputs.point_record import point_record

G = 1.4
R = 8314.32 / 28.9644
T_REF, P_REF = 288.15, 101325.0
MFP_STAR = math.sqrt(G / R) * 1.2**-3
WC_PER_A_CHOKE = MFP_STAR * P_REF / math.sqrt(T_REF)  # 241.24 kg/(s m^2), derived from method §3

# 1976 standard free stream used by the hand calculations (U.S. Standard Atmosphere 1976, Table I)
SEA_LEVEL = (288.15, 101325.0)
H11 = (216.65, 22632.064)  # 11 000 m


# ---------------------------------------------------------------------------- hand relations (method §1-§7)
def base(m):
    return 1.0 + 0.2 * m * m


def mfp(m):
    return math.sqrt(G / R) * m * base(m) ** -3.0


def p_pt(m):
    return base(m) ** -3.5


def q_pt(m):
    return 0.7 * m * m * p_pt(m)


def sub_mach(mfp_value):
    return brentq(lambda m: mfp(m) - mfp_value, 0.0, 1.0, xtol=1e-15, rtol=8.9e-16)


def ns_pt(m):
    s = m * m
    return (2.4 * s / (0.4 * s + 2.0)) ** 3.5 * (2.4 / (2.8 * s - 0.4)) ** 2.5


def freestream(m0, t0, p0):
    rho0 = p0 / (R * t0)
    v0 = m0 * math.sqrt(G * R * t0)
    return t0 * base(m0), p0 * base(m0) ** 3.5, rho0, v0


def wc_for_face_mach(m2, face_area):
    """Corrected flow that puts the face at Mach m2 (derived from method §3)."""
    return mfp(m2) * P_REF * face_area / math.sqrt(T_REF)


# ---------------------------------------------------------------------------- building projects
def make(inlet_type="pitot", capture=1.0, throat=0.9, face=1.0, k=0.0, suction=0.0, ramps=(), design=None,
         flow=50.0, theta=(0.5, 2.5), flows=None, tip=None, sff=None, face_mach_max=0.6, throat_mach_max=None,
         isa=0.0):
    inlet = Inlet(inlet_type, capture, throat, face, duct_loss_coefficient=k, lip_suction_factor=suction,
                  ramp_angles_deg=tuple(ramps), shock_on_lip_mach=design)
    flows = tuple(flows) if flows is not None else tuple(flow for _ in theta)
    rating = Rating("r", tuple(theta), flows, fan_tip_speed_m_s=tip)
    limits = Limits(face_mach_max=face_mach_max, throat_mach_max=throat_mach_max, stable_flow_fraction=sff)
    env = Envelope((0.0, 3.0, 3.0, 0.0), (0.0, 0.0, 20000.0, 20000.0))
    case = Case("c", "r", isa)
    return Project(limits, inlet, (rating,), env, cases=(case,)), case


def at(project, case, mach, alt):
    """Evaluate one condition; returns (points, record)."""
    pts = evaluate_conditions(project, case, np.array([mach]), np.array([alt]))
    return pts, point_record(pts, 0, case.name)


# ---------------------------------------------------------------------------- MIL-E-5008B (method §4)
def test_mil_e_5008b_at_mach_2():
    assert float(mil_e_5008b_recovery(2.0)) == pytest.approx(0.925, abs=1e-12)  # MIL-E-5008B


def test_mil_e_5008b_branches():
    m = np.array([0.0, 0.5, 1.0, 1.5, 3.0, 4.999, 5.0, 6.0])
    ref = mil_e_5008b_recovery(m)
    np.testing.assert_array_equal(ref[:3], 1.0)  # MIL-E-5008B: 1 for M0 <= 1
    # MIL-E-5008B: 1 - 0.075 (M0 - 1)^1.35 for 1 < M0 < 5
    for i in (3, 4, 5):
        assert ref[i] == pytest.approx(1.0 - 0.075 * (m[i] - 1.0) ** 1.35, rel=1e-14)
    assert ref[4] == pytest.approx(0.80882, abs=5e-6)  # 1 - 0.075 * 2^1.35, by hand
    # MIL-E-5008B: 800 / (M0^4 + 935) from M0 = 5
    assert ref[6] == pytest.approx(800.0 / 1560.0, rel=1e-14)  # 0.51282
    assert ref[7] == pytest.approx(800.0 / 2231.0, rel=1e-14)  # 0.35858
    # the two supersonic branches nearly meet at 5 (0.5126 vs 0.5128; derived)
    assert abs(ref[5] - ref[6]) < 5e-4


# ---------------------------------------------------------------------------- recovery worked cases
def test_pitot_mach_2_recovery_is_normal_shock():
    # pitot, K = 0, small demand: subcritical, recovery = normal-shock ratio at M0 = 2
    p, c = make(flow=20.0)
    pts, rec = at(p, c, 2.0, 11000.0)
    assert rec["recovery"] == pytest.approx(0.72087, abs=5e-6)  # NACA Report 1135
    assert rec["recovery"] == pytest.approx(ns_pt(2.0), rel=1e-13)  # derived from method §4
    assert rec["regime"] == "subcritical"
    assert rec["max_mass_flow_ratio"] == 1.0
    assert rec["mass_flow_ratio"] < 0.2
    assert set(rec["flags"]) == {"no-tip-speed", "no-thrust-data"}


def test_pitot_subsonic_duct_loss():
    # derived from method §4: pi = 1 - K q2/p_t2 at the face Mach set by the demand (M2 = 0.4 here)
    k = 0.05
    p, c = make(k=k, flow=wc_for_face_mach(0.4, 1.0))
    pts, rec = at(p, c, 0.5, 0.0)
    assert rec["face_mach"] == pytest.approx(0.4, abs=1e-9)
    assert rec["recovery"] == pytest.approx(1.0 - k * q_pt(0.4), rel=1e-12)
    assert rec["recovery"] == pytest.approx(0.994985, abs=1e-6)
    assert rec["duct_recovery"] == rec["recovery"] and rec["external_recovery"] == 1.0
    assert rec["regime"] == "subsonic"


@pytest.mark.parametrize("per_area, m2", [(151.71, 0.4), (180.05, 0.5), (203.03, 0.6)])
def test_face_mach_from_demand(per_area, m2):
    # derived from method §3. The tabulated W_c/A is rounded to 0.01 kg/(s m^2), which is up to 1.7e-5 in
    # Mach at these points (d(W_c/A)/dM is about 300 kg/(s m^2)); so the rounded value is held to 2e-5 and the
    # unrounded one (MFP(M2) p_ref/sqrt(T_ref) evaluated here) to 1e-9.
    face = 0.8
    p, c = make(face=face, flow=per_area * face, throat=0.95, capture=1.0)
    assert at(p, c, 0.6, 3000.0)[1]["face_mach"] == pytest.approx(m2, abs=2e-5)
    p, c = make(face=face, flow=wc_for_face_mach(m2, face), throat=0.95, capture=1.0)
    assert at(p, c, 0.6, 3000.0)[1]["face_mach"] == pytest.approx(m2, abs=1e-9)


def test_face_choked_flag():
    face = 0.5
    # just below choking: a subsonic solution exists
    p, c = make(face=face, flow=241.0 * face)
    rec = at(p, c, 0.5, 0.0)[1]
    assert "face-choked" not in rec["flags"] and 0.9 < rec["face_mach"] < 1.0
    # at or above 241.24 kg/(s m^2) (derived from method §3): choked, M2 taken as 1, the point fails
    for per_area in (241.24, 241.30, 300.0):
        p, c = make(face=face, flow=per_area * face)
        pts, rec = at(p, c, 0.5, 0.0)
        assert "face-choked" in rec["flags"], per_area
        assert rec["face_mach"] == 1.0
        assert bool(pts.check("face-mach").fails[0])
    # exactly the choking value counts as choked (>=)
    p, c = make(face=face, flow=WC_PER_A_CHOKE * face)
    assert "face-choked" in at(p, c, 0.5, 0.0)[1]["flags"]


# ---------------------------------------------------------------------------- ramp capture (method §6)
def _lip_streamline_mfr_max(m0, delta_deg, design_mach):
    """Closed-form y0 of one ramp: lip at (x_L, 1), x_L = cot(beta_d); the dividing streamline from the lip
    runs back parallel to the ramp, (x_L - t cos d, 1 - t sin d), and meets the shock y = x tan(beta) at
    1 - t sin d = (x_L - t cos d) tan(beta), so t = (x_L tan(beta) - 1) / (cos d tan(beta) - sin d)."""
    d = math.radians(delta_deg)
    beta_d = math.radians(float(beta_from_mach_theta(design_mach, delta_deg)["weak"]))
    beta = math.radians(float(beta_from_mach_theta(m0, delta_deg)["weak"]))
    x_l = 1.0 / math.tan(beta_d)
    t = (x_l * math.tan(beta) - 1.0) / (math.cos(d) * math.tan(beta) - math.sin(d))
    return 1.0 - t * math.sin(d)


RAMP10 = dict(inlet_type="external-ramp", ramps=(10.0,), design=2.0, capture=1.0, throat=0.8, face=1.0)


def test_single_ramp_mfr_max_closed_form():
    p, c = make(flow=10.0, **RAMP10)
    expected = _lip_streamline_mfr_max(1.8, 10.0, 2.0)
    assert expected == pytest.approx(0.9595, abs=5e-5)  # the package docstring's worked example
    rec = at(p, c, 1.8, 11000.0)[1]
    assert rec["max_mass_flow_ratio"] == pytest.approx(expected, rel=1e-9)
    for m0 in (1.5, 1.7, 1.9, 1.99):
        got = float(external_shocks(p.inlet, np.array(m0)).max_mass_flow_ratio)
        assert got == pytest.approx(_lip_streamline_mfr_max(m0, 10.0, 2.0), rel=1e-9), m0


def test_mfr_max_is_one_at_shock_on_lip_and_less_below():
    p, c = make(flow=10.0, **RAMP10)
    pts = evaluate_conditions(p, c, np.array([1.6, 1.9, 1.999, 2.0, 2.3]), np.full(5, 11000.0))
    mfr_max = pts.max_mass_flow_ratio
    assert mfr_max[3] == 1.0 and mfr_max[4] == 1.0
    assert np.all(mfr_max[:3] < 1.0) and np.all(np.diff(mfr_max[:4]) > 0)
    assert mfr_max[2] == pytest.approx(1.0, abs=1e-3)  # continuous at M_d
    assert not F.has(pts.flags[3], F.SHOCK_INSIDE_COWL)  # at M_d the shock is on the lip
    assert F.has(pts.flags[4], F.SHOCK_INSIDE_COWL)  # above it, inside the cowl


def test_two_ramp_shock_on_lip_geometry():
    # Two ramps designed at M_d = 2: at M_d both shocks meet at the lip, so MFR_max is 1 and the recovery is
    # the product of the two oblique-shock ratios and the terminal normal shock (derived from method §4).
    p, c = make(inlet_type="external-ramp", ramps=(8.0, 7.0), design=2.0, flow=10.0)
    s = external_shocks(p.inlet, np.array([2.0]))
    assert float(s.max_mass_flow_ratio[0]) == 1.0
    m, pi = 2.0, 1.0
    for d in (8.0, 7.0):
        beta = math.radians(float(beta_from_mach_theta(m, d)["weak"]))
        mn1 = m * math.sin(beta)
        pi *= ns_pt(mn1)
        mn2 = math.sqrt((1 + 0.2 * mn1**2) / (1.4 * mn1**2 - 0.2))
        m = mn2 / math.sin(beta - math.radians(d))
    pi *= ns_pt(m)
    assert float(s.external_recovery[0]) == pytest.approx(pi, rel=1e-9)
    assert float(s.terminal_upstream_mach[0]) == pytest.approx(m, rel=1e-9)


def test_mfr_max_trace_with_detached_ramps():
    """Below M_d the trace runs through every attached ramp shock (method §6); the stream line to the lip
    crosses a detached ramp's bow shock where its wave angle is that of maximum deflection (method §10,
    engine_air.physics.detached_shock), so MFR_max < 1 runs on continuously through attachment. With the
    first ramp detached (8 deg reaches maximum deflection near M 1.35) the trace is the closed-form
    intersection, worked here, of the lip stream line at the maximum deflection delta_m with the straight
    shock at beta_m from the leading edge (pygasflow: max_theta_from_mach, detachment_point_oblique_shock)."""
    from pygasflow.shockwave import max_theta_from_mach

    p, c = make(inlet_type="external-ramp", ramps=(8.0, 7.0), design=2.0, flow=10.0)
    m0 = np.array([1.1, 1.3, 1.5, 1.6, 1.9, 2.0, 2.2])
    s = external_shocks(p.inlet, m0)
    mfr = s.max_mass_flow_ratio
    assert s.detached[:3].all() and not s.detached[3:].any()
    assert np.all(mfr[:5] < 1.0) and mfr[5] == 1.0 and mfr[6] == 1.0
    beta_d = math.radians(beta_from_mach_theta(2.0, 8.0)["weak"])  # design wave angle of ramp 1 (pygasflow)
    x_lip = 1.0 / math.tan(beta_d)
    for i, m in enumerate(m0[:2]):
        delta = math.radians(max_theta_from_mach(float(m)))
        beta = math.radians(beta_from_mach_theta(float(m), max_theta_from_mach(float(m)))["weak"])
        # lip point moved back along delta by s meets y = x tan(beta)
        step = (x_lip * math.tan(beta) - 1.0) / (math.cos(delta) * math.tan(beta) - math.sin(delta))
        assert mfr[i] == pytest.approx(1.0 - step * math.sin(delta), rel=1e-6)
    # with ramp 2 detached at M0 = 1.5 and its local Mach supersonic, its bow shock adds to ramp 1's trace:
    # capture below the one-ramp inlet with the same first ramp and lip
    one = make(inlet_type="external-ramp", ramps=(8.0,), design=2.0, flow=10.0)[0]
    assert mfr[2] < float(external_shocks(one.inlet, np.array([1.5])).max_mass_flow_ratio[0])


def test_shock_detached_20_degree_ramp_at_mach_1_5():
    # 20 deg exceeds the maximum deflection at M = 1.5 (12.1 deg, NACA Report 1135 chart): detached, the
    # compression is one normal shock at M0 (method §4)
    p, c = make(inlet_type="external-ramp", ramps=(20.0,), design=3.0, flow=10.0, throat=0.8)
    pts, rec = at(p, c, 1.5, 11000.0)
    assert "shock-detached" in rec["flags"]
    assert rec["external_recovery"] == pytest.approx(0.92979, abs=5e-6)  # NACA Report 1135
    assert rec["recovery"] == pytest.approx(ns_pt(1.5), rel=1e-12)  # K = 0, subcritical
    # and attached at the design Mach
    assert "shock-detached" not in at(p, c, 3.0, 11000.0)[1]["flags"]


def test_second_ramp_detached_takes_normal_shock_at_local_mach():
    # 10 + 10 deg ramps, M_d = 2.5; at M0 = 1.6 ramp 1 is attached, ramp 2 (local Mach about 1.24) is not
    p, c = make(inlet_type="external-ramp", ramps=(10.0, 10.0), design=2.5, flow=10.0, throat=0.8)
    rec = at(p, c, 1.6, 11000.0)[1]
    beta = math.radians(float(beta_from_mach_theta(1.6, 10.0)["weak"]))
    mn1 = 1.6 * math.sin(beta)
    mn2 = math.sqrt((1 + 0.2 * mn1**2) / (1.4 * mn1**2 - 0.2))
    m1 = mn2 / math.sin(beta - math.radians(10.0))
    assert "shock-detached" in rec["flags"]
    assert rec["external_recovery"] == pytest.approx(ns_pt(mn1) * ns_pt(m1), rel=1e-9)


# ---------------------------------------------------------------------------- additive drag (method §7)
def _hand_additive_drag_coefficient(m0, t0, p0, w, capture, pi_ext=1.0):
    tt0, pt0, rho0, v0 = freestream(m0, t0, p0)
    a0 = w / (rho0 * v0)
    pt1 = pi_ext * pt0
    m1 = sub_mach(w * math.sqrt(tt0) / (capture * pt1))
    p1 = pt1 * p_pt(m1)
    d = p1 * capture * (1 + G * m1 * m1) - p0 * a0 * (1 + G * m0 * m0) - p0 * (capture - a0)
    return d / (0.5 * G * p0 * m0 * m0 * capture)


def test_additive_drag_zero_when_capture_matches_subsonic():
    # choose the capture area = W/(rho0 V0) so that the demand gives MFR = 1 (derived from method §5, §7)
    m0, k, face = 0.6, 0.03, 1.0
    wc = wc_for_face_mach(0.45, face)
    tt0, pt0, rho0, v0 = freestream(m0, *SEA_LEVEL)
    pi = 1.0 - k * q_pt(0.45)
    w = wc * pi * pt0 / P_REF / math.sqrt(tt0 / T_REF)
    capture = w / (rho0 * v0)
    p, c = make(capture=capture, throat=capture, face=face, k=k, flow=wc)
    rec = at(p, c, m0, 0.0)[1]
    assert rec["mass_flow_kg_s"] == pytest.approx(w, rel=1e-12)
    assert rec["mass_flow_ratio"] == pytest.approx(1.0, abs=1e-12)
    assert rec["capture_mach"] == pytest.approx(m0, abs=1e-9)
    assert rec["additive_drag_coefficient"] == pytest.approx(0.0, abs=1e-9)
    assert rec["spillage_fraction"] == pytest.approx(0.0, abs=1e-12)


def test_additive_drag_positive_when_spilling_subsonic():
    m0, face = 0.6, 1.0
    wc = wc_for_face_mach(0.45, face)
    p, c = make(capture=1.4, throat=1.2, face=face, flow=wc, suction=0.8)
    rec = at(p, c, m0, 0.0)[1]
    c_add = _hand_additive_drag_coefficient(m0, *SEA_LEVEL, rec["mass_flow_kg_s"], 1.4)
    assert rec["mass_flow_ratio"] < 1.0
    assert rec["additive_drag_coefficient"] > 0.0
    assert rec["additive_drag_coefficient"] == pytest.approx(c_add, rel=1e-9)
    # spillage drag = (1 - lip suction factor) D_add in subsonic flight (method §7)
    assert rec["spillage_drag_coefficient"] == pytest.approx(0.2 * c_add, rel=1e-9)
    assert rec["spillage_fraction"] == pytest.approx(1.0 - rec["mass_flow_ratio"], rel=1e-12)


def test_additive_drag_pitot_supersonic():
    # supercritical pitot: captured flow held at MFR = 1, A0 = A_c, no additive drag
    p, c = make(flow=240.0, face=1.5, throat=0.9)
    rec = at(p, c, 2.0, 11000.0)[1]
    assert rec["regime"] == "supercritical"
    assert rec["mass_flow_ratio"] == pytest.approx(1.0, abs=1e-12)
    assert rec["additive_drag_coefficient"] == pytest.approx(0.0, abs=1e-9)
    # subcritical pitot spilling behind the normal shock: positive, as by hand with p_t1 = pi_ns p_t0
    p, c = make(flow=120.0, face=1.5, throat=0.9)
    rec = at(p, c, 2.0, 11000.0)[1]
    assert rec["regime"] == "subcritical" and rec["mass_flow_ratio"] < 0.9
    c_add = _hand_additive_drag_coefficient(2.0, *H11, rec["mass_flow_kg_s"], 1.0, pi_ext=ns_pt(2.0))
    assert rec["additive_drag_coefficient"] > 0.0
    assert rec["additive_drag_coefficient"] == pytest.approx(c_add, rel=1e-7)
    assert rec["spillage_drag_coefficient"] == rec["additive_drag_coefficient"]  # no lip suction supersonic


def test_ramp_supersonic_additive_drag_computed():
    # method §13: pre-entry drag of a ramp inlet in supersonic flight is computed (tests/test_pre_entry_drag.py
    # works it by hand); the flag additive-drag-not-modelled no longer appears for this type
    p, c = make(flow=10.0, **RAMP10)
    rec = at(p, c, 1.8, 11000.0)[1]
    assert rec["additive_drag_coefficient"] is not None and rec["additive_drag_coefficient"] > 0.0
    assert rec["additive_drag_n"] is not None
    assert "additive-drag-not-modelled" not in rec["flags"]
    rec = at(p, c, 0.8, 11000.0)[1]
    assert rec["additive_drag_coefficient"] is not None and "additive-drag-not-modelled" not in rec["flags"]


# ---------------------------------------------------------------------------- supercritical and throat (§6)
def test_supercritical_recovery_pitot():
    m0, face, k, wc = 2.0, 1.5, 0.04, 250.0
    p, c = make(flow=wc, face=face, k=k, throat=0.9)
    tt0, pt0, rho0, v0 = freestream(m0, *H11)
    m2 = sub_mach(wc * math.sqrt(T_REF) / (P_REF * face))
    pi_crit = ns_pt(m0) * (1.0 - k * q_pt(m2))
    mfr_demand = wc * pi_crit * pt0 / P_REF / math.sqrt(tt0 / T_REF) / (rho0 * v0 * 1.0)
    assert mfr_demand > 1.1
    pts, rec = at(p, c, m0, 11000.0)
    assert rec["regime"] == "supercritical" and "supercritical" in rec["flags"]
    assert rec["recovery"] == pytest.approx(pi_crit * 1.0 / mfr_demand, rel=1e-10)
    assert rec["mass_flow_ratio"] == pytest.approx(1.0, rel=1e-12)
    assert rec["face_mach"] == pytest.approx(m2, abs=1e-10)  # the corrected demand is met at the lower p_t2


def test_supercritical_recovery_ramp():
    m0, face, wc = 1.8, 1.5, 230.0
    p, c = make(flow=wc, **{**RAMP10, "face": face})
    tt0, pt0, rho0, v0 = freestream(m0, *H11)
    beta = math.radians(float(beta_from_mach_theta(m0, 10.0)["weak"]))
    mn1 = m0 * math.sin(beta)
    mn2 = math.sqrt((1 + 0.2 * mn1**2) / (1.4 * mn1**2 - 0.2))
    m_ramp = mn2 / math.sin(beta - math.radians(10.0))
    pi_crit = ns_pt(mn1) * ns_pt(m_ramp)  # K = 0
    mfr_max = _lip_streamline_mfr_max(m0, 10.0, 2.0)
    mfr_demand = wc * pi_crit * pt0 / P_REF / math.sqrt(tt0 / T_REF) / (rho0 * v0)
    assert mfr_demand > 1.05 * mfr_max
    rec = at(p, c, m0, 11000.0)[1]
    assert "throat-choked" not in rec["flags"]
    assert rec["regime"] == "supercritical"
    assert rec["recovery"] == pytest.approx(pi_crit * mfr_max / mfr_demand, rel=1e-9)
    assert rec["mass_flow_ratio"] == pytest.approx(mfr_max, rel=1e-9)


def test_critical_band():
    # |MFR/MFR_max - 1| <= 0.5 %: critical, recovery not reduced (method §6)
    m0 = 2.0
    tt0, pt0, rho0, v0 = freestream(m0, *H11)
    pi = ns_pt(m0)
    for target, regime in ((0.997, "critical"), (1.004, "critical"), (0.99, "subcritical"), (1.01, "supercritical")):
        wc = target * rho0 * v0 * P_REF * math.sqrt(tt0 / T_REF) / (pi * pt0)
        p, c = make(flow=wc, face=1.5, throat=0.9)
        rec = at(p, c, m0, 11000.0)[1]
        assert rec["regime"] == regime, target
        if target < 1.0:
            assert rec["recovery"] == pytest.approx(pi, rel=1e-12)
            assert rec["mass_flow_ratio"] == pytest.approx(target, rel=1e-12)


def test_captured_flow_never_exceeds_max_capture():
    m0 = 2.0
    tt0, pt0, rho0, v0 = freestream(m0, *H11)
    wc = 1.0049 * rho0 * v0 * P_REF * math.sqrt(tt0 / T_REF) / (ns_pt(m0) * pt0)
    p, c = make(flow=wc, face=1.5, throat=0.9)
    rec = at(p, c, m0, 11000.0)[1]
    assert rec["mass_flow_ratio"] <= rec["max_mass_flow_ratio"] * (1.0 + 1e-12)
    assert rec["additive_drag_coefficient"] >= -1e-9


def test_throat_choked_subsonic():
    m0, wc, throat = 0.3, 60.0, 0.2
    p, c = make(capture=0.5, throat=throat, face=0.5, flow=wc, throat_mach_max=0.8)
    tt0, pt0, rho0, v0 = freestream(m0, *SEA_LEVEL)
    w_choke = throat * 1.0 * pt0 * MFP_STAR / math.sqrt(tt0)  # A_th pi_ext p_t0 MFP* / sqrt(T_t0)
    pts, rec = at(p, c, m0, 0.0)
    assert "throat-choked" in rec["flags"]
    assert rec["throat_mach"] == 1.0
    assert rec["mass_flow_kg_s"] == pytest.approx(w_choke, rel=1e-12)
    # recovery falls so that W = W_c2 (pi p_t0/p_ref)/sqrt(theta2) equals the choked flow
    assert rec["recovery"] == pytest.approx(w_choke * P_REF * math.sqrt(tt0 / T_REF) / (wc * pt0), rel=1e-12)
    assert rec["mass_flow_ratio"] == pytest.approx(w_choke / (rho0 * v0 * 0.5), rel=1e-12)
    assert bool(pts.check("throat-mach").fails[0])


def test_throat_mach_by_hand():
    m0, wc = 0.5, 40.0
    p, c = make(capture=0.6, throat=0.5, face=0.5, flow=wc, k=0.02)
    tt0, pt0, _, _ = freestream(m0, *SEA_LEVEL)
    m2 = sub_mach(wc * math.sqrt(T_REF) / (P_REF * 0.5))
    pi = 1.0 - 0.02 * q_pt(m2)
    w = wc * pi * pt0 / P_REF / math.sqrt(tt0 / T_REF)
    m_th = sub_mach(w * math.sqrt(tt0) / (0.5 * pt0))  # MFP_th = W sqrt(T_t0)/(A_th pi_ext p_t0)
    rec = at(p, c, m0, 0.0)[1]
    assert rec["throat_mach"] == pytest.approx(m_th, abs=1e-10)
    # face static to ambient (method §5): pi p_t0 p/p_t(M2) / p0
    assert rec["face_static_to_ambient"] == pytest.approx(pi * pt0 * p_pt(m2) / SEA_LEVEL[1], rel=1e-12)


def test_buzz_risk_flag():
    """Buzz needs an oblique shock ahead of the cowl (method §10): a pitot spilling subcritically in
    supersonic flight is stable (common practice); a ramp inlet with its shock attached is flagged below the
    stable fraction of MFR_max and not above it."""
    m0 = 2.0
    tt0, pt0, rho0, v0 = freestream(m0, *H11)
    pi = ns_pt(m0)
    for target in (0.5, 0.84, 0.86, 0.95):
        wc = target * rho0 * v0 * P_REF * math.sqrt(tt0 / T_REF) / (pi * pt0)
        p, c = make(flow=wc, face=1.5, throat=0.9, sff=0.85)
        rec = at(p, c, m0, 11000.0)[1]
        assert rec["mass_flow_ratio"] == pytest.approx(target, rel=1e-12)
        assert "buzz-risk" not in rec["flags"], target
    for flow, buzz in ((40.0, True), (160.0, False)):
        p, c = make(flow=flow, sff=0.85, **RAMP10)
        pts, rec = at(p, c, 1.8, 11000.0)
        fraction = rec["mass_flow_ratio"] / rec["max_mass_flow_ratio"]
        assert (fraction < 0.85) is buzz and rec["regime"] == "subcritical"
        assert ("buzz-risk" in rec["flags"]) is buzz, flow
    # no threshold given: never flagged
    p, c = make(flow=10.0, face=1.5, throat=0.9)
    assert "buzz-risk" not in at(p, c, m0, 11000.0)[1]["flags"]


# ---------------------------------------------------------------------------- demand (method §2)
def test_demand_interpolation_and_extrapolation():
    p, c = make(theta=(0.9, 1.1), flows=(60.0, 50.0))
    rec = at(p, c, 0.3, 0.0)[1]  # theta2 = 1.018
    assert rec["theta2"] == pytest.approx(1.018, rel=1e-12)
    assert rec["corrected_flow_kg_s"] == pytest.approx(60.0 - 10.0 * 0.118 / 0.2, rel=1e-12)
    assert "demand-extrapolated" not in rec["flags"]
    rec = at(p, c, 0.3, 11000.0)[1]  # theta2 = 216.65 * 1.018 / 288.15 = 0.7654
    assert "demand-extrapolated" in rec["flags"] and rec["corrected_flow_kg_s"] == 60.0
    rec = at(p, c, 1.2, 0.0)[1]  # theta2 = 1.288
    assert "demand-extrapolated" in rec["flags"] and rec["corrected_flow_kg_s"] == 50.0


def test_isa_offset_enters_theta():
    p, c = make(theta=(0.9, 1.1), flows=(60.0, 50.0), isa=20.0)
    rec = at(p, c, 0.3, 0.0)[1]
    assert rec["freestream"]["static_temperature_k"] == pytest.approx(308.15)
    assert rec["theta2"] == pytest.approx(308.15 * 1.018 / 288.15, rel=1e-12)


# ---------------------------------------------------------------------------- low speed, tip Mach (§3, §5)
@pytest.mark.parametrize("m0", [0.0, 0.03, 0.0499])
def test_low_speed(m0):
    wc, throat = 40.0, 0.4
    p, c = make(capture=0.5, throat=throat, face=0.5, flow=wc, k=0.03)
    rec = at(p, c, m0, 0.0)[1]
    assert "low-speed" in rec["flags"]
    for key in ("mass_flow_ratio", "max_mass_flow_ratio", "spillage_fraction", "additive_drag_coefficient"):
        assert rec[key] is None, key
    # face and throat Mach still computed, with p_t0 = p0
    m2 = sub_mach(wc * math.sqrt(T_REF) / (P_REF * 0.5))
    assert rec["face_mach"] == pytest.approx(m2, abs=1e-10)
    tt0 = 288.15 * base(m0)
    pi = 1.0 - 0.03 * q_pt(m2)
    w = wc * pi * SEA_LEVEL[1] / P_REF / math.sqrt(tt0 / T_REF)
    assert rec["mass_flow_kg_s"] == pytest.approx(w, rel=1e-12)
    assert rec["throat_mach"] == pytest.approx(sub_mach(w * math.sqrt(tt0) / (throat * SEA_LEVEL[1])), abs=1e-10)
    assert math.isfinite(rec["throat_mach"]) and math.isfinite(rec["face_mach"])


def test_relative_tip_mach_by_hand():
    tip = 430.0
    p, c = make(flow=wc_for_face_mach(0.5, 1.0), tip=tip)
    rec = at(p, c, 0.4, 5000.0)[1]
    tt0 = 255.65 * base(0.4)
    a2 = math.sqrt(G * R * tt0 / base(0.5))
    assert rec["face_mach"] == pytest.approx(0.5, abs=1e-9)
    assert rec["relative_tip_mach"] == pytest.approx(math.sqrt(0.25 + (tip / a2) ** 2), rel=1e-9)
    assert "no-tip-speed" not in rec["flags"]
    p, c = make(flow=wc_for_face_mach(0.5, 1.0))
    rec = at(p, c, 0.4, 5000.0)[1]
    assert rec["relative_tip_mach"] is None and "no-tip-speed" in rec["flags"]


def test_outside_atmosphere_point():
    p, c = make(flow=40.0)
    pts, rec = at(p, c, 0.5, 90000.0)
    assert "outside-atmosphere" in rec["flags"]
    assert rec["recovery"] is None and rec["face_mach"] is None and rec["freestream"]["static_pressure_pa"] is None


# ---------------------------------------------------------------------------- properties
# Which flags explain a None in the point record (method §8: never a silent NaN).
LOW_SPEED_KEYS = {"mass_flow_ratio", "max_mass_flow_ratio", "spillage_fraction", "additive_drag_n",
                  "additive_drag_coefficient", "spillage_drag_coefficient"}
DRAG_KEYS = {"additive_drag_n", "additive_drag_coefficient", "spillage_drag_coefficient"}
EXPLAINING = {"low-speed", "outside-atmosphere", "additive-drag-not-modelled", "no-tip-speed", "no-thrust-data"}
LEDGER_KEYS = {"net_thrust_n", "installed_thrust_n", "installation_loss_fraction"}


def _explained(key, flags):
    if "outside-atmosphere" in flags:
        return True
    if key in LOW_SPEED_KEYS and "low-speed" in flags:
        return True
    if key in DRAG_KEYS and "additive-drag-not-modelled" in flags:
        return True
    if key in ("relative_tip_mach", "tip_speed_m_s") and "no-tip-speed" in flags:
        return True
    if key in LEDGER_KEYS and "no-thrust-data" in flags:
        return True
    if key in ("spillage_drag_n", "installed_thrust_n", "installation_loss_fraction") \
            and "additive-drag-not-modelled" in flags:
        return True
    return False


@st.composite
def projects(draw):
    kind = draw(st.sampled_from(["pitot", "external-ramp"]))
    capture = draw(st.floats(0.2, 3.0))
    throat = capture * draw(st.floats(0.5, 1.0))
    face = capture * draw(st.floats(0.5, 1.5))
    ramps, design = (), None
    if kind == "external-ramp":
        n = draw(st.integers(1, 3))
        ramps = tuple(draw(st.lists(st.floats(2.0, 12.0), min_size=n, max_size=n)))
        design = draw(st.floats(1.5, 3.5))
        assume(not ramp_design_problems(ramps, design))
    n_theta = draw(st.integers(2, 4))
    theta = sorted(draw(st.lists(st.floats(0.6, 2.2), min_size=n_theta, max_size=n_theta, unique=True)))
    assume(min(np.diff(theta)) > 1e-3)
    flows = draw(st.lists(st.floats(5.0, 250.0), min_size=n_theta, max_size=n_theta))
    per_area = max(flows) / face
    assume(per_area < 1e5)
    tip = draw(st.one_of(st.none(), st.floats(200.0, 500.0)))
    sff = draw(st.one_of(st.none(), st.floats(0.5, 0.95)))
    isa = draw(st.floats(-30.0, 40.0))
    return make(kind, capture, throat, face, k=draw(st.floats(0.0, 0.3)), suction=draw(st.floats(0.0, 1.0)),
                ramps=ramps, design=design, theta=theta, flows=flows, tip=tip, sff=sff, isa=isa)


conditions = st.tuples(
    st.lists(st.floats(0.0, 3.0), min_size=20, max_size=20),
    st.lists(st.floats(-6000.0, 90000.0), min_size=20, max_size=20),
)
PROP = settings(max_examples=60, deadline=None, derandomize=True,
                suppress_health_check=[HealthCheck.filter_too_much, HealthCheck.too_slow])


@PROP
@given(projects(), conditions)
def test_properties_recovery_and_capture(pc, cond):
    p, c = pc
    mach, alt = np.array(cond[0]), np.array(cond[1])
    pts = evaluate_conditions(p, c, mach, alt)
    rec = pts.recovery
    finite = np.isfinite(rec)
    assert np.all(rec[finite] <= 1.0 + 1e-12)
    assert np.all(rec[finite] >= 0.0)
    sup = (mach > 1.0) & np.isfinite(pts.max_mass_flow_ratio)
    assert np.all(pts.max_mass_flow_ratio[sup] <= 1.0)
    assert np.all(pts.max_mass_flow_ratio[sup] > 0.0)
    # recovery never above the external (shock) recovery
    assert np.all(rec[finite] <= pts.external_recovery[finite] + 1e-12)
    # every point inside the atmosphere has a finite face Mach in [0, 1]
    inside = ~F.has(pts.flags, F.OUTSIDE_ATMOSPHERE)
    assert np.all((pts.face_mach[inside] >= 0.0) & (pts.face_mach[inside] <= 1.0))
    # regime names are valid; supercritical regime and flag coincide
    assert set(pts.regime.tolist()) <= set(range(len(REGIMES)))
    assert np.array_equal(pts.regime == 3, F.has(pts.flags, F.SUPERCRITICAL))


@PROP
@given(projects(), conditions, st.floats(1.01, 3.0))
def test_property_face_mach_rises_with_demand(pc, cond, factor):
    p, c = pc
    mach, alt = np.array(cond[0]), np.array(cond[1])
    r = p.ratings[0]
    bigger = Project(p.limits, p.inlet, (Rating(r.name, r.theta, tuple(f * factor for f in r.corrected_flow_kg_s),
                                                r.fan_tip_speed_m_s),), p.envelope, cases=p.cases)
    a = evaluate_conditions(p, c, mach, alt)
    b = evaluate_conditions(bigger, c, mach, alt)
    inside = ~F.has(a.flags, F.OUTSIDE_ATMOSPHERE)
    assert np.all(b.face_mach[inside] >= a.face_mach[inside])
    not_choked = inside & ~F.has(b.flags, F.FACE_CHOKED)
    assert np.all(b.face_mach[not_choked] > a.face_mach[not_choked])


def _nones(record, prefix=""):
    for key, value in record.items():
        if key in ("checks", "flag_descriptions", "limiting"):
            continue
        if key in ("started", "self_start_contraction", "entrance_area_m2", "internal_contraction_ratio") \
                and record["started"] is None:
            continue  # null by contract unless the inlet is mixed-compression (interfaces, point JSON)
        if key in ("dc60", "surge_margin_loss", "remaining_surge_margin", "angle_of_attack_deg", "sideslip_deg"):
            continue  # null by contract without measured data / a case incidence (interfaces, Additions 2)
        if isinstance(value, dict):
            yield from _nones(value, prefix + key + ".")
        elif value is None:
            yield prefix + key


@PROP
@given(projects(), conditions)
def test_property_no_silent_nan(pc, cond):
    p, c = pc
    pts = evaluate_conditions(p, c, np.array(cond[0]), np.array(cond[1]))
    for i in range(len(cond[0])):
        rec = point_record(pts, i, c.name)
        flags = set(rec["flags"])
        for key in _nones(rec):
            assert _explained(key.split(".")[-1], flags), (key, cond[0][i], cond[1][i], sorted(flags))
        if any(True for _ in _nones(rec)):
            assert flags & EXPLAINING
        assert all(name in F.DESCRIPTIONS for name in rec["flags"])


def test_recovery_minus_reference_maps_what_the_reference_check_compares():
    """The map quantity equals the check's value - reference (pi / pi_duct against MIL-E-5008B), supersonic only.

    MIL-E-5008B: pi_ref = 1 - 0.075 (M0 - 1)^1.35 for 1 < M0 < 5 (0.925 at M0 = 2)."""
    from dataclasses import replace
    from pathlib import Path

    from engine_air.project.toml_file import load_project

    project = load_project(Path(__file__).resolve().parents[1] / "sample_projects" / "supersonic_two_ramp.toml")
    project = replace(project, limits=replace(project.limits, recovery_min="mil-e-5008b"))
    mach = np.array([0.8, 1.5, 2.0])
    pts = evaluate_conditions(project, project.cases[0], mach, np.array([10000.0]))
    assert np.isnan(pts.recovery_minus_reference[0])  # subsonic: not judged
    reference = 1.0 - 0.075 * (mach[1:] - 1.0) ** 1.35
    expected = pts.recovery[1:] / pts.duct_recovery[1:] - reference
    np.testing.assert_allclose(pts.recovery_minus_reference[1:], expected, rtol=1e-12)
    # at M0 = 1.5 (subcritical, ramp 2 detached) pi/pi_duct is the shock system worked here: oblique 8 deg
    # (pygasflow's weak wave angle), then one normal shock at the Mach behind it (method §4)
    assert pts.regime.ravel()[1] == REGIMES.index("subcritical")
    beta = math.radians(float(beta_from_mach_theta(1.5, 8.0)["weak"]))
    mn1 = 1.5 * math.sin(beta)
    mn2 = math.sqrt((1 + 0.2 * mn1**2) / (1.4 * mn1**2 - 0.2))
    m1 = mn2 / math.sin(beta - math.radians(8.0))
    by_hand = ns_pt(mn1) * ns_pt(m1) - (1.0 - 0.075 * 0.5**1.35)
    assert float(pts.recovery_minus_reference.ravel()[1]) == pytest.approx(by_hand, rel=1e-9, abs=1e-12)
    check = pts.check("recovery")
    np.testing.assert_allclose(check.margin[1:], pts.recovery_minus_reference[1:], rtol=1e-12)
