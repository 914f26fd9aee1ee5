"""Detached shocks (method §10): Moeckel's bow shock, and MFR_max and C_add continuous through attachment.

References: pygasflow (maximum deflection, oblique-shock solver), NACA Report 1135 relations worked in the
test, Moeckel NACA TN 1921 (1949) construction checked by its own mass balance here.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from pygasflow.shockwave import max_theta_from_mach
from pygasflow.solvers import oblique_shockwave_solver

from engine_air.inlets.base import CaptureState
from engine_air.inlets.registry import inlet_type
from engine_air.physics.conical import detachment_mach
from engine_air.physics.detached_shock import max_deflection_shock, moeckel_bow_shock, sonic_shock
from engine_air.project.model import Inlet


def test_maximum_deflection_and_sonic_shock_against_pygasflow():
    for m in (1.3, 2.0, 3.0):
        s = max_deflection_shock(m)
        assert math.degrees(float(s.deflection_rad)) == pytest.approx(max_theta_from_mach(m), abs=1e-8)
        star = sonic_shock(m)
        ref = oblique_shockwave_solver("mu", m, "beta", math.degrees(float(star.wave_angle_rad)), to_dict=True)
        assert float(ref["md"]) == pytest.approx(1.0, abs=1e-9)  # sonic behind it (NACA 1135 eq. 167)
        assert float(star.wave_angle_rad) < float(s.wave_angle_rad)
    # NACA Report 1135 chart 2: at M = 2 the largest deflection is 22.97 deg at a wave angle of 64.67 deg
    s = max_deflection_shock(2.0)
    assert math.degrees(float(s.wave_angle_rad)) == pytest.approx(64.67, abs=0.01)


@pytest.mark.parametrize("axisymmetric", [False, True])
def test_moeckel_bow_shock_construction(axisymmetric):
    """The hyperbola passes through the shock's sonic point with the sonic wave angle, tends to the Mach angle,
    and the sonic line carries the flow crossing the shock below it (mass balance worked here)."""
    m0 = np.array([1.3, 2.0, 3.0])
    b = moeckel_bow_shock(m0, axisymmetric=axisymmetric)
    x_s, y_s = b.sonic_point
    np.testing.assert_allclose(b.x_at(y_s), x_s, rtol=1e-12, atol=1e-12)
    star = sonic_shock(m0)
    np.testing.assert_allclose(b.wave_angle_at(y_s), star.wave_angle_rad, rtol=1e-12)
    np.testing.assert_allclose(b.wave_angle_at(1e6), np.arcsin(1.0 / m0), rtol=1e-6)
    # mass balance: rho0 V0 (y* or y*^2) = rho* a* (sonic line, normal to the mean flow) ...
    g = 1.4
    a_astar = (1.0 / m0) * ((2.0 / (g + 1.0)) * (1.0 + 0.5 * (g - 1.0) * m0 ** 2)) ** 3.0  # NACA 1135 eq. 80
    pt_ns = ((g + 1) * m0 ** 2 / ((g - 1) * m0 ** 2 + 2)) ** 3.5 * ((g + 1) / (2 * g * m0 ** 2 - (g - 1))) ** 2.5
    k = 1.0 / (a_astar * pt_ns)
    theta_m = 0.5 * star.deflection_rad
    if axisymmetric:
        np.testing.assert_allclose(k * np.cos(theta_m) * y_s ** 2, y_s ** 2 - 1.0, rtol=1e-10)
    else:
        np.testing.assert_allclose(k * np.cos(theta_m) * y_s, y_s - 1.0, rtol=1e-10)
    standoff = -b.vertex_x
    assert np.all(standoff > 0.0) and np.all(np.diff(standoff) < 0.0)  # nearer the body as M0 rises


def _steps(values):
    return np.abs(np.diff(values))


def _critical_c_add(kind, inlet, m0):
    shocks = kind.shock_system(inlet, m0)
    p0 = np.full(m0.shape, 20000.0)
    q0 = 0.7 * p0 * m0 ** 2
    state = CaptureState(m0, p0, q0, shocks.max_mass_flow_ratio, 1.0, np.zeros(m0.shape))
    return shocks.max_mass_flow_ratio, kind.supersonic_pre_entry_drag(inlet, shocks, state) / q0


def _assert_continuous_through(kind, inlet, m_attach):
    """Sampled at dM0 = 0.0005 across attachment, the step there is of the size of the steps beside it: a
    weak shock leaving maximum deflection turns like sqrt(M0 - M_a), whose first step is a few times the
    next ones (1/(sqrt 3 - sqrt 2) = 3.15 times the third for a pure square root; the bound here is 5x,
    against about 100x for the old cliff of 0.137). And the step shrinks with the sampling step like
    sqrt(dM0) (ratio sqrt(0.1) = 0.32 per decade; a true jump would keep its size)."""
    for values in _critical_c_add(kind, inlet, m_attach + 0.0005 * np.arange(-20, 21)):
        steps = _steps(values)
        jump = steps[19:21].max()
        beside = np.concatenate([steps[10:18], steps[22:30]]).max()
        assert jump <= 5.0 * beside + 1e-12
    previous = None
    for d in (5e-4, 5e-5, 5e-6, 5e-7):
        now = [abs(v[1] - v[0]) for v in _critical_c_add(kind, inlet, np.array([m_attach - d, m_attach + d]))]
        if previous is not None:
            for n, p in zip(now, previous):
                assert n <= 0.4 * p + 1e-12
        previous = now


def test_two_ramp_sample_continuous_through_both_attachments():
    kind = inlet_type("external-ramp")
    inlet = Inlet("external-ramp", 0.55, 0.4, 0.5, ramp_angles_deg=(8.0, 7.0), shock_on_lip_mach=2.0)
    # ramp 1 attaches where its maximum deflection reaches 8 deg (pygasflow, brentq on max_theta_from_mach)
    from scipy.optimize import brentq

    m1 = brentq(lambda m: max_theta_from_mach(m) - 8.0, 1.05, 2.0, xtol=1e-12)
    _assert_continuous_through(kind, inlet, m1)
    # ramp 2 attaches where the Mach behind ramp 1 reaches the attachment Mach of a 7 deg ramp
    m_loc = brentq(lambda m: max_theta_from_mach(m) - 7.0, 1.05, 2.0, xtol=1e-12)
    m2 = brentq(lambda m: float(oblique_shockwave_solver("mu", m, "theta", 8.0, to_dict=True)["md"]) - m_loc,
                m1 + 0.01, 2.0, xtol=1e-12)
    _assert_continuous_through(kind, inlet, m2)
    # the old cliff (MFR_max 1.0 at 1.348, 0.863 at 1.349) is gone
    mfr = kind.shock_system(inlet, np.array([1.348, 1.349])).max_mass_flow_ratio
    assert abs(mfr[1] - mfr[0]) < 0.01


def test_spike_continuous_through_cone_attachment():
    kind = inlet_type("axisymmetric-spike")
    inlet = Inlet("axisymmetric-spike", 0.8, 0.62, 0.7, cone_half_angles_deg=(18.0, 28.0), shock_on_lip_mach=2.0)
    _assert_continuous_through(kind, inlet, detachment_mach(18.0))


def test_pitot_captured_tube_crosses_the_strong_part_of_its_bow_shock():
    """Moeckel's bow shock ahead of a spilling pitot (body sonic point at the lip, y_b = 1): the sonic point
    lies above the lip radius, so every captured stream line (y <= 1) crosses the shock where its wave angle
    exceeds the sonic one (the strong, nearly normal part): the §7 balance with the normal-shock total
    pressure applies (engine_air.inlets.pitot)."""
    m0 = np.linspace(1.05, 3.0, 40)
    b = moeckel_bow_shock(m0, axisymmetric=True)
    assert np.all(b.sonic_point[1] > 1.0)
    assert np.all(b.wave_angle_at(1.0) >= sonic_shock(m0).wave_angle_rad)
