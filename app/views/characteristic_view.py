"""The inlet characteristic at the selected point (method §16, §17): recovery p_t2/p_t0 against captured mass-flow
ratio at the point's Mach number and its neighbours (M0 − 0.2, M0, M0 + 0.2 within the envelope's Mach range).

Where a characteristics table covers the condition the curve drawn is the data's (solid) with the model's dotted
beside it; elsewhere the model's (solid). The critical point is a filled circle, the stability (buzz) boundary a
dashed vertical line where it is judged, each case's operating point a marker in the Mach's colour, and
the table's measured rows at that Mach (the case's incidence) open circles; each case's operating points have a
marker shape of their own, named in the legend (labels beside the markers overlapped where cases lie close). The axes are dimensionless.

The curves come from ``engine_air.envelope.characteristic.characteristic_at``. One Mach costs tens of ms (the
chain swept over 200 demands plus each case's operating point), more than the GUI thread may spend, so
``request`` computes them on a superseding ``app.worker.Worker``: only the newest request is drawn.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal

from ..worker import Worker

NEIGHBOUR_STEP = 0.2
COLOURS = [(31, 95, 168), (200, 80, 30), (46, 139, 87), (122, 63, 160), (184, 134, 11), (68, 68, 68)]
INK = (25, 25, 25)
CASE_SYMBOLS = ["d", "t", "s", "star", "p", "h", "t1", "x"]
EXPORT_SIZE = (1400, 900)


def neighbour_machs(mach: float, envelope_machs, step: float = NEIGHBOUR_STEP) -> list[float]:
    """M0 − step, M0, M0 + step clipped to the envelope's Mach range, without repeats, rising."""
    lo, hi = float(np.min(envelope_machs)), float(np.max(envelope_machs))
    out: list[float] = []
    for m in (mach - step, mach, mach + step):
        m = round(float(np.clip(m, lo, hi)), 6)
        if m > 0.0 and all(abs(m - k) > 1e-6 for k in out):
            out.append(m)
    return sorted(out)


def compute_curves(project, case_name: str, machs, altitude_m: float, cancelled=lambda: False) -> dict:
    """The characteristics (and measured rows) at ``machs`` for one case; runs on the worker thread."""
    from engine_air.envelope.characteristic import characteristic_at, measured_rows

    case = next(c for c in project.cases if c.name == case_name)
    curves, measured = [], []
    for m in machs:
        if cancelled():
            break
        curves.append(characteristic_at(project, case, m, altitude_m))
        measured.append(measured_rows(project, m, case))
    return {"curves": curves, "measured": measured, "case": case_name, "altitude_m": float(altitude_m)}


def _label_points(points) -> dict:
    """Operating points at one place (to 1e-6) share one marker and one label: {(x, y): [case names]}."""
    places: dict = {}
    for p in points:
        if p.get("mass_flow_ratio") is None or p.get("recovery") is None:
            continue
        places.setdefault((round(p["mass_flow_ratio"], 6), round(p["recovery"], 6)), []).append(p["case"])
    return places


class CharacteristicView(pg.PlotWidget):
    """A pyqtgraph plot of the characteristic; ``request`` computes off the GUI thread, ``show_curves`` draws."""

    drawn = Signal()

    def __init__(self, parent=None) -> None:
        super().__init__(parent=parent, background="w")
        self.setMenuEnabled(False)
        item = self.getPlotItem()
        item.showGrid(x=True, y=True, alpha=0.25)
        item.setLabel("bottom", "captured mass-flow ratio A0/Ac (–)", color=INK)
        item.setLabel("left", "total-pressure recovery p_t2/p_t0 (–)", color=INK)
        for side in ("bottom", "left"):
            item.getAxis(side).enableAutoSIPrefix(False)
        self.legend = item.addLegend(offset=(10, -10), labelTextColor=INK, labelTextSize="8pt", verSpacing=-4, brush=pg.mkBrush(255, 255, 255, 220),
                                     pen=pg.mkPen((150, 150, 150)))
        self.worker = Worker(self, threads=1, supersede=True)
        self.worker.finished.connect(self._on_finished)
        self.worker.failed.connect(self._on_failed)
        self.shown: dict | None = None  # what is drawn: {"curves", "measured", "case", "altitude_m"}
        self.message = ""
        self._title = ""
        self.selected_mach: float | None = None
        self.labels: list[str] = []
        self._symbols: dict[str, str] = {}
        self._generics: dict = {}
        self._entries: list = []
        self.clear_view()

    @property
    def ci(self):
        """The plot item (the exporters in ``app.exports`` write a view's ``ci``)."""
        return self.getPlotItem()

    @property
    def busy(self) -> bool:
        return self.worker.busy

    def clear_view(self, message: str = "select a point on the map") -> None:
        self.getPlotItem().clear()
        self.legend.clear()
        self.shown = None
        self.message = message
        self.setTitle(message)

    def setTitle(self, title=None, **args) -> None:  # noqa: N802 - Qt naming
        self._title = title or ""
        self.getPlotItem().setTitle(title, color=INK, size="10pt", **args)

    def request(self, project, case_name: str, mach: float, altitude_m: float, title: str = "") -> int:
        """Compute the characteristics at ``mach`` and its neighbours on the worker; drawn when they arrive."""
        machs = neighbour_machs(mach, project.envelope.mach)
        self._pending_title = title
        self.selected_mach = float(mach)

        def task(_progress, cancelled):
            return compute_curves(project, case_name, machs, altitude_m, cancelled)

        return self.worker.submit(task)

    def _on_finished(self, _gen: int, result) -> None:
        self.show_curves(result["curves"], result["measured"], getattr(self, "_pending_title", ""))
        self.shown = result
        self.drawn.emit()

    def _on_failed(self, _gen: int, message: str) -> None:
        self.clear_view(f"characteristic not drawn: {message}")
        self.drawn.emit()

    def show_curves(self, curves, measured=None, title: str = "") -> None:
        """Draw ``curves`` (``Curve`` objects) with their measured rows (a dict of columns or None each)."""
        item = self.getPlotItem()
        item.clear()
        self.legend.clear()
        self.message = ""
        self.labels: list[str] = []  # the cases whose operating points are drawn, in legend order
        self._symbols: dict[str, str] = {}
        self._generics: dict = {}
        self._entries: list = []
        middle = len(curves) // 2 if len(curves) == 3 else None  # the selected Mach (neighbours on both sides)
        if middle is None and curves and self.selected_mach is not None:
            middle = int(np.argmin([abs(c.mach - self.selected_mach) for c in curves]))
        for k, curve in enumerate(curves):
            self._draw_one(item, curve, COLOURS[k % len(COLOURS)], (measured or [None] * len(curves))[k])
        for k, curve in enumerate(curves):  # the markers last: on top, and their legend entries after the lines'
            self._draw_points(item, curve, COLOURS[k % len(COLOURS)], large=(k == middle))
        self._fill_legend()
        self.setTitle(title)
        item.enableAutoRange()

    def _draw_one(self, item, curve, colour, rows) -> None:
        solid = pg.mkPen(colour, width=2.5)
        item.plot(curve.mass_flow_ratio, curve.recovery, pen=solid, connect="finite")
        self._entries.append(({"pen": solid}, f"M0 {curve.mach:.2f} ({'measured' if curve.source == 'data' else 'model'})"))
        if curve.model_mass_flow_ratio is not None:
            item.plot(curve.model_mass_flow_ratio, curve.model_recovery, connect="finite",
                      pen=pg.mkPen(colour, width=1.6, style=Qt.DotLine))
            self._generic("model", "the model beside the data (dotted)",
                          pen=pg.mkPen(INK, width=1.6, style=Qt.DotLine))
        if np.isfinite(curve.critical_mass_flow_ratio) and np.isfinite(curve.critical_recovery):
            item.plot([curve.critical_mass_flow_ratio], [curve.critical_recovery], pen=None, symbol="o",
                      symbolSize=9, symbolBrush=pg.mkBrush(colour), symbolPen=pg.mkPen(INK, width=1))
            self._generic("critical", "critical point", pen=None, symbol="o", symbolSize=9,
                          symbolBrush=pg.mkBrush(INK), symbolPen=pg.mkPen(INK, width=1))
        if curve.stability_limit_mass_flow_ratio is not None:
            line = pg.InfiniteLine(curve.stability_limit_mass_flow_ratio, angle=90, movable=False,
                                   pen=pg.mkPen(colour, width=1.5, style=Qt.DashLine),
                                   label="buzz limit", labelOpts={"position": 0.5, "color": colour, "rotateAxis": (1, 0)})
            item.addItem(line)
        if rows is not None:
            item.plot(rows["mass_flow_ratio"], rows["recovery"], pen=None, symbol="o", symbolSize=8,
                      symbolBrush=None, symbolPen=pg.mkPen(colour, width=1.5))
            self._generic("tested", "tested points of the table", pen=None, symbol="o", symbolSize=8,
                          symbolBrush=None, symbolPen=pg.mkPen(INK, width=1.5))

    def _draw_points(self, item, curve, colour, large: bool) -> None:
        for (x, y), names in _label_points(curve.operating_points).items():
            for name in names[:1]:  # points at one place: the first case's symbol (the legend names each case)
                item.plot([x], [y], pen=None, symbol=self._case_symbol(name), symbolSize=12 if large else 9,
                          symbolBrush=pg.mkBrush(colour), symbolPen=pg.mkPen(INK, width=1.2))

    def _generic(self, key: str, text: str, **style) -> None:
        """A legend entry shared by every Mach (drawn in black), once."""
        if key not in self._generics:
            self._generics[key] = (style, text)

    def _fill_legend(self) -> None:
        """The legend in a fixed order: the Mach numbers' curves, what the marks mean, the cases' markers."""
        shapes = [(dict(pen=None, symbol=self._symbols[n], symbolSize=11, symbolBrush=pg.mkBrush(230, 230, 230),
                        symbolPen=pg.mkPen(INK, width=1.2)), f"case {n}") for n in self.labels]
        for style, text in [*self._entries, *self._generics.values(), *shapes]:
            self.legend.addItem(pg.PlotDataItem([np.nan], [np.nan], **style), text)

    def _case_symbol(self, name: str) -> str:
        """One marker shape per case, named in the legend once (in black: every Mach's points use it)."""
        if name not in self.labels:
            self.labels.append(name)
            self._symbols[name] = CASE_SYMBOLS[(len(self.labels) - 1) % len(CASE_SYMBOLS)]
        return self._symbols[name]

    # -- export ----------------------------------------------------------------------
    def export(self, path: str, inputs=(), size: tuple[int, int] = EXPORT_SIZE) -> None:
        """Write the plot as drawn to ``path`` (PNG, or SVG by the ending), never over one of ``inputs``."""
        from ..exports import write_graphics_png, write_graphics_svg

        if self.shown is None:
            raise ValueError("no characteristic is drawn (select a point with the Characteristic tab open)")
        page = CharacteristicView()
        page.setAttribute(Qt.WA_DontShowOnScreen)
        page.resize(*size)
        page.show()
        page.show_curves(self.shown["curves"], self.shown["measured"], self._title)
        try:
            if str(path).lower().endswith(".svg"):
                write_graphics_svg(page, path, "Inlet characteristic", inputs)
            else:
                write_graphics_png(page, path, inputs)
        finally:
            page.worker.shutdown(1000)
            page.deleteLater()
