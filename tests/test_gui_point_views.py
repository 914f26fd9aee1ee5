"""The window's point views (issues 9, 10, 11): the inlet sketch and the sections follow the selection and every
edit; the least-margin map is the default when a limit fails and names the limiting check; not-judged points are
grey; the ledger's rows add up to the installed thrust; a mixed-compression map shows its unstarted region.

References: oblique-shock wave angles from ``pygasflow`` (NACA Report 1135 relations); the ledger sum
F_inst = F_n (1 - X (1 - pi/pi_ref)) - D_spill - D_bleed - D_bypass is method §13 (Seddon & Goldsmith, Intake
Aerodynamics, 1999), worked here from the point's own values and the rating's exchange rate X of the file.
Expected maps are read from the analysis package (``MapResult``, ``ranking.limiting_map``, flags), never from
the widgets under test.
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

from pygasflow.solvers import oblique_shockwave_solver  # noqa: E402

from app.main import DEFAULT_SAMPLE, SAMPLES  # noqa: E402
from engine_air.envelope import flags as F  # noqa: E402
from engine_air.envelope.evaluate import WORST  # noqa: E402
from engine_air.envelope.ranking import limiting_map  # noqa: E402
from gui_support import wait_result, window_factory  # noqa: E402


@pytest.fixture
def make_window(qtbot, tmp_path):
    with window_factory(qtbot, tmp_path, DEFAULT_SAMPLE) as make:
        yield make


def sample(name: str):
    return SAMPLES / f"{name}.toml"


def _beta(mach: float, theta_deg: float) -> float:
    """Weak wave angle (deg) from pygasflow's oblique-shock solver."""
    r = oblique_shockwave_solver("mu", mach, "theta", theta_deg, flag="weak", to_dict=True)
    return float(r["beta"])


def _supersonic_inside(result, mach_min: float = 1.7, mach_max: float = 2.0):
    ii, jj = np.nonzero(result.inside & (result.mach[None, :] >= mach_min) & (result.mach[None, :] <= mach_max))
    k = len(ii) // 2
    return int(ii[k]), int(jj[k])


def test_sketch_follows_selection_and_edit_with_the_computed_shock_angles(make_window, qtbot):
    w = make_window(sample("supersonic_two_ramp"))
    w.show_view("sketch")  # the inlet's tab in front: it follows every selection and result
    w.set_case(w.result.cases[0].name)
    i, j = _supersonic_inside(w.result)
    w.select_point(i, j)
    m0 = float(w.result.mach[j])
    first = w.document.project.inlet.ramp_angles_deg[0]
    assert w.sketch.drawn_angle_deg("shock 1") == pytest.approx(_beta(m0, first), abs=1e-6)
    # another point: the sketch follows
    i2, j2 = _supersonic_inside(w.result, 1.5, 1.6)
    w.select_point(i2, j2)
    m2 = float(w.result.mach[j2])
    assert w.sketch.drawn_angle_deg("shock 1") == pytest.approx(_beta(m2, first), abs=1e-6)
    # an edit: a steeper first ramp (shock-on-lip Mach raised so the design stays attached), recomputed
    project = w.document.project
    edited = replace(project, inlet=replace(project.inlet, ramp_angles_deg=(9.0,) + project.inlet.ramp_angles_deg[1:]))
    w.document.edit(edited, validated=True)
    wait_result(qtbot, w)
    assert w.map.selected() == (i2, j2)
    assert w.sketch.drawn_angle_deg("shock 1") == pytest.approx(_beta(m2, 9.0), abs=1e-6)


def test_sketch_draws_a_pitot_and_a_mixed_inlet(make_window):
    w = make_window(sample("subsonic_transport_nacelle"))
    w.show_view("sketch")
    assert w.sketch.sketch is not None and w.sketch.sketch.of_role("stream-tube")
    w2 = make_window(sample("mixed_compression_throat_schedule"))
    w2.show_view("sketch")
    assert w2.sketch.sketch is not None and w2.sketch.sketch.of_role("wall")


def test_sections_follow_selection_quantity_and_case(make_window):
    w = make_window(sample("undersized_business_jet"))
    w.show_view("sections")
    r = w.result
    ii, jj = np.nonzero(r.inside)
    for k in (0, len(ii) // 2):
        i, j = int(ii[k]), int(jj[k])
        w.select_point(i, j)
        for case in r.cases:
            values = r.quantity(case.name, w.current_quantity())
            np.testing.assert_array_equal(w.sections.lines[("mach", case.name)][1], values[i, :])
            np.testing.assert_array_equal(w.sections.lines[("altitude", case.name)][0], values[:, j])
    w.set_quantity("face_mach")
    one = r.cases[0].name
    w.set_case(one)
    i, j = w.map.selected()
    assert set(name for _axis, name in w.sections.lines) == {one}
    np.testing.assert_array_equal(w.sections.lines[("mach", one)][1], r.quantity(one, "face_mach")[i, :])


def test_sections_export_png_and_svg(make_window, tmp_path, monkeypatch):
    from PySide6.QtWidgets import QMessageBox

    def fail(*args, **kwargs):
        raise AssertionError(f"export failed: {args[2] if len(args) > 2 else args}")

    monkeypatch.setattr(QMessageBox, "critical", fail)
    w = make_window(sample("undersized_business_jet"))
    assert not w.point_views.shown("sections")  # behind its tab: drawn for the export all the same
    assert w.export("sections-png", tmp_path / "cuts.png")
    i, j = w.map.selected()
    case = w.result.cases[0].name
    np.testing.assert_array_equal(w.sections.lines[("mach", case)][1],
                                  w.result.quantity(case, w.current_quantity())[i, :])
    assert w.export("sections-svg", tmp_path / "cuts.svg")
    assert (tmp_path / "cuts.png").stat().st_size > 1000
    assert "<svg" in (tmp_path / "cuts.svg").read_text(errors="replace")[:2000]


def test_least_margin_is_the_default_when_a_limit_fails_and_names_the_limiting_check(make_window):
    w = make_window(sample("undersized_business_jet"))
    assert not w.result.holds
    assert w.current_quantity() == "worst_relative_margin"
    margin, index, _names, labels = limiting_map(w.result, WORST)
    np.testing.assert_array_equal(w.map.values(), w.result.quantity(WORST, "worst_relative_margin"))
    np.testing.assert_allclose(w.map.values(), margin, rtol=1e-12, atol=1e-15)
    used = sorted({labels[k] for k in np.unique(index) if k >= 0})
    assert used and all(label in " ".join(w.map.legend_entries).replace("<br>", " ") for label in used)
    ii, jj = np.nonzero(index >= 0)
    for k in (0, len(ii) // 2, len(ii) - 1):
        i, j = int(ii[k]), int(jj[k])
        assert f"limiting: {labels[index[i, j]]}" in w.map.hover_text_at(i, j)
    # a picked quantity stays through a recompute
    w.set_quantity("face_mach")
    w.recompute()


def test_face_mach_margin_stays_the_default_when_every_limit_holds(make_window):
    w = make_window(sample("subsonic_transport_nacelle"))
    assert w.result.holds
    assert w.current_quantity() == "face_mach_margin"


def test_not_judged_points_are_grey_on_margin_maps(make_window):
    w = make_window(sample("variable_geometry_fighter"))
    take_off = w.result.cases[1].name
    w.set_case(take_off)
    w.set_quantity("face_mach_margin")
    flags = np.asarray(w.result.case_map(take_off).points.flags).astype(np.int64)
    outside_region = (flags & F.OUTSIDE_CASE_REGION) != 0
    expected = w.result.inside & outside_region
    assert expected.any()
    assert np.array_equal(w.map.not_judged_mask() & outside_region, expected)
    assert "not judged here" in w.map.legend_entries
    # recovery against MIL-E-5008B is judged above Mach 1 only: grey below it inside the envelope
    w.set_case(w.result.cases[0].name)
    w.set_quantity("recovery_minus_reference")
    grey = w.map.not_judged_mask()
    sub = w.result.inside & (w.result.mach[None, :] <= 1.0)
    assert grey[sub].all()
    rgba = w.map.not_judged_image.image
    i, j = map(int, np.argwhere(grey)[0])
    assert tuple(rgba[i, j, :3]) == (150, 150, 150) and rgba[i, j, 3] == 255


def test_ledger_rows_sum_to_the_installed_thrust(make_window):
    w = make_window(sample("variable_geometry_fighter"))
    case = w.result.cases[0]
    w.set_case(case.name)
    defined = w.result.inside & np.isfinite(case.points.installed_thrust_n)
    i, j = map(int, np.argwhere(defined)[len(np.argwhere(defined)) // 2])
    w.select_point(i, j)
    rows = w.detail.ledger_rows()
    items = [r for r in rows if r["role"] == "term"]
    total = next(r for r in rows if r["role"] == "total")
    points = case.points
    assert total["value"] == pytest.approx(float(points.installed_thrust_n[i, j]), rel=1e-12)
    assert sum(r["value"] for r in items) == pytest.approx(total["value"], rel=1e-9)
    # the table shows them with their signs: + F_n, − each loss, = F_inst
    shown = [w.detail.ledger.item(k, 0).text() for k in range(w.detail.ledger.rowCount())]
    assert any(text.startswith("= Installed thrust") for text in shown)
    assert any(text.startswith("+ Net thrust") for text in shown)
    # the recovery term worked from the file's exchange rate and the point's recovery
    rating = w.result.project.rating(w.result.project.cases[0].rating)
    f_n, pi, ref = (float(points.net_thrust_n[i, j]), float(points.recovery[i, j]),
                    float(points.thrust_reference_recovery[i, j]))
    rec = next(r for r in items if r["key"] == "recovery_term_n")
    assert rec["value"] == pytest.approx(-f_n * rating.recovery_thrust_exchange * (1 - pi / ref), rel=1e-12)
    for key in ("ram_drag_n", "additive_drag_n", "spillage_drag_n", "bleed_drag_n", "bypass_drag_n"):
        assert any(r["key"] == key for r in rows)
    # a rating without a thrust table (the sample's take-off rating, its table taken away)
    p = w.result.project
    no_table = replace(p.ratings[1], thrust_mach=None, thrust_altitude_m=None, net_thrust_n=None,
                       thrust_reference_recovery=None, recovery_thrust_exchange=None)
    w = make_window(sample("variable_geometry_fighter"), project=replace(p, ratings=(p.ratings[0], no_table)))
    w.set_case(w.result.cases[1].name)
    w.select_point(0, 1)
    texts = [w.detail.ledger.item(r, 1).text() for r in range(w.detail.ledger.rowCount())]
    assert "no thrust data" in texts


def test_mixed_compression_map_shows_the_unstarted_region_and_starting_machs(make_window):
    from engine_air.inlets.mixed_compression import starting_machs

    w = make_window(sample("mixed_compression_throat_schedule"))
    r = w.result
    unstarted = np.zeros(r.inside.shape, bool)
    for c in r.cases:
        unstarted |= (np.asarray(c.points.flags).astype(np.int64) & F.UNSTARTED) != 0
    unstarted &= r.inside
    assert unstarted.any()
    assert w.map.unstarted_count == int(unstarted.sum())
    xs, _ys = w.map.unstarted_outline.getData()
    assert np.isfinite(xs).sum() >= 2
    assert len(w.map.unstarted_hatch.data) > 0
    start, unstart = starting_machs(r.project.inlet)
    assert w.map.self_start_line.isVisible() and w.map.self_start_line.value() == pytest.approx(start)
    assert any(e.startswith("unstarted") for e in w.map.legend_entries)
    assert any("self-start" in e for e in w.map.legend_entries)
    # the started state is a map quantity, and the detail says which state the point is in
    w.set_quantity("started")
    np.testing.assert_array_equal(np.nan_to_num(w.map.values(), nan=-1),
                                  np.nan_to_num(r.quantity(WORST, "started"), nan=-1))
    i, j = map(int, np.argwhere(unstarted)[0])
    w.select_point(i, j)
    assert "UNSTARTED" in w.detail.started_label.text()
    kinds = [s["kind"] for s in w.detail.shock_rows()]
    assert any("ahead of the cowl" in k for k in kinds)
    started = r.inside & ~unstarted & (r.mach[None, :] > 1.0)
    if started.any():
        i, j = map(int, np.argwhere(started)[-1])
        w.select_point(i, j)
        kinds = [s["kind"] for s in w.detail.shock_rows()]
        assert "cowl oblique" in kinds


def test_map_axes_are_painted_from_their_cache_and_their_labels_follow_the_units(make_window, qtbot):
    # the axes are drawn into a pixmap and copied at each paint (app/views/axis_cache.py); a label set to the same
    # text is not set again (that would drop the pixmap every result), but a new text is
    from PySide6.QtWidgets import QGraphicsItem
    import pyqtgraph as pg

    w = make_window(sample("supersonic_two_ramp"))
    axes = [it for it in w.map.canvas.scene().items() if isinstance(it, pg.AxisItem)]
    assert axes and all(a.cacheMode() == QGraphicsItem.DeviceCoordinateCache for a in axes)
    left = w.map.plot.getAxis("left")
    assert left.labelText == "Pressure altitude (m)"
    calls = []
    real = w.map.plot.setLabel
    w.map.plot.setLabel = lambda *a, **k: (calls.append(a), real(*a, **k))
    project = w.document.project
    w.document.edit(replace(project, inlet=replace(project.inlet, face_area_m2=project.inlet.face_area_m2 * 1.01)),
                    validated=True)
    wait_result(qtbot, w)
    assert calls == []  # the same labels: not set again
    w.units_combo.setCurrentIndex(w.units_combo.findData("US"))
    wait_result(qtbot, w)
    assert left.labelText == "Pressure altitude (ft)"
    assert ("left", "Pressure altitude (ft)") in calls
