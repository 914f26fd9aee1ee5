"""Forms and tables that edit the project: inlet, limits, engine ratings, envelope, cases, grid.

Every widget edit becomes a function Project -> Project. Spin-box edits are
collected for a short debounce (150 ms) so that typing "0.45" makes one edit,
not four. The pending functions are applied to the current project, and the
candidate is checked by the loader's rules (``app.validation.validate``). A
candidate that breaks a rule is rejected: the loader's message is shown in the
red bar above the tabs and the project is not changed. An accepted candidate
is emitted as ``projectEdited(Project)``; the main window records it (undo)
and asks for a recompute.

Spin-box ranges, decimals, steps and tooltips come from the schema (``engine_air.project.schema``), and the
inlet tab shows the keys of the inlet type chosen (from the registry of inlet types).
"""

from __future__ import annotations

import dataclasses
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

from engine_air.project import schema as S
from engine_air.project.errors import ProjectError
from engine_air.project.model import REFERENCE_RECOVERY_NAME, Case, Inlet

from .edit_widgets import CellError, UnitSpin, cell_si, make_table, number_item
from .units import Units
from .validation import validate
from .worker import Debouncer

DEBOUNCE_MS = 150

log = logging.getLogger(__name__)


_DIMENSIONS = {"m^2": "area", "kg/s": "flow", "m/s": "blade_speed", "m": "altitude", "K": "temperature_difference",
               "N": "force"}


def _dimension(f) -> str:
    """The display-unit dimension of a schema field (``app.units``); "none" for plain numbers and degrees."""
    return _DIMENSIONS.get(f.unit, "none")


def _tooltip(f) -> str:
    """A field's one-line description and what is allowed, from the schema."""
    text = f"{f.path}: {f.description}.\nAllowed: {f.allowed_text()}"
    if f.inlet_types:
        text += "\nInlet types: " + ", ".join(f.inlet_types)
    return text


def _fallback(f) -> float:
    """A value to show for a key the project does not give: its default, else a point inside its range."""
    if isinstance(f.default, (int, float)) and not isinstance(f.default, bool):
        return float(f.default)
    lo = f.lo if f.lo is not None else 0.0
    hi = f.hi if f.hi is not None else lo + 1.0
    typical = {"ramp_angles_deg": 8.0, "shock_on_lip_mach": 2.0, "cone_half_angles_deg": 20.0,
               "auxiliary_door_mach_max": 0.3}
    return typical.get(f.key, (lo + hi) / 2.0)


MAX_AREA = S.MAX_AREA_M2
MAX_FLOW = S.MAX_CORRECTED_FLOW_KG_S
MAX_TIP = S.MAX_TIP_SPEED_M_S
MIN_AXIS = S.MIN_AXIS_POINTS
MAX_AXIS = S.MAX_AXIS_POINTS
MAX_GRID = S.MAX_GRID_POINTS


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
    def _field_spin(self, f, change_of_value, dimension=None, suffix=None):
        """A spin box for the schema field ``f``: range, open bounds, decimals, step and tooltip from the field."""
        lo = f.lo if f.lo is not None else -1e12
        hi = f.hi if f.hi is not None else 1e12
        s = UnitSpin(dimension or _dimension(f), lo, hi, f.decimals if f.decimals is not None else 4,
                     f.step if f.step is not None else 0.01, f.lo_open, f.hi_open,
                     suffix=suffix if suffix is not None else ("°" if f.unit == "deg" else None))
        s.setToolTip(_tooltip(f))
        if change_of_value is not None:
            s.valueChanged.connect(lambda _v, s=s: self.queue(lambda p, v=s.si(): change_of_value(p, v)))
        return s

    def _build_inlet(self) -> None:
        w = QWidget()
        form = QFormLayout(w)
        self.inlet_form = form
        self.inlet_type = QComboBox()
        for name, kind in S.inlet_types().items():
            self.inlet_type.addItem(name)
            self.inlet_type.setItemData(self.inlet_type.count() - 1, kind.label, Qt.ToolTipRole)
        self.inlet_type.setToolTip(_tooltip(S.field("inlet.type")))
        self.inlet_type.currentTextChanged.connect(self._on_type)
        form.addRow("Inlet type", self.inlet_type)

        def inlet_field(name):
            return lambda p, v: replace(p, inlet=replace(p.inlet, **{name: v}))

        self.inlet_spins = {}  # key -> UnitSpin, for the numeric keys every type reads
        self.inlet_optional = {}  # key -> (QCheckBox, UnitSpin), for optional numeric keys without default
        self.type_widgets = {}  # key -> widgets of a type-specific key
        self._type_rows = {}  # key -> the rows (label widgets) to show or hide
        labels = {
            "capture_area_m2": "Capture area A_c (station 1)", "throat_area_m2": "Throat area A_th",
            "face_area_m2": "Engine-face flow area A2", "duct_loss_coefficient": "Duct loss coefficient K",
            "lip_suction_factor": "Lip suction factor (0–1)",
            "supersonic_lip_suction_factor": "Supersonic lip suction factor (0–1)",
            "bleed_fraction": "Bleed fraction of captured flow", "bleed_exit_velocity_ratio": "Bleed exit V/V0",
            "bypass_area_m2": "Bypass door area", "bypass_discharge_coefficient": "Bypass discharge coefficient",
            "bypass_exit_velocity_ratio": "Bypass exit V/V0", "auxiliary_inlet_area_m2": "Auxiliary door area",
            "auxiliary_door_mach_max": "Auxiliary doors closed above M0",
            "auxiliary_loss_coefficient": "Auxiliary door loss coefficient",
            "ramp_angles_deg": "Ramp", "shock_on_lip_mach": "Shock-on-lip Mach M_d",
            "cone_half_angles_deg": "Cone", "internal_recovery_factor": "Internal recovery factor",
        }
        self._inlet_labels = labels
        fields = S.inlet_fields()
        for f in fields:
            if f.key == "type" or f.inlet_types:
                continue
            if f.default is None:  # optional without a default: a check box gives it
                box = QCheckBox()
                spin = self._field_spin(f, None)
                spin.valueChanged.connect(lambda _v, n=f.key: self.queue(self._inlet_optional_from_widgets(n)))
                box.toggled.connect(lambda on, n=f.key: self._on_inlet_optional_toggled(n, on))
                row = QHBoxLayout()
                row.addWidget(box)
                row.addWidget(spin, 1)
                form.addRow(labels.get(f.key, f.key), row)
                self.inlet_optional[f.key] = (box, spin)
            else:
                spin = self._field_spin(f, inlet_field(f.key))
                form.addRow(labels.get(f.key, f.key), spin)
                self.inlet_spins[f.key] = spin
            if f.key == "face_area_m2":
                self._build_type_fields(form, [g for g in fields if g.inlet_types], labels)
        self.capture_area = self.inlet_spins["capture_area_m2"]
        self.throat_area = self.inlet_spins["throat_area_m2"]
        self.face_area = self.inlet_spins["face_area_m2"]
        self.duct_k = self.inlet_spins["duct_loss_coefficient"]
        self.lip_suction = self.inlet_spins["lip_suction_factor"]
        ramps = self.type_widgets.get("ramp_angles_deg")
        if ramps is not None:
            self.ramp_count, self.ramp_spins = ramps
        lip = self.type_widgets.get("shock_on_lip_mach")
        if lip is not None:
            self.lip_mach = lip
        self.type_note = QLabel("")
        self.type_note.setWordWrap(True)
        form.addRow(self.type_note)
        self.tabs.addTab(_scroll(w), "Inlet")

    def _build_type_fields(self, form, fields, labels) -> None:
        """Rows for the keys of one or a few inlet types (from the registry); shown for the chosen type only."""
        for f in fields:
            label = labels.get(f.key, f.key)
            if f.kind == "number list":
                most = f.length[1] if f.length and f.length[1] else 3
                count = QSpinBox()
                count.setRange(f.length[0] if f.length else 1, most)
                count.setToolTip(_tooltip(f))
                count.valueChanged.connect(lambda _n, k=f.key: self.queue(self._type_list_from_widgets(k)))
                count.valueChanged.connect(lambda _n: self._update_type_rows(self.inlet_type.currentText()))
                spins = []
                rows = [QLabel(f"Number of {label.lower()}s")]
                form.addRow(rows[0], count)
                for k in range(most):
                    s = self._field_spin(f, None)
                    s.valueChanged.connect(lambda _v, key=f.key: self.queue(self._type_list_from_widgets(key)))
                    spins.append(s)
                    lab = QLabel(f"{label} {k + 1}" + (" deflection" if f.key == "ramp_angles_deg" else
                                                      " half-angle" if f.key == "cone_half_angles_deg" else ""))
                    form.addRow(lab, s)
                    rows.append(lab)
                self.type_widgets[f.key] = (count, spins)
                self._type_rows[f.key] = rows
            elif f.kind == "number":
                s = self._field_spin(f, lambda p, v, k=f.key: replace(p, inlet=replace(p.inlet, **{k: v})))
                lab = QLabel(label)
                form.addRow(lab, s)
                self.type_widgets[f.key] = s
                self._type_rows[f.key] = [lab]

    def _type_list_from_widgets(self, key):
        def change(p):
            if key not in {f.key for f in S.inlet_fields(p.inlet.type)}:
                return p
            count, spins = self.type_widgets[key]
            values = tuple(float(s.value()) for s in spins[:count.value()])
            return replace(p, inlet=replace(p.inlet, **{key: values}))
        return change

    def _inlet_optional_from_widgets(self, name):
        box, spin = self.inlet_optional[name]
        value = spin.si() if box.isChecked() else None
        return lambda p: replace(p, inlet=replace(p.inlet, **{name: value}))

    def _on_inlet_optional_toggled(self, name, on) -> None:
        self.inlet_optional[name][1].setEnabled(on)
        if not self._loading:
            self.apply_now(self._inlet_optional_from_widgets(name))

    def _ramps_from_widgets(self, p):
        return self._type_list_from_widgets("ramp_angles_deg")(p)

    def _type_values_from_widgets(self, kind: str) -> dict:
        """The type-specific keys of type ``kind`` as the widgets show them; other types' keys at their default."""
        own = {f.key for f in S.inlet_fields(kind) if f.inlet_types}
        defaults = {fld.name: fld.default for fld in dataclasses.fields(Inlet)}
        values = {}
        for key, widget in self.type_widgets.items():
            if key not in defaults:
                continue
            if key not in own:
                values[key] = defaults[key]
            elif isinstance(widget, tuple):
                count, spins = widget
                values[key] = tuple(float(s.value()) for s in spins[:count.value()])
            else:
                values[key] = float(widget.value())
        return values

    def _on_type(self, kind: str) -> None:
        if self._loading:
            return
        self._update_type_rows(kind)

        def change(p):
            if kind == p.inlet.type:
                return p
            return replace(p, inlet=replace(p.inlet, type=kind, schedule=None, **self._type_values_from_widgets(kind)))

        self.apply_now(change)

    def _update_type_rows(self, kind: str) -> None:
        own = {f.key for f in S.inlet_fields(kind) if f.inlet_types}
        for key, widget in self.type_widgets.items():
            show = key in own
            rows = self._type_rows[key]
            if isinstance(widget, tuple):
                count, spins = widget
                self.inlet_form.setRowVisible(count, show)
                count.setEnabled(show)
                for k, s in enumerate(spins):
                    self.inlet_form.setRowVisible(s, show and k < count.value())
                    s.setEnabled(show and k < count.value())
            else:
                self.inlet_form.setRowVisible(widget, show)
                widget.setEnabled(show)
            del rows
        label = S.inlet_types()[kind].label if kind in S.inlet_types() else kind
        self.type_note.setText(f"Keys shown: those of the inlet type {kind} ({label}); docs/project-file.md lists every key.")

    def _update_ramp_enabled(self, kind: str) -> None:
        self._update_type_rows(kind)

    def _load_inlet(self, p) -> None:
        i = p.inlet
        self.inlet_type.setCurrentText(i.type)
        for key, spin in self.inlet_spins.items():
            spin.set_si(getattr(i, key))
        for key, (box, spin) in self.inlet_optional.items():
            value = getattr(i, key)
            box.setChecked(value is not None)
            spin.setEnabled(value is not None)
            spin.set_si(value if value is not None else _fallback(S.field(f"inlet.{key}")))
        fields = {f.key: f for f in S.inlet_fields()}
        for key, widget in self.type_widgets.items():
            f = fields[key]
            value = getattr(i, key, None)
            if isinstance(widget, tuple):
                count, spins = widget
                values = list(value or ()) or [_fallback(f)]
                count.setValue(len(values))
                pad = values + [values[-1] if f.key != "ramp_angles_deg" else 7.0] * len(spins)
                for k, s in enumerate(spins):
                    s.set_si(pad[k])
            else:
                widget.set_si(value if value is not None else _fallback(f))
        self._update_type_rows(i.type)

    # -- limits --------------------------------------------------------------------
    def _build_limits(self) -> None:
        w = QWidget()
        form = QFormLayout(w)

        def limit_field(name):
            return lambda p, v: replace(p, limits=replace(p.limits, **{name: v}))

        self.face_mach_max = self._field_spin(S.field("limits.face_mach_max"), limit_field("face_mach_max"))
        form.addRow("Face Mach limit M2 max", self.face_mach_max)
        self.optional_limits = {}
        labels = {"throat_mach_max": "Throat Mach limit M_th max",
                  "stable_flow_fraction": "Stable flow fraction MFR/MFR_max",
                  "relative_tip_mach_max": "Blade relative tip Mach max", "spillage_fraction_max": "Spillage fraction max",
                  "installation_loss_max": "Installation loss max (share of net thrust)"}
        for f in S.LIMIT_FIELDS:
            if f.kind != "number" or f.required:
                continue
            name = f.key
            box = QCheckBox()
            spin = self._field_spin(f, None)
            spin.valueChanged.connect(lambda _v, n=name: self.queue(self._optional_from_widgets(n)))
            box.toggled.connect(lambda on, n=name: self._on_optional_toggled(n, on))
            row = QHBoxLayout()
            row.addWidget(box)
            row.addWidget(spin, 1)
            form.addRow(labels.get(name, name), row)
            self.optional_limits[name] = (box, spin)
        self.started_required = QComboBox()
        self.started_required.addItems(["inlet type's default", "required", "not required"])
        self.started_required.setToolTip(_tooltip(S.field("limits.started_required")))
        self.started_required.currentIndexChanged.connect(self._on_started_changed)
        form.addRow("Started operation (mixed compression)", self.started_required)
        self.recovery_mode = QComboBox()
        self.recovery_mode.addItems(["no recovery limit", "number", "MIL-E-5008B reference"])
        self.recovery_min = self._field_spin(S.field("limits.recovery_min"), None)
        self.recovery_mode.setToolTip(_tooltip(S.field("limits.recovery_min")))
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

    def _on_started_changed(self, index: int) -> None:
        if self._loading:
            return
        value = (None, True, False)[index]
        self.apply_now(lambda p: replace(p, limits=replace(p.limits, started_required=value)))

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
                    "spillage_fraction_max": 0.3, "installation_loss_max": 0.06}
        self.started_required.setCurrentIndex({None: 0, True: 1, False: 2}[lim.started_required])
        for name, (box, spin) in self.optional_limits.items():
            value = getattr(lim, name, None)
            box.setChecked(value is not None)
            spin.setEnabled(value is not None)
            spin.set_si(value if value is not None else defaults.get(name, _fallback(S.field(f"limits.{name}"))))
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
        self.tip_speed = self._field_spin(S.field("engine.rating.fan_tip_speed_m_s"), None)
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
        theta = S.field("engine.rating.theta")
        hint = QLabel(f"θ2 must increase strictly ({theta.bounds_text('θ2')}); corrected flow is interpolated "
                      "linearly and held at the end values outside the table.")
        hint.setToolTip(_tooltip(theta))
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
