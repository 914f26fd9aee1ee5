"""Starting of a supersonic contraction: Kantrowitz-Donaldson self-start limit, isentropic contraction limit,
started throat Mach (engine_air.physics.starting).

Outside references: NACA Report 1135 (1953) tables and equations, written out in this file; the
``pygasflow`` library (isentropic and normal-shock solvers) for the curves.
"""

from __future__ import annotations

import numpy as np
import pytest
from pygasflow import isentropic_solver, normal_shockwave_solver

from engine_air.physics.starting import (isentropic_contraction_limit, self_start_contraction, started_throat_mach,
                                         started_throat_mach_by_continuity)

G = 1.4


def area_ratio_by_hand(m):
    """A/A* = (1/M) [(2/(g+1)) (1 + (g-1)/2 M^2)]^((g+1)/(2(g-1))), NACA Report 1135 eq. 80."""
    m = np.asarray(m, float)
    return (2.0 / (G + 1.0) * (1.0 + 0.5 * (G - 1.0) * m * m)) ** ((G + 1.0) / (2.0 * (G - 1.0))) / m


def normal_shock_recovery_by_hand(m):
    """p_t2/p_t1 across a normal shock, NACA Report 1135 eq. 99."""
    m2 = np.asarray(m, float) ** 2
    return ((G + 1.0) * m2 / ((G - 1.0) * m2 + 2.0)) ** (G / (G - 1.0)) * (
        (G + 1.0) / (2.0 * G * m2 - (G - 1.0))) ** (1.0 / (G - 1.0))


def test_kantrowitz_limit_at_mach_2_from_naca_1135_table_values():
    # NACA Report 1135 tables at M = 2: A/A* = 1.6875, normal shock p_t2/p_t1 = 0.72087;
    # Kantrowitz & Donaldson: (A*/A)/pi_ns = (1/1.6875)/0.72087 = 0.8220.
    assert float(self_start_contraction(2.0)) == pytest.approx(0.8220, abs=5e-5)
    assert float(self_start_contraction(2.0)) == pytest.approx((1.0 / 1.6875) / 0.72087, rel=2e-5)
    # the same from pygasflow's isentropic (A/A*) and normal-shock (p_t2/p_t1) solvers at M = 2
    ars = isentropic_solver("m", 2.0, to_dict=True)["ars"]
    tpr = normal_shockwave_solver("mu", 2.0, to_dict=True)["tpr"]
    assert float(1.0 / ars / tpr) == pytest.approx(0.8220, abs=5e-5)
    assert float(self_start_contraction(2.0)) == pytest.approx(float(1.0 / ars / tpr), rel=1e-10)


def test_kantrowitz_curve_against_relations_worked_here_and_pygasflow():
    m = np.linspace(1.02, 5.0, 200)
    by_hand = 1.0 / area_ratio_by_hand(m) / normal_shock_recovery_by_hand(m)
    np.testing.assert_allclose(self_start_contraction(m), by_hand, rtol=1e-12)
    # pygasflow: isentropic A/A* ("ars") and normal-shock total-pressure ratio ("tpr")
    ars = isentropic_solver("m", m, to_dict=True)["ars"]
    tpr = normal_shockwave_solver("mu", m, to_dict=True)["tpr"]
    np.testing.assert_allclose(self_start_contraction(m), 1.0 / ars / tpr, rtol=1e-10)


def test_kantrowitz_limit_shape():
    m = np.linspace(1.0001, 8.0, 2000)
    k = self_start_contraction(m)
    assert np.all(np.diff(k) < 0.0)  # falls with Mach number
    # a normal shock loses total pressure, so the self-start limit is above the isentropic one
    assert np.all(k > isentropic_contraction_limit(m))
    assert float(self_start_contraction(1.0)) == 1.0 and float(self_start_contraction(0.5)) == 1.0
    assert float(self_start_contraction(1.0 + 1e-6)) == pytest.approx(1.0, abs=1e-6)  # continuous at M = 1


def test_isentropic_contraction_limit_naca_1135():
    # NACA Report 1135 table: A/A* = 1.6875 at M = 2 (A*/A = 0.5926), 1.1762 at M = 1.5, 4.2346 at M = 3
    assert float(isentropic_contraction_limit(2.0)) == pytest.approx(0.5926, abs=5e-5)
    assert float(isentropic_contraction_limit(1.5)) == pytest.approx(1.0 / 1.1762, rel=1e-4)
    assert float(isentropic_contraction_limit(3.0)) == pytest.approx(1.0 / 4.2346, rel=1e-4)
    assert float(isentropic_contraction_limit(0.8)) == 1.0


def test_started_throat_mach_is_the_supersonic_root_of_the_area_relation():
    m1 = np.array([1.5, 2.0, 2.5, 3.0, 3.0])
    c = np.array([0.95, 0.80, 0.70, 0.50, 0.30])
    m_th = started_throat_mach(c, m1)
    # A(M_th)/A* = c A(M1)/A*, checked with the relation worked above and pygasflow's supersonic inverse
    target = c * area_ratio_by_hand(m1)
    np.testing.assert_allclose(area_ratio_by_hand(m_th), target, rtol=1e-9)
    expected = isentropic_solver("crit_area_super", target, to_dict=True)["m"]
    np.testing.assert_allclose(m_th, expected, rtol=1e-7)
    assert np.all(m_th > 1.0) and np.all(m_th < m1)


def test_started_throat_mach_without_a_supersonic_root_is_nan():
    # tighter than the isentropic limit A*/A(M1): no shock-free flow through the throat
    m1 = 2.0
    limit = 1.0 / 1.6875  # NACA Report 1135, M = 2
    assert np.isnan(started_throat_mach(limit * 0.99, m1))
    assert float(started_throat_mach(limit * 1.0001, m1)) == pytest.approx(1.0, abs=0.02)
    assert np.isnan(started_throat_mach(0.9, 0.8))  # subsonic entrance
    assert float(started_throat_mach(1.0, 2.0)) == pytest.approx(2.0, abs=1e-9)


def test_started_throat_by_continuity_passes_the_captured_flow():
    # (A/A*)(M_th) = (A_th/A_c) pi (A/A*)(M0) / MFR_max (method §11): the throat passes, at total pressure
    # pi p_t0, the captured flow MFR_max rho0 V0 A_c, i.e. pi MFP(M_th) A_th = MFR_max MFP(M0) A_c
    m0 = np.array([2.0, 2.5, 3.0, 3.0, 2.2])
    c = np.array([0.65, 0.40, 0.30, 0.35, 0.60])
    pi = np.array([0.97, 0.95, 0.90, 0.90, 0.99])
    mfr = np.array([0.95, 1.0, 1.0, 1.0, 0.9])
    m_th = started_throat_mach_by_continuity(c, m0, pi, mfr)
    target = c * pi * area_ratio_by_hand(m0) / mfr
    expected = isentropic_solver("crit_area_super", target, to_dict=True)["m"]  # pygasflow supersonic inverse
    np.testing.assert_allclose(m_th, expected, rtol=1e-7)

    def mfp(m):  # W sqrt(T_t)/(A p_t) over sqrt(g/R), NACA Report 1135 form
        return m * (1.0 + 0.2 * m * m) ** -3.0

    np.testing.assert_allclose(pi * mfp(m_th) * c, mfr * mfp(m0), rtol=1e-9)
    assert np.all(m_th > 1.0)


def test_started_throat_by_continuity_without_a_supersonic_root_is_nan():
    # the captured flow does not fit the throat supersonically: (A/A*) < 1 has no root (M0 = 3: A/A* = 4.2346)
    assert np.isnan(started_throat_mach_by_continuity(0.2, 3.0, 1.0, 1.0))  # 0.847 < 1
    assert float(started_throat_mach_by_continuity(1.0 / 4.2346 * 1.0001, 3.0, 1.0, 1.0)) == pytest.approx(1.0, abs=0.02)
    assert np.isnan(started_throat_mach_by_continuity(0.5, 0.9, 1.0, 1.0))  # subsonic flight
    assert np.isnan(started_throat_mach_by_continuity(0.5, 2.0, np.nan, 1.0))  # no total pressure (detached)
