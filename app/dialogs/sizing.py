"""Feasible range of one design variable and an optimum inside it, judged by every limit or by the limits ticked
(``feasible_range(..., limits=...)``, as ``engine-air size --limits``)."""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QAbstractItemView,
    QCheckBox,
    QGridLayout,
    QComboBox,
    QFormLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPlainTextEdit,
    QSpinBox,
    QTableWidget,
    QVBoxLayout,
    QWidget,
)

from engine_air.studies.sizing import (
    POINT_OBJECTIVES,
    default_search_range,
    design_value,
    design_variables,
    feasible_range,
    optimise,
    project_check_names,
    variable_label,
    variable_unit,
)

from .common import FAILS_COLOUR, HOLDS_COLOUR, case_names, fmt, plain_axes, spin_box, table_item
from .task import TaskDialog


_OBJECTIVE_CHOICES = (
    ("", "none: feasible range only"),
    ("spillage_fraction", "least spillage fraction at a point"),
    ("additive_drag_coefficient", "least additive drag coefficient at a point"),
    ("spillage_drag_coefficient", "least spillage drag coefficient at a point"),
    ("-worst_margin", "largest worst relative margin over the envelope"),
)


class SizingDialog(TaskDialog):
    """Feasible range of one design variable and an optimum inside it, judged by every limit or by the limits ticked
(``feasible_range(..., limits=...)``, as ``engine-air size --limits``)."""

    def __init__(self, project, parent=None) -> None:
        super().__init__("Design: feasible range and optimum", parent)
        self.project = project
        self.resize(980, 720)
        form = QFormLayout()
        self.variable = QComboBox()
        for name in design_variables(project):
            unit = variable_unit(name)
            self.variable.addItem(f"{variable_label(name)} — {name}" + (f" [{unit}]" if unit else ""), name)
        self.lower = spin_box(0.0, 1e6, 0.0)
        self.upper = spin_box(0.0, 1e6, 1.0)
        self.scan = QSpinBox()
        self.scan.setRange(3, 201)
        self.scan.setValue(25)
        self.current = QLabel("")
        bounds = QHBoxLayout()
        bounds.addWidget(QLabel("from"))
        bounds.addWidget(self.lower)
        bounds.addWidget(QLabel("to"))
        bounds.addWidget(self.upper)
        bounds.addWidget(QLabel("scan values"))
        bounds.addWidget(self.scan)
        form.addRow("Design variable", self.variable)
        form.addRow("Current value", self.current)
        form.addRow("Search range", bounds)
        self.objective = QComboBox()
        for key, text in _OBJECTIVE_CHOICES:
            self.objective.addItem(text, key)
        form.addRow("Objective", self.objective)
        self.at_mach = spin_box(0.0, 6.0, 0.8, 3, 0.05)
        self.at_alt = spin_box(-5000.0, 84000.0, 11000.0, 0, 500.0)
        self.at_case = QComboBox()
        self.at_case.addItems(case_names(project))
        point = QHBoxLayout()
        point.addWidget(QLabel("Mach"))
        point.addWidget(self.at_mach)
        point.addWidget(QLabel("altitude (m)"))
        point.addWidget(self.at_alt)
        point.addWidget(QLabel("case"))
        point.addWidget(self.at_case, 1)
        self.point_box = QWidget()
        self.point_box.setLayout(point)
        point.setContentsMargins(0, 0, 0, 0)
        form.addRow("At the point", self.point_box)
        form.addRow("Limits judged", self._limit_boxes(project))

        self.plot = pg.PlotWidget(background="w")
        self.plot.setLabel("left", "worst relative margin")
        self.plot.showGrid(x=True, y=True, alpha=0.2)
        self.plot.setMinimumHeight(220)
        plain_axes(self.plot.getPlotItem())
        self.bounds_table = QTableWidget(0, 7)
        self.bounds_table.setHorizontalHeaderLabels(["end", "value", "bounded by", "limit", "Mach", "altitude (m)",
                                                     "case"])
        self.bounds_table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.bounds_table.horizontalHeader().setStretchLastSection(True)
        self.bounds_table.verticalHeader().setVisible(False)
        self.bounds_table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.text = QPlainTextEdit()
        self.text.setReadOnly(True)
        self.text.setMaximumHeight(150)

        layout = QVBoxLayout(self)
        layout.addLayout(form)
        layout.addLayout(self.button_row())
        layout.addWidget(self.status)
        layout.addWidget(self.plot, 2)
        layout.addWidget(self.bounds_table, 1)
        layout.addWidget(self.text, 1)
        self.variable.currentIndexChanged.connect(self._variable_changed)
        self.objective.currentIndexChanged.connect(self._objective_changed)
        self._variable_changed()
        self._objective_changed()

    def _limit_boxes(self, project) -> QWidget:
        """One tick box per check of the project (all ticked: every limit is judged)."""
        box = QWidget()
        grid = QGridLayout(box)
        grid.setContentsMargins(0, 0, 0, 0)
        self.limit_checks: dict[str, QCheckBox] = {}
        try:
            names = project_check_names(project)
        except Exception:  # noqa: BLE001 - the dialog still sizes against every limit
            names = ()
        for k, name in enumerate(names):
            tick = QCheckBox(name)
            tick.setChecked(True)
            tick.setToolTip(f"Judge the {name} check (point --json checks[].name); untick to leave it out of "
                            "the sizing, e.g. a limit this variable cannot move")
            grid.addWidget(tick, k // 4, k % 4)
            self.limit_checks[name] = tick
        return box

    def chosen_limits(self) -> tuple[str, ...] | None:
        """The ticked checks; None when every check is ticked (judge every limit)."""
        ticked = tuple(n for n, box in self.limit_checks.items() if box.isChecked())
        return None if len(ticked) == len(self.limit_checks) else ticked

    def _variable_changed(self) -> None:
        name = self.variable.currentData()
        if name is None:
            return
        lo, hi = default_search_range(self.project, name)
        unit = variable_unit(name)
        decimals = 6 if hi < 100 else 3
        for s in (self.lower, self.upper):
            s.setDecimals(decimals)
            s.setSingleStep(max((hi - lo) / 50.0, 1e-6))
        self.lower.setValue(lo)
        self.upper.setValue(hi)
        self.current.setText(f"{design_value(self.project, name):.6g} {unit}")
        self.plot.setLabel("bottom", f"{variable_label(name)} ({unit})" if unit else variable_label(name))

    def _objective_changed(self) -> None:
        self.point_box.setEnabled(self.objective.currentData() in POINT_OBJECTIVES)

    def make_task(self):
        project, name = self.project, self.variable.currentData()
        lo, hi, n = self.lower.value(), self.upper.value(), self.scan.value()
        objective = self.objective.currentData() or None
        at = (self.at_mach.value(), self.at_alt.value(), self.at_case.currentText()) \
            if objective in POINT_OBJECTIVES else None
        if not lo < hi:
            self._report_error("the search range needs lower < upper")
            return None
        limits = self.chosen_limits()
        if limits == ():
            self._report_error("tick at least one limit to judge")
            return None

        def task(progress, cancelled):
            sizing = feasible_range(project, name, lo, hi, scan_points=n, limits=limits, cancelled=cancelled,
                                    progress=(lambda f: progress(f * (0.75 if objective else 1.0))))
            best = None
            if objective and sizing.feasible:
                best = optimise(project, name, objective, at=at, within=sizing, cancelled=cancelled,
                                progress=(lambda f: progress(0.75 + 0.25 * f)))
            return sizing, best

        return task

    def show_result(self, result) -> None:
        sizing, best = result
        self.plot.clear()
        x, g = sizing.scan_values, np.clip(sizing.scan_margin, -2.0, 2.0)
        for iv in sizing.intervals:
            region = pg.LinearRegionItem(values=(iv.lower.value, iv.upper.value), movable=False,
                                         brush=pg.mkBrush(33, 102, 172, 40), pen=pg.mkPen(33, 102, 172))
            self.plot.addItem(region)
        self.plot.addItem(pg.InfiniteLine(pos=0.0, angle=0, pen=pg.mkPen((90, 90, 90), style=Qt.DashLine)))
        self.plot.plot(x, g, pen=pg.mkPen((40, 40, 40), width=2), symbol="o", symbolSize=6,
                       symbolBrush=[pg.mkBrush(HOLDS_COLOUR) if v >= 0 else pg.mkBrush(FAILS_COLOUR) for v in g])
        self.plot.addItem(pg.InfiniteLine(pos=sizing.current_value, angle=90,
                                          pen=pg.mkPen((120, 120, 120), width=1), label="current",
                                          labelOpts={"position": 0.92, "color": (80, 80, 80)}))
        if best is not None and best.value is not None:
            self.plot.addItem(pg.InfiniteLine(pos=best.value, angle=90, pen=pg.mkPen((180, 90, 0), width=2),
                                              label="optimum", labelOpts={"position": 0.8, "color": (150, 62, 0)}))
        rows = []
        for k, iv in enumerate(sizing.intervals):
            for end, b in (("lower", iv.lower), ("upper", iv.upper)):
                kind = {"limit": "limit fails beyond", "search": "search range end", "rule": "project rule"}[b.kind]
                limit = f"{b.label} ({b.limit_text})" if b.kind != "rule" else b.reason
                rows.append([f"{k + 1} {end}", f"{b.value:.6g}", kind, limit,
                             fmt(b.mach, ".3f") if b.kind == "limit" else "",
                             fmt(b.altitude_m, ".0f") if b.kind == "limit" else "",
                             b.case if b.kind == "limit" else ""])
        self.bounds_table.setRowCount(len(rows))
        for r, row in enumerate(rows):
            for c, text in enumerate(row):
                self.bounds_table.setItem(r, c, table_item(text, numeric=c in (1, 4, 5)))
        lines = sizing.describe()
        if best is not None:
            lines += best.describe()
        self.text.setPlainText("\n".join(lines))
        if sizing.feasible:
            spans = ", ".join(f"{iv.lower.value:.6g} to {iv.upper.value:.6g}" for iv in sizing.intervals)
            opt = f"; optimum {best.value:.6g}" if best is not None and best.value is not None else ""
            self.status.setText(f"<b>Feasible:</b> {spans} {sizing.unit}{opt}.")
        else:
            self.status.setText("<b style='color:#963e00'>No feasible value</b> in the search range: some limit "
                                "fails somewhere for every value scanned.")
