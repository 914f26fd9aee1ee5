"""The "Study" tab: title and notes.

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtWidgets import (
    QFormLayout,
    QLineEdit,
    QPlainTextEdit,
    QPushButton,
    QWidget,
)

from .fields import scroll as _scroll
class GeneralTab:
    """The "Study" tab: title and notes."""

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
        self.tabs.addTab(_scroll(w), "Study")

    def _load_general(self, p) -> None:
        self.title_edit.setText(p.title)
        self.notes_edit.setPlainText(p.notes)
