"""Cuts through the map: the chosen quantity against flight Mach at the selected altitude, and against altitude
at the selected Mach, one line per case, with the limit line and the failing stretch marked.

A design review reads schedules and margins as lines; these two plots give them for the selected point. The
cuts are ``engine_air.outputs.sections.cut`` (the review pack draws the same arrays), so a cut never disagrees
with the map.

The two plots sit one above the other (the window's "Sections" tab) unless the view is much wider than high
(then side by side); text is black, at least 10 pt. ``export(path)`` writes them as PNG or SVG at
``EXPORT_SIZE`` (side by side, 1400 x 560 px), drawn afresh at that size so no axis label is cut, whatever
the size of the view on screen.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
import pyqtgraph.exporters
from PySide6.QtCore import Qt, QTimer
from PySide6.QtGui import QFont, QFontMetrics
from PySide6.QtWidgets import QWidget

from engine_air.envelope.evaluate import WORST
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.sections import cut

from ..units import Units, dimension_of_si_unit

EXPORT_SIZE = (1400, 560)
_FAIL_COLOUR = (200, 30, 30)
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
        self._curves: dict[tuple[str, str], tuple] = {}  # (plot, case) -> (line, failing marks)
        self._marks: dict[str, object] = {}  # infinite lines and legend samples, by name
        self._texts: dict = {}
        for plot in (self.by_mach, self.by_altitude):
            plot.showGrid(x=True, y=True, alpha=0.3)
            for side in ("bottom", "left"):  # grid lines at the labelled and the minor ticks only: readable, cheaper
                plot.getAxis(side).setStyle(maxTickLevel=1)
            plot.setMenuEnabled(False)
            for side in ("bottom", "left"):
                axis = plot.getAxis(side)
                if hasattr(axis, "setSIPrefixEnableRanges"):
                    axis.setSIPrefixEnableRanges(())
                axis.enableAutoSIPrefix(False)
        # one legend (the cases' colours are the same in both plots), on the cut along Mach
        self.by_mach.addLegend(offset=(-5, 5), brush=pg.mkBrush(255, 255, 255, 200), labelTextColor="k",
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
            plot.titleLabel.opts["size"] = f"{11 * scale:.0f}pt"
        legend = self.by_mach.legend
        legend.opts["labelTextSize"] = f"{10 * scale:.0f}pt"
        for _sample, label in legend.items:
            label.setText(label.text, size=f"{10 * scale:.0f}pt", color="k")
        if self._shown_args is not None:
            self.show_sections(*self._shown_args)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        if getattr(self, "_fixed_stacking", False) is None:
            self._place(self.height() > 0.6 * self.width())  # a tab in the right column: one above the other
        super().resizeEvent(event)
        QTimer.singleShot(0, self._fit_labels)

    def _fit_labels(self) -> None:
        """The quantity up the side of the cut along Mach when it fits the plot's height; else the side
        carries its unit alone and the quantity moves into the title, so no axis label is cut."""
        texts = getattr(self, "_quantity_texts", None)
        if texts is None:
            return
        full, along, unit, long_title = texts
        font = QFont()
        font.setPointSizeF(11 * self._scale)
        room = self.by_mach.getViewBox().height() - 6
        fits = room <= 0 or QFontMetrics(font).horizontalAdvance(full) <= room
        self._set_texts({("left", self.by_mach): full if fits else ("" if unit == "(–)" else unit),
                         ("title", self.by_mach): along if fits else long_title})

    def clear_sections(self) -> None:
        for line, marks in self._curves.values():
            line.setData([], [])
            marks.setData([], [])
        for item in self._marks.values():
            if isinstance(item, pg.InfiniteLine):
                item.hide()
        self.lines, self.failing = {}, {}

    # -- items made once and reused: adding and removing pyqtgraph items costs more than the drawing ----------
    def _curve(self, along: str, name: str, k: int):
        """The (line, failing marks) of case ``name`` on the plot ``along`` ("mach" or "altitude")."""
        key = (along, name)
        if key not in self._curves:
            plot = self.by_mach if along == "mach" else self.by_altitude
            line = pg.PlotDataItem(connect="finite")
            marks = pg.ScatterPlotItem(symbol="x", brush=None)
            plot.addItem(line)
            plot.addItem(marks)
            if along == "mach":
                plot.legend.addItem(line, name)
            self._curves[key] = (line, marks)
        line, marks = self._curves[key]
        colour = _CASE_COLOURS[k % len(_CASE_COLOURS)]
        line.setPen(pg.mkPen(colour, width=2.5 * self._scale))
        return line, marks

    def _forget_cases_except(self, names: list[str]) -> None:
        for (along, name) in [key for key in self._curves if key[1] not in names]:
            plot = self.by_mach if along == "mach" else self.by_altitude
            line, marks = self._curves.pop((along, name))
            if along == "mach":
                plot.legend.removeItem(line)
            plot.removeItem(line)
            plot.removeItem(marks)

    def _fails_legend(self, shown: bool) -> None:
        """The legend's "fails" entry, present only when some point of a cut fails."""
        plot = self.by_mach
        sample = self._marks.setdefault("fails", pg.ScatterPlotItem(
            symbol="x", size=10, pen=pg.mkPen(_FAIL_COLOUR, width=2), brush=None))
        listed = any(item is sample for item, _label in plot.legend.items)
        if shown and not listed:
            plot.legend.addItem(sample, "fails")
        elif listed and not shown:
            plot.legend.removeItem(sample)

    def _line(self, name: str, plot, angle: int, pen, label: str | None = None, position: float = 0.5):
        """An infinite line on ``plot``, made once (the limit, the selected point)."""
        if name not in self._marks:
            opts = {"position": position, "color": (0, 0, 0), "fill": (255, 255, 255, 200)}
            item = pg.InfiniteLine(angle=angle, pen=pen, label=label, labelOpts=opts if label else None)
            plot.addItem(item)
            self._marks[name] = item
        return self._marks[name]

    def _set_texts(self, texts: dict) -> None:
        """Titles and axis labels, set only when they change (each costs a rich-text layout)."""
        title_pt = f"{11 * self._scale:.0f}pt"
        for (where, plot), text in texts.items():
            if self._texts.get((where, id(plot))) == (text, title_pt):
                continue
            self._texts[(where, id(plot))] = (text, title_pt)
            if where == "title":
                plot.setTitle(text, color="#000", size=title_pt)
            else:
                plot.setLabel(where, text)

    def show_sections(self, result, case: str, key: str, i: int, j: int, units: Units | None = None) -> None:
        """Draw the cuts through grid row ``i`` and column ``j`` of ``result`` for quantity ``key``.

        ``case`` is one case name or WORST (then every case is drawn)."""
        units = units or Units()
        self._shown_args = (result, case, key, i, j, units)
        q = QUANTITIES[key]
        dim = dimension_of_si_unit(q.unit) or "none"
        qf = units.factor(dim)
        af = units.factor("altitude")
        ylabel = units.with_unit(q.label, dim) if dim != "none" else q.label
        names = [c.name for c in result.cases] if case == WORST else [case]
        altitude = float(result.altitude_m[i])
        mach = float(result.mach[j])
        # short titles (the quantity is on the axes)
        along = f"along Mach at {altitude / af:,.0f} {units.label('altitude')}"
        unit = ylabel[len(q.label):].strip()
        self._quantity_texts = (ylabel, along, unit, f"{q.label}<br>{along}")
        self._set_texts({("title", self.by_altitude): f"along altitude at M0 {mach:.3f}",
                         ("bottom", self.by_mach): "flight Mach number M0",
                         ("left", self.by_altitude): units.with_unit("pressure altitude", "altitude"),
                         ("bottom", self.by_altitude): ylabel})
        self._fit_labels()
        along_mach = cut(result, key, altitude_m=altitude, cases=names)
        along_altitude = cut(result, key, mach=mach, cases=names)
        limit = along_mach.limit
        self._forget_cases_except(names)
        self.lines, self.failing = {}, {}
        any_fails = {"mach": False, "altitude": False}
        mark_pen = pg.mkPen(_FAIL_COLOUR, width=2)
        for k, name in enumerate(names):
            for along, section in (("mach", along_mach), ("altitude", along_altitude)):
                data = section.case(name)
                y_disp = data.values / qf
                if along == "mach":
                    px, py = section.x, y_disp
                else:
                    px, py = y_disp, section.x / af  # altitude up the side, the quantity across
                line, marks = self._curve(along, name, k)
                line.setData(px, py)
                fails = np.asarray(data.failing, bool)
                marks.setData(px[fails], py[fails], size=10 * self._scale, pen=mark_pen, brush=None, symbol="x")
                any_fails[along] |= bool(fails.any())
                self.lines[(along, name)] = (px, py)
                self.failing[(along, name)] = data.failing
        self._fails_legend(any_fails["mach"] or any_fails["altitude"])
        lpen = pg.mkPen((0, 0, 0), width=1.5, style=Qt.DashLine)
        for name, plot, angle, position in (("limit-mach", self.by_mach, 0, 0.12),
                                            ("limit-altitude", self.by_altitude, 90, 0.8)):
            item = self._line(name, plot, angle, lpen, "limit", position)
            item.setVisible(limit is not None)
            if limit is not None:
                item.setValue(limit / qf)
        sel = pg.mkPen((90, 90, 90), width=1, style=Qt.DotLine)
        for name, plot, angle, value in (("selected-mach", self.by_mach, 90, mach),
                                         ("selected-altitude", self.by_altitude, 0, altitude / af)):
            item = self._line(name, plot, angle, sel)
            item.setValue(value)
            item.show()

    def export_page(self, size: tuple[int, int] = EXPORT_SIZE) -> "SectionPlots":
        """An off-screen copy of these plots, side by side at ``size`` pixels, laid out and ready to write
        (the caller deletes it)."""
        from PySide6.QtWidgets import QApplication

        page = SectionPlots(stacked=False)
        page.setAttribute(Qt.WA_DontShowOnScreen)
        page.resize(*size)
        page.show()
        if self._shown_args is not None:
            page.show_sections(*self._shown_args)
        for _ in range(3):  # the axes measure their tick texts while painting: lay out, paint, again
            page.ci.layout.activate()
            page.grab()
            QApplication.processEvents()
            page._fit_labels()
        return page

    def export(self, path: str, inputs=(), size: tuple[int, int] = EXPORT_SIZE) -> None:
        """Write both plots side by side to ``path`` (PNG, or SVG by the file's ending) at ``size`` pixels, as
        the map is written: whole or not at all, never over one of ``inputs`` (``app.exports``).

        The plots are drawn again in an off-screen view of that size (``export_page``), so the file never
        depends on (or clips to) the size of the tab on screen."""
        from ..exports import write_graphics_png, write_graphics_svg

        page = self.export_page(size)
        try:
            if str(path).lower().endswith(".svg"):
                write_graphics_svg(page, path, "Sections", inputs)
                return
            write_graphics_png(page, path, inputs)
        finally:
            page.deleteLater()
