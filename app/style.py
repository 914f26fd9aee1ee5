"""Look of the window: normal, and presentation mode (larger type, heavier lines, high contrast)."""

from __future__ import annotations

BASE_PT = 11
PRESENTATION_PT = 15

# verdict banner colours (text always white on a dark field, so contrast stays high)
HOLDS_BG = "#1d4f91"   # blue: every limit holds
FAILS_BG = "#8a3b00"   # dark orange-brown: some limit fails
BUSY_BG = "#4d4d4d"    # grey: computing
STALE_BG = "#000000"   # black: out of date


def stylesheet(presentation: bool) -> str:
    pt = PRESENTATION_PT if presentation else BASE_PT
    banner_pt = 28 if presentation else 16
    extra = ""
    if presentation:
        extra = """
        QMainWindow, QWidget { background: #ffffff; color: #000000; }
        QTableWidget, QTreeWidget { gridline-color: #000000; }
        QHeaderView::section { background: #000000; color: #ffffff; font-weight: bold; padding: 4px; }
        """
    return f"""
    QWidget {{ font-size: {pt}pt; }}
    QLabel#verdict {{ font-size: {banner_pt}pt; font-weight: bold; color: white; padding: {10 if presentation else 6}px; }}
    QLabel#detailHeader {{ font-size: {pt + 1}pt; }}
    QToolBar QLabel {{ font-weight: bold; padding-left: 8px; }}
    QDockWidget::title {{ font-weight: bold; padding: 4px; }}
    QLabel#editorError {{ background: #8a3b00; color: white; padding: 6px; font-weight: bold; }}
    {extra}
    """
