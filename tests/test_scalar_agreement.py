"""The vectorised match (engine_air.evaluate_conditions) against the independent per-point scalar
implementation in bench/scalar_model.py, on every sample project, at random envelope points."""

from __future__ import annotations

import math
import pathlib
import sys

import numpy as np
import pytest

ROOT = pathlib.Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

import scalar_model  # noqa: E402

from engine_air.envelope import flags as F  # noqa: E402
from engine_air.envelope.polygon import envelope_mask  # noqa: E402
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.flow.match import REGIMES  # noqa: E402
from engine_air.project import load_project  # noqa: E402



def _fixed_geometry_without_airflow_management(path) -> bool:
    """The scalar model reads a throat schedule but not the other schedules, bleed, bypass and auxiliary doors
    (method section 12), case regions or corrected tip speed: samples using them are checked in test_airflow.py,
    test_schedule.py and test_case_regions.py instead."""
    p = load_project(path)
    i = p.inlet
    s = i.schedule
    only_throat = s is None or (s.shock_on_lip_mach is None and s.ramp_angles_deg is None and s.bleed_fraction is None)
    return (only_throat and i.bleed_fraction == 0.0 and i.bypass_area_m2 == 0.0
            and i.auxiliary_inlet_area_m2 == 0.0 and all(r.corrected_tip_speed_m_s is None for r in p.ratings)
            and all(c.mach_range is None and c.altitude_range_m is None for c in p.cases))


SAMPLES = [p for p in sorted((ROOT / "sample_projects").glob("*.toml")) if _fixed_geometry_without_airflow_management(p)]
N_POINTS = 200
RTOL = 1e-6
# Absolute floors for quantities that pass through zero (spillage at MFR = 1, drag at A0 = A_c).
ATOL = {"additive_drag_n": 1e-6, "additive_drag_coefficient": 1e-9, "spillage_drag_coefficient": 1e-9,
        "spillage_fraction": 1e-12}


def _random_envelope_points(project, n, seed):
    rng = np.random.default_rng(seed)
    env = project.envelope
    m_lo, m_hi = min(env.mach), max(env.mach)
    h_lo, h_hi = min(env.altitude_m), max(env.altitude_m)
    mach, alt = [], []
    while len(mach) < n:
        m = rng.uniform(m_lo, m_hi, 4 * n)
        h = rng.uniform(h_lo, h_hi, 4 * n)
        keep = envelope_mask(env, m, h)
        mach.extend(m[keep].tolist())
        alt.extend(h[keep].tolist())
    return np.array(mach[:n]), np.array(alt[:n])


@pytest.mark.parametrize("path", SAMPLES or [None], ids=[p.stem for p in SAMPLES] or ["no-samples"])
def test_vectorised_agrees_with_scalar(path):
    if path is None:
        pytest.skip("no sample projects in sample_projects/")
    project = load_project(path)
    if project.inlet.type not in scalar_model.SUPPORTED_TYPES:
        pytest.skip(f"the scalar model has no {project.inlet.type} inlet (tested against pygasflow in its own tests)")
    mach, alt = _random_envelope_points(project, N_POINTS, seed=sum(map(ord, path.stem)))
    compared = 0
    for case in project.cases:
        pts = evaluate_conditions(project, case, mach, alt)
        for i in range(N_POINTS):
            ref = scalar_model.evaluate_point(project, case, mach[i], alt[i])
            where = f"{path.stem} / {case.name} at M {mach[i]:.4f}, H {alt[i]:.1f} m"
            for key in scalar_model._KEYS:
                got, want = float(getattr(pts, key)[i]), ref[key]
                if math.isnan(want):
                    assert math.isnan(got), f"{key}: vectorised {got}, scalar NaN; {where}"
                    continue
                assert got == pytest.approx(want, rel=RTOL, abs=ATOL.get(key, 0.0)), f"{key}; {where}"
                compared += 1
            assert set(F.names_of(pts.flags[i])) - {"ok"} == ref["flags"], where
            assert REGIMES[int(pts.regime[i])] == ref["regime"], where
    assert compared >= 10 * N_POINTS * len(project.cases)  # most quantities are finite at most points


def test_scalar_model_special_points():
    # Low speed, supersonic and outside-atmosphere points on every sample, against the vectorised chain.
    if not SAMPLES:
        pytest.skip("no sample projects in sample_projects/")
    mach = np.array([0.0, 0.03, 0.3, 0.9, 1.0, 1.2, 1.6, 2.0, 2.2, 0.5])
    alt = np.array([0.0, 500.0, 2000.0, 9000.0, 11000.0, 11000.0, 14000.0, 15000.0, 18000.0, 86000.0])
    for path in SAMPLES:
        project = load_project(path)
        if project.inlet.type not in scalar_model.SUPPORTED_TYPES:
            continue
        for case in project.cases:
            pts = evaluate_conditions(project, case, mach, alt)
            for i in range(mach.size):
                ref = scalar_model.evaluate_point(project, case, mach[i], alt[i])
                for key in scalar_model._KEYS:
                    got, want = float(getattr(pts, key)[i]), ref[key]
                    if math.isnan(want):
                        assert math.isnan(got), (path.stem, key, mach[i], alt[i])
                    else:
                        assert got == pytest.approx(want, rel=RTOL, abs=ATOL.get(key, 0.0)), (path.stem, key, i)
                assert set(F.names_of(pts.flags[i])) - {"ok"} == ref["flags"], (path.stem, i)
