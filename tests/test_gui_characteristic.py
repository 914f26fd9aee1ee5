"""The window's views of issue 16 (method §16, §17): the Characteristic tab, the map's outline of the points where
measured characteristics back the verdict, the detail panel's source line, and the editors of incidence and of
the characteristics file.

References: the measured rows of the sample's table (sample_projects/tunnel_data/tunnel_characteristics.csv) are
the outside reference for the data curve at a tested Mach (the interpolated curve passes through them); the
expected curves, flags and sources are read from the analysis package (``characteristic_at``, the point flags),
never from the widgets under test.
"""

from __future__ import annotations

import os
from dataclasses import replace

import numpy as np
import pytest

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

pytest.importorskip("PySide6")
pytest.importorskip("pyqtgraph")
pytest.importorskip("pytestqt")

import pyqtgraph as pg  # noqa: E402

from app.main import SAMPLES  # noqa: E402
from app.views.characteristic_view import neighbour_machs  # noqa: E402
from engine_air.envelope import flags as F  # noqa: E402
from engine_air.envelope.characteristic import characteristic_at, measured_rows  # noqa: E402
from gui_support import wait_result, window_factory  # noqa: E402

DATA_SAMPLE = SAMPLES / "tunnel_data" / "two_ramp_with_tunnel_data.toml"
PLAIN_SAMPLE = SAMPLES / "supersonic_two_ramp.toml"


@pytest.fixture
def make_window(qtbot, tmp_path):
    with window_factory(qtbot, tmp_path, DATA_SAMPLE) as make:
        yield make


def _select(w, qtbot, mach: float, altitude_m: float, case: str):
    w.set_case(case)
    wait_result(qtbot, w)
    return w.select_condition(mach, altitude_m)


def _drawn_characteristic(w, qtbot):
    w.show_view("characteristic")
    qtbot.waitUntil(lambda: w.characteristic.shown is not None and not w.characteristic.busy, timeout=20000)
    wait_result(qtbot, w)
    return w.characteristic.shown


def _curve_items(view):
    return [it for it in view.getPlotItem().listDataItems() if it.opts.get("pen") is not None]


def test_neighbour_machs_are_clipped_to_the_envelope():
    assert neighbour_machs(1.5, [0.3, 2.1]) == [1.3, 1.5, 1.7]
    assert neighbour_machs(0.35, [0.3, 2.1]) == [0.3, 0.35, 0.55]
    assert neighbour_machs(2.1, [0.3, 2.1]) == [1.9, 2.1]


def test_tab_draws_data_at_a_tested_mach_and_the_model_elsewhere(make_window, qtbot):
    w = make_window()
    case = w.result.cases[0]
    i, j = _select(w, qtbot, 1.5, 10000.0, case.name)
    shown = _drawn_characteristic(w, qtbot)
    mach = float(w.result.mach[j])
    project = w.result.project
    machs = neighbour_machs(mach, project.envelope.mach)
    assert [c.mach for c in shown["curves"]] == machs
    case_obj = project.case(case.name)
    expected = [characteristic_at(project, case_obj, m, float(w.result.altitude_m[i])) for m in machs]
    assert [c.source for c in shown["curves"]] == [c.source for c in expected]
    middle = shown["curves"][1]
    assert middle.source == "data" and middle.model_recovery is not None  # the model dotted beside the data
    np.testing.assert_allclose(middle.recovery, expected[1].recovery)
    # the drawn lines are those curves (solid: the source's, dotted: the model beside data)
    items = _curve_items(w.characteristic)
    assert any(np.allclose(it.getData()[1], middle.recovery, equal_nan=True) for it in items
               if len(it.getData()[1]) == len(middle.recovery))
    assert any(it.opts["pen"].style() == pg.QtCore.Qt.DotLine for it in items)
    # stability boundary: a dashed vertical line where the curve judges one
    lines = [it for it in w.characteristic.getPlotItem().items if isinstance(it, pg.InfiniteLine)]
    assert len(lines) == sum(c.stability_limit_mass_flow_ratio is not None for c in shown["curves"])
    # each case's operating points: a marker of their own, named in the legend
    names = {p["case"] for p in middle.operating_points if p["mass_flow_ratio"] is not None}
    legend = [label.text for _sample, label in w.characteristic.legend.items]
    assert names and all(f"case {n}" in legend for n in names)
    assert "M0 1.50 (measured)" in legend and any("model" in t for t in legend)
    assert "tested points of the table" in legend  # the table's rows at 1.5 as open circles


def test_data_curve_passes_through_the_measured_rows_at_a_tested_mach(make_window, qtbot):
    w = make_window()
    case = w.result.cases[0]  # zero incidence: the table's rows at alpha = beta = 0
    tested = 1.5
    _select(w, qtbot, tested, 10000.0, case.name)
    project = w.result.project
    rows = measured_rows(project, tested, project.case(case.name))
    assert rows is not None
    curve = characteristic_at(project, project.case(case.name), tested, 10000.0)
    sub = rows["mass_flow_ratio"] < curve.critical_mass_flow_ratio * (1 - 1e-9)
    branch = curve.mass_flow_ratio <= curve.critical_mass_flow_ratio * (1 + 1e-12)
    order = np.argsort(curve.mass_flow_ratio[branch], kind="stable")
    on_curve = np.interp(rows["mass_flow_ratio"][sub], curve.mass_flow_ratio[branch][order],
                         curve.recovery[branch][order])
    np.testing.assert_allclose(on_curve, rows["recovery"][sub], atol=1e-6)


def test_tab_draws_the_model_outside_the_tested_machs_and_open_circles_only_at_tested_ones(make_window, qtbot):
    w = make_window()
    _select(w, qtbot, 0.35, 3000.0, w.result.cases[0].name)
    shown = _drawn_characteristic(w, qtbot)
    assert shown["curves"] and all(c.source == "model" for c in shown["curves"])  # the table starts at M 0.6
    assert all(m is None for m in shown["measured"])


def test_tab_is_not_computed_behind_another_tab_and_follows_an_edit(make_window, qtbot):
    w = make_window()
    w.show_view("detail")
    _select(w, qtbot, 1.5, 10000.0, w.result.cases[0].name)
    assert w.characteristic.shown is None and w.point_views.draws["characteristic"] == 0
    first = _drawn_characteristic(w, qtbot)
    project = w.document.project
    edited = replace(project, limits=replace(project.limits, stable_flow_fraction=0.7))
    w.document.edit(edited, validated=True)
    wait_result(qtbot, w)
    qtbot.waitUntil(lambda: w.characteristic.shown is not first and not w.characteristic.busy, timeout=20000)
    assert w.characteristic.shown["curves"][0].mach == first["curves"][0].mach


def test_characteristic_export_writes_a_png(make_window, qtbot, tmp_path):
    w = make_window()
    _select(w, qtbot, 1.5, 10000.0, w.result.cases[0].name)
    _drawn_characteristic(w, qtbot)
    out = tmp_path / "characteristic.png"
    assert w.export("characteristic-png", out)
    assert out.stat().st_size > 1000


def test_map_outlines_the_points_backed_by_data(make_window, qtbot):
    w = make_window()
    w.set_case(w.result.cases[0].name)
    wait_result(qtbot, w)
    flags = np.asarray(w.result.cases[0].points.flags).astype(np.int64)
    expected = ((flags & F.FROM_DATA) != 0) & np.asarray(w.result.inside, bool)
    assert expected.any()
    assert w.map.data_count == int(expected.sum())
    np.testing.assert_array_equal(w.map.data_mask(), expected)
    xs, _ys = w.map.data_outline.getData()
    assert xs is not None and np.isfinite(xs).sum() > 4
    assert any(t.startswith("data back the verdict here") for t in w.map.legend_entries)


def test_map_has_no_data_outline_without_a_table(make_window, qtbot):
    w = make_window(PLAIN_SAMPLE)
    assert w.map.data_count is None and w.map.data_mask() is None
    xs, _ys = w.map.data_outline.getData()
    assert xs is None or not np.isfinite(xs).any()
    assert not any("data back the verdict" in t for t in w.map.legend_entries)


def test_detail_names_the_source_and_the_incidence(make_window, qtbot):
    w = make_window()
    plain, tilted = w.result.cases[0].name, w.result.cases[-1].name
    assert w.document.project.case(tilted).angle_of_attack_deg == 4.0
    _select(w, qtbot, 1.5, 10000.0, plain)
    assert w.detail.record()["data_source"] == "data"
    assert "measured characteristics (table tunnel_characteristics.csv)" in w.detail.source_label.text()
    assert "Incidence" not in w.detail.source_label.text()  # the case gives none
    _select(w, qtbot, 0.35, 3000.0, tilted)
    rec = w.detail.record()
    assert rec["data_source"] == "model" and "incidence-not-modelled" in rec["flags"]
    text = w.detail.source_label.text()
    assert "model (outside the tested conditions)" in text
    assert "alpha = 4.0°" in text and "incidence not modelled" in text


def test_detail_says_no_table(make_window, qtbot):
    w = make_window(PLAIN_SAMPLE)
    w.select_point(len(w.result.altitude_m) // 2, len(w.result.mach) // 2)
    assert "model (no characteristics table)" in w.detail.source_label.text()


def test_editing_incidence_changes_the_project_and_the_map_recomputes(make_window, qtbot):
    w = make_window()
    w.show_view("editor")
    ed = w.editors
    before = w.result_generation
    ed.case_table.item(0, 7).setText("4")
    assert ed.last_error() == ""
    assert w.document.project.cases[0].angle_of_attack_deg == 4.0
    wait_result(qtbot, w)
    assert w.result_generation > before
    alpha = np.asarray(w.result.quantity(w.result.cases[0].name, "angle_of_attack_deg"), float)
    assert np.allclose(alpha[np.asarray(w.result.inside, bool)], 4.0)
    ed.case_table.item(0, 7).setText("four")
    assert "angle of attack" in ed.last_error() and w.document.project.cases[0].angle_of_attack_deg == 4.0


def test_a_mach_table_of_incidence_is_shown_and_kept(make_window, qtbot):
    from engine_air.project.load import load_project

    project = load_project(DATA_SAMPLE)
    table = ((0.8, 2.0), (2.0, 5.0))
    cases = (replace(project.cases[0], angle_of_attack_deg=table),) + project.cases[1:]
    w = make_window(DATA_SAMPLE, project=replace(project, cases=cases))
    ed = w.editors
    assert ed.case_table.item(0, 7).text() == "table: 2 Mach numbers"
    ed.case_table.item(0, 2).setText("5")  # another cell of the row: the table is kept
    assert w.document.project.cases[0].angle_of_attack_deg == table
    assert w.document.project.cases[0].isa_offset_K == pytest.approx(5.0)


def test_a_bad_characteristics_file_is_refused_and_the_project_kept(make_window, qtbot, tmp_path):
    w = make_window()
    ed = w.editors
    kept = w.document.project
    bad = tmp_path / "bad.csv"
    bad.write_text("mach,alpha_deg\n1.5,zero\n")
    relative = os.path.relpath(bad, DATA_SAMPLE.parent)
    for name in (relative, "no_such_table.csv"):
        ed.characteristics_edit.setText(name)
        ed.characteristics_edit.editingFinished.emit()
        assert ed.last_error().startswith("Edit not applied")
        assert os.path.basename(name) in ed.last_error()
        assert w.document.project is kept
    # blank: no table, the model throughout; the map recomputes without the outline
    ed.characteristics_edit.setText("")
    ed.characteristics_edit.editingFinished.emit()
    assert ed.last_error() == ""
    assert w.document.project.characteristics is None and w.document.project.characteristics_file is None
    wait_result(qtbot, w)
    assert w.map.data_count is None
    # and back to the sample's table
    ed.characteristics_edit.setText("tunnel_characteristics.csv")
    ed.characteristics_edit.editingFinished.emit()
    assert ed.last_error() == "" and w.document.project.characteristics is not None
    wait_result(qtbot, w)
    assert w.map.data_count
