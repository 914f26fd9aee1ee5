"""Sweeps, comparisons, sizing and the review pack of a project with a characteristics table (method §17).

A project's table is read at load time into ``Project.characteristics``; the project file only names it. Every
study that rebuilds or ships the project (the sweep's workers get its TOML text) must keep the data attached, so
that each variant is evaluated on the data where they cover, exactly as the single-map evaluation of that variant.

References: the single-map evaluation of each variant (``evaluate_project``, itself tested against the data by
hand in tests/test_data_over_model.py); the §17 interpolation done by hand on the table's own rows at a tested
Mach number (a curve is piecewise linear in MFR below its critical point, method §17); continuity
MFR = W/(ρ0·V0·A_c) (method §5); the model alone (``characteristics`` removed) where the data do not cover.
"""

from __future__ import annotations

import dataclasses
import math
import pathlib
import shutil

import numpy as np
import pytest

from engine_air import evaluate_conditions
from engine_air.cli import main
from engine_air.envelope.evaluate import WORST, evaluate_project
from engine_air.envelope.worst import worst_point
from engine_air.flow import flags as F
from engine_air.project import dumps_project, load_project
from engine_air.project.model import Grid
from engine_air.studies.compare import compare_projects
from engine_air.studies.sizing import with_design_values, worst_margin
from engine_air.studies.sweep import run_chunk, sweep

SAMPLES = pathlib.Path(__file__).resolve().parents[1] / "sample_projects"
DATA = SAMPLES / "tunnel_data" / "two_ramp_with_tunnel_data.toml"
MODEL = SAMPLES / "supersonic_two_ramp.toml"
VARY = {"capture_area_m2": [0.50, 0.55, 0.60], "duct_loss_coefficient": [0.02, 0.06]}


@pytest.fixture(scope="module")
def small():
    """The data sample on a coarse grid (sweeps stay fast); its table read at load time."""
    p = load_project(DATA)
    assert p.characteristics is not None
    return dataclasses.replace(p, grid=Grid(mach_points=25, altitude_points=21))


def rows_repr(result):
    return [repr(r) for r in result.rows]  # NaN-safe exact comparison of every field


def _from_data(result) -> int:
    return sum(int(np.count_nonzero((np.asarray(cm.points.flags) & F.FROM_DATA) != 0)) for cm in result.cases)


def _branch(project, mach):
    """The tested curve at ``mach`` (zero incidence) by hand from the table's rows: its subcritical branch closed
    by the critical point (largest MFR; the highest recovery within 0.5 % of it), method §17."""
    t = project.characteristics.table
    sel = (t.column("mach") == mach) & (t.column("alpha_deg") == 0.0)
    x, y = t.column("mass_flow_ratio")[sel], t.column("recovery")[sel]
    crit = x.max()
    band = x >= 0.995 * crit
    bx, by = np.append(x[~band], crit), np.append(y[~band], y[band].max())
    order = np.argsort(bx)
    return bx[order], by[order], crit


def test_sweep_of_a_data_project_equals_each_variant_evaluated_directly(small):
    r = sweep(small, VARY, workers=1)
    assert r.mode == "in-process" and r.shape == (3, 2)
    margins_model = []
    for row in r.rows:
        variant = with_design_values(small, dict(zip(r.variables, row.values)))
        assert variant.characteristics is small.characteristics  # an edit keeps the data attached
        direct = evaluate_project(variant)
        assert _from_data(direct) > 0
        w = worst_point(direct)
        assert row.verdict == ("holds" if direct.holds else "fails")
        assert row.worst_relative_margin == w.relative_margin
        assert (row.worst_check, row.worst_case, row.worst_mach, row.worst_altitude_m) == \
            (w.check, w.case, w.mach, w.altitude_m)
        assert set(row.failing_limits) == {s.name for s in direct.summary if s.fails}
        margins_model.append(worst_point(evaluate_project(dataclasses.replace(variant, characteristics=None)))
                             .relative_margin)
    # the data matter here: the model alone gives other margins, so the rows above did use the table
    assert any(m != row.worst_relative_margin for m, row in zip(margins_model, r.rows))


def test_a_swept_capture_area_moves_the_operating_point_along_the_tested_curve(small):
    """At Mach 1.7 (a tested curve) every capture area's point lies on the table's branch by hand (§17) and obeys
    continuity (§5); a larger capture area asks a smaller MFR of the same curve."""
    case = small.cases[0]
    x, y, crit = _branch(small, 1.7)
    mfrs = []
    for area in VARY["capture_area_m2"]:
        variant = with_design_values(small, {"capture_area_m2": area})
        p = evaluate_conditions(variant, case, np.array([1.7]), np.array([11000.0]))
        assert F.has(p.flags, F.FROM_DATA)[0]
        mfr, rec = float(p.mass_flow_ratio[0]), float(p.recovery[0])
        if mfr < 0.995 * crit:
            assert rec == pytest.approx(np.interp(mfr, x, y), abs=1e-9)
        else:
            assert mfr == pytest.approx(crit)
        capture_flow = float(p.density_kg_m3[0] * p.velocity_m_s[0]) * area
        assert mfr == pytest.approx(float(p.mass_flow_kg_s[0]) / capture_flow, rel=1e-9)
        mfrs.append(mfr)
    assert mfrs[0] > mfrs[1] > mfrs[2]


def test_a_chunk_rebuilt_from_toml_text_gets_the_data_back(small):
    """The text names the table only; the worker gets the curves beside it (without them: the model alone)."""
    text = dumps_project(small)
    chunk = [((0,), (0.55,))]
    cruise = (1.7, 11000.0, small.cases[0].name)  # on a tested curve: the data decide the spillage there
    with_data = run_chunk(text, ("capture_area_m2",), chunk, cruise, characteristics=small.characteristics)[0]
    without = run_chunk(text, ("capture_area_m2",), chunk, cruise)[0]
    model_project = dataclasses.replace(small, characteristics=None)
    for row, project in ((with_data, small), (without, model_project)):
        assert row.worst_relative_margin == worst_point(evaluate_project(project)).relative_margin
        point = evaluate_conditions(project, small.cases[0], np.array([1.7]), np.array([11000.0]))
        assert row.cruise_spillage_fraction == float(point.spillage_fraction[0])
    assert with_data.cruise_spillage_fraction != without.cruise_spillage_fraction


CRUISE = (1.7, 11000.0, None)  # on a tested curve (first case, zero incidence): the data decide the spillage


def _check_cruise_from_data(small, result):
    """Each row's cruise spillage is the variant's own point on the data (and not the model's)."""
    for row in result.rows:
        variant = with_design_values(small, dict(zip(result.variables, row.values)))
        m, h = np.array([CRUISE[0]]), np.array([CRUISE[1]])
        point = evaluate_conditions(variant, variant.cases[0], m, h)
        assert F.has(point.flags, F.FROM_DATA)[0]
        assert row.cruise_spillage_fraction == float(point.spillage_fraction[0])


def test_local_processes_carry_the_data(small):
    one = sweep(small, {"capture_area_m2": VARY["capture_area_m2"]}, workers=1, cruise=CRUISE)
    many = sweep(small, {"capture_area_m2": VARY["capture_area_m2"]}, workers=2, chunk_size=1, cruise=CRUISE)
    assert many.mode == "local" and rows_repr(many) == rows_repr(one)
    _check_cruise_from_data(small, many)


def test_dask_workers_carry_the_data(small):
    distributed = pytest.importorskip("distributed")
    v = {"capture_area_m2": VARY["capture_area_m2"][:2]}
    local = sweep(small, v, workers=1, cruise=CRUISE)
    cluster = distributed.LocalCluster(n_workers=1, threads_per_worker=1, host="127.0.0.1", dashboard_address=None,
                                       processes=True)
    try:
        remote = sweep(small, v, scheduler=cluster.scheduler_address, chunk_size=1, cruise=CRUISE)
    finally:
        cluster.close()
    assert remote.mode == "dask" and rows_repr(remote) == rows_repr(local)
    _check_cruise_from_data(small, remote)


def test_sizing_judges_the_data(small):
    """Sizing edits the project in place of a file: the stability check (the table's own buzz limit, §17) is
    judged on the data, as in the project's own map, and not on the model's stable_flow_fraction."""
    from engine_air.studies.sizing.limit_choice import judged_by

    w = worst_margin(small, "capture_area_m2", 0.55, limits=("stability",))
    direct = worst_point(judged_by(evaluate_project(small), ("stability",)))
    assert (w.relative_margin, w.mach, w.altitude_m, w.case) == \
        (direct.relative_margin, direct.mach, direct.altitude_m, direct.case)
    model = worst_margin(dataclasses.replace(small, characteristics=None), "capture_area_m2", 0.55,
                         limits=("stability",))
    assert model.relative_margin != w.relative_margin


def test_compare_with_the_model_sample_differs_only_where_the_data_decide():
    """Same inlet, same engine demand, same zero-incidence cases: outside the data region B's model equals A's
    exactly; inside it the table's recovery differs from the model's."""
    a, b = load_project(MODEL), load_project(DATA)
    assert a.inlet == b.inlet and a.characteristics is None and b.characteristics is not None
    c = compare_projects(a, b)
    assert c.has_data
    for case in c.cases[:-1]:  # the shared cases (WORST mixes B's incidence case in)
        region = c.data_region(case)
        assert region.any() and not (region & ~c.judged_both(case)).any()
        outside = c.judged_both(case) & ~region
        for key in ("recovery", "mass_flow_ratio"):
            d = c.difference(case, key)
            assert np.all(d[outside & np.isfinite(d)] == 0.0)
        s = c.data_stat(case, "recovery")
        d = c.difference(case, "recovery")
        assert s.points == int(np.count_nonzero(region & np.isfinite(d))) and s.max_abs > 0.0
        assert s.max_abs == float(np.nanmax(np.abs(d)))
        # the largest difference sits at a point where B is from data, and equals B's point less A's point there
        i = int(np.flatnonzero(c.altitude_m == s.max_abs_altitude_m)[0])
        j = int(np.flatnonzero(c.mach == s.max_abs_mach)[0])
        assert region[i, j]
        m, h = np.array([c.mach[j]]), np.array([c.altitude_m[i]])
        pb = evaluate_conditions(b, b.case(case), m, h)
        pa = evaluate_conditions(a, a.case(case), m, h)
        assert F.has(pb.flags, F.FROM_DATA)[0] and not F.has(pa.flags, F.FROM_DATA)[0]
        assert abs(float(pb.recovery[0] - pa.recovery[0])) == pytest.approx(s.max_abs, abs=1e-12)
    same = compare_projects(b, b)
    assert same.identical and same.data_stat(WORST, "recovery").max_abs == 0.0


def test_compare_and_sweep_commands_on_the_data_sample(tmp_path, capsys):
    code = main(["compare", str(MODEL), str(DATA)])
    text, err = capsys.readouterr()
    assert code in (0, 1) and "Traceback" not in err
    assert "characteristics tables: A none, B tunnel_characteristics.csv" in text
    assert "from-data points" in text
    folder = tmp_path / "elsewhere"
    folder.mkdir()
    small = dataclasses.replace(load_project(DATA), grid=Grid(mach_points=21, altitude_points=17))
    from engine_air.project import save_project

    save_project(small, folder / "data.toml")  # the table named relative to the new folder
    out_csv = tmp_path / "sweep.csv"
    code = main(["sweep", str(folder / "data.toml"), "--vary", "capture_area_m2=0.5:0.6:2", "--workers", "1",
                 "--csv", str(out_csv)])
    text, err = capsys.readouterr()
    assert code in (0, 1) and "Traceback" not in err
    import csv

    rows = list(csv.DictReader(out_csv.open()))
    reloaded = load_project(folder / "data.toml")
    assert reloaded.characteristics is not None
    for row in rows:
        direct = worst_point(evaluate_project(with_design_values(reloaded, {"capture_area_m2":
                                                                            float(row["capture_area_m2"])})))
        assert math.isclose(float(row["worst_relative_margin"]), direct.relative_margin, rel_tol=1e-12)


def test_review_pack_of_a_data_project_reloads_with_its_data(tmp_path):
    """The pack's project.toml loads with the copied table (kept in its folder) and reproduces the verdict; a
    project in memory with its file's text, whose table lies outside its folder, gives the same verdict and says
    that the pack holds no copy of the table."""
    from engine_air.outputs.review_pack import write_review_pack
    from engine_air.project.load import with_characteristics

    src, tables = tmp_path / "src", tmp_path / "tables"
    (src / "data").mkdir(parents=True)
    tables.mkdir()
    shutil.copy(DATA.parent / "tunnel_characteristics.csv", src / "data" / "tunnel_characteristics.csv")
    shutil.copy(DATA.parent / "tunnel_characteristics.csv", tables / "tunnel_characteristics.csv")
    p = dataclasses.replace(load_project(DATA), grid=Grid(mach_points=21, altitude_points=17))
    inside = src / "data.toml"
    inside.write_text(dumps_project(dataclasses.replace(p, characteristics_file="data/tunnel_characteristics.csv")),
                      encoding="utf-8")
    pack = write_review_pack(inside, tmp_path / "pack", quantities=("recovery",))
    assert (tmp_path / "pack" / "data" / "tunnel_characteristics.csv").is_file() and not pack.notes
    again = load_project(pack.project_path)
    assert again.characteristics is not None
    result = evaluate_project(again)
    assert _from_data(result) > 0 and result.holds == pack.holds
    assert worst_point(result).relative_margin == worst_point(pack.result).relative_margin
    far = dataclasses.replace(load_project(inside), characteristics_file="../tables/tunnel_characteristics.csv")
    far = with_characteristics(far, inside)  # the table outside the project's folder
    memory = write_review_pack(far, tmp_path / "pack2", quantities=("recovery",), source_text=dumps_project(far))
    assert len(memory.notes) == 1 and "no copy" in memory.notes[0]
    assert memory.holds == pack.holds
    assert worst_point(memory.result).relative_margin == worst_point(pack.result).relative_margin


# -- the data path made fast keeps its answers (bench/bench_characteristics.py times it) ---------------------------

def test_location_agrees_with_scipy_linear_interpolation():
    """Barycentric weights on the curves' Delaunay triangulation in (Mach, alpha): the critical MFR blended by them
    equals scipy's LinearNDInterpolator on the same nodes (NaN outside the hull), at random conditions."""
    from scipy.interpolate import LinearNDInterpolator

    from engine_air.characteristics.interpolate import locate

    curves = load_project(DATA).characteristics
    rng = np.random.default_rng(7)
    m, a = rng.uniform(0.4, 2.3, 4000), rng.uniform(-0.5, 4.5, 4000)
    at = locate(curves, m, a)
    reference = LinearNDInterpolator(np.stack([curves.mach, curves.alpha_deg], 1), curves.critical_mass_flow_ratio)
    expected = reference(m, a)
    assert np.array_equal(np.isnan(expected), ~at.covered)
    assert np.allclose(at.critical_mass_flow_ratio[at.covered], expected[at.covered], rtol=0, atol=1e-12)
    # in (Mach, alpha, beta): a synthetic table of 27 curves, the same comparison (tetrahedra)
    from engine_air.characteristics.curves import find_curves
    from engine_air.characteristics.table import CharacteristicsTable

    grid3 = np.array([(m, al, be) for m in (1.2, 1.6, 2.0) for al in (0.0, 4.0, 8.0) for be in (-3.0, 0.0, 3.0)])
    crit3 = 0.9 - 0.05 * grid3[:, 0] + 0.003 * grid3[:, 1] ** 2 - 0.01 * np.abs(grid3[:, 2])  # not linear
    cols = {"mach": np.repeat(grid3[:, 0], 2), "alpha_deg": np.repeat(grid3[:, 1], 2),
            "beta_deg": np.repeat(grid3[:, 2], 2), "mass_flow_ratio": np.ravel(np.stack([0.6 * crit3, crit3], 1)),
            "recovery": np.tile([0.9, 0.92], 27)}
    curves3 = find_curves(CharacteristicsTable("t3", cols))
    q = np.stack([rng.uniform(1.1, 2.1, 3000), rng.uniform(-0.5, 8.5, 3000), rng.uniform(-3.5, 3.5, 3000)], 1)
    at3 = locate(curves3, q[:, 0], q[:, 1], q[:, 2])
    nodes3 = np.stack([curves3.mach, curves3.alpha_deg, curves3.beta_deg], 1)
    expected3 = LinearNDInterpolator(nodes3, curves3.critical_mass_flow_ratio)(q)
    assert np.array_equal(np.isnan(expected3), ~at3.covered) and at3.covered.sum() > 1500
    assert np.allclose(at3.critical_mass_flow_ratio[at3.covered], expected3[at3.covered], rtol=0, atol=1e-12)
    # the same conditions as one row per Mach column of a map give the same weights
    column = locate(curves, m[None, :200], a[None, :200])
    assert np.array_equal(column.critical_mass_flow_ratio[0], at.critical_mass_flow_ratio[:200], equal_nan=True)


def test_a_condition_on_a_tested_curve_uses_that_curve_alone():
    """At (Mach 1.5, alpha 4), a tested curve, and one rounding step away from it, the stability limit is that
    curve's own: the smallest MFR of its stable rows (it has unstable rows), by hand from the table (§17)."""
    from engine_air.characteristics.interpolate import locate

    p = load_project(DATA)
    t = p.characteristics.table
    sel = (t.column("mach") == 1.5) & (t.column("alpha_deg") == 4.0)
    stable = t.column("stable")[sel]
    assert (stable == 0).any() and (stable == 1).any()
    own = t.column("mass_flow_ratio")[sel][stable == 1].min()
    at = locate(p.characteristics, np.array([1.5, np.nextafter(1.5, 2.0), np.nextafter(1.5, 1.0)]), 4.0)
    assert at.covered.all() and np.all(at.stability_limit == own)


def test_root_on_a_map_equals_a_scalar_root():
    """The match on data over a map-shaped demand (one located condition per Mach column) equals, point by point,
    scipy's brentq on g(f) = f MFR_crit - c pi(f) with pi the tested curve's branch by hand (§17)."""
    from scipy.optimize import brentq

    from engine_air.characteristics.interpolate import locate
    from engine_air.characteristics.root import match_on_data

    p = load_project(DATA)
    machs = (1.3, 1.7, 2.1)
    at = locate(p.characteristics, np.array([machs]))
    c = np.linspace(0.55, 1.1, 60)[:, None] * np.ones((1, 3))
    op = match_on_data(at, c)
    checked = 0
    for j, mach in enumerate(machs):
        x, y, crit = _branch(p, mach)
        f_nodes, lowest = x / crit, x.min() / crit
        for i in range(c.shape[0]):
            g = lambda f: f * crit - c[i, j] * np.interp(f, f_nodes, y)  # noqa: E731
            if g(1.0) <= 0.0:  # supercritical: MFR held at MFR_crit, pi = MFR_crit / c (§6)
                assert op.supercritical[i, j] and op.recovery[i, j] == pytest.approx(crit / c[i, j], rel=1e-12)
            elif g(lowest) > 0.0:  # below the smallest tested flow: the model stands
                assert not op.covered[i, j]
            else:
                f = brentq(g, lowest, 1.0, xtol=1e-15, rtol=1e-15)
                assert op.fraction[i, j] == pytest.approx(f, abs=1e-12)
                assert op.recovery[i, j] == pytest.approx(np.interp(f, f_nodes, y), abs=1e-12)
                checked += 1
    assert checked > 60


def test_unsaved_work_on_a_data_project_is_recovered_with_its_table(tmp_path, monkeypatch):
    """The program's recovery copy lives in another folder than the project: it names the table relative to
    itself, so the recovered project has its data again (and evaluates as the original)."""
    pytest.importorskip("PySide6")
    from app import recovery
    from app.recovery.slot import Slot

    folder = tmp_path / "recovery"
    folder.mkdir()
    monkeypatch.setenv(recovery.ENV_DIR, str(folder))
    p = dataclasses.replace(load_project(DATA), grid=Grid(mach_points=21, altitude_points=17))
    slot = Slot(folder, "20240101-000000-1-deadbeef")
    slot.write(p, DATA)
    slot.release()
    found = recovery.find_recovered(folder)
    try:
        assert len(found) == 1
        again = found[0].load()
    finally:
        for entry in found:
            entry.release()
    assert again.characteristics is not None and again == dataclasses.replace(
        p, characteristics_file=again.characteristics_file)
    assert pathlib.Path(again.characteristics.table.path).resolve() == (DATA.parent / "tunnel_characteristics.csv")
    assert worst_point(evaluate_project(again)).relative_margin == worst_point(evaluate_project(p)).relative_margin


def test_compare_and_sweep_dialogs_with_a_data_project(qtbot, tmp_path):
    """In the program: the compare dialog states the differences where the table decides; the sweep dialog's rows
    are the variants matched on the data (the same rows as the sweep itself, which the tests above check)."""
    pytest.importorskip("pytestqt")
    from app.dialogs import CompareDialog, SweepDialog

    p = dataclasses.replace(load_project(DATA), grid=Grid(mach_points=31, altitude_points=26))
    d = CompareDialog(p, MODEL)
    qtbot.addWidget(d)
    d.show()
    d.start()
    qtbot.waitUntil(lambda: not d.running, timeout=30000)
    assert d.result is not None and d.result.has_data
    assert "characteristics table decides" in d.stats.text()
    assert d.stats.height() >= 3 * d.stats.fontMetrics().lineSpacing()
    assert d.grab().save(str(tmp_path / "compare_data.png"))
    s = SweepDialog(p)
    qtbot.addWidget(s)
    s.show()
    (u1, c1, lo1, hi1, n1), (u2, *_rest) = s.rows[0], s.rows[1]
    c1.setCurrentIndex(c1.findData("capture_area_m2"))
    lo1.setValue(0.50)
    hi1.setValue(0.60)
    n1.setValue(3)
    u2.setChecked(False)
    s.workers.setValue(1)
    s.start()
    qtbot.waitUntil(lambda: not s.running, timeout=30000)
    assert s.last_error == "", s.last_error
    expected = sweep(p, {"capture_area_m2": [0.50, 0.55, 0.60]}, workers=1)
    assert [r.worst_relative_margin for r in s.result.rows] == pytest.approx(
        [r.worst_relative_margin for r in expected.rows], rel=1e-12)
