"""The shortcuts a map takes give the same bits as the plain point-by-point path.

A map's Mach numbers are a row and its altitudes a column, so the chain solves the quantities of the Mach number
alone once per column (the shock system, the ramp trace, the supersonic pre-entry drag on the supersonic columns
only), the envelope mask is tested row by row, and the limiting check is found by a loop over the checks. Each
shortcut must give exactly what the same relations give point by point: here the same conditions are evaluated
as a row and a column, as two full arrays (``numpy.broadcast_arrays`` and ``numpy.meshgrid`` copies) and as one
flat list of points, and every quantity, check and limiting index is compared bit for bit (NaN equal to NaN).
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from engine_air.envelope.conditions import evaluate_conditions
from engine_air.envelope.polygon import grid_axes
from engine_air.envelope.ranking import limiting_index, worst_relative_margin
from engine_air.flow.chain import own_axes
from engine_air.flow.points import OperatingPoints
from engine_air.project import load_project
from engine_air.project.model import Grid
from engine_air.project.polygon import polygon_contains

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PROPERTIES = ("mass_flow_ratio", "spillage_fraction", "additive_drag_coefficient", "spillage_drag_coefficient",
              "face_static_to_ambient", "recovery_minus_reference")


def _arrays(points, shape):
    out = {}
    for f in dataclasses.fields(OperatingPoints):
        v = getattr(points, f.name)
        if v is not None:
            lead = np.shape(v)[:1] if f.name.startswith("ramp_") else ()
            out[f.name] = np.broadcast_to(v, lead + shape).reshape(lead + (int(np.prod(shape)),))
    for name in PROPERTIES:
        out[name] = np.broadcast_to(getattr(points, name), shape).reshape(-1)
    for c in points.checks:
        for k in ("margin", "relative_margin", "applies", "fails"):
            out[f"{c.name}.{k}"] = np.broadcast_to(getattr(c, k), shape).reshape(-1)
    out["limiting"] = np.broadcast_to(points.limiting, shape).reshape(-1)
    return out


@pytest.mark.parametrize("sample", ["supersonic_two_ramp", "supersonic_spike_nacelle",
                                    "mixed_compression_throat_schedule", "undersized_business_jet"])
def test_row_and_column_equal_full_arrays_and_single_points(sample):
    project = load_project(SAMPLES / f"{sample}.toml")
    project = dataclasses.replace(project, grid=Grid(mach_points=37, altitude_points=23))
    mach, alt = grid_axes(project.envelope, project.grid)
    shape = (alt.size, mach.size)
    m2, a2 = np.meshgrid(mach, alt)
    for case in project.cases:
        ref = _arrays(evaluate_conditions(project, case, m2.ravel(), a2.ravel()), (m2.size,))  # point by point
        for m, h in [(mach[None, :], alt[:, None]), np.broadcast_arrays(mach[None, :], alt[:, None]), (m2, a2)]:
            now = _arrays(evaluate_conditions(project, case, m, h), shape)
            for key, value in ref.items():
                assert np.array_equal(now[key], value, equal_nan=True), (sample, case.name, key)


def test_own_axes_keeps_the_shape():
    m, h = own_axes(*np.meshgrid([0.5, 2.0, 3.0], [0.0, 1e4]))
    assert (m.shape, h.shape) == ((1, 3), (2, 1))
    m, h = own_axes(np.array([0.5, 0.6]), np.array([0.0, 1.0]))  # scattered points: nothing to reduce
    assert (m.shape, h.shape) == ((2,), (2,))
    m, h = own_axes(np.ones((2, 3)), np.ones((2, 3)))  # both constant: the shape is kept
    assert np.broadcast_shapes(m.shape, h.shape) == (2, 3)


def test_grid_envelope_mask_equals_the_point_test():
    rng = np.random.default_rng(7)
    for trial in range(200):
        k = int(rng.integers(3, 9))
        pm, pa = rng.uniform(0.0, 3.0, k), rng.uniform(-1000.0, 20000.0, k)
        if trial % 3 == 0:  # vertices on grid lines: points on edges and vertices
            pm, pa = np.round(pm, 1), np.round(pa, -3)
        x = np.linspace(pm.min() - 0.1 * (trial % 2), pm.max(), int(rng.integers(2, 40)))
        y = np.linspace(pa.min(), pa.max(), int(rng.integers(2, 40)))
        gx, gy = np.meshgrid(x, y)
        assert np.array_equal(polygon_contains(pm, pa, x[None, :], y[:, None]), polygon_contains(pm, pa, gx, gy))


def test_limiting_index_follows_argmin():
    from engine_air.envelope.checks import Check

    rng = np.random.default_rng(3)
    for trial in range(100):
        n, shape = int(rng.integers(1, 5)), (7, 5)
        checks = []
        for _ in range(n):
            rel = rng.choice([0.0, -0.0, 0.3, -0.2, 1.0], size=shape)
            applies = rng.random(shape) < 0.8
            checks.append(Check("c", "C", "", rel, rel, rel, applies, applies & (rel < 0.0)))
        ranks = np.stack([np.where(c.applies, np.where(c.fails, np.minimum(c.relative_margin, 0.0) - 1e6,
                                                       c.relative_margin), np.inf) for c in checks])
        expected = np.where(np.isposinf(ranks.min(axis=0)), -1, ranks.argmin(axis=0))
        assert np.array_equal(limiting_index(checks, shape), expected)
        wrm = worst_relative_margin(checks, shape)
        picked = np.take_along_axis(np.stack([c.relative_margin for c in checks]), ranks.argmin(axis=0)[None], 0)[0]
        assert np.array_equal(wrm, np.where(expected < 0, np.nan, picked), equal_nan=True)
