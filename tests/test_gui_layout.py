"""Issue 14: the window's layout is readable from a 1280 x 720 projector up to 1920 x 1080, docked and in
presentation mode.

At each size the window is grabbed to ``<tmp_path>/<mode>_<w>x<h>.png`` (to look at) and checked:

- the map's plot area (the view box inside the axes) keeps at least ``min_plot_share`` of the window's area;
- no label is elided or cut, no table column lies outside its view, nothing needs sideways scrolling
  (``gui_support.layout_problems``), and the map's title, colour bar and legend lie inside the map
  (``gui_support.map_problems``);
- the right column's tab titles are shown whole;
- every findings row can be reached: it is inside the findings view or the view scrolls to it.

The shares are a judgement for a chart that carries the message of the screen ("common practice", not a
standard), set a little under what the layout gives (``min_plot_share``): docked at least 11.5 % of a 1280 x 720
window (the mixed-compression sample with its five findings and ten legend entries; 14.8 % for the two-ramp
sample), a fifth from 1600 x 1000 up; presentation mode (the right column put away, the findings a strip, the
hover readout over the map) 24 % at 1280 x 720 (30 % for the two-ramp sample), 36 % and more from 1600 x 1000
up. Before the first layout rework
presentation mode at 1280 x 720 left the plot 0 px high.
"""

from __future__ import annotations

import os

import numpy as np
import pytest

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

pytest.importorskip("PySide6")
pytest.importorskip("pyqtgraph")
pytest.importorskip("pytestqt")

from app.main import DEFAULT_SAMPLE, SAMPLES  # noqa: E402
from gui_support import layout_problems, map_problems, wait_laid_out, window_factory  # noqa: E402

SIZES = ((1280, 720), (1600, 1000), (1920, 1080))


def min_plot_share(width: int, height: int, presentation: bool = False) -> float:
    """A little under the least share measured over the three samples (before this layout's rework in
    brackets): docked 0.126 (0.095) at 1280 x 720, 0.223 (0.189) at 1600 x 1000, 0.258 (0.232) at 1920 x 1080
    (the column as wide as its five tab titles need); presentation 0.259 (0.106), 0.394 (0.198), 0.437 (0.245)."""
    if presentation:
        return {1280: 0.24, 1600: 0.36, 1920: 0.40}[width]
    return {1280: 0.115, 1600: 0.20, 1920: 0.23}[width]


@pytest.fixture
def make_window(qtbot, tmp_path):
    with window_factory(qtbot, tmp_path, DEFAULT_SAMPLE) as make:
        yield make


@pytest.fixture
def base_font():
    from PySide6.QtWidgets import QApplication

    from app.main_window import apply_base_font

    app = QApplication.instance()
    font = app.font()
    apply_base_font(app)
    yield
    app.setFont(font)


def plot_share(w) -> float:
    r = w.map.view.sceneBoundingRect()
    return r.width() * r.height() / (w.width() * w.height())


def tab_problems(w) -> list[str]:
    """Dock tab titles that are elided (the tab narrower than its title and the style's padding need)."""
    from PySide6.QtWidgets import QTabBar

    problems = []
    for bar in w.findChildren(QTabBar):
        if not bar.isVisible() or bar.parent() is not w:
            continue
        for k in range(bar.count()):
            need = bar.tabSizeHint(k).width()  # the title and the style's padding around it
            if need > bar.tabRect(k).width() + 1:
                problems.append(f"tab {bar.tabText(k)!r} needs {need} px, has {bar.tabRect(k).width()}")
    return problems


def findings_reachable(w, qtbot) -> list[str]:
    """Every findings row scrolled to lies inside the findings view."""
    tree = w.findings
    problems = []
    for row in range(tree.topLevelItemCount()):
        item = tree.topLevelItem(row)
        tree.scrollToItem(item)
        rect = tree.visualItemRect(item)
        if rect.top() < 0 or rect.bottom() > tree.viewport().height():
            problems.append(f"findings row {row} at {rect.top()}..{rect.bottom()} outside 0..{tree.viewport().height()}")
    return problems


def plot_tab_problems(w, qtbot) -> list[str]:
    """The inlet's and the sections' tabs in turn: each drawing's scene (axes, legend, plot) lies inside its
    view, none cut at the right; then the point's tables again."""
    from PySide6.QtCore import Qt

    problems = []
    for name, view in (("sketch", w.sketch), ("sections", w.sections)):
        w.show_view(name)
        wait_laid_out(qtbot, w, 100)
        scene = view.getPlotItem() if hasattr(view, "getPlotItem") else view.ci
        need = scene.effectiveSizeHint(Qt.MinimumSize).width()
        if need > view.viewport().width() + 1:
            problems.append(f"{name} tab: its drawing needs {need:.0f} px, the view has {view.viewport().width()}")
    w.show_view("detail")
    wait_laid_out(qtbot, w, 100)
    return problems


def settle(w, qtbot, width, height):
    """Resize and wait until the deferred fits (dock sizes, wrapped rows, the map's title and legend) have run."""
    w.resize(width, height)
    qtbot.waitUntil(lambda: w.width() == width and w.height() == height, timeout=5000)
    wait_laid_out(qtbot, w, 200)


@pytest.mark.parametrize("presentation", [False, True], ids=["docked", "presentation"])
@pytest.mark.parametrize("name", ["supersonic_two_ramp", "undersized_business_jet", "mixed_compression_throat_schedule"])
def test_layout_is_readable_from_1280x720_to_1920x1080(make_window, qtbot, tmp_path, base_font, name, presentation):
    w = make_window(SAMPLES / f"{name}.toml")
    w.set_presentation(presentation)
    for width, height in SIZES:
        settle(w, qtbot, width, height)
        assert w.grab().save(str(tmp_path / f"{name}_{'presentation' if presentation else 'docked'}_{width}x{height}.png"))
        share = plot_share(w)
        assert share >= min_plot_share(width, height, presentation), \
            f"{width} x {height}: map plot {share:.3f} of the window"
        problems = layout_problems(w) + map_problems(w) + tab_problems(w)
        assert w.findings_dock.isVisible()  # presentation mode: a strip of a few rows, more scroll
        rows = w.findings.topLevelItemCount()
        assert rows == len(w.result.summary) and rows > 0
        problems += findings_reachable(w, qtbot)
        if presentation:
            assert not w.panels_shown and not w.menuBar().isVisible()
            w.set_panels_shown(True)  # the point's views on demand (F6): readable too
            wait_laid_out(qtbot, w, 100)
            problems += layout_problems(w) + tab_problems(w)
        problems += plot_tab_problems(w, qtbot)
        if presentation:
            w.set_panels_shown(False)
        assert problems == [], f"{width} x {height}: " + "; ".join(problems)


def test_findings_show_every_row_when_there_is_room(make_window, qtbot, base_font):
    """At 1600 x 1000 the findings dock is as high as its rows (no more 2.5 rows and a scroll bar)."""
    w = make_window(SAMPLES / "supersonic_two_ramp.toml")
    settle(w, qtbot, 1600, 1000)
    tree = w.findings
    last = tree.visualItemRect(tree.topLevelItem(tree.topLevelItemCount() - 1))
    assert last.bottom() <= tree.viewport().height()
    assert not tree.verticalScrollBar().isVisible()


def test_point_views_are_tabs_each_with_the_column_height(make_window, qtbot):
    """The point's tables, the inlet, the sections and the editors share the right column as tabs: the one shown
    has the column's full height; raising a tab draws its view for the selected point."""
    w = make_window(SAMPLES / "supersonic_two_ramp.toml")
    settle(w, qtbot, 1600, 1000)
    docks = w.view_docks
    assert all(w.tabifiedDockWidgets(docks["detail"]).count(d) == 1 for n, d in docks.items() if n != "detail")
    assert w.sketch.sketch is None  # behind its tab: not drawn
    w.show_view("sketch")
    assert w.sketch.sketch is not None
    assert docks["sketch"].height() >= 0.6 * w.height()
    w.show_view("sections")
    i, j = w.map.selected()
    key = w.current_quantity()
    case = w.result.cases[0].name
    np.testing.assert_array_equal(w.sections.lines[("mach", case)][1], w.result.quantity(case, key)[i, :])
    assert w.sections.stacked  # taller than wide: one plot above the other
    assert docks["sections"].height() >= 0.6 * w.height()


def test_presentation_mode_gives_back_the_docks_after_a_change_of_window_size(make_window, qtbot):
    """The editors and findings put away for presentation mode come back when it ends, even when the window
    crossed the small-window size (which restyles presentation mode) in between."""
    w = make_window(SAMPLES / "supersonic_two_ramp.toml")
    settle(w, qtbot, 1600, 1000)
    w.set_presentation(True)
    assert w.findings_dock.isVisible() and not w.editor_dock.isVisible() and not w.panels_shown
    assert not w.menuBar().isVisible() and not w.statusBar().isVisible()
    settle(w, qtbot, 1280, 720)
    assert "13pt" in w.styleSheet() and "22pt" in w.styleSheet()  # the smaller presentation type
    settle(w, qtbot, 1600, 1000)
    assert "15pt" in w.styleSheet() and "28pt" in w.styleSheet()
    w.set_presentation(False)
    qtbot.wait(50)
    assert w.findings_dock.isVisible() and w.editor_dock.isVisible() and w.panels_shown
    assert w.menuBar().isVisible() and w.statusBar().isVisible()
    assert all(not w.findings.header().isSectionHidden(c) for c in range(w.findings.header().count()))


def test_editor_tab_keeps_the_map_in_sight(make_window, qtbot, base_font):
    """With "Edit project" in front the column widens to the editors' widest table (schedule, engine ratings)
    within its share in a large window; in a 1280 x 720 window it keeps the point's width and the widest tables
    scroll sideways inside the tab (every column reachable), so the map keeps its room. Back on the point's
    tables the column narrows again."""
    w = make_window(SAMPLES / "supersonic_two_ramp.toml")
    for width, height in ((1280, 720), (1920, 1080)):
        settle(w, qtbot, width, height)
        narrow = w.detail_dock.width()
        w.show_view("editor")
        area = w.editor_dock.widget()
        for k in range(w.editors.tabs.count()):
            w.editors.tabs.setCurrentIndex(k)
            qtbot.wait(60)
            problems = layout_problems(w)
            if width < 1500:  # the editors' scroll area may scroll sideways here: all of it within reach
                problems = [p for p in problems if not p.startswith("scroll area editorScroll")]
                bar = area.horizontalScrollBar()
                assert area.widget().width() <= area.viewport().width() + bar.maximum() + 1
            assert problems == [], f"{width} x {height}, {w.editors.tabs.tabText(k)}: " + "; ".join(problems)
        # the map in sight while editing (two-ramp sample at 1280 x 720: 0.115, before 0.063)
        assert plot_share(w) >= (0.10 if width < 1500 else 0.21), f"{width} x {height}: {plot_share(w):.3f}"
        w.show_view("detail")
        qtbot.waitUntil(lambda: abs(w.detail_dock.width() - narrow) <= 4, timeout=3000)


def test_panels_key_and_presentation_key_work_without_the_menu_bar(make_window, qtbot):
    """In presentation mode the menu bar is hidden: F6 still shows and puts away the right column, F5 still
    ends presentation mode (the actions belong to the window as well as to the menus)."""
    from PySide6.QtCore import Qt

    w = make_window(SAMPLES / "supersonic_two_ramp.toml")
    settle(w, qtbot, 1280, 720)
    w.activateWindow()
    w.set_presentation(True)
    qtbot.wait(50)
    assert not w.panels_shown and not w.panels_action.isChecked()
    qtbot.keyClick(w, Qt.Key_F6)
    assert w.panels_shown and w.detail_dock.isVisible() and not w.editor_dock.isVisible()
    assert w.panels_action.isChecked()
    qtbot.keyClick(w, Qt.Key_F6)
    assert not w.panels_shown
    qtbot.keyClick(w, Qt.Key_F5)
    assert not w.presentation and w.menuBar().isVisible() and w.panels_shown


def test_hover_readout_over_the_map_when_the_window_is_short(make_window, qtbot, base_font):
    """At 1280 x 720 (and in presentation mode) the readout has no row of its own: hovering the plot shows its
    text in a box over the foot of the map, whole (its lines fit), and moving off the plot hides it; at
    1600 x 1000 docked the readout row is back."""
    w = make_window(SAMPLES / "supersonic_two_ramp.toml")
    settle(w, qtbot, 1280, 720)
    m = w.map
    assert m.readout_over_map and not m.readout.isVisible()
    m._on_mouse_moved(m.view.sceneBoundingRect().center())
    box = m.hover_label
    assert box.isVisible() and box.text().startswith("M0 ")
    assert box.height() >= box.heightForWidth(box.width()) and box.geometry().bottom() <= m.canvas.height()
    assert layout_problems(w) == []
    m._on_mouse_moved(m.view.sceneBoundingRect().topLeft() - m.view.sceneBoundingRect().center())
    assert not box.isVisible()
    settle(w, qtbot, 1600, 1000)
    assert not m.readout_over_map and m.readout.isVisible()
