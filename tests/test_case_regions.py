"""Case regions and corrected tip speed (method section 14).

Case regions: outside its region a point of a case is computed, flagged ``outside-case-region`` and judged by
no check; verdicts and failing shares count judged points only (failing share = failing judged / judged).
Corrected tip speed: U = U_c sqrt(theta2), then the blade relative tip Mach by the velocity triangle
M_rel = sqrt(M2^2 + (U/a2)^2), worked by hand with the 1976 standard atmosphere (5 000 m: T = 255.65 K) and the
face Mach from the NACA Report 1135 flow function (inverted with pygasflow).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from pygasflow import isentropic_solver

from engine_air.cli import main
from engine_air.envelope import flags as F
from engine_air.envelope.evaluate import evaluate_project
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.outputs.point_record import point_record
from engine_air.project.model import Case, Envelope, Grid, Inlet, Limits, Project, Rating
from engine_air.project.toml_file import load_project, save_project

G = 1.4
R = 8314.32 / 28.9644
T_REF, P_REF = 288.15, 101325.0


def project() -> Project:
    # A fan at 450 m/s physical tip speed: its relative tip Mach fails in the cold air high up, holds low down.
    return Project(
        limits=Limits(face_mach_max=0.7, relative_tip_mach_max=1.45),
        inlet=Inlet(type="pitot", capture_area_m2=0.6, throat_area_m2=0.55, face_area_m2=0.5),
        ratings=(Rating("cruise", theta=(0.5, 2.5), corrected_flow_kg_s=(60.0, 60.0), fan_tip_speed_m_s=380.0),
                 Rating("take-off", theta=(0.5, 2.5), corrected_flow_kg_s=(70.0, 70.0), fan_tip_speed_m_s=450.0)),
        envelope=Envelope((0.0, 0.9, 0.9, 0.0), (0.0, 0.0, 12000.0, 12000.0)),
        grid=Grid(mach_points=19, altitude_points=13),
        cases=(Case("cruise", "cruise"),
               Case("take-off", "take-off", mach_range=(0.0, 0.4), altitude_range_m=(0.0, 3000.0))),
    )


def test_outside_the_region_a_point_is_computed_flagged_and_judged_by_no_check():
    p = project()
    result = evaluate_project(p)
    mach_2d, alt_2d = np.meshgrid(result.mach, result.altitude_m)
    region = (mach_2d >= 0.0) & (mach_2d <= 0.4) & (alt_2d >= 0.0) & (alt_2d <= 3000.0)  # bounds included
    pts = result.case_map("take-off").points
    assert (F.has(pts.flags, F.OUTSIDE_CASE_REGION) == ~region).all()
    assert np.isfinite(pts.face_mach).all()  # computed everywhere
    for chk in pts.checks:
        assert not (chk.applies & ~region).any()
        assert not (chk.fails & ~region).any()
    assert (pts.judged == (region & result.inside)).all()
    # the take-off rating's tip Mach would fail at 12 000 m (outside its region)
    tip = pts.check("relative-tip-mach")
    assert (np.asarray(pts.relative_tip_mach)[~region] > 1.45).any()
    assert not tip.fails.any()


def test_verdicts_and_failing_shares_count_judged_points_only():
    p = project()
    result = evaluate_project(p)
    for summary in result.summary:
        judged = failing = 0
        for cm in result.cases:
            chk = cm.points.check(summary.name)
            judged_here = chk.applies & cm.points.judged  # judged: in the envelope and in the case's region
            judged += int(judged_here.sum())
            failing += int((chk.fails & judged_here).sum())
        assert summary.judged_points == judged
        assert summary.failing_share == pytest.approx(failing / judged if judged else 0.0, abs=1e-15)
        assert summary.holds == (failing == 0)
    # the shares add up: failing + holding judged points of every case = the judged points
    tip = next(s for s in result.summary if s.name == "relative-tip-mach")
    holding = sum(int((cm.points.check(tip.name).applies & cm.points.judged & ~cm.points.check(tip.name).fails).sum())
                  for cm in result.cases)
    assert holding + round(tip.failing_share * tip.judged_points) == tip.judged_points
    # the cruise fan fails high up; the take-off case adds no failing point from outside its region
    take_off_only = evaluate_project(p, ["take-off"])
    assert take_off_only.holds
    outside = ~take_off_only.case_map("take-off").points.judged & take_off_only.inside
    assert outside.any()
    assert not take_off_only.failing("take-off")[outside].any()


def test_point_outside_the_region_holds_null_and_exits_0(tmp_path, capsys):
    path = tmp_path / "regions.toml"
    save_project(project(), path)
    assert load_project(path).case("take-off").altitude_range_m == (0.0, 3000.0)
    code = main(["point", str(path), "--mach", "0.8", "--altitude-m", "10000", "--case", "take-off", "--json"])
    record = json.loads(capsys.readouterr().out)
    assert code == 0
    assert record["holds"] is None and record["judged"] is False
    assert "outside-case-region" in record["flags"]
    assert record["face_mach"] is not None  # still computed
    code = main(["point", str(path), "--mach", "0.4", "--altitude-m", "3000", "--case", "take-off", "--json"])
    record = json.loads(capsys.readouterr().out)
    assert record["judged"] is True and "outside-case-region" not in record["flags"]  # bounds included
    assert record["holds"] is not None and code in (0, 1)


def test_point_record_judged_false_outside_the_envelope():
    p = project()
    pts = evaluate_conditions(p, p.cases[0], np.array([0.5]), np.array([5000.0]))
    pts.flags = pts.flags | F.OUTSIDE_ENVELOPE
    assert point_record(pts, 0, "cruise")["judged"] is False


# ---------------------------------------------------------------------------- corrected tip speed
def test_corrected_tip_speed_and_the_relative_tip_mach_by_hand():
    from dataclasses import replace

    p = project()
    rating = replace(p.ratings[0], fan_tip_speed_m_s=None, theta=(0.8, 1.0, 1.2),
                     corrected_flow_kg_s=(60.0, 60.0, 60.0), corrected_tip_speed_m_s=(400.0, 420.0, 430.0))
    p = replace(p, ratings=(rating, p.ratings[1]))
    pts = evaluate_conditions(p, p.cases[0], np.array([0.6, 0.0]), np.array([5000.0, 20000.0]))
    # M0 = 0.6 at 5 000 m: T_t2 = 255.65 (1 + 0.2 0.36) K
    tt2 = 255.65 * 1.072
    theta2 = tt2 / T_REF
    u_c = 400.0 + (theta2 - 0.8) / 0.2 * 20.0  # linear in the rating's theta grid
    u = u_c * math.sqrt(theta2)
    assert float(pts.tip_speed_m_s[0]) == pytest.approx(u, rel=1e-12)
    mfp_star = math.sqrt(G / R) * (2.0 / (G + 1.0)) ** 3.0
    face = 60.0 * math.sqrt(T_REF) / (P_REF * 0.5) / mfp_star
    m2 = float(isentropic_solver("crit_area_sub", 1.0 / face, to_dict=True)["m"])
    a2 = math.sqrt(G * R * tt2 / (1.0 + 0.2 * m2 * m2))
    # velocity triangle: axial M2, blade speed U/a2 at right angles
    assert float(pts.relative_tip_mach[0]) == pytest.approx(math.hypot(m2, u / a2), rel=1e-8)
    # 20 000 m, M0 = 0: theta2 = 216.65/288.15 = 0.752 is below the grid: the end value 400 m/s is held
    theta_cold = 216.65 / T_REF
    assert float(pts.tip_speed_m_s[1]) == pytest.approx(400.0 * math.sqrt(theta_cold), rel=1e-12)


def test_both_tip_speed_keys_are_an_error(tmp_path):
    from engine_air.project.errors import ProjectError

    path = tmp_path / "both.toml"
    save_project(project(), path)
    text = path.read_text(encoding="utf-8").replace(
        "fan_tip_speed_m_s = 380.0", "fan_tip_speed_m_s = 380.0\ncorrected_tip_speed_m_s = [400.0, 420.0]")
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProjectError) as err:
        load_project(path)
    assert "corrected_tip_speed_m_s" in str(err.value)
