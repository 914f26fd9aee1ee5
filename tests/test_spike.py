"""The axisymmetric-spike inlet (method §9): shock system, maximum capture, detachment, design checks, loading.

References: pygasflow (conical and oblique shock solvers, installed for tests), NACA Report 1135 (normal
shock), and a mass balance integrated numerically in the test.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from pygasflow.solvers import conical_shockwave_solver, oblique_shockwave_solver

from engine_air.inlets.registry import INLET_TYPES, inlet_type
from engine_air.physics.conical import cone_solution, detachment_mach
from engine_air.project.errors import ProjectError
from engine_air.project.model import Inlet
from engine_air.project.toml_file import load_project, project_from_dict, project_to_dict

ROOT = Path(__file__).resolve().parents[1]
SPIKE = inlet_type("axisymmetric-spike")


def spike(cones=(18.0, 28.0), design=2.0):
    return Inlet("axisymmetric-spike", 0.8, 0.62, 0.7, cone_half_angles_deg=tuple(cones), shock_on_lip_mach=design)


def ns_pt(m):
    """Normal-shock total-pressure ratio, NACA Report 1135 eq. 99."""
    g = 1.4
    return ((g + 1) * m * m / ((g - 1) * m * m + 2)) ** (g / (g - 1)) * ((g + 1) / (2 * g * m * m - (g - 1))) ** (1 / (g - 1))


def ns_m2(m):
    """Mach behind a normal shock, NACA Report 1135 eq. 96."""
    return math.sqrt((1 + 0.2 * m * m) / (1.4 * m * m - 0.2))


def test_registered_with_its_keys():
    assert "axisymmetric-spike" in INLET_TYPES
    keys = {f.key for f in SPIKE.fields}
    assert keys == {"cone_half_angles_deg", "shock_on_lip_mach"}
    assert SPIKE.design_variables(spike()) == ["shock_on_lip_mach", "cone_half_angles_deg[1]", "cone_half_angles_deg[2]"]


def test_recovery_is_cone_times_second_cone_times_terminal_shock():
    # pygasflow: conical shock (first cone) and oblique shock at the cone-surface Mach (second cone, the
    # plane simplification of method §9); NACA Report 1135: terminal normal shock at the last surface Mach.
    m0 = 2.0
    s = SPIKE.shock_system(spike(), np.array([m0]))
    cone = conical_shockwave_solver(m0, "theta_c", 18.0, to_dict=True)
    second = oblique_shockwave_solver("mu", float(cone["mc"]), "theta", 10.0, to_dict=True)
    m_last = float(second["md"])
    expected = float(cone["tpr"]) * float(second["tpr"]) * ns_pt(m_last)
    assert float(s.external_recovery[0]) == pytest.approx(expected, rel=2e-4)
    assert float(s.terminal_upstream_mach[0]) == pytest.approx(m_last, rel=2e-4)
    assert float(s.terminal_downstream_mach[0]) == pytest.approx(ns_m2(m_last), rel=2e-4)
    assert math.degrees(float(s.ramp_wave_angle_rad[0, 0])) == pytest.approx(float(cone["beta"]), abs=2e-3)
    assert bool(s.oblique_ahead_of_cowl[0]) and not bool(s.detached[0])


def test_mfr_max_one_at_design_and_monotonic_below():
    inlet = spike((15.0,), 2.2)
    m_det = detachment_mach(15.0)
    m = np.linspace(m_det + 0.01, 2.2, 60)
    s = SPIKE.shock_system(inlet, np.append(m, [2.4, 3.0]))
    mfr = s.max_mass_flow_ratio
    assert mfr[59] == 1.0 and mfr[60] == 1.0 and mfr[61] == 1.0  # at and above M_d
    assert np.all(np.diff(mfr[:60]) > 0.0)  # rises monotonically to 1 below M_d
    assert np.all(mfr[:59] < 1.0)
    assert bool(s.inside_cowl[60]) and not bool(s.inside_cowl[59])


def test_mfr_max_against_a_mass_balance_on_the_lip_plane():
    """MFR_max from the conical formula of method §9 against the flow through the plane disk at the lip
    station between the spike and the lip, W = int rho V_x 2 pi r dr, integrated here from the ray states."""
    inlet = spike((15.0,), 2.2)
    m0 = 1.7
    mfr = float(SPIKE.shock_system(inlet, np.array([m0])).max_mass_flow_ratio[0])
    w_lip = cone_solution(2.2, 15.0).wave_angle_deg
    sol = cone_solution(m0, 15.0)
    omega = np.linspace(15.0, w_lip, 4001)
    r = sol.ray(omega)
    w = np.radians(omega)
    vx = r.radial_velocity_ratio * np.cos(w) - r.normal_velocity_ratio * np.sin(w)
    radius = np.tan(w)
    balance = np.trapezoid(r.density_ratio * vx * 2.0 * radius, radius) / math.tan(math.radians(w_lip)) ** 2
    assert mfr == pytest.approx(balance, rel=1e-6)
    assert mfr < 1.0


def test_detached_first_cone_is_flagged_and_takes_a_normal_shock():
    inlet = spike((18.0, 28.0), 2.0)
    m_det = detachment_mach(18.0)
    m = np.array([1.02, m_det * 0.99])
    s = SPIKE.shock_system(inlet, m)
    assert s.detached.all() and not s.oblique_ahead_of_cowl.any()
    np.testing.assert_allclose(s.external_recovery, [ns_pt(x) for x in m], rtol=1e-12)  # NACA 1135
    assert np.all(s.max_mass_flow_ratio < 1.0) and np.all(s.max_mass_flow_ratio > 0.5)


def test_check_design():
    assert SPIKE.check_design(spike()) == []
    # a 35 deg cone detaches at M 1.5 (pygasflow: largest attached half-angle there about 27 deg)
    problems = SPIKE.check_design(spike((35.0,), 1.5))
    assert problems and problems[0][0] == "inlet.cone_half_angles_deg"
    assert SPIKE.check_design(spike((20.0, 15.0), 2.0))  # second cone must be steeper
    assert SPIKE.check_design(spike((15.0, 39.0), 2.0))  # second cone's shock detached at M_d


def test_sample_loads_and_round_trips():
    p = load_project(ROOT / "sample_projects" / "supersonic_spike_nacelle.toml")
    assert p.inlet.type == "axisymmetric-spike" and p.inlet.cone_half_angles_deg == (18.0, 28.0)
    assert project_from_dict(project_to_dict(p)).inlet == p.inlet


@pytest.mark.parametrize("cones", [[], [10.0, 20.0, 30.0], [0.0], [45.0]])
def test_loader_rejects_bad_cone_lists(cones):
    data = project_to_dict(load_project(ROOT / "sample_projects" / "supersonic_spike_nacelle.toml"))
    data["inlet"]["cone_half_angles_deg"] = cones
    with pytest.raises(ProjectError) as err:
        project_from_dict(data)
    assert err.value.key.startswith("inlet.cone_half_angles_deg")


def test_just_above_mach_one_captures_everything():
    """A flight Mach number a few ulps above 1 (found by hypothesis: 1 + 2.2e-16) is a bow shock of vanishing
    strength: MFR_max = 1, as at M0 = 1 (method §10, a normal shock turns nothing), never NaN."""
    import numpy as np

    from engine_air.flow.chain import run_chain
    from engine_air.project.load import load_project
    from pathlib import Path

    project = load_project(Path(__file__).resolve().parent.parent / "sample_projects" / "supersonic_spike_nacelle.toml")
    points = run_chain(project, project.cases[0], np.array([1.0 + 2.2e-16, 1.0 + 1e-12]), np.array([11000.0]))
    assert np.asarray(points.max_mass_flow_ratio).tolist() == [1.0, 1.0]
