"""Pieces the design dialogs share: colour maps, plain axes, table cells, spin boxes."""

from __future__ import annotations

import math

import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtGui import QColor
from PySide6.QtWidgets import QDoubleSpinBox, QTableWidgetItem

from ..views.colour_maps import colour_map_for


def colour_map(kind: str) -> pg.ColorMap:
    """The map's own colour scales (one colour module for the package and the program): diverging for margins."""
    return colour_map_for(kind)


def plain_axes(plot) -> None:
    """No automatic SI prefixes (m^2 x 0.001 reads badly): values are shown in their own unit."""
    for name in ("left", "bottom"):
        plot.getAxis(name).enableAutoSIPrefix(False)


def fmt(x, spec: str = ".4g") -> str:
    try:
        x = float(x)
    except (TypeError, ValueError):
        return "–"
    return format(x, spec) if math.isfinite(x) else "–"


def table_item(text: str, numeric: bool = False, colour: QColor | None = None) -> QTableWidgetItem:
    it = QTableWidgetItem(text)
    it.setFlags(it.flags() & ~Qt.ItemIsEditable)
    if numeric:
        it.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
    if colour is not None:
        it.setForeground(colour)
    return it


HOLDS_COLOUR = QColor(11, 79, 138)
FAILS_COLOUR = QColor(150, 62, 0)


def verdict_item(holds: bool | None) -> QTableWidgetItem:
    if holds is None:
        return table_item("–")
    return table_item("holds" if holds else "FAILS", colour=HOLDS_COLOUR if holds else FAILS_COLOUR)


def spin_box(lo: float, hi: float, value: float, decimals: int = 6, step: float | None = None) -> QDoubleSpinBox:
    s = QDoubleSpinBox()
    s.setDecimals(decimals)
    s.setRange(lo, hi)
    s.setValue(value)
    s.setSingleStep(step if step is not None else max(abs(value) * 0.05, 10.0 ** -decimals))
    s.setKeyboardTracking(False)
    return s


def case_names(project) -> list[str]:
    return [c.name for c in project.cases]
