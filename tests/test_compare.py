"""Comparison of two projects on one grid: a project against itself is exactly zero; real differences show."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from engine_air.cli import main
from engine_air.studies.compare import DIFFERENCE_QUANTITIES, common_axes, compare_projects, evaluate_on_axes
from engine_air.envelope.polygon import grid_axes
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import WORST, evaluate_project
from engine_air.project import load_project
from engine_air.outputs.quantities import QUANTITIES
from engine_air.studies.sizing import with_design_value

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
RAMP = SAMPLES / "supersonic_two_ramp.toml"
FAILING = SAMPLES / "undersized_business_jet.toml"


@pytest.mark.parametrize("path", [PITOT, RAMP, FAILING], ids=lambda p: p.stem)
def test_project_against_itself_is_exactly_zero(path):
    p = load_project(path)
    c = compare_projects(p, p)
    assert c.identical
    assert c.cases == [x.name for x in p.cases] + [WORST]
    assert not c.only_a and not c.only_b
    for case in c.cases:
        for key in QUANTITIES:
            d = c.difference(case, key)
            value = c.value("a", case, key)
            defined = np.isfinite(value)
            assert np.all(d[defined] == 0.0), (case, key)
            assert np.array_equal(np.isnan(d), ~defined)  # NaN only where the quantity itself is not defined
    for s in c.stats:
        assert s.min == s.max == s.max_abs == 0.0 or s.points == 0
    for row in c.verdicts:
        assert row.a.holds == row.b.holds and row.a.worst_margin == row.b.worst_margin
        assert row.change in ("holds in both", "fails in both")


def test_own_axes_reproduce_evaluate_project():
    p = load_project(RAMP)
    ref = evaluate_project(p)
    got = evaluate_on_axes(p, *grid_axes(p.envelope, p.grid))
    assert np.array_equal(ref.inside, got.inside)
    for a, b in zip(ref.cases, got.cases):
        for key in ("face_mach", "recovery", "spillage_fraction", "flags", "throat_mach"):
            assert np.array_equal(np.asarray(getattr(a.points, key)), np.asarray(getattr(b.points, key)),
                                  equal_nan=True)
    assert [(s.name, s.holds, s.worst_margin) for s in ref.summary] == \
        [(s.name, s.holds, s.worst_margin) for s in got.summary]


def test_bigger_face_raises_the_face_mach_margin_everywhere():
    a = load_project(FAILING)
    b = with_design_value(a, "face_area_m2", a.inlet.face_area_m2 * 1.3)
    c = compare_projects(a, b)
    d = c.difference(WORST, "face_mach_margin")
    inside = c.both
    assert np.all(d[inside] > 0)
    assert np.all(np.isnan(d[~inside]))
    row = {r.name: r for r in c.verdicts}["face-mach"]
    assert row.b.worst_margin > row.a.worst_margin
    s = c.stat(WORST, "face_mach_margin")
    assert s.min > 0 and s.points == int(inside.sum())


def test_grid_choices_and_case_sets():
    a = load_project(PITOT)
    b = load_project(FAILING)
    for choice in ("a", "b", "union"):
        c = compare_projects(a, b, grid_from=choice)
        assert c.inside_a.shape == c.inside_b.shape == (len(c.altitude_m), len(c.mach))
    c = compare_projects(a, b, grid_from="union")
    m, h = common_axes(a, b, "union")
    assert m[0] == min(a.envelope.mach + b.envelope.mach) and m[-1] == max(a.envelope.mach + b.envelope.mach)
    assert h[-1] == max(a.envelope.altitude_m + b.envelope.altitude_m)
    assert c.cases == ["ISA, take-off", WORST]
    assert c.only_a == ["ISA+20, take-off", "ISA, max continuous"] and c.only_b == ["ISA+25, take-off"]
    changes = {r.name: r.change for r in c.verdicts}
    assert changes["face-mach"] == "now fails" and changes["relative-tip-mach"].startswith("only in A")
    lo, hi = c.shared_levels(WORST, "face_mach_margin")
    assert lo == -hi  # a margin scale is centred on zero
    with pytest.raises(KeyError):
        c.difference("ISA+25, take-off", "recovery")
    with pytest.raises(ProjectError):
        compare_projects(a, b, grid_from="c")


def test_cli_compare_exit_codes_and_csv(tmp_path, capsys):
    out = tmp_path / "d.csv"
    assert main(["compare", str(PITOT), str(PITOT), "--csv", str(out)]) == 0
    text = capsys.readouterr().out
    assert "identical results" in text
    head = out.read_text().splitlines()[0].split(",")
    assert head[:5] == ["case", "mach", "altitude_m", "inside_a", "inside_b"]
    assert all(f"{q}_delta" in head for q in DIFFERENCE_QUANTITIES)
    assert main(["compare", str(PITOT), str(FAILING)]) == 1
    assert "now fails" in capsys.readouterr().out
    assert main(["compare", str(PITOT), str(tmp_path / "missing.toml")]) == 2
    assert "missing.toml" in capsys.readouterr().err


def test_default_quantity_shows_a_real_difference():
    # A ramp-angle change leaves the face Mach (set by the engine's demand and the face area) unchanged, so a
    # face-Mach-margin difference map is blank; the default quantity (least relative margin over every judged
    # limit) moves with the recovery and stability checks and shows the change.
    from dataclasses import replace
    from engine_air.project.model import Grid

    a = load_project(RAMP)
    a = replace(a, grid=Grid(mach_points=41, altitude_points=31))
    b = with_design_value(a, "ramp_angles_deg[1]", 10.0)
    c = compare_projects(a, b)
    default = DIFFERENCE_QUANTITIES[0]
    assert default == "worst_relative_margin"
    face = c.difference(WORST, "face_mach_margin")
    assert np.nanmax(np.abs(face)) == 0.0  # the old default: blank
    d = c.difference(WORST, default)
    assert np.isfinite(d).sum() > 0.5 * c.both.sum()
    assert np.nanmax(np.abs(d)) > 1e-3


def test_compare_csv_has_every_quantity_and_neutral_text(tmp_path, capsys):
    import csv

    out = tmp_path / "c.csv"
    main(["compare", str(RAMP), str(RAMP), "--csv", str(out)])
    with open(out, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert rows and all(float(r["worst_relative_margin_delta"] or 0.0) == 0.0 for r in rows)
    assert {"ISA, max", "worst of all cases"} <= {r["case"] for r in rows}


def test_differences_only_inside_case_regions_and_drags_in_newtons():
    # Issue 14: a take-off case judged only at Mach 0-0.4 below 3000 m (method §14) must not report differences at
    # Mach 2; and a drag coefficient (over q0 -> 0 at the low-speed end) is not compared, the drag in newtons is.
    from dataclasses import replace

    from engine_air.project.model import Grid

    fighter = load_project(SAMPLES / "variable_geometry_fighter.toml")
    a = replace(fighter, grid=Grid(mach_points=31, altitude_points=21))
    b = with_design_value(a, "capture_area_m2", a.inlet.capture_area_m2 * 1.1)
    c = compare_projects(a, b)
    take_off = "ISA+15, take-off"
    region = next(x for x in a.cases if x.name == take_off)
    mach_2d, alt_2d = np.meshgrid(c.mach, c.altitude_m)
    inside_region = ((mach_2d >= region.mach_range[0]) & (mach_2d <= region.mach_range[1])
                     & (alt_2d >= region.altitude_range_m[0]) & (alt_2d <= region.altitude_range_m[1]))
    for key in DIFFERENCE_QUANTITIES:
        d = c.difference(take_off, key)
        assert not np.isfinite(d[~(inside_region & c.both)]).any(), key
        s = c.stat(take_off, key)
        if s.points and s.max_abs > 0:
            assert region.mach_range[0] <= s.max_abs_mach <= region.mach_range[1], key
            assert region.altitude_range_m[0] <= s.max_abs_altitude_m <= region.altitude_range_m[1], key
    assert np.isfinite(c.difference(take_off, "spillage_fraction")).any()  # the region itself is compared
    assert "additive_drag_coefficient" not in DIFFERENCE_QUANTITIES
    assert {"additive_drag_n", "spillage_drag_n"} <= set(DIFFERENCE_QUANTITIES)
    assert QUANTITIES["additive_drag_n"].unit == "N"
