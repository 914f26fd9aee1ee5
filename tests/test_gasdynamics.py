"""One-dimensional gas dynamics (method §3, §4): table values, pygasflow cross-checks, flow function."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from pygasflow.shockwave import beta_from_mach_theta, max_theta_from_mach
from pygasflow.solvers import isentropic_solver, normal_shockwave_solver, oblique_shockwave_solver
from scipy.optimize import brentq

from engine_air.physics import isentropic, shocks
from engine_air.physics.constants import GAMMA, P_REF, R_AIR, T_REF

LBM_PER_KG = 1.0 / 0.45359237
FT2_PER_M2 = 1.0 / 0.3048**2

HYPO = settings(max_examples=300, deadline=None, derandomize=True)


# ---------------------------------------------------------------------------- NACA Report 1135 table values
def test_isentropic_at_mach_2():
    assert float(isentropic.pressure_ratio(2.0)) == pytest.approx(0.12780, abs=5e-6)  # NACA Report 1135, Table I
    assert float(isentropic.temperature_ratio(2.0)) == pytest.approx(0.55556, abs=5e-6)  # NACA Report 1135, Table I
    assert float(isentropic.area_ratio(2.0)) == pytest.approx(1.6875, abs=5e-5)  # NACA Report 1135, Table I
    assert float(isentropic.density_ratio(2.0)) == pytest.approx(0.23005, abs=5e-6)  # NACA Report 1135, Table I


def test_normal_shock_at_mach_2():
    ns = shocks.normal_shock(2.0)
    assert float(ns.downstream_mach) == pytest.approx(0.57735, abs=5e-6)  # NACA Report 1135, Table II
    assert float(ns.total_pressure_ratio) == pytest.approx(0.72087, abs=5e-6)  # NACA Report 1135, Table II
    assert float(ns.static_pressure_ratio) == pytest.approx(4.5000, abs=5e-5)  # NACA Report 1135, Table II
    assert float(ns.static_temperature_ratio) == pytest.approx(1.6875, abs=5e-5)  # NACA Report 1135, Table II


def test_normal_shock_at_mach_1_5():
    ns = shocks.normal_shock(1.5)
    assert float(ns.downstream_mach) == pytest.approx(0.70109, abs=5e-6)  # NACA Report 1135, Table II
    assert float(ns.total_pressure_ratio) == pytest.approx(0.92979, abs=5e-6)  # NACA Report 1135, Table II


def test_normal_shock_absent_when_subsonic():
    # derived from method §4: no shock for M <= 1
    ns = shocks.normal_shock(np.array([0.0, 0.5, 1.0]))
    np.testing.assert_array_equal(ns.downstream_mach, [0.0, 0.5, 1.0])
    np.testing.assert_array_equal(ns.total_pressure_ratio, 1.0)
    np.testing.assert_array_equal(ns.static_pressure_ratio, 1.0)


def test_oblique_shock_mach_2_ten_degrees():
    ob = shocks.oblique_shock(2.0, math.radians(10.0))
    assert bool(ob.attached)
    # NACA Report 1135, Chart 2, read by eye: wave angle 39.3 deg; a chart gives about +-0.5 deg
    assert math.degrees(float(ob.wave_angle_rad)) == pytest.approx(39.3, abs=0.5)
    # NACA Report 1135, oblique-shock charts, read by eye: M2 about 1.64 (+-0.01), p_t2/p_t1 about 0.985 (+-0.005)
    assert float(ob.downstream_mach) == pytest.approx(1.64, abs=0.01)
    assert float(ob.total_pressure_ratio) == pytest.approx(0.985, abs=0.005)
    # exact: pygasflow's weak solution at M = 2, theta = 10 deg (beta 39.31393 deg, M2 1.640522, 0.984644)
    ref = oblique_shockwave_solver("mu", 2.0, "theta", 10.0, flag="weak", to_dict=True)
    assert math.degrees(float(ob.wave_angle_rad)) == pytest.approx(float(ref["beta"]), abs=1e-8)
    assert float(ob.downstream_mach) == pytest.approx(float(ref["md"]), rel=1e-9)
    assert float(ob.total_pressure_ratio) == pytest.approx(float(ref["tpr"]), rel=1e-12)


def _max_deflection_by_hand(m):
    """Maximum deflection (rad) at Mach m: sin^2 beta from NACA Report 1135 eq. 168, theta from eq. 138."""
    s2 = ((GAMMA + 1) / 4 * m * m - 1 + math.sqrt((GAMMA + 1) * ((GAMMA + 1) / 16 * m**4 + (GAMMA - 1) / 2 * m * m + 1))) / (GAMMA * m * m)
    b = math.asin(math.sqrt(s2))
    return math.atan(2 / math.tan(b) * (m * m * s2 - 1) / (m * m * (GAMMA + math.cos(2 * b)) + 2))


def test_max_deflection_at_mach_2():
    theta_max = math.degrees(float(shocks.max_deflection_rad(2.0)))
    # NACA Report 1135, Chart 2, read by eye: maximum deflection about 23 deg at M = 2 (+-0.5 deg)
    assert theta_max == pytest.approx(23.0, abs=0.5)
    # exact: NACA Report 1135 eqs. 168 and 138 worked here (22.9735 deg), and pygasflow
    assert theta_max == pytest.approx(math.degrees(_max_deflection_by_hand(2.0)), abs=1e-9)
    assert theta_max == pytest.approx(float(max_theta_from_mach(2.0)), abs=1e-8)
    assert float(shocks.max_deflection_rad(1.0)) == 0.0


def test_oblique_shock_detached_and_mach_wave():
    ob = shocks.oblique_shock(np.array([2.0, 2.0, 0.9, 2.0]), np.radians([25.0, 0.0, 5.0, 22.0]))
    assert ob.attached.tolist() == [False, True, False, True]
    assert np.isnan(ob.wave_angle_rad[[0, 2]]).all() and np.isnan(ob.downstream_mach[[0, 2]]).all()
    # zero deflection: a Mach wave, beta = asin(1/M) = 30 deg, no loss (derived)
    assert math.degrees(ob.wave_angle_rad[1]) == pytest.approx(30.0, abs=1e-12)
    assert ob.downstream_mach[1] == 2.0 and ob.total_pressure_ratio[1] == 1.0


# ---------------------------------------------------------------------------- pygasflow cross-checks
def test_isentropic_against_pygasflow():
    m = np.linspace(0.01, 5.0, 500)
    ref = isentropic_solver("m", m, to_dict=True)
    # Found agreement: 1e-15 relative (same closed forms); checked to 1e-13.
    np.testing.assert_allclose(isentropic.pressure_ratio(m), ref["pr"], rtol=1e-13)
    np.testing.assert_allclose(isentropic.density_ratio(m), ref["dr"], rtol=1e-13)
    np.testing.assert_allclose(isentropic.temperature_ratio(m), ref["tr"], rtol=1e-13)
    np.testing.assert_allclose(isentropic.area_ratio(m), ref["ars"], rtol=1e-13)


def test_normal_shock_against_pygasflow():
    m = np.linspace(1.01, 5.0, 400)
    ref = normal_shockwave_solver("mu", m, to_dict=True)
    ns = shocks.normal_shock(m)
    # Found agreement: 1e-15 relative; checked to 1e-13.
    np.testing.assert_allclose(ns.downstream_mach, ref["md"], rtol=1e-13)
    np.testing.assert_allclose(ns.static_pressure_ratio, ref["pr"], rtol=1e-13)
    np.testing.assert_allclose(ns.static_temperature_ratio, ref["tr"], rtol=1e-13)
    np.testing.assert_allclose(ns.total_pressure_ratio, ref["tpr"], rtol=1e-13)


def test_max_deflection_against_pygasflow():
    m = np.linspace(1.05, 5.0, 80)
    # Found agreement: 2.3e-10 deg (pygasflow finds the maximum numerically); checked to 1e-8 deg.
    np.testing.assert_allclose(np.degrees(shocks.max_deflection_rad(m)), max_theta_from_mach(m), rtol=0, atol=1e-8)


@pytest.mark.parametrize("fraction", [0.01, 0.1, 0.3, 0.6, 0.9, 0.99, 0.999])
def test_weak_oblique_shock_against_pygasflow(fraction):
    m = np.linspace(1.2, 4.0, 57)
    theta_deg = fraction * max_theta_from_mach(m)
    ref = oblique_shockwave_solver("mu", m, "theta", theta_deg, flag="weak", to_dict=True)
    ob = shocks.oblique_shock(m, np.radians(theta_deg))
    assert ob.attached.all()
    # Found agreement over M 1.2-4 and 1 %..99.9 % of the maximum deflection: wave angle to 6e-10 deg,
    # downstream Mach to 7e-11, total-pressure ratio to 3e-14, pressure ratio to 8e-11 (relative).
    np.testing.assert_allclose(np.degrees(ob.wave_angle_rad), ref["beta"], rtol=0, atol=1e-8)
    np.testing.assert_allclose(ob.downstream_mach, ref["md"], rtol=1e-9)
    np.testing.assert_allclose(ob.total_pressure_ratio, ref["tpr"], rtol=1e-12)
    np.testing.assert_allclose(ob.static_pressure_ratio, ref["pr"], rtol=1e-9)


def _weak_beta_brentq(m, theta):
    """Weak wave angle (rad) from the theta-beta-M relation by bracketing (NACA Report 1135, eq. 138)."""
    def f(b):
        return math.atan(2 / math.tan(b) * (m * m * math.sin(b) ** 2 - 1) / (m * m * (GAMMA + math.cos(2 * b)) + 2)) - theta
    s2 = ((GAMMA + 1) / 4 * m * m - 1 + math.sqrt((GAMMA + 1) * ((GAMMA + 1) / 16 * m**4 + (GAMMA - 1) / 2 * m * m + 1))) / (GAMMA * m * m)
    return brentq(f, math.asin(1 / m), math.asin(math.sqrt(s2)), xtol=1e-15, rtol=8.9e-16)


# Regression: the closed-form wave angle alone loses all precision at small deflections (cancellation in
# M^2 - 1 + 2 L cos(...)); before the package polished it, at M = 2 it gave beta = -0.0016 deg for 1e-9 deg,
# 35.92 deg (M2 = 1.464, pt ratio 0.9951) for 1e-6 deg and a 7e-5 deg error at 1e-4 deg, where the true weak
# wave angle is asin(1/M) = 30 deg plus O(theta).
def test_oblique_shock_small_deflection_precision():
    # A ramp of 1e-6 deg is accepted by the project loader (ramp angles only need to be > 0).
    for m in (1.2, 2.0, 4.0, 8.0):
        for theta_deg in (1e-9, 1e-7, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2):
            th = math.radians(theta_deg)
            ob = shocks.oblique_shock(m, th)
            beta_ref = _weak_beta_brentq(m, th)
            assert float(ob.wave_angle_rad) == pytest.approx(beta_ref, rel=1e-9), (m, theta_deg)
            mn1 = m * math.sin(beta_ref)  # normal-shock downstream Mach (NACA Report 1135 normal-shock relation), worked here
            mn2 = math.sqrt((1 + (GAMMA - 1) / 2 * mn1**2) / (GAMMA * mn1**2 - (GAMMA - 1) / 2))
            assert float(ob.downstream_mach) == pytest.approx(mn2 / math.sin(beta_ref - th), rel=1e-9), (m, theta_deg)


def test_oblique_shock_precise_from_realistic_ramps():
    # Above about 0.1 deg the closed form and the bracketed root agree to 1e-9 (found over M 1.2-5).
    for m in (1.2, 1.5, 2.0, 3.0, 4.0, 5.0):
        theta_max = math.degrees(_max_deflection_by_hand(m))
        for theta_deg in (0.2, 1.0, 0.5 * theta_max, 0.9 * theta_max):
            th = math.radians(theta_deg)
            assert float(shocks.oblique_shock(m, th).wave_angle_rad) == pytest.approx(_weak_beta_brentq(m, th), rel=1e-9)
    # pygasflow agrees there too
    assert beta_from_mach_theta(2.0, 1.0)["weak"] == pytest.approx(math.degrees(_weak_beta_brentq(2.0, math.radians(1.0))), abs=1e-9)


# ---------------------------------------------------------------------------- flow function
def test_choking_flow_per_unit_area():
    wc_per_a = isentropic.choked_corrected_flow_per_area()
    assert wc_per_a == pytest.approx(241.24, abs=0.005)  # derived from method §3 at M = 1
    # 49.4 lbm/(s ft^2) is common practice
    assert abs(wc_per_a * LBM_PER_KG / FT2_PER_M2 - 49.4) <= 0.1
    # by hand from §3: sqrt(g/R) (1.2)^-3 * p_ref / sqrt(T_ref)
    assert wc_per_a == pytest.approx(math.sqrt(GAMMA / R_AIR) * 1.2**-3 * P_REF / math.sqrt(T_REF), rel=1e-14)
    # derived from method §3: MFP* = sqrt(1.4 / 287.0531) / 1.2^3 = 0.0404147 kg K^0.5/(N s)
    # (the gasdynamics docstring's "0.040418" is off in the fifth digit: it corresponds to R = 287.0)
    assert isentropic.choked_mass_flow_parameter() == pytest.approx(0.0404147, abs=5e-8)


@pytest.mark.parametrize("m2, per_area", [(0.4, 151.71), (0.5, 180.05), (0.6, 203.03)])
def test_face_corrected_flow_per_area(m2, per_area):
    # derived from method §3: W_c/A = MFP(M2) p_ref / sqrt(T_ref)
    assert float(isentropic.mass_flow_parameter(m2)) * P_REF / math.sqrt(T_REF) == pytest.approx(per_area, abs=0.005)


def test_flow_function_against_pygasflow_area_ratio():
    # MFP/MFP* = A*/A: the inverse matches pygasflow's subsonic and supersonic area-ratio inversions.
    m_sub = np.linspace(0.02, 0.98, 97)
    ref = isentropic_solver("crit_area_sub", isentropic.area_ratio(m_sub), to_dict=True)
    # found: pygasflow's own inversion is accurate to 7e-11 in Mach here
    np.testing.assert_allclose(isentropic.mach_from_flow_ratio(1.0 / isentropic.area_ratio(m_sub)), ref["m"], rtol=2e-10)
    m_sup = np.linspace(1.02, 5.0, 100)
    ref = isentropic_solver("crit_area_super", isentropic.area_ratio(m_sup), to_dict=True)
    np.testing.assert_allclose(isentropic.mach_from_flow_ratio(1.0 / isentropic.area_ratio(m_sup), supersonic=True), ref["m"], rtol=1e-10)


def _roundtrip_tolerance(m):
    # 1e-9 plus the floor set by rounding the flow ratio to double precision (dM = eps / |d ratio/dM|),
    # which near M = 1 grows like 1/|1 - M|.
    r = 1.0 / float(isentropic.area_ratio(m))
    slope = abs(r * (1.0 - m * m) / (m * (1.0 + 0.2 * m * m)))
    return 1e-9 + 4 * 2.2e-16 / max(slope, 1e-300)


@HYPO
@given(st.floats(min_value=1e-6, max_value=1.0, exclude_max=True))
def test_mach_from_flow_ratio_round_trip_subsonic(m):
    r = 1.0 / isentropic.area_ratio(m)
    assert abs(float(isentropic.mach_from_flow_ratio(r)) - m) <= _roundtrip_tolerance(m)


@HYPO
@given(st.floats(min_value=1.0, max_value=10.0, exclude_min=True))
def test_mach_from_flow_ratio_round_trip_supersonic(m):
    r = 1.0 / isentropic.area_ratio(m)
    assert abs(float(isentropic.mach_from_flow_ratio(r, supersonic=True)) - m) <= _roundtrip_tolerance(m)


def test_mach_from_flow_ratio_near_sonic_supersonic():
    m = 1.0 + np.geomspace(1e-9, 1e-4, 2001)
    back = isentropic.mach_from_flow_ratio(1.0 / isentropic.area_ratio(m), supersonic=True)
    tol = np.array([_roundtrip_tolerance(x) for x in m])
    assert np.all(np.abs(back - m) <= tol), float(np.max(np.abs(back - m) - tol))


def test_mach_from_flow_ratio_near_sonic_subsonic():
    # The subsonic branch (the one the match uses) stays within 1e-9 of the floor (found: 6e-10 excess).
    m = 1.0 - np.geomspace(1e-9, 1e-4, 2001)
    back = isentropic.mach_from_flow_ratio(1.0 / isentropic.area_ratio(m))
    tol = np.array([_roundtrip_tolerance(x) for x in m])
    assert np.all(np.abs(back - m) <= tol)


@HYPO
@given(st.floats(min_value=1.0, max_value=1e6, exclude_min=True), st.booleans())
def test_flow_ratio_above_one_is_nan(r, supersonic):
    if r <= 1.0 + 1e-12:  # the function accepts round-off above 1
        return
    assert math.isnan(float(isentropic.mach_from_flow_ratio(r, supersonic=supersonic)))


def test_flow_ratio_edges():
    out = isentropic.mach_from_flow_ratio(np.array([0.0, 1.0, 1.5, -0.1, np.nan, np.inf]))
    assert out[0] == 0.0 and out[1] == pytest.approx(1.0, abs=1e-12)
    assert np.isnan(out[2:]).all()
    assert float(isentropic.mach_from_flow_ratio(1.0, supersonic=True)) == pytest.approx(1.0, abs=1e-12)
    # MFP above choking: no solution
    assert math.isnan(float(isentropic.mach_from_mass_flow_parameter(1.01 * isentropic.choked_mass_flow_parameter())))


@HYPO
@given(st.floats(min_value=0.01, max_value=0.99))
def test_mach_from_mass_flow_parameter_round_trip(m):
    assert float(isentropic.mach_from_mass_flow_parameter(isentropic.mass_flow_parameter(m))) == pytest.approx(m, abs=1e-9)


# ---------------------------------------------------------------------------- dynamic pressure
def test_incompressible_dynamic_pressure_vs_impact_pressure_at_mach_0_3():
    # common practice: density taken constant below about M 0.3, where q and the impact pressure
    # p_t - p differ by about 2.3 %
    m = 0.3
    q_over_pt = float(isentropic.dynamic_to_total_pressure(m))
    # p/p_t = 0.93947 at M = 0.3 (NACA Report 1135, Table I), so the impact pressure is 0.06053 p_t
    impact_over_pt = 1.0 - 0.93947
    assert impact_over_pt / q_over_pt - 1.0 == pytest.approx(0.023, abs=0.0005)
    # derived: (p_t - p)/q = 1 + M^2/4 + M^4/40 + ... = 1.02270 at M = 0.3, with p/p_t = (1 + 0.2 M^2)^-3.5
    # worked here (not from the package)
    assert (1.0 - (1.0 + 0.2 * m * m) ** -3.5) / q_over_pt == pytest.approx(1.0 + m**2 / 4 + m**4 / 40, abs=2e-6)


def test_dynamic_to_total_pressure_by_hand():
    # NACA Report 1135, Table I: q/p_t = 0.10031 at M = 0.4 and 0.05919 at M = 0.3 (five figures)
    assert float(isentropic.dynamic_to_total_pressure(0.4)) == pytest.approx(0.10031, abs=5e-6)
    assert float(isentropic.dynamic_to_total_pressure(0.3)) == pytest.approx(0.05919, abs=5e-6)
    # derived from method §4: q2/p_t2 = (g/2) M^2 (1 + (g-1)/2 M^2)^(-g/(g-1)); 0.100309 at M = 0.4
    assert float(isentropic.dynamic_to_total_pressure(0.4)) == pytest.approx(0.7 * 0.16 * 1.032**-3.5, rel=1e-14)
    # pygasflow: q/p_t = (g/2) M^2 (p/p_t) with its isentropic p/p_t, over M 0.01-3
    m = np.linspace(0.01, 3.0, 300)
    ref = isentropic_solver("m", m, to_dict=True)
    np.testing.assert_allclose(isentropic.dynamic_to_total_pressure(m), 0.7 * m * m * ref["pr"], rtol=1e-13)
