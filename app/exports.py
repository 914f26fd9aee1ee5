"""Files for the review: the map as PNG (review resolution) or SVG, every grid point as CSV, findings as text."""

from __future__ import annotations

import csv
import datetime as _dt
import math
from pathlib import Path

import numpy as np
import pyqtgraph.exporters as pgx

import engine_air
from engine_air.envelope import flags as F
from engine_air.flow import match

from .findings import finding_lines
from .units import Units

REGIME_NAMES = tuple(getattr(match, "REGIMES", ("subsonic", "subcritical", "critical", "supercritical")))

CSV_QUANTITIES = [
    "face_mach", "face_mach_margin", "throat_mach", "recovery", "external_recovery", "duct_recovery",
    "reference_recovery", "mass_flow_ratio", "max_mass_flow_ratio", "spillage_fraction",
    "additive_drag_coefficient", "face_static_to_ambient", "relative_tip_mach", "theta2",
    "corrected_flow_kg_s", "mass_flow_kg_s",
]
CSV_HEADER = ["case", "mach", "altitude_m", "inside_envelope"] + CSV_QUANTITIES + ["regime", "limiting", "holds",
                                                                                   "flags"]


def _flag_text(bits: int, cache: dict) -> str:
    if bits not in cache:
        names_of = getattr(F, "names_of", None)
        if names_of is not None:
            names = names_of(bits)
        else:  # pragma: no cover
            names = [n for n, b in F.FLAG_BITS.items() if bits & b] or ["ok"]
        cache[bits] = ";".join(names)
    return cache[bits]


def _cell(x: float) -> str:
    return repr(float(x)) if math.isfinite(x) else ""


def write_grid_csv(result, path: str | Path) -> int:
    """Every grid point of every case, SI units; returns the number of rows written."""
    mach_2d, alt_2d = np.meshgrid(result.mach, result.altitude_m)
    inside = np.asarray(result.inside, dtype=bool).ravel()
    rows = 0
    cache: dict = {}
    with open(path, "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f)
        w.writerow(CSV_HEADER)
        for cm in result.cases:
            p = cm.points
            cols = [np.asarray(p.value(k) if k != "face_mach_margin" else p.face_mach_margin, dtype=float).ravel()
                    for k in CSV_QUANTITIES]
            regime = np.asarray(p.regime).ravel()
            bits = np.asarray(p.flags).ravel()
            lim = np.asarray(p.limiting).ravel() if p.limiting is not None else np.full(bits.shape, -1)
            names = [c.name for c in p.checks]
            fails = np.zeros(bits.shape, bool)
            for c in p.checks:
                fails |= np.asarray(c.fails, dtype=bool).ravel()
            m, h = mach_2d.ravel(), alt_2d.ravel()
            for n in range(m.size):
                w.writerow([cm.name, repr(float(m[n])), repr(float(h[n])), "1" if inside[n] else "0"]
                           + [_cell(c[n]) for c in cols]
                           + [REGIME_NAMES[int(regime[n])], names[lim[n]] if lim[n] >= 0 else "",
                              "" if not inside[n] else ("0" if fails[n] else "1"),
                              _flag_text(int(bits[n]), cache)])
                rows += 1
    return rows


def findings_text(result, units: Units, title: str = "", file_name: str = "") -> str:
    failing = [s for s in result.summary if not s.holds]
    verdict = "ALL LIMITS HOLD" if not failing else f"{len(failing)} OF {len(result.summary)} LIMITS FAIL"
    head = [
        f"Inlet operability findings — {title or file_name}",
        f"File: {file_name}" if file_name else "",
        f"engine_air {engine_air.__version__}, {_dt.datetime.now():%Y-%m-%d %H:%M}",
        f"Cases: {', '.join(c.name for c in result.cases)}",
        f"Verdict: {verdict}",
        "",
    ]
    body = [f"- {line}" for line in finding_lines(result.summary, units)]
    tail = ["", engine_air.CAUTION, ""]
    return "\n".join([h for h in head if h is not None] + body + tail)


def write_findings_text(result, units: Units, path: str | Path, title: str = "", file_name: str = "") -> None:
    Path(path).write_text(findings_text(result, units, title, file_name), encoding="utf-8")


def write_map_png(map_view, path: str | Path, scale: float = 2.0) -> None:
    """The whole map graphic (plot, colour bar, legend) at ``scale`` times its on-screen size.

    The scene is rendered through a scaled painter, so text, lines and markers
    all grow together: the file looks like the screen, only sharper.
    """
    from PySide6.QtCore import Qt
    from PySide6.QtGui import QPixmap
    from PySide6.QtWidgets import QWidget

    widget = map_view.canvas
    pixmap = QPixmap(widget.size() * scale)
    pixmap.setDevicePixelRatio(scale)  # a high-DPI paint: every pen, glyph and marker scales alike
    pixmap.fill(Qt.white)
    QWidget.render(widget, pixmap)  # the widget's own paint (QGraphicsView.render would re-fit the scene)
    image = pixmap.toImage()
    image.setDevicePixelRatio(1.0)
    if not image.save(str(path), "PNG"):
        raise OSError(f"cannot write {path}")


def write_map_svg(map_view, path: str | Path) -> None:
    """Vector drawing of the map; pyqtgraph's SVG exporter first, Qt's SVG generator if that fails."""
    try:
        pgx.SVGExporter(map_view.canvas.ci).export(str(path))
        return
    except Exception:  # noqa: BLE001 - some binding versions emit path data the exporter cannot parse
        pass
    from PySide6.QtCore import QRectF, QSize
    from PySide6.QtGui import QPainter
    from PySide6.QtSvg import QSvgGenerator

    view = map_view.canvas
    rect = view.sceneRect() if not view.sceneRect().isEmpty() else QRectF(view.rect())
    gen = QSvgGenerator()
    gen.setFileName(str(path))
    gen.setSize(QSize(int(rect.width()), int(rect.height())))
    gen.setViewBox(QRectF(0, 0, rect.width(), rect.height()))
    gen.setTitle("Envelope map")
    painter = QPainter()
    if not painter.begin(gen):
        raise OSError(f"cannot write {path}")
    try:
        view.scene().render(painter, QRectF(0, 0, rect.width(), rect.height()), rect)
    finally:
        painter.end()
