"""Side view of the inlet at the selected point: walls, cowl, throat, face, shocks and the captured stream tube.

Draws ``engine_air.outputs.inlet_sketch.inlet_sketch`` (the geometry is computed there, Qt-free); this widget
only chooses pens. It is redrawn whenever the selection or the project changes.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt

from engine_air.outputs.inlet_sketch import InletSketch, inlet_sketch

_PENS = {
    "wall": pg.mkPen((60, 60, 60), width=3),
    "cowl": pg.mkPen((60, 60, 60), width=3),
    "throat": pg.mkPen((40, 110, 200), width=2, style=Qt.DashLine),
    "face": pg.mkPen((40, 110, 200), width=3),
    "shock": pg.mkPen((210, 90, 20), width=2),
    "terminal-shock": pg.mkPen((190, 30, 30), width=3),
    "bow-shock": pg.mkPen((190, 30, 30), width=3),
    "stream-tube": pg.mkPen((20, 150, 90), width=2, style=Qt.DotLine),
}


_LEGEND = {"shock": "oblique/conical shocks", "terminal-shock": "terminal shock", "bow-shock": "bow shock",
           "stream-tube": "captured stream tube", "wall": "ramps / spike / duct", "throat": "throat",
           "face": "engine face"}


class InletSketchView(pg.PlotWidget):
    """A pyqtgraph plot of the inlet's side view; ``sketch`` holds what is drawn."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent=parent, background="w")
        self.setAspectLocked(True)
        self.setMenuEnabled(False)
        self.showGrid(x=False, y=False)
        self.setLabel("bottom", "x", units="m")
        self.setLabel("left", "y", units="m")
        self.setTitle("Inlet at the selected point")
        self.legend = self.addLegend(offset=(-5, 5), labelTextSize="8pt", brush=pg.mkBrush(255, 255, 255, 220),
                                     colCount=3)
        self.sketch: InletSketch | None = None
        self.curves: dict[str, pg.PlotDataItem] = {}

    def clear_sketch(self, message: str = "select a point on the map") -> None:
        self.clear()
        self.legend.clear()
        self.curves = {}
        self.sketch = None
        self.setTitle(f"Inlet: {message}")

    def show_point(self, project, points, index) -> None:
        """Draw the inlet of ``project`` at ``index`` of ``points`` (an ``OperatingPoints``)."""
        self.clear()
        self.legend.clear()
        self.curves = {}
        try:
            sketch = inlet_sketch(project, points, index)
        except (ValueError, KeyError) as exc:  # a design the layout cannot draw: say so, keep the window
            self.sketch = None
            self.setTitle(f"Inlet: cannot draw ({exc})")
            return
        self.sketch = sketch
        shown_roles = set()
        for line in sketch.lines:
            name = None
            if line.role not in shown_roles and line.role not in ("cowl",):
                name = _LEGEND.get(line.role, line.label)
                shown_roles.add(line.role)
            self.curves[line.label] = self.plot(line.x_m, line.y_m, pen=_PENS.get(line.role), name=name)
        mach = float(np.asarray(points.mach)[index])
        self.setTitle(f"Inlet at M0 = {mach:.2f}")
        self.setToolTip(sketch.notes[0])
        self.getPlotItem().setLabel("bottom", "x (duct length not to scale)", units="m")
        xs = np.concatenate([line.x_m for line in sketch.lines])
        ys = np.concatenate([line.y_m for line in sketch.lines])
        span = max(float(np.ptp(ys)), 1e-9)
        # head room above the cowl for the legend
        self.setRange(xRange=(float(xs.min()), float(xs.max())),
                      yRange=(float(ys.min()) - 0.05 * span, float(ys.max()) + 1.3 * span), padding=0.02)

    def drawn_angle_deg(self, label: str) -> float:
        """Angle from the free-stream direction of the straight line drawn as ``label`` (for tests)."""
        x, y = self.curves[label].getData()
        return float(np.degrees(np.arctan2(y[-1] - y[0], x[-1] - x[0])))
