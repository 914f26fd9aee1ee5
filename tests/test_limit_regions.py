"""Limit regions (method section 15) and sizing against named limits only.

A limit may carry its own region, ``[limits.region.NAME]`` with ``mach_range`` and ``altitude_range_m`` (bounds
included). Outside it the check is not judged at that point: no verdict, no margin, not in the least margin, not
in the failing share; a check judged at no envelope point is "not judged anywhere", never "holds".

The hand-built case: a pitot inlet whose fan runs at 450 m/s physical tip speed, so that its blade relative tip
Mach M_rel = sqrt(M2^2 + (U/a2)^2) is highest in the cold air high up and slow (a2 small): a limit
M_rel <= 1.45 fails high up and holds low down (the same construction as tests/test_case_regions.py, where the
relation is worked by hand). Here the tests only need where the model's tip Mach exceeds the limit, read from the
points, and check that the region decides where that check is judged.

Sizing: the spillage fraction is 1 - MFR with MFR = A0/A_c (method section 5: the captured stream tube over the
capture area), so for a spillage cap s the largest capture area is min(A0)/(1 - s) over the envelope, A0 not
depending on A_c for this subsonic pitot inlet (the engine's demand sets the flow).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest

from engine_air.cli import main
from engine_air.envelope.checks import in_region
from engine_air.envelope.evaluate import NOT_JUDGED, evaluate_project, verdict_text
from engine_air.outputs.point import evaluate_point
from engine_air.project import (LimitRegion, ProjectError, dumps_project, load_project, loads_project,
                                project_to_dict, save_project, validate_project)
from engine_air.project.model import Case, Envelope, Grid, Inlet, Limits, Project, Rating
from engine_air.studies import sizing as S

TIP_LIMIT = 1.45
LOW = (0.0, 3000.0)  # the altitude band where the tip Mach holds (asserted from the points below)


def project(regions=(), **limits) -> Project:
    lim = dict(face_mach_max=0.7, relative_tip_mach_max=TIP_LIMIT)
    lim.update(limits)
    return Project(
        limits=Limits(regions=tuple(regions), **lim),
        inlet=Inlet(type="pitot", capture_area_m2=0.6, throat_area_m2=0.55, face_area_m2=0.5),
        ratings=(Rating("max", theta=(0.5, 2.5), corrected_flow_kg_s=(60.0, 60.0), fan_tip_speed_m_s=450.0),),
        envelope=Envelope((0.2, 0.9, 0.9, 0.2), (0.0, 0.0, 12000.0, 12000.0)),
        grid=Grid(mach_points=15, altitude_points=13),
        cases=(Case("max", "max"),),
    )


def tip_region(**kw) -> LimitRegion:
    return LimitRegion("relative-tip-mach", **kw)


def grid_2d(result):
    return np.meshgrid(result.mach, result.altitude_m)


# -- judged only inside the region ------------------------------------------------------------------------------

def test_the_case_fails_only_high_up_without_a_region():
    result = evaluate_project(project())
    _, alt = grid_2d(result)
    pts = result.case_map("max").points
    tip = pts.check("relative-tip-mach")
    low = (alt >= LOW[0]) & (alt <= LOW[1]) & result.inside
    assert (np.asarray(pts.relative_tip_mach)[low] <= TIP_LIMIT).all()  # holds in the low band
    assert tip.fails[result.inside & ~low].any()  # fails above it
    assert not result.holds


def test_a_check_failing_only_outside_its_region_is_judged_nowhere_there():
    result = evaluate_project(project([tip_region(altitude_range_m=LOW)]))
    mach, alt = grid_2d(result)
    region = (alt >= LOW[0]) & (alt <= LOW[1])
    pts = result.case_map("max").points
    tip = pts.check("relative-tip-mach")
    assert (tip.applies == region).all()  # judged exactly inside the region (the whole grid is in the atmosphere)
    assert not tip.fails.any()
    assert np.isnan(tip.relative_margin[~region]).all()  # no margin outside
    assert np.isfinite(pts.relative_tip_mach).all()  # still computed everywhere
    # not in the least margin: outside the region it is the least over the other checks
    others = np.nanmin(np.stack([c.relative_margin for c in pts.checks if c.name != "relative-tip-mach"]), axis=0)
    assert np.allclose(pts.worst_relative_margin[~region], others[~region], rtol=0, atol=0)
    assert not (pts.limiting[~region] == [c.name for c in pts.checks].index("relative-tip-mach")).any()
    # not in the failing share or the verdict
    s = next(s for s in result.summary if s.name == "relative-tip-mach")
    assert s.holds is True and s.verdict == "holds"
    assert s.judged_points == int((region & result.inside).sum())
    assert s.failing_share == 0.0
    assert LOW[0] <= s.worst_altitude_m <= LOW[1]
    assert result.holds


def test_point_json_has_holds_null_for_a_check_outside_its_region_and_bounds_are_included():
    p = project([tip_region(mach_range=(0.3, 0.5), altitude_range_m=LOW)])
    inside = evaluate_point(p, 0.5, 3000.0)  # both upper bounds exactly: judged
    tip = next(c for c in inside["checks"] if c["name"] == "relative-tip-mach")
    assert tip["holds"] is True and tip["margin"] is not None
    lower = evaluate_point(p, 0.3, 0.0)  # both lower bounds exactly: judged
    assert next(c for c in lower["checks"] if c["name"] == "relative-tip-mach")["holds"] is not None
    for mach, alt in ((0.5 + 1e-9, 3000.0), (0.5, 3000.0 + 1e-6), (0.3 - 1e-9, 1000.0), (0.4, 9000.0)):
        rec = evaluate_point(p, mach, alt)
        tip = next(c for c in rec["checks"] if c["name"] == "relative-tip-mach")
        assert tip["holds"] is None and tip["margin"] is None and tip["value"] is None, (mach, alt)
        assert rec["judged"] is True and rec["holds"] is True  # the other checks still judge the point
    high = evaluate_point(project(), 0.4, 9000.0)  # without the region the same point fails on tip Mach
    assert high["holds"] is False and high["limiting"] == "relative-tip-mach"


def test_in_region_includes_its_bounds_and_broadcasts():
    region = LimitRegion("face-mach", mach_range=(1.0, 2.0), altitude_range_m=(0.0, 1000.0))
    mach = np.array([0.999999, 1.0, 1.5, 2.0, 2.000001])
    alt = np.array([[-1e-6], [0.0], [1000.0], [1000.001]])
    got = in_region(region, mach[None, :], alt)
    want = np.outer([False, True, True, False], [False, True, True, True, False])
    assert got.shape == (4, 5) and (got == want).all()
    assert in_region(None, mach, 0.0).all()
    assert (in_region(LimitRegion("face-mach", altitude_range_m=(0.0, 10.0)), mach, 5.0) == True).all()  # noqa: E712


# -- a region covering nothing ------------------------------------------------------------------------------------

def test_a_region_covering_nothing_is_not_judged_anywhere_never_holds(tmp_path, capsys):
    p = project([tip_region(mach_range=(3.0, 4.0))])  # the envelope ends at Mach 0.9
    result = evaluate_project(p)
    s = next(s for s in result.summary if s.name == "relative-tip-mach")
    assert s.holds is None and s.verdict == NOT_JUDGED and not s.judged and not s.fails
    assert s.judged_points == 0
    assert result.holds  # it does not fail either: exit 0
    assert [x.name for x in result.not_judged] == ["relative-tip-mach"]
    assert len(result.judged_summary) == len(result.summary) - 1
    text = verdict_text(result, "name")
    assert text.startswith(f"all {len(result.summary) - 1} limits hold")
    assert "not judged anywhere" in text and "relative-tip-mach" in text
    path = tmp_path / "nowhere.toml"
    save_project(p, path)
    assert main(["check", str(path)]) == 0
    out = capsys.readouterr().out
    tip_line = next(line for line in out.splitlines() if line.startswith("Blade relative tip Mach"))
    assert "not judged anywhere: outside its region (limits.region.relative-tip-mach)" in tip_line
    assert "holds" not in tip_line
    verdict = next(line for line in out.splitlines() if line.startswith("VERDICT"))
    assert f"all {len(result.summary)} limits" not in verdict
    assert f"all {len(result.summary) - 1} limits hold" in verdict and "not judged anywhere" in verdict
    # without the region the same project fails: exit 1
    save_project(project(), tmp_path / "everywhere.toml")
    assert main(["check", str(tmp_path / "everywhere.toml")]) == 1


def test_a_check_that_applies_nowhere_without_a_region_is_not_judged_anywhere_either(tmp_path, capsys):
    # the MIL-E-5008B recovery check applies in supersonic flight only (method section 8); this envelope ends at
    # Mach 0.9, so it is judged nowhere: that is said, with the reason, and it is not counted as holding
    p = project(recovery_min="mil-e-5008b", relative_tip_mach_max=None)
    result = evaluate_project(p)
    rec = next(s for s in result.summary if s.name == "recovery")
    assert rec.holds is None and rec.verdict == NOT_JUDGED
    save_project(p, tmp_path / "subsonic.toml")
    assert main(["check", str(tmp_path / "subsonic.toml")]) == 0
    out = capsys.readouterr().out
    line = next(x for x in out.splitlines() if x.startswith("Recovery"))
    assert "not judged anywhere: the check applies at no envelope point" in line


def test_the_review_pack_names_a_limit_judged_nowhere(tmp_path):
    from engine_air.outputs.review_pack import write_review_pack

    p = replace(project([tip_region(mach_range=(3.0, 4.0))]), grid=Grid(mach_points=5, altitude_points=4))
    pack = write_review_pack(p, tmp_path / "pack", quantities=("face_mach_margin",))
    html = pack.index_path.read_text(encoding="utf-8") if hasattr(pack.index_path, "read_text") else \
        open(pack.index_path, encoding="utf-8").read()
    assert pack.holds
    assert f'<span class="unjudged">{NOT_JUDGED}</span>' in html
    n = len(pack.result.summary)
    assert f"all {n} limits hold" not in html and f"all {n - 1} limits hold" in html


def test_the_program_banner_and_findings_do_not_count_it(qtbot):
    from app.units import Units
    from app.views.findings import FindingsList, finding_lines
    from app.window.verdict import VerdictBanner

    result = evaluate_project(project([tip_region(mach_range=(3.0, 4.0))]))
    n = len(result.summary)
    banner = VerdictBanner()
    qtbot.addWidget(banner)
    state, text = banner.verdict_for(result)
    assert state == "holds" and f"ALL {n - 1} LIMITS HOLD" in text and f"ALL {n} LIMITS" not in text
    assert "not judged anywhere: Blade relative tip Mach" in text
    findings = FindingsList()
    qtbot.addWidget(findings)
    findings.set_summary(result.summary, Units())
    row = [s.name for s in result.summary].index("relative-tip-mach")
    assert findings.topLevelItem(row).text(2) == NOT_JUDGED
    line = finding_lines(result.summary, Units())[row]
    assert NOT_JUDGED in line and "holds" not in line


# -- the file ------------------------------------------------------------------------------------------------------

def test_regions_round_trip_through_the_file(tmp_path):
    p = project([LimitRegion("relative-tip-mach", altitude_range_m=(0.0, 3000.0)),
                 LimitRegion("face-mach", mach_range=(0.2, 0.8), altitude_range_m=(-500.0, 12000.0))])
    text = dumps_project(p)
    assert "[limits.region.relative-tip-mach]\naltitude_range_m = [0.0, 3000.0]\n" in text
    assert "[limits.region.face-mach]\nmach_range = [0.2, 0.8]\n" in text
    assert loads_project(text) == p
    save_project(p, tmp_path / "p.toml")
    back = load_project(tmp_path / "p.toml")
    assert back == p and back.limits.region("face-mach").mach_range == (0.2, 0.8)
    assert back.limits.region("throat-mach") is None
    assert "region" not in project_to_dict(project())["limits"]  # no region: no table written


def _load_text(regions_toml: str, tmp_path):
    text = dumps_project(project()).replace("[inlet]\n", regions_toml + "\n[inlet]\n", 1)
    path = tmp_path / "bad.toml"
    path.write_text(text, encoding="utf-8")
    return load_project(path)


def test_a_region_with_either_key_only_loads(tmp_path):
    p = _load_text("[limits.region.started]\nmach_range = [2.0, 3.2]\n", tmp_path)
    assert p.limits.region("started") == LimitRegion("started", mach_range=(2.0, 3.2))
    assert any("limits.region.started" in w for w in p.warnings)  # a pitot inlet has no started check


@pytest.mark.parametrize("toml, key, words", [
    ("[limits.region.tip-mach]\nmach_range = [0.0, 1.0]\n", "limits.region.tip-mach",
     ['names no check', 'did you mean "relative-tip-mach"', "face-mach, throat-mach, recovery"]),
    ("[limits.region.started]\nmach_range = [3.2, 2.0]\n", "limits.region.started.mach_range[1]",
     ["must not be less than mach_range[0] = 3.2"]),
    ("[limits.region.started]\naltitude_range_m = [25000.0, 12000.0]\n", "limits.region.started.altitude_range_m[1]",
     ["must not be less than"]),
    ("[limits.region.started]\nmach_rnage = [2.0, 3.2]\n", "limits.region.started.mach_rnage",
     ["unknown key", "did you mean mach_range", "mach_range, altitude_range_m"]),
    ("[limits.region.started]\nmach_range = [2.0]\n", "limits.region.started.mach_range", ["exactly 2"]),
    ("[limits.region.started]\nmach_range = [-1.0, 2.0]\n", "limits.region.started.mach_range[0]", ["0 <="]),
    ("[limits.region.started]\n", "limits.region.started", ["bounds nothing", "mach_range, altitude_range_m"]),
    ("[limits.region]\nstarted = 2.0\n", "limits.region.started", ["must be a table"]),
    ("[limits]\nregion = 2.0\n", "limits.region", ["must be a table"]),
])
def test_bad_region_keys_are_refused_with_clear_messages(tmp_path, toml, key, words):
    if toml.startswith("[limits]\n"):
        text = dumps_project(project()).replace("[limits]\n", toml, 1)
        (tmp_path / "bad.toml").write_text(text, encoding="utf-8")
        with pytest.raises(ProjectError) as info:
            load_project(tmp_path / "bad.toml")
    else:
        with pytest.raises(ProjectError) as info:
            _load_text(toml, tmp_path)
    assert info.value.key == key
    message = str(info.value)
    for w in words:
        assert w in message, (w, message)
    assert "bad.toml" in message


def test_validate_project_refuses_bad_regions_built_in_code():
    with pytest.raises(ProjectError) as info:
        validate_project(project([LimitRegion("tip")]))
    assert info.value.key == "limits.region.tip" and "face-mach" in str(info.value)
    with pytest.raises(ProjectError) as info:
        validate_project(project([tip_region(mach_range=(0.5, 0.4))]))
    assert info.value.key == "limits.region.relative-tip-mach.mach_range[1]"
    with pytest.raises(ProjectError) as info:
        validate_project(project([tip_region(mach_range=(0.1, 0.4)), tip_region(altitude_range_m=(0.0, 1.0))]))
    assert "given twice" in str(info.value)
    validate_project(project([tip_region(mach_range=(0.1, 0.4))]))


def test_every_check_the_program_builds_can_be_named_by_a_region():
    from engine_air.envelope.check_names import CHECK_NAMES
    from engine_air.project import schema

    p = project(recovery_min=0.9, stable_flow_fraction=0.8, spillage_fraction_max=0.5)
    names = S.project_check_names(p)
    assert set(names) <= set(CHECK_NAMES)
    assert schema.subtables("limits") == ("region",)
    assert schema.field("limits.region.<check>.mach_range").kind == "number list"


# -- sizing: named limits and regions -----------------------------------------------------------------------------

def tip_bound_project(**limits) -> Project:
    """Capture-area sizing: the fan's tip Mach (set by the engine, not by the capture area) fails everywhere."""
    return project(relative_tip_mach_max=0.5, **limits)


def test_a_tip_mach_limit_empties_a_capture_area_sizing_unless_only_face_mach_is_named(tmp_path, capsys):
    p = tip_bound_project()
    every = S.feasible_range(p, "capture_area_m2", 0.6, 2.0, scan_points=5)
    assert not every.feasible  # the tip-Mach limit fails at every capture area
    named = S.feasible_range(p, "capture_area_m2", 0.6, 2.0, scan_points=5, limits=["face-mach"])
    assert named.feasible and named.limits == ("face-mach",) and named.limits_named
    assert named.intervals[0].lower.value == 0.6 and named.intervals[0].upper.value == 2.0
    assert named.limit_ends() == {"face-mach": []}
    assert any("face-mach: bounds no end" in line for line in named.describe())
    path = tmp_path / "tip.toml"
    save_project(p, path)
    args = ["size", str(path), "--variable", "capture_area_m2", "--lower", "0.6", "--upper", "2.0", "--scan", "5"]
    assert main(args) == 1
    assert "EMPTY" in capsys.readouterr().out
    assert main(args + ["--limits", "face-mach"]) == 0
    out = capsys.readouterr().out
    assert "EMPTY" not in out and "Limits judged: only face-mach." in out


def test_each_named_limit_says_which_end_it_bounds():
    cap = 0.6  # A0 over the envelope runs from 0.25 to 0.74 m^2: the cap binds at 0.25/0.4 = 0.63 m^2
    p = tip_bound_project(spillage_fraction_max=cap)
    result = S.feasible_range(p, "capture_area_m2", 0.56, 3.0, scan_points=9, limits=["face-mach", "spillage"])
    assert result.feasible and len(result.intervals) == 1
    upper = result.intervals[0].upper
    # by the relation: spillage = 1 - A0/A_c <= cap  <=>  A_c <= A0/(1 - cap), at the envelope's least A0
    base = evaluate_project(p)
    a0 = np.asarray(base.case_map("max").points.stream_tube_area_m2)[base.inside]
    by_hand = float(a0.min()) / (1.0 - cap)
    assert upper.kind == "limit" and upper.check == "spillage"
    assert upper.value == pytest.approx(by_hand, rel=2e-6)
    ends = result.limit_ends()
    assert ends["spillage"] == [(1, "upper", upper.value)] and ends["face-mach"] == []
    lines = result.describe()
    assert any(line.strip().startswith("spillage: bounds the upper end") for line in lines)


def test_sizing_respects_limit_regions():
    p = tip_bound_project(regions=(tip_region(mach_range=(3.0, 4.0)),))
    result = S.feasible_range(p, "capture_area_m2", 0.6, 2.0, scan_points=5)
    assert result.feasible  # the tip limit is judged nowhere, so it empties nothing
    assert result.current.holds


def test_unknown_limit_names_exit_2_with_the_allowed_list(tmp_path, capsys):
    path = tmp_path / "p.toml"
    save_project(tip_bound_project(), path)
    base = ["size", str(path), "--variable", "capture_area_m2", "--scan", "3"]
    assert main(base + ["--limits", "face-mach,tip-mach"]) == 2
    err = capsys.readouterr().err
    assert "tip-mach" in err and "face-mach, throat-mach, relative-tip-mach" in err and "Traceback" not in err
    assert main(base + ["--limits", "started"]) == 2  # a check name, but not one of this pitot project's
    assert "not a check of this project" in capsys.readouterr().err
    assert main(base + ["--limits", " , "]) == 2
    with pytest.raises(ProjectError) as info:
        S.feasible_range(tip_bound_project(), "capture_area_m2", limits=["recovery"])
    assert info.value.key == "limits" and "face-mach" in str(info.value)


def test_optimum_judges_the_named_limits_too():
    p = tip_bound_project(spillage_fraction_max=0.6)
    best = S.optimise(p, "capture_area_m2", "-worst_margin",
                      within=S.feasible_range(p, "capture_area_m2", 0.56, 3.0, scan_points=5,
                                              limits=["face-mach", "spillage"]))
    assert best.value is not None and best.success
    assert best.worst.check in ("face-mach", "spillage")
    assert math.isfinite(best.objective_value)


# -- the program: the limits editor and the sizing dialog -----------------------------------------------------------

def test_the_limits_editor_sets_a_region_per_limit(qtbot):
    from app.editors import ProjectEditors
    from engine_air.envelope.check_names import CHECK_NAMES

    e = ProjectEditors()
    qtbot.addWidget(e)
    e.set_project(project([tip_region(altitude_range_m=LOW)]))
    t = e.region_table
    row = CHECK_NAMES.index("relative-tip-mach")
    assert t.rowCount() == len(CHECK_NAMES) and t.item(row, 0).text() == "relative-tip-mach"
    assert t.item(row, 1).text() == "" and float(t.item(row, 4).text()) == pytest.approx(3000.0)
    face = CHECK_NAMES.index("face-mach")
    t.item(face, 1).setText("0.3")
    assert "give both bounds" in e.last_error()  # one bound alone is refused, the project is kept
    assert e.project.limits.region("face-mach") is None
    t.item(face, 2).setText("0.8")
    assert e.project.limits.region("face-mach") == LimitRegion("face-mach", mach_range=(0.3, 0.8))
    assert e.project.limits.region("relative-tip-mach").altitude_range_m == LOW  # the other row kept exactly
    t.item(face, 2).setText("0.2")  # lower above upper: refused by the file's rules
    assert "must not be less than" in e.last_error()
    assert e.project.limits.region("face-mach").mach_range == (0.3, 0.8)
    t.item(face, 2).setText("0.8")  # every row is read: the refused cell is put right first
    for c in (3, 4):
        t.item(row, c).setText("")
    assert e.project.limits.region("relative-tip-mach") is None  # both blank: judged everywhere


def test_the_sizing_dialog_judges_the_limits_ticked(qtbot):
    from app.dialogs.sizing import SizingDialog

    d = SizingDialog(tip_bound_project())
    qtbot.addWidget(d)
    assert list(d.limit_checks) == list(S.project_check_names(tip_bound_project()))
    assert d.chosen_limits() is None  # all ticked: every limit
    d.variable.setCurrentIndex(d.variable.findData("capture_area_m2"))
    d.lower.setValue(0.6)
    d.upper.setValue(2.0)
    d.scan.setValue(5)
    for name, box in d.limit_checks.items():
        box.setChecked(name == "face-mach")
    assert d.chosen_limits() == ("face-mach",)
    d.start()
    qtbot.waitUntil(lambda: not d.running, timeout=30000)
    sizing, _best = d.result
    assert d.last_error == "" and sizing.feasible and sizing.limits == ("face-mach",)
    assert "Limits judged: only face-mach." in d.text.toPlainText()
    for box in d.limit_checks.values():
        box.setChecked(False)
    d.start()
    assert "tick at least one limit" in d.last_error
