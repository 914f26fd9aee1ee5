"""Cuts through the map: the chosen quantity against flight Mach at the selected altitude, and against altitude
at the selected Mach, one line per case, with the limit line and the failing stretch marked.

A design review reads schedules and margins as lines; these two plots give them for the selected point. The
cuts are ``engine_air.outputs.sections.cut`` (the review pack draws the same arrays), so a cut never disagrees
with the map.

The two plots sit one above the other when the view is taller than wide (the window's "Sections" tab) and side
by side otherwise; text is black, at least 10 pt. ``export(path)`` writes them as PNG or SVG at
``EXPORT_SIZE`` (side by side, 1400 x 560 px), drawn afresh at that size so no axis label is cut, whatever
the size of the view on screen.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
import pyqtgraph.exporters
from PySide6.QtCore import QRectF, Qt
from PySide6.QtGui import QFont
from PySide6.QtWidgets import QWidget

from engine_air.envelope.evaluate import WORST
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.sections import cut

from ..units import Units, dimension_of_si_unit

EXPORT_SIZE = (1400, 560)
_CASE_COLOURS = [(31, 119, 180), (214, 39, 40), (44, 160, 44), (148, 103, 189), (140, 86, 75), (23, 190, 207),
                 (188, 189, 34), (127, 127, 127)]


class SectionPlots(pg.GraphicsLayoutWidget):
    """Two plots: the quantity against Mach (selected altitude) and against altitude (selected Mach)."""

    def __init__(self, parent: QWidget | None = None, stacked: bool | None = None) -> None:
        super().__init__(parent=parent)
        self.setBackground("w")
        self.by_mach = pg.PlotItem()
        self.by_altitude = pg.PlotItem()
        self._stacked = None
        self._fixed_stacking = stacked
        self._place(bool(stacked))
        self._scale = 1.0
        self._shown_args = None
        for plot in (self.by_mach, self.by_altitude):
            plot.showGrid(x=True, y=True, alpha=0.25)
            plot.setMenuEnabled(False)
            for side in ("bottom", "left"):
                axis = plot.getAxis(side)
                if hasattr(axis, "setSIPrefixEnableRanges"):
                    axis.setSIPrefixEnableRanges(())
                axis.enableAutoSIPrefix(False)
            plot.addLegend(offset=(-5, 5), brush=pg.mkBrush(255, 255, 255, 225), labelTextColor="k",
                           pen=pg.mkPen("#888888"))
        self.set_scale(1.0)
        self.lines: dict[tuple[str, str], tuple[np.ndarray, np.ndarray]] = {}  # (plot, case) -> drawn data
        self.failing: dict[tuple[str, str], np.ndarray] = {}

    def _place(self, stacked: bool) -> None:
        """One above the other (``stacked``) or side by side."""
        if stacked == self._stacked:
            return
        for plot in (self.by_mach, self.by_altitude):
            if plot.scene() is not None:
                self.ci.removeItem(plot)
        self.ci.addItem(self.by_mach, row=0, col=0)
        self.ci.addItem(self.by_altitude, row=1 if stacked else 0, col=0 if stacked else 1)
        self._stacked = stacked

    @property
    def stacked(self) -> bool:
        return bool(self._stacked)

    def set_scale(self, scale: float) -> None:
        """Type and lines ``scale`` times their normal size (presentation mode: 1.3)."""
        self._scale = float(scale)
        tick = QFont()
        tick.setPointSizeF(10 * scale)
        for plot in (self.by_mach, self.by_altitude):
            for side in ("bottom", "left"):
                axis = plot.getAxis(side)
                axis.setStyle(tickFont=tick)
                axis.setPen(pg.mkPen("k"))
                axis.setTextPen(pg.mkPen("k"))
                axis.labelStyle = {"font-size": f"{11 * scale:.0f}pt", "color": "#000"}
                axis.setLabel(axis.labelText, units=axis.labelUnits)
            plot.legend.opts["labelTextSize"] = f"{10 * scale:.0f}pt"
            plot.titleLabel.opts["size"] = f"{11 * scale:.0f}pt"
        if self._shown_args is not None:
            self.show_sections(*self._shown_args)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        if getattr(self, "_fixed_stacking", False) is None:
            self._place(self.height() > 0.9 * self.width())
        super().resizeEvent(event)

    def clear_sections(self) -> None:
        for plot in (self.by_mach, self.by_altitude):
            plot.clear()
            plot.legend.clear()
        self.lines, self.failing = {}, {}

    def show_sections(self, result, case: str, key: str, i: int, j: int, units: Units | None = None) -> None:
        """Draw the cuts through grid row ``i`` and column ``j`` of ``result`` for quantity ``key``.

        ``case`` is one case name or WORST (then every case is drawn)."""
        units = units or Units()
        self._shown_args = (result, case, key, i, j, units)
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
        title_pt = f"{11 * self._scale:.0f}pt"
        self.by_mach.setTitle(f"along Mach at {altitude / af:,.0f} {units.label('altitude')}", color="#000",
                              size=title_pt)
        self.by_altitude.setTitle(f"along altitude at M0 {mach:.3f}", color="#000", size=title_pt)
        self.by_mach.setLabel("bottom", "flight Mach number M0")
        self.by_mach.setLabel("left", ylabel)
        self.by_altitude.setLabel("left", units.with_unit("pressure altitude", "altitude"))
        self.by_altitude.setLabel("bottom", ylabel)
        along_mach = cut(result, key, altitude_m=altitude, cases=names)
        along_altitude = cut(result, key, mach=mach, cases=names)
        limit = along_mach.limit
        for k, name in enumerate(names):
            colour = _CASE_COLOURS[k % len(_CASE_COLOURS)]
            pen = pg.mkPen(colour, width=2.5 * self._scale)
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
                    plot.plot(px[fails], py[fails], pen=None, symbol="x", symbolSize=10 * self._scale,
                              symbolPen=pg.mkPen((200, 30, 30), width=2), symbolBrush=None,
                              name="fails" if k == 0 else None)
        if limit is not None:
            lpen = pg.mkPen((0, 0, 0), width=1.5, style=Qt.DashLine)
            opts = {"color": (0, 0, 0), "fill": (255, 255, 255, 200)}
            self.by_mach.addItem(pg.InfiniteLine(pos=limit / qf, angle=0, pen=lpen, label="limit",
                                                 labelOpts={"position": 0.12, **opts}))
            self.by_altitude.addItem(pg.InfiniteLine(pos=limit / qf, angle=90, pen=lpen, label="limit",
                                                     labelOpts={"position": 0.8, **opts}))
        sel = pg.mkPen((90, 90, 90), width=1, style=Qt.DotLine)
        self.by_mach.addItem(pg.InfiniteLine(pos=mach, angle=90, pen=sel))
        self.by_altitude.addItem(pg.InfiniteLine(pos=altitude / af, angle=0, pen=sel))

    def export(self, path: str, size: tuple[int, int] = EXPORT_SIZE) -> None:
        """Write both plots side by side to ``path`` (PNG, or SVG by the file's ending) at ``size`` pixels.

        The plots are drawn again in an off-screen view of that size, so the file never depends on (or
        clips to) the size of the tab on screen."""
        from ..exports import write_graphics_svg

        from PySide6.QtWidgets import QApplication

        page = SectionPlots(stacked=False)
        page.setAttribute(Qt.WA_DontShowOnScreen)
        try:
            page.resize(*size)
            page.show()
            if self._shown_args is not None:
                page.show_sections(*self._shown_args)
            for _ in range(3):  # the axes measure their tick texts while painting: lay out, paint, again
                page.ci.layout.activate()
                page.grab()
                QApplication.processEvents()
            if str(path).lower().endswith(".svg"):
                write_graphics_svg(page, path, "Sections")
                return
            exporter = pg.exporters.ImageExporter(page.ci)
            exporter.parameters()["width"] = size[0]
            exporter.export(str(path))
        finally:
            page.deleteLater()
