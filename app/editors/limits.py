"""The "Limits" tab: the face Mach limit, the optional limits behind a check box, started operation,
the recovery limit (a number or the MIL-E-5008B reference) and, per check, the optional region where it is judged
(``[limits.region.NAME]``: Mach and altitude ranges, two cells each, both blank for no bound; method section 15).

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from engine_air.envelope.check_names import CHECK_NAMES
from engine_air.project import schema as S
from engine_air.project.model import REFERENCE_RECOVERY_NAME, LimitRegion

from .fields import fallback as _fallback, scroll as _scroll, tooltip as _tooltip
from .widgets import CellError, make_table, number_item, range_cells

REGION_COLUMNS = ("Check", "M0 from", "M0 to", "H from", "H to")


class LimitsTab:
    """The "Limits" tab: the face Mach limit, the optional limits behind a check box, started operation and"""

    def _build_limits(self) -> None:
        w = QWidget()
        outer = QVBoxLayout(w)
        form = QFormLayout()
        outer.addLayout(form)

        def limit_field(name):
            return lambda p, v: replace(p, limits=replace(p.limits, **{name: v}))

        self.face_mach_max = self._field_spin(S.field("limits.face_mach_max"), limit_field("face_mach_max"))
        form.addRow("Face Mach limit M2 max", self.face_mach_max)
        self.optional_limits = {}
        labels = {"throat_mach_max": "Throat Mach limit M_th max",
                  "stable_flow_fraction": "Stable flow fraction MFR/MFR_max",
                  "relative_tip_mach_max": "Blade relative tip Mach max", "spillage_fraction_max": "Spillage fraction max",
                  "installation_loss_max": "Installation loss max (share of net thrust)",
                  "dc60_max": "Distortion DC(60) max", "surge_margin_min": "Remaining surge margin min"}
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
        self._build_limit_regions(outer)
        self.tabs.addTab(_scroll(w), "Limits")

    def _build_limit_regions(self, layout) -> None:
        """A table with one row per check: the Mach and altitude range where it is judged (blank: everywhere)."""
        title = QLabel("<b>Where each limit is judged</b> (optional)")
        layout.addWidget(title)
        t = self.region_table = make_table(list(REGION_COLUMNS))
        t.setRowCount(len(CHECK_NAMES))
        t.verticalHeader().setVisible(False)
        for c, key in ((1, "mach_range"), (2, "mach_range"), (3, "altitude_range_m"), (4, "altitude_range_m")):
            t.horizontalHeaderItem(c).setToolTip(_tooltip(S.field(f"{S.REGION_TABLE}.{key}"))
                                                 + "\nLeave both cells blank for no bound on this axis.")
        t.setFixedHeight(t.horizontalHeader().sizeHint().height() + 30 * len(CHECK_NAMES) + 4)
        t.cellChanged.connect(lambda _r, _c: self._regions_changed())
        layout.addWidget(t)
        note = QLabel("A check is judged only for M0 and altitude inside its bounds (included); outside them it "
                      "has no verdict and no margin at that point. A check judged nowhere in the envelope is "
                      "reported as not judged anywhere, never as holding. Blank cells: no bound on that axis. "
                      "Example: a mixed-compression inlet's \"started\" check only from the Mach number at which "
                      "it is meant to run started.")
        note.setWordWrap(True)
        layout.addWidget(note)
        layout.addStretch(1)

    def _load_limit_regions(self, p) -> None:
        t, u = self.region_table, self._units
        t.blockSignals(True)
        t.setHorizontalHeaderLabels(["Check", "M0 from", "M0 to", u.with_unit("H from", "altitude"),
                                     u.with_unit("H to", "altitude")])
        for k, name in enumerate(CHECK_NAMES):
            item = QTableWidgetItem(name)
            item.setFlags(item.flags() & ~Qt.ItemIsEditable)
            t.setItem(k, 0, item)
            region = p.limits.region(name)
            for col, values, dim in ((1, region and region.mach_range, "none"),
                                     (3, region and region.altitude_range_m, "altitude")):
                for j in range(2):
                    t.setItem(k, col + j, number_item(values[j], dim, u) if values else QTableWidgetItem(""))
        t.blockSignals(False)

    def _regions_changed(self) -> None:
        if self._loading:
            return
        t, u = self.region_table, self._units
        try:
            regions = []
            for r, name in enumerate(CHECK_NAMES):
                mach = range_cells(t, r, 1, "none", u, f"{name} Mach range")
                alt = range_cells(t, r, 3, "altitude", u, f"{name} altitude range")
                if mach is not None or alt is not None:
                    regions.append(LimitRegion(name, mach_range=mach, altitude_range_m=alt))
        except CellError as exc:
            self.show_error(str(exc))
            return
        self.apply_now(lambda p: replace(p, limits=replace(p.limits, regions=tuple(regions))))

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
        self._load_limit_regions(p)
