"""Airflow management (method section 12): bleed, bypass doors, auxiliary take-off doors.

Expected values are worked by hand inside each test from the relations named beside them, with the free
stream from the published U.S. Standard Atmosphere 1976 values (sea level: T = 288.15 K, p = 101 325 Pa,
a = 340.294 m/s, rho = 1.2250 kg/m^3; 11 000 m: T = 216.65 K, p = 22 632.06 Pa) and gas properties
gamma = 1.4, R = 287.0531 J/(kg K) (method conventions).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from pygasflow import isentropic_solver

from engine_air.envelope import flags as F
from engine_air.flow.airflow import door_flow, exit_mach
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.flow.match import REGIMES
from engine_air.project.model import Case, Envelope, Inlet, Limits, Project, Rating

G = 1.4
R = 8314.32 / 28.9644  # 287.0531..., the 1976 standard's gas constant and molar mass (method conventions)
T_REF, P_REF = 288.15, 101325.0


def project(inlet: dict | None = None, flow: float = 60.0, limits: dict | None = None) -> Project:
    geometry = dict(type="pitot", capture_area_m2=0.5, throat_area_m2=0.45, face_area_m2=0.5)
    geometry.update(inlet or {})
    return Project(
        limits=Limits(face_mach_max=0.7, **(limits or {})),
        inlet=Inlet(**geometry),
        ratings=(Rating("r", theta=(0.5, 2.5), corrected_flow_kg_s=(flow, flow)),),
        envelope=Envelope((0.0, 3.0, 3.0, 0.0), (0.0, 0.0, 20000.0, 20000.0)),
        cases=(Case("c", "r"),),
    )


def at(p: Project, mach: float, altitude: float):
    return evaluate_conditions(p, p.cases[0], np.array([mach]), np.array([altitude]))


def mfp(m):
    """Mass-flow function W sqrt(T_t)/(A p_t) = sqrt(g/R) M (1 + (g-1)/2 M^2)^(-(g+1)/(2(g-1))) (NACA 1135)."""
    return math.sqrt(G / R) * m * (1.0 + 0.2 * m * m) ** -3.0


def engine_flow_sea_level(mach: float, flow: float, recovery: float = 1.0) -> float:
    """W = W_c2 (pi p_t0/p_ref)/sqrt(theta2) at sea level (method section 5), by hand."""
    base = 1.0 + 0.2 * mach * mach
    return flow * recovery * base ** 3.5 / math.sqrt(base)


# ---------------------------------------------------------------------------- bleed
def test_bleed_captured_flow_and_mass_flow_ratio_by_hand():
    # M0 = 0.6, sea level, K = 0 (pi = 1), b = 0.05: captured = W_e/(1 - b), MFR = captured/(rho0 V0 A_c).
    pts = at(project({"bleed_fraction": 0.05}), 0.6, 0.0)
    w_e = engine_flow_sea_level(0.6, 60.0)
    captured = w_e / (1.0 - 0.05)
    v0 = 0.6 * 340.294  # 1976 standard, sea-level speed of sound
    mfr = captured / (1.2250 * v0 * 0.5)  # 1976 standard, sea-level density
    assert float(pts.mass_flow_kg_s[0]) == pytest.approx(w_e, rel=1e-12)
    assert float(pts.captured_flow_kg_s[0]) == pytest.approx(captured, rel=1e-12)
    assert float(pts.bleed_flow_kg_s[0]) == pytest.approx(0.05 * captured, rel=1e-12)
    assert float(pts.bleed_fraction[0]) == 0.05
    assert float(pts.mass_flow_ratio[0]) == pytest.approx(mfr, rel=2e-5)  # table values to 5-6 digits
    # bleed changes no recovery (method section 12 decisions)
    assert float(pts.recovery[0]) == pytest.approx(1.0, abs=1e-15)


def test_bleed_drag_from_the_momentum_relation():
    # D_b = W_b (V0 - r_b V0): the bled air leaves with axial velocity r_b V0 (momentum relation).
    pts = at(project({"bleed_fraction": 0.04, "bleed_exit_velocity_ratio": 0.4}), 0.8, 0.0)
    w_b = 0.04 * engine_flow_sea_level(0.8, 60.0) / 0.96
    v0 = 0.8 * 340.294
    assert float(pts.bleed_drag_n[0]) == pytest.approx(w_b * (v0 - 0.4 * v0), rel=2e-6)


def test_no_bleed_no_doors_changes_nothing():
    a = at(project(), 0.7, 3000.0)
    b = at(project({"bleed_exit_velocity_ratio": 0.5, "bypass_exit_velocity_ratio": 0.3}), 0.7, 3000.0)
    for key in ("mass_flow_kg_s", "mass_flow_ratio", "recovery", "throat_mach", "additive_drag_n"):
        assert float(getattr(a, key)[0]) == float(getattr(b, key)[0])
    assert float(b.bleed_drag_n[0]) == 0.0 and float(b.bypass_drag_n[0]) == 0.0


# ---------------------------------------------------------------------------- bypass doors
def test_choked_door_flow_is_the_naca_1135_critical_flow():
    # At M = 1 (NACA 1135 critical ratios): W sqrt(T_t)/(A p_t) = sqrt(g/R) (2/(g+1))^((g+1)/(2(g-1))),
    # 0.0404147 for air (method section 3; times p_ref/sqrt(T_ref) the 241.24 kg/(s m^2) choking flow).
    critical = math.sqrt(G / R) * (2.0 / (G + 1.0)) ** ((G + 1.0) / (2.0 * (G - 1.0)))
    assert critical * P_REF / math.sqrt(T_REF) == pytest.approx(241.24, abs=0.005)
    pt, tt = 200000.0, 400.0
    for p0 in (20000.0, 0.5 * pt, 0.528 * pt):  # below the critical ratio p*/p_t = 0.52828
        w = float(door_flow(0.1, 0.9, pt, tt, p0))
        assert w == pytest.approx(0.9 * 0.1 * pt * critical / math.sqrt(tt), rel=1e-12)


def test_unchoked_door_flow_below_the_critical_pressure_ratio():
    # p0/p_t = 0.7: M_e from the isentropic relation (pygasflow: M = 0.73240), flow by the mass-flow function.
    m_e = float(isentropic_solver("pressure", 0.7, to_dict=True)["m"])
    assert float(exit_mach(0.7)) == pytest.approx(m_e, rel=1e-12)
    pt, tt = 150000.0, 300.0
    w = float(door_flow(0.2, 0.85, pt, tt, 0.7 * pt))
    assert w == pytest.approx(0.85 * 0.2 * pt * mfp(m_e) / math.sqrt(tt), rel=1e-12)
    assert float(door_flow(0.2, 0.85, pt, tt, pt)) == 0.0  # no pressure difference, no flow
    assert float(door_flow(0.2, 0.85, pt, tt, 0.6 * pt)) < float(door_flow(0.2, 0.85, pt, tt, 0.5 * pt))


def _supersonic_case(area: float):
    """Pitot inlet at M0 = 2, 11 000 m, with a small engine demand (subcritical): the flows by hand."""
    p = project({"bypass_area_m2": area, "bypass_exit_velocity_ratio": 0.25}, flow=40.0)
    t0, p0 = 216.65, 22632.06  # 1976 standard at 11 000 m
    tt0, pt0 = t0 * 1.8, p0 * 1.8 ** 3.5
    pi_ns = 0.72087  # NACA 1135 normal-shock table, M1 = 2
    w_e = 40.0 * (pi_ns * pt0 / P_REF) / math.sqrt(tt0 / T_REF)
    v0 = 2.0 * math.sqrt(G * R * t0)
    capture_flow = p0 / (R * t0) * v0 * 0.5  # MFR_max = 1 for a pitot inlet
    critical = math.sqrt(G / R) * (2.0 / (G + 1.0)) ** 3.0
    capacity = 0.9 * area * pi_ns * pt0 * critical / math.sqrt(tt0)  # p0/p_t = 0.18: choked
    return at(p, 2.0, 11000.0), w_e, v0, capture_flow, capacity


def test_bypass_doors_hold_the_inlet_critical():
    pts, w_e, v0, capture_flow, capacity = _supersonic_case(0.4)
    need = capture_flow - w_e
    assert need < capacity
    assert float(pts.bypass_flow_kg_s[0]) == pytest.approx(need, rel=1e-4)
    assert float(pts.mass_flow_ratio[0]) == pytest.approx(1.0, rel=1e-12)
    assert REGIMES[int(pts.regime[0])] == "critical"
    assert float(pts.bypass_fraction[0]) == pytest.approx(need / capture_flow, rel=1e-4)
    assert float(pts.bypass_drag_n[0]) == pytest.approx(need * v0 * (1.0 - 0.25), rel=1e-4)
    assert not F.has(pts.flags, F.BYPASS_INSUFFICIENT)[0]


def test_bypass_capacity_exceeded_spills_the_rest_and_says_so():
    pts, w_e, v0, capture_flow, capacity = _supersonic_case(0.01)
    assert capture_flow - w_e > capacity
    assert float(pts.bypass_flow_kg_s[0]) == pytest.approx(capacity, rel=1e-4)
    mfr = (w_e + capacity) / capture_flow
    assert float(pts.mass_flow_ratio[0]) == pytest.approx(mfr, rel=1e-4)
    assert float(pts.spillage_fraction[0]) == pytest.approx(1.0 - mfr, rel=1e-3)
    assert REGIMES[int(pts.regime[0])] == "subcritical"
    assert F.has(pts.flags, F.BYPASS_INSUFFICIENT)[0]
    assert "bypass-insufficient" in F.DESCRIPTIONS
    # the excess is exposed (a mixed-compression inlet would unstart on it)
    assert float(pts.bypass_shortfall_kg_s[0]) == pytest.approx(capture_flow - w_e - capacity, rel=1e-3)


def test_bypass_doors_shut_in_subsonic_flight_and_when_supercritical():
    sub = at(project({"bypass_area_m2": 0.3}, flow=20.0), 0.8, 11000.0)
    assert float(sub.bypass_flow_kg_s[0]) == 0.0
    over = at(project({"bypass_area_m2": 0.3}, flow=200.0), 2.0, 11000.0)
    assert REGIMES[int(over.regime[0])] == "supercritical"
    assert float(over.bypass_flow_kg_s[0]) == 0.0


# ---------------------------------------------------------------------------- auxiliary doors
def test_auxiliary_doors_share_the_flow_in_proportion_to_area():
    # Throat 0.2 m^2 and doors 0.1 m^2 at one Mach number: the doors carry 1/3 of the flow, and the throat
    # Mach follows from the flow over the combined area (MFP relation, NACA 1135); K_aux = 0: no extra loss.
    p = project({"throat_area_m2": 0.2, "auxiliary_inlet_area_m2": 0.1, "auxiliary_door_mach_max": 0.35})
    pts = at(p, 0.2, 0.0)
    w = engine_flow_sea_level(0.2, 60.0)
    pt0 = P_REF * 1.008 ** 3.5
    ratio = w * math.sqrt(T_REF * 1.008) / (0.3 * pt0)
    m_th = float(isentropic_solver("crit_area_sub", 1.0 / (ratio / mfp(1.0)), to_dict=True)["m"])
    assert float(pts.throat_mach[0]) == pytest.approx(m_th, rel=1e-8)
    assert float(pts.auxiliary_flow_kg_s[0]) == pytest.approx(w / 3.0, rel=1e-12)
    assert float(pts.captured_flow_kg_s[0]) == pytest.approx(2.0 * w / 3.0, rel=1e-12)


def test_auxiliary_door_loss_on_their_share():
    # Mass-averaged recovery of the throat plane: 1 - share K_aux q/p_t(M_th), q/p_t = (g/2) M^2 (p/p_t).
    base = {"throat_area_m2": 0.2, "auxiliary_inlet_area_m2": 0.1, "auxiliary_door_mach_max": 0.35}
    lossless = at(project(base), 0.2, 0.0)
    lossy = at(project({**base, "auxiliary_loss_coefficient": 0.6}), 0.2, 0.0)
    m = float(lossless.throat_mach[0])
    q_pt = 0.5 * G * m * m * (1.0 + 0.2 * m * m) ** -3.5
    assert float(lossy.recovery[0]) == pytest.approx(1.0 - (1.0 / 3.0) * 0.6 * q_pt, rel=1e-12)


def test_auxiliary_doors_relieve_a_choked_throat_and_shut_above_their_mach():
    small = {"throat_area_m2": 0.12}
    shut = at(project(small), 0.2, 0.0)
    assert F.has(shut.flags, F.THROAT_CHOKED)[0]
    opened = at(project({**small, "auxiliary_inlet_area_m2": 0.15, "auxiliary_door_mach_max": 0.35}), 0.2, 0.0)
    assert not F.has(opened.flags, F.THROAT_CHOKED)[0]
    above = at(project({**small, "auxiliary_inlet_area_m2": 0.15, "auxiliary_door_mach_max": 0.35}), 0.5, 0.0)
    assert float(above.auxiliary_flow_kg_s[0]) == 0.0
