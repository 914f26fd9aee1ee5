"""The inlet characteristic from the model (method §16) and calibration against data (§17).

References: NACA Report 1135 (normal shock p_t2/p_t1 = 0.72087 at M = 2; isentropic relations), the U.S. Standard
Atmosphere 1976 (through the package's atmosphere, itself checked against the standard elsewhere), and continuity
MFR = W/(rho0 V0 A_c), W = W_c2 pi p_t0/(p_ref sqrt(theta2)) (method §5) evaluated by hand here.
"""

from __future__ import annotations

import dataclasses
import math
import pathlib

import numpy as np
import pytest

from engine_air.studies.calibrate import calibrate
from engine_air.envelope.characteristic import demand_sweep, model_curve
from engine_air.characteristics.table import read_characteristics
from engine_air.project.toml_file import load_project

SAMPLES = pathlib.Path(__file__).resolve().parent.parent / "sample_projects"
GAMMA, R = 1.4, 287.0531


def _pitot(k=0.0):
    """The transport's pitot nacelle with a face of twice the capture area, so that the demand sweep (up to
    face choking) passes far beyond the critical point at Mach 2."""
    p = load_project(SAMPLES / "subsonic_transport_nacelle.toml")
    return dataclasses.replace(p, inlet=dataclasses.replace(p.inlet, duct_loss_coefficient=k,
                                                            face_area_m2=2.0 * p.inlet.capture_area_m2))


def test_supersonic_branches_by_hand():
    """Pitot inlet at M0 = 2, K = 0 (no duct loss): the subcritical branch is flat at the normal-shock recovery
    0.72087 (NACA 1135) up to MFR_max = 1; beyond it the captured flow is held at 1 and pi = pi_crit / MFR_demand,
    MFR_demand = W_c2 pi_crit p_t0 / (p_ref sqrt(theta2) rho0 V0 A_c) computed here by hand at 11 000 m
    (T0 = 216.65 K, p0 = 22 632.06 Pa, U.S. Standard Atmosphere 1976)."""
    project = _pitot(0.0)
    curve = model_curve(project, project.cases[0], 2.0, 11000.0)
    pi_ns = 0.72087
    assert curve.critical_mass_flow_ratio == pytest.approx(1.0)
    assert curve.critical_recovery == pytest.approx(pi_ns, abs=5e-6)
    t0, p0 = 216.65, 22632.06
    tt0, pt0 = t0 * 1.8, p0 * 1.8 ** 3.5
    rho0, v0 = p0 / (R * t0), 2.0 * math.sqrt(GAMMA * R * t0)
    demand_mfr = demand_sweep(project) * pi_ns * pt0 / (101325.0 * math.sqrt(tt0 / 288.15)) / (
        rho0 * v0 * project.inlet.capture_area_m2)
    sub = demand_mfr < 1.0 - 0.005
    over = demand_mfr > 1.0 + 0.005
    assert sub.any() and over.any()
    assert curve.recovery[sub] == pytest.approx(pi_ns, abs=5e-6)
    assert curve.mass_flow_ratio[sub] == pytest.approx(demand_mfr[sub], rel=1e-5)
    assert curve.mass_flow_ratio[over] == pytest.approx(1.0)
    assert curve.recovery[over] == pytest.approx(pi_ns / demand_mfr[over], rel=1e-5)


def test_characteristic_does_not_depend_on_altitude():
    """At fixed M0 and MFR every term of the chain scales with p0 and T0 (§16): the curves at 3 000, 11 000 and
    16 000 m coincide (to rounding) for the two-ramp sample."""
    project = load_project(SAMPLES / "supersonic_two_ramp.toml")
    base = model_curve(project, project.cases[0], 1.8, 11000.0)
    for altitude in (3000.0, 16000.0):
        other = model_curve(project, project.cases[0], 1.8, altitude)
        assert np.max(np.abs(other.mass_flow_ratio - base.mass_flow_ratio)) < 1e-12
        assert np.max(np.abs(other.recovery - base.recovery)) < 1e-12


def test_stability_boundary_where_buzz_is_judged():
    """The two-ramp inlet has oblique shocks ahead of the cowl at M0 = 1.8 (§10): the stability boundary is
    stable_flow_fraction x MFR_max; a pitot inlet has none (a single normal shock spills stably)."""
    project = load_project(SAMPLES / "supersonic_two_ramp.toml")
    curve = model_curve(project, project.cases[0], 1.8, 11000.0)
    assert curve.stability_limit_mass_flow_ratio == pytest.approx(0.65 * curve.critical_mass_flow_ratio)
    pitot = _pitot(0.03)
    assert model_curve(pitot, pitot.cases[0], 1.5, 11000.0).stability_limit_mass_flow_ratio is None


def test_calibration_recovers_the_known_parameters():
    """The invented sample table was made from the model with duct_loss_coefficient 0.07 and stable_flow_fraction
    0.80 plus noise of 0.002 on recovery (sample_projects/tunnel_data/make_tunnel_characteristics.py): the fit starts from the
    project's 0.04 and 0.65 and must come back within three standard errors, with residuals at the noise level."""
    project = load_project(SAMPLES / "supersonic_two_ramp.toml")
    table = read_characteristics(SAMPLES / "tunnel_data" / "tunnel_characteristics.csv")
    result = calibrate(project, table, ["duct_loss_coefficient", "stable_flow_fraction"])
    k, k_err = result.fitted["duct_loss_coefficient"]
    f, f_err = result.fitted["stable_flow_fraction"]
    assert abs(k - 0.07) < 3.0 * k_err and k_err < 0.01
    assert abs(f - 0.80) < max(3.0 * f_err, 0.005)
    assert 0.001 < result.rms_residual < 0.003
    assert result.project.inlet.duct_loss_coefficient == pytest.approx(k)
    assert len(result.curves) == 7  # the zero-incidence curves only
