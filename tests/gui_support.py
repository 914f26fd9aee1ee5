"""What the desktop-program tests share: a factory of shown main windows and a wait for their map."""

from __future__ import annotations

from contextlib import contextmanager

from PySide6.QtCore import QSettings

from app.main_window import MainWindow
from engine_air.project import load_project

WAIT_MS = 15000


def wait_result(qtbot, w):
    """Wait until the window shows an up-to-date map."""
    qtbot.waitUntil(lambda: w.up_to_date, timeout=WAIT_MS)


@contextmanager
def window_factory(qtbot, tmp_path, default_path):
    """Yield ``make(path=default_path, project=None, wait=True, runner=None, **window_options)``.

    Each window is shown, its settings kept in ``tmp_path``; at the end every window is closed
    without a prompt and its worker shut down.
    """
    made = []

    def make(path=default_path, project=None, wait=True, runner=None, **options):
        settings = QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)
        project = project if project is not None else load_project(path)
        w = MainWindow(project, path, settings=settings, runner=runner, **options)
        w.show()
        made.append(w)
        if wait:
            wait_result(qtbot, w)
        return w

    try:
        yield make
    finally:
        for w in made:
            if not w.recovery.closed:
                w.document._saved = w.document.project  # never prompt at teardown
                w.close()
            w.runner.shutdown()
            w.deleteLater()


def wait_laid_out(qtbot, w, ms: int = 150) -> None:
    """Wait until a window's deferred fits (dock sizes, wrapped table rows, the map's title, legend and
    scene) have run after a resize or a change of style."""
    qtbot.wait(ms)
    qtbot.waitUntil(lambda: not getattr(w.map, "_canvas_fit_pending", False) and not w.detail._refit_pending,
                    timeout=5000)
    qtbot.wait(ms)


# -- what a reader cannot see: clipped or elided text, cut table columns -------------------------------------

def _shown(widget, window) -> bool:
    """On screen: visible, with a size, and not in a dock tab behind another (Qt moves those off screen)."""
    return (widget.isVisible() and widget.isVisibleTo(window) and widget.width() > 0 and widget.height() > 0
            and not widget.visibleRegion().isEmpty())


def _clipped_by_ancestor(widget, window) -> bool:
    """True when the widget lies inside a scroll area's scrolled content (reachable by scrolling, not lost)."""
    from PySide6.QtWidgets import QAbstractScrollArea

    parent = widget.parentWidget()
    while parent is not None and parent is not window:
        if isinstance(parent, QAbstractScrollArea):
            return True
        parent = parent.parentWidget()
    return False


def layout_problems(window) -> list[str]:
    """Every label whose text does not fit its box or is elided, and every cut table column or cell.

    - a label with word wrap needs ``heightForWidth(width)`` of height, one without needs its size hint;
    - a label that elides (a text that ends in "…" while its own text does not) counts as cut;
    - a table or tree column must lie inside the view's viewport (no column beyond the right edge), and
      each cell's text must fit its column (one line), or its row height (word wrap).
    - a scroll area's content must fit its width (scrolling down is fine, sideways is not).
    Texts inside a scroll area's content are measured too: scrolling does not un-clip a label.
    """
    from PySide6.QtCore import QRect, Qt
    from PySide6.QtGui import QFontMetrics
    from PySide6.QtWidgets import QLabel, QScrollArea, QStyle, QTableWidget, QTreeWidget

    problems = []
    for label in window.findChildren(QLabel):
        if not _shown(label, window) or not label.text():
            continue
        name = label.objectName() or label.text()[:40]
        m = label.contentsMargins()
        if label.wordWrap():
            need_h = label.heightForWidth(label.width())
            if need_h > label.height() + 1:
                problems.append(f"label {name!r}: needs {need_h} px of height, has {label.height()}")
        else:
            hint = label.sizeHint()
            if hint.width() > label.width() + 1 or label.minimumSizeHint().height() > label.height() + 1:
                problems.append(f"label {name!r}: needs {hint.width()}x{hint.height()}, "
                                f"has {label.width()}x{label.height()}")
        if label.textFormat() != Qt.RichText and "…" not in label.text():
            fm = QFontMetrics(label.font())
            room = label.width() - m.left() - m.right() - 2 * label.margin()
            if not label.wordWrap() and fm.elidedText(label.text(), Qt.ElideRight, room) != label.text():
                problems.append(f"label {name!r}: elided to {room} px")
    for area in window.findChildren(QScrollArea):
        inner = area.widget()
        if _shown(area, window) and inner is not None and inner.width() > area.viewport().width() + 1:
            problems.append(f"scroll area {area.objectName() or type(area).__name__}: content {inner.width()} px "
                            f"wide in a {area.viewport().width()} px view (a reader must scroll sideways)")
    for view in window.findChildren(QTableWidget) + window.findChildren(QTreeWidget):
        if not _shown(view, window):
            continue
        header = view.horizontalHeader() if isinstance(view, QTableWidget) else view.header()
        vp = view.viewport().width()
        name = view.objectName() or type(view).__name__
        fm = QFontMetrics(view.font())
        for c in range(header.count()):
            if header.isSectionHidden(c):
                continue
            x, w = header.sectionViewportPosition(c), header.sectionSize(c)
            if x < 0 or x + w > vp + 1:
                title = view.model().headerData(c, Qt.Horizontal)
                problems.append(f"{name}: column {c} {title!r} at {x}..{x + w} outside the viewport 0..{vp}")
                continue
            rows = view.rowCount() if isinstance(view, QTableWidget) else view.topLevelItemCount()
            for r in range(rows):
                item = view.item(r, c) if isinstance(view, QTableWidget) else view.topLevelItem(r)
                text = item.text(c) if isinstance(view, QTreeWidget) else (item.text() if item else "")
                if not text:
                    continue
                room = w - 2 * (view.style().pixelMetric(QStyle.PM_FocusFrameHMargin, None, view) + 1)
                if isinstance(view, QTableWidget) and view.wordWrap():
                    need = fm.boundingRect(QRect(0, 0, max(1, room), 100000), Qt.TextWordWrap, text).height()
                    if need > view.rowHeight(r) + 1:
                        problems.append(f"{name}: cell ({r}, {c}) {text[:30]!r} needs {need} px, row has "
                                        f"{view.rowHeight(r)}")
                elif fm.horizontalAdvance(text) > room + 1:
                    problems.append(f"{name}: cell ({r}, {c}) {text[:30]!r} needs {fm.horizontalAdvance(text)} "
                                    f"px, column has {room}")
    return problems


def map_problems(window) -> list[str]:
    """The map's own pieces (drawn in one graphics scene, so no widget check sees them) inside its canvas:
    the colour bar, the legend and the title."""
    m = window.map
    width = m.canvas.width()
    problems = []
    for name, item in (("colour bar", m.colour_bar), ("legend", m.legend), ("title", m.plot.titleLabel)):
        r = item.sceneBoundingRect()
        if r.left() < -1 or r.right() > width + 1:
            problems.append(f"map {name} at {r.left():.0f}..{r.right():.0f} outside the canvas 0..{width}")
    title = m.plot.titleLabel
    if title.item.boundingRect().width() > title.boundingRect().width() + 1:
        problems.append(f"map title {title.item.boundingRect().width():.0f} px wide in "
                        f"{title.boundingRect().width():.0f} px")
    if title.item.boundingRect().height() > title.boundingRect().height() + 1:
        problems.append(f"map title {title.item.boundingRect().height():.0f} px high in "
                        f"{title.boundingRect().height():.0f} px")
    return problems
