"""The one registry of quantities, the one table writer, the one ranking and the safe terminal text."""

from __future__ import annotations

import csv
import gzip
import math
import re
from pathlib import Path

import numpy as np
import pytest

from engine_air.envelope import ranking
from engine_air.envelope.checks import Check
from engine_air.envelope.evaluate import WORST, evaluate_project
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.outputs.quantities import JSON_KEYS, QUANTITIES, REGISTRY, TABLE_KEYS
from engine_air.outputs.safe_text import safe_path, safe_text
from engine_air.outputs.table import point_table_columns, write_table
from engine_air.project.toml_file import load_project

ROOT = Path(__file__).resolve().parents[1]
SAMPLES = ROOT / "sample_projects"
RAMP = SAMPLES / "supersonic_two_ramp.toml"
FAILING = SAMPLES / "undersized_business_jet.toml"


def coarse(path, n=21, m=16):
    from dataclasses import replace

    from engine_air.project.model import Grid

    return replace(load_project(path), grid=Grid(mach_points=n, altitude_points=m))


# -- registry ----------------------------------------------------------------------------------------------

def test_every_golden_column_is_in_the_registry_table():
    with gzip.open(ROOT / "tests" / "golden" / "supersonic_two_ramp.csv.gz", "rt", encoding="utf-8") as f:
        golden = next(csv.reader(f))
    assert set(golden) <= set(point_table_columns())
    assert golden == point_table_columns()[: len(golden)]  # the historic columns keep their order


def test_every_quantity_is_an_attribute_of_the_points():
    p = coarse(RAMP)
    pts = evaluate_conditions(p, p.cases[0], np.array([0.5, 1.5, 2.0]), np.array([1000.0, 9000.0, 12000.0]))
    for key in REGISTRY:
        assert np.shape(REGISTRY[key].values(pts)) == (3,), key
    assert set(QUANTITIES) <= set(REGISTRY) and set(TABLE_KEYS) <= set(REGISTRY) and set(JSON_KEYS) <= set(REGISTRY)
    assert all(q.kind in ("level", "margin") for q in REGISTRY.values())


def test_every_map_quantity_maps_for_every_case_and_worst():
    p = coarse(RAMP)
    result = evaluate_project(p)
    for key in QUANTITIES:
        for case in [c.name for c in result.cases] + [WORST]:
            assert result.quantity(case, key).shape == result.inside.shape


@pytest.mark.parametrize("key, si, us", [
    ("altitude_m", 0.3048, 1.0),  # international foot, exact
    ("static_pressure_pa", 6894.757293168361, 1.0),  # 1 lbf/in^2 (NIST SP 811)
    ("static_temperature_k", 5.0 / 9.0, 1.0),  # 1 degree Rankine = 5/9 K
    ("mass_flow_kg_s", 0.45359237, 1.0),  # 1 lbm, exact
    ("additive_drag_n", 4.4482216152605, 1.0),  # 1 lbf, exact
    ("velocity_m_s", 0.3048, 1.0),
    ("density_kg_m3", 515.378818, 1.0),  # 1 slug/ft^3 (NIST SP 811: 515.3788 kg/m^3)
])
def test_us_conversions_against_published_factors(key, si, us):
    assert REGISTRY[key].to_us(si) == pytest.approx(us, rel=1e-6)


# -- worst relative margin and ranking -----------------------------------------------------------------------

def _check(name, rel, applies, fails):
    rel = np.asarray(rel, float)
    return Check(name, name, "", rel, rel, rel, np.asarray(applies, bool), np.asarray(fails, bool))


def test_worst_relative_margin_by_hand():
    a = _check("a", [0.5, -0.1, 0.2, 0.3], [True, True, False, False], [False, True, False, False])
    b = _check("b", [0.2, 0.4, 0.1, 0.3], [True, True, True, False], [False, False, False, False])
    got = ranking.worst_relative_margin([a, b], (4,))
    assert got[:3].tolist() == [0.2, -0.1, 0.1] and math.isnan(got[3])
    assert ranking.limiting_index([a, b], (4,)).tolist() == [1, 0, 1, -1]


def test_ranking_equals_a_point_by_point_search():
    p = coarse(FAILING)
    result = evaluate_project(p)
    pts = result.cases[0].points
    lim = ranking.limiting_index(pts.checks, pts.mach.shape)
    wrm = pts.worst_relative_margin
    for idx in np.ndindex(pts.mach.shape):
        judged = [(c.relative_margin[idx], k) for k, c in enumerate(pts.checks) if c.applies[idx]]
        if not judged:
            assert lim[idx] == -1 and math.isnan(wrm[idx])
            continue
        best = min(judged)
        assert wrm[idx] == best[0]
        assert pts.checks[lim[idx]].relative_margin[idx] == best[0]
    # the worst point over the map: least relative margin of any judged check inside the envelope
    w = ranking.worst_point([c.points for c in result.cases], result.inside)
    brute = min((float(c.relative_margin[i]), n) for n, cm in enumerate(result.cases) for c in cm.points.checks
                for i in np.ndindex(result.inside.shape) if c.applies[i] and result.inside[i])
    assert float(result.cases[w.case].points.checks[w.check].relative_margin[w.index]) == brute[0]


def test_worst_relative_margin_nan_outside_the_atmosphere_with_its_flag():
    from engine_air.envelope import flags as F

    p = coarse(RAMP)
    pts = evaluate_conditions(p, p.cases[0], np.array([1.0, 1.0]), np.array([5000.0, 90000.0]))
    wrm = pts.worst_relative_margin
    assert math.isfinite(wrm[0]) and math.isnan(wrm[1])
    assert pts.flags[1] & F.OUTSIDE_ATMOSPHERE


def test_nearest_index():
    assert ranking.nearest_index([0.2, 0.4, 0.6], [0.0, 500.0, 1000.0], 0.49, 760.0) == (2, 1)


# -- table writer ----------------------------------------------------------------------------------------------

def test_floats_round_trip_exactly(tmp_path):
    rng = np.random.default_rng(1)
    x = np.concatenate([rng.standard_normal(5000) * 10.0 ** rng.integers(-300, 300, 5000),
                        [0.1, 1 / 3, 2 / 3, 5e-324, 2.2250738585072014e-308, 1.7976931348623157e308, -0.0, 100.0,
                         np.nan, np.inf, -np.inf]])
    out = tmp_path / "t.csv"
    write_table({"x": x, "k": np.arange(x.size)}, out)
    with open(out, newline="") as fh:
        rows = list(csv.DictReader(fh))
    back = np.array([float(r["x"]) if r["x"] else np.nan for r in rows])
    finite = np.isfinite(x)
    assert np.array_equal(back[finite], x[finite])  # exact, bit for bit
    assert all(r["x"] == "" for r, f in zip(rows, finite) if not f)  # non-finite: empty cell
    assert [int(r["k"]) for r in rows] == list(range(x.size))


@pytest.mark.parametrize("lead", ["=", "+", "-", "@", "\t", "\r"])
def test_formula_cells_are_neutralised_numbers_are_not(tmp_path, lead):
    out = tmp_path / "t.csv"
    text = f"{lead}HYPERLINK(\"http://x\",\"y\"), cmd|' /C calc'!A0"
    write_table({"case": [text, "plain", "a,b"], "v": np.array([-1.5, -2.0, 3.0])}, out)
    with open(out, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert rows[0]["case"] == "'" + text and rows[1]["case"] == "plain" and rows[2]["case"] == "a,b"
    assert [r["v"] for r in rows] == ["-1.5", "-2.0", "3.0"]  # never quoted; floats as Python's repr writes them


def test_parquet_round_trip(tmp_path):
    import pyarrow.parquet as pq

    x = np.array([0.1, np.nan, 1e300, -2.0])
    write_table({"case": ["=a", "b", "c", "d"], "x": x}, tmp_path / "t.parquet", "parquet")
    t = pq.read_table(tmp_path / "t.parquet")
    assert t.column("case").to_pylist() == ["'=a", "b", "c", "d"]
    assert t.column("x").to_pylist() == [0.1, None, 1e300, -2.0]


# -- mechanism per finding ------------------------------------------------------------------------------------

def test_each_finding_has_its_own_mechanism():
    from engine_air.envelope.explain import finding_mechanism

    p = coarse(FAILING, 41, 31)
    result = evaluate_project(p)
    texts = [finding_mechanism(p, result, s)[2] for s in result.summary if s.worst_case]
    assert len(texts) >= 2 and len(set(texts)) == len(texts)
    for s in result.summary:
        regime, flags, why = finding_mechanism(p, result, s)
        if s.name == "face-mach":
            assert "W_c2/A2" in why
        if s.name == "throat-mach":
            assert "A_th" in why


# -- safe terminal text ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("raw, shown", [
    ("ISA\x1b[2J", "ISA\\x1b[2J"),
    ("a\nVERDICT: all hold", "a\\x0aVERDICT: all hold"),
    ("x\u202egnp.exe", "x\\u202egnp.exe"),
    ("\u2066iso\u2069", "\\u2066iso\\u2069"),
    ("tab\there", "tab\\x09here"),
    ("\x9b31m", "\\x9b31m"),
    ("plain ISA+15, max (°R)", "plain ISA+15, max (°R)"),
])
def test_safe_text(raw, shown):
    assert safe_text(raw) == shown
    assert not re.search(r"[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]", safe_text(raw))


def test_safe_path_shows_non_utf8_bytes():
    import os

    assert safe_path(os.fsdecode(b"/tmp/a\xffb.toml")) == "/tmp/a\\xffb.toml"
    assert safe_path(b"/tmp/a\xffb.toml") == "/tmp/a\\xffb.toml"


def test_limiting_map_names_the_check_of_the_least_margin():
    p = coarse(FAILING, 41, 31)
    result = evaluate_project(p)
    for case in [c.name for c in result.cases] + [WORST]:
        margin, index, names, labels = ranking.limiting_map(result, case)
        q = result.quantity(case, "worst_relative_margin")
        assert np.array_equal(np.isnan(margin), np.isnan(q))
        assert np.allclose(margin[np.isfinite(margin)], q[np.isfinite(q)])
        assert np.all((index >= 0) == np.isfinite(margin))
        # the named check's relative margin is the least margin, in the case that limits the point
        cm = result.cases[0] if case == WORST else result.case_map(case)
        if case != WORST:
            for i, j in zip(*np.nonzero(index >= 0)):
                assert cm.points.checks[index[i, j]].relative_margin[i, j] == margin[i, j]
        assert set(names) == {c.name for c in cm.points.checks} and len(labels) == len(names)


def test_map_table_judged_column():
    from engine_air.outputs.table import point_table

    p = coarse(RAMP)
    result = evaluate_project(p)
    t = point_table(result)
    judged = np.asarray(t.column("judged").to_numpy(zero_copy_only=False))
    inside = np.asarray(t.column("inside_envelope").to_numpy(zero_copy_only=False))
    assert np.array_equal(judged, inside)  # inside the atmosphere every inside point has a judged check
    assert judged.sum() == result.inside.sum() * len(result.cases)


def test_detail_panel_shows_rounding_noise_as_zero():
    # 1 - MFR at MFR = 1 can come out as 1.1e-16 in floating point; shown rounded to the display precision, it is 0.
    pytest.importorskip("PySide6")
    from app.views.detail_panel import fmt

    assert fmt(1.1102230246251565e-16) == "0" and fmt(-2e-13) == "0" and fmt(0.0) == "0"
    assert fmt(2.5e-4) == "2.500e-04" and fmt(0.3125) == "0.3125"  # real small values keep their digits
