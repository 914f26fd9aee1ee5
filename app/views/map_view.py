"""The envelope map: one quantity over flight Mach (x) and altitude (y) for one case.

Layers, bottom to top: the quantity as an image (NaN outside the envelope is
transparent over a neutral grey), the envelope outline, the margin = 0 line
(of the shown margin, or of the least margin over all limits when a level
quantity is shown), the dashed face-static = ambient line (p2/p0 = 1, the
ram-recovery speed), an 'x' on failing grid points (thinned to a regular
pattern when dense) and the selected point. A legend below the plot names
every line and marker; a colour bar gives the quantity, its unit and scale.

Inside the envelope, a point where a margin map's quantity is not judged (its
check does not apply there, the value is not defined, or the point lies outside
its case's region) is drawn in a darker neutral grey, distinct from the light
grey outside the envelope. The least-margin map (``worst_relative_margin``) is
drawn from ``engine_air.envelope.ranking.limiting_map``; its legend names the
checks that limit somewhere. For a mixed-compression inlet the unstarted points
are hatched and outlined, and the self-start and unstart Mach numbers are
vertical lines with the hysteresis band between them shaded.

Hovering shows Mach, altitude, value and the limiting check in the readout
line (in presentation mode and a short window in a box over the foot of the map, so that the plot keeps the
readout's row); a click selects the nearest grid point (``pointSelected(i, j)``).
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPointF, QRectF, Qt, QTimer, Signal
from PySide6.QtGui import QFont, QFontMetrics
from PySide6.QtWidgets import QLabel, QVBoxLayout, QWidget

from engine_air.envelope import flags as F
from engine_air.envelope.evaluate import WORST
from engine_air.envelope.ranking import limiting_map, nearest_index
from engine_air.outputs.quantities import QUANTITIES

from . import analysis
from .axis_cache import cache_axes
from .colour_maps import colour_map_for, levels_for
from .contours import iso_line  # noqa: F401 - the map's contour tracer, named here for its tests
from .map_legend import MapLegend
from .map_overlays import (LEAST_MARGIN, OUTSIDE_GREY, START_COLOUR, UNSTART_COLOUR,  # noqa: F401 - re-exported
                           UNSTARTED_COLOUR, MapOverlays)
from ..units import Units, dimension_of_si_unit, group_digits


def _no_si_prefix(axis) -> None:
    """Plain tick values (no automatic 'x0.001' scaling), whatever the pyqtgraph version."""
    if hasattr(axis, "setSIPrefixEnableRanges"):
        axis.setSIPrefixEnableRanges(())
    axis.enableAutoSIPrefix(False)


def quantity_dimension(key: str) -> str:
    q = QUANTITIES[key]
    return dimension_of_si_unit(q.unit) or "none"


def quantity_axis_label(key: str, units: Units) -> str:
    q = QUANTITIES[key]
    dim = quantity_dimension(key)
    label = units.label(dim) if dim != "none" else (q.unit or "")
    return f"{q.label} ({label})" if label else f"{q.label} (–)"


def format_value(x: float, digits: int = 4) -> str:
    if x is None or not math.isfinite(x):
        return "not defined"
    if x != 0 and (abs(x) >= 1e5 or abs(x) < 1e-3):
        return f"{x:.3e}"
    return f"{x:.{digits}g}" if abs(x) >= 1 else f"{x:.{digits - 1}f}"


class EnvelopeMap(MapOverlays, MapLegend, QWidget):
    """The map widget; ``show_result`` draws, ``values()`` gives the array drawn."""

    pointSelected = Signal(int, int)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._result = None
        self._case = WORST
        self._key = "face_mach_margin"
        self._units = Units()
        self._values = None
        self._x = np.empty(0)
        self._y = np.empty(0)
        self._selected = None
        self._scale = 1.0
        self._styled_scale = None
        self._high_contrast = False

        self.canvas = pg.GraphicsLayoutWidget()
        self.canvas.setBackground("w")
        self.canvas.ci.setContentsMargins(6, 6, 6, 6)
        self.plot = self.canvas.addPlot(row=0, col=0)
        self.plot.setMenuEnabled(False)
        self.plot.hideButtons()
        self.plot.showGrid(x=True, y=True, alpha=0.18)
        self.view = self.plot.getViewBox()
        self.view.setBackgroundColor(OUTSIDE_GREY)
        for ax in (self.plot.getAxis("left"), self.plot.getAxis("bottom")):
            _no_si_prefix(ax)

        self.image = pg.ImageItem(axisOrder="row-major")
        self.image.setZValue(-10)
        self.plot.addItem(self.image)
        # not-judged points inside the envelope: an opaque neutral grey over the quantity's colours
        self.not_judged_image = pg.ImageItem(axisOrder="row-major")
        self.not_judged_image.setZValue(-9)
        self.plot.addItem(self.not_judged_image)
        self.not_judged_count = 0
        # mixed compression: hysteresis band, self-start and unstart lines, unstarted hatch and outline
        self.hysteresis_band = pg.LinearRegionItem(values=(0, 0), orientation="vertical", movable=False,
                                                   brush=pg.mkBrush(255, 200, 0, 70), pen=pg.mkPen(None))
        self.hysteresis_band.setZValue(-8)
        self.plot.addItem(self.hysteresis_band)
        self.self_start_line = pg.InfiniteLine(angle=90, movable=False)
        self.unstart_line = pg.InfiniteLine(angle=90, movable=False)
        self.unstarted_outline = pg.PlotDataItem(connect="finite")
        self.unstarted_hatch = pg.ScatterPlotItem()
        self.data_outline = pg.PlotDataItem(connect="finite")  # where measured characteristics decide
        self.data_count = None  # grid points flagged from-data (None: the project has no characteristics table)
        for z, item in enumerate((self.self_start_line, self.unstart_line, self.unstarted_outline,
                                  self.unstarted_hatch, self.data_outline)):
            item.setZValue(0.5 + 0.01 * z)
            self.plot.addItem(item)
        self.starting_machs = (None, None)
        self.unstarted_count = 0
        self.limiting_labels: list[str] = []  # checks that limit somewhere (least-margin map)
        self._limiting_index = None
        self._limiting_names: list[str] = []
        self._judged = None
        self.colour_bar = pg.ColorBarItem(values=(0.0, 1.0), colorMap=colour_map_for("level"), interactive=False,
                                          width=24, colorMapMenu=False, pen="k")
        self.colour_bar.setImageItem(self.image)
        self.canvas.addItem(self.colour_bar, row=0, col=1)

        self.outline = pg.PlotDataItem()
        self.zero_halo = pg.PlotDataItem(connect="finite")
        self.zero_line = pg.PlotDataItem(connect="finite")
        self.ram_halo = pg.PlotDataItem(connect="finite")
        self.ram_line = pg.PlotDataItem(connect="finite")
        self.fail_marks = pg.ScatterPlotItem(symbol="x")
        self.selection = pg.ScatterPlotItem(symbol="o")
        for z, item in enumerate((self.outline, self.zero_halo, self.zero_line, self.ram_halo, self.ram_line,
                                  self.fail_marks, self.selection)):
            item.setZValue(z)
            self.plot.addItem(item)
        self.data_outline.setZValue(0.5)  # over the envelope's outline where they meet, under the margin lines

        self.legend = pg.LegendItem(colCount=4, labelTextColor="k", brush=pg.mkBrush(255, 255, 255, 230),
                                    pen=pg.mkPen("#888888"))
        self.canvas.addItem(self.legend, row=1, col=0, colspan=2)
        self._build_legend()

        self.readout = QLabel("Hover over the map for Mach, altitude and value; click to select a point.")
        self.readout.setObjectName("mapReadout")
        self.readout.setWordWrap(True)
        self.readout.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.state_label = QLabel(self.canvas)
        self.state_label.setObjectName("mapState")
        self.state_label.setAlignment(Qt.AlignCenter)
        self.state_label.hide()
        self.hover_label = QLabel(self.canvas)  # presentation mode's readout, over the foot of the map
        self.hover_label.setObjectName("mapHover")
        self.hover_label.setWordWrap(True)
        self.hover_label.hide()
        self.empty_label = QLabel(self.canvas)
        self.empty_label.setAlignment(Qt.AlignCenter)
        self.empty_label.setWordWrap(True)
        self.empty_label.setStyleSheet("background: rgba(255,255,255,225); color: black; padding: 10px;"
                                       "border: 1px solid #666;")
        self.empty_label.hide()

        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(2)
        lay.addWidget(self.canvas, 1)
        lay.addWidget(self.readout)

        cache_axes(self.canvas.scene())
        self.canvas.scene().sigMouseMoved.connect(self._on_mouse_moved)
        self.canvas.scene().sigMouseClicked.connect(self._on_mouse_clicked)
        self._apply_style()
        self._set_state("current")

    # -- public ----------------------------------------------------------------
    @property
    def result(self):
        return self._result

    @property
    def case(self) -> str:
        return self._case

    @property
    def quantity_key(self) -> str:
        return self._key

    def values(self) -> np.ndarray | None:
        """The (altitude rows, Mach columns) array drawn, in display units; NaN outside the envelope."""
        return None if self._values is None else self._values.copy()

    def axes(self) -> tuple[np.ndarray, np.ndarray]:
        """(Mach, altitude in display units) of the grid drawn."""
        return self._x.copy(), self._y.copy()

    def selected(self) -> tuple[int, int] | None:
        return self._selected

    def show_result(self, result, case: str, key: str, units: Units) -> None:
        """Draw ``key`` of ``case`` (or WORST) from ``result``; keeps the selection if it still fits."""
        self._result, self._case, self._key, self._units = result, case, key, units
        if result is None:
            self._values = None
            self.image.clear()
            return
        q = QUANTITIES[key]
        dim = quantity_dimension(key)
        self._limiting_index, self._limiting_names, self.limiting_labels = None, [], []
        values = np.asarray(result.quantity(case, key), dtype=float)  # the map is the analysis's own array
        if key == LEAST_MARGIN:  # which check limits at each point (hover, legend)
            _margin, index, _names, labels = limiting_map(result, case)
            self._limiting_index, self._limiting_names = index, labels
            used = sorted(set(int(k) for k in np.unique(index) if k >= 0))
            self.limiting_labels = [labels[k] for k in used]
        if dim != "none":
            values = units.to_display(dim, values)
        self._values = values
        self._x = np.asarray(result.mach, dtype=float)
        self._y = np.asarray(units.to_display("altitude", np.asarray(result.altitude_m, dtype=float)))

        cmap = colour_map_for(q.kind)
        lo, hi = levels_for(q.kind, values)
        self.image.setImage(values, autoLevels=False, levels=(lo, hi))
        self.image.setRect(self._image_rect())
        self.colour_bar.setColorMap(cmap)
        self.colour_bar.setLevels(values=(lo, hi))
        label = quantity_axis_label(key, units)
        unit = label[len(q.label):].strip()
        self._bar_labels = (label, "" if unit == "(–)" else unit)  # the whole label, or its unit alone
        self._fit_bar_label()
        self._axis_label("bottom", "Flight Mach number M0")
        self._axis_label("left", units.with_unit("Pressure altitude", "altitude"))
        case_text = "worst of all cases" if case == WORST else f"case “{case}”"
        self._title_parts = (q.label, case_text)
        self._fit_title()

        self._draw_not_judged(result, case, key, q.kind, values)
        self._draw_outline(result.project)
        self._draw_starting(result, case)
        self._draw_data_region(result, case)
        self._draw_zero_line(result, case, key, q.kind, values)
        self._draw_ram_line(result, case)
        self._draw_fail_marks(result, case)
        if self._selected is not None:
            i, j = self._selected
            if i < len(self._y) and j < len(self._x):
                self._draw_selection(i, j)
            else:
                self._selected = None
                self.selection.clear()
        defined = np.isfinite(values).any()
        if defined:
            self.empty_label.hide()
        else:
            self.empty_label.setText(f"{q.label} is not defined anywhere in the envelope for this case.\n"
                                     "Select a point to see the flags that say why.")
            self.empty_label.show()
            self._place_overlays()
        self._rebuild_legend(q.kind == "margin")
        rect = self._image_rect()
        if rect != getattr(self, "_last_rect", None):  # re-ranging re-lays out every axis: only on change
            self._last_rect = rect
            self.view.setRange(rect, padding=0.02)

    def _axis_label(self, side: str, text: str) -> None:
        """Set an axis's label only when it changes: setting it redraws the axis, which then drops its cached
        picture (``axis_cache``), a few ms a result for the same text."""
        axis = self.plot.getAxis(side)
        if axis.labelText != text or not axis.label.isVisible():
            self.plot.setLabel(side, text)

    def select(self, i: int, j: int, emit: bool = True) -> None:
        """Select grid point (row i, column j) and mark it."""
        if self._result is None:
            return
        i = int(np.clip(i, 0, len(self._y) - 1))
        j = int(np.clip(j, 0, len(self._x) - 1))
        self._selected = (i, j)
        self._draw_selection(i, j)
        if emit:
            self.pointSelected.emit(i, j)

    def clear_selection(self) -> None:
        self._selected = None
        self.selection.clear()

    def set_computing(self, fraction: float | None = None) -> None:
        pct = "" if fraction is None else f" {100 * fraction:.0f} %"
        self._set_state("computing", f"Computing…{pct}")

    def set_current(self) -> None:
        self._set_state("current")

    def set_stale(self, message: str) -> None:
        self._set_state("stale", f"OUT OF DATE — the last computation failed:\n{message}\n"
                                 "The map shows the previous result.")

    @property
    def state(self) -> str:
        return self._state

    def set_presentation(self, on: bool, small_window: bool = False) -> None:
        self._scale = (1.25 if small_window else 1.45) if on else 1.0
        self._high_contrast = on
        self._apply_style()
        if self._result is not None:
            self.show_result(self._result, self._case, self._key, self._units)

    def set_readout_over_map(self, on: bool) -> None:
        """The hover readout without a row of its own below the map (presentation mode, a short window: the
        plot gets its height): shown in a box over the foot of the map while the pointer is on the plot."""
        on = bool(on)
        if on != self.readout.isHidden():
            self.readout.setVisible(not on)
        if not on:
            self.hover_label.hide()

    @property
    def readout_over_map(self) -> bool:
        return self.readout.isHidden()

    def hover_text_at(self, i: int, j: int) -> str:
        """The readout for grid point (i, j)."""
        r = self._result
        if r is None:
            return ""
        x, y = self._x[j], self._y[i]
        alt_unit = self._units.label("altitude")
        q = QUANTITIES[self._key]
        value = self._values[i, j]
        dim = quantity_dimension(self._key)
        unit = self._units.label(dim) if dim != "none" else ""
        parts = [f"M0 {x:.3f}", f"{group_digits(y)} {alt_unit}"]
        if not bool(r.inside[i, j]):
            parts.append("outside the envelope")
            return "   ·   ".join(parts)
        judged = self._judged is None or bool(self._judged[i, j])
        shown = format_value(float(value)) if judged or not math.isfinite(float(value)) else \
            f"{format_value(float(value))} (not judged here)"
        parts.append(f"{q.label} {shown}{(' ' + unit) if unit else ''}")
        case = analysis.case_at(r, self._case, (i, j))
        points = r.case_map(case).points
        bits = int(np.asarray(points.flags)[i, j])
        if bits & F.OUTSIDE_CASE_REGION:
            parts.append("outside the case's region: not judged")
        if points.started is not None and float(points.mach[i, j]) > 1.0:
            parts.append("started" if bool(np.asarray(points.started)[i, j]) else "UNSTARTED")
        lim = analysis.limiting_at(points, (i, j))
        if self._limiting_index is not None:
            k = int(self._limiting_index[i, j])
            lim = None if k < 0 else (self._limiting_names[k], bool(np.asarray(points.checks[k].fails)[i, j]))
        if lim is None:
            parts.append("no limit judged here")
        else:
            label, fails = lim
            parts.append(f"limiting: {label} ({'FAILS' if fails else 'holds'})")
        if self._case == WORST:
            parts.append(f"worst case: {case}")
        return "   ·   ".join(parts)

    # -- drawing ---------------------------------------------------------------
    def _apply_style(self) -> None:
        s = self._scale
        tick = QFont()
        tick.setPointSizeF(11 * s)
        label_css = {"font-size": f"{13 * s:.0f}pt", "color": "#000"}
        for name in ("left", "bottom"):
            ax = self.plot.getAxis(name)
            ax.setStyle(tickFont=tick, tickTextOffset=int(6 * s))
            ax.setPen(pg.mkPen("k", width=1.2 * s))
            ax.setTextPen(pg.mkPen("k"))
            ax.label.setFont(QFont(tick.family(), int(13 * s)))
            ax.labelStyle = label_css
        for name in ("left", "right"):
            ax = self.colour_bar.getAxis(name)
            _no_si_prefix(ax)
            ax.setStyle(tickFont=tick, tickTextOffset=int(4 * s))
            if name == "right":
                ax.setWidth(int(92 * s))
            ax.setTextPen(pg.mkPen("k"))
            ax.labelStyle = label_css
        bar_width = int(24 * s) + int(92 * s) + 16
        self.colour_bar.layout.setColumnFixedWidth(1, int(24 * s))
        self.colour_bar.setMinimumWidth(bar_width)
        self.colour_bar.setMaximumWidth(bar_width)
        self.legend.setColumnCount(5)  # fewer when the map is narrow (``_fit_legend``)
        self._span_limiting()
        self._legend_fit_key = None
        self.plot.titleLabel.opts["size"] = f"{15 * s:.0f}pt"
        self.plot.titleLabel.opts["color"] = "#000"
        if hasattr(self, "_legend_labels"):
            self._update_legend_text()
        self.readout.setStyleSheet(f"font-size: {12 * s:.0f}pt; padding: 4px; color: black; background: #f2f2f2;")
        self.hover_label.setStyleSheet(f"font-size: {12 * s:.0f}pt; padding: 4px; color: black; "
                                       "background: rgba(242,242,242,240); border: 1px solid #333;")
        # the readout wraps instead of widening the window; two lines reserved, so hovering never resizes the map
        font = QFont(self.readout.font())
        font.setPointSizeF(12 * s)
        self.readout.setMinimumHeight(2 * QFontMetrics(font).lineSpacing() + 8 + 2)

    def _set_state(self, state: str, text: str = "") -> None:
        changed = state != getattr(self, "_state", None) or self._styled_scale != self._scale
        self._state = state
        if state == "current":
            self.state_label.hide()
            self.image.setOpacity(1.0)
            return
        if changed:  # restyling is costly: only when the state (or the style) changes
            if state == "computing":
                css = "background: rgba(255,255,255,235); color: #000; border: 2px solid #333;"
                self.image.setOpacity(0.55)
            else:
                css = "background: #8a3b00; color: white; border: 2px solid #000;"
                self.image.setOpacity(0.45)
            self.state_label.setStyleSheet(css + f"font-size: {14 * self._scale:.0f}pt; font-weight: bold; "
                                                 "padding: 8px;")
            self._styled_scale = self._scale
        self.state_label.setText(text)
        self.state_label.adjustSize()
        self._place_overlays()
        self.state_label.show()
        self.state_label.raise_()

    def _place_overlays(self) -> None:
        w = self.canvas.width()
        lab = self.state_label
        lab.adjustSize()
        lab.move(max(0, (w - lab.width()) // 2), 36)
        e = self.empty_label
        e.setFixedWidth(min(520, max(200, w - 80)))
        e.adjustSize()
        e.move(max(0, (w - e.width()) // 2), max(0, (self.canvas.height() - e.height()) // 2))

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().resizeEvent(event)
        self._place_overlays()
        self._fit_title()
        self._fit_legend()
        self._schedule_canvas_fit()

    def _schedule_canvas_fit(self) -> None:
        if not getattr(self, "_canvas_fit_pending", False):
            self._canvas_fit_pending = True
            QTimer.singleShot(0, self._fit_canvas)

    def _fit_canvas(self) -> None:
        """Lay the scene out again at the canvas's size: a resize that came while the title or legend was
        still wider left the scene at its old, larger minimum (and cut off on the right)."""
        self._canvas_fit_pending = False
        ci = self.canvas.ci
        ci.layout.invalidate()
        ci.setGeometry(QRectF(0, 0, self.canvas.width(), self.canvas.height()))
        ci.layout.activate()
        self._fit_bar_label()
        self.canvas.viewport().update()

    # -- mouse -----------------------------------------------------------------
    def _grid_index_at_scene(self, scene_pos) -> tuple[int, int] | None:
        if self._result is None or not self.view.sceneBoundingRect().contains(scene_pos):
            return None
        p = self.view.mapSceneToView(scene_pos)
        return nearest_index(self._x, self._y, p.x(), p.y())

    def _on_mouse_moved(self, scene_pos: QPointF) -> None:
        idx = self._grid_index_at_scene(scene_pos)
        if idx is not None:
            self.readout.setText(self.hover_text_at(*idx))
        if self.readout_over_map:
            self._show_hover(None if idx is None else self.readout.text())

    def _show_hover(self, text: str | None) -> None:
        """The readout's text in a box across the foot of the canvas (over the legend), or no box when the
        pointer is off the plot (``set_readout_over_map``)."""
        lab = self.hover_label
        if not text:
            lab.hide()
            return
        lab.setText(text)
        width = max(200, self.canvas.width() - 16)
        lab.setFixedWidth(width)
        lab.setFixedHeight(lab.heightForWidth(width))
        lab.move(8, max(0, self.canvas.height() - lab.height() - 8))
        lab.show()
        lab.raise_()

    def leaveEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().leaveEvent(event)
        self.hover_label.hide()

    def _on_mouse_clicked(self, event) -> None:
        if event.button() != Qt.LeftButton:
            return
        idx = self._grid_index_at_scene(event.scenePos())
        if idx is not None:
            event.accept()
            self.select(*idx)
