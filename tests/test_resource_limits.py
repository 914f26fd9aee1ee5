"""Resource limits: grid sizes and case counts are checked before anything is allocated, with a clear message.

The loader caps a grid at ``MAX_AXIS_POINTS`` (1001) per axis and ``MAX_GRID_POINTS`` (250 000) per case, the
number of cases at ``MAX_CASES`` (100) and cases x grid points at ``MAX_CASE_POINTS`` (2 000 000). A Project built
in code skips the loader, so ``evaluate_project`` applies the same grid rules itself before building the grid.
Peak memory of the largest map is measured by ``bench/memory_largest_map.py``; here only a cheap guard.
"""

from __future__ import annotations

import tracemalloc
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from engine_air.envelope import evaluate as ev
from engine_air.project import toml_file as pf
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import check_grid_size, evaluate_project
from engine_air.project.model import Case, Grid

SAMPLES = Path(__file__).resolve().parent.parent / "sample_projects"
PROJECT = pf.load_project(SAMPLES / "supersonic_two_ramp.toml")


def test_documented_limits():
    assert pf.MAX_AXIS_POINTS == 1001 and pf.MIN_AXIS_POINTS == 2
    assert pf.MAX_GRID_POINTS == 250_000
    assert pf.MAX_CASES == 100 and pf.MAX_CASE_POINTS == 2_000_000
    assert pf.MAX_FILE_BYTES == 1_048_576 and pf.MAX_ENVELOPE_VERTICES == 1000 and pf.MAX_KEY_PARTS == 64


@pytest.fixture
def no_allocation(monkeypatch):
    """Fail the test if evaluate_project gets as far as building the grid."""
    def refuse(*args, **kwargs):
        raise AssertionError("the grid was built before its size was checked")

    monkeypatch.setattr(ev, "grid_axes", refuse)
    monkeypatch.setattr(ev, "envelope_mask", refuse)
    monkeypatch.setattr(ev, "run_chain", refuse)  # the chain of stages, run per case


@pytest.mark.parametrize("grid, key, allowed", [
    (Grid(1001, 1001), "grid", "at most 250000 per case"),
    (Grid(501, 500), "grid", "at most 250000 per case"),
    (Grid(10**9, 10**9), "grid.mach_points", "from 2 to 1001"),
    (Grid(2, 10**9), "grid.altitude_points", "from 2 to 1001"),
    (Grid(-1, 5), "grid.mach_points", "from 2 to 1001"),
    (Grid(0, 5), "grid.mach_points", "from 2 to 1001"),
    (Grid(1, 5), "grid.mach_points", "from 2 to 1001"),
    (Grid(True, 5), "grid.mach_points", "whole number"),
    (Grid(5, np.bool_(True)), "grid.altitude_points", "whole number"),
    (Grid(100.0, 5), "grid.mach_points", "whole number"),
    (Grid(5, 2.5), "grid.altitude_points", "whole number"),
    (Grid("121", 5), "grid.mach_points", "whole number"),
    (Grid(None, 5), "grid.mach_points", "whole number"),
])
def test_evaluate_project_refuses_oversize_grid_before_allocating(grid, key, allowed, no_allocation):
    project = replace(PROJECT, grid=grid)
    tracemalloc.start()
    try:
        with pytest.raises(ProjectError) as info:
            evaluate_project(project)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    err = info.value
    assert isinstance(err, ValueError)  # callers may catch either
    assert err.key == key and allowed in err.allowed
    assert "\n" not in str(err) and key in str(err)
    assert peak < 1_000_000  # nothing of the grid's size was allocated


def test_evaluate_project_refuses_too_many_case_points(no_allocation):
    cases = tuple(Case(f"case {i}", PROJECT.ratings[0].name, float(i)) for i in range(9))
    project = replace(PROJECT, grid=Grid(500, 500), cases=cases)
    with pytest.raises(ProjectError) as info:
        evaluate_project(project)
    assert info.value.key == "case" and "2250000 case-points" in info.value.allowed
    assert "at most 2000000" in info.value.allowed
    # the chosen cases count, not the project's: 8 of them fit (checked without evaluating)
    check_grid_size(project, n_cases=8)
    with pytest.raises(ProjectError):
        check_grid_size(project)


def test_largest_allowed_grid_passes_the_check():
    check_grid_size(replace(PROJECT, grid=Grid(500, 500)), n_cases=8)
    check_grid_size(replace(PROJECT, grid=Grid(1001, 249)), n_cases=1)
    check_grid_size(replace(PROJECT, grid=Grid(np.int64(2), np.int32(2))), n_cases=1)


def test_unknown_case_name_still_a_key_error():
    with pytest.raises(KeyError):
        evaluate_project(replace(PROJECT, grid=Grid(5, 5)), case_names=["no such case"])


def test_loader_refuses_the_same_grids(tmp_path):
    text = (SAMPLES / "supersonic_two_ramp.toml").read_text(encoding="utf-8")
    for nx, ny in ((1002, 2), (1001, 1001), (501, 500)):
        path = tmp_path / "big.toml"
        path.write_text(text.replace("mach_points = 121", f"mach_points = {nx}")
                        .replace("altitude_points = 101", f"altitude_points = {ny}"), encoding="utf-8")
        with pytest.raises(ProjectError) as info:
            pf.load_project(path)
        assert info.value.key in ("grid", "grid.mach_points")


def test_peak_memory_per_case_point_is_bounded():
    # Guard against a regression of the memory figures of bench/memory_largest_map.py (about 350 bytes per
    # case-point at the peak, 260 kept): 200 x 100 points, 2 cases, peak well under 1000 bytes per case-point.
    project = replace(PROJECT, grid=Grid(200, 100))
    evaluate_project(replace(project, grid=Grid(3, 3)))  # warm caches
    tracemalloc.start()
    try:
        result = evaluate_project(project)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    case_points = 200 * 100 * len(result.cases)
    assert peak / case_points < 1000, peak / case_points
