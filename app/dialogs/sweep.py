"""A full factorial trade sweep of 1 to 4 design variables: a table of variants and, for two, an image."""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QRectF, Qt
from PySide6.QtWidgets import (
    QAbstractItemView,
    QCheckBox,
    QComboBox,
    QFormLayout,
    QGridLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QSpinBox,
    QSplitter,
    QTableWidget,
    QVBoxLayout,
)

from engine_air.outputs.colours import levels_for
from engine_air.studies.sizing import default_search_range, design_variables, variable_label, variable_unit
from engine_air.studies.sweep import MAX_VALUES_PER_VARIABLE, MAX_VARIABLES, sweep

from .common import case_names, colour_map, fmt, plain_axes, spin_box, table_item, verdict_item
from .task import TaskDialog


class SweepDialog(TaskDialog):
    """A full factorial trade sweep of 1 to 4 design variables."""

    def __init__(self, project, parent=None) -> None:
        super().__init__("Design: trade sweep", parent)
        self.project = project
        self.resize(1280, 820)
        names = design_variables(project)
        grid = QGridLayout()
        grid.addWidget(QLabel("vary"), 0, 0)
        grid.addWidget(QLabel("design variable"), 0, 1)
        grid.addWidget(QLabel("from"), 0, 2)
        grid.addWidget(QLabel("to"), 0, 3)
        grid.addWidget(QLabel("values"), 0, 4)
        self.rows = []
        for k in range(MAX_VARIABLES):
            use = QCheckBox()
            combo = QComboBox()
            for name in names:
                unit = variable_unit(name)
                combo.addItem(f"{variable_label(name)} — {name}" + (f" [{unit}]" if unit else ""), name)
            combo.setCurrentIndex(min(k, len(names) - 1))
            lo, hi = spin_box(0.0, 1e6, 0.0), spin_box(0.0, 1e6, 1.0)
            n = QSpinBox()
            n.setRange(1, MAX_VALUES_PER_VARIABLE)
            n.setValue(5)
            use.setChecked(k < 2)
            for col, w in enumerate((use, combo, lo, hi, n)):
                grid.addWidget(w, k + 1, col)
            row = (use, combo, lo, hi, n)
            self.rows.append(row)
            combo.currentIndexChanged.connect(lambda _=0, r=row: self._defaults(r))
            self._defaults(row)
        box = QGroupBox("Variables (every combination is evaluated over the whole envelope and every case)")
        box.setLayout(grid)
        run_form = QFormLayout()
        self.workers = QSpinBox()
        self.workers.setRange(0, 256)
        self.workers.setValue(0)
        self.workers.setSpecialValueText("all cores")
        self.scheduler = QLineEdit()
        self.scheduler.setPlaceholderText("optional dask scheduler, e.g. tcp://127.0.0.1:8786")
        self.cruise = QCheckBox("spillage at the point")
        self.cruise_mach = spin_box(0.0, 6.0, 0.8, 3, 0.05)
        self.cruise_alt = spin_box(-5000.0, 84000.0, 11000.0, 0, 500.0)
        self.cruise_case = QComboBox()
        self.cruise_case.addItems(case_names(project))
        cruise = QHBoxLayout()
        for w in (self.cruise, QLabel("Mach"), self.cruise_mach, QLabel("altitude (m)"), self.cruise_alt,
                  QLabel("case"), self.cruise_case):
            cruise.addWidget(w)
        run_form.addRow("Local processes", self.workers)
        run_form.addRow("Cluster", self.scheduler)
        run_form.addRow("Cruise point", cruise)

        self.table = QTableWidget(0, 0)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setSortingEnabled(False)
        self.canvas = pg.GraphicsLayoutWidget()
        self.canvas.setBackground("w")
        self.plot = self.canvas.addPlot(row=0, col=0, title="worst relative margin (zero contour: feasible boundary)")
        self.plot.setMenuEnabled(False)
        plain_axes(self.plot)
        self.image = pg.ImageItem(axisOrder="row-major")
        self.image.setOpts(nanPolicy="omit")
        self.plot.addItem(self.image)
        self.contour = pg.PlotDataItem(pen=pg.mkPen((20, 20, 20), width=2), connect="pairs")
        self.plot.addItem(self.contour)
        self.bar = pg.ColorBarItem(values=(-1, 1), colorMap=colour_map("margin"), interactive=False, width=16,
                                   colorMapMenu=False)
        self.bar.setImageItem(self.image)
        self.canvas.addItem(self.bar, row=0, col=1)
        self.canvas.setMinimumWidth(380)
        split = QSplitter(Qt.Horizontal)
        split.addWidget(self.table)
        split.addWidget(self.canvas)
        split.setSizes([640, 620])

        layout = QVBoxLayout(self)
        layout.addWidget(box)
        layout.addLayout(run_form)
        layout.addLayout(self.button_row())
        layout.addWidget(self.status)
        layout.addWidget(split, 1)
        self.canvas.setVisible(False)

    def _defaults(self, row) -> None:
        _, combo, lo_spin, hi_spin, _n = row
        name = combo.currentData()
        lo, hi = default_search_range(self.project, name)
        for s in (lo_spin, hi_spin):
            s.setSingleStep(max((hi - lo) / 50.0, 1e-6))
        lo_spin.setValue(lo)
        hi_spin.setValue(hi)

    def variables(self) -> list[tuple[str, np.ndarray]]:
        """The chosen variables and their values."""
        out = []
        for use, combo, lo, hi, n in self.rows:
            if use.isChecked():
                out.append((combo.currentData(), np.linspace(lo.value(), hi.value(), n.value())))
        return out

    def make_task(self):
        variables = self.variables()
        if not variables:
            self._report_error("choose at least one design variable")
            return None
        names = [v for v, _ in variables]
        if len(set(names)) != len(names):
            self._report_error("each design variable may be varied once")
            return None
        project = self.project
        workers = self.workers.value() or None
        scheduler = self.scheduler.text().strip() or None
        cruise = (self.cruise_mach.value(), self.cruise_alt.value(), self.cruise_case.currentText()) \
            if self.cruise.isChecked() else None

        def task(progress, cancelled):
            return sweep(project, variables, cruise=cruise, workers=workers, scheduler=scheduler,
                         progress=progress, cancelled=cancelled)

        return task

    def show_result(self, result) -> None:
        units = [variable_unit(v) for v in result.variables]
        heads = [f"{v} [{u}]" if u else v for v, u in zip(result.variables, units)]
        heads += ["verdict", "worst rel. margin", "worst check", "worst point", "face Mach margin",
                  "cruise spillage", "note"]
        self.table.clear()
        self.table.setColumnCount(len(heads))
        self.table.setHorizontalHeaderLabels(heads)
        self.table.setRowCount(len(result.rows))
        nv = len(result.variables)
        for r, row in enumerate(result.rows):
            for c, v in enumerate(row.values):
                self.table.setItem(r, c, table_item(f"{v:.6g}", True))
            verdict = None if row.verdict == "invalid" else row.holds
            self.table.setItem(r, nv, verdict_item(verdict) if verdict is not None else table_item("invalid"))
            self.table.setItem(r, nv + 1, table_item(fmt(row.worst_relative_margin, "+.4f"), True))
            self.table.setItem(r, nv + 2, table_item(row.worst_label or "–"))
            point = (f"M {row.worst_mach:.3f}, {row.worst_altitude_m:.0f} m, {row.worst_case}"
                     if row.worst_check else "–")
            self.table.setItem(r, nv + 3, table_item(point))
            self.table.setItem(r, nv + 4, table_item(fmt(row.worst_face_mach_margin, "+.4f"), True))
            self.table.setItem(r, nv + 5, table_item(fmt(row.cruise_spillage_fraction, ".4f"), True))
            self.table.setItem(r, nv + 6, table_item(row.message))
        self.table.resizeColumnsToContents()
        holds = result.count("holds")
        self.status.setText(f"{len(result.rows)} variants in {result.seconds:.2f} s ({result.mode}, "
                            f"{result.workers or 'cluster'} worker(s)): {holds} hold every limit, "
                            f"{result.count('fails')} fail, {result.count('invalid')} break a project rule.")
        two = len(result.variables) == 2 and all(len(a) >= 2 for a in result.axes)
        self.canvas.setVisible(two)
        if two:
            self._draw_image(result)

    def _draw_image(self, result) -> None:
        x, y = np.asarray(result.axes[0]), np.asarray(result.axes[1])
        g = result.grid("worst_relative_margin")  # (nx, ny)
        # A choked face or throat counts as -1 or less: let those saturate and scale by the rest.
        regular = g[np.isfinite(g) & (g > -1.0 + 1e-9)]
        lo, hi = levels_for("margin", regular if regular.size else g)
        shown = np.clip(g, lo, hi)
        self.bar.setLevels(values=(lo, hi))
        self.image.setImage(shown.T, autoLevels=False, levels=(lo, hi))
        dx, dy = (x[-1] - x[0]) / (len(x) - 1), (y[-1] - y[0]) / (len(y) - 1)
        self.image.setRect(QRectF(x[0] - dx / 2, y[0] - dy / 2, x[-1] - x[0] + dx, y[-1] - y[0] + dy))
        lines = pg.functions.isocurve(np.nan_to_num(g, nan=-1.0), 0.0, connected=False)
        xs, ys = [], []
        for seg in lines:  # index coordinates, cell centres at i + 0.5
            for i, j in seg:
                xs.append(x[0] + (float(i) - 0.5) * dx)
                ys.append(y[0] + (float(j) - 0.5) * dy)
        self.contour.setData(xs, ys)
        ux, uy = variable_unit(result.variables[0]), variable_unit(result.variables[1])
        self.plot.setLabel("bottom", result.variables[0] + (f" ({ux})" if ux else ""))
        self.plot.setLabel("left", result.variables[1] + (f" ({uy})" if uy else ""))
        self.plot.autoRange(padding=0.02)
