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
line; a click selects the nearest grid point (``pointSelected(i, j)``).
"""

from __future__ import annotations

import html
import math

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPointF, QRectF, Qt, QTimer, Signal
from PySide6.QtGui import QFont, QFontMetrics
from PySide6.QtWidgets import QLabel, QVBoxLayout, QWidget

from engine_air.envelope import flags as F
from engine_air.envelope.evaluate import WORST
from engine_air.envelope.ranking import limiting_map, nearest_index
from engine_air.outputs.marks import marked_points
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.sections import judged_map

from . import analysis
from .colour_maps import NOT_JUDGED_GREY, colour_map_for, levels_for
from .colour_maps import OUTSIDE_GREY as _OUTSIDE_RGB
from ..units import Units, dimension_of_si_unit, group_digits

OUTSIDE_GREY = "#%02x%02x%02x" % tuple(_OUTSIDE_RGB[:3])
LEAST_MARGIN = "worst_relative_margin"
UNSTARTED_COLOUR = (200, 0, 200)  # the unstarted region's hatch and outline (magenta: seen on both arms)
START_COLOUR = (0, 130, 130)  # the self-start Mach line (teal)
UNSTART_COLOUR = (180, 110, 0)  # the unstart Mach line


def _hatch_symbol():
    """A slanted stroke (a hatch mark) as a scatter symbol."""
    from PySide6.QtGui import QPainterPath

    path = QPainterPath()
    path.moveTo(-0.5, 0.5)
    path.lineTo(0.5, -0.5)
    return path


_HATCH = _hatch_symbol()


def _no_si_prefix(axis) -> None:
    """Plain tick values (no automatic 'x0.001' scaling), whatever the pyqtgraph version."""
    if hasattr(axis, "setSIPrefixEnableRanges"):
        axis.setSIPrefixEnableRanges(())
    axis.enableAutoSIPrefix(False)


def iso_line(x: np.ndarray, y: np.ndarray, field: np.ndarray, level: float):
    """The ``level`` line of ``field`` (rows along ``y``) in data coordinates, by pyqtgraph's isocurve.

    Returns ``(xs, ys)``: polylines separated by NaN (for ``PlotDataItem(connect='finite')``). An edge
    with a NaN end gives a NaN point, so the line stops at the envelope instead of following the NaN fill.
    """
    f = np.asarray(field, dtype=float)
    if f.ndim != 2 or min(f.shape) < 2:
        return np.empty(0), np.empty(0)
    with np.errstate(invalid="ignore", divide="ignore"):
        lines = pg.functions.isocurve(f, level, connected=True)
    xs, ys = [], []
    for line in lines:
        pts = np.asarray(line, dtype=float).reshape(-1, 2) - 0.5  # pixel centres -> (row, column) indices
        ys.append(np.interp(pts[:, 0], np.arange(len(y)), y))
        xs.append(np.interp(pts[:, 1], np.arange(len(x)), x))
        xs.append([np.nan])
        ys.append([np.nan])
    if not xs:
        return np.empty(0), np.empty(0)
    return np.concatenate(xs), np.concatenate(ys)


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


class EnvelopeMap(QWidget):
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
        for z, item in enumerate((self.self_start_line, self.unstart_line, self.unstarted_outline,
                                  self.unstarted_hatch)):
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
        self.colour_bar.getAxis("right").setLabel(quantity_axis_label(key, units))
        self.plot.setLabel("bottom", "Flight Mach number M0")
        self.plot.setLabel("left", units.with_unit("Pressure altitude", "altitude"))
        case_text = "worst of all cases" if case == WORST else f"case “{case}”"
        self._title_parts = (q.label, case_text)
        self._fit_title()

        self._draw_not_judged(result, case, key, q.kind, values)
        self._draw_outline(result.project)
        self._draw_starting(result, case)
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

    def set_presentation(self, on: bool) -> None:
        self._scale = 1.45 if on else 1.0
        self._high_contrast = on
        self._apply_style()
        if self._result is not None:
            self.show_result(self._result, self._case, self._key, self._units)

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
    def _image_rect(self) -> QRectF:
        x, y = self._x, self._y
        dx = (x[-1] - x[0]) / (len(x) - 1) if len(x) > 1 else 0.01
        dy = (y[-1] - y[0]) / (len(y) - 1) if len(y) > 1 else 1.0
        return QRectF(x[0] - dx / 2, y[0] - dy / 2, (x[-1] - x[0]) + dx, (y[-1] - y[0]) + dy)

    def _pen(self, colour, width, style=Qt.SolidLine):
        return pg.mkPen(colour, width=width * self._scale, style=style, cap=Qt.FlatCap)

    def _draw_not_judged(self, result, case, key, kind, values) -> None:
        """Grey over the points inside the envelope where the quantity is not judged: for a margin, where its
        check does not apply or the margin is not defined; for any quantity, where it is not defined or the
        point lies outside its case's region (``outside-case-region``)."""
        inside = np.asarray(result.inside, dtype=bool)
        with np.errstate(invalid="ignore"):
            finite = np.isfinite(values)
        if kind == "margin" and key != LEAST_MARGIN:
            judged = judged_map(result, case, key)
        else:
            judged = inside & finite
        cases = result.cases if case == WORST else [result.case_map(case)]
        if cases:
            out_region = np.ones(inside.shape, bool)
            for c in cases:  # for the worst of all cases: grey only where no case is judged
                out_region &= (np.asarray(c.points.flags).astype(np.int64) & F.OUTSIDE_CASE_REGION) != 0
            judged = judged & ~out_region
        grey = inside & ~judged
        self._judged = judged | ~inside
        self.not_judged_count = int(grey.sum())
        rgba = np.zeros(grey.shape + (4,), dtype=np.ubyte)
        rgba[grey, :3] = NOT_JUDGED_GREY[:3]
        rgba[grey, 3] = 255
        self.not_judged_image.setImage(rgba, autoLevels=False)
        self.not_judged_image.setRect(self._image_rect())

    def not_judged_mask(self) -> np.ndarray | None:
        """(ny, nx) bool: drawn in the not-judged grey (inside the envelope, not judged)."""
        if self._judged is None or self._result is None:
            return None
        return ~self._judged & np.asarray(self._result.inside, bool)

    def _draw_starting(self, result, case) -> None:
        """Mixed compression: unstarted points hatched and outlined; self-start and unstart Mach lines."""
        cases = result.cases if case == WORST else [result.case_map(case)]
        flags = [np.asarray(c.points.flags).astype(np.int64) for c in cases]
        mixed = any(c.points.started is not None for c in cases)
        unstarted = np.zeros(result.inside.shape, bool)
        for f in flags:
            unstarted |= (f & F.UNSTARTED) != 0
        unstarted &= np.asarray(result.inside, bool)
        self.unstarted_count = int(unstarted.sum())
        # outline of the unstarted region
        xs, ys = iso_line(self._x, self._y, np.where(result.inside, unstarted.astype(float), np.nan), 0.5)
        self.unstarted_outline.setData(xs, ys)
        self.unstarted_outline.setPen(self._pen(UNSTARTED_COLOUR, 2.4))
        # hatch: a slanted stroke on a regular subset of the unstarted points
        ii, jj = marked_points(unstarted, half_step=True)
        self.unstarted_hatch.setData(self._x[jj], self._y[ii], symbol=_HATCH, size=12 * self._scale,
                                     pen=pg.mkPen(UNSTARTED_COLOUR, width=2.2 * self._scale), brush=None)
        # self-start and unstart Mach numbers (the same on every altitude row)
        start = unstart = None
        if mixed:
            try:
                from engine_air.inlets.mixed_compression import starting_machs

                start, unstart = starting_machs(result.project.inlet)
            except Exception:  # noqa: BLE001 - a missing line must never stop the map from drawing
                start = unstart = None
        self.starting_machs = (start, unstart)
        pen_start = self._pen(START_COLOUR, 3.0, Qt.DashLine)
        pen_unstart = self._pen(UNSTART_COLOUR, 3.0, Qt.DashDotLine)
        for line, at, pen in ((self.self_start_line, start, pen_start), (self.unstart_line, unstart, pen_unstart)):
            line.setPen(pen)
            line.setVisible(at is not None)
            if at is not None:
                line.setValue(float(at))
        band = start is not None and unstart is not None and start > unstart
        self.hysteresis_band.setVisible(band)
        if band:
            self.hysteresis_band.setRegion((float(unstart), float(start)))

    def _draw_outline(self, project) -> None:
        env = project.envelope
        mx = list(env.mach) + [env.mach[0]]
        hy = self._units.to_display("altitude", np.array(list(env.altitude_m) + [env.altitude_m[0]], dtype=float))
        self.outline.setData(np.array(mx, dtype=float), hy)
        self.outline.setPen(self._pen("#202020", 2.2))

    def _draw_zero_line(self, result, case, key, kind, values) -> None:
        field = values if kind == "margin" else analysis.limiting_field(result, case)
        xs, ys = iso_line(self._x, self._y, field, 0.0)
        self._zero_found = int(np.isfinite(xs).sum()) >= 2
        self.zero_halo.setData(xs, ys)
        self.zero_line.setData(xs, ys)
        self.zero_halo.setPen(self._pen("w", 6.0))
        self.zero_line.setPen(self._pen("k", 3.0))

    def _draw_ram_line(self, result, case) -> None:
        ratio = np.asarray(result.quantity(case, "face_static_to_ambient"), dtype=float)
        xs, ys = iso_line(self._x, self._y, ratio, 1.0)
        self._ram_found = int(np.isfinite(xs).sum()) >= 2
        self.ram_halo.setData(xs, ys)
        self.ram_line.setData(xs, ys)
        self.ram_halo.setPen(self._pen("w", 5.5))
        pen = self._pen("#3d1466", 3.2, Qt.CustomDashLine)
        pen.setDashPattern([2.5, 1.5])
        self.ram_line.setPen(pen)

    def _draw_fail_marks(self, result, case) -> None:
        failing = np.asarray(result.failing(case), dtype=bool)
        ii, jj = marked_points(failing)
        if ii.size > 4000:
            keep = np.linspace(0, ii.size - 1, 4000).astype(int)
            ii, jj = ii[keep], jj[keep]
        self.fail_marks.setData(self._x[jj], self._y[ii], symbol="x", size=9 * self._scale,
                                pen=pg.mkPen("w", width=0.8), brush=pg.mkBrush("k"))
        self.fail_mark_count = int(ii.size)

    def _draw_selection(self, i: int, j: int) -> None:
        x, y = float(self._x[j]), float(self._y[i])
        self.selection.setData([x, x], [y, y], symbol=["o", "o"], size=[24 * self._scale, 10 * self._scale],
                               pen=[pg.mkPen("k", width=3.5 * self._scale), pg.mkPen("w", width=2.5 * self._scale)],
                               brush=[None, pg.mkBrush("k")])

    def _build_legend(self) -> None:
        """Legend entries are made once (clearing a legend is unsafe with some Qt bindings); texts update."""
        self._legend_fail = pg.ScatterPlotItem(symbol="x", size=12, pen=pg.mkPen("w", width=0.8),
                                               brush=pg.mkBrush("k"))
        self._legend_sel = pg.ScatterPlotItem(symbol="o", size=16, pen=pg.mkPen("k", width=3), brush=None)
        entries = [(self.outline, "flight envelope"), (self.zero_line, "margin = 0"),
                   (self.ram_line, "face static = ambient (p2/p0 = 1)"),
                   (self._legend_fail, "a limit fails here"), (self._legend_sel, "selected point")]
        for item, text in entries:
            self.legend.addItem(item, text)
        self._legend_labels = [label for _sample, label in self.legend.items]
        self._legend_texts = [text for _item, text in entries]

    def _rebuild_legend(self, margin_shown: bool) -> None:
        none = " (none here)"
        zero = "least margin = 0" if self._key == LEAST_MARGIN else f"{QUANTITIES[self._key].label} = 0"
        self._legend_texts[1] = (zero if margin_shown
                                 else "limit boundary (least margin = 0)") + ("" if self._zero_found else none)
        self._legend_texts[2] = "face static = ambient (p2/p0 = 1)" + ("" if self._ram_found else none)
        self._legend_texts[3] = "a limit fails here" + ("" if self.fail_mark_count else " (nowhere)")
        self._sync_optional_legend(self._optional_legend(margin_shown))
        self._update_legend_text()

    def _optional_legend(self, margin_shown: bool) -> list[tuple[str, str]]:
        """(entry, text) of the legend entries this map needs beyond the fixed five."""
        out = []
        if self.not_judged_count:  # the two greys side by side, so that neither is mistaken for the other
            out.append(("not-judged", "not judged here"))
            out.append(("outside", "outside the envelope"))
        if self._key == LEAST_MARGIN:
            labels = [html.escape(x) for x in self.limiting_labels] or ["nothing judged"]
            one = "limiting: " + " / ".join(labels)
            # one check a line when they do not fit on one short line, so the legend keeps its columns
            text = one if len(one) <= 26 else "limiting:<br>" + " /<br>".join(labels)
            out.append(("limiting", text))
        start, unstart = self.starting_machs
        if self.unstarted_count or start is not None:
            out.append(("unstarted", "unstarted (hatched)" + ("" if self.unstarted_count else " (nowhere)")))
        if start is not None:
            if unstart is not None and unstart < start:
                out.append(("self-start", f"self-start M0 {start:.3f}"))
                out.append(("unstart", f"unstart M0 {unstart:.3f}"))
                out.append(("band", "hysteresis: started only if reached from above"))
            else:
                out.append(("self-start", f"self-start = unstart M0 {start:.3f}"))
        return out

    def _legend_sample(self, entry: str):
        samples = getattr(self, "_legend_samples", None)
        if samples is None:
            samples = self._legend_samples = {}
        if entry not in samples:
            if entry in ("outside", "not-judged", "band"):
                colour = {"outside": OUTSIDE_GREY, "not-judged": pg.mkColor(*NOT_JUDGED_GREY[:3]),
                          "band": pg.mkColor(255, 200, 0, 110)}[entry]
                item = pg.ScatterPlotItem(symbol="s", size=14, pen=pg.mkPen("#555555", width=0.8),
                                          brush=pg.mkBrush(colour))
            elif entry == "unstarted":
                item = pg.ScatterPlotItem(symbol=_HATCH, size=12, pen=pg.mkPen(UNSTARTED_COLOUR, width=2.2),
                                          brush=None)
            elif entry == "self-start":
                item = pg.PlotDataItem(pen=pg.mkPen(START_COLOUR, width=3.0, style=Qt.DashLine))
            elif entry == "unstart":
                item = pg.PlotDataItem(pen=pg.mkPen(UNSTART_COLOUR, width=3.0, style=Qt.DashDotLine))
            else:  # a text entry
                item = pg.PlotDataItem(pen=None)
            samples[entry] = item
        return samples[entry]

    def _sync_optional_legend(self, wanted: list[tuple[str, str]]) -> None:
        """Add or remove the optional entries (only when the set changes); texts are updated in place."""
        keys = [k for k, _t in wanted]
        if keys != getattr(self, "_optional_keys", []):
            for k in getattr(self, "_optional_keys", []):
                self.legend.removeItem(self._legend_sample(k))
            for k, text in wanted:
                self.legend.addItem(self._legend_sample(k), text)
            self._optional_keys = keys
            n = self.legend.columnCount
            self.legend.columnCount = -1
            self.legend.setColumnCount(n)  # lays every entry out again
            self._legend_labels = [label for _sample, label in self.legend.items]
            self._legend_shown = None
        self._legend_texts = self._legend_texts[:5] + [t for _k, t in wanted]
        self.legend_entries = list(self._legend_texts)

    def _update_legend_text(self) -> None:
        self._legend_shown = None
        self._fit_legend()

    def _set_legend_text(self, pt: float) -> None:
        shown = (tuple(self._legend_texts), round(pt, 1))
        if shown == getattr(self, "_legend_shown", None):
            return
        self._legend_shown = shown
        for label, text in zip(self._legend_labels, self._legend_texts):
            label.setText(text, size=f"{pt:.0f}pt", color="k")

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
        self.legend.setColumnCount(2 if s > 1.2 else 4)  # fewer when the map is narrow (``_fit_legend``)
        self.plot.titleLabel.opts["size"] = f"{15 * s:.0f}pt"
        self.plot.titleLabel.opts["color"] = "#000"
        if hasattr(self, "_legend_labels"):
            self._update_legend_text()
        self.readout.setStyleSheet(f"font-size: {12 * s:.0f}pt; padding: 4px; color: black; background: #f2f2f2;")
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
        self.canvas.viewport().update()

    def _fit_legend(self) -> None:
        """As many legend columns as the style asks (4, or 2 in presentation) and the width allows; in a
        narrow window the legend's type first shrinks (to 75 %), then it drops columns."""
        if not getattr(self, "_legend_labels", None):
            return
        room = self.canvas.width() - 30
        full = 11 * self._scale
        wanted = 2 if self._scale > 1.2 else 4
        tries = [(wanted, full), (wanted, 0.85 * full), (wanted, 0.75 * full)]
        tries += [(n, 0.75 * full) for n in range(wanted - 1, 0, -1)]
        before = getattr(self, "_legend_shown", None)
        moved = False  # LegendItem.setColumnCount puts the legend at (0, 0) until the scene is laid out again
        for n, pt in tries:
            self._set_legend_text(pt)
            if self.legend.columnCount != n:
                self.legend.setColumnCount(n)
                moved = True
            self.legend.layout.invalidate()
            if self.legend.layout.effectiveSizeHint(Qt.MinimumSize).width() <= room:
                break
        if moved or self._legend_shown != before:
            self._schedule_canvas_fit()

    def _fit_title(self) -> None:
        """The title on one line when it fits beside the colour bar, else on two (quantity / case), so a
        narrow window never widens the map beyond its place; the title row is as high as its lines."""
        parts = getattr(self, "_title_parts", None)
        if parts is None:
            return
        font = QFont()
        font.setPointSizeF(15 * self._scale)
        fm = QFontMetrics(font)
        one = f"{parts[0]} — {parts[1]}"
        room = (self.canvas.width() - self.colour_bar.maximumWidth()
                - self.plot.getAxis("left").width() - 40)
        lines = [one] if fm.horizontalAdvance(one) <= room else []
        if not lines:  # one line per part, each part wrapped at its words when it is still too wide
            for part in parts:
                line = ""
                for word in part.split(" "):
                    trial = f"{line} {word}".strip()
                    if line and fm.horizontalAdvance(trial) > room:
                        lines.append(line)
                        line = word
                    else:
                        line = trial
                lines.append(line)
        text = "<br>".join(html.escape(line) for line in lines)
        if (text, self._scale) == getattr(self, "_title_shown", None):
            return
        self._title_shown = (text, self._scale)
        self.plot.setTitle(text)
        height = len(lines) * fm.lineSpacing() + 12
        self.plot.titleLabel.setMaximumHeight(height)
        self.plot.layout.setRowFixedHeight(0, height)
        self._schedule_canvas_fit()

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

    def _on_mouse_clicked(self, event) -> None:
        if event.button() != Qt.LeftButton:
            return
        idx = self._grid_index_at_scene(event.scenePos())
        if idx is not None:
            event.accept()
            self.select(*idx)
