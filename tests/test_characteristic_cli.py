"""``engine-air characteristic`` and ``engine-air calibrate`` (interfaces "Additions 2", method §16-§17).

References: the JSON keys of the interfaces document; the curve from data equals the hand interpolation of the
invented sample table at a tested Mach number (the §17 rules); the calibrated project is a new file."""

from __future__ import annotations

import json
import pathlib
import shutil

import pytest

from engine_air.cli import main

SAMPLES = pathlib.Path(__file__).resolve().parent.parent / "sample_projects"
DATA = SAMPLES / "tunnel_data" / "two_ramp_with_tunnel_data.toml"


@pytest.fixture()
def copied(tmp_path):
    """The tunnel-data sample copied with its table (outputs written beside it)."""
    folder = tmp_path / "study"
    shutil.copytree(DATA.parent, folder)
    return folder / DATA.name


def test_characteristic_json_keys_and_sources(copied, capsys):
    code = main(["characteristic", str(copied), "--mach", "1.5", "--mach", "2.5", "--altitude-m", "11000",
                 "--json"])
    out = json.loads(capsys.readouterr().out)
    assert code in (0, 1)
    first, second = out["curves"]
    for curve in out["curves"]:
        assert set(curve) >= {"mach", "altitude_m", "case", "source", "mass_flow_ratio", "recovery",
                              "critical_mass_flow_ratio", "critical_recovery", "stability_limit_mass_flow_ratio",
                              "operating_points"}
        assert len(curve["mass_flow_ratio"]) == len(curve["recovery"]) > 10
        for op in curve["operating_points"]:
            assert set(op) >= {"rating", "case", "mass_flow_ratio", "recovery"}
    # Mach 1.5 is a tested curve: data; Mach 2.5 is beyond the table (tested to 2.1): the model
    assert first["source"] == "data" and second["source"] == "model"
    # at a tested Mach the data curve's critical point is the table's own (largest MFR, best recovery there)
    rows = [line.split(",") for line in (copied.parent / "tunnel_characteristics.csv").read_text().splitlines()[1:]]
    at = [(float(r[2]), float(r[3])) for r in rows if r[0] == "1.5" and r[1] == "0"]
    crit = max(m for m, _ in at)
    assert first["critical_mass_flow_ratio"] == pytest.approx(crit)
    assert first["critical_recovery"] == pytest.approx(max(r for m, r in at if m >= 0.995 * crit))


def test_characteristic_writes_csv_and_png(copied, tmp_path, capsys):
    csv, png = tmp_path / "c.csv", tmp_path / "c.png"
    code = main(["characteristic", str(copied), "--mach", "1.9", "--fl", "350", "--csv", str(csv), "--png", str(png)])
    assert code in (0, 1)
    lines = csv.read_text().splitlines()
    assert lines[0] == "mach,altitude_m,case,source,mass_flow_ratio,recovery" and len(lines) > 10
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


@pytest.mark.parametrize("target", ["project", "table"])
def test_characteristic_never_writes_over_an_input(copied, capsys, target):
    victim = copied if target == "project" else copied.parent / "tunnel_characteristics.csv"
    before = victim.read_bytes()
    code = main(["characteristic", str(copied), "--mach", "1.9", "--altitude-m", "11000", "--csv", str(victim)])
    assert code == 2 and "input" in capsys.readouterr().err
    assert victim.read_bytes() == before


def test_map_refuses_to_write_over_the_characteristics_table(copied, capsys):
    table = copied.parent / "tunnel_characteristics.csv"
    before = table.read_bytes()
    assert main(["map", str(copied), "--csv", str(table)]) == 2
    assert table.read_bytes() == before


def test_calibrate_writes_a_new_file_and_json(copied, tmp_path, capsys):
    out = tmp_path / "elsewhere" / "calibrated.toml"
    out.parent.mkdir()
    code = main(["calibrate", str(copied), "--fit", "duct_loss_coefficient", "--out", str(out), "--json"])
    assert code == 0
    report = json.loads(capsys.readouterr().out)
    value = report["fitted"]["duct_loss_coefficient"]["value"]
    error = report["fitted"]["duct_loss_coefficient"]["standard_error"]
    assert abs(value - 0.07) < 3 * error  # the table was made with 0.07 (make_tunnel_characteristics.py)
    assert report["rms_residual"] < 0.003
    assert {"mach", "alpha_deg", "beta_deg", "rms_residual"} <= set(report["curves"][0])
    from engine_air.project.load import load_project

    again = load_project(out)  # saved in another folder, still finds its table
    assert again.characteristics is not None and again.inlet.duct_loss_coefficient == pytest.approx(value)


def test_calibrate_refuses_the_input_and_unknown_keys(copied, capsys):
    before = copied.read_bytes()
    assert main(["calibrate", str(copied), "--fit", "duct_loss_coefficient", "--out", str(copied)]) == 2
    assert copied.read_bytes() == before
    assert main(["calibrate", str(copied), "--fit", "capture_area_m2", "--out", str(copied) + ".new"]) == 2
    assert "cannot be fitted" in capsys.readouterr().err


def test_calibrate_without_a_table_is_unusable(tmp_path, capsys):
    out = tmp_path / "x.toml"
    assert main(["calibrate", str(SAMPLES / "supersonic_two_ramp.toml"), "--fit", "duct_loss_coefficient",
                 "--out", str(out)]) == 2
    assert "characteristics" in capsys.readouterr().err and not out.exists()
