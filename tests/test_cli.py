"""Command line: exit codes 0/1/2, JSON keys and a one-line message for unusable input (interfaces document)."""

from __future__ import annotations

import csv
import json
import subprocess
import sys
from pathlib import Path

import pytest

from engine_air.cli import main

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
RAMP = SAMPLES / "supersonic_two_ramp.toml"
FAILING = SAMPLES / "undersized_business_jet.toml"

POINT_KEYS = {
    "mach", "altitude_m", "case", "freestream", "theta2", "corrected_flow_kg_s", "mass_flow_kg_s", "recovery",
    "reference_recovery", "face_mach", "face_mach_margin", "throat_mach", "mass_flow_ratio", "max_mass_flow_ratio",
    "spillage_fraction", "additive_drag_coefficient", "face_static_to_ambient", "relative_tip_mach", "regime",
    "flags", "limiting",
}
FREESTREAM_KEYS = {
    "static_pressure_pa", "static_temperature_k", "total_pressure_pa", "total_temperature_k", "velocity_m_s",
    "density_kg_m3",
}


def run(*args):
    """The installed entry point as a user runs it (a separate process)."""
    return subprocess.run([sys.executable, "-m", "engine_air.cli", *map(str, args)], capture_output=True, text=True)


def test_check_exit_codes_on_samples(capsys):
    assert main(["check", str(PITOT)]) == 0
    assert "all 3 limits hold" in capsys.readouterr().out
    assert main(["check", str(FAILING)]) == 1
    out = capsys.readouterr().out
    assert "FAILS" in out and "Throat Mach number" in out
    assert main(["check", str(RAMP)]) == 1  # recovery short of MIL-E-5008B above Mach 2


def test_check_single_case(capsys):
    assert main(["check", str(FAILING), "--case", "ISA+25, take-off"]) == 0
    assert "ISA+25" in capsys.readouterr().out


def test_point_json_keys_and_values(capsys):
    code = main(["point", str(RAMP), "--mach", "2.0", "--altitude-m", "11000", "--json"])
    record = json.loads(capsys.readouterr().out)
    assert code in (0, 1)
    assert POINT_KEYS <= record.keys()
    assert FREESTREAM_KEYS <= record["freestream"].keys()
    # U.S. Standard Atmosphere 1976: 216.65 K and 22 632.06 Pa at 11 000 m.
    assert record["freestream"]["static_temperature_k"] == pytest.approx(216.65, abs=1e-6)
    assert record["freestream"]["static_pressure_pa"] == pytest.approx(22632.06, rel=1e-6)
    # Isentropic total temperature at M = 2: T/Tt = 0.55556 (NACA Report 1135).
    assert record["freestream"]["total_temperature_k"] == pytest.approx(216.65 / 0.555556, rel=1e-5)
    assert record["regime"] in ("subsonic", "subcritical", "critical", "supercritical")
    assert record["reference_recovery"] == pytest.approx(0.925)  # MIL-E-5008B at M0 = 2
    # external-ramp in supersonic flight: pre-entry drag computed (method §13), zero at MFR = 1 (M_d = 2)
    assert record["additive_drag_coefficient"] is not None and record["additive_drag_coefficient"] >= 0.0
    assert "additive-drag-not-modelled" not in record["flags"]


def test_point_outside_envelope_is_computed_and_flagged(capsys):
    main(["point", str(PITOT), "--mach", "0.3", "--altitude-m", "14000", "--json"])
    record = json.loads(capsys.readouterr().out)
    assert "outside-envelope" in record["flags"]
    assert record["face_mach"] is not None


def test_point_low_speed_nulls_carry_flag(capsys):
    main(["point", str(FAILING), "--mach", "0.0", "--altitude-m", "0", "--json"])
    record = json.loads(capsys.readouterr().out)
    assert record["mass_flow_ratio"] is None and record["spillage_fraction"] is None
    assert "low-speed" in record["flags"]
    assert record["face_mach"] > 0 and record["throat_mach"] > 0


def test_map_csv_every_grid_point_of_every_case(tmp_path, capsys):
    out = tmp_path / "map.csv"
    code = main(["map", str(PITOT), "--csv", str(out)])
    assert code == 0
    with open(out, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert len(rows) == 121 * 101 * 3
    assert {"case", "mach", "altitude_m", "face_mach", "recovery", "flags", "limiting"} <= rows[0].keys()
    inside = [r for r in rows if r["inside_envelope"] == "1"]
    assert inside and all(r["face_mach"] for r in inside)


@pytest.mark.parametrize(
    "content, key",
    [
        ("this is = not [ toml", "(file)"),
        ('[project]\nformat = 99\n', "project.format"),
    ],
)
def test_unusable_file_exit_2_one_line(tmp_path, content, key):
    bad = tmp_path / "bad.toml"
    bad.write_text(content)
    res = run("check", bad)
    assert res.returncode == 2
    assert "Traceback" not in res.stderr
    lines = [ln for ln in res.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1
    assert "bad.toml" in lines[0] and key in lines[0]


def test_bad_value_names_key_and_value(tmp_path):
    text = PITOT.read_text().replace("throat_area_m2 = ", "throat_area_m2 = -", 1)
    bad = tmp_path / "negative.toml"
    bad.write_text(text)
    res = run("check", bad)
    assert res.returncode == 2
    assert "inlet.throat_area_m2" in res.stderr and "negative.toml" in res.stderr


def test_missing_file_and_unknown_case_exit_2(tmp_path):
    res = run("check", tmp_path / "nope.toml")
    assert res.returncode == 2 and "Traceback" not in res.stderr and res.stderr.strip()
    res = run("point", PITOT, "--mach", "0.5", "--altitude-m", "1000", "--case", "no such case", "--json")
    assert res.returncode == 2 and "no such case" in res.stderr


def test_point_outside_atmosphere_is_not_judged(capsys):
    code = main(["point", str(RAMP), "--mach", "1.0", "--altitude-m", "90000", "--json"])
    captured = capsys.readouterr()
    record = json.loads(captured.out)
    assert code == 2
    assert record["holds"] is None and "outside-atmosphere" in record["flags"]
    assert "no limit can be judged" in captured.err
