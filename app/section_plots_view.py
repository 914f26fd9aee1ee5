"""Cuts through the map: the chosen quantity against flight Mach at the selected altitude, and against altitude
at the selected Mach, one line per case, with the limit line and the failing stretch marked.

A design review reads schedules and margins as lines; these two plots give them for the selected point. The
numbers are the map's own (``MapResult.quantity`` and ``MapResult.failing``), so a cut never disagrees with the
map. ``export(path)`` writes the two plots as PNG or SVG, like the map.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
import pyqtgraph.exporters
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QWidget

from engine_air.envelope.evaluate import WORST
from engine_air.outputs.quantities import QUANTITIES

from .units import Units, dimension_of_si_unit

# which check judges a quantity, and the limit value drawn for a level quantity
_CHECK_OF = {
    "face_mach_margin": "face-mach", "face_mach": "face-mach", "throat_mach": "throat-mach",
    "recovery": "recovery", "recovery_minus_reference": "recovery", "relative_tip_mach": "relative-tip-mach",
    "spillage_fraction": "spillage",
}
_LIMIT_OF = {
    "face_mach": "face_mach_max", "throat_mach": "throat_mach_max", "relative_tip_mach": "relative_tip_mach_max",
    "spillage_fraction": "spillage_fraction_max", "recovery": "recovery_min",
}
_CASE_COLOURS = [(31, 119, 180), (214, 39, 40), (44, 160, 44), (148, 103, 189), (140, 86, 75), (23, 190, 207),
                 (188, 189, 34), (127, 127, 127)]


def check_of(key: str) -> str | None:
    """The check that judges quantity ``key`` (None: shown against every check)."""
    q = QUANTITIES.get(key)
    return getattr(q, "check", None) or _CHECK_OF.get(key)


def limit_value(project, key: str) -> float | None:
    """The line drawn as the limit: 0 for a margin, the file's limit for a judged level quantity."""
    q = QUANTITIES[key]
    if q.kind == "margin":
        return 0.0
    name = _LIMIT_OF.get(key)
    value = getattr(project.limits, name, None) if name else None
    return float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) else None


def section(result, case: str, key: str, along: str, index: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(x, y, failing) of one case along a grid row (``along="mach"``, row ``index``) or column
    (``along="altitude"``, column ``index``); y is NaN outside the envelope."""
    values = result.quantity(case, key)
    failing = result.failing(case, check_of(key))
    if along == "mach":
        return np.asarray(result.mach), values[index, :], failing[index, :]
    return np.asarray(result.altitude_m), values[:, index], failing[:, index]


class SectionPlots(pg.GraphicsLayoutWidget):
    """Two plots: the quantity against Mach (selected altitude) and against altitude (selected Mach)."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent=parent)
        self.setBackground("w")
        self.by_mach = self.addPlot(row=0, col=0)
        self.by_altitude = self.addPlot(row=0, col=1)
        for plot in (self.by_mach, self.by_altitude):
            plot.showGrid(x=True, y=True, alpha=0.25)
            for side in ("bottom", "left"):
                axis = plot.getAxis(side)
                if hasattr(axis, "setSIPrefixEnableRanges"):
                    axis.setSIPrefixEnableRanges(())
                axis.enableAutoSIPrefix(False)
            plot.addLegend(offset=(-5, 5), labelTextSize="8pt", brush=pg.mkBrush(255, 255, 255, 210))
        self.lines: dict[tuple[str, str], tuple[np.ndarray, np.ndarray]] = {}  # (plot, case) -> drawn data
        self.failing: dict[tuple[str, str], np.ndarray] = {}

    def clear_sections(self) -> None:
        for plot in (self.by_mach, self.by_altitude):
            plot.clear()
            plot.legend.clear()
        self.lines, self.failing = {}, {}

    def show_sections(self, result, case: str, key: str, i: int, j: int, units: Units | None = None) -> None:
        """Draw the cuts through grid row ``i`` and column ``j`` of ``result`` for quantity ``key``.

        ``case`` is one case name or WORST (then every case is drawn)."""
        units = units or Units()
        self.clear_sections()
        q = QUANTITIES[key]
        dim = dimension_of_si_unit(q.unit) or "none"
        qf = units.factor(dim)
        af = units.factor("altitude")
        ylabel = units.with_unit(q.label, dim) if dim != "none" else q.label
        names = [c.name for c in result.cases] if case == WORST else [case]
        altitude = float(result.altitude_m[i])
        mach = float(result.mach[j])
        self.by_mach.setTitle(f"{q.label} against Mach at {altitude / af:,.0f} {units.label('altitude')}")
        self.by_altitude.setTitle(f"{q.label} against altitude at Mach {mach:.3f}")
        self.by_mach.setLabel("bottom", "flight Mach number M0")
        self.by_mach.setLabel("left", ylabel)
        self.by_altitude.setLabel("left", units.with_unit("pressure altitude", "altitude"))
        self.by_altitude.setLabel("bottom", ylabel)
        limit = limit_value(result.project, key)
        for k, name in enumerate(names):
            colour = _CASE_COLOURS[k % len(_CASE_COLOURS)]
            pen = pg.mkPen(colour, width=2)
            for plot, along, idx in ((self.by_mach, "mach", i), (self.by_altitude, "altitude", j)):
                x, y, fails = section(result, name, key, along, idx)
                y_disp = y / qf
                if along == "mach":
                    px, py = x, y_disp
                else:
                    px, py = y_disp, x / af  # altitude up the side, the quantity across
                plot.plot(px, py, pen=pen, name=name, connect="finite")
                self.lines[(along, name)] = (px, py)
                self.failing[(along, name)] = fails
                if fails.any():
                    plot.plot(px[fails], py[fails], pen=None, symbol="x", symbolSize=9,
                              symbolPen=pg.mkPen((200, 30, 30), width=2), symbolBrush=None,
                              name="fails" if k == 0 else None)
        if limit is not None:
            lpen = pg.mkPen((0, 0, 0), width=1.5, style=Qt.DashLine)
            self.by_mach.addItem(pg.InfiniteLine(pos=limit / qf, angle=0, pen=lpen, label="limit",
                                                 labelOpts={"position": 0.05, "color": (0, 0, 0)}))
            self.by_altitude.addItem(pg.InfiniteLine(pos=limit / qf, angle=90, pen=lpen, label="limit",
                                                     labelOpts={"position": 0.95, "color": (0, 0, 0)}))
        sel = pg.mkPen((90, 90, 90), width=1, style=Qt.DotLine)
        self.by_mach.addItem(pg.InfiniteLine(pos=mach, angle=90, pen=sel))
        self.by_altitude.addItem(pg.InfiniteLine(pos=altitude / af, angle=0, pen=sel))

    def export(self, path: str) -> None:
        """Write both plots to ``path`` (PNG, or SVG by the file's ending)."""
        item = self.ci
        exporter = (pg.exporters.SVGExporter(item) if str(path).lower().endswith(".svg")
                    else pg.exporters.ImageExporter(item))
        exporter.export(str(path))
