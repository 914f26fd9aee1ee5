"""Writing the review pack of a project into a folder, with progress."""

from __future__ import annotations

import os

from PySide6.QtCore import QUrl
from PySide6.QtGui import QDesktopServices
from PySide6.QtWidgets import QLabel, QPushButton, QVBoxLayout

from engine_air.outputs.pack_folder import check_pack_target
from engine_air.outputs.review_pack import write_review_pack
from engine_air.outputs.writer import OutputIsInputError, check_not_input

from .task import TaskDialog


class ReviewPackDialog(TaskDialog):
    """Writes the review pack of a project into a folder, with progress."""

    def __init__(self, project, folder, parent=None, auto_start: bool = True, inputs=()) -> None:
        super().__init__("Design: write review pack", parent)
        self.project = project
        self.inputs = tuple(inputs)  # files the window reads: the pack's folder may not hold one
        self.folder = os.fspath(folder)
        self.resize(560, 150)
        self.path_label = QLabel(f"Folder: {self.folder}")
        self.open_button = QPushButton("Open the page")
        self.open_button.setEnabled(False)
        self.open_button.clicked.connect(self._open)
        layout = QVBoxLayout(self)
        layout.addWidget(self.path_label)
        layout.addLayout(self.button_row())
        layout.addWidget(self.status)
        layout.addWidget(self.open_button)
        self.run_button.setText("Write")
        if auto_start:
            self.start()

    def make_task(self):
        project, folder, inputs = self.project, self.folder, self.inputs
        try:  # before any work: a folder that holds the project, or one the pack may not replace
            check_not_input(folder, inputs, folder=True)
            check_pack_target(folder)
        except (OutputIsInputError, OSError) as exc:
            self._report_error(str(exc))
            return None

        def task(progress, cancelled):
            return write_review_pack(project, folder, progress=progress, cancelled=cancelled, inputs=inputs)

        return task

    def show_result(self, pack) -> None:
        self.status.setText(f"Wrote {pack.index_path} and {os.path.basename(pack.pdf_path)} ({len(pack.pictures)} "
                            f"maps, {len(pack.section_pictures)} sections). Verdict: "
                            + ("every limit holds." if pack.holds else "<b>some limit FAILS</b>."))
        self.open_button.setEnabled(True)

    def _open(self) -> None:
        if self.result is not None:
            QDesktopServices.openUrl(QUrl.fromLocalFile(self.result.index_path))
