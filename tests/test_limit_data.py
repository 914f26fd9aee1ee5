"""A limit needs the data it is judged by (issue 18): otherwise the verdict would count a limit judged nowhere.

Rules of ``engine_air.project.limit_data``, run by the loader and by ``validate_project`` alike. The data each
limit needs follows from its definition (method.md): the installation loss 1 - F_inst/F_n needs the net thrust
F_n and the exchange rate X of F_inst = F_n (1 - X (1 - pi/pi_ref)); the relative tip Mach number needs the fan
tip speed.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest
import tomli_w

from engine_air.project import ProjectError, load_project, project_from_dict, project_to_dict, validate_project

ROOT = Path(__file__).resolve().parents[1]
PITOT = ROOT / "sample_projects" / "subsonic_transport_nacelle.toml"  # ratings takeoff, max-continuous, flight-idle
FIGHTER = ROOT / "sample_projects" / "variable_geometry_fighter.toml"  # thrust tables, installation_loss_max

THRUST = {"thrust_mach": [0.0, 0.5], "thrust_altitude_m": [0.0, 10000.0],
          "net_thrust_n": [[100000.0, 90000.0], [50000.0, 45000.0]], "thrust_reference_recovery": "mil-e-5008b"}


def data(path=PITOT) -> dict:
    return project_to_dict(load_project(path))


def error(d: dict, tmp_path=None) -> ProjectError:
    """The error from the dict, from the file written from it, and from ``validate_project`` on the dataclasses:
    the same key each time."""
    with pytest.raises(ProjectError) as info:
        project_from_dict(d)
    key = info.value.key
    if tmp_path is not None:
        f = tmp_path / "p.toml"
        f.write_text(tomli_w.dumps(d), encoding="utf-8")
        with pytest.raises(ProjectError) as from_file:
            load_project(f)
        assert from_file.value.key == key and str(f) in str(from_file.value)
    return info.value


def test_thrust_table_without_its_exchange_rate_is_an_error(tmp_path):
    d = data()
    d["engine"]["rating"][0].update(THRUST)  # and no recovery_thrust_exchange
    err = error(d, tmp_path)
    assert err.key == "engine.rating[0].recovery_thrust_exchange"
    assert "missing" in err.allowed and "net_thrust_n" in err.allowed and "no default" in err.allowed
    d["engine"]["rating"][0]["recovery_thrust_exchange"] = 1.2
    assert project_from_dict(d).ratings[0].recovery_thrust_exchange == 1.2


def test_installation_loss_limit_without_thrust_data_is_an_error(tmp_path):
    d = data()
    d["limits"]["installation_loss_max"] = 0.1
    err = error(d, tmp_path)
    assert err.key == "limits.installation_loss_max" and err.value == 0.1
    assert "net_thrust_n" in err.allowed and "judged nowhere" in err.allowed


def test_tip_mach_limit_without_any_tip_speed_is_an_error(tmp_path):
    d = data()
    for r in d["engine"]["rating"]:
        r.pop("fan_tip_speed_m_s", None)
    err = error(d, tmp_path)
    assert err.key == "limits.relative_tip_mach_max" and "fan_tip_speed_m_s" in err.allowed


def test_a_limit_only_an_unused_rating_could_judge_is_an_error():
    d = data()
    for r in d["engine"]["rating"]:
        r.pop("fan_tip_speed_m_s", None)
    d["engine"]["rating"][2]["fan_tip_speed_m_s"] = 300.0  # flight-idle: no case uses it
    assert error(d).key == "limits.relative_tip_mach_max"


def test_a_limit_some_used_ratings_cannot_judge_is_a_warning_naming_them():
    d = data()
    del d["engine"]["rating"][1]["fan_tip_speed_m_s"]  # max-continuous, used by a case
    p = project_from_dict(d, "study.toml")
    assert len(p.warnings) == 1
    w = p.warnings[0]
    assert w.startswith("study.toml: limits.relative_tip_mach_max:") and "'max-continuous'" in w
    assert "'takeoff'" not in w and "'flight-idle'" not in w
    f = data(FIGHTER)  # the installation loss: a used rating without thrust data is named too
    for k in (*THRUST, "recovery_thrust_exchange"):
        f["engine"]["rating"][1].pop(k)
    q = project_from_dict(f)
    assert len(q.warnings) == 1 and "limits.installation_loss_max" in q.warnings[0] and "'take-off'" in q.warnings[0]


def test_validate_project_applies_the_same_rules():
    p = load_project(PITOT)
    validate_project(p)
    no_tip = tuple(replace(r, fan_tip_speed_m_s=None) for r in p.ratings)
    with pytest.raises(ProjectError) as info:
        validate_project(replace(p, ratings=no_tip))
    assert info.value.key == "limits.relative_tip_mach_max"
    with pytest.raises(ProjectError) as info:
        validate_project(replace(p, limits=replace(p.limits, installation_loss_max=0.05)))
    assert info.value.key == "limits.installation_loss_max"
    f = load_project(FIGHTER)
    with pytest.raises(ProjectError) as info:
        validate_project(replace(f, ratings=(replace(f.ratings[0], recovery_thrust_exchange=None), f.ratings[1])))
    assert info.value.key == "engine.rating[0].recovery_thrust_exchange"


def test_every_sample_has_the_data_of_its_limits():
    for path in sorted((ROOT / "sample_projects").glob("*.toml")):
        assert load_project(path).warnings == (), path.name
