"""The "Study" tab: title, notes and the measured characteristics' table (``[characteristics] file``, relative
to the project file, method §17). A table that cannot be read is refused with the loader's ``ProjectError`` in
the editors' red bar and the project is kept.

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

import os
from dataclasses import replace
from pathlib import Path

from PySide6.QtWidgets import (
    QFileDialog,
    QFormLayout,
    QHBoxLayout,
    QLineEdit,
    QPlainTextEdit,
    QPushButton,
    QWidget,
)

from engine_air.project.errors import ProjectError

from .fields import scroll as _scroll


def with_table(project, name: str, project_path):
    """``project`` pointing at the characteristics table ``name`` (relative to the project file; blank: none),
    the table read; ``ProjectError`` when it cannot be."""
    from engine_air.project.load import with_characteristics

    name = name.strip()
    if not name:
        return replace(project, characteristics_file=None, characteristics=None)
    if project_path is None:
        raise ProjectError(f"characteristics file {name!r}: save the project first (the file is named relative "
                           "to the project file)")
    return with_characteristics(replace(project, characteristics_file=name.replace(os.sep, "/")), project_path)


class GeneralTab:
    """The "Study" tab: title, notes and the characteristics table."""

    def _build_general(self) -> None:
        w = QWidget()
        form = QFormLayout(w)
        self.title_edit = QLineEdit()
        self.notes_edit = QPlainTextEdit()
        self.notes_edit.setFixedHeight(110)
        self.title_edit.editingFinished.connect(
            lambda: self.apply_now(lambda p, t=self.title_edit.text(): replace(p, title=t)))
        self.notes_button = QPushButton("Apply notes")
        self.notes_button.clicked.connect(
            lambda: self.apply_now(lambda p, t=self.notes_edit.toPlainText(): replace(p, notes=t)))
        form.addRow("Title", self.title_edit)
        form.addRow("Notes", self.notes_edit)
        form.addRow("", self.notes_button)
        self.characteristics_edit = QLineEdit()
        self.characteristics_edit.setObjectName("characteristicsFile")
        self.characteristics_edit.setPlaceholderText("none: the model throughout")
        self.characteristics_edit.setToolTip("[characteristics] file: the measured characteristics (CSV), relative "
                                             "to the project file. Blank: none.")
        self.characteristics_edit.editingFinished.connect(self._characteristics_edited)
        browse = QPushButton("Browse…")
        browse.clicked.connect(self._browse_characteristics)
        row = QHBoxLayout()
        row.addWidget(self.characteristics_edit, 1)
        row.addWidget(browse)
        form.addRow("Characteristics file", row)
        self.tabs.addTab(_scroll(w), "Study")

    def _load_general(self, p) -> None:
        self.title_edit.setText(p.title)
        self.notes_edit.setPlainText(p.notes)
        self.characteristics_edit.setText(p.characteristics_file or "")

    def _characteristics_edited(self) -> None:
        name = self.characteristics_edit.text().strip()
        if self._project is None or name == (self._project.characteristics_file or ""):
            return
        self.apply_now(lambda p, n=name, at=self.project_path: with_table(p, n, at))

    def _browse_characteristics(self) -> None:
        folder = Path(self.project_path).parent if self.project_path is not None else Path.cwd()
        path, _ = QFileDialog.getOpenFileName(self, "Characteristics table", str(folder), "CSV table (*.csv)")
        if path:
            self.characteristics_edit.setText(os.path.relpath(path, folder).replace(os.sep, "/"))
            self._characteristics_edited()
