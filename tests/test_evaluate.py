"""Whole-envelope evaluation and the per-limit summary, checked by brute force over the arrays."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from engine_air.envelope.evaluate import WORST, evaluate_project
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.project.model import Grid
from engine_air.project import load_project

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"


@pytest.fixture(scope="module", params=sorted(p.name for p in SAMPLES.glob("*.toml")))
def evaluated(request):
    project = load_project(SAMPLES / request.param)
    project = dataclasses.replace(project, grid=Grid(61, 41))
    return project, evaluate_project(project)


def test_grid_broadcast_equals_pointwise(evaluated):
    """The Mach-row / altitude-column evaluation equals evaluating every point's own arrays."""
    project, result = evaluated
    m2d, h2d = np.meshgrid(result.mach, result.altitude_m)
    for cm in result.cases:
        direct = evaluate_conditions(project, project.case(cm.name), m2d.ravel(), h2d.ravel())
        for key in ("face_mach", "recovery", "mass_flow_ratio", "throat_mach", "spillage_fraction"):
            np.testing.assert_allclose(
                np.asarray(cm.points.value(key)).ravel(), direct.value(key), rtol=1e-12, equal_nan=True
            )
        np.testing.assert_array_equal(cm.points.limiting.ravel(), direct.limiting)


def test_summary_matches_brute_force(evaluated):
    _, result = evaluated
    for k, s in enumerate(result.summary):
        judged = failing = 0
        worst = np.inf
        for cm in result.cases:
            chk = cm.points.checks[k]
            applies = chk.applies & result.inside
            judged += applies.sum()
            failing += (chk.fails & applies).sum()
            if applies.any():
                worst = min(worst, np.min(chk.margin[applies]))
        assert s.holds == (failing == 0)
        assert s.failing_share == pytest.approx(failing / judged if judged else 0.0)
        if judged:
            assert s.worst_margin == pytest.approx(worst)


def test_worst_of_all_cases_margin_is_least_over_cases(evaluated):
    _, result = evaluated
    worst = result.quantity(WORST, "face_mach_margin")
    each = np.stack([result.quantity(c.name, "face_mach_margin") for c in result.cases])
    np.testing.assert_allclose(worst, np.min(each, axis=0), equal_nan=True)
    assert np.all(np.isnan(worst[~result.inside]))


def test_failing_sample_fails_only_in_part_of_the_envelope():
    project = load_project(SAMPLES / "undersized_business_jet.toml")
    result = evaluate_project(project)
    throat = next(s for s in result.summary if s.name == "throat-mach")
    assert not throat.holds and 0.0 < throat.failing_share < 0.5
    # corrected flow peaks at low theta2: the worst point is high and slow
    assert throat.worst_altitude_m > 8000 and throat.worst_mach < 0.6


def test_case_selection_and_unknown_case():
    project = load_project(SAMPLES / "undersized_business_jet.toml")
    result = evaluate_project(project, ["ISA+25, take-off"])
    assert [c.name for c in result.cases] == ["ISA+25, take-off"]
    assert result.holds
    with pytest.raises(KeyError):
        evaluate_project(project, ["no such case"])
