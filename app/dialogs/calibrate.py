"""Calibrating the model against the project's characteristics table (method §17), with a picture of the fit.

The fit runs on the worker (``TaskDialog``); the calibrated project is written only when the user asks, as a new
file chosen in a save dialog, never over the project it came from.
"""

from __future__ import annotations

import io
import os

from PySide6.QtCore import Qt
from PySide6.QtGui import QPixmap
from PySide6.QtWidgets import (QCheckBox, QFileDialog, QHBoxLayout, QLabel, QMessageBox, QPushButton, QTableWidget,
                               QTableWidgetItem, QVBoxLayout)

from engine_air.studies.calibrate import FITTABLE, calibrate
from engine_air.project.errors import ProjectError

from .task import TaskDialog

LABELS = {
    "duct_loss_coefficient": "duct loss coefficient K",
    "internal_recovery_factor": "internal recovery factor (mixed compression)",
    "stable_flow_fraction": "stable flow fraction (buzz limit)",
}


def fittable_keys(project) -> list[str]:
    """The keys that mean something for this project's inlet type."""
    return [k for k in FITTABLE if k != "internal_recovery_factor" or project.inlet.type == "mixed-compression"]


class FittedPicture(QLabel):
    """A picture scaled to the label's size, keeping its aspect ratio (rescaled when the dialog is resized)."""

    def __init__(self) -> None:
        super().__init__()
        self.setAlignment(Qt.AlignCenter)
        self.setMinimumSize(320, 200)
        self.original = QPixmap()

    def set_png(self, data: bytes) -> None:
        self.original.loadFromData(data, "PNG")
        self._rescale()

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt's name
        super().resizeEvent(event)
        self._rescale()

    def _rescale(self) -> None:
        if not self.original.isNull():
            self.setPixmap(self.original.scaled(self.size(), Qt.KeepAspectRatio, Qt.SmoothTransformation))


class CalibrateDialog(TaskDialog):
    """Fit chosen model parameters to the zero-incidence rows of the characteristics table."""

    def __init__(self, project, project_path: str | None = None, parent=None) -> None:
        super().__init__("Design: calibrate against characteristics", parent)
        self.project = project
        self.project_path = project_path
        self.resize(980, 760)
        layout = QVBoxLayout(self)
        table = project.characteristics.table
        layout.addWidget(QLabel(f"Table: {table.path} ({table.rows} rows, {project.characteristics.count} curves). "
                                "Fitted against the zero-incidence rows."))
        self.boxes = {}
        row = QHBoxLayout()
        for key in fittable_keys(project):
            box = QCheckBox(LABELS[key])
            box.setChecked(key == "duct_loss_coefficient")
            self.boxes[key] = box
            row.addWidget(box)
        row.addStretch(1)
        layout.addLayout(row)
        layout.addLayout(self.button_row())
        layout.addWidget(self.status)
        self.results = QTableWidget(0, 3)
        self.results.setHorizontalHeaderLabels(["quantity", "value", "standard error / rms residual"])
        self.results.horizontalHeader().setStretchLastSection(True)
        self.results.setMinimumHeight(130)
        self.results.setMaximumHeight(190)
        layout.addWidget(self.results)
        self.picture = FittedPicture()
        layout.addWidget(self.picture, 1)
        self.save_button = QPushButton("Save calibrated project as…")
        self.save_button.setEnabled(False)
        self.save_button.clicked.connect(self.save_as)
        layout.addWidget(self.save_button)
        self.run_button.setText("Fit")

    def chosen(self) -> list[str]:
        return [k for k, box in self.boxes.items() if box.isChecked()]

    def make_task(self):
        keys = self.chosen()
        if not keys:
            self._report_error("Tick at least one parameter to fit.")
            return None
        project = self.project

        def task(progress, cancelled):
            progress(0.1)
            result = calibrate(project, project.characteristics.table, keys)
            progress(1.0)
            return result

        return task

    def show_result(self, result) -> None:
        rows = [(LABELS.get(k, k), f"{v:.5g}", f"± {e:.2g}") for k, (v, e) in result.fitted.items()]
        rows.append(("rms residual, all curves", f"{result.rms_residual:.5f}", ""))
        rows += [(f"curve M {c['mach']:g}, alpha {c['alpha_deg']:g}, beta {c['beta_deg']:g}", "",
                  f"rms {c['rms_residual']:.5f}") for c in result.curves]
        self.results.setRowCount(len(rows))
        for i, cells in enumerate(rows):
            for j, text in enumerate(cells):
                self.results.setItem(i, j, QTableWidgetItem(text))
        self.results.resizeColumnsToContents()
        from engine_air.outputs.characteristic_picture import calibration_figure

        buffer = io.BytesIO()
        calibration_figure(result, self.project.title).savefig(buffer, format="png")
        self.picture.set_png(buffer.getvalue())
        self.status.setText("Fitted. Save the calibrated project as a new file to use it.")
        self.save_button.setEnabled(True)

    def save_as(self) -> None:
        if self.result is None:
            return
        path, _ = QFileDialog.getSaveFileName(self, "Save calibrated project as", "",
                                              "engine-air projects (*.toml)")
        if not path:
            return
        if self.project_path and os.path.exists(path) and os.path.samefile(path, self.project_path):
            QMessageBox.warning(self, "Calibrate", "The calibrated project is always a new file: choose another "
                                                   "name than the open project's.")
            return
        from engine_air.project.save import save_project

        try:
            save_project(self.result.project, path)
        except (OSError, ProjectError) as exc:
            QMessageBox.warning(self, "Calibrate", f"Could not save: {exc}")
            return
        self.status.setText(f"Wrote {path}.")
