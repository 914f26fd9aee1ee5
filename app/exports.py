"""Files for the review: the map as PNG (review resolution) or SVG, every grid point as CSV, findings as text.

Every file goes through the one output writer (``engine_air.outputs.writer``): refused
(``OutputIsInputError``) when it is one of ``inputs`` (the open project's file), written to a temporary file
beside the target and renamed over it only when complete, so a failed export never leaves a partial file and
never harms the file that was there.
"""

from __future__ import annotations

import datetime as _dt
import stat
from pathlib import Path

import pyqtgraph.exporters as pgx

import engine_air
from engine_air.outputs.table import point_table_columns, write_point_table
from engine_air.outputs.writer import output_path, write_output_text

from .views.findings import finding_lines, mechanisms
from .units import Units

CSV_HEADER = point_table_columns()
"""Columns of the CSV export: those of ``engine-air map --csv`` (one registry, one writer)."""


def write_grid_csv(result, path: str | Path, inputs=()) -> int:
    """Every grid point of every case, SI units, the columns of ``engine-air map --csv``; returns the rows written."""
    return write_point_table(result, path, "csv", inputs)


def _non_empty(tmp: str, path) -> None:
    """A writer that reports no failure but wrote nothing must not replace the old file with an empty one (a
    stream such as ``/dev/null`` is written straight into and has no size to look at)."""
    st = Path(tmp).stat()
    if stat.S_ISREG(st.st_mode) and st.st_size == 0:
        raise OSError(f"cannot write {path}: nothing was written")


def findings_text(result, units: Units, title: str = "", file_name: str = "") -> str:
    judged = result.judged_summary
    failing = [s for s in judged if s.fails]
    verdict = f"ALL {len(judged)} LIMITS HOLD" if not failing else f"{len(failing)} OF {len(judged)} LIMITS FAIL"
    if result.not_judged:
        verdict += "; NOT JUDGED ANYWHERE: " + ", ".join(s.label for s in result.not_judged)
    head = [
        f"Inlet operability findings — {title or file_name}",
        f"File: {file_name}" if file_name else "",
        f"engine_air {engine_air.__version__}, {_dt.datetime.now():%Y-%m-%d %H:%M}",
        f"Cases: {', '.join(c.name for c in result.cases)}",
        f"Verdict: {verdict}",
        "",
    ]
    body = [f"- {line}" for line in finding_lines(result.summary, units, mechanisms(result, units))]
    tail = ["", engine_air.CAUTION, ""]
    return "\n".join([h for h in head if h is not None] + body + tail)


def write_findings_text(result, units: Units, path: str | Path, title: str = "", file_name: str = "",
                        inputs=()) -> None:
    write_output_text(path, findings_text(result, units, title, file_name), inputs)


def write_map_png(map_view, path: str | Path, scale: float = 2.0, inputs=()) -> None:
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
    with output_path(path, inputs) as tmp:
        if not image.save(tmp, "PNG"):
            raise OSError(f"cannot write {path}")
        _non_empty(tmp, path)


def write_map_svg(map_view, path: str | Path, inputs=()) -> None:
    """Vector drawing of the map; pyqtgraph's SVG exporter first, Qt's SVG generator if that fails."""
    write_graphics_svg(map_view.canvas, path, "Envelope map", inputs)


def write_graphics_png(view, path: str | Path, inputs=()) -> None:
    """A pyqtgraph ``GraphicsLayoutWidget`` as PNG (pyqtgraph's image exporter), whole or not at all."""
    with output_path(path, inputs) as tmp:
        pgx.ImageExporter(view.ci).export(tmp)
        _non_empty(tmp, path)


def write_graphics_svg(view, path: str | Path, title: str = "", inputs=()) -> None:
    """Vector drawing of a pyqtgraph ``GraphicsLayoutWidget``; Qt's SVG generator when pyqtgraph's fails."""
    with output_path(path, inputs) as tmp:
        _draw_svg(view, tmp, title)
        _non_empty(tmp, path)


def _draw_svg(view, path: str, title: str) -> None:
    try:
        pgx.SVGExporter(view.ci).export(str(path))
        return
    except Exception:  # noqa: BLE001 - some binding versions emit path data the exporter cannot parse
        pass
    from PySide6.QtCore import QRectF, QSize
    from PySide6.QtGui import QPainter
    from PySide6.QtSvg import QSvgGenerator

    rect = view.sceneRect() if not view.sceneRect().isEmpty() else QRectF(view.rect())
    gen = QSvgGenerator()
    gen.setFileName(str(path))
    gen.setSize(QSize(int(rect.width()), int(rect.height())))
    gen.setViewBox(QRectF(0, 0, rect.width(), rect.height()))
    gen.setTitle(title)
    painter = QPainter()
    if not painter.begin(gen):
        raise OSError(f"cannot write {path}")
    try:
        view.scene().render(painter, QRectF(0, 0, rect.width(), rect.height()), rect)
    finally:
        painter.end()
