"""``engine-air distortion``: JSON keys exactly as the interfaces document, exit codes, the stack-up summed by
hand, the outputs; the project keys of method §18; the map's dc60 and surge-margin checks."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import numpy as np
import pytest

from engine_air.cli import main
from engine_air.project import ProjectError, dumps_project, load_project, loads_project

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_projects" / "supersonic_two_ramp.toml"
RAKES = ROOT / "sample_projects" / "supersonic_two_ramp_rakes.csv"
POINT_KEYS = {"point", "face_average_pa", "dc60", "surge_margin_loss", "remaining_surge_margin", "rings"}
RING_KEYS = {"ring", "average_pa", "circumferential_intensity", "extent_deg", "multiple_per_rev", "radial_intensity",
             "arcs"}
ARC_KEYS = {"start_deg", "end_deg", "extent_deg", "intensity"}


def run_json(capsys, *args):
    code = main(["distortion", *map(str, args), "--json"])
    return code, json.loads(capsys.readouterr().out)


def test_json_keys_as_the_interfaces_document(capsys):
    code, doc = run_json(capsys, RAKES, "--project", SAMPLE)
    assert set(doc) >= {"points"}
    assert len(doc["points"]) == 8
    for p in doc["points"]:
        assert set(p) >= POINT_KEYS
        assert all(set(r) >= RING_KEYS for r in p["rings"])
        assert all(set(a) == ARC_KEYS for r in p["rings"] for a in r["arcs"])
        assert [r["ring"] for r in p["rings"]] == [1, 2, 3, 4, 5]
    assert code == 1  # the invented sample fails dc60_max = 0.30 at its high-incidence points
    assert {c["name"] for c in doc["checks"]} == {"dc60", "surge-margin"}


def test_stack_up_summed_by_hand(capsys):
    _code, doc = run_json(capsys, RAKES, "--project", SAMPLE)
    kc, kr = [1.2, 1.0, 0.9, 0.8, 0.7], [0.3, 0.2, 0.1, 0.2, 0.4]  # the sample's [engine.rating.stability]
    for p in doc["points"]:
        loss = sum(k * r["circumferential_intensity"] for k, r in zip(kc, p["rings"])) + \
            sum(k * r["radial_intensity"] for k, r in zip(kr, p["rings"]))
        assert p["surge_margin_loss"] == pytest.approx(loss, rel=1e-12)
        assert p["remaining_surge_margin"] == pytest.approx(0.20 - loss - 0.04 - 0.03 - 0.02, rel=1e-12, abs=1e-15)
        # ring radial intensities by hand from the ring averages (equal-area rings: PFAV their mean)
        pfav = np.mean([r["average_pa"] for r in p["rings"]])
        assert p["face_average_pa"] == pytest.approx(pfav)
        for r in p["rings"]:
            assert r["radial_intensity"] == pytest.approx((pfav - r["average_pa"]) / pfav)


def test_without_a_project_the_surge_keys_are_null_and_exit_0(capsys):
    code, doc = run_json(capsys, RAKES)
    assert code == 0
    assert all(p["surge_margin_loss"] is None and p["remaining_surge_margin"] is None for p in doc["points"])
    assert all(p["dc60"] is not None for p in doc["points"])


def _project_with(tmp_path, **limits) -> Path:
    text = SAMPLE.read_text(encoding="utf-8")
    text = text.replace("dc60_max = 0.30", f"dc60_max = {limits.get('dc60_max', 0.30)}")
    text = text.replace("surge_margin_min = 0.0", f"surge_margin_min = {limits.get('surge_margin_min', 0.0)}")
    path = tmp_path / "p.toml"
    path.write_text(text, encoding="utf-8")
    return path


def test_exit_0_when_every_limit_holds(tmp_path, capsys):
    code, doc = run_json(capsys, RAKES, "--project", _project_with(tmp_path, dc60_max=5.0, surge_margin_min=-0.5))
    assert code == 0 and doc["holds"] is True


def test_exit_1_names_the_failing_points(tmp_path, capsys):
    code, doc = run_json(capsys, RAKES, "--project", _project_with(tmp_path, dc60_max=5.0, surge_margin_min=0.05))
    assert code == 1
    failing = [c for c in doc["checks"] if c["name"] == "surge-margin"][0]["failing_points"]
    expected = [p["point"] for p in doc["points"] if p["remaining_surge_margin"] < 0.05]
    assert failing == expected and expected


def test_sensitivities_for_another_ring_count_are_refused(tmp_path, capsys):
    text = SAMPLE.read_text(encoding="utf-8").replace("[1.2, 1.0, 0.9, 0.8, 0.7]", "[1.2, 1.0, 0.9, 0.8]") \
        .replace("[0.3, 0.2, 0.1, 0.2, 0.4]", "[0.3, 0.2, 0.1, 0.2]")
    path = tmp_path / "p.toml"
    path.write_text(text, encoding="utf-8")
    assert main(["distortion", str(RAKES), "--project", str(path)]) == 2
    err = capsys.readouterr().err
    assert "engine.rating[0].stability.circumferential_sensitivity" in err and "5 rings" in err


def test_unknown_rating_and_bad_options_exit_2(capsys):
    assert main(["distortion", str(RAKES), "--project", str(SAMPLE), "--rating", "cruise"]) == 2
    assert "no such rating" in capsys.readouterr().err
    assert main(["distortion", str(RAKES), "--sector-deg", "400"]) == 2
    assert main(["distortion", str(RAKES), "--rating", "x"]) == 2


def test_sector_option_and_outputs(tmp_path, capsys):
    out_csv, png, table = tmp_path / "r.csv", tmp_path / "f.png", tmp_path / "c.csv"
    code = main(["distortion", str(RAKES), "--project", str(SAMPLE), "--sector-deg", "90", "--csv", str(out_csv),
                 "--png", str(png), "--characteristics-out", str(table)])
    text = capsys.readouterr().out
    assert code == 1 and "DC(90)" in text
    rows = list(csv.DictReader(out_csv.open(encoding="utf-8")))
    assert len(rows) == 8 * 5 and rows[0]["point"] == "M0.9-a0-b0"
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    chars = list(csv.DictReader(table.open(encoding="utf-8")))
    assert len(chars) == 8
    assert {"mach", "mass_flow_ratio", "recovery", "alpha_deg", "beta_deg", "dc60", "surge_margin_loss",
            "circumferential_intensity_ring_1", "radial_intensity_ring_5"} <= set(chars[0])
    # recovery = PFAV / free-stream total pressure; dc60 is DC(60) whatever --sector-deg says
    _c, doc = run_json(capsys, RAKES, "--project", SAMPLE)
    assert float(chars[0]["recovery"]) == pytest.approx(doc["points"][0]["face_average_pa"] / 38000.0)
    assert float(chars[0]["dc60"]) == pytest.approx(doc["points"][0]["dc60"])


# -- project keys ------------------------------------------------------------------------------------------------

def test_stability_table_round_trips_and_is_checked():
    project = load_project(SAMPLE)
    s = project.ratings[0].stability
    assert s.available_surge_margin == 0.20 and s.other_losses[2] == ("transient allowance", 0.02)
    assert project.limits.dc60_max == 0.30 and project.limits.surge_margin_min == 0.0
    assert loads_project(dumps_project(project)) == project
    text = SAMPLE.read_text(encoding="utf-8")
    for old, new, key in [
        ("radial_sensitivity = [0.3, 0.2, 0.1, 0.2, 0.4]", "radial_sensitivity = [0.3]",
         "engine.rating[0].stability.radial_sensitivity"),
        ("deterioration = 0.03", "deterioration = 1.5", "engine.rating[0].stability.other_losses.deterioration"),
        ("available_surge_margin = 0.20", "available_surge_margin = 0.20\nsurge_line = 1",
         "engine.rating[0].stability.surge_line"),
        ("dc60_max = 0.30", "dc60_max = -1", "limits.dc60_max"),
    ]:
        with pytest.raises(ProjectError) as info:
            loads_project(text.replace(old, new), "p.toml")
        assert info.value.key == key, str(info.value)


# -- the map's checks ----------------------------------------------------------------------------------------------

def test_map_checks_are_judged_only_where_data_back_them():
    from dataclasses import replace

    from engine_air.envelope.checks import build_checks
    from engine_air.envelope.conditions import evaluate_conditions

    project = load_project(SAMPLE)
    case = project.cases[0]
    points = evaluate_conditions(project, case, np.array([1.6, 1.8, 2.0]), np.array([12000.0] * 3))
    assert {c.name for c in points.checks}.isdisjoint({"dc60", "surge-margin"})  # no data: no check
    with_data = replace(points, dc60=np.array([0.1, 0.5, np.nan]), surge_margin_loss=np.array([0.05, 0.2, np.nan]))
    checks = {c.name: c for c in build_checks(project.limits, with_data, project.ratings[0].stability)}
    dc = checks["dc60"]
    assert dc.applies.tolist() == [True, True, False] and dc.fails.tolist() == [False, True, False]
    assert dc.margin[:2] == pytest.approx([0.30 - 0.1, 0.30 - 0.5])
    sm = checks["surge-margin"]
    # remaining = 0.20 - loss - (0.04 + 0.03 + 0.02), by hand
    assert sm.value[:2] == pytest.approx([0.06, -0.09]) and sm.fails.tolist() == [False, True, False]
    no_stack = {c.name: c for c in build_checks(project.limits, with_data)}["surge-margin"]
    assert not no_stack.applies.any()


def test_without_face_mach_dc60_is_null(tmp_path, capsys):
    path = tmp_path / "r.csv"
    path.write_text("point,ring,angle_deg,total_pressure_pa\n" + "".join(
        f"A,1,{k * 45},{9e4 if k == 0 else 1e5}\n" for k in range(8)), encoding="utf-8")
    code, doc = run_json(capsys, path)
    assert code == 0 and doc["points"][0]["dc60"] is None
    ring = doc["points"][0]["rings"][0]
    # method.md check value, scaled by 1e5: PAV 98750 Pa, extent 78.75 deg, intensity 0.044304
    assert ring["average_pa"] == pytest.approx(98750.0) and ring["extent_deg"] == pytest.approx(78.75)
    assert ring["arcs"][0]["start_deg"] == pytest.approx(320.625) and ring["arcs"][0]["end_deg"] == pytest.approx(39.375)
    assert ring["circumferential_intensity"] == pytest.approx(0.044304, abs=5e-7)
    assert main(["distortion", str(path), "--characteristics-out", str(tmp_path / "c.csv")]) == 2
    assert "column mach" in capsys.readouterr().err
