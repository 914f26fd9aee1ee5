"""Design dialogs (app/dialogs/): they run the analysis off the GUI thread and show its answers.

Runs offscreen with pytest-qt; every dialog is also grabbed to an image to be sure it paints.
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from dataclasses import replace  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402

pytest.importorskip("PySide6")
pytest.importorskip("pyqtgraph")
pytest.importorskip("pytestqt")

from PySide6.QtWidgets import QMainWindow  # noqa: E402

from app.dialogs import (  # noqa: E402
    CompareDialog,
    ReviewPackDialog,
    SizingDialog,
    SweepDialog,
    add_design_menu,
)
from engine_air.project.model import Grid  # noqa: E402
from engine_air.project import load_project, project_from_dict  # noqa: E402
from engine_air.studies.sizing import feasible_range  # noqa: E402

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
FAILING = SAMPLES / "undersized_business_jet.toml"
WAIT_MS = 30000


def coarse(path):
    return replace(load_project(path), grid=Grid(mach_points=31, altitude_points=26))


def finish(qtbot, dialog):
    qtbot.waitUntil(lambda: not dialog.running, timeout=WAIT_MS)


def grab_ok(dialog, tmp_path, name):
    image = dialog.grab()
    assert not image.isNull() and image.width() > 200 and image.height() > 100
    assert image.save(str(tmp_path / f"{name}.png"))


def test_sizing_dialog_shows_the_range_and_the_optimum(qtbot, tmp_path):
    p = coarse(PITOT)
    d = SizingDialog(p)
    qtbot.addWidget(d)
    d.show()
    d.variable.setCurrentIndex(d.variable.findData("face_area_m2"))
    d.objective.setCurrentIndex(d.objective.findData("-worst_margin"))
    d.scan.setValue(9)
    assert not d.point_box.isEnabled()
    d.start()
    finish(qtbot, d)
    assert d.last_error == ""
    sizing, best = d.result
    ref = feasible_range(p, "face_area_m2", d.lower.value(), d.upper.value(), scan_points=9)
    assert sizing.intervals[0].lower.value == ref.intervals[0].lower.value
    assert best is not None and best.value is not None
    assert d.bounds_table.rowCount() == 2
    assert "Face Mach number" in d.bounds_table.item(0, 3).text()
    assert "Feasible" in d.status.text() and d.progress_bar.value() == 1000
    grab_ok(d, tmp_path, "sizing")


def test_sizing_dialog_reports_bad_input(qtbot):
    d = SizingDialog(coarse(PITOT))
    qtbot.addWidget(d)
    d.lower.setValue(3.0)
    d.upper.setValue(2.0)
    d.start()
    assert not d.running and "lower < upper" in d.last_error


def test_compare_dialog_with_itself_and_another(qtbot, tmp_path):
    p = load_project(PITOT)
    d = CompareDialog(p, PITOT)
    qtbot.addWidget(d)
    d.show()
    d.start()
    finish(qtbot, d)
    assert d.result is not None and d.result.identical
    assert "identical" in d.status.text()
    assert d.verdicts.rowCount() == len(d.result.verdicts)
    diff = d.map_d.image.image
    assert np.nanmax(np.abs(diff)) == 0.0
    # one shared colour scale for A and B
    assert d.map_a.image.getLevels() == pytest.approx(d.map_b.image.getLevels())
    grab_ok(d, tmp_path, "compare_self")

    d2 = CompareDialog(p, FAILING)
    qtbot.addWidget(d2)
    d2.show()
    d2.start()
    finish(qtbot, d2)
    assert not d2.result.holds_b and "FAILS" in d2.status.text()
    changes = [d2.verdicts.item(r, 5).text() for r in range(d2.verdicts.rowCount())]
    assert "now fails" in changes
    assert len(d2.map_b.fail_marks.data) > 0  # failing points carry a second cue
    d2.quantity.setCurrentIndex(d2.quantity.findData("recovery"))
    grab_ok(d2, tmp_path, "compare_other")


def test_compare_dialog_unreadable_file(qtbot, tmp_path):
    d = CompareDialog(load_project(PITOT), tmp_path / "missing.toml")
    qtbot.addWidget(d)
    d.start()
    finish(qtbot, d)
    assert "missing.toml" in d.last_error


def test_sweep_dialog_two_variables(qtbot, tmp_path):
    p = coarse(FAILING)
    d = SweepDialog(p)
    qtbot.addWidget(d)
    d.show()
    (u1, c1, lo1, hi1, n1), (u2, c2, lo2, hi2, n2) = d.rows[0], d.rows[1]
    c1.setCurrentIndex(c1.findData("throat_area_m2"))
    lo1.setValue(0.25)
    hi1.setValue(0.32)
    n1.setValue(4)
    c2.setCurrentIndex(c2.findData("face_area_m2"))
    lo2.setValue(0.3)
    hi2.setValue(0.5)
    n2.setValue(3)
    d.workers.setValue(1)
    d.cruise.setChecked(True)
    d.start()
    finish(qtbot, d)
    assert d.last_error == "", d.last_error
    r = d.result
    assert r.shape == (4, 3) and d.table.rowCount() == 12
    assert not d.canvas.isHidden()
    assert d.image.image.shape == (3, 4)  # rows: second variable, columns: first
    assert "variants" in d.status.text()
    grab_ok(d, tmp_path, "sweep")


def test_sweep_dialog_cancel(qtbot):
    d = SweepDialog(coarse(FAILING))
    qtbot.addWidget(d)
    d.rows[0][4].setValue(400)
    d.rows[1][0].setChecked(False)
    d.workers.setValue(1)
    d.start()
    d.cancel()
    finish(qtbot, d)
    assert d.status.text() == "Cancelled." and d.result is None


def test_design_menu_and_review_pack(qtbot, tmp_path):
    window = QMainWindow()
    qtbot.addWidget(window)
    p = coarse(PITOT)
    menu = add_design_menu(window, lambda: p)
    assert menu.title() == "&Design"
    texts = [a.text() for a in menu.actions()]
    assert texts == ["Feasible range and optimum…", "Compare with project file…", "Trade sweep…",
                     "Write review pack…", "Engine-face distortion…", "Calibrate against characteristics…"]
    menu.actions()[0].trigger()  # opens the sizing dialog
    assert len(menu.open_dialogs) == 1 and isinstance(menu.open_dialogs[0], SizingDialog)
    menu.open_dialogs[0].close()

    d = ReviewPackDialog(p, tmp_path / "pack", window)
    qtbot.addWidget(d)
    finish(qtbot, d)
    assert (tmp_path / "pack" / "index.html").exists() and d.open_button.isEnabled()
    assert d.result.holds
