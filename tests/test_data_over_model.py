"""Measured characteristics over the model in the match (method §17), on the invented tunnel-data sample.

References: continuity MFR = W/(rho0 V0 A_c) with W = W_c2 pi p_t0/(p_ref sqrt(theta2)) (method §5); the §17
interpolation done by hand on the table's own rows at a tested Mach number; the §6 supercritical rule."""

from __future__ import annotations

import dataclasses
import pathlib

import numpy as np
import pytest

from engine_air import evaluate_conditions, evaluate_project
from engine_air.flow import flags as F
from engine_air.flow.chain import run_chain
from engine_air.project.load import load_project

SAMPLE = pathlib.Path(__file__).resolve().parent.parent / "sample_projects" / "tunnel_data" / \
    "two_ramp_with_tunnel_data.toml"
PROJECT = load_project(SAMPLE)
TABLE = PROJECT.characteristics.table


def _rows(mach, alpha=0.0):
    sel = (TABLE.column("mach") == mach) & (TABLE.column("alpha_deg") == alpha)
    return TABLE.column("mass_flow_ratio")[sel], TABLE.column("recovery")[sel]


def test_point_on_a_tested_curve_follows_the_data_by_continuity():
    """At Mach 1.7 (a tested curve, zero incidence) the point's recovery is the table's branch, linear between
    its two neighbouring rows, at the point's own MFR, and MFR = W/(rho0 V0 A_c) holds (continuity, §5)."""
    case = PROJECT.cases[0]
    p = evaluate_conditions(PROJECT, case, np.array([1.7]), np.array([11000.0]))
    assert F.has(p.flags, F.FROM_DATA)[0]
    mfr, rec = float(p.mass_flow_ratio[0]), float(p.recovery[0])
    x, y = _rows(1.7)
    crit = x.max()
    band = x >= 0.995 * crit
    branch_x = np.append(x[~band], crit)
    branch_y = np.append(y[~band], y[band].max())
    order = np.argsort(branch_x)
    if mfr < 0.995 * crit:  # subcritical: on the measured branch
        assert rec == pytest.approx(np.interp(mfr, branch_x[order], branch_y[order]), abs=1e-9)
    else:  # supercritical: captured flow held at the critical MFR, recovery below the critical recovery
        assert mfr == pytest.approx(crit) and rec <= y[band].max() + 1e-12
    w = float(p.mass_flow_kg_s[0])
    capture_flow = float(p.density_kg_m3[0] * p.velocity_m_s[0]) * PROJECT.inlet.capture_area_m2
    assert mfr == pytest.approx(w / capture_flow, rel=1e-9)
    assert float(p.max_mass_flow_ratio[0]) == pytest.approx(crit)


def test_the_model_stands_outside_the_data_and_says_so():
    """Mach 0.4 lies below the tested Mach numbers (0.6 to 2.1): the model decides, flagged outside-data, with the
    model's own numbers exactly."""
    case = PROJECT.cases[0]
    m, h = np.array([0.4, 1.7]), np.array([3000.0, 11000.0])
    with_data = run_chain(PROJECT, case, m, h)
    model = run_chain(PROJECT, case, m, h, data=False)
    assert F.has(with_data.flags, F.OUTSIDE_DATA).tolist() == [True, False]
    assert float(with_data.recovery[0]) == float(model.recovery[0])
    assert float(with_data.recovery[1]) != float(model.recovery[1])


def test_incidence_picks_the_curves_or_is_flagged_not_modelled():
    """The 4 deg case: inside the tested incidence (Mach 1.5 to 1.9 at 4 deg) the 4 deg curves decide (lower
    recovery, by the table's invented 0.6 %/deg); at Mach 1.3 no 4 deg curve exists: the model at zero
    incidence, flagged incidence-not-modelled."""
    level, tilted = PROJECT.cases[0], PROJECT.cases[2]
    m, h = np.array([1.3, 1.7]), np.array([11000.0, 11000.0])
    a = evaluate_conditions(PROJECT, level, m, h)
    b = evaluate_conditions(PROJECT, tilted, m, h)
    assert F.has(b.flags, F.INCIDENCE_NOT_MODELLED).tolist() == [True, False]
    assert F.has(b.flags, F.FROM_DATA).tolist() == [False, True]
    assert float(b.recovery[1]) < float(a.recovery[1])
    assert float(b.angle_of_attack_deg[1]) == 4.0


def test_measured_stability_limit_replaces_the_model_buzz_rule():
    """The table's stable column puts the buzz limit at 0.80 MFR_crit (the model's fraction is 0.65): a point
    asked to run at 0.70 MFR_crit is flagged buzz-risk from the data, and the stability check fails there."""
    case = PROJECT.cases[0]
    x, _ = _rows(1.9)
    crit = x.max()
    # find the corrected flow for MFR 0.7 crit by continuity on the data recovery (about 0.95 at Mach 1.9)
    sweep = np.linspace(20.0, 90.0, 400)
    pts = evaluate_conditions(PROJECT, case, np.full(sweep.shape, 1.9), np.full(sweep.shape, 11000.0), demand=sweep)
    fraction = np.asarray(pts.mass_flow_ratio) / crit
    at = int(np.argmin(np.abs(fraction - 0.70)))
    assert abs(fraction[at] - 0.70) < 0.01
    assert F.has(pts.flags, F.BUZZ_RISK)[at]
    stability = pts.check("stability")
    assert stability.applies[at] and stability.fails[at]
    assert float(stability.margin[at]) == pytest.approx(fraction[at] - 0.80, abs=2e-3)


def test_map_over_data_and_point_json(tmp_path):
    result = evaluate_project(dataclasses.replace(PROJECT, grid=dataclasses.replace(PROJECT.grid, mach_points=31,
                                                                                    altitude_points=21)))
    flags = np.asarray(result.cases[0].points.flags)
    assert F.has(flags, F.FROM_DATA).any() and F.has(flags, F.OUTSIDE_DATA).any()
    from engine_air.outputs.point import evaluate_point

    record = evaluate_point(PROJECT, 1.7, 11000.0, PROJECT.cases[2].name)
    assert record["data_source"] == "data" and record["angle_of_attack_deg"] == 4.0
    assert record["sideslip_deg"] == 0.0 and "from-data" in record["flags"]
    # the table's invented distortion columns at the operating point; the stack-up of the rating (method 18):
    # remaining = available 0.20 - loss - (0.04 + 0.03 + 0.02), summed here by hand
    assert 0.0 < record["dc60"] < 0.25
    assert record["remaining_surge_margin"] == pytest.approx(0.20 - record["surge_margin_loss"] - 0.09, abs=1e-12)
    assert {c["name"] for c in record["checks"]} >= {"dc60", "surge-margin"}
    record = evaluate_point(PROJECT, 0.4, 3000.0)
    assert record["data_source"] == "model" and "outside-data" in record["flags"]


def test_distortion_columns_judged_where_the_data_decide(tmp_path):
    """The table's dc60 and surge_margin_loss columns (method §18), here rewritten as known linear functions of MFR:
    the map judges dc60 against dc60_max and the remaining surge margin (available 0.20 - loss - the other items
    0.04 + 0.03 + 0.02, summed here by hand) against surge_margin_min, only where the data decide."""
    import shutil

    folder = tmp_path / "study"
    shutil.copytree(SAMPLE.parent, folder)
    table = folder / "tunnel_characteristics.csv"
    lines = table.read_text().splitlines()
    header = lines[0].split(",")
    assert header[-2:] == ["dc60", "surge_margin_loss"]
    out = [lines[0]]
    for line in lines[1:]:
        cells = line.split(",")
        mfr = float(cells[2])
        out.append(",".join(cells[:-2] + [f"{0.5 - 0.4 * mfr:.6f}", f"{0.10 - 0.05 * mfr:.6f}"]))
    table.write_text("\n".join(out) + "\n")
    project = load_project(folder / SAMPLE.name)
    p = evaluate_conditions(project, project.cases[0], np.array([0.4, 1.7]), np.array([3000.0, 11000.0]))
    mfr = float(p.mass_flow_ratio[1])
    assert float(p.dc60[1]) == pytest.approx(0.5 - 0.4 * mfr, abs=2e-6)  # linear in MFR: exact on the branch
    remaining = 0.20 - (0.10 - 0.05 * mfr) - (0.04 + 0.03 + 0.02)
    assert float(p.remaining_surge_margin[1]) == pytest.approx(remaining, abs=2e-6)
    dc60, surge = p.check("dc60"), p.check("surge-margin")
    assert dc60.applies.tolist() == [False, True] and surge.applies.tolist() == [False, True]
    assert float(surge.margin[1]) == pytest.approx(remaining - 0.0, abs=2e-6)
