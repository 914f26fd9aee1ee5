"""The map's drawn layers over the quantity's image: the not-judged grey, the envelope outline, the margin = 0
and face static = ambient lines, failing marks, the selected point and, for a mixed-compression inlet, the
unstarted region (hatched, outlined) with the self-start and unstart Mach lines.

``MapOverlays`` is a part of ``EnvelopeMap`` (``app.views.map_view``): its methods draw into the map's items.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QRectF, Qt

from engine_air.envelope import flags as F
from engine_air.envelope.evaluate import WORST
from engine_air.outputs.marks import marked_points
from engine_air.outputs.sections import judged_map

from . import analysis
from .colour_maps import NOT_JUDGED_GREY
from .colour_maps import OUTSIDE_GREY as _OUTSIDE_RGB
from .contours import iso_line

OUTSIDE_GREY = "#%02x%02x%02x" % tuple(_OUTSIDE_RGB[:3])  # outside the envelope
LEAST_MARGIN = "worst_relative_margin"
UNSTARTED_COLOUR = (200, 0, 200)  # the unstarted region's hatch and outline (magenta: seen on both arms)
START_COLOUR = (0, 130, 130)  # the self-start Mach line (teal)
UNSTART_COLOUR = (180, 110, 0)  # the unstart Mach line
DATA_COLOUR = (0, 150, 60)  # the outline of the points where measured characteristics back the verdict


def _hatch_symbol():
    """A slanted stroke (a hatch mark) as a scatter symbol."""
    from PySide6.QtGui import QPainterPath

    path = QPainterPath()
    path.moveTo(-0.5, 0.5)
    path.lineTo(0.5, -0.5)
    return path


HATCH = _hatch_symbol()


def _padded(x, y, mask):
    """The grid widened by one step on each side, ``mask`` as 0/1 with 0 in the new border: its 0.5 line closes."""
    def wider(v):
        v = np.asarray(v, float)
        step = (v[-1] - v[0]) / (len(v) - 1) if len(v) > 1 else 1.0
        return np.concatenate([[v[0] - step], v, [v[-1] + step]])

    return wider(x), wider(y), np.pad(np.asarray(mask, float), 1)


class MapOverlays:
    """Drawing of the layers above the image (mixed into ``EnvelopeMap``)."""

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
        mixed = any(c.points.started is not None for c in cases)
        if not mixed and not getattr(self, "_starting_shown", True):  # nothing drawn, nothing to draw (2 ms)
            return
        flags = [np.asarray(c.points.flags).astype(np.int64) for c in cases]
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
        self.unstarted_hatch.setData(self._x[jj], self._y[ii], symbol=HATCH, size=12 * self._scale,
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
        self._starting_shown = mixed or bool(self.unstarted_count)
        self.hysteresis_band.setVisible(band)
        if band:
            self.hysteresis_band.setRegion((float(unstart), float(start)))

    def _draw_data_region(self, result, case) -> None:
        """Measured characteristics (method §17): the grid points flagged ``from-data`` outlined (dashed green),
        only for a project with a characteristics table; for the worst of all cases, where any case is."""
        if getattr(result.project, "characteristics", None) is None:
            self.data_count = None
            self.data_outline.setData([], [])
            return
        cases = result.cases if case == WORST else [result.case_map(case)]
        from_data = np.zeros(result.inside.shape, bool)
        for c in cases:
            from_data |= (np.asarray(c.points.flags).astype(np.int64) & F.FROM_DATA) != 0
        from_data &= np.asarray(result.inside, bool)
        self.data_count = int(from_data.sum())
        xs, ys = iso_line(*_padded(self._x, self._y, from_data), 0.5)  # closed round the region, also at the grid's edge
        self.data_outline.setData(xs, ys)
        self.data_outline.setPen(self._pen(DATA_COLOUR, 3.2, Qt.DashLine))

    def data_mask(self) -> np.ndarray | None:
        """(ny, nx) bool: the points outlined as backed by data, or None without a characteristics table."""
        if self._result is None or self.data_count is None:
            return None
        cases = self._result.cases if self._case == WORST else [self._result.case_map(self._case)]
        out = np.zeros(self._result.inside.shape, bool)
        for c in cases:
            out |= (np.asarray(c.points.flags).astype(np.int64) & F.FROM_DATA) != 0
        return out & np.asarray(self._result.inside, bool)

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
