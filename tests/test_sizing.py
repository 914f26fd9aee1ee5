"""Sizing: feasible range of one design variable against answers known from the relations, and the optimum.

Known answers (method section 3 and 4):
- face Mach follows from the corrected flow per unit face area alone; MFP(0.4) p_ref / sqrt(T_ref)
  = 151.708920543 kg/(s m^2) (method check-value table: 151.71 at M2 = 0.4, derived from section 3),
  so the smallest face area that keeps M2 <= 0.4 for W_c2 = 100 kg/s is 100 / 151.708920543 m^2;
- the duct loss pi_duct = 1 - K q2/p_t2 with q2/p_t2 = (gamma/2) M2^2 (1 + (gamma-1)/2 M2^2)^(-gamma/(gamma-1)),
  so a recovery floor pi_min gives the largest K = (1 - pi_min) / (q2/p_t2) (subsonic pitot: pi_ext = 1).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import Cancelled, evaluate_project
from scipy.optimize import brentq
from engine_air.project import load_project, project_from_dict
from engine_air.studies import sizing as S

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
FLOW_PER_AREA_AT_M04 = 151.708920543  # kg/(s m^2), derived from method section 3
DEMAND = 100.0  # kg/s
R_1976 = 8314.32 / 28.9644  # J/(kg K), U.S. Standard Atmosphere 1976 (R*/M0)


def flow_per_area_by_hand(m):
    """W_c/A = MFP(M) p_ref / sqrt(T_ref), MFP = sqrt(g/R) M (1 + 0.2 M^2)^-3 (method section 3, worked here)."""
    return math.sqrt(1.4 / R_1976) * m * (1.0 + 0.2 * m * m) ** -3.0 * 101325.0 / math.sqrt(288.15)


def face_mach_by_hand(flow_per_area):
    """Subsonic face Mach for a corrected flow per unit face area (kg/(s m^2)), by bracketing the relation above."""
    return brentq(lambda m: flow_per_area_by_hand(m) - flow_per_area, 0.0, 1.0, xtol=1e-15, rtol=8.9e-16)


def known_project(face_mach_max=0.4, recovery_min=None, face_area=1.0) -> "S.Project":
    """A pitot inlet with generous capture and throat areas and a constant corrected-flow demand,
    so that face Mach (and recovery when asked) are the only limits that can bind."""
    limits = {"face_mach_max": face_mach_max}
    if recovery_min is not None:
        limits["recovery_min"] = recovery_min
    return project_from_dict({
        "project": {"format": 1, "title": "known answer"},
        "limits": limits,
        "inlet": {"type": "pitot", "capture_area_m2": 5.0, "throat_area_m2": 4.5, "face_area_m2": face_area,
                  "duct_loss_coefficient": 0.0},
        "engine": {"rating": [{"name": "max", "theta": [0.8, 1.2], "corrected_flow_kg_s": [DEMAND, DEMAND]}]},
        "envelope": {"mach": [0.2, 0.8, 0.8, 0.2], "altitude_m": [0.0, 0.0, 10000.0, 10000.0]},
        "grid": {"mach_points": 9, "altitude_points": 7},
        "case": [{"name": "std", "rating": "max"}],
    })


def test_face_area_for_the_face_mach_limit_is_found_to_1e_4():
    p = known_project()
    r = S.feasible_range(p, "face_area_m2", 0.3, 1.5)
    assert r.feasible and len(r.intervals) == 1
    low = r.intervals[0].lower
    assert flow_per_area_by_hand(0.4) == pytest.approx(FLOW_PER_AREA_AT_M04, rel=1e-11)  # the relation, worked here
    expected = DEMAND / FLOW_PER_AREA_AT_M04
    assert low.value == pytest.approx(expected, rel=1e-4)
    assert low.kind == "limit" and low.check == "face-mach"
    assert low.case == "std" and 0.2 <= low.mach <= 0.8 and 0.0 <= low.altitude_m <= 10000.0
    # the bracket is closed to 1e-6: feasible at the reported end, failing just beyond it
    assert abs(low.outside - low.value) <= 1e-6 * low.value
    assert evaluate_project(S.with_design_value(p, "face_area_m2", low.value)).holds
    assert not evaluate_project(S.with_design_value(p, "face_area_m2", low.outside)).holds
    assert r.intervals[0].upper.kind == "search"
    assert r.intervals[0].upper.value == 1.5


def test_largest_duct_loss_for_a_recovery_floor():
    p = known_project(face_mach_max=0.9, recovery_min=0.98)
    r = S.feasible_range(p, "duct_loss_coefficient", 0.0, 1.0)
    m2 = face_mach_by_hand(DEMAND / 1.0)  # face area 1 m^2; the relation worked here, not the package's inverse
    q_over_pt = 0.7 * m2 ** 2 * (1.0 + 0.2 * m2 ** 2) ** -3.5
    expected = (1.0 - 0.98) / q_over_pt
    assert len(r.intervals) == 1
    iv = r.intervals[0]
    assert iv.lower.kind == "rule" and iv.lower.value == 0.0
    assert iv.upper.kind == "limit" and iv.upper.check == "recovery"
    assert iv.upper.value == pytest.approx(expected, rel=1e-4)


def test_empty_range_is_reported():
    p = known_project()
    r = S.feasible_range(p, "face_area_m2", 0.3, 0.6, scan_points=5)
    assert not r.feasible and r.intervals == []
    text = "\n".join(r.describe())
    assert "No feasible value" in text
    assert np.all(r.scan_margin < 0)


def test_scan_margin_is_the_worst_relative_margin():
    p = known_project()
    r = S.feasible_range(p, "face_area_m2", 0.5, 1.0, scan_points=3)
    # With a constant corrected-flow demand the face Mach is the same at every point: it follows from W_c/A2 alone
    # (method section 3), so the worst relative margin is (0.4 - M2)/0.4 with M2 worked here from DEMAND / A2.
    for v, g in zip(r.scan_values, r.scan_margin):
        m2 = face_mach_by_hand(DEMAND / v)
        assert g == pytest.approx((0.4 - m2) / 0.4, rel=1e-12)


def test_with_design_value_rules():
    p = load_project(SAMPLES / "subsonic_transport_nacelle.toml")
    q = S.with_design_value(p, "face_area_m2", 2.0)
    assert q.inlet.face_area_m2 == 2.0 and q.inlet.capture_area_m2 == p.inlet.capture_area_m2
    assert q.ratings is p.ratings  # an edit by dataclasses.replace
    with pytest.raises(ProjectError) as err:
        S.with_design_value(p, "throat_area_m2", p.inlet.capture_area_m2 * 1.1)
    assert err.value.key == "inlet.throat_area_m2" and "capture" in str(err.value)
    with pytest.raises(ProjectError):
        S.with_design_value(p, "face_area_m2", -1.0)
    with pytest.raises(ProjectError):
        S.with_design_value(p, "face_area_m2", math.nan)
    with pytest.raises(ProjectError):
        S.with_design_value(p, "ramp_angles_deg[1]", 5.0)  # pitot inlet
    with pytest.raises(ProjectError):
        S.with_design_value(p, "nose_cone", 1.0)
    # two tied values together: valid although setting them one after the other would not be
    both = S.with_design_values(p, {"capture_area_m2": 1.5, "throat_area_m2": 1.4})
    assert (both.inlet.capture_area_m2, both.inlet.throat_area_m2) == (1.5, 1.4)
    with pytest.raises(ProjectError):
        S.with_design_value(p, "capture_area_m2", 1.5)


def test_ramp_variables_and_attachment_rule():
    p = load_project(SAMPLES / "supersonic_two_ramp.toml")
    names = S.design_variables(p)
    assert "ramp_angles_deg[1]" in names and "ramp_angles_deg[2]" in names and "shock_on_lip_mach" in names
    assert S.design_value(p, "ramp_angles_deg[2]") == p.inlet.ramp_angles_deg[1]
    allowed = S.allowed_range(p, "ramp_angles_deg[1]")
    S.with_design_value(p, "ramp_angles_deg[1]", allowed.upper)
    with pytest.raises(ProjectError) as err:
        S.with_design_value(p, "ramp_angles_deg[1]", allowed.upper + 0.01)
    assert err.value.key == "inlet.ramp_angles_deg"
    low = S.allowed_range(p, "shock_on_lip_mach").lower
    S.with_design_value(p, "shock_on_lip_mach", low)
    with pytest.raises(ProjectError):
        S.with_design_value(p, "shock_on_lip_mach", low - 0.01)
    with pytest.raises(ProjectError):
        S.with_design_value(p, "ramp_angles_deg[3]", 5.0)  # two ramps only


def test_search_range_is_clipped_to_the_rules():
    p = known_project()
    r = S.feasible_range(p, "throat_area_m2", 1.0, 9.0, scan_points=3)
    assert r.upper == p.inlet.capture_area_m2
    assert any("capture" in n for n in r.notes)
    assert r.intervals[-1].upper.kind == "rule"
    with pytest.raises(ProjectError):
        S.feasible_range(p, "throat_area_m2", 6.0, 9.0)
    with pytest.raises(ProjectError):
        S.feasible_range(p, "face_area_m2", 1.0, 0.5)


def test_optimise_worst_margin_and_point_objectives():
    p = known_project()
    best = S.optimise(p, "face_area_m2", "-worst_margin", within=(0.3, 1.5))
    assert best.success and best.value == pytest.approx(1.5)  # the margin grows with the face area
    assert best.objective_value == pytest.approx(-best.worst.relative_margin)
    # least cruise spillage: the smallest capture area the rules allow (it may not be below the throat)
    q = S.with_design_value(S.with_design_value(p, "capture_area_m2", 5.0), "throat_area_m2", 2.0)
    best = S.optimise(q, "capture_area_m2", "spillage_fraction", at=(0.7, 9000.0, "std"), within=(2.0, 5.0))
    assert best.value == pytest.approx(2.0)
    spill, _ = S.point_objective(S.with_design_value(q, "capture_area_m2", 3.0), "spillage_fraction",
                                 (0.7, 9000.0, "std"))
    assert best.objective_value < spill
    # a figure that is not defined at the point is refused with the reason
    with pytest.raises(ProjectError) as err:
        S.optimise(q, "capture_area_m2", "additive_drag_coefficient", at=(0.02, 0.0, "std"), within=(2.0, 5.0))
    assert "0.05" in str(err.value)
    with pytest.raises(ProjectError):
        S.optimise(q, "capture_area_m2", "spillage_fraction")  # a point objective needs the point
    with pytest.raises(ProjectError):
        S.optimise(q, "capture_area_m2", "thrust")


def test_optimise_on_empty_range_has_no_value():
    best = S.optimise(known_project(), "face_area_m2", "-worst_margin", within=(0.3, 0.6))
    assert best.value is None and not best.success


def test_progress_and_cancel():
    p = known_project()
    seen = []
    S.feasible_range(p, "face_area_m2", 0.5, 1.0, scan_points=5, progress=seen.append)
    assert seen and seen[-1] == 1.0 and all(0.0 <= f <= 1.0 for f in seen)
    calls = []

    def cancel():
        calls.append(1)
        return len(calls) > 3

    with pytest.raises(Cancelled):
        S.feasible_range(p, "face_area_m2", 0.5, 1.0, scan_points=9, cancelled=cancel)


def test_sample_sizing_is_consistent():
    # (its time is printed by bench/bench_design.py, not asserted here)
    p = load_project(SAMPLES / "subsonic_transport_nacelle.toml")
    r = S.feasible_range(p, "face_area_m2")
    low = r.intervals[0].lower
    assert low.kind == "limit" and low.check == "face-mach"
    assert low.value < p.inlet.face_area_m2  # the sample holds with some margin
    assert evaluate_project(S.with_design_value(p, "face_area_m2", low.value)).holds
    assert not evaluate_project(S.with_design_value(p, "face_area_m2", low.outside)).holds


def test_cli_size_exit_codes(tmp_path, capsys):
    from dataclasses import replace

    from engine_air.cli import main
    from engine_air.project.model import Grid
    from engine_air.project import save_project

    def coarse(name):
        path = tmp_path / f"{name}.toml"
        save_project(replace(load_project(SAMPLES / f"{name}.toml"), grid=Grid(31, 26)), path)
        return str(path)

    pitot, ramp = coarse("subsonic_transport_nacelle"), coarse("supersonic_two_ramp")
    assert main(["size", pitot, "--variable", "face_area_m2", "--scan", "9"]) == 0
    out = capsys.readouterr().out
    assert "ANSWER: face_area_m2 feasible from" in out and "Face Mach number" in out
    assert main(["size", pitot, "--variable", "capture_area_m2", "--scan", "9", "--objective", "spillage_fraction",
                 "--at-mach", "0.8", "--at-altitude-m", "11000", "--at-case", "ISA, max continuous"]) == 0
    assert "ANSWER: capture_area_m2 =" in capsys.readouterr().out
    assert main(["size", pitot, "--variable", "face_area_m2", "--scan", "5", "--objective=-worst_margin"]) == 0
    assert main(["size", ramp, "--variable", "ramp_angles_deg[1]", "--scan", "5"]) == 1
    assert "EMPTY" in capsys.readouterr().out
    assert main(["size", pitot, "--variable", "ramp_angles_deg[1]"]) == 2
    assert main(["size", pitot, "--variable", "capture_area_m2", "--objective", "spillage_fraction"]) == 2
    assert main(["size", pitot, "--variable", "throat_area_m2", "--lower", "5", "--upper", "6"]) == 2
    err = capsys.readouterr().err
    assert "external-ramp" in err and "--at-mach" in err and "rules allow" in err
    assert "Traceback" not in err
