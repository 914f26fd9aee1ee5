"""Command line: exit codes 0/1/2, JSON keys and a one-line message for unusable input (interfaces document)."""

from __future__ import annotations

import csv
import os
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


# -- issue 9: point semantics, units, negative numbers, safe terminal text, options checked first -------------------

def test_point_outside_envelope_is_not_judged_exit_3(capsys):
    code = main(["point", str(PITOT), "--mach", "0.3", "--altitude-m", "14000", "--json"])
    captured = capsys.readouterr()
    record = json.loads(captured.out)
    assert code == 3
    assert record["holds"] is None and record["judged"] is False
    assert "not judged" in captured.err
    # inside the envelope the point is judged
    code = main(["point", str(PITOT), "--mach", "0.5", "--altitude-m", "3000", "--json"])
    record = json.loads(capsys.readouterr().out)
    assert code in (0, 1) and record["judged"] is True and record["holds"] is (code == 0)


def test_help_documents_exit_code_3():
    res = run("point", "--help")
    assert res.returncode == 0 and "3 not judged" in " ".join(res.stdout.split())


@pytest.mark.parametrize("value", ["-1000", "-1e3", "-1000.0", "-.5e3"])
def test_negative_altitude_after_option(value, capsys):
    code = main(["point", str(RAMP), "--mach", "0.5", "--altitude-m", value, "--json"])
    record = json.loads(capsys.readouterr().out)
    assert code in (0, 1, 3)
    assert record["altitude_m"] == pytest.approx(float(value))


def test_negative_numbers_after_options_in_a_separate_process():
    res = run("point", RAMP, "--altitude-m", "-1e3", "--mach", "0.5")
    assert res.returncode in (0, 1, 3), res.stderr
    assert json.loads(res.stdout)["altitude_m"] == -1000.0


def test_altitude_in_feet_and_flight_level(capsys):
    # 1 ft = 0.3048 m exactly (international foot); a flight level is hundreds of feet.
    main(["point", str(RAMP), "--mach", "0.8", "--altitude-ft", "30000", "--json"])
    ft = json.loads(capsys.readouterr().out)
    main(["point", str(RAMP), "--mach", "0.8", "--fl", "300", "--json"])
    fl = json.loads(capsys.readouterr().out)
    main(["point", str(RAMP), "--mach", "0.8", "--altitude-m", "9144", "--json"])
    m = json.loads(capsys.readouterr().out)
    assert ft["altitude_m"] == pytest.approx(9144.0) and fl["altitude_m"] == pytest.approx(9144.0)
    assert ft["face_mach"] == pytest.approx(m["face_mach"], rel=1e-12)
    assert main(["point", str(RAMP), "--mach", "0.8", "--fl", "300", "--altitude-m", "1"]) == 2


def test_units_us_point_keeps_si_keys(capsys):
    main(["point", str(RAMP), "--mach", "0.8", "--altitude-m", "3048", "--units", "us"])
    record = json.loads(capsys.readouterr().out)
    assert record["units"] == "us"
    assert record["altitude_m"] == pytest.approx(3048.0)  # SI key, SI value
    assert record["us"]["altitude_m"] == {"value": pytest.approx(10000.0), "unit": "ft"}
    # 1976 standard atmosphere at 3048 m: T = 268.338 K (288.15 - 6.5 x 3.048) = 483.01 degrees Rankine.
    assert record["us"]["static_temperature_k"]["value"] == pytest.approx(268.338 * 1.8, rel=1e-6)
    # 1 psi = 6894.757 Pa (NIST SP 811)
    assert record["us"]["static_pressure_pa"]["value"] == pytest.approx(
        record["freestream"]["static_pressure_pa"] / 6894.757, rel=1e-6)


def test_units_us_check_gives_feet(capsys):
    main(["check", str(FAILING)])
    si = capsys.readouterr().out
    main(["check", str(FAILING), "--units", "us"])
    us = capsys.readouterr().out
    assert "alt m" in si and "alt ft" in us
    assert si.splitlines()[-1] == us.splitlines()[-1]  # same verdict


def _hostile_copy(tmp_path, title, case):
    text = FAILING.read_text(encoding="utf-8")
    text = text.replace('title = "', f'title = "{title}', 1)
    first_case = text.split("[[case]]")[1].split("name = ")[1].split("\n")[0]
    text = text.replace(f"name = {first_case}", f'name = "{case}"', 1)
    path = tmp_path / "hostile.toml"
    path.write_text(text, encoding="utf-8")
    return path


def test_terminal_text_is_escaped(tmp_path):
    path = _hostile_copy(tmp_path, "\\u001b[2J\\u001b[HVERDICT: all limits hold ", "ISA\\u202e,\\u001b[31m max")
    res = run("check", path)
    assert res.returncode in (0, 1)
    assert "\x1b" not in res.stdout and "\u202e" not in res.stdout
    assert "\\x1b[2J" in res.stdout and "\\u202e" in res.stdout


def test_non_utf8_path_is_a_clear_exit_2(tmp_path):
    name = os.fsdecode(b"project-\xff.toml")
    res = subprocess.run([sys.executable, "-m", "engine_air.cli", "check", os.fsencode(str(tmp_path)) + b"/" +
                          os.fsencode(name)], capture_output=True)
    err = res.stderr.decode("utf-8")
    assert res.returncode == 2 and "Traceback" not in err and "internal error" not in err
    assert "not valid UTF-8" in err and "\\xff" in err and len(err.strip().splitlines()) == 1


def test_newline_in_path_stays_one_line(tmp_path):
    res = run("check", tmp_path / "two\nlines.toml")
    assert res.returncode == 2
    assert len(res.stderr.strip().splitlines()) == 1 and "two\\x0alines" in res.stderr


def test_options_checked_before_any_file_is_written(tmp_path):
    out = tmp_path / "map.csv"
    res = run("map", RAMP, "--csv", out, "--png", tmp_path / "m.png", "--quantity", "no_such_quantity")
    assert res.returncode == 2 and not out.exists() and not (tmp_path / "m.png").exists()
    res = run("map", RAMP, "--csv", out, "--parquet", tmp_path / "missing" / "m.parquet")
    assert res.returncode == 2 and not out.exists() and "does not exist" in res.stderr
    res = run("map", RAMP, "--csv", tmp_path)
    assert res.returncode == 2 and "folder" in res.stderr


def test_map_parquet_equals_csv(tmp_path, capsys):
    import pyarrow.parquet as pq

    csv_path, pq_path = tmp_path / "m.csv", tmp_path / "m.parquet"
    assert main(["map", str(RAMP), "--csv", str(csv_path), "--parquet", str(pq_path)]) == 1
    table = pq.read_table(pq_path)
    with open(csv_path, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert table.num_rows == len(rows) and table.column_names == list(rows[0].keys())
    face = table.column("face_mach").to_pylist()
    assert all((r["face_mach"] == "" and f is None) or float(r["face_mach"]) == f for r, f in zip(rows, face))


def test_map_csv_neutralises_formula_case_names(tmp_path, capsys):
    path = _hostile_copy(tmp_path, "", "=HYPERLINK(\\\"http://x\\\")")
    out = tmp_path / "m.csv"
    main(["map", str(path), "--csv", str(out)])
    with open(out, newline="") as fh:
        cases = {r["case"] for r in csv.DictReader(fh)}
    assert "'=HYPERLINK(\"http://x\")" in cases
    assert not any(c[:1] in "=+-@\t\r" for c in cases)


def test_point_worst_relative_margin_is_the_least_judged_margin(capsys):
    code = main(["point", str(FAILING), "--mach", "0.8", "--altitude-m", "9000", "--json"])
    record = json.loads(capsys.readouterr().out)
    judged = [c for c in record["checks"] if c["holds"] is not None]
    assert record["judged"] is True and judged
    # relative margin = margin over the limit's magnitude; the face-Mach check's scale is face_mach_max
    face = next(c for c in judged if c["name"] == "face-mach")
    assert record["worst_relative_margin"] <= face["margin"] / float(face["limit"].split("<=")[1]) + 1e-15
    assert (record["worst_relative_margin"] >= 0) == (code == 0)
    main(["point", str(FAILING), "--mach", "0.3", "--altitude-m", "40000", "--json"])
    outside = json.loads(capsys.readouterr().out)
    assert outside["worst_relative_margin"] is None and outside["judged"] is False
    assert {"outside-envelope", "outside-atmosphere"} & set(outside["flags"])
