"""The main window: verdict banner, the map with its selectors, the selected point, findings and editors.

Data flow: the ``ProjectDocument`` holds the project; every change asks the
``MapRunner`` for a recompute; only the newest computation's result reaches
the map, the findings, the verdict and the detail panel. While a computation
runs the map says "Computing…"; if it fails, the last good map stays, marked
"OUT OF DATE" with the error.

Work is never lost: unsaved edits are autosaved at intervals (``AUTOSAVE_MS``,
``autosave_timer``) to the window's slot in the recovery folder
(``app.recovery``); the files go on a clean save, New/Open after Discard, and
a clean close. A failed autosave is a note in the status bar. A failed save
keeps the edits and the unsaved mark and says why; a bad file on Open is
reported and the open project stays.

This module builds the window and runs the map (computing, selection, units, presentation mode). Its
other parts live in ``app.window``: ``verdict`` (the banner), ``files`` (New, Open, Save, recent
files, exports; saving over a read-only file asks first) and ``autosave`` (the recovery slot).
"""

from __future__ import annotations

import logging
import math

from PySide6.QtCore import QSettings, Qt, QTimer
from PySide6.QtGui import QAction, QActionGroup, QFont, QKeySequence
from PySide6.QtWidgets import (
    QApplication,
    QComboBox,
    QLabel,
    QMainWindow,
    QMessageBox,
    QToolBar,
    QVBoxLayout,
    QWidget,
)

from engine_air.envelope.evaluate import WORST
from engine_air.outputs.quantities import DEFAULT_QUANTITY, QUANTITIES

from . import APPLICATION, ORGANISATION, style
from .views import analysis
from .about import about_html
from .document import ProjectDocument
from .views.findings import mechanisms
from .views.map_view import EnvelopeMap
from .recovery import AUTOSAVE_MS, RecoveryStore
from .template import new_project
from .units import SI, SYSTEM_LABELS, US, Units
from .window.autosave import AutosaveActions
from .window.files import FileActions
from .window.layout import WindowLayout
from .window.point_views import AfterPaint, PointViews
from .window.verdict import VerdictBanner
from .worker import MapRunner

log = logging.getLogger(__name__)

BUSY_DELAY_MS = 120
WORST_LABEL = "Worst of all cases"
LEAST_MARGIN = "worst_relative_margin"


def default_quantity(result) -> str:
    """The map's quantity before the user picks one: the least margin over all limits when some limit fails
    (it shows where and which), else the face Mach margin."""
    if result is not None and result.summary and not result.holds:
        return LEAST_MARGIN
    return DEFAULT_QUANTITY


class MainWindow(FileActions, AutosaveActions, WindowLayout, QMainWindow):
    """The program's window; file actions, autosave and the docks' layout come from ``app.window``."""

    def __init__(self, project=None, path=None, settings: QSettings | None = None, runner: MapRunner | None = None,
                 parent=None, recovery: RecoveryStore | None = None, autosave_ms: int | None = None) -> None:
        super().__init__(parent)
        self.settings = settings if settings is not None else QSettings(ORGANISATION, APPLICATION)
        self.document = ProjectDocument(project if project is not None else new_project(), path, self)
        self.runner = runner if runner is not None else MapRunner(self)
        self.result = None  # last good MapResult
        self.result_generation = 0
        self.panels_generation = 0
        self.units = Units(SI)
        self.presentation = False
        self._pending_selection = "worst"  # what to select when the next result arrives
        self.quantity_picked = False  # the user chose the map's quantity (else it follows ``default_quantity``)
        self._last_error = ""
        self._shutdown = False
        self._progress = 0.0
        self._busy_timer = QTimer(self)
        self._busy_timer.setSingleShot(True)
        self._busy_timer.setInterval(BUSY_DELAY_MS)
        self._busy_timer.timeout.connect(self._show_busy_on_map)
        self.recovery = recovery if recovery is not None else RecoveryStore(parent=self)
        self._autosaved = None  # (project, path) last handed to the recovery store
        self.autosave_error = ""
        self.autosave_timer = QTimer(self)
        self.autosave_timer.setInterval(int(autosave_ms) if autosave_ms else AUTOSAVE_MS)
        self.autosave_timer.timeout.connect(self.autosave_now)

        self._build_central()
        self._build_docks()
        self._build_menus()
        self.point_views = PointViews(self)  # the sketch and the sections: after the map, only when shown
        self.point_views.add("sketch", self.sketch_dock, self._draw_sketch)
        self.point_views.add("sections", self.sections_dock, self._draw_sections)
        self.point_views.add("characteristic", self.characteristic_dock, self._draw_characteristic)
        self._after_map_paint = AfterPaint(self.map.canvas.viewport(), parent=self)
        self._deferring = False
        self.setStyleSheet(style.stylesheet(False))
        self.verdict.fit_height()
        self.autosave_label = QLabel("")
        self.autosave_label.setObjectName("autosaveNote")
        self.statusBar().addPermanentWidget(self.autosave_label)
        self.resize(1600, 1000)
        self._size_docks()

        self.document.changed.connect(self._on_project_changed)
        self.document.stateChanged.connect(self._update_title)
        self.runner.started.connect(self._on_started)
        self.runner.progress.connect(self._on_progress)
        self.runner.finished.connect(self._on_finished)
        self.runner.failed.connect(self._on_failed)
        self.map.pointSelected.connect(self._on_point_selected)
        self.detail.neededWidthChanged.connect(lambda _w: self._fit_detail_dock(grow_only=True))
        self.findings.findingActivated.connect(self.go_to_finding)
        self.editors.projectEdited.connect(lambda p: self.document.edit(p, validated=True))
        self.document.stateChanged.connect(self._sync_recovery)
        self.recovery.reported.connect(self._on_recovery_report)

        self.editors.project_path = self.document.path
        self.document.stateChanged.connect(lambda: setattr(self.editors, "project_path", self.document.path))
        self.editors.set_project(self.document.project)
        self._update_title()
        self.recompute()
        self.autosave_timer.start()

    # -- construction ----------------------------------------------------------
    def _build_central(self) -> None:
        central = QWidget()
        lay = QVBoxLayout(central)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.setSpacing(4)
        self.verdict = VerdictBanner()
        lay.addWidget(self.verdict)
        self.map = EnvelopeMap()
        lay.addWidget(self.map, 1)
        self.setCentralWidget(central)

        bar = QToolBar("Map")
        bar.setObjectName("mapToolbar")
        bar.setMovable(False)
        self.quantity_combo = QComboBox()
        for key, q in QUANTITIES.items():
            self.quantity_combo.addItem(q.label, key)
        self.quantity_combo.setCurrentIndex(max(0, self.quantity_combo.findData(DEFAULT_QUANTITY)))
        self.quantity_combo.setToolTip("Quantity shown on the map")
        self.case_combo = QComboBox()
        self.case_combo.setMinimumContentsLength(18)
        self.case_combo.setToolTip("Case shown on the map, or the worst of all cases at each point")
        self.units_combo = QComboBox()
        for system in (SI, US):
            self.units_combo.addItem(SYSTEM_LABELS[system], system)
        bar.addWidget(QLabel("Quantity"))
        bar.addWidget(self.quantity_combo)
        bar.addWidget(QLabel("Case"))
        bar.addWidget(self.case_combo)
        bar.addWidget(QLabel("Units"))
        bar.addWidget(self.units_combo)
        self.addToolBar(Qt.TopToolBarArea, bar)
        self.toolbar = bar
        self.quantity_combo.currentIndexChanged.connect(lambda _i: self._redraw())
        self.quantity_combo.activated.connect(lambda _i: setattr(self, "quantity_picked", True))
        self.case_combo.currentIndexChanged.connect(lambda _i: self._on_case_changed())
        self.units_combo.currentIndexChanged.connect(lambda _i: self.set_units(self.units_combo.currentData()))

    def _action(self, menu, text, slot, shortcut=None, checkable=False) -> QAction:
        a = QAction(text, self)
        if shortcut is not None:
            a.setShortcut(QKeySequence(shortcut))
        a.setCheckable(checkable)
        a.triggered.connect(slot)
        menu.addAction(a)
        return a

    def _build_menus(self) -> None:
        mb = self.menuBar()
        f = mb.addMenu("&File")
        self._action(f, "&New", self.new_file, QKeySequence.New)
        self._action(f, "&Open…", self.open_dialog, QKeySequence.Open)
        self.recent_menu = f.addMenu("Open &recent")
        self.recent_menu.aboutToShow.connect(self._fill_recent_menu)
        self._fill_recent_menu()
        self._action(f, "&Save", self.save, QKeySequence.Save)
        self._action(f, "Save &as…", self.save_as_dialog, QKeySequence.SaveAs)
        f.addSeparator()
        ex = f.addMenu("&Export")
        self._action(ex, "Map as &PNG (review resolution)…", lambda: self._export_dialog("png"))
        self._action(ex, "Map as &SVG…", lambda: self._export_dialog("svg"))
        self._action(ex, "Sections as P&NG…", lambda: self._export_dialog("sections-png"))
        self._action(ex, "Sections as S&VG…", lambda: self._export_dialog("sections-svg"))
        self._action(ex, "C&haracteristic as PNG…", lambda: self._export_dialog("characteristic-png"))
        self._action(ex, "Grid as &CSV (every point, every case)…", lambda: self._export_dialog("csv"))
        self._action(ex, "&Findings as text…", lambda: self._export_dialog("txt"))
        f.addSeparator()
        self._action(f, "&Quit", self.close, QKeySequence.Quit)

        e = mb.addMenu("&Edit")
        self.undo_action = self._action(e, "&Undo edit", self.document.undo, QKeySequence.Undo)
        self.redo_action = self._action(e, "&Redo edit", self.document.redo, QKeySequence.Redo)
        e.addSeparator()
        self._action(e, "Re&compute map", self.recompute, "Ctrl+R")

        v = mb.addMenu("&View")
        self.presentation_action = self._action(v, "&Presentation mode", self.set_presentation, "F5", checkable=True)
        v.addSeparator()
        group = QActionGroup(self)
        self.unit_actions = {}
        for system in (SI, US):
            a = self._action(v, f"{SYSTEM_LABELS[system]} units",
                             lambda _c=False, s=system: self.set_units(s), checkable=True)
            group.addAction(a)
            self.unit_actions[system] = a
        self.unit_actions[SI].setChecked(True)
        v.addSeparator()
        for k, (name, dock) in enumerate(self.view_docks.items()):
            self._action(v, f"Show “{dock.windowTitle()}”", lambda _c=False, n=name: self.show_view(n), f"Alt+{k + 1}")
        v.addSeparator()
        for dock in (*self.view_docks.values(), self.findings_dock):
            v.addAction(dock.toggleViewAction())

        self.design_menu = self._add_design_menu()
        h = mb.addMenu("&Help")
        self._action(h, "&About", self.show_about)

    def _add_design_menu(self):
        """The "Design" menu (sizing, comparison, sweep, review pack) from ``app.dialogs``, if present."""
        try:
            from .dialogs import add_design_menu
        except ImportError:
            return None
        try:
            return add_design_menu(self, lambda: self.document.project)
        except Exception:  # noqa: BLE001 - an optional menu must never stop the window from opening
            log.exception("the Design menu could not be added")
            return None

    # -- title, verdict ------------------------------------------------------------
    def _update_title(self) -> None:
        d = self.document
        self.setWindowTitle(f"{d.display_name}{'*' if d.dirty else ''} — {APPLICATION}")
        self.undo_action.setEnabled(d.can_undo())
        self.redo_action.setEnabled(d.can_redo())

    @property
    def verdict_state(self) -> str:
        """The banner's state: "holds", "fails", "busy" or "stale"."""
        return self.verdict.state

    # -- computing -----------------------------------------------------------------
    def recompute(self) -> int:
        return self.runner.request(self.document.project)

    def _on_project_changed(self, project) -> None:
        self.editors.set_project(project)
        self._update_title()
        self.recompute()

    def _on_started(self, _gen: int) -> None:
        # The banner says so at once; the map's own overlay follows if the run lasts longer than
        # BUSY_DELAY_MS, so that quick edits do not flash (and repaint) the whole map twice.
        self.verdict.show_state("busy", "Computing…")
        self.detail.set_stale("Computing… the values below belong to the previous result.")
        self._busy_timer.start()

    def _show_busy_on_map(self) -> None:
        if self.runner.busy:
            self.map.set_computing(self._progress)

    def _on_progress(self, fraction: float) -> None:
        self._progress = fraction
        if self.map.state == "computing":
            self.map.set_computing(fraction)

    def _on_finished(self, gen: int, result) -> None:
        self._busy_timer.stop()
        self._progress = 0.0
        self.result = result
        self.result_generation = gen
        self._last_error = ""
        self._fill_case_combo(result)
        if self._pending_selection == "worst":  # a newly opened project: its default quantity again
            self.quantity_picked = False
        if not self.quantity_picked:
            self._set_quantity_quietly(default_quantity(result))
        self._redraw(sections=False)  # the panels (sections, sketch) follow with the selection
        self.map.set_current()
        self.verdict.show_result(result)
        # The side panels follow once the map has painted, so that its repaint is not held up behind
        # them; the sketch and the sections then each take their own turn (``PointViews``).
        self._after_map_paint.call(lambda g=gen: self._update_panels(g))

    def _update_panels(self, gen: int) -> None:
        if gen != self.result_generation or self.result is None:
            return  # a newer result arrived meanwhile; it schedules its own update
        self.detail.set_stale(None)
        self.findings.set_summary(self.result.summary, self.units, mechanisms(self.result, self.units))
        self._fit_findings_dock()
        self._deferring = True  # the selection's sketch and sections are drawn in later turns
        try:
            self._restore_selection()
        finally:
            self._deferring = False
        self.panels_generation = gen

    @property
    def up_to_date(self) -> bool:
        """The newest request's result is on the map and in every panel."""
        return (self.result is not None and self.result_generation == self.runner.generation
                and self.panels_generation == self.result_generation and not self.runner.busy
                and not self.point_views.pending and not self.characteristic.busy)

    def _on_failed(self, gen: int, message: str) -> None:
        self._busy_timer.stop()
        self._last_error = message
        log.warning("computation %d failed: %s", gen, message)
        self.statusBar().showMessage(f"Computation failed: {message}", 15000)
        if self.result is None:
            self.verdict.show_state("stale", f"NO RESULT — the computation failed: {message}")
            self.map.set_stale(message)
            return
        self.map.set_stale(message)
        self.detail.set_stale("OUT OF DATE — the last computation failed; values are from the previous result.")
        self.verdict.show_state("stale", f"OUT OF DATE — computation failed: {message}")

    # -- map -----------------------------------------------------------------------
    def current_case(self) -> str:
        data = self.case_combo.currentData()
        return WORST if data is None else data

    def current_quantity(self) -> str:
        return self.quantity_combo.currentData()

    def _fill_case_combo(self, result) -> None:
        names = [c.name for c in result.cases]
        old = [self.case_combo.itemData(k) for k in range(self.case_combo.count())]
        if old == [WORST] + names:
            return
        keep = self.current_case()
        self.case_combo.blockSignals(True)
        self.case_combo.clear()
        self.case_combo.addItem(WORST_LABEL, WORST)
        for n in names:
            self.case_combo.addItem(n, n)
        k = self.case_combo.findData(keep)
        self.case_combo.setCurrentIndex(k if k >= 0 else 0)
        self.case_combo.blockSignals(False)

    def set_case(self, case: str) -> None:
        k = self.case_combo.findData(case)
        if k >= 0:
            self.case_combo.setCurrentIndex(k)

    def set_quantity(self, key: str) -> None:
        """Show ``key`` on the map (as if the user picked it: results that follow keep it)."""
        k = self.quantity_combo.findData(key)
        if k >= 0:
            self.quantity_picked = True
            self.quantity_combo.setCurrentIndex(k)

    def _set_quantity_quietly(self, key: str) -> None:
        k = self.quantity_combo.findData(key)
        if k >= 0 and k != self.quantity_combo.currentIndex():
            self.quantity_combo.blockSignals(True)
            self.quantity_combo.setCurrentIndex(k)
            self.quantity_combo.blockSignals(False)

    def _redraw(self, sections: bool = True) -> None:
        if self.result is None:
            return
        self.map.show_result(self.result, self.current_case(), self.current_quantity(), self.units)
        if sections and self.map.selected() is not None:
            self.point_views.invalidate(["sections"], now=not self._deferring)

    def _on_case_changed(self) -> None:
        self._redraw()
        sel = self.map.selected()
        if sel is not None:
            self._show_detail(*sel)

    def select_point(self, i: int, j: int) -> None:
        """Select grid point (altitude row i, Mach column j) on the map and show it."""
        self.map.select(i, j, emit=True)

    def select_condition(self, mach: float, altitude_m: float) -> tuple[int, int]:
        i, j = analysis.nearest_index(self.result, mach, altitude_m)
        self.select_point(i, j)
        return i, j

    def _on_point_selected(self, i: int, j: int) -> None:
        if self.result is not None:
            self._selected_condition = (float(self.result.mach[j]), float(self.result.altitude_m[i]))
        self._show_detail(i, j)

    def _show_detail(self, i: int, j: int) -> None:
        if self.result is None:
            return
        case = analysis.case_at(self.result, self.current_case(), (i, j))
        self.detail.show_point(self.result, case, (i, j))
        self.point_views.invalidate(now=not self._deferring)

    def _draw_sketch(self) -> None:
        """The inlet at the selected point as the window shows it now (the newest result, case, selection)."""
        sel = self.map.selected()
        if self.result is None or sel is None:
            return
        i, j = sel
        case = analysis.case_at(self.result, self.current_case(), (i, j))
        self.sketch.show_point(self.result.project, self.result.case_map(case).points, (i, j))
        self.sketch.setTitle(f"Inlet at M0 = {float(self.result.mach[j]):.2f}, "
                             f"{self.units.to_display('altitude', float(self.result.altitude_m[i])):,.0f} "
                             f"{self.units.label('altitude')} (case “{case}”)")

    def _draw_characteristic(self) -> None:
        """The characteristic at the selected point's Mach and its neighbours, for the window's newest state
        (computed on the view's worker: ``app.views.characteristic_view``)."""
        sel = self.map.selected()
        if self.result is None or sel is None:
            return
        i, j = sel
        case = analysis.case_at(self.result, self.current_case(), (i, j))
        mach, altitude = float(self.result.mach[j]), float(self.result.altitude_m[i])
        self.characteristic.request(self.result.project, case, mach, altitude,
                                    f"M0 = {mach:.2f} and neighbours<br>case “{case}”")

    def _draw_sections(self) -> None:
        """The cuts through the selected point as the window shows it now."""
        sel = self.map.selected()
        if self.result is None or sel is None:
            return
        try:
            self.sections.show_sections(self.result, self.current_case(), self.current_quantity(), *sel, self.units)
        except Exception as exc:  # noqa: BLE001 - a cut that cannot be drawn must not stop the window
            log.exception("sections could not be drawn")
            self.sections.clear_sections()
            self.statusBar().showMessage(f"Sections not drawn: {exc}", 10000)

    def _restore_selection(self) -> None:
        r = self.result
        if self._pending_selection == "worst":
            self._pending_selection = None
            target = next((s for s in r.summary if s.fails), r.summary[0] if r.summary else None)
            if target is not None and math.isfinite(target.worst_mach):
                self.select_condition(target.worst_mach, target.worst_altitude_m)
                return
            self.select_point(len(r.altitude_m) // 2, len(r.mach) // 2)
            return
        cond = getattr(self, "_selected_condition", None)
        if cond is not None and self.map.selected() is not None:
            i, j = analysis.nearest_index(r, *cond)
            if (i, j) != self.map.selected():
                self.map.select(i, j, emit=False)
            self._show_detail(i, j)

    def go_to_finding(self, summary) -> None:
        """Select a finding's worst point, switching to its case when the map shows another."""
        if self.result is None or not math.isfinite(summary.worst_mach):
            return
        if summary.worst_case and self.current_case() not in (summary.worst_case, ):
            self.set_case(summary.worst_case)
        self.select_condition(summary.worst_mach, summary.worst_altitude_m)

    # -- units, presentation -----------------------------------------------------------
    def set_units(self, system: str) -> None:
        if system == self.units.system:
            return
        self.units = Units(system)
        for s, a in self.unit_actions.items():
            a.setChecked(s == system)
        k = self.units_combo.findData(system)
        if self.units_combo.currentIndex() != k:
            self.units_combo.blockSignals(True)
            self.units_combo.setCurrentIndex(k)
            self.units_combo.blockSignals(False)
        self.detail.set_units(self.units)
        self.editors.set_units(self.units)
        self.sketch.set_units(self.units)
        if self.result is not None:
            self.findings.set_summary(self.result.summary, self.units, mechanisms(self.result, self.units))
            self._redraw()

    def set_presentation(self, on: bool) -> None:
        """Presentation mode: larger type, heavier lines, high contrast; the map, the verdict and the point's
        tables get the room. In a small window (``style.compact``: a 1280 x 720 projector) the type is a
        step smaller, so the map keeps its room."""
        on = bool(on)
        small = on and style.compact(self.width(), self.height())
        was = self.presentation
        self.presentation = on
        self._presentation_small = small
        self.presentation_action.setChecked(on)
        self.setStyleSheet(style.stylesheet(on, small))
        self.verdict.set_presentation(on, small)
        if on != was:
            self._layout_presentation(on)
        self.sections.set_scale((1.15 if small else 1.3) if on else 1.0)
        self.map.set_presentation(on, small)
        self.detail.refresh()
        if self.result is not None and self.verdict.state in ("holds", "fails"):
            self.verdict.show_result(self.result)
        self._size_docks()

    def _restyle_for_size(self) -> None:
        """Presentation mode's type follows the window's size class (only when it changes)."""
        if self.presentation and style.compact(self.width(), self.height()) != self._presentation_small:
            self.set_presentation(True)
            QTimer.singleShot(0, self.detail.refresh)  # the tables' wrapped rows again, once the new type is laid out

    def show_about(self) -> None:
        QMessageBox.about(self, f"About {APPLICATION}", about_html())

    # -- closing -------------------------------------------------------------------
    def closeEvent(self, event) -> None:  # noqa: N802 - Qt override
        self.editors.flush()
        if not self._ask_unsaved():
            event.ignore()
            return
        self._shutdown = True
        self.autosave_timer.stop()
        self.runner.shutdown()
        self.characteristic.worker.shutdown()
        self.recovery.close(remove=True)  # a clean close: saved or discarded
        event.accept()


def apply_base_font(app: QApplication) -> None:
    f = QFont(app.font())
    f.setPointSize(style.BASE_PT)
    app.setFont(f)

