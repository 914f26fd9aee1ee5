"""Forms and tables that edit the project: inlet, limits, engine ratings, envelope, cases, grid.

Every widget edit becomes a function Project -> Project. Spin-box edits are
collected for a short debounce (150 ms) so that typing "0.45" makes one edit,
not four. The pending functions are applied to the current project, and the
candidate is checked by the loader's rules (``app.validation.validate``). A
candidate that breaks a rule is rejected: the loader's message is shown in the
red bar above the tabs and the project is not changed. An accepted candidate
is emitted as ``projectEdited(Project)``; the main window records it (undo)
and asks for a recompute.

Spin-box ranges follow the loader's rules (``engine_air.project.toml_file``).
"""

from __future__ import annotations

import logging
from dataclasses import replace

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPlainTextEdit,
    QPushButton,
    QScrollArea,
    QSpinBox,
    QTabWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from engine_air.project import toml_file as pf
from engine_air.project.errors import ProjectError
from engine_air.project.model import INLET_TYPES, REFERENCE_RECOVERY_NAME, Case

from .edit_widgets import CellError, UnitSpin, cell_si, make_table, number_item
from .units import Units
from .validation import validate
from .worker import Debouncer

DEBOUNCE_MS = 150

log = logging.getLogger(__name__)


def _c(name: str, default):
    return getattr(pf, name, default)


MAX_AREA = _c("MAX_AREA_M2", 100.0)
MAX_FLOW = _c("MAX_CORRECTED_FLOW_KG_S", 5000.0)
MAX_TIP = _c("MAX_TIP_SPEED_M_S", 1000.0)
MAX_RAMPS = _c("MAX_RAMPS", 3)
MAX_RAMP_DEG = _c("MAX_RAMP_DEG", 25.0)
MIN_AXIS = _c("MIN_AXIS_POINTS", 2)
MAX_AXIS = _c("MAX_AXIS_POINTS", 1001)
MAX_GRID = _c("MAX_GRID_POINTS", 250_000)


def _scroll(widget: QWidget) -> QScrollArea:
    s = QScrollArea()
    s.setWidgetResizable(True)
    s.setWidget(widget)
    return s


class ProjectEditors(QWidget):
    """All project editors in tabs, with one error bar."""

    projectEdited = Signal(object)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._project = None
        self._units = Units()
        self._pending: list = []
        self._timer = Debouncer(DEBOUNCE_MS, self.flush, self)
        self._loading = False

        self.error = QLabel("")
        self.error.setObjectName("editorError")
        self.error.setWordWrap(True)
        self.error.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.error.hide()
        self.tabs = QTabWidget()
        lay = QVBoxLayout(self)
        lay.setContentsMargins(2, 2, 2, 2)
        lay.addWidget(self.error)
        lay.addWidget(self.tabs, 1)
        self._build_general()
        self._build_inlet()
        self._build_limits()
        self._build_ratings()
        self._build_envelope()
        self._build_cases()
        self._build_grid()

    # -- the edit pipeline -------------------------------------------------------
    @property
    def project(self):
        return self._project

    def last_error(self) -> str:
        return self.error.text() if self.error.isVisible() or self.error.text() else ""

    def queue(self, change) -> None:
        """Debounced edit: ``change(project) -> project``."""
        if self._loading or self._project is None:
            return
        self._pending.append(change)
        self._timer.trigger()

    def apply_now(self, change) -> bool:
        """Immediate edit (buttons, tables, combos); pending spin-box edits go first."""
        if self._loading or self._project is None:
            return False
        self._pending.append(change)
        return self.flush()

    def flush(self) -> bool:
        """Apply pending edits as one candidate; True if it was accepted."""
        self._timer.cancel()
        changes, self._pending = self._pending, []
        if not changes or self._project is None:
            return False
        candidate = self._project
        try:
            for change in changes:
                candidate = change(candidate)
            checked = validate(candidate)
        except (ProjectError, CellError, ValueError) as exc:
            self.show_error(str(exc))
            return False
        except Exception as exc:  # noqa: BLE001 - an edit the rules did not foresee is refused, never fatal
            log.exception("edit not applied")
            self.show_error(f"{type(exc).__name__}: {' '.join(str(exc).split())}")
            return False
        self.error.hide()
        self.error.setText("")
        checked = replace(checked, warnings=())
        self._project = checked
        self.projectEdited.emit(checked)
        return True

    def show_error(self, text: str) -> None:
        self.error.setText(f"Edit not applied — {text}")
        self.error.show()

    def set_project(self, project) -> None:
        """Show ``project`` (after load, undo, new); ignored for the project these editors just emitted."""
        if project is self._project:
            return
        self._timer.cancel()
        self._pending = []
        self._project = project
        self.error.hide()
        self.error.setText("")
        self._load()

    def set_units(self, units: Units) -> None:
        self.flush()
        self._units = units
        if self._project is not None:
            self._load()

    def _load(self) -> None:
        self._loading = True
        try:
            p, u = self._project, self._units
            for spin in self.findChildren(UnitSpin):
                spin.set_units(u)
            self._load_general(p)
            self._load_inlet(p)
            self._load_limits(p)
            self._load_ratings(p)
            self._load_envelope(p)
            self._load_cases(p)
            self._load_grid(p)
        finally:
            self._loading = False

    def _spin(self, dimension, lo, hi, change_of_value, decimals=4, step=0.01, lo_open=False, hi_open=False):
        s = UnitSpin(dimension, lo, hi, decimals, step, lo_open, hi_open)
        s.valueChanged.connect(lambda _v, s=s: self.queue(lambda p, v=s.si(): change_of_value(p, v)))
        return s

    # -- general -------------------------------------------------------------------
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

    # -- inlet ---------------------------------------------------------------------
    def _build_inlet(self) -> None:
        w = QWidget()
        form = QFormLayout(w)
        self.inlet_type = QComboBox()
        self.inlet_type.addItems(list(INLET_TYPES))
        self.inlet_type.currentTextChanged.connect(self._on_type)

        def inlet_field(name):
            return lambda p, v: replace(p, inlet=replace(p.inlet, **{name: v}))

        self.capture_area = self._spin("area", 0.0, MAX_AREA, inlet_field("capture_area_m2"), lo_open=True)
        self.throat_area = self._spin("area", 0.0, MAX_AREA, inlet_field("throat_area_m2"), lo_open=True)
        self.face_area = self._spin("area", 0.0, MAX_AREA, inlet_field("face_area_m2"), lo_open=True)
        self.duct_k = self._spin("none", 0.0, 2.0, inlet_field("duct_loss_coefficient"), 3, 0.005)
        self.lip_suction = self._spin("none", 0.0, 1.0, inlet_field("lip_suction_factor"), 3, 0.05)
        self.ramp_count = QSpinBox()
        self.ramp_count.setRange(1, MAX_RAMPS)
        self.ramp_count.valueChanged.connect(lambda _n: self.queue(self._ramps_from_widgets))
        self.ramp_spins = []
        for k in range(MAX_RAMPS):
            s = UnitSpin("none", 0.0, MAX_RAMP_DEG, 2, 0.25, lo_open=True, suffix="°")
            s.valueChanged.connect(lambda _v: self.queue(self._ramps_from_widgets))
            self.ramp_spins.append(s)
        self.lip_mach = self._spin("none", 1.0, 5.0, inlet_field("shock_on_lip_mach"), 3, 0.05, lo_open=True)
        form.addRow("Inlet type", self.inlet_type)
        form.addRow("Capture area A_c (station 1)", self.capture_area)
        form.addRow("Throat area A_th", self.throat_area)
        form.addRow("Engine-face flow area A2", self.face_area)
        form.addRow("Duct loss coefficient K", self.duct_k)
        form.addRow("Lip suction factor (0–1)", self.lip_suction)
        form.addRow("Number of ramps", self.ramp_count)
        for k, s in enumerate(self.ramp_spins):
            form.addRow(f"Ramp {k + 1} deflection", s)
        form.addRow("Shock-on-lip Mach M_d", self.lip_mach)
        note = QLabel("Ramp angles and shock-on-lip Mach apply to external-ramp inlets only.")
        note.setWordWrap(True)
        form.addRow(note)
        self.tabs.addTab(_scroll(w), "Inlet")

    def _ramps_from_widgets(self, p):
        if p.inlet.type != "external-ramp":
            return p
        n = self.ramp_count.value()
        angles = tuple(float(s.value()) for s in self.ramp_spins[:n])
        return replace(p, inlet=replace(p.inlet, ramp_angles_deg=angles))

    def _on_type(self, kind: str) -> None:
        if self._loading:
            return
        self._update_ramp_enabled(kind)

        def change(p):
            if kind == p.inlet.type:
                return p
            if kind == "pitot":
                return replace(p, inlet=replace(p.inlet, type=kind, ramp_angles_deg=(), shock_on_lip_mach=None))
            n = self.ramp_count.value()
            angles = tuple(float(s.value()) for s in self.ramp_spins[:n])
            return replace(p, inlet=replace(p.inlet, type=kind, ramp_angles_deg=angles,
                                            shock_on_lip_mach=float(self.lip_mach.value())))

        self.apply_now(change)

    def _update_ramp_enabled(self, kind: str) -> None:
        ramp = kind == "external-ramp"
        self.ramp_count.setEnabled(ramp)
        self.lip_mach.setEnabled(ramp)
        for k, s in enumerate(self.ramp_spins):
            s.setEnabled(ramp and k < self.ramp_count.value())

    def _load_inlet(self, p) -> None:
        i = p.inlet
        self.inlet_type.setCurrentText(i.type)
        self.capture_area.set_si(i.capture_area_m2)
        self.throat_area.set_si(i.throat_area_m2)
        self.face_area.set_si(i.face_area_m2)
        self.duct_k.set_si(i.duct_loss_coefficient)
        self.lip_suction.set_si(i.lip_suction_factor)
        angles = list(i.ramp_angles_deg) or [8.0]
        self.ramp_count.setValue(len(angles))
        defaults = angles + [7.0] * MAX_RAMPS
        for k, s in enumerate(self.ramp_spins):
            s.set_si(defaults[k])
        self.lip_mach.set_si(i.shock_on_lip_mach if i.shock_on_lip_mach is not None else 2.0)
        self._update_ramp_enabled(i.type)

    # -- limits --------------------------------------------------------------------
    def _build_limits(self) -> None:
        w = QWidget()
        form = QFormLayout(w)

        def limit_field(name):
            return lambda p, v: replace(p, limits=replace(p.limits, **{name: v}))

        self.face_mach_max = self._spin("none", 0.0, 1.0, limit_field("face_mach_max"), 3, 0.01,
                                        lo_open=True, hi_open=True)
        form.addRow("Face Mach limit M2 max", self.face_mach_max)
        self.optional_limits = {}
        for name, label, lo, hi, lo_open, hi_open in (
            ("throat_mach_max", "Throat Mach limit M_th max", 0.0, 1.0, True, False),
            ("stable_flow_fraction", "Stable flow fraction MFR/MFR_max", 0.0, 1.0, True, True),
            ("relative_tip_mach_max", "Blade relative tip Mach max", 0.0, 3.0, True, True),
            ("spillage_fraction_max", "Spillage fraction max", 0.0, 1.0, False, True),
        ):
            box = QCheckBox()
            spin = UnitSpin("none", lo, hi, 3, 0.01, lo_open, hi_open)
            spin.valueChanged.connect(lambda _v, n=name: self.queue(self._optional_from_widgets(n)))
            box.toggled.connect(lambda on, n=name: self._on_optional_toggled(n, on))
            row = QHBoxLayout()
            row.addWidget(box)
            row.addWidget(spin, 1)
            form.addRow(label, row)
            self.optional_limits[name] = (box, spin)
        self.recovery_mode = QComboBox()
        self.recovery_mode.addItems(["no recovery limit", "number", "MIL-E-5008B reference"])
        self.recovery_min = UnitSpin("none", 0.0, 1.0, 3, 0.01, lo_open=True)
        self.recovery_mode.currentIndexChanged.connect(lambda _i: self._on_recovery_changed(True))
        self.recovery_min.valueChanged.connect(lambda _v: self._on_recovery_changed(False))
        row = QHBoxLayout()
        row.addWidget(self.recovery_mode)
        row.addWidget(self.recovery_min, 1)
        form.addRow("Recovery limit p_t2/p_t0 min", row)
        self.tabs.addTab(_scroll(w), "Limits")

    def _optional_from_widgets(self, name):
        box, spin = self.optional_limits[name]
        value = float(spin.value()) if box.isChecked() else None
        return lambda p: replace(p, limits=replace(p.limits, **{name: value}))

    def _on_optional_toggled(self, name, on) -> None:
        self.optional_limits[name][1].setEnabled(on)
        if not self._loading:
            self.apply_now(self._optional_from_widgets(name))

    def _on_recovery_changed(self, immediate: bool) -> None:
        mode = self.recovery_mode.currentIndex()
        self.recovery_min.setEnabled(mode == 1)
        if self._loading:
            return
        value = None if mode == 0 else (float(self.recovery_min.value()) if mode == 1 else REFERENCE_RECOVERY_NAME)
        change = lambda p: replace(p, limits=replace(p.limits, recovery_min=value))  # noqa: E731
        if immediate:
            self.apply_now(change)
        else:
            self.queue(change)

    def _load_limits(self, p) -> None:
        lim = p.limits
        self.face_mach_max.set_si(lim.face_mach_max)
        defaults = {"throat_mach_max": 0.8, "stable_flow_fraction": 0.85, "relative_tip_mach_max": 1.5,
                    "spillage_fraction_max": 0.3}
        for name, (box, spin) in self.optional_limits.items():
            value = getattr(lim, name, None)
            box.setChecked(value is not None)
            spin.setEnabled(value is not None)
            spin.set_si(value if value is not None else defaults[name])
        rec = lim.recovery_min
        if rec is None:
            self.recovery_mode.setCurrentIndex(0)
        elif rec == REFERENCE_RECOVERY_NAME:
            self.recovery_mode.setCurrentIndex(2)
        else:
            self.recovery_mode.setCurrentIndex(1)
            self.recovery_min.set_si(float(rec))
        self.recovery_min.setEnabled(self.recovery_mode.currentIndex() == 1)

    # -- engine ratings ------------------------------------------------------------
    def _build_ratings(self) -> None:
        w = QWidget()
        lay = QVBoxLayout(w)
        top = QHBoxLayout()
        self.rating_pick = QComboBox()
        self.rating_pick.currentIndexChanged.connect(lambda _i: self._show_rating())
        self.rating_name = QLineEdit()
        self.rating_name.editingFinished.connect(self._rename_rating)
        add, remove = QPushButton("Add rating"), QPushButton("Remove rating")
        add.clicked.connect(self._add_rating)
        remove.clicked.connect(self._remove_rating)
        top.addWidget(QLabel("Rating"))
        top.addWidget(self.rating_pick, 1)
        top.addWidget(add)
        top.addWidget(remove)
        lay.addLayout(top)
        form = QFormLayout()
        form.addRow("Name", self.rating_name)
        self.tip_box = QCheckBox("given")
        self.tip_speed = UnitSpin("blade_speed", 0.0, MAX_TIP, 1, 5.0, lo_open=True)
        self.tip_box.toggled.connect(lambda _on: self._tip_changed(True))
        self.tip_speed.valueChanged.connect(lambda _v: self._tip_changed(False))
        row = QHBoxLayout()
        row.addWidget(self.tip_box)
        row.addWidget(self.tip_speed, 1)
        form.addRow("Fan tip speed U_tip", row)
        lay.addLayout(form)
        self.rating_table = make_table(["θ2 = T_t2/T_ref", "Corrected flow W_c2"])
        self.rating_table.cellChanged.connect(lambda _r, _c: self._rating_table_changed())
        lay.addWidget(self.rating_table, 1)
        buttons = QHBoxLayout()
        add_row, remove_row = QPushButton("Add row"), QPushButton("Remove row")
        add_row.clicked.connect(self._add_rating_row)
        remove_row.clicked.connect(self._remove_rating_row)
        buttons.addWidget(add_row)
        buttons.addWidget(remove_row)
        lay.addLayout(buttons)
        hint = QLabel("θ2 must increase strictly (0.3 < θ2 < 3); corrected flow is interpolated linearly "
                      "and held at the end values outside the table.")
        hint.setWordWrap(True)
        lay.addWidget(hint)
        self.tabs.addTab(w, "Engine")

    def _rating_index(self) -> int:
        return max(0, self.rating_pick.currentIndex())

    def _load_ratings(self, p) -> None:
        keep = self._rating_index()
        self.rating_pick.blockSignals(True)
        self.rating_pick.clear()
        self.rating_pick.addItems([r.name for r in p.ratings])
        self.rating_pick.setCurrentIndex(min(keep, len(p.ratings) - 1))
        self.rating_pick.blockSignals(False)
        self._show_rating()

    def _show_rating(self) -> None:
        if self._project is None or not self._project.ratings:
            return
        was = self._loading
        self._loading = True
        try:
            r = self._project.ratings[min(self._rating_index(), len(self._project.ratings) - 1)]
            self.rating_name.setText(r.name)
            self.tip_box.setChecked(r.fan_tip_speed_m_s is not None)
            self.tip_speed.setEnabled(r.fan_tip_speed_m_s is not None)
            self.tip_speed.set_si(r.fan_tip_speed_m_s if r.fan_tip_speed_m_s is not None else 400.0)
            t = self.rating_table
            t.blockSignals(True)
            t.setHorizontalHeaderLabels(["θ2 = T_t2/T_ref", self._units.with_unit("Corrected flow W_c2", "flow")])
            t.setRowCount(len(r.theta))
            for k, (th, wc) in enumerate(zip(r.theta, r.corrected_flow_kg_s)):
                t.setItem(k, 0, number_item(th, "none", self._units))
                t.setItem(k, 1, number_item(wc, "flow", self._units))
            t.blockSignals(False)
        finally:
            self._loading = was

    def _replace_rating(self, p, k, rating):
        ratings = list(p.ratings)
        old = ratings[k].name
        ratings[k] = rating
        cases = p.cases
        if rating.name != old:
            cases = tuple(replace(c, rating=rating.name) if c.rating == old else c for c in cases)
        return replace(p, ratings=tuple(ratings), cases=cases)

    def _rating_table_changed(self) -> None:
        if self._loading:
            return
        k = self._rating_index()
        t, u = self.rating_table, self._units
        try:
            theta = tuple(cell_si(t, r, 0, "none", u, "θ2") for r in range(t.rowCount()))
            flow = tuple(cell_si(t, r, 1, "flow", u, "corrected flow") for r in range(t.rowCount()))
        except CellError as exc:
            self.show_error(str(exc))
            return
        self.apply_now(lambda p: self._replace_rating(
            p, k, replace(p.ratings[k], theta=theta, corrected_flow_kg_s=flow)))

    def _tip_changed(self, immediate: bool) -> None:
        self.tip_speed.setEnabled(self.tip_box.isChecked())
        if self._loading:
            return
        k = self._rating_index()
        value = self.tip_speed.si() if self.tip_box.isChecked() else None
        change = lambda p: self._replace_rating(p, k, replace(p.ratings[k], fan_tip_speed_m_s=value))  # noqa: E731
        self.apply_now(change) if immediate else self.queue(change)

    def _rename_rating(self) -> None:
        if self._loading or self._project is None:
            return
        k = self._rating_index()
        name = self.rating_name.text().strip()
        if name == self._project.ratings[k].name:
            return
        if self.apply_now(lambda p: self._replace_rating(p, k, replace(p.ratings[k], name=name))):
            self._load_ratings(self._project)
            self._load_cases(self._project)

    def _add_rating(self) -> None:
        if self._project is None:
            return
        base = self._project.ratings[self._rating_index()]
        names = {r.name for r in self._project.ratings}
        n = 2
        while f"{base.name} ({n})" in names:
            n += 1
        new = replace(base, name=f"{base.name} ({n})")
        if self.apply_now(lambda p: replace(p, ratings=p.ratings + (new,))):
            self._load_ratings(self._project)
            self.rating_pick.setCurrentIndex(len(self._project.ratings) - 1)
            self._load_cases(self._project)

    def _remove_rating(self) -> None:
        if self._project is None:
            return
        k = self._rating_index()
        name = self._project.ratings[k].name
        if any(c.rating == name for c in self._project.cases):
            self.show_error(f"rating {name!r} is used by a case; change or remove that case first")
            return
        if len(self._project.ratings) == 1:
            self.show_error("the project needs at least one engine rating")
            return
        if self.apply_now(lambda p: replace(p, ratings=tuple(r for i, r in enumerate(p.ratings) if i != k))):
            self._load_ratings(self._project)
            self._load_cases(self._project)

    def _add_rating_row(self) -> None:
        k = self._rating_index()

        def change(p):
            r = p.ratings[k]
            th = r.theta[-1] + 0.1
            return self._replace_rating(p, k, replace(r, theta=r.theta + (th,),
                                                      corrected_flow_kg_s=r.corrected_flow_kg_s
                                                      + (r.corrected_flow_kg_s[-1],)))

        if self.apply_now(change):
            self._show_rating()

    def _remove_rating_row(self) -> None:
        k = self._rating_index()
        row = self.rating_table.currentRow()

        def change(p):
            r = p.ratings[k]
            j = row if 0 <= row < len(r.theta) else len(r.theta) - 1
            return self._replace_rating(p, k, replace(
                r, theta=r.theta[:j] + r.theta[j + 1:],
                corrected_flow_kg_s=r.corrected_flow_kg_s[:j] + r.corrected_flow_kg_s[j + 1:]))

        if self.apply_now(change):
            self._show_rating()

    # -- envelope ------------------------------------------------------------------
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

    # -- cases ---------------------------------------------------------------------
    def _build_cases(self) -> None:
        w = QWidget()
        lay = QVBoxLayout(w)
        self.case_table = make_table(["Case name", "Engine rating", "ISA offset ΔT"])
        self.case_table.cellChanged.connect(lambda _r, _c: self._cases_changed())
        lay.addWidget(self.case_table, 1)
        buttons = QHBoxLayout()
        add, remove = QPushButton("Add case"), QPushButton("Remove case")
        add.clicked.connect(self._add_case)
        remove.clicked.connect(self._remove_case)
        buttons.addWidget(add)
        buttons.addWidget(remove)
        lay.addLayout(buttons)
        self.tabs.addTab(w, "Cases")

    def _load_cases(self, p) -> None:
        t, u = self.case_table, self._units
        t.blockSignals(True)
        t.setHorizontalHeaderLabels(["Case name", "Engine rating",
                                     u.with_unit("ISA offset ΔT", "temperature_difference")])
        t.setRowCount(len(p.cases))
        names = [r.name for r in p.ratings]
        for k, c in enumerate(p.cases):
            t.setItem(k, 0, QTableWidgetItem(c.name))
            combo = QComboBox()
            combo.addItems(names)
            combo.setCurrentText(c.rating)
            combo.currentTextChanged.connect(lambda _t: self._cases_changed())
            t.setCellWidget(k, 1, combo)
            t.setItem(k, 2, number_item(c.isa_offset_K, "temperature_difference", u))
        t.blockSignals(False)

    def _cases_changed(self) -> None:
        if self._loading:
            return
        t, u = self.case_table, self._units
        try:
            cases = []
            for r in range(t.rowCount()):
                name = t.item(r, 0).text().strip() if t.item(r, 0) is not None else ""
                combo = t.cellWidget(r, 1)
                rating = combo.currentText() if combo is not None else ""
                dt = cell_si(t, r, 2, "temperature_difference", u, "ISA offset")
                cases.append(Case(name=name, rating=rating, isa_offset_K=dt))
        except CellError as exc:
            self.show_error(str(exc))
            return
        self.apply_now(lambda p: replace(p, cases=tuple(cases)))

    def _add_case(self) -> None:
        def change(p):
            names = {c.name for c in p.cases}
            n = len(p.cases) + 1
            while f"case {n}" in names:
                n += 1
            return replace(p, cases=p.cases + (Case(name=f"case {n}", rating=p.ratings[0].name, isa_offset_K=0.0),))

        if self.apply_now(change):
            self._load_cases(self._project)

    def _remove_case(self) -> None:
        row = self.case_table.currentRow()

        def change(p):
            k = row if 0 <= row < len(p.cases) else len(p.cases) - 1
            return replace(p, cases=p.cases[:k] + p.cases[k + 1:])

        if self.apply_now(change):
            self._load_cases(self._project)

    # -- grid ----------------------------------------------------------------------
    def _build_grid(self) -> None:
        w = QWidget()
        form = QFormLayout(w)
        self.mach_points = QSpinBox()
        self.alt_points = QSpinBox()
        for s, name in ((self.mach_points, "mach_points"), (self.alt_points, "altitude_points")):
            s.setRange(MIN_AXIS, MAX_AXIS)
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
