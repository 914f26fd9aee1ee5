"""The "Grid" tab: grid points along Mach and altitude.

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtWidgets import (
    QFormLayout,
    QLabel,
    QSpinBox,
    QWidget,
)

from engine_air.project import schema as S

from .fields import MAX_GRID, scroll as _scroll, tooltip as _tooltip
class GridTab:
    """The "Grid" tab: grid points along Mach and altitude."""

    def _build_grid(self) -> None:
        w = QWidget()
        form = QFormLayout(w)
        self.mach_points = QSpinBox()
        self.alt_points = QSpinBox()
        for s, name in ((self.mach_points, "mach_points"), (self.alt_points, "altitude_points")):
            f = S.field(f"grid.{name}")
            s.setRange(int(f.lo), int(f.hi))
            s.setToolTip(_tooltip(f))
            s.setKeyboardTracking(True)
            s.valueChanged.connect(lambda v, n=name: self.queue(
                lambda p: replace(p, grid=replace(p.grid, **{n: int(v)}))))
            s.valueChanged.connect(lambda _v: self._grid_note_update())
        self.grid_note = QLabel("")
        self.grid_note.setWordWrap(True)
        form.addRow("Mach points", self.mach_points)
        form.addRow("Altitude points", self.alt_points)
        form.addRow(self.grid_note)
        self.tabs.addTab(_scroll(w), "Grid")

    def _grid_note_update(self) -> None:
        n = self.mach_points.value() * self.alt_points.value()
        text = f"{n:,} points per case (at most {MAX_GRID:,}).".replace(",", " ")
        if n > MAX_GRID:
            text += " Too many: this grid is not applied."
        self.grid_note.setText(text)

    def _load_grid(self, p) -> None:
        self.mach_points.setValue(p.grid.mach_points)
        self.alt_points.setValue(p.grid.altitude_points)
        self._grid_note_update()
