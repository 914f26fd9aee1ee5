"""Engine-face distortion of a rake file (method §18): a face picture of each rake point, its ring table and
the surge-margin stack-up as a waterfall against the required minimum.

The drawings are those of ``engine_air.distortion.pictures`` (matplotlib) in a Qt canvas. The rake file is read
and reduced by ``engine_air.distortion`` before the dialog opens (``open_rakes``): a bad file raises
``ProjectError`` and the caller shows it, the open project untouched. Descriptors after SAE ARP1420 and the
stack-up after SAE AIR1419, recalled in method §18, not copied.
"""

from __future__ import annotations

import os

import numpy as np
from PySide6.QtWidgets import (QComboBox, QDialog, QHBoxLayout, QHeaderView, QLabel, QMessageBox, QSplitter,
                               QTableWidget, QVBoxLayout, QWidget)
from PySide6.QtCore import Qt

from engine_air.distortion.assessment import assess
from engine_air.distortion.descriptors import reduce_rakes
from engine_air.distortion.pictures import draw_face, draw_stack_up
from engine_air.distortion.rake import read_rake_set
from engine_air.project.errors import ProjectError

from .common import fmt, table_item, verdict_item

RING_COLUMNS = ("ring", "PAV (Pa)", "ΔPC/P", "extent (deg)", "MPR", "ΔPR/P", "low arcs (deg)")


def _canvas(width: float, height: float):
    from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), dpi=100, layout="constrained")
    return FigureCanvasQTAgg(fig)


def open_rakes(path, project):
    """The reduced rake file judged against ``project``: an ``Assessment``; ``ProjectError`` for a bad file."""
    rakes = read_rake_set(path)
    return assess(reduce_rakes(rakes), project)


def stability_ratings(project) -> list[str]:
    return [] if project is None else [r.name for r in project.ratings if r.stability is not None]


class DistortionDialog(QDialog):
    """One rake file: choose a point (and a rating with a stability table); see its face, rings and stack-up."""

    def __init__(self, project, assessment, parent=None) -> None:
        super().__init__(parent)
        self.project = project
        self.assessment = assessment
        d = assessment.descriptors
        self.setWindowTitle(f"Engine-face distortion — {os.path.basename(d.rakes.path or 'rakes')}")
        self.point_box = QComboBox()
        self.point_box.addItems(list(d.rakes.labels))
        self.rating_box = QComboBox()
        self.rating_box.addItems(stability_ratings(project) or ["(no [engine.rating.stability] in the project)"])
        self.rating_box.setEnabled(bool(stability_ratings(project)))
        self.summary = QLabel()
        self.summary.setWordWrap(True)
        self.summary.setTextFormat(Qt.RichText)
        self.face = _canvas(4.6, 4.4)
        self.stack = _canvas(6.0, 3.0)
        self.rings = QTableWidget(0, len(RING_COLUMNS))
        self.rings.setHorizontalHeaderLabels(list(RING_COLUMNS))
        self.rings.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.rings.horizontalHeader().setStretchLastSection(True)
        self.rings.verticalHeader().setVisible(False)
        self.verdicts = QTableWidget(0, 3)
        self.verdicts.setHorizontalHeaderLabels(["limit", "verdict", "failing points"])
        self.verdicts.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.verdicts.horizontalHeader().setStretchLastSection(True)
        self.verdicts.verticalHeader().setVisible(False)
        self.verdicts.setMaximumHeight(90)
        self._layout()
        self.point_box.currentIndexChanged.connect(lambda _i: self.show_point())
        self.rating_box.currentIndexChanged.connect(lambda _i: self._rating_changed())
        self.resize(1180, 820)
        self._show_verdicts()
        self.show_point()

    def _layout(self) -> None:
        top = QHBoxLayout()
        top.addWidget(QLabel("Rake point"))
        top.addWidget(self.point_box, 1)
        top.addWidget(QLabel("Stack-up of rating"))
        top.addWidget(self.rating_box, 1)
        right = QWidget()
        col = QVBoxLayout(right)
        col.setContentsMargins(0, 0, 0, 0)
        col.addWidget(self.summary)
        col.addWidget(self.rings, 1)
        col.addWidget(QLabel("Project limits over every point of the file"))
        col.addWidget(self.verdicts)
        upper = QSplitter(Qt.Horizontal)
        upper.addWidget(self.face)
        upper.addWidget(right)
        upper.setSizes([520, 640])
        whole = QSplitter(Qt.Vertical)
        whole.addWidget(upper)
        whole.addWidget(self.stack)
        whole.setSizes([520, 300])
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addWidget(whole, 1)

    def _rating_changed(self) -> None:
        names = stability_ratings(self.project)
        if not names:
            return
        try:
            assessment = assess(self.assessment.descriptors, self.project, names[self.rating_box.currentIndex()])
        except ProjectError as exc:  # e.g. that rating's sensitivities are for another number of rings
            QMessageBox.warning(self, "Engine-face distortion", f"The stack-up of this rating cannot be used:\n{exc}")
            return
        self.assessment = assessment
        self._show_verdicts()
        self.show_point()

    def _show_verdicts(self) -> None:
        labels = self.assessment.descriptors.rakes.labels
        verdicts = self.assessment.verdicts
        self.verdicts.setRowCount(len(verdicts))
        for k, v in enumerate(verdicts):
            failing = [labels[i] for i in np.flatnonzero(v.fails)]
            self.verdicts.setItem(k, 0, table_item(v.limit_text))
            self.verdicts.setItem(k, 1, verdict_item(v.holds))
            self.verdicts.setItem(k, 2, table_item(", ".join(failing) or "–"))

    def show_point(self) -> None:
        k = max(self.point_box.currentIndex(), 0)
        a = self.assessment
        d = a.descriptors
        g, row = d.where(k)
        fig = self.face.figure
        fig.clear()
        ax = fig.add_subplot(1, 1, 1)
        filled = draw_face(ax, g, row, d.sector_deg, d.rakes.labels[k])
        fig.colorbar(filled, ax=ax, shrink=0.8, label="p_t / PFAV")
        self.face.draw_idle()
        self._fill_rings(g, row)
        self.summary.setText(
            f"<b>{d.rakes.labels[k]}</b>: PFAV {g.face_average_pa[row]:.1f} Pa; DC({d.sector_deg:g}) "
            f"{fmt(g.dc[row], '.4f')}; worst {d.sector_deg:g}° sector from {g.sector_start_deg[row]:.1f}° "
            f"(dashed); low arcs drawn black on each ring. ΔPRS {fmt(a.surge_margin_loss[k], '.4f')}, remaining "
            f"surge margin {fmt(a.remaining_surge_margin[k], '.4f')}.")
        self._draw_stack(k)

    def _fill_rings(self, g, row: int) -> None:
        self.rings.setRowCount(g.group.rings)
        arcs = g.arcs
        for i in range(g.group.rings):
            present = np.flatnonzero(~np.isnan(arcs.start_deg[row, i]))
            spans = "; ".join(f"{arcs.start_deg[row, i, j] % 360:.1f}–{arcs.end_deg[row, i, j] % 360:.1f}"
                              for j in present) or "–"
            cells = [str(i + 1), f"{g.ring_average_pa[row, i]:.1f}", f"{g.circumferential_intensity[row, i]:.5f}",
                     f"{g.extent_deg[row, i]:.2f}", f"{g.multiple_per_rev[row, i]:.3f}",
                     f"{g.radial_intensity[row, i]:+.5f}", spans]
            for c, text in enumerate(cells):
                self.rings.setItem(i, c, table_item(text, numeric=0 < c < 6))

    def _draw_stack(self, k: int) -> None:
        a = self.assessment
        fig = self.stack.figure
        fig.clear()
        ax = fig.add_subplot(1, 1, 1)
        if a.stability is None:
            ax.set_axis_off()
            ax.text(0.5, 0.5, "No surge-margin stack-up: the project has no [engine.rating.stability] table",
                    ha="center", va="center", transform=ax.transAxes)
        else:
            minimum = None if self.project is None else self.project.limits.surge_margin_min
            draw_stack_up(ax, a.stability.available_surge_margin, float(a.surge_margin_loss[k]),
                          a.stability.other_losses, minimum,
                          f"surge-margin stack-up, rating {a.rating!r}, point {a.descriptors.rakes.labels[k]!r}")
        self.stack.draw_idle()
