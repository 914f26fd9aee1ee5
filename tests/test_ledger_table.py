"""The installation-ledger table (engine_air.outputs.ledger_table) and its section in the review pack.

References: the ledger relation of method §13, F_inst = F_n (1 - X (1 - pi/pi_ref)) - D_spill - D_bleed - D_bypass,
worked by hand below; the rows of the table must add up to the installed thrust the analysis reports.
"""

from __future__ import annotations

import html
import re
from pathlib import Path

import pytest

from engine_air.envelope.evaluate import evaluate_project
from engine_air.outputs.ledger_table import NO_THRUST_DATA, ledger_rows, rows_sum
from engine_air.outputs.point_record import point_record
from engine_air.outputs.review_pack import write_review_pack
from engine_air.project import load_project
from engine_air.studies.sizing import worst_point

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
FIGHTER = SAMPLES / "variable_geometry_fighter.toml"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"


def _by_key(rows):
    return {r["key"]: r for r in rows}


def test_rows_worked_by_hand():
    # invented numbers: F_n 50 kN, X 1.3, pi 0.90 against pi_ref 0.925, drags 1000 + 300 + 200 N,
    # pre-entry drag 1600 N of which 600 N recovered as lip suction, W V0 = 20 kN.
    f_inst = 50000.0 * (1.0 - 1.3 * (1.0 - 0.90 / 0.925)) - 1500.0  # = 46 743.24 N by hand
    record = {"ram_drag_n": 20000.0, "additive_drag_n": 1600.0, "spillage_drag_n": 1000.0, "bleed_drag_n": 300.0,
              "bypass_drag_n": 200.0, "net_thrust_n": 50000.0, "installed_thrust_n": f_inst,
              "installation_loss_fraction": 1.0 - f_inst / 50000.0, "recovery": 0.90,
              "thrust_reference_recovery": 0.925}
    rows = _by_key(ledger_rows(record, exchange=1.3))
    assert rows["recovery_term_n"]["value"] == pytest.approx(-50000.0 * 1.3 * 0.025 / 0.925, rel=1e-12)
    assert rows["recovery_term_n"]["value"] == pytest.approx(-1756.7568, abs=1e-4)
    assert rows["spillage_drag_n"]["value"] == -1000.0 and rows["bleed_drag_n"]["value"] == -300.0
    assert rows["bypass_drag_n"]["value"] == -200.0
    assert rows["lip_suction_n"]["value"] == -600.0 and rows["lip_suction_n"]["role"] == "memo"
    assert rows["ram_drag_n"]["role"] == "memo"  # inside F_n, not summed
    assert rows_sum(ledger_rows(record, exchange=1.3)) == pytest.approx(46743.24, abs=0.01)
    # without X, the recovery term is the remainder and gives the same row
    assert _by_key(ledger_rows(record))["recovery_term_n"]["value"] == pytest.approx(-1756.7568, abs=1e-4)


def test_no_thrust_data_rows():
    record = {"ram_drag_n": 1.0, "additive_drag_n": 2.0, "spillage_drag_n": 2.0, "bleed_drag_n": 0.0,
              "bypass_drag_n": 0.0, "net_thrust_n": None, "installed_thrust_n": None}
    rows = _by_key(ledger_rows(record))
    assert rows["net_thrust_n"]["value"] is None and rows["net_thrust_n"]["note"] == NO_THRUST_DATA
    assert rows["installed_thrust_n"]["note"] == NO_THRUST_DATA
    assert "recovery_term_n" not in rows


@pytest.fixture(scope="module")
def fighter():
    project = load_project(FIGHTER)
    return project, evaluate_project(project)


def test_rows_sum_to_installed_thrust_on_the_fighter(fighter):
    project, result = fighter
    worst = worst_point(result)
    checked = 0
    points = [(worst.case, worst.index)]
    cm = result.case_map("ISA, max reheat")
    inside = [tuple(int(v) for v in ij) for ij in zip(*result.inside.nonzero())]
    points += [("ISA, max reheat", ij) for ij in inside[:: max(1, len(inside) // 25)]]
    for case, index in points:
        record = point_record(result.case_map(case).points, index, case)
        x = project.rating(project.case(case).rating).recovery_thrust_exchange
        if record["installed_thrust_n"] is None:
            continue
        rows = ledger_rows(record, exchange=x)
        assert rows_sum(rows) == pytest.approx(record["installed_thrust_n"], rel=1e-9), (case, index)
        checked += 1
    assert checked >= 20 and cm is not None


def test_pack_shows_the_ledger(fighter, tmp_path):
    project, result = fighter
    pack = write_review_pack(FIGHTER, tmp_path / "pack", quantities=("face_mach_margin",))
    page = Path(pack.index_path).read_text(encoding="utf-8")
    section = page[page.index('<section id="ledger">'):]
    section = section[:section.index("</section>")]
    for label in ("Ram drag", "Pre-entry (additive) drag", "Spillage drag", "Bleed drag", "Bypass drag",
                  "Net thrust F_n", "Recovery exchange", "Installed thrust F_inst", "Installation loss"):
        assert html.escape(label) in section, label
    worst = worst_point(pack.result)
    record = point_record(pack.result.case_map(worst.case).points, worst.index, worst.case)
    if record["installed_thrust_n"] is not None:
        shown = f"{abs(record['installed_thrust_n']):,.1f}".replace(",", "\u2009")
        assert shown in section
    else:
        assert NO_THRUST_DATA in section


def test_pack_says_no_thrust_data(tmp_path):
    pack = write_review_pack(PITOT, tmp_path / "pack", quantities=("face_mach_margin",))
    page = Path(pack.index_path).read_text(encoding="utf-8")
    section = page[page.index('<section id="ledger">'):]
    section = re.sub(r"\s+", " ", section[:section.index("</section>")])
    assert NO_THRUST_DATA in section and "Spillage drag" in section


def test_spillage_drag_coefficient_agrees_with_the_newtons():
    # Method §12 ("Spillage drag is 0 at MFR >= 1"): the coefficient and the force say the same thing. Subsonic
    # points of the pitot sample run at MFR > 1 near take-off (the stream tube is wider than the capture): there
    # both are 0; below MFR 1 the force is C_spill q0 A_c (q0 = gamma/2 p0 M0^2, NACA 1135 eq. 44).
    import numpy as np

    p = load_project(SAMPLES / "subsonic_transport_nacelle.toml")
    pts = evaluate_project(p).cases[0].points
    mfr = np.asarray(pts.mass_flow_ratio)
    over = np.isfinite(mfr) & (mfr >= 1.0)
    assert over.any() and (~over & np.isfinite(mfr)).any()
    assert np.all(np.asarray(pts.spillage_drag_n)[over] == 0.0)
    assert np.all(np.asarray(pts.spillage_drag_coefficient)[over] == 0.0)
    under = np.isfinite(mfr) & (mfr < 1.0) & np.isfinite(pts.spillage_drag_coefficient)
    q0 = 0.5 * 1.4 * pts.static_pressure_pa * pts.mach ** 2
    force = pts.spillage_drag_coefficient * q0 * p.inlet.capture_area_m2
    assert np.allclose(force[under], np.asarray(pts.spillage_drag_n)[under], rtol=1e-9, atol=1e-6)
