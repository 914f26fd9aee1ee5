"""The window's layout: the map in the middle, the selected point's views as tabs on the right, the findings below.

- Right column: one tab per view of the selected point ("Selected point" tables, "Inlet" sketch, "Sections",
  "Characteristic", "Edit project"), each with the column's full height (they no longer share it three ways). Any tab can be
  pulled out as its own window (the float button in its title bar, or a double click on the title) for a larger
  view on demand, and put back the same way. View → "Show …" (Alt+1…5) raises a tab.
- Width: the column is as wide as the shown tab needs (the point's tables, the editors' tables) and its tab
  titles need (never elided), between
  ``COLUMN_MIN_SHARE`` and ``COLUMN_MAX_SHARE`` of the window's width (``EDITOR_MAX_SHARE`` while editing in
  a large window), so the map keeps the rest.
- Bottom: the findings across the whole width (their seven columns need it), as high as their rows up to
  ``FINDINGS_MAX_SHARE`` of the window's height (``FINDINGS_ROWS_SHORT`` rows, at most
  ``FINDINGS_MAX_SHARE_SHORT``, in a window under ``SHORT_WINDOW`` px high, where the map needs it more); more
  rows scroll.
- Presentation mode gives the room to the map: the right column is put away (View → "Point panels", F6, or the
  toolbar's button brings it back), the findings become a strip of ``PRESENTATION_FINDINGS_ROWS`` rows without
  a title bar (more rows scroll), the menu bar and the status bar are hidden (every action keeps its key; the
  toolbar has "Presentation" and "Point panels"). Everything comes back as it was afterwards.
- In presentation mode and in a window under ``SHORT_WINDOW`` px high the map's hover readout has no row of its
  own: it is shown over the foot of the map while the pointer is on the plot.
- In a window under ``SMALL_WINDOW_WIDTH`` px wide (a 1280 x 720 projector) the editors keep to
  ``COLUMN_MAX_SHARE``: their widest tables (schedule, engine ratings) scroll sideways inside the tab rather than
  take the map's width.

``WindowLayout`` is a part of ``MainWindow``; it builds the docks and keeps their sizes.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import QDockWidget, QFrame, QScrollArea, QTabBar, QTabWidget, QWidget

from ..views.characteristic_view import CharacteristicView
from ..views.detail_panel import DetailPanel
from ..views.findings import FindingsList
from ..views.inlet_sketch_view import InletSketchView
from ..views.section_plots_view import SectionPlots
from ..editors import ProjectEditors

COLUMN_MIN_SHARE = 0.30
COLUMN_MAX_SHARE = 0.42
EDITOR_MAX_SHARE = 0.56  # the editors' widest tables (schedule, engine ratings) may take more while editing
SMALL_WINDOW_WIDTH = 1500  # narrower: the editors keep COLUMN_MAX_SHARE and their widest tables scroll sideways
PLOT_SHARE = 0.36  # the sketch's and the sections' column
FINDINGS_MAX_SHARE = 0.28
FINDINGS_MAX_SHARE_SHORT = 0.18  # four rows and the header in a 720 px window; more rows scroll
SHORT_WINDOW = 800
FINDINGS_MIN_ROWS = 4  # shown without scrolling whenever the findings have that many
FINDINGS_ROWS_SHORT = 3  # in a window under SHORT_WINDOW px high: three rows and the header, more scroll
PRESENTATION_FINDINGS_ROWS = 3  # presentation mode's findings strip
STRIP_OPTIONAL_COLUMNS = (1, 3)  # the strip drops the rule, then the worst value, when its type is too wide
TAB_TITLES = {"detail": "Selected point", "sketch": "Inlet", "sections": "Sections",
              "characteristic": "Characteristic", "editor": "Edit project"}


class WindowLayout:
    """Docks and their sizes (mixed into ``MainWindow``)."""

    def _build_docks(self) -> None:
        self.setCorner(Qt.BottomLeftCorner, Qt.BottomDockWidgetArea)
        self.setCorner(Qt.BottomRightCorner, Qt.BottomDockWidgetArea)
        self.setTabPosition(Qt.RightDockWidgetArea, QTabWidget.North)
        self.detail = DetailPanel()
        self.sketch = InletSketchView()  # it draws itself readably (app.views.inlet_sketch_view); hosted here
        self.sections = SectionPlots()
        self.characteristic = CharacteristicView()
        self.editors = ProjectEditors()
        self.detail_dock = self._dock("detail", "detailDock", self.detail)
        self.sketch_dock = self._dock("sketch", "sketchDock", self.sketch)
        self.sections_dock = self._dock("sections", "sectionsDock", self.sections)
        self.characteristic_dock = self._dock("characteristic", "characteristicDock", self.characteristic)
        editor_scroll = QScrollArea()  # so the editors' widest table never sets the whole column's minimum
        editor_scroll.setObjectName("editorScroll")
        editor_scroll.setWidgetResizable(True)
        editor_scroll.setFrameShape(QFrame.NoFrame)
        editor_scroll.setWidget(self.editors)
        self.editor_dock = self._dock("editor", "editorDock", editor_scroll)
        self.addDockWidget(Qt.RightDockWidgetArea, self.detail_dock)
        for dock in (self.sketch_dock, self.sections_dock, self.characteristic_dock, self.editor_dock):
            self.tabifyDockWidget(self.detail_dock, dock)
        self.detail_dock.raise_()
        self.findings = FindingsList()
        self.findings_dock = QDockWidget("Findings over the envelope (all cases)", self)
        self.findings_dock.setObjectName("findingsDock")
        self.findings_dock.setWidget(self.findings)
        self.addDockWidget(Qt.BottomDockWidgetArea, self.findings_dock)
        self._findings_rows_fitted = None

    def _dock(self, name: str, object_name: str, widget) -> QDockWidget:
        dock = QDockWidget(TAB_TITLES[name], self)
        dock.setObjectName(object_name)
        dock.setWidget(widget)
        dock.visibilityChanged.connect(lambda _v: QTimer.singleShot(0, self._fit_detail_dock))
        dock.visibilityChanged.connect(lambda _v: self._sync_panels_action())
        return dock

    @property
    def view_docks(self) -> dict[str, QDockWidget]:
        return {"detail": self.detail_dock, "sketch": self.sketch_dock, "sections": self.sections_dock,
                "characteristic": self.characteristic_dock, "editor": self.editor_dock}

    def show_view(self, name: str) -> None:
        """Show the right column's tab ``name`` ("detail", "sketch", "sections", "editor"), drawn up to date."""
        dock = self.view_docks[name]
        dock.show()
        dock.raise_()
        if name in ("sketch", "sections", "characteristic"):
            self.point_views.flush(name)

    def export_sections(self, path, inputs=()) -> None:
        """Write the sections through the selected point (PNG or SVG by the ending; never over one of
        ``inputs``), drawn for the window's present state first: behind its tab the view may not have been
        drawn for the newest result."""
        self._draw_sections()
        self.sections.export(str(path), inputs)

    def export_characteristic(self, path, inputs=()) -> None:
        """Write the characteristic as the tab shows it (PNG or SVG by the ending; never over one of ``inputs``)."""
        self.characteristic.export(str(path), inputs)

    def _size_docks(self) -> None:
        """The right column's width, the findings' height and the map's readout for the window's present size."""
        self.map.set_readout_over_map(self.presentation or self.height() < SHORT_WINDOW)
        self._fit_detail_dock()
        self._fit_findings_dock(force=True)

    def _fit_detail_dock(self, *_args, grow_only: bool = False) -> None:
        """The right column as wide as its shown tab needs (no sideways scrolling), within its shares.

        ``grow_only`` (a new point's tables): only widen a column its tables no longer fit; never narrow it,
        so a new result does not resize (and repaint) the map whenever a number gets a digit shorter."""
        shown = next((n for n, d in self.view_docks.items()
                      if d.isVisible() and not d.visibleRegion().isEmpty() and not d.isFloating()), None)
        if shown is None:
            return
        w = self.width()
        if shown == "editor":
            bar = self.editor_dock.widget().verticalScrollBar().sizeHint().width()
            need = self.editors.minimumSizeHint().width() + bar + 8
            widest = COLUMN_MAX_SHARE if w < SMALL_WINDOW_WIDTH else EDITOR_MAX_SHARE  # beyond: it scrolls
            want = max(int(COLUMN_MIN_SHARE * w), min(need, int(widest * w)))
            # narrower than their widest table, the editors keep the width it needs (their rows wrapped for
            # it) and scroll sideways, instead of squeezing every tab's columns
            floor = need if want < need else 0
            if self.editors.minimumWidth() != floor:
                self.editors.setMinimumWidth(floor)
        elif shown == "detail":
            chrome = max(0, self.detail_dock.width() - self.detail.width())
            want = max(int(COLUMN_MIN_SHARE * w), min(self.detail.needed_width() + chrome, int(COLUMN_MAX_SHARE * w)))
        else:  # the inlet, the sections: their share, or the least width their drawing lays out in
            want = max(int(PLOT_SHARE * w), min(self._plot_minimum_width(shown), int(EDITOR_MAX_SHARE * w)))
        want = max(want, min(self._tab_titles_width(), int(EDITOR_MAX_SHARE * w)))  # every tab title whole
        dock = self.view_docks[shown]
        if grow_only and dock.width() >= want:
            return
        if abs(dock.width() - want) > 2:
            self.resizeDocks([dock], [want], Qt.Horizontal)

    def _tab_titles_width(self) -> int:
        """The width the right column's tab bar needs to show every title whole (0 without tabs)."""
        bars = [b for b in self.findChildren(QTabBar, options=Qt.FindDirectChildrenOnly)
                if b.isVisible() and b.count() > 1]
        return max((sum(b.tabSizeHint(k).width() for k in range(b.count())) + 4 for b in bars), default=0)

    def _plot_minimum_width(self, name: str) -> int:
        """The least width of the pyqtgraph scene shown in tab ``name`` (its axes, legend and plot), plus the
        dock's frame: narrower, the scene would be cut at the right."""
        view = {"sketch": self.sketch, "characteristic": self.characteristic}.get(name, self.sections)
        scene = view.getPlotItem() if hasattr(view, "getPlotItem") else getattr(view, "ci", None)
        if scene is None:
            return 0
        chrome = max(0, self.view_docks[name].width() - view.width())
        return int(scene.effectiveSizeHint(Qt.MinimumSize).width()) + chrome + 4

    def _fit_findings_dock(self, force: bool = False) -> None:
        """The findings as high as their rows (at least ``FINDINGS_MIN_ROWS``; ``FINDINGS_ROWS_SHORT`` in a short
        window, ``PRESENTATION_FINDINGS_ROWS`` in presentation mode), at most ``FINDINGS_MAX_SHARE`` of the
        window's height; more rows scroll."""
        tree, dock = self.findings, self.findings_dock
        if not dock.isVisible() or dock.isFloating():
            return
        short = self.height() < SHORT_WINDOW
        if self.presentation:  # a strip: a few rows, more scroll
            rows = min(PRESENTATION_FINDINGS_ROWS, max(1, tree.topLevelItemCount()))
        else:
            rows = FINDINGS_ROWS_SHORT if short else max(FINDINGS_MIN_ROWS, tree.topLevelItemCount())
        key = (rows, self.height(), self.presentation)
        if key == self._findings_rows_fitted and not force:
            return
        self._findings_rows_fitted = key
        row_h = tree.sizeHintForRow(0) if tree.topLevelItemCount() else tree.fontMetrics().height() + 6
        title = 0 if self.presentation else 24  # the strip has no title bar
        chrome = max(title, dock.height() - tree.height()) if tree.height() > 0 else title + 6
        scroll = 0 if self._fit_findings_columns() else tree.horizontalScrollBar().sizeHint().height()
        need = tree.header().sizeHint().height() + rows * row_h + 2 * tree.frameWidth() + chrome + scroll + 4
        share = FINDINGS_MAX_SHARE_SHORT if short else FINDINGS_MAX_SHARE
        self.resizeDocks([dock], [min(need, int(share * self.height()))], Qt.Vertical)

    # -- the right column shown or put away; presentation mode -------------------------------------------
    def _column_docks(self) -> list[QDockWidget]:
        """The right column's docks that are not pulled out as windows of their own."""
        return [d for d in self.view_docks.values() if not d.isFloating()]

    @property
    def panels_shown(self) -> bool:
        """Some tab of the right column is shown (not put away)."""
        return any(not d.isHidden() for d in self._column_docks())

    def set_panels_shown(self, on: bool) -> None:
        """Show the right column (the tabs it had, the point's tables if none; never the editors in
        presentation mode) or put it away so that the map has the whole width."""
        if bool(on) == self.panels_shown:
            self._sync_panels_action()
            return
        if on:
            names = [n for n in getattr(self, "_column_before", ()) if not (self.presentation and n == "editor")]
            front = getattr(self, "_column_front", "detail")
            for name in names or [n for n in self.view_docks if n != "editor"]:
                self.view_docks[name].show()
            self.show_view(front if front in names or not names else names[0])
        else:
            shown = [(n, d) for n, d in self.view_docks.items() if not d.isFloating() and not d.isHidden()]
            self._column_before = [n for n, _d in shown]
            self._column_front = next((n for n, d in shown if not d.visibleRegion().isEmpty()), "detail")
            for _n, dock in shown:
                dock.hide()
        self._sync_panels_action()
        QTimer.singleShot(0, self._size_docks)
        if on:  # the point's tables were laid out while put away (maybe in another type): wrap their rows again
            QTimer.singleShot(0, self.detail.refresh)

    def _sync_panels_action(self) -> None:
        action = getattr(self, "panels_action", None)
        if action is not None and action.isChecked() != self.panels_shown:
            action.setChecked(self.panels_shown)

    def _fit_findings_columns(self) -> bool:
        """Presentation mode's strip: the columns in ``STRIP_OPTIONAL_COLUMNS`` order hidden while the columns do
        not fit the window's width (never a column cut or scrolled sideways); all shown otherwise. True when the
        shown columns fit."""
        tree = self.findings
        header = tree.header()
        need = [max(header.sectionSizeHint(c), tree.sizeHintForColumn(c)) for c in range(header.count())]
        room = self.width() - 2 * tree.frameWidth() - tree.verticalScrollBar().sizeHint().width() - 12
        hidden = set()
        if self.presentation:
            for c in STRIP_OPTIONAL_COLUMNS:
                if sum(n for k, n in enumerate(need) if k not in hidden) <= room:
                    break
                hidden.add(c)
        for c in range(header.count()):
            if header.isSectionHidden(c) != (c in hidden):
                header.setSectionHidden(c, c in hidden)
        return sum(n for k, n in enumerate(need) if k not in hidden) <= room

    def _layout_presentation(self, on: bool) -> None:
        """Presentation mode: the map, the verdict and a findings strip; everything else comes back after."""
        if on:
            self._docks_before = {d: not d.isHidden() for d in (*self.view_docks.values(), self.findings_dock)}
            self._front_before = next((d for d in self._column_docks() if d.isVisible()
                                       and not d.visibleRegion().isEmpty()), None)
            if self.panels_shown:
                self.set_panels_shown(False)
            self.editor_dock.hide()
            self.findings_dock.show()
            self.findings_dock.setTitleBarWidget(QWidget())  # the strip needs no title: the banner says it
        else:
            self.findings_dock.setTitleBarWidget(None)
            for dock, was_visible in getattr(self, "_docks_before", {}).items():
                dock.setVisible(was_visible)
            front = getattr(self, "_front_before", None)
            if front is not None and not front.isHidden():
                front.raise_()
        self.menuBar().setVisible(not on)
        self.statusBar().setVisible(not on)
        self._sync_panels_action()
        QTimer.singleShot(0, self._size_docks)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        self._restyle_for_size()  # before the layout runs, so that it lays out the new type at once
        super().resizeEvent(event)
        QTimer.singleShot(0, self._size_docks)
