"""Project file: loading, validation, saving; envelope polygon geometry."""

from __future__ import annotations

import dataclasses

import copy
import math
import os
import sys
from engine_air.project.load import tomllib  # tomli on Python 3.10
import types
from dataclasses import replace
from pathlib import Path
from unittest import mock

import numpy as np
import pytest
import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import engine_air
from engine_air.project import load as load_module
from engine_air.project import project_rules as project_rules_module
from engine_air import project as pf
from engine_air.envelope.polygon import (
    envelope_mask,
    grid_axes,
    polygon_area,
    polygon_contains,
    polygon_crossing_edges,
    polygon_self_intersects,
    vertices_collinear,
)
from engine_air.project.errors import ProjectError, ProjectSaveError
from engine_air.project.model import Case, Envelope, Grid, Inlet, Limits, Project, Rating, Schedule

SAMPLES = sorted((Path(__file__).resolve().parent.parent / "sample_projects").glob("*.toml"))


# -- helpers ---------------------------------------------------------------------

def pitot_data() -> dict:
    """A valid pitot project as parsed TOML data."""
    return {
        "project": {"format": 1, "title": "Test nacelle", "notes": "invented scenario"},
        "limits": {"face_mach_max": 0.55, "throat_mach_max": 0.8, "recovery_min": "mil-e-5008b",
                   "stable_flow_fraction": 0.85, "relative_tip_mach_max": 1.5},
        "inlet": {"type": "pitot", "capture_area_m2": 1.2, "throat_area_m2": 1.02, "face_area_m2": 1.1,
                  "duct_loss_coefficient": 0.03, "lip_suction_factor": 0.8},
        "engine": {"rating": [
            {"name": "max", "theta": [0.8, 1.0, 1.1, 1.35], "corrected_flow_kg_s": [92.0, 92.0, 88.0, 74.0],
             "fan_tip_speed_m_s": 430.0},
            {"name": "idle", "theta": [1.0], "corrected_flow_kg_s": [30.0]},
        ]},
        "envelope": {"mach": [0.15, 0.85, 0.85, 0.30], "altitude_m": [0.0, 0.0, 12500.0, 12500.0]},
        "grid": {"mach_points": 121, "altitude_points": 101},
        "case": [{"name": "standard day, max", "rating": "max", "isa_offset_K": 0.0},
                 {"name": "hot day, max", "rating": "max", "isa_offset_K": 20}],
    }


def ramp_data() -> dict:
    """A valid two-ramp external-compression project as parsed TOML data."""
    d = pitot_data()
    d["inlet"] = {"type": "external-ramp", "capture_area_m2": 0.55, "throat_area_m2": 0.40, "face_area_m2": 0.50,
                  "duct_loss_coefficient": 0.04, "lip_suction_factor": 0.5, "ramp_angles_deg": [8.0, 7.0],
                  "shock_on_lip_mach": 2.0}
    return d


def write(tmp_path: Path, data: dict, name: str = "study.toml") -> Path:
    path = tmp_path / name
    path.write_text(tomli_w.dumps(data), encoding="utf-8")
    return path


def load_error(tmp_path: Path, data: dict) -> ProjectError:
    """Write ``data`` to a file, load it, and return the ProjectError raised."""
    path = write(tmp_path, data)
    with pytest.raises(ProjectError) as info:
        pf.load_project(path)
    err = info.value
    assert type(err) is ProjectError
    assert err.path == str(path)
    assert str(path) in str(err)
    assert "\n" not in str(err)
    return err


def setpath(d: dict, dotted: str, value) -> dict:
    """Set ``value`` at a path like ``engine.rating.0.theta`` (``DELETE`` removes the key)."""
    parts = dotted.split(".")
    node = d
    for p in parts[:-1]:
        node = node[int(p)] if isinstance(node, list) else node[p]
    last = parts[-1]
    if isinstance(node, list):
        if value is DELETE:
            del node[int(last)]
        else:
            node[int(last)] = value
    elif value is DELETE:
        del node[last]
    else:
        node[last] = value
    return d


DELETE = object()
NAN, INF = float("nan"), float("inf")


# -- sample projects and round trips ----------------------------------------------

@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_sample_project_loads_and_round_trips(path, tmp_path):
    project = pf.load_project(path)
    assert project.warnings == ()
    assert "invented scenario" in project.notes.lower()
    assert pf.project_from_dict(tomllib.loads(pf.dumps_project(project))) == project
    out = tmp_path / path.name
    pf.save_project(project, out)
    again = pf.load_project(out)
    if project.characteristics is not None:  # saved elsewhere, the table is named from the new folder
        assert os.path.samefile(again.characteristics.table.path, project.characteristics.table.path)
        again = dataclasses.replace(again, characteristics_file=project.characteristics_file)
    assert again == project


def test_three_samples_exist():
    assert {p.name for p in SAMPLES} >= {"subsonic_transport_nacelle.toml", "supersonic_two_ramp.toml",
                                         "undersized_business_jet.toml"}


@pytest.mark.parametrize("make", [pitot_data, ramp_data])
def test_round_trip_load_dumps_save(make, tmp_path):
    project = pf.load_project(write(tmp_path, make()))
    assert pf.project_from_dict(tomllib.loads(pf.dumps_project(project))) == project
    target = tmp_path / "saved.toml"
    pf.save_project(project, target)
    assert pf.load_project(target) == project
    assert pf.load_project(str(target)) == project


def test_loaded_values_match_file(tmp_path):
    p = pf.load_project(write(tmp_path, pitot_data()))
    assert p.format == 1 and p.title == "Test nacelle"
    assert p.limits == Limits(0.55, 0.8, "mil-e-5008b", 0.85, 1.5, None)
    assert p.inlet == Inlet("pitot", 1.2, 1.02, 1.1, 0.03, 0.8)
    assert p.rating("max").theta == (0.8, 1.0, 1.1, 1.35)
    assert p.rating("idle").fan_tip_speed_m_s is None
    assert p.grid == Grid(121, 101)
    assert p.case("hot day, max") == Case("hot day, max", "max", 20.0)
    assert isinstance(p.cases[1].isa_offset_K, float)


def test_dumps_layout_follows_interfaces():
    text = pf.dumps_project(pf.project_from_dict(ramp_data()))
    for header in ("[project]", "[limits]", "[inlet]", "[[engine.rating]]", "[envelope]", "[grid]", "[[case]]"):
        assert header in text
    assert "ramp_angles_deg = [8.0, 7.0]" in text
    pitot_text = pf.dumps_project(pf.project_from_dict(pitot_data()))
    assert "ramp_angles_deg" not in pitot_text and "shock_on_lip_mach" not in pitot_text
    d = pitot_data()
    del d["limits"]["throat_mach_max"]
    assert "throat_mach_max" not in pf.dumps_project(pf.project_from_dict(d))


def test_defaults_when_optional_keys_absent():
    d = pitot_data()
    del d["grid"]
    for k in ("duct_loss_coefficient", "lip_suction_factor"):
        del d["inlet"][k]
    for k in ("throat_mach_max", "recovery_min", "stable_flow_fraction", "relative_tip_mach_max"):
        del d["limits"][k]
    del d["case"][0]["isa_offset_K"]
    del d["project"]["title"], d["project"]["notes"]
    p = pf.project_from_dict(d)
    assert p.grid == Grid(121, 101)
    assert p.inlet.duct_loss_coefficient == 0.0 and p.inlet.lip_suction_factor == 0.0
    assert p.limits.throat_mach_max is None and p.limits.recovery_min is None
    assert p.cases[0].isa_offset_K == 0.0
    assert p.title == "" and p.notes == ""
    assert pf.project_from_dict(tomllib.loads(pf.dumps_project(p))) == p


# -- validation rules: (mutation, expected key) ---------------------------------------

PITOT_RULES = [
    # [project]
    ("project", DELETE, "project"),
    ("project", 1, "project"),
    ("project.format", DELETE, "project.format"),
    ("project.format", 0, "project.format"),
    ("project.format", "1", "project.format"),
    ("project.format", True, "project.format"),
    ("project.format", 1.0, "project.format"),
    ("project.title", 5, "project.title"),
    ("project.notes", ["a"], "project.notes"),
    # [limits]
    ("limits", DELETE, "limits"),
    ("limits", [1], "limits"),
    ("limits.face_mach_max", DELETE, "limits.face_mach_max"),
    ("limits.face_mach_max", 0.0, "limits.face_mach_max"),
    ("limits.face_mach_max", 1.0, "limits.face_mach_max"),
    ("limits.face_mach_max", "0.5", "limits.face_mach_max"),
    ("limits.face_mach_max", True, "limits.face_mach_max"),
    ("limits.face_mach_max", NAN, "limits.face_mach_max"),
    ("limits.face_mach_max", INF, "limits.face_mach_max"),
    ("limits.throat_mach_max", 0.0, "limits.throat_mach_max"),
    ("limits.throat_mach_max", 1.01, "limits.throat_mach_max"),
    ("limits.recovery_min", "mil-e-5008", "limits.recovery_min"),
    ("limits.recovery_min", 0.0, "limits.recovery_min"),
    ("limits.recovery_min", 1.2, "limits.recovery_min"),
    ("limits.recovery_min", False, "limits.recovery_min"),
    ("limits.recovery_min", [0.9], "limits.recovery_min"),
    ("limits.stable_flow_fraction", 0.0, "limits.stable_flow_fraction"),
    ("limits.stable_flow_fraction", 1.0, "limits.stable_flow_fraction"),
    ("limits.relative_tip_mach_max", 0.0, "limits.relative_tip_mach_max"),
    ("limits.relative_tip_mach_max", 3.0, "limits.relative_tip_mach_max"),
    ("limits.spillage_fraction_max", -0.1, "limits.spillage_fraction_max"),
    ("limits.spillage_fraction_max", 1.0, "limits.spillage_fraction_max"),
    # [inlet]
    ("inlet", DELETE, "inlet"),
    ("inlet", "pitot", "inlet"),
    ("inlet.type", DELETE, "inlet.type"),
    ("inlet.type", "ramjet", "inlet.type"),
    ("inlet.type", "Pitot", "inlet.type"),
    ("inlet.type", 1, "inlet.type"),
    ("inlet.capture_area_m2", DELETE, "inlet.capture_area_m2"),
    ("inlet.capture_area_m2", 0.0, "inlet.capture_area_m2"),
    ("inlet.capture_area_m2", -1.2, "inlet.capture_area_m2"),
    ("inlet.capture_area_m2", 100.5, "inlet.capture_area_m2"),
    ("inlet.capture_area_m2", "1.2", "inlet.capture_area_m2"),
    ("inlet.capture_area_m2", [1.2], "inlet.capture_area_m2"),
    ("inlet.capture_area_m2", {"value": 1.2}, "inlet.capture_area_m2"),
    ("inlet.capture_area_m2", INF, "inlet.capture_area_m2"),
    ("inlet.throat_area_m2", DELETE, "inlet.throat_area_m2"),
    ("inlet.throat_area_m2", 1.3, "inlet.throat_area_m2"),  # larger than capture
    ("inlet.throat_area_m2", NAN, "inlet.throat_area_m2"),
    ("inlet.face_area_m2", DELETE, "inlet.face_area_m2"),
    ("inlet.face_area_m2", 0, "inlet.face_area_m2"),
    ("inlet.face_area_m2", False, "inlet.face_area_m2"),
    ("inlet.duct_loss_coefficient", -0.01, "inlet.duct_loss_coefficient"),
    ("inlet.duct_loss_coefficient", 2.5, "inlet.duct_loss_coefficient"),
    ("inlet.lip_suction_factor", -0.1, "inlet.lip_suction_factor"),
    ("inlet.lip_suction_factor", 1.1, "inlet.lip_suction_factor"),
    # [[engine.rating]]
    ("engine", DELETE, "engine"),
    ("engine", [1], "engine"),
    ("engine.rating", DELETE, "engine.rating"),
    ("engine.rating", [], "engine.rating"),
    ("engine.rating", {"name": "max"}, "engine.rating"),
    ("engine.rating.0", "max", "engine.rating[0]"),
    ("engine.rating.0.name", DELETE, "engine.rating[0].name"),
    ("engine.rating.0.name", "", "engine.rating[0].name"),
    ("engine.rating.0.name", "  ", "engine.rating[0].name"),
    ("engine.rating.0.name", 3, "engine.rating[0].name"),
    ("engine.rating.1.name", "max", "engine.rating[1].name"),  # duplicate
    ("engine.rating.0.theta", DELETE, "engine.rating[0].theta"),
    ("engine.rating.0.theta", [], "engine.rating[0].theta"),
    ("engine.rating.0.theta", 1.0, "engine.rating[0].theta"),
    ("engine.rating.0.theta", [0.8, 1.0, 1.0, 1.35], "engine.rating[0].theta[2]"),
    ("engine.rating.0.theta", [0.8, 1.1, 1.0, 1.35], "engine.rating[0].theta[2]"),
    ("engine.rating.0.theta", [0.3, 1.0, 1.1, 1.35], "engine.rating[0].theta[0]"),
    ("engine.rating.0.theta", [0.8, 1.0, 1.1, 3.0], "engine.rating[0].theta[3]"),
    ("engine.rating.0.theta", [0.8, "1.0", 1.1, 1.35], "engine.rating[0].theta[1]"),
    ("engine.rating.0.theta", [0.8, 1.0, NAN, 1.35], "engine.rating[0].theta[2]"),
    ("engine.rating.0.corrected_flow_kg_s", DELETE, "engine.rating[0].corrected_flow_kg_s"),
    ("engine.rating.0.corrected_flow_kg_s", [92.0, 92.0, 88.0], "engine.rating[0].corrected_flow_kg_s"),
    ("engine.rating.0.corrected_flow_kg_s", [92.0, 0.0, 88.0, 74.0], "engine.rating[0].corrected_flow_kg_s[1]"),
    ("engine.rating.0.corrected_flow_kg_s", [92.0, 92.0, 88.0, 5001.0], "engine.rating[0].corrected_flow_kg_s[3]"),
    ("engine.rating.0.corrected_flow_kg_s", [92.0, 92.0, True, 74.0], "engine.rating[0].corrected_flow_kg_s[2]"),
    ("engine.rating.1.corrected_flow_kg_s", [-30.0], "engine.rating[1].corrected_flow_kg_s[0]"),
    ("engine.rating.0.fan_tip_speed_m_s", 0.0, "engine.rating[0].fan_tip_speed_m_s"),
    ("engine.rating.0.fan_tip_speed_m_s", 1000.5, "engine.rating[0].fan_tip_speed_m_s"),
    ("engine.rating.0.fan_tip_speed_m_s", INF, "engine.rating[0].fan_tip_speed_m_s"),
    # [envelope]
    ("envelope", DELETE, "envelope"),
    ("envelope", [0.1, 0.2], "envelope"),
    ("envelope.mach", DELETE, "envelope.mach"),
    ("envelope.mach", [0.15, 0.85], "envelope.mach"),
    ("envelope.mach", 0.5, "envelope.mach"),
    ("envelope.altitude_m", DELETE, "envelope.altitude_m"),
    ("envelope.altitude_m", [0.0, 0.0, 12500.0], "envelope.altitude_m"),
    ("envelope.mach", [-0.1, 0.85, 0.85, 0.30], "envelope.mach[0]"),
    ("envelope.mach", [0.15, 6.5, 0.85, 0.30], "envelope.mach[1]"),
    ("envelope.mach", [0.15, 0.85, "fast", 0.30], "envelope.mach[2]"),
    ("envelope.altitude_m", [-5001.0, 0.0, 12500.0, 12500.0], "envelope.altitude_m[0]"),
    ("envelope.altitude_m", [0.0, 0.0, 12500.0, 90000.0], "envelope.altitude_m[3]"),
    ("envelope.altitude_m", [0.0, 12500.0, 0.0, 12500.0], "envelope"),  # bow-tie
    ("envelope.altitude_m", [0.0, 0.0, 0.0, 0.0], "envelope"),  # repeated vertex (0.85, 0)
    # [grid]
    ("grid", 121, "grid"),
    ("grid.mach_points", 1, "grid.mach_points"),
    ("grid.mach_points", 1002, "grid.mach_points"),
    ("grid.mach_points", 121.0, "grid.mach_points"),
    ("grid.mach_points", True, "grid.mach_points"),
    ("grid.altitude_points", "101", "grid.altitude_points"),
    ("grid.altitude_points", 0, "grid.altitude_points"),
    # [[case]]
    ("case", DELETE, "case"),
    ("case", [], "case"),
    ("case", {"name": "x", "rating": "max"}, "case"),
    ("case.0", 5, "case[0]"),
    ("case.0.name", DELETE, "case[0].name"),
    ("case.0.name", "", "case[0].name"),
    ("case.1.name", "standard day, max", "case[1].name"),  # duplicate
    ("case.0.rating", DELETE, "case[0].rating"),
    ("case.0.rating", "takeoff", "case[0].rating"),
    ("case.1.rating", 1, "case[1].rating"),
    ("case.0.isa_offset_K", 100.5, "case[0].isa_offset_K"),
    ("case.0.isa_offset_K", -101, "case[0].isa_offset_K"),
    ("case.0.isa_offset_K", NAN, "case[0].isa_offset_K"),
    ("case.0.isa_offset_K", "+20", "case[0].isa_offset_K"),
]


@pytest.mark.parametrize("where,value,key", PITOT_RULES,
                         ids=[f"{w}={v!r}" if v is not DELETE else f"{w}-missing" for w, v, _ in PITOT_RULES])
def test_pitot_rule(where, value, key, tmp_path):
    err = load_error(tmp_path, setpath(pitot_data(), where, value))
    assert err.key == key
    assert err.allowed


RAMP_RULES = [
    ("inlet.throat_area_m2", 0.56, "inlet.throat_area_m2"),
    ("inlet.ramp_angles_deg", DELETE, "inlet.ramp_angles_deg"),
    ("inlet.ramp_angles_deg", [], "inlet.ramp_angles_deg"),
    ("inlet.ramp_angles_deg", 8.0, "inlet.ramp_angles_deg"),
    ("inlet.ramp_angles_deg", [5.0, 5.0, 5.0, 5.0], "inlet.ramp_angles_deg"),
    ("inlet.ramp_angles_deg", [-0.5, 7.0], "inlet.ramp_angles_deg[0]"),
    ("inlet.ramp_angles_deg", [8.0, -7.0], "inlet.ramp_angles_deg[1]"),
    ("inlet.ramp_angles_deg", [8.0, 25.5], "inlet.ramp_angles_deg[1]"),
    ("inlet.ramp_angles_deg", [20.0, 15.0, 6.0], "inlet.ramp_angles_deg"),  # sum 41 > 40
    ("inlet.ramp_angles_deg", [8.0, "7"], "inlet.ramp_angles_deg[1]"),
    ("inlet.shock_on_lip_mach", DELETE, "inlet.shock_on_lip_mach"),
    ("inlet.shock_on_lip_mach", 1.0, "inlet.shock_on_lip_mach"),
    ("inlet.shock_on_lip_mach", 5.01, "inlet.shock_on_lip_mach"),
    ("inlet.shock_on_lip_mach", "2", "inlet.shock_on_lip_mach"),
]


@pytest.mark.parametrize("where,value,key", RAMP_RULES,
                         ids=[f"{w}={v!r}" if v is not DELETE else f"{w}-missing" for w, v, _ in RAMP_RULES])
def test_ramp_rule(where, value, key, tmp_path):
    err = load_error(tmp_path, setpath(ramp_data(), where, value))
    assert err.key == key


def test_error_attributes_and_one_line_message(tmp_path):
    err = load_error(tmp_path, setpath(pitot_data(), "inlet.throat_area_m2", 1.5))
    assert err.key == "inlet.throat_area_m2"
    assert err.value == 1.5
    assert "capture_area_m2" in err.allowed
    assert str(err) == f"{err.path}: inlet.throat_area_m2 = 1.5: {err.allowed}"
    assert isinstance(err, ValueError)


def test_error_without_path_or_value():
    assert str(ProjectError(None, "limits", None, "missing")) == "limits: missing"
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict(setpath(pitot_data(), "limits.face_mach_max", 2.0))
    assert info.value.path is None
    assert str(info.value).startswith("limits.face_mach_max = 2.0: ")


def test_newer_format_message(tmp_path):
    err = load_error(tmp_path, setpath(pitot_data(), "project.format", 7))
    assert err.key == "project.format" and err.value == 7
    assert "reads format 1" in str(err) and "format 7" in str(err) and "newer version" in str(err)


def test_unknown_rating_lists_names(tmp_path):
    err = load_error(tmp_path, setpath(pitot_data(), "case.0.rating", "takeoff"))
    assert "'max'" in err.allowed and "'idle'" in err.allowed


def test_grid_product_limit(tmp_path):
    d = pitot_data()
    d["grid"] = {"mach_points": 1001, "altitude_points": 1001}
    err = load_error(tmp_path, d)
    assert err.key == "grid"
    assert "1002001" in str(err) and "250000" in str(err) and "memory" in str(err)
    d["grid"] = {"mach_points": 500, "altitude_points": 500}  # exactly the limit is allowed
    assert pf.project_from_dict(d).grid == Grid(500, 500)


def test_number_rules_accept_ints_and_edge_values():
    d = pitot_data()
    d["inlet"].update(capture_area_m2=100, throat_area_m2=100, face_area_m2=2, duct_loss_coefficient=2,
                      lip_suction_factor=1)
    d["limits"].update(throat_mach_max=1, spillage_fraction_max=0, recovery_min=1)
    d["case"][0]["isa_offset_K"] = -100
    d["grid"] = {"mach_points": 2, "altitude_points": 1001}
    p = pf.project_from_dict(d)
    assert p.inlet.capture_area_m2 == 100.0 and isinstance(p.inlet.capture_area_m2, float)
    assert p.limits.recovery_min == 1.0 and p.limits.spillage_fraction_max == 0.0
    assert p.grid == Grid(2, 1001)


def test_single_point_rating_is_allowed():
    d = pitot_data()
    d["engine"]["rating"][0].update(theta=[1.0], corrected_flow_kg_s=[90.0])
    assert pf.project_from_dict(d).ratings[0].theta == (1.0,)


def test_recovery_reference_name_case_insensitive():
    d = setpath(pitot_data(), "limits.recovery_min", "MIL-E-5008B")
    assert pf.project_from_dict(d).limits.recovery_min == "mil-e-5008b"


def test_throat_equal_to_capture_is_allowed():
    d = setpath(pitot_data(), "inlet.throat_area_m2", 1.2)
    assert pf.project_from_dict(d).inlet.throat_area_m2 == 1.2


def test_ramp_limits_at_edges():
    d = setpath(ramp_data(), "inlet.ramp_angles_deg", [25.0, 15.0])
    d["inlet"]["shock_on_lip_mach"] = 5
    with mock.patch.object(project_rules_module, "_check_design", lambda r, inlet: None):
        p = pf.project_from_dict(d)
    assert p.inlet.ramp_angles_deg == (25.0, 15.0) and p.inlet.shock_on_lip_mach == 5.0


def test_envelope_without_area_rejected():
    d = pitot_data()
    d["envelope"] = {"mach": [0.1, 0.5, 0.9, 0.3], "altitude_m": [0.0, 5000.0, 10000.0, 2500.0]}
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict(d, "x.toml")
    assert info.value.key == "envelope" and "no area" in info.value.allowed


def test_envelope_bow_tie_rejected():
    d = pitot_data()
    d["envelope"] = {"mach": [0.15, 0.85, 0.15, 0.85], "altitude_m": [0.0, 12500.0, 12500.0, 0.0]}
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict(d, "x.toml")
    assert info.value.key == "envelope" and "crosses itself" in info.value.allowed


def test_envelope_repeated_vertex_rejected():
    d = pitot_data()
    d["envelope"] = {"mach": [0.15, 0.85, 0.85, 0.30, 0.15], "altitude_m": [0.0, 0.0, 12500.0, 12500.0, 0.0]}
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict(d, "x.toml")
    assert info.value.key == "envelope" and "repeat" in info.value.allowed


def test_envelope_vertex_count_limit():
    n = pf.MAX_ENVELOPE_VERTICES + 1
    a = np.linspace(0, 2 * np.pi, n, endpoint=False)
    d = pitot_data()
    d["envelope"] = {"mach": list(1 + 0.5 * np.cos(a)), "altitude_m": list(10000 + 5000 * np.sin(a))}
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict(d)
    assert info.value.key == "envelope.mach"


def test_non_table_top_level():
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict([1, 2], "x.toml")
    assert info.value.key == "(file)"


# -- strict files: unknown keys are errors (issue 9) ---------------------------------

@pytest.mark.parametrize("where, name, key, hint", [
    ("", "extras", "extras", None),
    ("", "limit", "limit", "limits"),
    ("inlet", "colour", "inlet.colour", None),
    ("inlet", "capture_area", "inlet.capture_area", "capture_area_m2"),
    ("engine.rating.1", "maker", "engine.rating[1].maker", None),
    ("engine.rating.1", "fan_tip_speed", "engine.rating[1].fan_tip_speed", "fan_tip_speed_m_s"),
    ("engine", "spare", "engine.spare", None),
    ("case.0", "comment", "case[0].comment", None),
    ("case.0", "isa_offset_k", "case[0].isa_offset_k", "isa_offset_K"),
    ("grid", "refine", "grid.refine", None),
    ("grid", "mach_point", "grid.mach_point", "mach_points"),
    ("limits", "face_mach_maximum", "limits.face_mach_maximum", "face_mach_max"),
    ("project", "titel", "project.titel", "title"),
])
def test_unknown_key_is_an_error_with_suggestion(where, name, key, hint, tmp_path):
    d = pitot_data()
    node = d
    for part in where.split(".") if where else []:
        node = node[int(part)] if isinstance(node, list) else node[part]
    node[name] = 15
    err = load_error(tmp_path, d)
    assert err.key == key and "unknown" in err.allowed
    if hint is not None:
        assert f"did you mean {hint}?" in err.allowed
    else:
        assert "did you mean" not in err.allowed


def test_mistyped_isa_offset_names_case_and_suggests(tmp_path):
    # issue 9: `isa_offset_k = 15` in a case called "ISA+15" ran at ISA with a normal exit code
    d = pitot_data()
    d["case"][0] = {"name": "ISA+15", "rating": "max", "isa_offset_k": 15}
    err = load_error(tmp_path, d)
    assert err.key == "case[0].isa_offset_k" and err.value == 15
    assert "did you mean isa_offset_K?" in str(err)


@pytest.mark.parametrize("key, value", [("ramp_angles_deg", [8.0]), ("shock_on_lip_mach", 2.0)])
def test_ramp_keys_on_pitot_are_errors_naming_their_types(key, value, tmp_path):
    d = pitot_data()
    d["inlet"][key] = value
    err = load_error(tmp_path, d)
    assert err.key == f"inlet.{key}"
    assert "'external-ramp'" in err.allowed and "'pitot'" in err.allowed


def test_schedule_key_of_another_type_is_an_error(tmp_path):
    d = pitot_data()
    d["inlet"]["schedule"] = {"mach": [0.0, 1.0], "ramp_angles_deg": [[4.0], [6.0]]}
    err = load_error(tmp_path, d)
    assert err.key == "inlet.schedule.ramp_angles_deg" and "'external-ramp'" in err.allowed


def test_unknown_inlet_type_suggests_a_known_one(tmp_path):
    err = load_error(tmp_path, setpath(pitot_data(), "inlet.type", "external_ramp"))
    assert err.key == "inlet.type" and 'did you mean "external-ramp"?' in err.allowed


def test_tip_mach_limit_without_tip_speed_is_an_error():
    # the limit would be judged nowhere (more cases in tests/test_limit_data.py)
    d = pitot_data()
    del d["engine"]["rating"][0]["fan_tip_speed_m_s"]
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict(d)
    assert info.value.key == "limits.relative_tip_mach_max" and "judged nowhere" in info.value.allowed


# -- whole-file problems -----------------------------------------------------------

def test_file_too_large(tmp_path):
    path = tmp_path / "big.toml"
    path.write_bytes(tomli_w.dumps(pitot_data()).encode() + b"#" * pf.MAX_FILE_BYTES + b"\n")
    with pytest.raises(ProjectError) as info:
        pf.load_project(path)
    err = info.value
    assert err.key == "(file)" and str(path) in str(err) and str(pf.MAX_FILE_BYTES) in str(err)


def test_file_not_utf8(tmp_path):
    path = tmp_path / "latin.toml"
    path.write_bytes(tomli_w.dumps(pitot_data()).encode().replace(b"Test nacelle", b"Test \xe9nacelle"))
    with pytest.raises(ProjectError) as info:
        pf.load_project(path)
    assert info.value.key == "(file)" and "UTF-8" in str(info.value) and str(path) in str(info.value)


def test_utf8_bom_accepted(tmp_path):
    path = tmp_path / "bom.toml"
    path.write_bytes(b"\xef\xbb\xbf" + tomli_w.dumps(pitot_data()).encode())
    assert pf.load_project(path) == pf.project_from_dict(pitot_data())


def test_toml_syntax_error_names_line(tmp_path):
    path = tmp_path / "broken.toml"
    path.write_text("[project]\nformat = 1\ntitle = \"unterminated\n", encoding="utf-8")
    with pytest.raises(ProjectError) as info:
        pf.load_project(path)
    err = info.value
    assert err.key == "(file)" and "line 3" in str(err) and str(path) in str(err) and "\n" not in str(err)


def test_deeply_nested_file(tmp_path):
    path = tmp_path / "deep.toml"
    path.write_text("x = " + "[" * 50000, encoding="utf-8")
    with pytest.raises(ProjectError) as info:
        pf.load_project(path)
    assert info.value.key == "(file)"


def test_missing_file_and_folder(tmp_path):
    for p in (tmp_path / "nothing.toml", tmp_path):
        with pytest.raises(ProjectError) as info:
            pf.load_project(p)
        assert info.value.key == "(file)" and str(p) in str(info.value)


def test_nothing_is_executed(tmp_path):
    d = pitot_data()
    d["project"]["title"] = "__import__('os').system('false')"
    p = pf.load_project(write(tmp_path, d))
    assert p.title == "__import__('os').system('false')"


# -- saving -----------------------------------------------------------------------

def test_save_overwrites_and_keeps_mode(tmp_path):
    target = tmp_path / "study.toml"
    target.write_text("old", encoding="utf-8")
    os.chmod(target, 0o640)
    project = pf.project_from_dict(pitot_data())
    pf.save_project(project, target)
    assert pf.load_project(target) == project
    assert (os.stat(target).st_mode & 0o777) == 0o640
    assert sorted(os.listdir(tmp_path)) == ["study.toml"]


@pytest.mark.parametrize("broken", ["replace", "fsync"])
def test_failed_save_leaves_old_file_intact(broken, tmp_path, monkeypatch):
    target = tmp_path / "study.toml"
    old = pf.dumps_project(pf.project_from_dict(pitot_data()))
    target.write_text(old, encoding="utf-8")

    def fail(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, broken, fail)
    with pytest.raises(ProjectSaveError) as info:
        pf.save_project(pf.project_from_dict(ramp_data()), target)
    monkeypatch.undo()
    err = info.value
    assert isinstance(err, OSError)
    assert str(target) in str(err) and "No space left" in str(err) and "\n" not in str(err)
    assert target.read_text(encoding="utf-8") == old
    assert sorted(os.listdir(tmp_path)) == ["study.toml"]  # no temporary file left behind


def test_save_into_missing_folder(tmp_path):
    target = tmp_path / "no" / "such" / "study.toml"
    with pytest.raises(ProjectSaveError) as info:
        pf.save_project(pf.project_from_dict(pitot_data()), target)
    assert str(target) in str(info.value)


# -- the inlet type's design check -------------------------------------------------

def test_design_check_problem_becomes_project_error(monkeypatch, tmp_path):
    from engine_air.inlets.registry import inlet_type

    seen = []

    def check_design(inlet):
        seen.append(inlet)
        return [("inlet.ramp_angles_deg[1]", 7.0, "the second ramp shock detaches at shock_on_lip_mach")]

    monkeypatch.setattr(inlet_type("external-ramp"), "check_design", check_design)
    err = load_error(tmp_path, ramp_data())
    assert err.key == "inlet.ramp_angles_deg[1]" and err.value == 7.0 and "detaches" in err.allowed
    assert seen and seen[0].ramp_angles_deg == (8.0, 7.0)


def test_design_check_no_problems(monkeypatch):
    from engine_air.inlets.registry import inlet_type

    monkeypatch.setattr(inlet_type("external-ramp"), "check_design", lambda inlet: [])
    assert pf.project_from_dict(ramp_data()).inlet.type == "external-ramp"


# -- envelope geometry --------------------------------------------------------------

SQUARE = ([0.0, 1.0, 1.0, 0.0], [0.0, 0.0, 1.0, 1.0])
# L-shape: the square [0, 2] x [0, 2] without its upper-right quarter
L_SHAPE = ([0.0, 2.0, 2.0, 1.0, 1.0, 0.0], [0.0, 0.0, 1.0, 1.0, 2.0, 2.0])


def test_contains_unit_square():
    m = np.array([0.5, 0.01, 0.99, 1.5, -0.5, 0.5, 0.5])
    h = np.array([0.5, 0.01, 0.99, 0.5, 0.5, 1.5, -0.01])
    assert polygon_contains(*SQUARE, m, h).tolist() == [True, True, True, False, False, False, False]


def test_contains_edges_and_vertices_count_inside():
    m = np.array([0.0, 1.0, 0.5, 0.5, 1.0, 0.0, 1.0 + 1e-12, 1.0 + 1e-6])
    h = np.array([0.0, 1.0, 0.0, 1.0, 0.3, 0.7, 0.5, 0.5])
    assert polygon_contains(*SQUARE, m, h).tolist() == [True] * 7 + [False]


def test_contains_concave_l_shape():
    pts = [((0.5, 0.5), True), ((1.5, 0.5), True), ((0.5, 1.5), True), ((1.5, 1.5), False),
           ((1.0, 1.5), True), ((1.5, 1.0), True), ((1.2, 1.2), False), ((2.5, 0.5), False),
           ((0.5, 2.5), False), ((1.99, 0.99), True), ((0.99, 1.99), True)]
    m = np.array([p[0][0] for p in pts])
    h = np.array([p[0][1] for p in pts])
    assert polygon_contains(*L_SHAPE, m, h).tolist() == [p[1] for p in pts]


def test_contains_is_scale_free_and_broadcasts():
    # the L-shape stretched to Mach ~1 and altitude ~10^4 m gives the same answers
    poly_m = [0.2 + 0.4 * x for x in L_SHAPE[0]]
    poly_h = [1000.0 + 6000.0 * y for y in L_SHAPE[1]]
    m = 0.2 + 0.4 * np.array([0.5, 1.5, 1.5])
    h = 1000.0 + 6000.0 * np.array([[0.5], [1.5]])
    got = polygon_contains(poly_m, poly_h, m, h)
    assert got.shape == (2, 3)
    assert got.tolist() == [[True, True, True], [True, False, False]]


def test_contains_nan_is_outside():
    assert not polygon_contains(*SQUARE, np.nan, 0.5)
    assert polygon_contains(*SQUARE, 0.5, 0.5).shape == ()


def test_bow_tie_self_intersects():
    assert polygon_self_intersects([0.0, 1.0, 0.0, 1.0], [0.0, 1.0, 1.0, 0.0])
    assert polygon_crossing_edges([0.0, 1.0, 0.0, 1.0], [0.0, 1.0, 1.0, 0.0]) == (0, 2)
    assert not polygon_self_intersects(*SQUARE)
    assert not polygon_self_intersects(*L_SHAPE)
    assert not polygon_self_intersects([0.0, 1.0, 0.5], [0.0, 0.0, 1.0])


def test_touching_and_folding_polygons_count_as_self_intersecting():
    # vertex 3 lies on edge 0-1
    assert polygon_self_intersects([0.0, 2.0, 2.0, 1.0, 0.0], [0.0, 0.0, 1.0, 0.0, 1.0])
    # edge 1-2 runs back along edge 0-1
    assert polygon_self_intersects([0.0, 2.0, 1.0, 1.0], [0.0, 0.0, 0.0, 1.0])


def test_vertices_collinear():
    assert vertices_collinear([0.1, 0.5, 0.9], [0.0, 5000.0, 10000.0])
    assert vertices_collinear([0.1, 0.5, 0.9, 0.3], [0.0, 0.0, 0.0, 0.0])
    assert not vertices_collinear([0.1, 0.5, 0.9], [0.0, 5000.0, 0.0])


def test_polygon_area_normalised():
    assert polygon_area(*SQUARE) == pytest.approx(1.0)
    assert polygon_area(*L_SHAPE) == pytest.approx(0.75)
    assert polygon_area([0.2, 0.8, 0.8, 0.2], [0.0, 0.0, 12000.0, 12000.0]) == pytest.approx(1.0)
    assert polygon_area([0.0, 0.5, 1.0], [0.0, 5000.0, 10000.0]) == pytest.approx(0.0, abs=1e-12)
    assert polygon_area(list(reversed(SQUARE[0])), list(reversed(SQUARE[1]))) == pytest.approx(1.0)


def test_grid_axes_span_bounding_box():
    env = Envelope(mach=(0.3, 1.1, 1.6, 2.1, 2.1, 0.7, 0.3),
                   altitude_m=(0.0, 0.0, 6000.0, 11000.0, 16000.0, 16000.0, 6000.0))
    m, h = grid_axes(env, Grid(mach_points=19, altitude_points=17))
    assert m.shape == (19,) and h.shape == (17,)
    assert m[0] == 0.3 and m[-1] == 2.1 and h[0] == 0.0 and h[-1] == 16000.0
    assert np.allclose(np.diff(m), 0.1) and np.allclose(np.diff(h), 1000.0)


def test_envelope_mask_on_grid():
    env = Envelope(mach=(0.3, 1.1, 1.6, 2.1, 2.1, 0.7, 0.3),
                   altitude_m=(0.0, 0.0, 6000.0, 11000.0, 16000.0, 16000.0, 6000.0))
    m, h = grid_axes(env, Grid(mach_points=19, altitude_points=17))
    mm, hh = np.meshgrid(m, h)
    mask = envelope_mask(env, mm, hh)
    assert mask.shape == (17, 19) and mask.dtype == bool
    j = lambda mach: int(round((mach - 0.3) / 0.1))  # noqa: E731
    assert mask[0, j(0.3)] and mask[0, j(1.1)] and not mask[0, j(1.2)]  # sea level: subsonic only
    assert mask[11, j(2.1)] and mask[16, j(2.1)] and mask[16, j(0.7)] and not mask[16, j(0.6)]
    assert not mask[0, j(2.1)] and mask[6, j(1.6)] and not mask[6, j(1.7)]
    # every vertex is on the boundary, hence inside
    assert envelope_mask(env, np.array(env.mach), np.array(env.altitude_m)).all()


@settings(max_examples=100, deadline=None)
@given(x0=st.floats(0, 5), y0=st.floats(-5000, 60000), w=st.floats(0.01, 1), hgt=st.floats(10, 20000),
       u=st.lists(st.floats(-0.5, 1.5), min_size=1, max_size=20), v=st.floats(-0.5, 1.5))
def test_contains_rectangle_property(x0, y0, w, hgt, u, v):
    pm = [x0, x0 + w, x0 + w, x0]
    ph = [y0, y0, y0 + hgt, y0 + hgt]
    uu = np.array(u)
    got = polygon_contains(pm, ph, x0 + w * uu, y0 + hgt * v)
    strict = (uu > 1e-6) & (uu < 1 - 1e-6) & (1e-6 < v < 1 - 1e-6)
    outside = (uu < -1e-6) | (uu > 1 + 1e-6) | (v < -1e-6) | (v > 1 + 1e-6)
    assert got[strict].all() and not got[outside].any()


def _reference_contains(pm, ph, m, h):
    """Plain even-odd ray casting over all points for every edge (no tolerance)."""
    pm, ph = np.asarray(pm), np.asarray(ph)
    inside = np.zeros(np.broadcast(m, h).shape, dtype=bool)
    for i in range(len(pm)):
        ax, ay, bx, by = pm[i], ph[i], pm[(i + 1) % len(pm)], ph[(i + 1) % len(pm)]
        if ay != by:
            crosses = (ay > h) != (by > h)
            inside ^= crosses & (m < ax + (h - ay) * (bx - ax) / (by - ay))
    return inside


@settings(max_examples=100, deadline=None)
@given(env=st.deferred(lambda: star_polygons()), seed=st.integers(0, 2**32 - 1))
def test_contains_matches_plain_ray_casting(env, seed):
    rng = np.random.default_rng(seed)
    lo_m, hi_m = min(env.mach), max(env.mach)
    lo_h, hi_h = min(env.altitude_m), max(env.altitude_m)
    m = rng.uniform(lo_m - 0.1 * (hi_m - lo_m), hi_m + 0.1 * (hi_m - lo_m), 400)
    h = rng.uniform(lo_h - 0.1 * (hi_h - lo_h), hi_h + 0.1 * (hi_h - lo_h), 400)
    got = polygon_contains(env.mach, env.altitude_m, m, h)
    assert np.array_equal(got, _reference_contains(env.mach, env.altitude_m, m, h))


# -- hypothesis: random valid projects round-trip exactly --------------------------------

def _fl(lo, hi, lo_open=True, hi_open=False):
    return st.floats(min_value=lo, max_value=hi, exclude_min=lo_open, exclude_max=hi_open,
                     allow_nan=False, allow_infinity=False)


def _opt(strategy):
    return st.none() | strategy


names = st.text(min_size=1, max_size=16).filter(lambda s: s.strip() != "")


@st.composite
def star_polygons(draw):
    """Simple polygons: vertices in angular order around a centre, scaled into the allowed box."""
    n = draw(st.integers(3, 9))
    step = 2 * math.pi / n
    angles = [k * step + draw(_fl(-0.2, 0.2, False)) * step for k in range(n)]
    radii = [draw(_fl(0.3, 1.0, False)) for _ in range(n)]
    cm = draw(_fl(0.05, 5.95, False))
    rm = draw(_fl(0.01, min(cm, 6.0 - cm), False))
    ca = draw(_fl(-4900.0, 83900.0, False))
    ra = draw(_fl(10.0, min(ca + 5000.0, 84000.0 - ca), False))
    mach = tuple(float(np.clip(cm + rm * r * math.cos(a), 0.0, 6.0)) for a, r in zip(angles, radii))
    alt = tuple(float(np.clip(ca + ra * r * math.sin(a), -5000.0, 84000.0)) for a, r in zip(angles, radii))
    return Envelope(mach=mach, altitude_m=alt)


def _increasing(lo, hi, max_size=4):
    return st.lists(_fl(lo, hi, False), min_size=1, max_size=max_size, unique=True).map(lambda v: tuple(sorted(v)))


@st.composite
def ratings(draw):
    theta = draw(st.lists(_fl(0.3, 3.0, True, True), min_size=1, max_size=6, unique=True).map(sorted))
    flow = draw(st.lists(_fl(0.0, 5000.0), min_size=len(theta), max_size=len(theta)))
    extra = {}
    if draw(st.booleans()):
        extra["corrected_tip_speed_m_s"] = tuple(draw(st.lists(_fl(0.0, 1000.0), min_size=len(theta),
                                                                max_size=len(theta))))
    else:
        extra["fan_tip_speed_m_s"] = draw(_opt(_fl(0.0, 1000.0)))
    if draw(st.booleans()):
        mach, alt = draw(_increasing(0.0, 6.0)), draw(_increasing(-5000.0, 84000.0, 3))
        extra.update(thrust_mach=mach, thrust_altitude_m=alt,
                     net_thrust_n=tuple(tuple(draw(st.lists(_fl(0.0, 1e7), min_size=len(mach), max_size=len(mach))))
                                        for _ in alt),
                     thrust_reference_recovery=draw(st.none() | _fl(0.0, 1.0) | st.just("mil-e-5008b")),
                     recovery_thrust_exchange=draw(_fl(0.0, 10.0, False)))  # a thrust table needs its X
    return draw(names), tuple(theta), tuple(flow), extra


def _range(lo, hi):
    return st.tuples(_fl(lo, hi, False), _fl(lo, hi, False)).map(lambda t: (min(t), max(t)))


@st.composite
def projects(draw):
    limits = Limits(
        face_mach_max=draw(_fl(0.0, 1.0, True, True)),
        throat_mach_max=draw(_opt(_fl(0.0, 1.0))),
        recovery_min=draw(st.none() | _fl(0.0, 1.0) | st.just("mil-e-5008b")),
        stable_flow_fraction=draw(_opt(_fl(0.0, 1.0, True, True))),
        relative_tip_mach_max=draw(_opt(_fl(0.0, 3.0, True, True))),
        spillage_fraction_max=draw(_opt(_fl(0.0, 1.0, False, True))),
        started_required=draw(st.none() | st.booleans()),
        installation_loss_max=draw(_opt(_fl(0.0, 1.0, True, True))),
    )
    capture = draw(_fl(0.0, 100.0))
    kind = draw(st.sampled_from(["pitot", "external-ramp"]))
    ramps, lip = (), None
    if kind == "external-ramp":
        ramps = tuple(draw(st.lists(_fl(0.0, 25.0), min_size=1, max_size=3).filter(lambda a: sum(a) <= 40.0)))
        lip = draw(_fl(1.0, 5.0))
    inlet = Inlet(type=kind, capture_area_m2=capture, throat_area_m2=draw(_fl(0.0, capture)),
                  face_area_m2=draw(_fl(0.0, 100.0)), duct_loss_coefficient=draw(_fl(0.0, 2.0, False)),
                  lip_suction_factor=draw(_fl(0.0, 1.0, False)), ramp_angles_deg=ramps, shock_on_lip_mach=lip,
                  supersonic_lip_suction_factor=draw(_fl(0.0, 1.0, False)), bleed_fraction=draw(_fl(0.0, 0.5, False, True)),
                  bleed_exit_velocity_ratio=draw(_fl(0.0, 1.0, False)), bypass_area_m2=draw(_fl(0.0, 100.0, False)),
                  bypass_discharge_coefficient=draw(_fl(0.0, 1.0)), bypass_exit_velocity_ratio=draw(_fl(0.0, 1.0, False)),
                  auxiliary_inlet_area_m2=draw(_fl(0.0, 100.0, False)), auxiliary_door_mach_max=draw(_fl(0.0, 1.0)),
                  auxiliary_loss_coefficient=draw(_fl(0.0, 2.0, False)))
    if draw(st.booleans()):
        mach = draw(_increasing(0.0, 6.0))
        n = len(mach)
        sched = dict(mach=mach, throat_area_m2=draw(_opt(st.lists(_fl(0.0, capture), min_size=n, max_size=n).map(tuple))),
                     bleed_fraction=tuple(draw(st.lists(_fl(0.0, 0.5, False, True), min_size=n, max_size=n))))
        if kind == "external-ramp":
            sched["shock_on_lip_mach"] = draw(_opt(st.lists(_fl(1.0, 5.0), min_size=n, max_size=n).map(tuple)))
            sched["ramp_angles_deg"] = draw(_opt(st.lists(
                st.lists(_fl(0.0, 25.0 / len(ramps), False), min_size=len(ramps), max_size=len(ramps)).map(tuple),
                min_size=n, max_size=n).map(tuple)))
        inlet = replace(inlet, schedule=Schedule(**sched))
    raw = draw(st.lists(ratings(), min_size=1, max_size=3, unique_by=lambda r: r[0]))
    rating_objs = tuple(Rating(name=n, theta=t, corrected_flow_kg_s=f, **extra) for n, t, f, extra in raw)
    mp = draw(st.integers(2, 1001))
    ap = draw(st.integers(2, min(1001, pf.MAX_GRID_POINTS // mp)))
    case_names = draw(st.lists(names, min_size=1, max_size=3, unique=True))
    cases = tuple(Case(name=c, rating=draw(st.sampled_from([r.name for r in rating_objs])),
                       isa_offset_K=draw(_fl(-100.0, 100.0, False)), mach_range=draw(_opt(_range(0.0, 6.0))),
                       altitude_range_m=draw(_opt(_range(-5000.0, 84000.0)))) for c in case_names)
    used = [r for r in rating_objs if any(c.rating == r.name for c in cases)]
    if not any(r.fan_tip_speed_m_s is not None or r.corrected_tip_speed_m_s is not None for r in used):
        limits = replace(limits, relative_tip_mach_max=None)  # a limit needs its data (engine_air.project.limit_data)
    if not any(r.net_thrust_n is not None for r in used):
        limits = replace(limits, installation_loss_max=None)
    return Project(limits=limits, inlet=inlet, ratings=rating_objs, envelope=draw(star_polygons()),
                   grid=Grid(mp, ap), cases=cases, title=draw(st.text(max_size=40)),
                   notes=draw(st.text(max_size=80)), format=1)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(projects())
def test_random_projects_round_trip_exactly(project):
    with mock.patch.object(project_rules_module, "_check_design", lambda r, inlet: None):
        load_module.validate_project(project)
        assert pf.project_from_dict(pf.project_to_dict(copy.deepcopy(project))) == project
        assert pf.project_from_dict(tomllib.loads(pf.dumps_project(project))) == project
        again = pf.project_from_dict(tomllib.loads(pf.dumps_project(project)))
        assert pf.dumps_project(again) == pf.dumps_project(project)


def test_replace_keeps_round_trip():
    p = pf.project_from_dict(ramp_data())
    q = replace(p, inlet=replace(p.inlet, ramp_angles_deg=(6.0, 6.0, 6.0)), title="edited")
    assert pf.project_from_dict(tomllib.loads(pf.dumps_project(q))) == q


# -- the keys of the interfaces "Additions" (issues 10 and 11): bounds and shapes ------------------------------

def full_data() -> dict:
    """A ramp project using every optional key of every type-independent table."""
    d = ramp_data()
    d["inlet"].update(supersonic_lip_suction_factor=0.3, bleed_fraction=0.03, bleed_exit_velocity_ratio=0.4,
                      bypass_area_m2=0.05, bypass_discharge_coefficient=0.85, bypass_exit_velocity_ratio=0.2,
                      auxiliary_inlet_area_m2=0.08, auxiliary_door_mach_max=0.35, auxiliary_loss_coefficient=0.5)
    d["inlet"]["schedule"] = {"mach": [0.0, 1.5, 2.0, 2.5], "throat_area_m2": [0.40, 0.40, 0.34, 0.30],
                              "shock_on_lip_mach": [2.0, 2.0, 2.0, 2.5],
                              "ramp_angles_deg": [[4.0, 4.0], [4.0, 4.0], [6.0, 6.0], [8.0, 8.0]],
                              "bleed_fraction": [0.0, 0.02, 0.04, 0.05]}
    d["limits"].update(started_required=True, installation_loss_max=0.06)
    r = d["engine"]["rating"][0]
    del r["fan_tip_speed_m_s"]
    r.update(corrected_tip_speed_m_s=[400.0, 420.0, 430.0, 430.0], thrust_mach=[0.0, 0.8, 1.6, 2.2],
             thrust_altitude_m=[0.0, 11000.0],
             net_thrust_n=[[90000.0, 80000.0, 95000.0, 110000.0], [40000.0, 38000.0, 52000.0, 60000.0]],
             thrust_reference_recovery="mil-e-5008b", recovery_thrust_exchange=1.3)
    d["engine"]["rating"][1].update(fan_tip_speed_m_s=400.0, thrust_mach=[0.5], thrust_altitude_m=[0.0],
                                    net_thrust_n=[[20000.0]], thrust_reference_recovery=0.97,
                                    recovery_thrust_exchange=1.1)
    d["case"][0].update(mach_range=[0.0, 0.4], altitude_range_m=[0.0, 3000.0])
    return d


def test_every_new_key_loads_and_round_trips_exactly(tmp_path):
    p = pf.load_project(write(tmp_path, full_data()))
    assert p.inlet.bypass_area_m2 == 0.05 and p.inlet.auxiliary_door_mach_max == 0.35
    assert p.inlet.schedule.ramp_angles_deg[2] == (6.0, 6.0) and p.inlet.schedule.bleed_fraction[-1] == 0.05
    assert p.limits.started_required is True and p.limits.installation_loss_max == 0.06
    assert p.ratings[0].net_thrust_n[1] == (40000.0, 38000.0, 52000.0, 60000.0)
    assert p.ratings[0].thrust_reference_recovery == "mil-e-5008b" and p.ratings[1].thrust_reference_recovery == 0.97
    assert p.cases[0].mach_range == (0.0, 0.4) and p.cases[1].mach_range is None
    text = pf.dumps_project(p)
    assert "[inlet.schedule]" in text
    assert load_module.loads_project(text) == p
    target = tmp_path / "saved.toml"
    pf.save_project(p, target)
    assert pf.load_project(target) == p and pf.dumps_project(pf.load_project(target)) == text
    load_module.validate_project(p)


def test_keys_at_default_are_left_out_of_the_file():
    text = pf.dumps_project(pf.project_from_dict(pitot_data()))
    for key in ("bleed_fraction", "bypass_area_m2", "bypass_discharge_coefficient", "auxiliary_inlet_area_m2",
                "internal_recovery_factor", "started_required", "mach_range", "schedule"):
        assert key not in text, key
    assert "[grid]" in text  # the resolution is always written


NEW_KEY_RULES = [
    # (dotted place, bad value, key of the error, words of the allowed text)
    ("inlet.supersonic_lip_suction_factor", 1.01, "inlet.supersonic_lip_suction_factor", "<= 1"),
    ("inlet.supersonic_lip_suction_factor", -0.01, "inlet.supersonic_lip_suction_factor", "0 <="),
    ("inlet.bleed_fraction", 0.5, "inlet.bleed_fraction", "< 0.5"),
    ("inlet.bleed_fraction", -0.01, "inlet.bleed_fraction", "0 <="),
    ("inlet.bleed_exit_velocity_ratio", 1.5, "inlet.bleed_exit_velocity_ratio", "<= 1"),
    ("inlet.bypass_area_m2", -0.1, "inlet.bypass_area_m2", "0 <="),
    ("inlet.bypass_discharge_coefficient", 0.0, "inlet.bypass_discharge_coefficient", "0 <"),
    ("inlet.bypass_discharge_coefficient", 1.1, "inlet.bypass_discharge_coefficient", "<= 1"),
    ("inlet.bypass_exit_velocity_ratio", -0.1, "inlet.bypass_exit_velocity_ratio", "0 <="),
    ("inlet.auxiliary_inlet_area_m2", -1.0, "inlet.auxiliary_inlet_area_m2", "0 <="),
    ("inlet.auxiliary_door_mach_max", 0.0, "inlet.auxiliary_door_mach_max", "0 <"),
    ("inlet.auxiliary_door_mach_max", DELETE, "inlet.auxiliary_door_mach_max", "auxiliary_inlet_area_m2 > 0"),
    ("inlet.auxiliary_loss_coefficient", -0.5, "inlet.auxiliary_loss_coefficient", "0 <="),
    ("limits.started_required", 1, "limits.started_required", "true or false"),
    ("limits.installation_loss_max", 0.0, "limits.installation_loss_max", "0 <"),
    ("limits.installation_loss_max", 1.0, "limits.installation_loss_max", "< 1"),
    # the schedule
    ("inlet.schedule.mach", [0.0, 1.5, 1.5, 2.5], "inlet.schedule.mach[2]", "increase strictly"),
    ("inlet.schedule.mach", DELETE, "inlet.schedule.mach", "missing"),
    ("inlet.schedule.throat_area_m2", [0.40, 0.40, 0.34], "inlet.schedule.throat_area_m2", "one entry per inlet.schedule.mach"),
    ("inlet.schedule.throat_area_m2", [0.40, 0.60, 0.34, 0.30], "inlet.schedule.throat_area_m2[1]",
     "must not exceed capture_area_m2"),
    ("inlet.schedule.shock_on_lip_mach", [2.0, 2.0, 2.0, 1.0], "inlet.schedule.shock_on_lip_mach[3]", "1 <"),
    ("inlet.schedule.ramp_angles_deg", [[4.0, 4.0], [4.0], [6.0, 6.0], [8.0, 8.0]],
     "inlet.schedule.ramp_angles_deg[1]", "one value per inlet.ramp_angles_deg"),
    ("inlet.schedule.ramp_angles_deg", [4.0, 4.0, 6.0, 8.0], "inlet.schedule.ramp_angles_deg[0]", "row of numbers"),
    ("inlet.schedule.ramp_angles_deg", [[4.0, 4.0], [4.0, 4.0], [6.0, 26.0], [8.0, 8.0]],
     "inlet.schedule.ramp_angles_deg[2][1]", "<= 25"),
    ("inlet.schedule.bleed_fraction", [0.0, 0.02, 0.6, 0.05], "inlet.schedule.bleed_fraction[2]", "< 0.5"),
    ("inlet.schedule.throat", [0.4, 0.4, 0.4, 0.4], "inlet.schedule.throat", "did you mean throat_area_m2?"),
    # ratings
    ("engine.rating.1.corrected_tip_speed_m_s", [400.0], "engine.rating[1].fan_tip_speed_m_s",
     "not both"),
    ("engine.rating.0.corrected_tip_speed_m_s", [400.0, 420.0], "engine.rating[0].corrected_tip_speed_m_s",
     "one entry per theta"),
    ("engine.rating.0.corrected_tip_speed_m_s", [400.0, 420.0, 0.0, 430.0],
     "engine.rating[0].corrected_tip_speed_m_s[2]", "0 <"),
    ("engine.rating.0.thrust_mach", [0.0, 0.8, 0.8, 2.2], "engine.rating[0].thrust_mach[2]", "increase strictly"),
    ("engine.rating.0.thrust_altitude_m", [11000.0, 0.0], "engine.rating[0].thrust_altitude_m[1]",
     "increase strictly"),
    ("engine.rating.0.net_thrust_n", [[90000.0, 80000.0, 95000.0, 110000.0]], "engine.rating[0].net_thrust_n",
     "one row per thrust_altitude_m"),
    ("engine.rating.0.net_thrust_n", [[90000.0, 80000.0, 95000.0], [40000.0, 38000.0, 52000.0, 60000.0]],
     "engine.rating[0].net_thrust_n[0]", "one value per thrust_mach"),
    ("engine.rating.0.net_thrust_n", [[90000.0, 80000.0, 95000.0, 110000.0], [40000.0, -1.0, 52000.0, 60000.0]],
     "engine.rating[0].net_thrust_n[1][1]", "0 <"),
    ("engine.rating.0.net_thrust_n", DELETE, "engine.rating[0].thrust_mach", "needs net_thrust_n"),
    ("engine.rating.0.thrust_reference_recovery", "mil-std", "engine.rating[0].thrust_reference_recovery",
     '"mil-e-5008b"'),
    ("engine.rating.0.thrust_reference_recovery", 1.2, "engine.rating[0].thrust_reference_recovery", "<= 1"),
    ("engine.rating.0.recovery_thrust_exchange", -1.0, "engine.rating[0].recovery_thrust_exchange", "0 <="),
    # case regions
    ("case.0.mach_range", [0.4, 0.0], "case[0].mach_range[1]", "lower bound first"),
    ("case.0.mach_range", [0.4], "case[0].mach_range", "exactly 2"),
    ("case.0.mach_range", [0.0, 7.0], "case[0].mach_range[1]", "<= 6"),
    ("case.0.altitude_range_m", [3000.0, 0.0], "case[0].altitude_range_m[1]", "lower bound first"),
    ("case.0.altitude_range_m", [-6000.0, 0.0], "case[0].altitude_range_m[0]", "-5000 <="),
]


@pytest.mark.parametrize("where, value, key, allowed", NEW_KEY_RULES,
                         ids=[f"{w}={v!r}"[:60] if v is not DELETE else f"{w}-missing" for w, v, *_ in NEW_KEY_RULES])
def test_new_key_rule(where, value, key, allowed, tmp_path):
    err = load_error(tmp_path, setpath(full_data(), where, value))
    assert err.key == key, str(err)
    assert allowed in err.allowed, str(err)


def test_equal_bounds_of_a_case_region_are_allowed():
    d = setpath(full_data(), "case.0.mach_range", [0.3, 0.3])
    assert pf.project_from_dict(d).cases[0].mach_range == (0.3, 0.3)


def test_scheduled_ramps_must_stay_attached_at_their_own_shock_on_lip_mach(tmp_path):
    # 20 + 20 deg at a shock-on-lip Mach of 1.6: the first ramp's shock detaches (NACA Report 1135: at M = 1.6 an
    # attached shock turns the flow by at most about 14.7 deg), at row 1 only.
    d = full_data()
    d["inlet"]["schedule"]["ramp_angles_deg"] = [[4.0, 4.0], [20.0, 20.0], [6.0, 6.0], [8.0, 8.0]]
    d["inlet"]["schedule"]["shock_on_lip_mach"] = [2.0, 1.6, 2.0, 2.5]
    err = load_error(tmp_path, d)
    assert err.key == "inlet.schedule.ramp_angles_deg[1]" and "row 1" in err.allowed and "1.6" in err.allowed


def test_empty_schedule_is_an_error(tmp_path):
    d = pitot_data()
    d["inlet"]["schedule"] = {"mach": [0.0, 1.0]}
    err = load_error(tmp_path, d)
    assert err.key == "inlet.schedule" and "throat_area_m2" in err.allowed


# -- 0 deg ramps, numbers the parser cannot hold --------------------------------------------------------------

def test_zero_degree_ramp_is_accepted_and_is_a_mach_wave(tmp_path):
    # A 0 deg ramp turns nothing: its wave is the Mach wave, sin(mu) = 1/M (at M = 2, 30 deg exactly), with no
    # loss of total pressure (relations worked by hand).
    d = setpath(ramp_data(), "inlet.ramp_angles_deg", [0.0, 7.0])
    p = pf.load_project(write(tmp_path, d))
    assert p.inlet.ramp_angles_deg == (0.0, 7.0)
    from engine_air.physics.shocks import oblique_shock

    s = oblique_shock(np.array([2.0, 3.0]), 0.0)
    assert np.allclose(s.wave_angle_rad, np.arcsin([1 / 2.0, 1 / 3.0]), rtol=1e-12)
    assert np.allclose(s.total_pressure_ratio, 1.0) and np.allclose(s.downstream_mach, [2.0, 3.0])


@pytest.mark.parametrize("angles", [(0.0,), (0.0, 7.0), (8.0, 0.0), (0.0, 0.0, 0.0)])
def test_zero_degree_ramps_evaluate_without_warnings(angles):
    import warnings

    from engine_air.envelope.evaluate import evaluate_project

    sample = Path(__file__).resolve().parent.parent / "sample_projects" / "supersonic_two_ramp.toml"  # to M 2.1
    p = pf.load_project(sample)
    p = replace(p, inlet=replace(p.inlet, ramp_angles_deg=angles))
    load_module.validate_project(p)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        result = evaluate_project(replace(p, grid=Grid(9, 5)))
    assert np.isfinite(result.cases[0].points.recovery).all()


@pytest.mark.parametrize("old, new, key", [
    ("format = 1", "format = " + "9" * 5000, "project.format"),
    ("mach_points = 121", "mach_points = " + "1" * 4301, "grid.mach_points"),
    ("isa_offset_K = 20", "isa_offset_K = -" + "2" * 6000, "case[1].isa_offset_K"),
])
def test_integer_too_long_for_the_parser_names_the_key(old, new, key, tmp_path):
    # Python refuses to convert integers of more than 4300 digits from text (ValueError inside tomllib).
    text = pf.dumps_project(pf.project_from_dict(pitot_data())).replace("isa_offset_K = 20.0", "isa_offset_K = 20")
    assert old in text
    path = tmp_path / "long.toml"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    with pytest.raises(ProjectError) as info:
        pf.load_project(path)
    err = info.value
    assert err.key == key and "digits" in err.allowed and "\n" not in str(err)


def test_long_digit_run_inside_text_is_just_text(tmp_path):
    d = pitot_data()
    d["project"]["notes"] = "9" * 5000
    assert pf.load_project(write(tmp_path, d)).notes == "9" * 5000


# -- validate_project works on the dataclasses ------------------------------------------------------------------

def test_validate_project_checks_the_dataclasses_without_a_file_round_trip():
    p = pf.project_from_dict(full_data())
    load_module.validate_project(p)
    bad = [
        (replace(p, inlet=replace(p.inlet, bleed_fraction=0.5)), "inlet.bleed_fraction"),
        (replace(p, inlet=replace(p.inlet, throat_area_m2=0.6)), "inlet.throat_area_m2"),
        (replace(p, cases=(replace(p.cases[0], isa_offset_K=101.0),) + p.cases[1:]), "case[0].isa_offset_K"),
        (replace(p, cases=(replace(p.cases[0], rating="nope"),) + p.cases[1:]), "case[0].rating"),
        (replace(p, ratings=(replace(p.ratings[0], theta=(1.0, 0.9, 1.1, 1.2)),) + p.ratings[1:]),
         "engine.rating[0].theta[1]"),
        (replace(p, inlet=replace(p.inlet, type="pitot")), "inlet.ramp_angles_deg"),
        (replace(p, inlet=replace(p.inlet, schedule=replace(p.inlet.schedule, mach=(0.0, 1.0)))),
         "inlet.schedule.throat_area_m2"),
        (replace(p, grid=Grid(1001, 1001)), "grid"),
        (replace(p, limits=replace(p.limits, face_mach_max=float("nan"))), "limits.face_mach_max"),
    ]
    for project, key in bad:
        with pytest.raises(ProjectError) as info:
            load_module.validate_project(project)
        assert info.value.key == key, str(info.value)


# -- saving over a read-only file ---------------------------------------------------------------------------------

def test_save_refuses_to_replace_a_read_only_file(tmp_path):
    p = pf.project_from_dict(pitot_data())
    target = tmp_path / "locked.toml"
    pf.save_project(p, target)
    before = target.read_bytes()
    os.chmod(target, 0o444)
    edited = replace(p, title="edited")
    with pytest.raises(ProjectSaveError) as info:
        pf.save_project(edited, target)
    assert "read-only" in str(info.value) and str(target) in str(info.value)
    assert target.read_bytes() == before and os.stat(target).st_mode & 0o777 == 0o444
    pf.save_project(edited, target, overwrite_read_only=True)  # the program asked the user first
    assert pf.load_project(target).title == "edited" and os.stat(target).st_mode & 0o777 == 0o444


# -- the generated file reference and the schema -----------------------------------------------------------------

def test_docs_project_file_reference_is_current():
    from engine_air.project.reference_doc import DOC_PATH, reference_markdown

    assert DOC_PATH.read_text(encoding="utf-8") == reference_markdown(), (
        "docs/project-file.md is stale: run python -m engine_air.project.reference_doc")


def test_every_key_of_the_interfaces_is_in_the_schema_and_documented():
    from engine_air.project import schema
    from engine_air.project.reference_doc import reference_markdown

    keys = {f.path for f in schema.all_fields()}
    interfaces = {  # every key of the interfaces document, "Project file" and "Additions"
        "project": ["format", "title", "notes"],
        "limits": ["face_mach_max", "throat_mach_max", "recovery_min", "stable_flow_fraction",
                   "relative_tip_mach_max", "started_required", "installation_loss_max"],
        "inlet": ["type", "capture_area_m2", "throat_area_m2", "face_area_m2", "duct_loss_coefficient",
                  "lip_suction_factor", "ramp_angles_deg", "shock_on_lip_mach", "cone_half_angles_deg",
                  "internal_recovery_factor", "supersonic_lip_suction_factor", "bleed_fraction",
                  "bleed_exit_velocity_ratio", "bypass_area_m2", "bypass_discharge_coefficient",
                  "bypass_exit_velocity_ratio", "auxiliary_inlet_area_m2", "auxiliary_door_mach_max",
                  "auxiliary_loss_coefficient"],
        "inlet.schedule": ["mach", "throat_area_m2", "shock_on_lip_mach", "ramp_angles_deg", "bleed_fraction"],
        "engine.rating": ["name", "theta", "corrected_flow_kg_s", "fan_tip_speed_m_s", "corrected_tip_speed_m_s",
                          "thrust_mach", "thrust_altitude_m", "net_thrust_n", "thrust_reference_recovery",
                          "recovery_thrust_exchange"],
        "envelope": ["mach", "altitude_m"],
        "grid": ["mach_points", "altitude_points"],
        "case": ["name", "rating", "isa_offset_K", "mach_range", "altitude_range_m"],
    }
    text = reference_markdown()
    for table, names in interfaces.items():
        for name in names:
            assert f"{table}.{name}" in keys, f"{table}.{name}"
        header = f"[[{table}]]" if table in ("engine.rating", "case") else f"[{table}]"
        section = text.split(f"## `{header}`")[1].split("\n## ")[0]
        for name in names:
            assert f"| `{name}` |" in section, f"{table}.{name}"
    assert len(keys) == len(schema.all_fields())  # each key once


def test_a_new_inlet_type_brings_its_keys_without_editing_the_schema(monkeypatch, tmp_path):
    from engine_air.inlets import pitot, registry
    from engine_air.project import schema
    from engine_air.project.reference_doc import reference_markdown
    from engine_air.project.schema_field import REQUIRED, Field

    class Funnel(type(pitot.INLET)):
        name = "funnel"
        label = "test funnel"
        fields = (Field("funnel_angle_deg", "inlet", "number", "half-angle of the funnel", unit="deg", lo=0.0,
                        hi=30.0, default=REQUIRED),)

    monkeypatch.setitem(registry.INLET_TYPES, "funnel", Funnel())
    assert "inlet.funnel_angle_deg" in {f.path for f in schema.all_fields()}
    assert "`funnel_angle_deg`" in reference_markdown()
    d = pitot_data()
    d["inlet"]["type"] = "funnel"
    err = load_error(tmp_path, d)
    assert err.key == "inlet.funnel_angle_deg" and "missing" in err.allowed
    d["inlet"]["funnel_angle_deg"] = 12.0
    assert pf.load_project(write(tmp_path, d)).inlet.type == "funnel"
    err = load_error(tmp_path, setpath(pitot_data(), "inlet.funnel_angle_deg", 12.0))
    assert "'funnel'" in err.allowed
