"""Side view of the inlet at the selected point: walls, cowl, entrance, throat, face, shocks, doors and the
captured stream tube, to scale, in the chosen units.

Draws ``engine_air.outputs.inlet_sketch.inlet_sketch`` (the geometry is computed there, Qt-free); this widget
chooses pens, converts metres to the display unit of length (``app.units``, dimension "altitude": m or ft),
frames the drawing tightly (equal scales on both axes) and keeps the legend below the plot, outside the
geometry. It is redrawn whenever the selection, the project or the units change.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtWidgets import QSizePolicy
from PySide6.QtCore import Qt
from PySide6.QtGui import QFont

from engine_air.outputs.inlet_sketch import InletSketch, inlet_sketch

from ..units import Units

INK = (25, 25, 25)
_PENS = {
    "wall": pg.mkPen((45, 45, 45), width=3),
    "cowl": pg.mkPen((45, 45, 45), width=3),
    "axis": pg.mkPen((90, 90, 90), width=1, style=Qt.DashDotLine),
    "entrance": pg.mkPen((120, 60, 170), width=2, style=Qt.DashLine),
    "throat": pg.mkPen((30, 100, 200), width=2, style=Qt.DashLine),
    "face": pg.mkPen((30, 100, 200), width=3),
    "shock": pg.mkPen((215, 95, 15), width=2),
    "cowl-shock": pg.mkPen((215, 95, 15), width=2, style=Qt.DashLine),
    "terminal-shock": pg.mkPen((190, 25, 25), width=3),
    "bow-shock": pg.mkPen((190, 25, 25), width=3),
    "stream-tube": pg.mkPen((15, 140, 80), width=2, style=Qt.DotLine),
    "auxiliary-door": pg.mkPen((0, 150, 170), width=3),
    "bypass-door": pg.mkPen((150, 0, 150), width=3),
}

_LEGEND = {"wall": "walls", "entrance": "entrance A_e", "throat": "throat A_th",
           "face": "engine face", "shock": "ramp/cone shocks", "cowl-shock": "cowl shock",
           "terminal-shock": "terminal shock", "bow-shock": "bow shock", "stream-tube": "stream tube",
           "auxiliary-door": "aux. door open", "bypass-door": "bypass door open"}
_NOT_IN_LEGEND = ("cowl", "axis")
FONT_PT = 9


def _font(bold: bool = False) -> QFont:
    font = QFont()
    font.setPointSize(FONT_PT)
    font.setBold(bold)
    return font


class InletSketchView(pg.PlotWidget):
    """A pyqtgraph plot of the inlet's side view; ``sketch`` holds what is drawn (metres), ``units`` the display
    units of the axes."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent=parent, background="w")
        self.setAspectLocked(True)
        self.setMenuEnabled(False)
        self.showGrid(x=False, y=False)
        self.units = Units()
        item = self.getPlotItem()
        for name in ("left", "bottom"):
            axis = item.getAxis(name)
            axis.setPen(pg.mkPen(INK))
            axis.setTextPen(pg.mkPen(INK))
            axis.setStyle(tickFont=_font(), tickTextOffset=3)
            axis.enableAutoSIPrefix(False)  # the unit is the chosen one (m or ft), never rescaled
        # the legend sits in its own column right of the drawing (docked, the view is wide and low): it never
        # covers the geometry; the unit note below it, beside the bottom axis
        self.legend = pg.LegendItem(colCount=2, labelTextColor=INK, labelTextSize=f"{FONT_PT}pt",
                                    verSpacing=-6, horSpacing=6)
        self.legend.setSizePolicy(QSizePolicy.Preferred, QSizePolicy.Maximum)  # rows keep their own height
        self.unit_note = pg.LabelItem("", color="#191919", size=f"{FONT_PT}pt", justify="left")
        self._legend_place = None
        self._place_legend(beside=True)
        self.sketch: InletSketch | None = None
        self.curves: dict[str, pg.PlotCurveItem] = {}
        self.texts: list[pg.TextItem] = []
        self._curves: list[pg.PlotCurveItem] = []
        self._labels: list[pg.TextItem] = []
        self._legend_key: list = []
        self._shown = None  # (project, points, index) of the drawn point, for a redraw in other units
        self._axis_labels()
        self.setTitle("Inlet at the selected point")

    # -- public ---------------------------------------------------------------------------------------------
    def setTitle(self, title=None, **args) -> None:  # noqa: N802 (Qt naming) -- readable dark type by default
        args.setdefault("color", "#191919")
        args.setdefault("size", f"{FONT_PT + 1}pt")
        self.getPlotItem().setTitle(title, **args)

    def set_units(self, units: Units) -> None:
        """Draw lengths in ``units`` (m or ft) from now on; redraws the point shown."""
        if units == self.units:
            return
        self.units = units
        self._axis_labels()
        if self._shown is not None:
            self.show_point(*self._shown)

    def clear_sketch(self, message: str = "select a point on the map") -> None:
        self._clear()
        self.sketch = None
        self._shown = None
        self.setTitle(f"Inlet: {message}")

    def show_point(self, project, points, index) -> None:
        """Draw the inlet of ``project`` at ``index`` of ``points`` (an ``OperatingPoints``)."""
        self._shown = (project, points, index)
        try:
            sketch = inlet_sketch(project, points, index)
        except (ValueError, KeyError) as exc:  # a design the layout cannot draw: say so, keep the window
            self._clear()
            self.sketch = None
            self.setTitle(f"Inlet: cannot draw ({exc})")
            return
        self.sketch = sketch
        f = 1.0 / self.units.factor("altitude")
        entries, shown_roles, self.curves = [], set(), {}
        for k, line in enumerate(sketch.lines):
            curve = self._curve(k)
            curve.setData(line.x_m * f, line.y_m * f)
            curve.setPen(_PENS.get(line.role) or pg.mkPen(INK))
            curve.show()
            self.curves[line.label] = curve
            if line.role not in shown_roles and line.role not in _NOT_IN_LEGEND:
                entries.append((curve, _LEGEND.get(line.role, line.label)))
                shown_roles.add(line.role)
        self._hide_from(self._curves, len(sketch.lines))
        self._set_legend(entries)
        for k, (x, y, text) in enumerate(sketch.labels):
            label = self._label(k)
            label.setText(text, color=INK)
            label.setPos(x * f, y * f)
            label.show()
        self._hide_from(self._labels, len(sketch.labels))
        self.texts = self._labels[:len(sketch.labels)]
        mach = float(np.asarray(points.mach)[index])
        self.setTitle(f"Inlet at M0 = {mach:.2f}")
        self.setToolTip("; ".join(sketch.notes) + ". Stations: 1 lip, e cowl entrance, th throat, 2 engine face.")
        self._frame()

    def frame_rect(self) -> tuple[float, float, float, float]:
        """The drawing's bounds in display units (x_min, x_max, y_min, y_max); the view frames them tightly."""
        x0, x1, y0, y1 = self.sketch.bounds()
        f = 1.0 / self.units.factor("altitude")
        return x0 * f, x1 * f, y0 * f, y1 * f

    def drawn_angle_deg(self, label: str) -> float:
        """Angle from the free-stream direction of the straight line drawn as ``label`` (for tests)."""
        x, y = self.curves[label].getData()
        return float(np.degrees(np.arctan2(y[-1] - y[0], x[-1] - x[0])))

    # -- inside ---------------------------------------------------------------------------------------------
    def resizeEvent(self, event) -> None:  # noqa: N802 (Qt naming)
        """Wide and low (docked under the map): the legend in a column right of the drawing; tall (a tab of its
        own): in rows under it, so that it never spreads down the whole height."""
        super().resizeEvent(event)
        if "_legend_place" in self.__dict__:  # not while the plot itself is being built
            self._place_legend(beside=self.width() > 1.4 * self.height())

    def _place_legend(self, beside: bool) -> None:
        if self._legend_place == beside:
            return
        layout = self.getPlotItem().layout
        if self._legend_place is not None:
            layout.removeItem(self.legend)
            layout.removeItem(self.unit_note)
        if beside:
            self.legend.setColumnCount(2)
            layout.addItem(self.legend, 2, 3)
            layout.addItem(self.unit_note, 3, 3)
        else:
            self.legend.setColumnCount(3)
            layout.addItem(self.legend, 4, 1)
            layout.addItem(self.unit_note, 5, 1)
        self._legend_place = beside

    def _clear(self) -> None:
        self._hide_from(self._curves, 0)
        self._hide_from(self._labels, 0)
        self._set_legend([])
        self.curves = {}
        self.texts = []

    # The lines and station names are kept from one point to the next and given new data (a new plot item a line
    # cost some 2 ms to make, the whole sketch 30 ms: a stall of the window at every result).
    def _curve(self, k: int) -> pg.PlotCurveItem:
        while len(self._curves) <= k:
            curve = pg.PlotCurveItem()
            self.addItem(curve)
            self._curves.append(curve)
        return self._curves[k]

    def _label(self, k: int) -> pg.TextItem:
        while len(self._labels) <= k:
            label = pg.TextItem("", color=INK, anchor=(0.5, 0.5))
            label.setFont(_font(bold=True))
            self.addItem(label)
            self._labels.append(label)
        return self._labels[k]

    @staticmethod
    def _hide_from(items: list, n: int) -> None:
        for item in items[n:]:
            item.hide()

    def _set_legend(self, entries: list) -> None:
        """The legend's rows (item, name), rebuilt only when the names or their order change."""
        key = [(id(item), name) for item, name in entries]
        if key == self._legend_key:
            return
        self.legend.clear()
        for item, name in entries:
            self.legend.addItem(item, name)
        self._legend_key = key

    def _axis_labels(self) -> None:
        unit = self.units.label("altitude")
        item = self.getPlotItem()
        item.setLabel("left", f"y ({unit})", color="#191919", **{"font-size": f"{FONT_PT}pt"})
        self.unit_note.setText(f"x, y in {unit}, to scale<br>(duct length not to scale)")

    def _frame(self) -> None:
        x0, x1, y0, y1 = self.frame_rect()
        pad_x, pad_y = 0.02 * (x1 - x0), 0.03 * (y1 - y0)
        top = 0.06 * (y1 - y0)  # room for the station names centred on the top of the frame
        self.setRange(xRange=(x0 - pad_x, x1 + pad_x), yRange=(y0 - pad_y, y1 + pad_y + top), padding=0.0)
