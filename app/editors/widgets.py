"""Input widgets that know their SI range and display unit, shared by the project editors: ``UnitSpin`` and
the number cells of the editor tables."""

from __future__ import annotations

import math

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QAbstractItemView, QDoubleSpinBox, QHeaderView, QTableWidget, QTableWidgetItem

from ..units import Units

SI_ROLE = Qt.UserRole + 1
TEXT_ROLE = Qt.UserRole + 2


class UnitSpin(QDoubleSpinBox):
    """A spin box holding an SI value shown in display units.

    ``lo``/``hi`` are the loader's bounds in SI; an open bound is nudged
    inwards by one step of the last shown decimal.
    """

    def __init__(self, dimension: str, lo: float, hi: float, decimals: int = 4, step: float = 0.01,
                 lo_open: bool = False, hi_open: bool = False, parent=None, suffix: str | None = None) -> None:
        super().__init__(parent)
        self.dimension = dimension
        self._fixed_suffix = suffix
        self._lo, self._hi, self._lo_open, self._hi_open = lo, hi, lo_open, hi_open
        self._units = Units()
        self.setDecimals(decimals)
        self.setSingleStep(step)
        self.setKeyboardTracking(True)
        self.setAccelerated(True)
        self._apply_range()

    def _apply_range(self) -> None:
        tiny = 10.0 ** (-self.decimals())
        lo = self._units.to_display(self.dimension, self._lo)
        hi = self._units.to_display(self.dimension, self._hi)
        self.setRange(lo + (tiny if self._lo_open else 0.0), hi - (tiny if self._hi_open else 0.0))
        unit = self._fixed_suffix if self._fixed_suffix is not None else self._units.label(self.dimension)
        self.setSuffix(f" {unit}" if unit else "")

    def set_units(self, units: Units, si_value: float | None = None) -> None:
        self.blockSignals(True)
        self._units = units
        self._apply_range()
        if si_value is not None:
            self.setValue(units.to_display(self.dimension, si_value))
        self.blockSignals(False)

    def set_si(self, value: float) -> None:
        self.blockSignals(True)
        self.setValue(self._units.to_display(self.dimension, value))
        self.blockSignals(False)

    def si(self) -> float:
        return self._units.to_si(self.dimension, self.value())


def fmt_cell(x: float) -> str:
    if not math.isfinite(x):
        return ""
    return f"{x:.6g}"


def make_table(headers: list[str]) -> QTableWidget:
    t = QTableWidget(0, len(headers))
    t.setHorizontalHeaderLabels(headers)
    t.verticalHeader().setVisible(True)
    t.setSelectionBehavior(QAbstractItemView.SelectRows)
    t.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
    t.setEditTriggers(QAbstractItemView.DoubleClicked | QAbstractItemView.EditKeyPressed
                      | QAbstractItemView.AnyKeyPressed)
    return t


def number_item(si_value: float, dimension: str, units: Units) -> QTableWidgetItem:
    """A table cell showing an SI number in display units; remembers the exact SI value it shows."""
    text = fmt_cell(units.to_display(dimension, si_value)) if dimension != "none" else fmt_cell(si_value)
    item = QTableWidgetItem(text)
    item.setData(SI_ROLE, float(si_value))
    item.setData(TEXT_ROLE, text)
    item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
    return item


class CellError(ValueError):
    pass


def cell_si(table: QTableWidget, row: int, col: int, dimension: str, units: Units, what: str) -> float:
    """The SI value of a number cell: the exact stored value if the text is unchanged, else the text parsed."""
    item = table.item(row, col)
    text = "" if item is None else item.text().strip()
    if item is not None and item.data(TEXT_ROLE) == item.text() and item.data(SI_ROLE) is not None:
        return float(item.data(SI_ROLE))
    value = cell_number(text, row, what)
    return units.to_si(dimension, value) if dimension != "none" else value


def cell_number(text: str, row: int, what: str, kind: str = "a number") -> float:
    """A cell's text as a finite number (a decimal comma allowed); ``CellError`` naming the row and the column
    otherwise (``kind``: what the column holds, for the message)."""
    try:
        value = float(text.replace(",", "."))
    except ValueError:
        raise CellError(f"row {row + 1}, {what}: {text!r} is not {kind}") from None
    if not math.isfinite(value):
        raise CellError(f"row {row + 1}, {what}: {text!r} is not a finite number")
    return value


def _blank(t, r, c) -> bool:
    item = t.item(r, c)
    return item is None or not item.text().strip()


def range_cells(t, r, c, dim, u, what):
    """The (low, high) SI pair in columns c, c+1 of row r (a case's or a limit's region); None when both cells are
    blank; ``CellError`` when one is."""
    if _blank(t, r, c) and _blank(t, r, c + 1):
        return None
    if _blank(t, r, c) or _blank(t, r, c + 1):
        raise CellError(f"row {r + 1}, {what}: give both bounds, or leave both blank for no bound")
    return (cell_si(t, r, c, dim, u, what), cell_si(t, r, c + 1, dim, u, what))
