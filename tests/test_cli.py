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


# -- issue 14: texts that tell the truth; the command line's edges ------------------------------------------------

def fighter_variant(tmp_path, **changes) -> Path:
    """The variable-geometry sample with a fixed throat far from its schedule (the schedule covers Mach 0-2.2, so
    the fixed 0.30 m^2 is used nowhere), tighter limits (the installation loss fails) and a coarse grid."""
    import re

    text = (SAMPLES / "variable_geometry_fighter.toml").read_text(encoding="utf-8")
    subs = {"throat_area_m2": "0.30", "installation_loss_max": "0.10", "mach_points": "31", "altitude_points": "21"}
    subs.update({k: str(v) for k, v in changes.items()})
    for key, value in subs.items():
        text = re.sub(rf"(?m)^{key}\s*=\s*[0-9.]+\s*$", f"{key} = {value}", text)
    path = tmp_path / "fighter.toml"
    path.write_text(text, encoding="utf-8")
    return path


def test_throat_text_uses_the_scheduled_area_and_the_flow_through_the_throat(tmp_path):
    import numpy as np

    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.envelope.explain import finding_mechanism
    from engine_air.project import load_project

    p = load_project(fighter_variant(tmp_path))
    r = evaluate_project(p)
    s = next(s for s in r.summary if s.name == "throat-mach")
    text = finding_mechanism(p, r, s)[2]
    # the schedule by hand (method §12: linear in M0, ends held): mach [1.0, 1.3] -> throat [0.46, 0.47]
    area = float(np.interp(s.worst_mach, [0.0, 1.0, 1.3, 1.6, 2.0, 2.2], [0.46, 0.46, 0.47, 0.48, 0.50, 0.50]))
    assert f"A_th = {area:.3f} m^2" in text and "0.300 m^2" not in text
    pts = r.case_map(s.worst_case).points
    i = (list(r.altitude_m).index(s.worst_altitude_m), list(r.mach).index(s.worst_mach))
    engine, bypass = float(pts.mass_flow_kg_s[i]), float(pts.bypass_flow_kg_s[i])
    assert bypass > 0.0  # the doors pass air here: the throat carries engine + bypass flow
    assert f"the flow {engine + bypass:.1f} kg/s (engine {engine:.1f} kg/s + bypass {bypass:.1f} kg/s)" in text
    us = finding_mechanism(p, r, s, "us")[2]
    assert "kg/s" not in us and "m^2" not in us
    assert f"{(engine + bypass) / 0.45359237:.1f} lbm/s" in us and f"{area / 0.3048 ** 2:.3f} ft^2" in us


def test_installation_loss_text_itemises_the_ledger(tmp_path, capsys):
    path = fighter_variant(tmp_path)
    assert main(["check", str(path)]) == 1
    text = capsys.readouterr().out
    line = next(x for x in text.splitlines() if x.startswith("Installation loss:"))
    assert "subcritical operation: subcritical operation" not in line
    for item in ("recovery penalty", "spillage drag", "bleed drag", "bypass drag", "net thrust F_n", "installed"):
        assert item in line, item
    assert line.count(" N (") == 4 and line.count(" %)") == 4
    # the items add up: F_n - F_inst = penalty + spillage + bleed + bypass (method §13), to the rounding shown
    import re

    numbers = [float(n.replace(" ", "")) for n in re.findall(r"([0-9][0-9 ]*) N", line)]
    f_n, penalty, spill, bleed, bypass, f_inst = numbers
    assert abs((f_n - f_inst) - (penalty + spill + bleed + bypass)) <= 3.0
    assert main(["check", str(path), "--units", "us"]) == 1
    us = capsys.readouterr().out
    line = next(x for x in us.splitlines() if x.startswith("Installation loss:"))
    assert " N " not in line and " N (" not in line and "lbf (" in line


def test_started_text_names_the_self_start_and_unstart_mach(capsys):
    import numpy as np

    from engine_air.envelope.explain import mechanism
    from engine_air.envelope.conditions import evaluate_conditions
    from engine_air.inlets.mixed_compression import starting_machs
    from engine_air.project import load_project

    p = load_project(SAMPLES / "mixed_compression_throat_schedule.toml")
    start, unstart = starting_machs(p.inlet)
    below, above = 0.5 * (1.0 + unstart), 0.5 * (start + 2.5)
    pts = evaluate_conditions(p, p.cases[0], np.array([below, above]), np.array([11000.0, 15000.0]))
    low = mechanism(p, pts, 0, "started")
    # below the unstart Mach no started flow exists: the text says so and names both Mach numbers
    assert "unstarted by design" in low and f"unstart Mach {unstart:.3f}" in low
    assert f"self-starts at Mach {start:.3f}" in low and f"only above Mach {unstart:.3f}" in low
    assert "self-starts at Mach" in mechanism(p, pts, 1, "started")
    assert main(["check", str(SAMPLES / "mixed_compression_throat_schedule.toml")]) == 1
    line = next(x for x in capsys.readouterr().out.splitlines() if x.startswith("Inlet started (mixed compression):"))
    assert f"self-starts at Mach {start:.3f}" in line


def test_workers_and_scheduler_are_exclusive(capsys):
    code = main(["sweep", str(SAMPLES / "supersonic_two_ramp.toml"), "--vary", "capture_area_m2=0.5:0.6:2",
                 "--scheduler", "tcp://127.0.0.1:8786", "--workers", "2"])
    assert code == 2
    err = capsys.readouterr().err
    assert "--workers" in err and "--scheduler" in err and "exclusive" in err


def test_a_closed_pipe_ends_quietly():
    # `engine-air point ... | head`: the reader goes away before the JSON is written. Unix tools stop quietly; the
    # command must not print "Broken pipe" or a traceback, and exits 0.
    r, w = os.pipe()
    proc = subprocess.Popen([sys.executable, "-m", "engine_air.cli", "point", str(SAMPLES / "supersonic_two_ramp.toml"),
                             "--mach", "2", "--altitude-m", "11000", "--json"], stdout=w, stderr=subprocess.PIPE,
                            cwd=Path(__file__).resolve().parents[1])
    os.close(w)
    os.close(r)
    _, err = proc.communicate(timeout=120)
    assert proc.returncode == 0
    assert err.decode() == ""
