"""The current project against another project file: both maps, their difference, both verdicts."""

from __future__ import annotations

import math
import os

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QRectF
from PySide6.QtGui import QColor
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QHeaderView, QLabel, QTableWidget, QVBoxLayout

from engine_air.studies.compare import DIFFERENCE_QUANTITIES, compare_projects
from engine_air.envelope.evaluate import Cancelled
from engine_air.outputs.colours import OUTSIDE_GREY, levels_for
from engine_air.project.toml_file import load_project
from engine_air.outputs.quantities import QUANTITIES

from .common import colour_map, fmt, plain_axes, table_item, verdict_item
from .task import TaskDialog


def _verdict_cell(summary):
    """holds / FAILS / not judged anywhere (a limit judged at no envelope point) / – (no such check)."""
    if summary is not None and not summary.judged:
        return table_item(summary.verdict)
    return verdict_item(None if summary is None else summary.holds)


class MapPlot(pg.GraphicsLayoutWidget):
    """One map: an image over Mach x altitude with a colour bar."""

    def __init__(self, title: str) -> None:
        super().__init__()
        self.setBackground("w")
        self.plot = self.addPlot(row=0, col=0, title=title)
        self.plot.setLabel("bottom", "flight Mach number")
        self.plot.setLabel("left", "altitude (m)")
        plain_axes(self.plot)
        self.plot.getViewBox().setBackgroundColor(QColor(*OUTSIDE_GREY))
        self.plot.setMenuEnabled(False)
        self.image = pg.ImageItem(axisOrder="row-major")
        self.image.setOpts(nanPolicy="omit")
        self.plot.addItem(self.image)
        # second cue besides colour: a small cross on every point where some limit fails
        self.fail_marks = pg.ScatterPlotItem(symbol="x", size=4, pen=pg.mkPen((25, 25, 25), width=1), brush=None)
        self.plot.addItem(self.fail_marks)
        self.bar = pg.ColorBarItem(values=(0.0, 1.0), colorMap=colour_map("level"), interactive=False, width=16,
                                   colorMapMenu=False)
        self.bar.setImageItem(self.image)
        self.addItem(self.bar, row=0, col=1)
        self.setMinimumSize(300, 260)

    def display(self, values: np.ndarray, mach: np.ndarray, alt: np.ndarray, kind: str, levels,
                failing: np.ndarray | None = None) -> None:
        """Show ``values`` (altitude x Mach); ``failing`` (bool, same shape) gets a cross per point."""
        if failing is not None and failing.any():
            step = max(1, int(math.ceil(math.sqrt(failing.size / 6000.0))))  # at most ~6000 crosses
            sub = np.zeros_like(failing)
            sub[::step, ::step] = True
            i, j = np.nonzero(failing & sub)
            self.fail_marks.setData(mach[j], alt[i])
        else:
            self.fail_marks.setData([], [])
        self.bar.setColorMap(colour_map(kind))
        self.bar.setLevels(values=levels)
        self.image.setImage(np.asarray(values, float), autoLevels=False, levels=levels)
        dx = (mach[-1] - mach[0]) / max(1, len(mach) - 1)
        dy = (alt[-1] - alt[0]) / max(1, len(alt) - 1)
        self.image.setRect(QRectF(mach[0] - dx / 2, alt[0] - dy / 2, mach[-1] - mach[0] + dx, alt[-1] - alt[0] + dy))
        self.plot.autoRange(padding=0.02)


class CompareDialog(TaskDialog):
    """The current project (A) against a project file (B): maps, difference map, verdicts."""

    def __init__(self, project, other_path, parent=None) -> None:
        super().__init__("Design: compare with another project", parent)
        self.project = project
        self.other_path = os.fspath(other_path)
        self.resize(1320, 820)
        top = QHBoxLayout()
        top.addWidget(QLabel(f"A: {project.title or 'current project'}   ·   B: {os.path.basename(self.other_path)}"),
                      1)
        self.grid_from = QComboBox()
        for key, text in (("a", "grid of A"), ("b", "grid of B"), ("union", "union of both envelopes")):
            self.grid_from.addItem(text, key)
        self.case = QComboBox()
        self.case.setSizeAdjustPolicy(QComboBox.AdjustToContents)
        self.case.setMinimumContentsLength(18)
        self.quantity = QComboBox()
        for key in DIFFERENCE_QUANTITIES:
            self.quantity.addItem(QUANTITIES[key].label, key)
        top.addWidget(QLabel("grid"))
        top.addWidget(self.grid_from)
        top.addWidget(QLabel("case"))
        top.addWidget(self.case)
        top.addWidget(QLabel("quantity"))
        top.addWidget(self.quantity)
        self.map_a = MapPlot("A")
        self.map_b = MapPlot("B")
        self.map_d = MapPlot("B − A")
        maps = QHBoxLayout()
        for m in (self.map_a, self.map_b, self.map_d):
            maps.addWidget(m)
        self.stats = QLabel("")
        self.stats.setWordWrap(True)
        self.stats.setMinimumHeight(3 * self.stats.fontMetrics().lineSpacing() + 6)  # up to 3 wrapped lines
        self.verdicts = QTableWidget(0, 6)
        self.verdicts.setHorizontalHeaderLabels(["limit", "A", "A worst margin", "B", "B worst margin", "change"])
        self.verdicts.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.verdicts.horizontalHeader().setStretchLastSection(True)
        self.verdicts.verticalHeader().setVisible(False)
        self.verdicts.setMaximumHeight(190)
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addLayout(self.button_row())
        layout.addWidget(self.status)
        layout.addLayout(maps, 3)
        layout.addWidget(self.stats)
        layout.addWidget(self.verdicts, 1)
        self.run_button.setText("Compare")
        self.case.currentIndexChanged.connect(self._redraw)
        self.quantity.currentIndexChanged.connect(self._redraw)
        self.grid_from.currentIndexChanged.connect(self.start)

    def make_task(self):
        project, path, grid_from = self.project, self.other_path, self.grid_from.currentData()

        def task(progress, cancelled):
            other = load_project(path)
            progress(0.2)
            if cancelled():
                raise Cancelled()
            result = compare_projects(project, other, grid_from=grid_from)
            progress(1.0)
            return result

        return task

    def show_result(self, result) -> None:
        keep = self.case.currentText()
        self.case.blockSignals(True)
        self.case.clear()
        self.case.addItems(result.cases)
        index = self.case.findText(keep)
        self.case.setCurrentIndex(index if index >= 0 else len(result.cases) - 1)
        self.case.blockSignals(False)
        rows = result.verdicts
        self.verdicts.setRowCount(len(rows))
        for r, row in enumerate(rows):
            self.verdicts.setItem(r, 0, table_item(row.label))
            self.verdicts.setItem(r, 1, _verdict_cell(row.a))
            self.verdicts.setItem(r, 2, table_item(fmt(None if row.a is None else row.a.worst_margin), True))
            self.verdicts.setItem(r, 3, _verdict_cell(row.b))
            self.verdicts.setItem(r, 4, table_item(fmt(None if row.b is None else row.b.worst_margin), True))
            self.verdicts.setItem(r, 5, table_item(row.change))
        extra = []
        if result.only_a:
            extra.append("cases only in A: " + ", ".join(result.only_a))
        if result.only_b:
            extra.append("cases only in B: " + ", ".join(result.only_b))
        self.status.setText(
            f"A {'holds' if result.holds_a else '<b>FAILS</b>'}, B {'holds' if result.holds_b else '<b>FAILS</b>'}"
            + (" — identical results." if result.identical else ".") + ("  " + "; ".join(extra) if extra else ""))
        self._redraw()

    def _redraw(self) -> None:
        c = self.result
        if c is None or not self.case.currentText():
            return
        case, key = self.case.currentText(), self.quantity.currentData()
        kind = QUANTITIES[key].kind
        levels = c.shared_levels(case, key)
        self.map_a.display(c.value("a", case, key), c.mach, c.altitude_m, kind, levels, c.result_a.failing(case))
        self.map_b.display(c.value("b", case, key), c.mach, c.altitude_m, kind, levels, c.result_b.failing(case))
        d = c.difference(case, key)
        lo, hi = levels_for("margin", d)
        if lo == -1.0 and hi == 1.0 and np.nanmax(np.abs(np.nan_to_num(d))) == 0.0:
            lo, hi = -1e-9, 1e-9  # identical: a flat white map
        self.map_d.display(d, c.mach, c.altitude_m, "margin", (lo, hi))
        s = c.stat(case, key)
        where = (f", largest |B − A| at Mach {s.max_abs_mach:.3f}, {s.max_abs_altitude_m:.0f} m"
                 if s.points and s.max_abs > 0 else "")
        data = ""
        if c.has_data:  # the differences where a characteristics table decides the match (method §17)
            r = c.data_stat(case, key)
            data = f" Where a characteristics table decides ({r.points} points): from {fmt(r.min)} to {fmt(r.max)}."
        self.stats.setText(f"{QUANTITIES[key].label}, case {case}: B − A from {fmt(s.min)} to {fmt(s.max)} "
                           f"over {s.points} points both judge (inside both envelopes and the case's region){where}."
                           f"{data} A and B share one colour scale; "
                           "crosses mark points where some limit fails; grey is outside the envelope.")
