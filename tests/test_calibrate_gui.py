"""The calibration dialog (method §17): it fits on the worker, shows the fitted values and the residuals, and
writes the calibrated project only as a new file. Reference: the invented sample table was made from the model
with duct_loss_coefficient 0.07 (sample_projects/tunnel_data/make_tunnel_characteristics.py)."""

from __future__ import annotations

import pathlib

import pytest

from engine_air.project.load import load_project

pytest.importorskip("PySide6")

from app.dialogs.calibrate import CalibrateDialog  # noqa: E402

SAMPLE = pathlib.Path(__file__).resolve().parent.parent / "sample_projects" / "tunnel_data" / \
    "two_ramp_with_tunnel_data.toml"


def test_calibration_dialog_fits_and_saves_a_new_file(qtbot, tmp_path, monkeypatch):
    project = load_project(SAMPLE)
    dialog = CalibrateDialog(project, str(SAMPLE))
    qtbot.addWidget(dialog)
    dialog.start()
    qtbot.waitUntil(lambda: dialog.result is not None or bool(dialog.last_error), timeout=60000)
    assert not dialog.last_error
    value, error = dialog.result.fitted["duct_loss_coefficient"]
    assert abs(value - 0.07) < 3 * error
    assert dialog.results.rowCount() >= 2 + 7
    assert not dialog.picture.pixmap().isNull()
    dialog.grab().save(str(tmp_path / "calibrate.png"))
    # the open project's own file is refused; a new file is written and reads back with the fitted value
    from PySide6.QtWidgets import QFileDialog, QMessageBox

    warned = []
    monkeypatch.setattr(QMessageBox, "warning", lambda *a, **k: warned.append(a))
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(SAMPLE), ""))
    before = SAMPLE.read_bytes()
    dialog.save_as()
    assert warned and SAMPLE.read_bytes() == before
    target = tmp_path / "calibrated.toml"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    dialog.save_as()
    again = load_project(target)
    assert again.inlet.duct_loss_coefficient == pytest.approx(value)
    assert again.characteristics is not None and again.characteristics.count == project.characteristics.count
