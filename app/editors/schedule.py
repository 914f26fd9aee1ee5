"""The "Schedule" tab: ``[inlet.schedule]``, geometry scheduled against flight Mach number (linear, ends held).

One row per schedule Mach number M0; one column per scheduled key of the chosen inlet type (throat area,
shock-on-lip Mach, bleed fraction, and one column per ramp for the ramp angles). A check box per key switches
its column on (scheduled: every row starts at the fixed ``[inlet]`` value) or off (the fixed value holds at every
Mach). With no key switched on there is no schedule. Which keys a type may schedule, their units, bounds and
tooltips come from the schema (``engine_air.project.schema.schedule_fields``).

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``apply_now``, ``show_error``) of
``app.editors.pipeline.EditPipeline``; every edit is checked by ``validate_project`` like any other.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtWidgets import QCheckBox, QHBoxLayout, QLabel, QPushButton, QVBoxLayout, QWidget

from engine_air.project import schema as S
from engine_air.project.model import Schedule

from .fields import dimension, tooltip
from .widgets import CellError, cell_si, make_table, number_item

SCHEDULE_HEADERS = {"throat_area_m2": "A_th", "shock_on_lip_mach": "M_d", "bleed_fraction": "Bleed"}
"""Short column headers (the header tooltip has the key's description)."""
SCHEDULE_LABELS = {"throat_area_m2": "Throat area A_th", "shock_on_lip_mach": "Shock-on-lip Mach M_d",
                   "ramp_angles_deg": "Ramp angles", "bleed_fraction": "Bleed fraction"}


def _columns(inlet) -> list[tuple[str, int | None]]:
    """(key, ramp index or None) of each value column of the schedule table, after the Mach column."""
    sch = inlet.schedule
    if sch is None:
        return []
    out = []
    for f in S.schedule_fields(inlet.type)[1:]:
        values = getattr(sch, f.key)
        if values is None:
            continue
        if f.kind == "number table":
            out += [(f.key, k) for k in range(len(values[0]) if values else 0)]
        else:
            out.append((f.key, None))
    return out


def _fixed_value(inlet, key):
    value = getattr(inlet, key)
    return tuple(value) if isinstance(value, tuple) else value


class ScheduleTab:
    """The "Schedule" tab: [inlet.schedule] as a table, rows = schedule Mach numbers."""

    def _build_schedule(self) -> None:
        w = QWidget()
        lay = QVBoxLayout(w)
        intro = QLabel("Geometry against flight Mach number M0: linear between the rows, end values held outside "
                       "them. Tick a key to schedule it (each row starts at the fixed value of the Inlet tab); "
                       "untick it to hold the fixed value at every Mach number.")
        intro.setWordWrap(True)
        lay.addWidget(intro)
        boxes = QHBoxLayout()
        self.schedule_boxes = {}
        for key, label in SCHEDULE_LABELS.items():
            box = QCheckBox(label)
            box.setToolTip(tooltip(S.field(f"inlet.schedule.{key}")))
            box.toggled.connect(lambda on, k=key: self._on_schedule_key(k, on))
            boxes.addWidget(box)
            self.schedule_boxes[key] = box
        boxes.addStretch(1)
        lay.addLayout(boxes)
        self.schedule_table = make_table(["M0"])
        self.schedule_table.cellChanged.connect(lambda _r, _c: self._schedule_table_changed())
        lay.addWidget(self.schedule_table, 1)
        buttons = QHBoxLayout()
        self.schedule_add_row = QPushButton("Add Mach row")
        self.schedule_remove_row = QPushButton("Remove Mach row")
        self.schedule_add_row.clicked.connect(self._add_schedule_row)
        self.schedule_remove_row.clicked.connect(self._remove_schedule_row)
        buttons.addWidget(self.schedule_add_row)
        buttons.addWidget(self.schedule_remove_row)
        buttons.addStretch(1)
        lay.addLayout(buttons)
        self.schedule_note = QLabel("")
        self.schedule_note.setWordWrap(True)
        lay.addWidget(self.schedule_note)
        self.schedule_tab = w
        self.tabs.addTab(w, "Schedule")

    def _load_schedule(self, p) -> None:
        inlet, u = p.inlet, self._units
        own = {f.key: f for f in S.schedule_fields(inlet.type)}
        was = self._loading
        self._loading = True
        try:
            for key, box in self.schedule_boxes.items():
                box.blockSignals(True)
                box.setChecked(inlet.schedule is not None and getattr(inlet.schedule, key) is not None)
                box.setVisible(key in own)
                box.setEnabled(key in own)
                if key in own:
                    box.setToolTip(tooltip(own[key]))
                box.blockSignals(False)
            cols = _columns(inlet)
            t = self.schedule_table
            t.blockSignals(True)
            t.clear()
            t.setColumnCount(1 + len(cols))
            headers = ["M0"]
            for key, k in cols:
                f = own[key]
                if k is None:
                    headers.append(u.with_unit(SCHEDULE_HEADERS[key], dimension(f)))
                else:
                    headers.append(f"Ramp {k + 1} (°)")
            t.setHorizontalHeaderLabels(headers)
            t.horizontalHeaderItem(0).setToolTip(tooltip(own["mach"]))
            for c, (key, _k) in enumerate(cols, start=1):
                t.horizontalHeaderItem(c).setToolTip(tooltip(own[key]))
            sch = inlet.schedule
            t.setRowCount(0 if sch is None else len(sch.mach))
            if sch is not None:
                for r, m in enumerate(sch.mach):
                    t.setItem(r, 0, number_item(m, "none", u))
                    for c, (key, k) in enumerate(cols, start=1):
                        values = getattr(sch, key)
                        value = values[r] if k is None else values[r][k]
                        t.setItem(r, c, number_item(value, dimension(own[key]), u))
            t.blockSignals(False)
            on = sch is not None
            self.schedule_add_row.setEnabled(on)
            self.schedule_remove_row.setEnabled(on)
            self.schedule_note.setText(
                f"{len(sch.mach)} schedule rows; keys scheduled: "
                + ", ".join(key for key in SCHEDULE_LABELS if getattr(sch, key) is not None) + "."
                if on else f"No schedule: the {inlet.type} inlet keeps its fixed geometry at every flight Mach "
                           "number.")
        finally:
            self._loading = was

    def _schedule_structure(self, p) -> tuple:
        """What the table's shape depends on; the table is rebuilt when it changes."""
        inlet = p.inlet
        sch = inlet.schedule
        return (inlet.type, len(inlet.ramp_angles_deg), None if sch is None else len(sch.mach),
                tuple(_columns(inlet)))

    def _schedule_from_table(self, p) -> Schedule:
        t, u = self.schedule_table, self._units
        own = {f.key: f for f in S.schedule_fields(p.inlet.type)}
        rows = range(t.rowCount())
        mach = tuple(cell_si(t, r, 0, "none", u, "M0") for r in rows)
        values: dict = {}
        for c, (key, k) in enumerate(_columns(p.inlet), start=1):
            what = SCHEDULE_LABELS[key] if k is None else f"ramp {k + 1}"
            column = [cell_si(t, r, c, dimension(own[key]), u, what) for r in rows]
            if k is None:
                values[key] = tuple(column)
            else:
                values.setdefault(key, [[] for _ in rows])
                for r, v in enumerate(column):
                    values[key][r].append(v)
        values = {key: (tuple(tuple(row) for row in v) if isinstance(v, list) else v) for key, v in values.items()}
        return replace(p.inlet.schedule, mach=mach, **values)

    def _schedule_table_changed(self) -> None:
        if self._loading or self._project is None or self._project.inlet.schedule is None:
            return
        try:
            schedule = self._schedule_from_table(self._project)
        except CellError as exc:
            self.show_error(str(exc))
            return
        self.apply_now(lambda p: replace(p, inlet=replace(p.inlet, schedule=schedule)))

    def _on_schedule_key(self, key: str, on: bool) -> None:
        if self._loading or self._project is None:
            return

        def change(p):
            inlet = p.inlet
            sch = inlet.schedule
            if on:
                if sch is None:
                    lo, hi = min(p.envelope.mach), max(p.envelope.mach)
                    sch = Schedule(mach=(lo, hi) if hi > lo else (lo, lo + 0.5))
                fixed = _fixed_value(inlet, key)
                if fixed is None:
                    raise ValueError(f"inlet.{key} has no fixed value to start the schedule from; give it on the "
                                     "Inlet tab first")
                sch = replace(sch, **{key: tuple(fixed for _ in sch.mach)})
            elif sch is not None:
                sch = replace(sch, **{key: None})
                if all(getattr(sch, k) is None for k in SCHEDULE_LABELS):
                    sch = None
            return replace(p, inlet=replace(inlet, schedule=sch))

        if not self.apply_now(change):
            box = self.schedule_boxes[key]
            box.blockSignals(True)
            box.setChecked(not on)
            box.blockSignals(False)
        self._load_schedule(self._project)

    def _add_schedule_row(self) -> None:
        """A row after the selected one (else after the last): Mach and values halfway to the next row, or the
        last row's values at a Mach number 0.2 higher."""
        row = self.schedule_table.currentRow()

        def change(p):
            sch = p.inlet.schedule
            n = len(sch.mach)
            k = row if 0 <= row < n else n - 1

            def insert(seq, mid):
                return seq[:k + 1] + (mid,) + seq[k + 1:]

            def between(a, b):
                if isinstance(a, tuple):
                    return tuple((x + y) / 2.0 for x, y in zip(a, b))
                return (a + b) / 2.0

            last = k == n - 1
            new_mach = sch.mach[k] + 0.2 if last else (sch.mach[k] + sch.mach[k + 1]) / 2.0
            values = {"mach": insert(sch.mach, new_mach)}
            for key in SCHEDULE_LABELS:
                seq = getattr(sch, key)
                if seq is not None:
                    values[key] = insert(seq, seq[k] if last else between(seq[k], seq[k + 1]))
            return replace(p, inlet=replace(p.inlet, schedule=replace(sch, **values)))

        if self._project is not None and self._project.inlet.schedule is not None and self.apply_now(change):
            self._load_schedule(self._project)

    def _remove_schedule_row(self) -> None:
        row = self.schedule_table.currentRow()

        def change(p):
            sch = p.inlet.schedule
            n = len(sch.mach)
            if n == 1:
                raise ValueError("the schedule needs at least one Mach row; untick its keys to remove it")
            k = row if 0 <= row < n else n - 1
            values = {key: getattr(sch, key)[:k] + getattr(sch, key)[k + 1:]
                      for key in ("mach", *SCHEDULE_LABELS) if getattr(sch, key) is not None}
            return replace(p, inlet=replace(p.inlet, schedule=replace(sch, **values)))

        if self._project is not None and self._project.inlet.schedule is not None and self.apply_now(change):
            self._load_schedule(self._project)


__all__ = ["SCHEDULE_HEADERS", "SCHEDULE_LABELS", "ScheduleTab"]
