"""The thrust data of an engine rating (method §13), part of the "Engine" tab.

``thrust_mach`` × ``thrust_altitude_m`` → ``net_thrust_n`` as one grid: the first row holds the flight Mach
numbers, the first column the altitudes, the other cells the net thrust (one row per altitude, one column per
Mach number); ``thrust_reference_recovery`` (the MIL-E-5008B reference or a number) and
``recovery_thrust_exchange`` X beside it. A check box gives or removes all five keys at once (they require each
other). Units, bounds and tooltips come from the schema; each edit is checked by ``validate_project``.

A mixin of ``app.editors.ProjectEditors`` (through ``RatingsTab``): it uses ``apply_now``, ``show_error``,
``_field_spin``, ``_rating_index`` and ``_replace_rating``.
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
    QPushButton,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from engine_air.project import schema as S
from engine_air.project.model import REFERENCE_RECOVERY_NAME

from .fields import tooltip
from .widgets import CellError, cell_si, make_table, number_item

THRUST_KEYS = ("thrust_mach", "thrust_altitude_m", "net_thrust_n", "thrust_reference_recovery",
               "recovery_thrust_exchange")
DEFAULT_THRUST_N = 50_000.0
"""Net thrust each cell starts at when thrust data is switched on (an invented placeholder to overwrite)."""
DEFAULT_EXCHANGE = 1.0
"""Exchange rate X the editor starts at: a thrust change in proportion to the recovery change (common practice
as a first guess; the engine maker's figure replaces it)."""


class ThrustEditor:
    """The "Thrust" part of the Engine tab: the net-thrust grid, reference recovery and exchange rate."""

    def _build_thrust(self, parts) -> None:
        w = QWidget()
        lay = QVBoxLayout(w)
        self.thrust_box = QCheckBox("This rating has thrust data (installed thrust and installation loss)")
        self.thrust_box.setToolTip(tooltip(S.field("engine.rating.net_thrust_n")))
        self.thrust_box.toggled.connect(self._on_thrust_toggled)
        lay.addWidget(self.thrust_box)
        hint = QLabel("First row: flight Mach numbers M0; first column: altitudes; the other cells: net thrust F_n "
                      "at the reference recovery. Bilinear in the table, end values held outside it.")
        hint.setWordWrap(True)
        lay.addWidget(hint)
        self.thrust_table = make_table(["", ""])
        self.thrust_table.horizontalHeader().setVisible(False)
        self.thrust_table.verticalHeader().setVisible(False)
        self.thrust_table.cellChanged.connect(lambda _r, _c: self._thrust_table_changed())
        lay.addWidget(self.thrust_table, 1)
        buttons = QHBoxLayout()
        self.thrust_buttons = []
        for text, slot in (("Add Mach column", lambda: self._thrust_resize(0, +1)),
                           ("Remove Mach column", lambda: self._thrust_resize(0, -1)),
                           ("Add altitude row", lambda: self._thrust_resize(1, +1)),
                           ("Remove altitude row", lambda: self._thrust_resize(1, -1))):
            b = QPushButton(text)
            b.clicked.connect(slot)
            buttons.addWidget(b)
            self.thrust_buttons.append(b)
        buttons.addStretch(1)
        lay.addLayout(buttons)
        form = QFormLayout()
        self.thrust_ref_mode = QComboBox()
        self.thrust_ref_mode.addItems(["MIL-E-5008B reference", "number"])
        ref = S.field("engine.rating.thrust_reference_recovery")
        self.thrust_ref_mode.setToolTip(tooltip(ref))
        self.thrust_ref = self._field_spin(ref, None)
        self.thrust_ref_mode.currentIndexChanged.connect(lambda _i: self._thrust_scalars_changed(True))
        self.thrust_ref.valueChanged.connect(lambda _v: self._thrust_scalars_changed(False))
        row = QHBoxLayout()
        row.addWidget(self.thrust_ref_mode)
        row.addWidget(self.thrust_ref, 1)
        form.addRow("Reference recovery π_ref", row)
        self.thrust_exchange = self._field_spin(S.field("engine.rating.recovery_thrust_exchange"), None)
        self.thrust_exchange.valueChanged.connect(lambda _v: self._thrust_scalars_changed(False))
        form.addRow("Exchange rate X = (ΔF/F)/(Δπ/π)", self.thrust_exchange)
        lay.addLayout(form)
        self.thrust_widget = w
        parts.addTab(w, "Thrust")

    # -- showing --------------------------------------------------------------------------------------------------
    def _show_thrust(self, r) -> None:
        """Show rating ``r``'s thrust data (called with the loading flag set)."""
        u = self._units
        on = r.net_thrust_n is not None
        self.thrust_box.setChecked(on)
        t = self.thrust_table
        t.blockSignals(True)
        t.clear()
        mach = r.thrust_mach or ()
        alt = r.thrust_altitude_m or ()
        t.setColumnCount(1 + len(mach))
        t.setRowCount(1 + len(alt) if on else 0)
        if on:
            corner = QTableWidgetItem(f"H ({u.label('altitude')}) \\ M0 → F_n ({u.label('force')})")
            corner.setFlags(Qt.ItemIsEnabled)
            corner.setToolTip("Row 0: flight Mach numbers; column 0: altitudes; cells: net thrust in "
                              f"{u.label('force')}")
            t.setItem(0, 0, corner)
            for c, m in enumerate(mach, start=1):
                item = number_item(m, "none", u)
                item.setToolTip(tooltip(S.field("engine.rating.thrust_mach")))
                t.setItem(0, c, item)
            for k, h in enumerate(alt, start=1):
                item = number_item(h, "altitude", u)
                item.setToolTip(tooltip(S.field("engine.rating.thrust_altitude_m")))
                t.setItem(k, 0, item)
                for c, f in enumerate(r.net_thrust_n[k - 1], start=1):
                    cell = number_item(f, "force", u)
                    cell.setToolTip(f"net thrust ({u.label('force')}) at M0 {mach[c - 1]:g}, {h:g} m")
                    t.setItem(k, c, cell)
        t.blockSignals(False)
        ref = r.thrust_reference_recovery
        self.thrust_ref_mode.setCurrentIndex(1 if isinstance(ref, (int, float)) else 0)
        self.thrust_ref.set_si(float(ref) if isinstance(ref, (int, float)) else 0.95)
        x = r.recovery_thrust_exchange
        self.thrust_exchange.set_si(float(x) if x is not None else DEFAULT_EXCHANGE)
        for widget in (t, self.thrust_ref_mode, self.thrust_exchange, *self.thrust_buttons):
            widget.setEnabled(on)
        self.thrust_ref.setEnabled(on and self.thrust_ref_mode.currentIndex() == 1)

    # -- edits ----------------------------------------------------------------------------------------------------
    def _thrust_change(self, make):
        """An edit of the current rating: ``make(rating) -> dict of changed keys``."""
        k = self._rating_index()
        return lambda p: self._replace_rating(p, k, replace(p.ratings[k], **make(p.ratings[k])))

    def _on_thrust_toggled(self, on: bool) -> None:
        if self._loading or self._project is None:
            return

        def make(r):
            if not on:
                return dict.fromkeys(THRUST_KEYS)
            env = self._project.envelope
            mach = tuple(sorted({min(env.mach), max(env.mach)}))
            alt = tuple(sorted({min(env.altitude_m), max(env.altitude_m)}))
            return {"thrust_mach": mach, "thrust_altitude_m": alt,
                    "net_thrust_n": tuple(tuple(DEFAULT_THRUST_N for _ in mach) for _ in alt),
                    "thrust_reference_recovery": REFERENCE_RECOVERY_NAME,
                    "recovery_thrust_exchange": DEFAULT_EXCHANGE}

        self.apply_now(self._thrust_change(make))
        self._show_rating()

    def _thrust_from_table(self) -> dict:
        t, u = self.thrust_table, self._units
        rows, cols = t.rowCount(), t.columnCount()
        mach = tuple(cell_si(t, 0, c, "none", u, f"Mach column {c}") for c in range(1, cols))
        alt = tuple(cell_si(t, r, 0, "altitude", u, "altitude") for r in range(1, rows))
        net = tuple(tuple(cell_si(t, r, c, "force", u, f"net thrust at Mach column {c}") for c in range(1, cols))
                    for r in range(1, rows))
        return {"thrust_mach": mach, "thrust_altitude_m": alt, "net_thrust_n": net}

    def _thrust_table_changed(self) -> None:
        if self._loading or self._project is None:
            return
        try:
            values = self._thrust_from_table()
        except CellError as exc:
            self.show_error(str(exc))
            return
        self.apply_now(self._thrust_change(lambda r: values))

    def _thrust_scalars_changed(self, immediate: bool) -> None:
        mode = self.thrust_ref_mode.currentIndex()
        self.thrust_ref.setEnabled(self.thrust_box.isChecked() and mode == 1)
        if self._loading or self._project is None or not self.thrust_box.isChecked():
            return
        ref = float(self.thrust_ref.value()) if mode == 1 else REFERENCE_RECOVERY_NAME
        x = float(self.thrust_exchange.value())
        change = self._thrust_change(lambda r: {"thrust_reference_recovery": ref, "recovery_thrust_exchange": x})
        self.apply_now(change) if immediate else self.queue(change)

    def _thrust_resize(self, axis: int, step: int) -> None:
        """Add (step +1) or remove (-1) a Mach column (axis 0) or an altitude row (axis 1) of the thrust grid,
        after / at the selected one (else the last); a new line copies its neighbour, its coordinate one step on."""
        if self._project is None:
            return
        cur = self.thrust_table.currentColumn() if axis == 0 else self.thrust_table.currentRow()

        def make(r):
            mach, alt, net = list(r.thrust_mach), list(r.thrust_altitude_m), [list(row) for row in r.net_thrust_n]
            axis_values = mach if axis == 0 else alt
            n = len(axis_values)
            j = cur - 1 if 1 <= cur <= n else n - 1
            if step > 0:
                last = j == n - 1
                gap = 0.2 if axis == 0 else 1000.0
                new = axis_values[j] + gap if last else (axis_values[j] + axis_values[j + 1]) / 2.0
                axis_values.insert(j + 1, new)
                if axis == 0:
                    for row in net:
                        row.insert(j + 1, row[j] if last else (row[j] + row[j + 1]) / 2.0)
                else:
                    net.insert(j + 1, list(net[j]) if last else [(a + b) / 2.0 for a, b in zip(net[j], net[j + 1])])
            else:
                if n == 1:
                    raise ValueError("the thrust table needs at least one Mach number and one altitude; untick "
                                     "the thrust data to remove it")
                del axis_values[j]
                if axis == 0:
                    for row in net:
                        del row[j]
                else:
                    del net[j]
            return {"thrust_mach": tuple(mach), "thrust_altitude_m": tuple(alt),
                    "net_thrust_n": tuple(tuple(row) for row in net)}

        if self.apply_now(self._thrust_change(make)):
            self._show_rating()


__all__ = ["DEFAULT_EXCHANGE", "DEFAULT_THRUST_N", "THRUST_KEYS", "ThrustEditor"]
