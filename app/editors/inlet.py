"""The "Inlet" tab: the keys every inlet type reads, and the rows of the chosen type's own keys
(built from the registry of inlet types), optional keys behind a check box.

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

import dataclasses
from dataclasses import replace

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QSpinBox,
    QWidget,
)

from engine_air.project import schema as S
from engine_air.project.model import Inlet

from .fields import fallback as _fallback, scroll as _scroll, tooltip as _tooltip
class InletTab:
    """The "Inlet" tab: the keys every inlet type reads, and the rows of the chosen type's own keys"""

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
