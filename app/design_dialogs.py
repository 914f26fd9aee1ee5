"""Design answers in the desktop program: sizing, comparison, trade sweep and the review pack.

Self-contained dialogs over ``engine_air.studies.sizing``, ``engine_air.studies.compare``,
``engine_air.studies.sweep`` and ``engine_air.outputs.review_pack``; the main window opens them
through ``add_design_menu(main_window, get_project)``, which adds a "Design"
menu. Every computation runs on a ``QThread`` worker with a progress bar and a
Cancel button; results come back to the GUI thread by queued signals. Values
are in SI units, as in the analysis package.

- ``SizingDialog(project)``: choose a design variable, the search bounds and an
  optional objective; shows the feasible interval(s), the limit and the point
  (Mach, altitude, case) bounding each end, the optimum, and the worst relative
  margin against the value.
- ``CompareDialog(project, other_path)``: the current project (A) against a
  project file (B) on one grid: both maps with one shared colour scale, the
  difference map B - A on a scale centred on zero, and both verdicts.
- ``SweepDialog(project)``: 1 to 4 variables with ranges; a table of variants
  and, for two variables, an image of the worst relative margin with its zero
  contour (the feasible boundary).
"""

from __future__ import annotations

import math
import os
import threading
import traceback
from typing import Callable

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QObject, QRectF, Qt, QThread, QUrl, Signal, Slot
from PySide6.QtGui import QAction, QColor, QDesktopServices
from PySide6.QtWidgets import (
    QAbstractItemView,
    QCheckBox,
    QComboBox,
    QDialog,
    QDoubleSpinBox,
    QFileDialog,
    QFormLayout,
    QGridLayout,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QMessageBox,
    QPlainTextEdit,
    QProgressBar,
    QPushButton,
    QSpinBox,
    QSplitter,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from engine_air.studies.compare import DIFFERENCE_QUANTITIES, compare_projects
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import Cancelled
from engine_air.outputs.pictures import DIVERGING_ANCHORS, OUTSIDE_GREY, SEQUENTIAL_ANCHORS, levels_for
from engine_air.project import load_project
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.review_pack import write_review_pack
from engine_air.studies.sizing import (
    POINT_OBJECTIVES,
    default_search_range,
    design_value,
    design_variables,
    feasible_range,
    optimise,
    variable_label,
    variable_unit,
)
from engine_air.studies.sweep import MAX_VALUES_PER_VARIABLE, MAX_VARIABLES, sweep

# -- shared pieces -------------------------------------------------------------------


def colour_map(kind: str) -> pg.ColorMap:
    """The analysis package's ramps as a pyqtgraph ColorMap (diverging for margins)."""
    anchors = DIVERGING_ANCHORS if kind == "margin" else SEQUENTIAL_ANCHORS
    pos = np.array([p for p, _ in anchors])
    colours = np.array([c + (255,) for _, c in anchors], dtype=np.ubyte)
    return pg.ColorMap(pos, colours)


def _plain_axes(plot) -> None:
    """No automatic SI prefixes (m^2 x 0.001 reads badly): values are shown in their own unit."""
    for name in ("left", "bottom"):
        plot.getAxis(name).enableAutoSIPrefix(False)


def _fmt(x, spec: str = ".4g") -> str:
    try:
        x = float(x)
    except (TypeError, ValueError):
        return "–"
    return format(x, spec) if math.isfinite(x) else "–"


def _item(text: str, numeric: bool = False, colour: QColor | None = None) -> QTableWidgetItem:
    it = QTableWidgetItem(text)
    it.setFlags(it.flags() & ~Qt.ItemIsEditable)
    if numeric:
        it.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
    if colour is not None:
        it.setForeground(colour)
    return it


HOLDS_COLOUR = QColor(11, 79, 138)
FAILS_COLOUR = QColor(150, 62, 0)


def _verdict_item(holds: bool | None) -> QTableWidgetItem:
    if holds is None:
        return _item("–")
    return _item("holds" if holds else "FAILS", colour=HOLDS_COLOUR if holds else FAILS_COLOUR)


def _spin(lo: float, hi: float, value: float, decimals: int = 6, step: float | None = None) -> QDoubleSpinBox:
    s = QDoubleSpinBox()
    s.setDecimals(decimals)
    s.setRange(lo, hi)
    s.setValue(value)
    s.setSingleStep(step if step is not None else max(abs(value) * 0.05, 10.0 ** -decimals))
    s.setKeyboardTracking(False)
    return s


class _Job(QObject):
    """Runs ``fn(progress, cancelled)`` on a worker thread and reports back by signals."""

    progress = Signal(float)
    done = Signal(object)
    failed = Signal(str)
    cancelled = Signal()

    def __init__(self, fn: Callable) -> None:
        super().__init__()
        self._fn = fn
        self.stop = threading.Event()

    @Slot()
    def run(self) -> None:
        try:
            result = self._fn(self.progress.emit, self.stop.is_set)
        except Cancelled:
            self.cancelled.emit()
        except ProjectError as exc:
            self.failed.emit(str(exc))
        except Exception as exc:  # noqa: BLE001 - shown to the user; never kills the program
            traceback.print_exc()
            text = " ".join(str(exc).split())
            self.failed.emit(f"{type(exc).__name__}: {text}" if text else type(exc).__name__)
        else:
            self.done.emit(result)


class _TaskDialog(QDialog):
    """A dialog with one background computation at a time: Run, Cancel, Close, progress and status."""

    def __init__(self, title: str, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle(title)
        self._thread: QThread | None = None
        self._job: _Job | None = None
        self.result = None
        self.last_error = ""
        self.run_button = QPushButton("Run")
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setEnabled(False)
        self.close_button = QPushButton("Close")
        self.progress_bar = QProgressBar()
        self.progress_bar.setRange(0, 1000)
        self.progress_bar.setValue(0)
        self.progress_bar.setTextVisible(True)
        self.progress_bar.setFormat("%p%")
        self.status = QLabel("")
        self.status.setWordWrap(True)
        self.run_button.clicked.connect(self.start)
        self.cancel_button.clicked.connect(self.cancel)
        self.close_button.clicked.connect(self.close)

    def button_row(self) -> QHBoxLayout:
        row = QHBoxLayout()
        row.addWidget(self.run_button)
        row.addWidget(self.cancel_button)
        row.addWidget(self.progress_bar, 1)
        row.addWidget(self.close_button)
        return row

    # subclasses --------------------------------------------------------------
    def make_task(self) -> Callable | None:
        """The computation ``fn(progress, cancelled)``; None (after telling the user) when inputs are unusable."""
        raise NotImplementedError

    def show_result(self, result) -> None:
        raise NotImplementedError

    # running -------------------------------------------------------------------
    @property
    def running(self) -> bool:
        return self._thread is not None

    @Slot()
    def start(self) -> None:
        if self.running:
            return
        try:
            fn = self.make_task()
        except ProjectError as exc:
            self._report_error(str(exc))
            return
        if fn is None:
            return
        self.last_error = ""
        self.progress_bar.setValue(0)
        self.status.setText("Running…")
        self.run_button.setEnabled(False)
        self.cancel_button.setEnabled(True)
        thread = QThread(self)
        job = _Job(fn)
        job.moveToThread(thread)
        thread.started.connect(job.run)
        job.progress.connect(self._on_progress)
        job.done.connect(self._on_done)
        job.failed.connect(self._on_failed)
        job.cancelled.connect(self._on_cancelled)
        job.done.connect(thread.quit)
        job.failed.connect(thread.quit)
        job.cancelled.connect(thread.quit)
        thread.finished.connect(self._on_finished)
        self._thread, self._job = thread, job
        thread.start()

    @Slot()
    def cancel(self) -> None:
        if self._job is not None:
            self._job.stop.set()
            self.status.setText("Cancelling…")

    def wait(self, ms: int = 30000) -> None:
        """Block until the computation has ended (for closing and tests)."""
        if self._thread is not None:
            self._thread.wait(ms)

    @Slot(float)
    def _on_progress(self, fraction: float) -> None:
        self.progress_bar.setValue(int(round(1000 * max(0.0, min(1.0, fraction)))))

    @Slot(object)
    def _on_done(self, result) -> None:
        self.result = result
        self.progress_bar.setValue(1000)
        self.status.setText("Done.")
        self.show_result(result)

    @Slot(str)
    def _on_failed(self, message: str) -> None:
        self._report_error(message)

    def _report_error(self, message: str) -> None:
        self.last_error = message
        self.status.setText(f"<span style='color:#963e00'>Cannot compute: {message}</span>")

    @Slot()
    def _on_cancelled(self) -> None:
        self.status.setText("Cancelled.")
        self.progress_bar.setValue(0)

    @Slot()
    def _on_finished(self) -> None:
        if self._job is not None:
            self._job.deleteLater()
        if self._thread is not None:
            self._thread.deleteLater()
        self._thread, self._job = None, None
        self.run_button.setEnabled(True)
        self.cancel_button.setEnabled(False)

    def closeEvent(self, event) -> None:  # noqa: N802 - Qt name
        if self._job is not None:
            self._job.stop.set()
        if self._thread is not None:
            self._thread.quit()
            self._thread.wait(30000)
        super().closeEvent(event)

    def reject(self) -> None:
        self.close()


def _case_names(project) -> list[str]:
    return [c.name for c in project.cases]


# -- sizing ----------------------------------------------------------------------------

_OBJECTIVE_CHOICES = (
    ("", "none: feasible range only"),
    ("spillage_fraction", "least spillage fraction at a point"),
    ("additive_drag_coefficient", "least additive drag coefficient at a point"),
    ("spillage_drag_coefficient", "least spillage drag coefficient at a point"),
    ("-worst_margin", "largest worst relative margin over the envelope"),
)


class SizingDialog(_TaskDialog):
    """Feasible range of one design variable and an optimum inside it."""

    def __init__(self, project, parent=None) -> None:
        super().__init__("Design: feasible range and optimum", parent)
        self.project = project
        self.resize(980, 720)
        form = QFormLayout()
        self.variable = QComboBox()
        for name in design_variables(project):
            unit = variable_unit(name)
            self.variable.addItem(f"{variable_label(name)} — {name}" + (f" [{unit}]" if unit else ""), name)
        self.lower = _spin(0.0, 1e6, 0.0)
        self.upper = _spin(0.0, 1e6, 1.0)
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
        self.at_mach = _spin(0.0, 6.0, 0.8, 3, 0.05)
        self.at_alt = _spin(-5000.0, 84000.0, 11000.0, 0, 500.0)
        self.at_case = QComboBox()
        self.at_case.addItems(_case_names(project))
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

        self.plot = pg.PlotWidget(background="w")
        self.plot.setLabel("left", "worst relative margin")
        self.plot.showGrid(x=True, y=True, alpha=0.2)
        self.plot.setMinimumHeight(220)
        _plain_axes(self.plot.getPlotItem())
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

        def task(progress, cancelled):
            sizing = feasible_range(project, name, lo, hi, scan_points=n, cancelled=cancelled,
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
                             _fmt(b.mach, ".3f") if b.kind == "limit" else "",
                             _fmt(b.altitude_m, ".0f") if b.kind == "limit" else "",
                             b.case if b.kind == "limit" else ""])
        self.bounds_table.setRowCount(len(rows))
        for r, row in enumerate(rows):
            for c, text in enumerate(row):
                self.bounds_table.setItem(r, c, _item(text, numeric=c in (1, 4, 5)))
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


# -- comparison ---------------------------------------------------------------------------

class _MapPlot(pg.GraphicsLayoutWidget):
    """One map: an image over Mach x altitude with a colour bar."""

    def __init__(self, title: str) -> None:
        super().__init__()
        self.setBackground("w")
        self.plot = self.addPlot(row=0, col=0, title=title)
        self.plot.setLabel("bottom", "flight Mach number")
        self.plot.setLabel("left", "altitude (m)")
        _plain_axes(self.plot)
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


class CompareDialog(_TaskDialog):
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
        self.map_a = _MapPlot("A")
        self.map_b = _MapPlot("B")
        self.map_d = _MapPlot("B − A")
        maps = QHBoxLayout()
        for m in (self.map_a, self.map_b, self.map_d):
            maps.addWidget(m)
        self.stats = QLabel("")
        self.stats.setWordWrap(True)
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
            self.verdicts.setItem(r, 0, _item(row.label))
            self.verdicts.setItem(r, 1, _verdict_item(None if row.a is None else row.a.holds))
            self.verdicts.setItem(r, 2, _item(_fmt(None if row.a is None else row.a.worst_margin), True))
            self.verdicts.setItem(r, 3, _verdict_item(None if row.b is None else row.b.holds))
            self.verdicts.setItem(r, 4, _item(_fmt(None if row.b is None else row.b.worst_margin), True))
            self.verdicts.setItem(r, 5, _item(row.change))
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
        self.stats.setText(f"{QUANTITIES[key].label}, case {case}: B − A from {_fmt(s.min)} to {_fmt(s.max)} "
                           f"over {s.points} points inside both envelopes{where}. A and B share one colour scale; "
                           "crosses mark points where some limit fails; grey is outside the envelope.")


# -- sweep ---------------------------------------------------------------------------------

class SweepDialog(_TaskDialog):
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
            lo, hi = _spin(0.0, 1e6, 0.0), _spin(0.0, 1e6, 1.0)
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
        self.cruise_mach = _spin(0.0, 6.0, 0.8, 3, 0.05)
        self.cruise_alt = _spin(-5000.0, 84000.0, 11000.0, 0, 500.0)
        self.cruise_case = QComboBox()
        self.cruise_case.addItems(_case_names(project))
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
        _plain_axes(self.plot)
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
                self.table.setItem(r, c, _item(f"{v:.6g}", True))
            verdict = None if row.verdict == "invalid" else row.holds
            self.table.setItem(r, nv, _verdict_item(verdict) if verdict is not None else _item("invalid"))
            self.table.setItem(r, nv + 1, _item(_fmt(row.worst_relative_margin, "+.4f"), True))
            self.table.setItem(r, nv + 2, _item(row.worst_label or "–"))
            point = (f"M {row.worst_mach:.3f}, {row.worst_altitude_m:.0f} m, {row.worst_case}"
                     if row.worst_check else "–")
            self.table.setItem(r, nv + 3, _item(point))
            self.table.setItem(r, nv + 4, _item(_fmt(row.worst_face_mach_margin, "+.4f"), True))
            self.table.setItem(r, nv + 5, _item(_fmt(row.cruise_spillage_fraction, ".4f"), True))
            self.table.setItem(r, nv + 6, _item(row.message))
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


# -- review pack and the menu -------------------------------------------------------------

class ReviewPackDialog(_TaskDialog):
    """Writes the review pack of a project into a folder, with progress."""

    def __init__(self, project, folder, parent=None, auto_start: bool = True) -> None:
        super().__init__("Design: write review pack", parent)
        self.project = project
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
        project, folder = self.project, self.folder

        def task(progress, cancelled):
            return write_review_pack(project, folder, progress=progress, cancelled=cancelled)

        return task

    def show_result(self, pack) -> None:
        self.status.setText(f"Wrote {pack.index_path} ({len(pack.pictures)} maps). Verdict: "
                            + ("every limit holds." if pack.holds else "<b>some limit FAILS</b>."))
        self.open_button.setEnabled(True)

    def _open(self) -> None:
        if self.result is not None:
            QDesktopServices.openUrl(QUrl.fromLocalFile(self.result.index_path))


def add_design_menu(main_window, get_project: Callable[[], object]):
    """Add a "Design" menu to ``main_window`` (a QMainWindow) and return it.

    ``get_project()`` returns the current ``engine_air.project.model.Project`` (or None
    when there is none). Actions: feasible range and optimum, compare with a
    project file, trade sweep, write review pack. Dialogs are modeless; the menu
    keeps a reference to each open one (``menu.open_dialogs``).
    """
    menu = main_window.menuBar().addMenu("&Design")
    menu.open_dialogs = []

    def project_or_warn():
        try:
            project = get_project()
        except Exception as exc:  # noqa: BLE001 - the editor may hold unusable input
            QMessageBox.warning(main_window, "Design", f"The project cannot be used: {exc}")
            return None
        if project is None:
            QMessageBox.information(main_window, "Design", "Open or create a project first.")
        return project

    def keep(dialog):
        menu.open_dialogs.append(dialog)
        dialog.finished.connect(lambda _=0, d=dialog: menu.open_dialogs.remove(d) if d in menu.open_dialogs else None)
        dialog.show()
        dialog.raise_()
        return dialog

    def sizing():
        p = project_or_warn()
        if p is not None:
            keep(SizingDialog(p, main_window))

    def compare():
        p = project_or_warn()
        if p is None:
            return
        path, _ = QFileDialog.getOpenFileName(main_window, "Compare with project file", "",
                                              "engine-air projects (*.toml);;All files (*)")
        if path:
            dialog = keep(CompareDialog(p, path, main_window))
            dialog.start()

    def trade():
        p = project_or_warn()
        if p is not None:
            keep(SweepDialog(p, main_window))

    def pack():
        p = project_or_warn()
        if p is None:
            return
        folder = QFileDialog.getExistingDirectory(main_window, "Write review pack into folder")
        if folder:
            keep(ReviewPackDialog(p, folder, main_window))

    for text, slot, tip in (
        ("Feasible range and optimum…", sizing, "Range of one design variable for which every limit holds"),
        ("Compare with project file…", compare, "This project against another on one grid"),
        ("Trade sweep…", trade, "Every combination of up to four design variables"),
        ("Write review pack…", pack, "HTML page with verdict, maps, findings and inputs"),
    ):
        action = QAction(text, main_window)
        action.setStatusTip(tip)
        action.triggered.connect(slot)
        menu.addAction(action)
    return menu


__all__ = ["CompareDialog", "ReviewPackDialog", "SizingDialog", "SweepDialog", "add_design_menu", "colour_map"]
