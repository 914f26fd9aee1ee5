"""A check keeps its value, where it applies and its limit's rule; margin, relative margin and verdict are computed
when read (method §8: margin positive where the limit holds, relative margin = margin / |limit|, held within
+-1e12, at most -1 where the face or throat is choked). Hand derivations from those relations; the summary made
as ``evaluate_project`` judges each case equals the one made again from the checks afterwards."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from engine_air.envelope.checks import AT_LEAST, AT_MOST, YES_NO, Check, _check
from engine_air.envelope.evaluate import evaluate_project, summarise
from engine_air.envelope.ranking import FAIL_OFFSET, check_rank, limiting_map
from engine_air.project import load_project
from engine_air.project.model import Grid

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
SAMPLE_FILES = sorted(SAMPLES.glob("*.toml")) + sorted(SAMPLES.glob("*/*.toml"))


def test_face_mach_rule_by_hand():
    # M2 <= 0.55: margin = 0.55 - M2, relative = margin / 0.55; the last point choked (forced to fail, at most -1)
    m2 = np.array([0.50, 0.60, np.nan, 0.50])
    chk = _check("face-mach", "Face Mach number", "M2 <= 0.55", m2, 0.55, AT_MOST, 0.55, np.ones(4, bool),
                 forced_fail=np.array([False, False, False, True]))
    assert chk.applies.tolist() == [True, True, False, True]  # NaN margin: not judged
    margin = chk.margin
    assert margin[0] == 0.55 - 0.50 and margin[1] == 0.55 - 0.60 and margin[3] == 0.55 - 0.50
    rel = chk.relative_margin
    assert rel[0] == (0.55 - 0.50) / 0.55 and rel[1] == (0.55 - 0.60) / 0.55
    assert np.isnan(rel[2]) and rel[3] == -1.0  # choked: min(relative margin, -1)
    assert chk.fails.tolist() == [False, True, False, True]
    # the ranking reads both from one margin: the same values
    r, f = chk.relative_and_fails()
    np.testing.assert_array_equal(r, rel)
    np.testing.assert_array_equal(f, chk.fails)
    assert check_rank(chk)[1] == (0.55 - 0.60) / 0.55 - FAIL_OFFSET


def test_at_least_and_yes_no_rules_by_hand():
    # pi >= 0.9: margin = pi - 0.9; a margin far beyond the limit is held at 1e12 in relative terms
    pi = np.array([0.95, 0.85])
    chk = _check("recovery", "Total-pressure recovery", "pi >= 0.9", pi, 0.9, AT_LEAST, 0.9, True)
    assert chk.margin.tolist() == [0.95 - 0.9, 0.85 - 0.9] and chk.fails.tolist() == [False, True]
    tiny = _check("recovery", "Total-pressure recovery", "pi >= 5e-324", pi, 5e-324, AT_LEAST, 5e-324, True)
    assert tiny.relative_margin.tolist() == [1e12, 1e12]
    # started: +1 where it holds (value 1), -1 where it fails (value 0)
    started = _check("started", "Inlet started", "started", np.array([1.0, 0.0]), None, YES_NO, 1.0, True)
    assert started.margin.tolist() == [1.0, -1.0] and started.fails.tolist() == [False, True]


def test_given_arrays_are_kept_as_given_and_one_point_reads_the_same_bits():
    rel = np.array([0.5, -0.1, 0.2])
    hand = Check("a", "A", "", np.zeros(3), rel, rel, np.array([True, True, False]), np.array([False, True, False]))
    assert hand.margin is rel and hand.relative_margin is rel
    chk = _check("throat-mach", "Throat Mach", "M_th <= 0.9", np.linspace(0.3, 1.0, 12).reshape(3, 4), 0.9, AT_MOST,
                 0.9, np.ones((3, 4), bool), forced_fail=np.eye(3, 4, dtype=bool))
    one = chk.at((1, 2))
    for name in ("value", "margin", "relative_margin", "applies", "fails"):
        assert np.asarray(getattr(one, name)).tobytes() == np.asarray(getattr(chk, name))[1, 2].tobytes(), name


@pytest.mark.parametrize("path", SAMPLE_FILES, ids=lambda p: p.stem)
def test_summary_made_while_judging_equals_the_summary_made_again(path):
    project = load_project(path)
    project = dataclasses.replace(project, grid=Grid(mach_points=41, altitude_points=31))
    result = evaluate_project(project)
    again = summarise(result)
    assert [dataclasses.astuple(s) for s in result.summary] == pytest.approx(
        [dataclasses.astuple(s) for s in again], nan_ok=True, rel=0, abs=0)
    # nothing is cached on a check by reading it: it keeps the value, where it applies and its rule
    for case in [c.name for c in result.cases]:
        limiting_map(result, case)
        result.failing(case)
    for cm in result.cases:
        for chk in cm.points.checks:
            kept = chk.arrays()
            assert kept["_margin"] is None and kept["_relative"] is None and kept["_fails"] is None
