"""Taylor-Maccoll conical flow (engine_air.physics.conical) against outside references.

References: ``pygasflow`` (installed for tests: ``solvers.conical_shockwave_solver`` and
``shockwave.max_theta_c_from_mach``); NACA Report 1135 cone charts and NASA SP-3004 (Sims, 1964) tables at
chart precision; a mass balance integrated in the test.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from pygasflow.shockwave import max_theta_c_from_mach
from pygasflow.solvers import conical_shockwave_solver

from engine_air.physics.conical import cone_flow, cone_solution, detachment_mach


@pytest.mark.parametrize("cone_deg", [5.0, 10.0, 15.0, 20.0, 25.0, 30.0])
@pytest.mark.parametrize("mach", [1.3, 1.6, 2.0, 2.8, 4.0])
def test_wave_angle_and_surface_mach_against_pygasflow(cone_deg, mach):
    ours = cone_solution(mach, cone_deg)
    limit = max_theta_c_from_mach(mach)[1]  # pygasflow: largest attached cone half-angle at this Mach (deg)
    if cone_deg > limit:
        assert ours is None
        return
    ref = conical_shockwave_solver(mach, "theta_c", cone_deg, to_dict=True)  # pygasflow
    assert ours is not None
    assert ours.wave_angle_deg == pytest.approx(float(ref["beta"]), abs=2e-3)
    assert ours.surface_mach == pytest.approx(float(ref["mc"]), abs=2e-3)
    assert ours.surface_pressure_ratio == pytest.approx(float(ref["pc_pu"]), rel=1e-3)
    assert ours.shock_total_pressure_ratio == pytest.approx(float(ref["tpr"]), rel=1e-4)


def test_chart_values():
    # NACA Report 1135 cone charts / NASA SP-3004 (method.md check values): 20 deg cone at M0 = 2:
    # beta about 37.8 deg, surface Mach about 1.57.
    s = cone_solution(2.0, 20.0)
    assert s.wave_angle_deg == pytest.approx(37.8, abs=0.1)
    assert s.surface_mach == pytest.approx(1.57, abs=0.01)
    # 10 deg cone at M0 = 2: beta about 31.2 deg (NASA SP-3004, from memory at table precision).
    assert cone_solution(2.0, 10.0).wave_angle_deg == pytest.approx(31.2, abs=0.2)
    # Largest attached half-angle at M0 = 2 about 40.7 deg (NACA Report 1135 chart 5, at chart precision):
    # the cone of 40.5 deg is attached at 2, the cone of 41 deg detached.
    assert cone_solution(2.0, 40.5) is not None
    assert cone_solution(2.0, 41.0) is None


@pytest.mark.parametrize("cone_deg", [8.0, 15.0, 25.0])
def test_detachment_mach_against_pygasflow(cone_deg):
    m_det = detachment_mach(cone_deg)
    # at the detachment Mach number pygasflow's largest attached half-angle is the cone's own
    assert max_theta_c_from_mach(m_det)[1] == pytest.approx(cone_deg, abs=0.02)
    assert cone_solution(m_det * 1.001, cone_deg) is not None
    assert cone_solution(m_det * 0.999, cone_deg) is None


def test_shock_jump_on_the_shock_ray():
    # Just behind the shock the ray state is the oblique-shock state: normal mass flux rho V_w equals the
    # free stream's V0 sin(beta) (NACA Report 1135, continuity across the shock, eq. 129 form).
    s = cone_solution(2.5, 15.0)
    r = s.ray(s.wave_angle_deg)
    beta = math.radians(s.wave_angle_deg)
    # (a column is solved for a Mach number matched to 1e-6 relative: the jump holds to that order)
    assert float(r.density_ratio * -r.normal_velocity_ratio) == pytest.approx(math.sin(beta), rel=2e-6)
    assert float(r.radial_velocity_ratio) == pytest.approx(math.cos(beta), rel=2e-6)  # tangential continuous
    # cone surface: flow along the surface
    assert float(s.ray(15.0).normal_velocity_ratio) == pytest.approx(0.0, abs=1e-9)


def test_captured_flow_against_a_mass_balance_on_the_lip_plane():
    """The flow through the cone of half-angle w_L (conical formula) equals the flow through the plane disk
    at the lip's axial station between the spike and the lip circle, integrated here from the ray solution:
    W = int rho V_x 2 pi r dr, r = x tan(w), V_x = V_r cos w - V_w sin w (the cone surface is a stream surface)."""
    design = cone_solution(2.2, 18.0)
    w_lip = design.wave_angle_deg
    s = cone_solution(1.8, 18.0)
    omega = np.linspace(18.0, w_lip, 4001)
    r = s.ray(omega)
    w = np.radians(omega)
    vx = r.radial_velocity_ratio * np.cos(w) - r.normal_velocity_ratio * np.sin(w)
    radius = np.tan(w)  # at x = 1
    flux = np.trapezoid(r.density_ratio * vx * 2.0 * radius, radius)  # / (rho0 V0 pi), per x^2
    mfr_plane = flux / math.tan(math.radians(w_lip)) ** 2
    assert s.captured_flow_ratio(w_lip) == pytest.approx(mfr_plane, rel=1e-6)
    assert s.captured_flow_ratio(w_lip) < 1.0
    assert design.captured_flow_ratio(w_lip) == 1.0


def test_vectorised_front_end_maps_unique_machs():
    m = np.array([[0.8, 1.5, 2.0], [2.0, 1.5, 1.05]])
    f = cone_flow(m, 12.0)
    assert np.isnan(f.wave_angle_rad[0, 0]) and not f.detached[0, 0]
    assert f.wave_angle_rad[0, 2] == f.wave_angle_rad[1, 0]
    assert math.degrees(f.wave_angle_rad[0, 1]) == pytest.approx(cone_solution(1.5, 12.0).wave_angle_deg)
    assert f.detached[1, 2]  # a 12 deg cone detaches below about M 1.1 (pygasflow test above)


def test_stream_surface_integral_against_an_independent_stream_line():
    """The dividing stream line from the lip ray back to the shock, integrated here with scipy's solve_ivp on
    dR/dw = R V_r/V_w (spherical coordinates about the tip), reaches the shock at the radius of the captured
    free-stream tube (mass balance: (r_s/r_L)^2 = MFR_max) and gives the same pressure integral
    int (p/p0 - 1) d(r^2/r_L^2) (trapezoidal rule here on its own points)."""
    from scipy.integrate import solve_ivp

    w_lip = cone_solution(2.2, 15.0).wave_angle_deg
    s = cone_solution(1.7, 15.0)
    wl, wb = math.radians(w_lip), math.radians(s.wave_angle_deg)

    def rhs(w, y):
        r = s.ray(math.degrees(w))
        return [y[0] * float(r.radial_velocity_ratio / r.normal_velocity_ratio)]

    omega = np.linspace(wl, wb, 3001)
    sol = solve_ivp(rhs, (wl, wb), [1.0], t_eval=omega, rtol=1e-11, atol=1e-13)
    radius2 = (sol.y[0] * np.sin(omega) / math.sin(wl)) ** 2
    p = s.ray(np.degrees(omega)).pressure_ratio
    integral = -np.trapezoid(p - 1.0, radius2)
    ours, s_shock = s.stream_surface_pressure_integral(w_lip)
    assert s_shock == pytest.approx(radius2[-1], rel=1e-6)
    assert s_shock == pytest.approx(s.captured_flow_ratio(w_lip), rel=1e-6)
    assert ours == pytest.approx(integral, rel=1e-5)
    assert ours > 0.0
