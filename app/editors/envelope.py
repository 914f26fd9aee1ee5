"""The "Envelope" tab: the polygon vertices (Mach, altitude).

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtWidgets import (
    QHBoxLayout,
    QLabel,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from .widgets import CellError, cell_si, make_table, number_item


class EnvelopeTab:
    """The "Envelope" tab: the polygon vertices (Mach, altitude)."""

    def _build_envelope(self) -> None:
        w = QWidget()
        lay = QVBoxLayout(w)
        self.envelope_table = make_table(["Flight Mach M0", "Altitude"])
        self.envelope_table.cellChanged.connect(lambda _r, _c: self._envelope_changed())
        lay.addWidget(QLabel("Vertices in order around the boundary; the polygon closes itself."))
        lay.addWidget(self.envelope_table, 1)
        buttons = QHBoxLayout()
        add, remove = QPushButton("Insert vertex"), QPushButton("Remove vertex")
        add.clicked.connect(self._add_vertex)
        remove.clicked.connect(self._remove_vertex)
        buttons.addWidget(add)
        buttons.addWidget(remove)
        lay.addLayout(buttons)
        self.tabs.addTab(w, "Envelope")

    def _load_envelope(self, p) -> None:
        t, u = self.envelope_table, self._units
        t.blockSignals(True)
        t.setHorizontalHeaderLabels(["Flight Mach M0", u.with_unit("Pressure altitude", "altitude")])
        t.setRowCount(len(p.envelope.mach))
        for k, (m, h) in enumerate(zip(p.envelope.mach, p.envelope.altitude_m)):
            t.setItem(k, 0, number_item(m, "none", u))
            t.setItem(k, 1, number_item(h, "altitude", u))
        t.blockSignals(False)

    def _envelope_changed(self) -> None:
        if self._loading:
            return
        t, u = self.envelope_table, self._units
        try:
            mach = tuple(cell_si(t, r, 0, "none", u, "Mach") for r in range(t.rowCount()))
            alt = tuple(cell_si(t, r, 1, "altitude", u, "altitude") for r in range(t.rowCount()))
        except CellError as exc:
            self.show_error(str(exc))
            return
        self.apply_now(lambda p: replace(p, envelope=replace(p.envelope, mach=mach, altitude_m=alt)))

    def _add_vertex(self) -> None:
        row = self.envelope_table.currentRow()

        def change(p):
            m, h = list(p.envelope.mach), list(p.envelope.altitude_m)
            k = row if 0 <= row < len(m) else len(m) - 1
            k2 = (k + 1) % len(m)
            m.insert(k + 1, (m[k] + m[k2]) / 2)
            h.insert(k + 1, (h[k] + h[k2]) / 2)
            return replace(p, envelope=replace(p.envelope, mach=tuple(m), altitude_m=tuple(h)))

        if self.apply_now(change):
            self._load_envelope(self._project)

    def _remove_vertex(self) -> None:
        row = self.envelope_table.currentRow()

        def change(p):
            m, h = list(p.envelope.mach), list(p.envelope.altitude_m)
            k = row if 0 <= row < len(m) else len(m) - 1
            del m[k], h[k]
            return replace(p, envelope=replace(p.envelope, mach=tuple(m), altitude_m=tuple(h)))

        if self.apply_now(change):
            self._load_envelope(self._project)
