"""Look of the window: normal, and presentation mode (larger type, heavier lines, high contrast)."""

from __future__ import annotations

BASE_PT = 11
PRESENTATION_PT = 15
COMPACT_PT = 13  # presentation mode in a window under COMPACT_BELOW (a 1280 x 720 projector)
COMPACT_BELOW = (1500, 900)


def compact(width: int, height: int) -> bool:
    """Presentation mode's smaller type for a window this size: fewer pixels, the same share of the screen."""
    return width < COMPACT_BELOW[0] or height < COMPACT_BELOW[1]


def banner_pt(presentation: bool, small_window: bool = False) -> int:
    return (22 if small_window else 28) if presentation else 16


def presentation_pt(small_window: bool = False) -> int:
    return COMPACT_PT if small_window else PRESENTATION_PT

# verdict banner colours (text always white on a dark field, so contrast stays high)
HOLDS_BG = "#1d4f91"   # blue: every limit holds
FAILS_BG = "#8a3b00"   # dark orange-brown: some limit fails
BUSY_BG = "#4d4d4d"    # grey: computing
STALE_BG = "#000000"   # black: out of date


def stylesheet(presentation: bool, small_window: bool = False) -> str:
    pt = presentation_pt(small_window) if presentation else BASE_PT
    banner = banner_pt(presentation, small_window)
    extra = ""
    if presentation:
        extra = """
        QMainWindow, QWidget { background: #ffffff; color: #000000; }
        QTableWidget, QTreeWidget { gridline-color: #000000; }
        QHeaderView::section { background: #000000; color: #ffffff; font-weight: bold; padding: 4px; }
        """
    return f"""
    QWidget {{ font-size: {pt}pt; }}
    QLabel#verdict {{ font-size: {banner}pt; font-weight: bold; color: white; padding: {10 if presentation else 6}px; }}
    QLabel#detailHeader {{ font-size: {pt + 1}pt; }}
    QToolBar QLabel {{ font-weight: bold; padding-left: 8px; }}
    QDockWidget::title {{ font-weight: bold; padding: 4px; }}
    QLabel#editorError {{ background: #8a3b00; color: white; padding: 6px; font-weight: bold; }}
    {extra}
    """
