"""Schedules in flight Mach number (method section 12): linear in M0, end values held.

A point between two schedule Mach numbers must give the outputs of a fixed-geometry project built at the
geometry interpolated by hand (linear interpolation worked below), to 1e-12; the loader checks each scheduled
geometry as a fixed one; sizing on the variable-geometry sample finds a feasible capture area only with its
schedule.
"""

from __future__ import annotations

from dataclasses import fields, replace
from pathlib import Path

import numpy as np
import pytest

from engine_air.cli import main
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.inlets import registry
from engine_air.inlets.external_ramp import INLET as RAMP
from engine_air.project.errors import ProjectError
from engine_air.project.model import Case, Envelope, Inlet, Limits, Project, Rating, Schedule
from engine_air.project.toml_file import dumps_project, load_project, project_from_dict, project_to_dict
from engine_air.studies.sizing import design_value, with_design_value

ROOT = Path(__file__).resolve().parents[1]
FIGHTER = ROOT / "sample_projects" / "variable_geometry_fighter.toml"

SCHEDULE = Schedule(mach=(1.5, 2.0), throat_area_m2=(0.40, 0.30), shock_on_lip_mach=(1.8, 2.2),
                    ramp_angles_deg=((6.0, 5.0), (8.0, 7.0)), bleed_fraction=(0.02, 0.04))


def project(inlet: Inlet) -> Project:
    return Project(
        limits=Limits(face_mach_max=0.6, throat_mach_max=0.9, recovery_min="mil-e-5008b", stable_flow_fraction=0.6),
        inlet=inlet,
        ratings=(Rating("r", theta=(0.8, 1.2, 1.9), corrected_flow_kg_s=(80.0, 78.0, 70.0)),),
        envelope=Envelope((0.3, 2.5, 2.5, 0.3), (0.0, 0.0, 16000.0, 16000.0)),
        cases=(Case("c", "r"),),
    )


def ramp_inlet(**kw) -> Inlet:
    base = dict(type="external-ramp", capture_area_m2=0.55, throat_area_m2=0.40, face_area_m2=0.5,
                duct_loss_coefficient=0.04, lip_suction_factor=0.5, ramp_angles_deg=(6.0, 5.0),
                shock_on_lip_mach=1.8, bleed_exit_velocity_ratio=0.2)
    base.update(kw)
    return Inlet(**base)


def _per_ramp(index):
    return (slice(None),) + (index if isinstance(index, tuple) else (index,))


def assert_same_points(a, b, index_a=..., index_b=...):
    for f in fields(a):
        x, y = getattr(a, f.name), getattr(b, f.name)
        if isinstance(x, np.ndarray) and x.dtype.kind in "fiub":
            ia, ib = (_per_ramp(index_a), _per_ramp(index_b)) if f.name.startswith("ramp_") else (index_a, index_b)
            xa, yb = np.asarray(x)[ia], np.asarray(y)[ib]
            np.testing.assert_allclose(xa, yb, rtol=1e-12, atol=1e-12, err_msg=f.name)
    for ca, cb in zip(a.checks, b.checks):
        np.testing.assert_allclose(np.asarray(ca.margin)[index_a], np.asarray(cb.margin)[index_b], rtol=1e-12,
                                   atol=1e-12, err_msg=ca.name)


def test_a_point_between_schedule_rows_equals_the_fixed_geometry_at_the_interpolated_values():
    # M0 = 1.7 is 0.4 of the way from 1.5 to 2.0: worked by hand, throat 0.40 - 0.4 x 0.10 = 0.36 m^2,
    # shock-on-lip 1.8 + 0.4 x 0.4 = 1.96, ramps 6 + 0.4 x 2 = 6.8 and 5 + 0.4 x 2 = 5.8 deg, bleed 0.028.
    scheduled = project(ramp_inlet(schedule=SCHEDULE))
    fixed = project(ramp_inlet(throat_area_m2=0.36, shock_on_lip_mach=1.96, ramp_angles_deg=(6.8, 5.8),
                               bleed_fraction=0.028))
    altitudes = np.array([0.0, 6000.0, 11000.0, 15000.0])
    a = evaluate_conditions(scheduled, scheduled.cases[0], np.full(4, 1.7), altitudes)
    b = evaluate_conditions(fixed, fixed.cases[0], np.full(4, 1.7), altitudes)
    assert_same_points(a, b)
    # the same column inside a grid of several Mach columns (the per-column evaluation is stacked back)
    mach = np.array([0.9, 1.2, 1.7, 2.1, 2.4])
    grid = evaluate_conditions(scheduled, scheduled.cases[0], mach[None, :], altitudes[:, None])
    assert_same_points(grid, b, (slice(None), 2), slice(None))
    assert np.allclose(grid.bleed_fraction[:, 2], 0.028, rtol=1e-12)


def test_schedule_ends_are_held():
    scheduled = project(ramp_inlet(schedule=SCHEDULE))
    last = project(ramp_inlet(throat_area_m2=0.30, shock_on_lip_mach=2.2, ramp_angles_deg=(8.0, 7.0),
                              bleed_fraction=0.04))
    a = evaluate_conditions(scheduled, scheduled.cases[0], np.array([2.4]), np.array([12000.0]))
    b = evaluate_conditions(last, last.cases[0], np.array([2.4]), np.array([12000.0]))
    assert_same_points(a, b)


def test_a_type_that_handles_its_own_schedule_gets_the_whole_schedule(monkeypatch):
    seen = []

    class Whole:
        name, label, fields, handles_schedule = "external-ramp", "test", RAMP.fields, True

        def check_design(self, inlet):
            return []

        def shock_system(self, inlet, flight_mach):
            seen.append((inlet.schedule, np.shape(flight_mach)))
            return RAMP.shock_system(inlet, flight_mach)

        def supersonic_pre_entry_drag(self, inlet, shocks, state):
            return None

        def design_variables(self, inlet):
            return []

    monkeypatch.setitem(registry.INLET_TYPES, "external-ramp", Whole())
    p = project(ramp_inlet(schedule=SCHEDULE))
    evaluate_conditions(p, p.cases[0], np.array([[1.2, 1.7, 2.1]]), np.array([[0.0], [9000.0]]))
    assert seen == [(SCHEDULE, (1, 3))]  # once, with the schedule, on the Mach array


def test_loader_reads_the_schedule_and_checks_each_scheduled_geometry():
    p = project(ramp_inlet(schedule=SCHEDULE))
    data = project_to_dict(p)
    assert project_from_dict(data).inlet.schedule == SCHEDULE
    text = dumps_project(p)
    assert "[inlet.schedule]" in text
    bad = project_to_dict(p)
    bad["inlet"]["schedule"]["throat_area_m2"] = [0.40, 0.60]  # larger than the capture area
    with pytest.raises(ProjectError, match="throat_area_m2"):
        project_from_dict(bad)
    bad = project_to_dict(p)
    bad["inlet"]["schedule"]["bleed_fraction"] = [0.02]  # one entry per schedule Mach number
    with pytest.raises(ProjectError, match="bleed_fraction"):
        project_from_dict(bad)
    bad = project_to_dict(p)
    # 20 + 15 deg at a shock-on-lip Mach of 1.8: the second ramp's shock detaches (Mach behind the first
    # ramp about 1.1); the fixed keys alone are sound
    bad["inlet"]["schedule"]["ramp_angles_deg"] = [[6.0, 5.0], [20.0, 15.0]]
    bad["inlet"]["schedule"]["shock_on_lip_mach"] = [1.8, 1.8]
    with pytest.raises(ProjectError, match=r"schedule row 1 \(mach = 2"):
        project_from_dict(bad)


def test_schedule_values_are_design_variables():
    p = load_project(FIGHTER)
    assert design_value(p, "schedule.throat_area_m2[2]") == p.inlet.schedule.throat_area_m2[1]
    q = with_design_value(p, "schedule.throat_area_m2[2]", 0.45)
    assert q.inlet.schedule.throat_area_m2[1] == 0.45
    assert q.inlet.schedule.throat_area_m2[0] == p.inlet.schedule.throat_area_m2[0]
    q = with_design_value(p, "schedule.ramp_angles_deg[6][2]", 7.0)
    assert q.inlet.schedule.ramp_angles_deg[5] == (7.5, 7.0, 7.5)
    assert with_design_value(p, "bleed_fraction", 0.01).inlet.bleed_fraction == 0.01
    assert with_design_value(p, "bypass_area_m2", 0.2).inlet.bypass_area_m2 == 0.2
    with pytest.raises(ProjectError):
        with_design_value(p, "schedule.throat_area_m2[9]", 0.4)
    with pytest.raises(ProjectError):
        with_design_value(p, "schedule.throat_area_m2[2]", 5.0)  # larger than the capture area


def test_the_fighter_is_sized_feasible_only_with_its_schedule(tmp_path, capsys):
    # spillage (pre-entry) drag near Mach 1.14 bounds the capture area from above through the installation
    # loss, supercritical running at Mach 2.2 from below; the fixed ramps (5 deg each) also fall short of the
    # MIL-E-5008B recovery at Mach 2.2 whatever the capture.
    p = load_project(FIGHTER)
    fixed = replace(p, inlet=replace(p.inlet, schedule=None))
    path = tmp_path / "fixed.toml"
    path.write_text(dumps_project(fixed), encoding="utf-8")
    search = ["--variable", "capture_area_m2", "--lower", "0.66", "--upper", "0.84", "--scan", "13"]
    code = main(["size", str(FIGHTER), *search])
    out = capsys.readouterr().out
    assert code == 0 and "EMPTY" not in out, out
    code = main(["size", str(path), *search])
    out = capsys.readouterr().out
    assert code == 1 and "EMPTY" in out, out
