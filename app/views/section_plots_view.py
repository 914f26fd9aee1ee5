"""Cuts through the map: the chosen quantity against flight Mach at the selected altitude, and against altitude
at the selected Mach, one line per case, with the limit line and the failing stretch marked.

A design review reads schedules and margins as lines; these two plots give them for the selected point. The
cuts are ``engine_air.outputs.sections.cut`` (the review pack draws the same arrays), so a cut never disagrees
with the map. ``export(path)`` writes the two plots as PNG or SVG, like the map.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
import pyqtgraph.exporters
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QWidget

from engine_air.envelope.evaluate import WORST
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.sections import cut

from ..units import Units, dimension_of_si_unit

_CASE_COLOURS = [(31, 119, 180), (214, 39, 40), (44, 160, 44), (148, 103, 189), (140, 86, 75), (23, 190, 207),
                 (188, 189, 34), (127, 127, 127)]


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
        # short titles (the quantity is on the axes), so the two plots fit side by side in a narrow panel
        self.by_mach.setTitle(f"along Mach at {altitude / af:,.0f} {units.label('altitude')}", color="#000",
                              size="9pt")
        self.by_altitude.setTitle(f"along altitude at M0 {mach:.3f}", color="#000", size="9pt")
        self.by_mach.setLabel("bottom", "flight Mach number M0")
        self.by_mach.setLabel("left", ylabel)
        self.by_altitude.setLabel("left", units.with_unit("pressure altitude", "altitude"))
        self.by_altitude.setLabel("bottom", ylabel)
        along_mach = cut(result, key, altitude_m=altitude, cases=names)
        along_altitude = cut(result, key, mach=mach, cases=names)
        limit = along_mach.limit
        for k, name in enumerate(names):
            colour = _CASE_COLOURS[k % len(_CASE_COLOURS)]
            pen = pg.mkPen(colour, width=2)
            for plot, along, section in ((self.by_mach, "mach", along_mach), (self.by_altitude, "altitude", along_altitude)):
                data = section.case(name)
                y_disp = data.values / qf
                if along == "mach":
                    px, py = section.x, y_disp
                else:
                    px, py = y_disp, section.x / af  # altitude up the side, the quantity across
                plot.plot(px, py, pen=pen, name=name, connect="finite")
                self.lines[(along, name)] = (px, py)
                self.failing[(along, name)] = data.failing
                if data.failing.any():
                    fails = data.failing
                    plot.plot(px[fails], py[fails], pen=None, symbol="x", symbolSize=9,
                              symbolPen=pg.mkPen((200, 30, 30), width=2), symbolBrush=None,
                              name="fails" if k == 0 else None)
        if limit is not None:
            lpen = pg.mkPen((0, 0, 0), width=1.5, style=Qt.DashLine)
            self.by_mach.addItem(pg.InfiniteLine(pos=limit / qf, angle=0, pen=lpen, label="limit",
                                                 labelOpts={"position": 0.12, "color": (0, 0, 0)}))
            self.by_altitude.addItem(pg.InfiniteLine(pos=limit / qf, angle=90, pen=lpen, label="limit",
                                                     labelOpts={"position": 0.8, "color": (0, 0, 0)}))
        sel = pg.mkPen((90, 90, 90), width=1, style=Qt.DotLine)
        self.by_mach.addItem(pg.InfiniteLine(pos=mach, angle=90, pen=sel))
        self.by_altitude.addItem(pg.InfiniteLine(pos=altitude / af, angle=0, pen=sel))

    def export(self, path: str, inputs=()) -> None:
        """Write both plots to ``path`` (PNG, or SVG by the file's ending), as the map is written: whole or not
        at all, never over one of ``inputs`` (``app.exports``)."""
        from ..exports import write_graphics_png, write_graphics_svg

        if str(path).lower().endswith(".svg"):
            write_graphics_svg(self, path, "Sections", inputs)
            return
        write_graphics_png(self, path, inputs)
