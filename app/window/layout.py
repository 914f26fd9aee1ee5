"""The window's layout: the map in the middle, the selected point's views as tabs on the right, the findings below.

- Right column: one tab per view of the selected point ("Selected point" tables, "Inlet" sketch, "Sections",
  "Characteristic", "Edit project"), each with the column's full height (they no longer share it three ways). Any tab can be
  pulled out as its own window (the float button in its title bar, or a double click on the title) for a larger
  view on demand, and put back the same way. View → "Show …" (Alt+1…5) raises a tab.
- Width: the column is as wide as the shown tab needs (the point's tables, the editors' tables), between
  ``COLUMN_MIN_SHARE`` and ``COLUMN_MAX_SHARE`` of the window's width (``EDITOR_MAX_SHARE`` while editing), so
  the map keeps the rest.
- Bottom: the findings across the whole width (their seven columns need it), as high as their rows up to
  ``FINDINGS_MAX_SHARE`` of the window's height (``FINDINGS_MAX_SHARE_SHORT`` in a window under
  ``SHORT_WINDOW`` px high, where the map needs it more); more rows scroll.
- Presentation mode hides the editors and the findings and raises the point's tables; the docks come back as
  they were afterwards.

``WindowLayout`` is a part of ``MainWindow``; it builds the docks and keeps their sizes.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import QDockWidget, QFrame, QScrollArea, QTabWidget

from ..views.characteristic_view import CharacteristicView
from ..views.detail_panel import DetailPanel
from ..views.findings import FindingsList
from ..views.inlet_sketch_view import InletSketchView
from ..views.section_plots_view import SectionPlots
from ..editors import ProjectEditors

COLUMN_MIN_SHARE = 0.30
COLUMN_MAX_SHARE = 0.42
EDITOR_MAX_SHARE = 0.56  # the editors' widest tables (schedule, engine ratings) may take more while editing
PLOT_SHARE = 0.36  # the sketch's and the sections' column
FINDINGS_MAX_SHARE = 0.28
FINDINGS_MAX_SHARE_SHORT = 0.18  # four rows and the header in a 720 px window; more rows scroll
SHORT_WINDOW = 800
FINDINGS_MIN_ROWS = 4  # shown without scrolling whenever the findings have that many
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
        """The right column's width and the findings' height for the window's present size."""
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
            want = max(int(COLUMN_MIN_SHARE * w), min(need, int(EDITOR_MAX_SHARE * w)))
        elif shown == "detail":
            chrome = max(0, self.detail_dock.width() - self.detail.width())
            want = max(int(COLUMN_MIN_SHARE * w), min(self.detail.needed_width() + chrome, int(COLUMN_MAX_SHARE * w)))
        else:  # the inlet, the sections: their share, or the least width their drawing lays out in
            want = max(int(PLOT_SHARE * w), min(self._plot_minimum_width(shown), int(EDITOR_MAX_SHARE * w)))
        dock = self.view_docks[shown]
        if grow_only and dock.width() >= want:
            return
        if abs(dock.width() - want) > 2:
            self.resizeDocks([dock], [want], Qt.Horizontal)

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
        """The findings as high as their rows (at least ``FINDINGS_MIN_ROWS``), at most ``FINDINGS_MAX_SHARE``
        of the window's height."""
        tree, dock = self.findings, self.findings_dock
        if not dock.isVisible() or dock.isFloating():
            return
        rows = max(FINDINGS_MIN_ROWS, tree.topLevelItemCount())
        key = (rows, self.height(), self.presentation)
        if key == self._findings_rows_fitted and not force:
            return
        self._findings_rows_fitted = key
        row_h = tree.sizeHintForRow(0) if tree.topLevelItemCount() else tree.fontMetrics().height() + 6
        chrome = max(24, dock.height() - tree.height()) if tree.height() > 0 else 30
        scroll = tree.horizontalScrollBar().sizeHint().height()
        need = tree.header().sizeHint().height() + rows * row_h + 2 * tree.frameWidth() + chrome + scroll + 4
        share = FINDINGS_MAX_SHARE_SHORT if self.height() < SHORT_WINDOW else FINDINGS_MAX_SHARE
        self.resizeDocks([dock], [min(need, int(share * self.height()))], Qt.Vertical)

    def _layout_presentation(self, on: bool) -> None:
        if on:
            # the map and the verdict get the room; the editors and findings come back afterwards
            self._docks_before = {d: d.isVisible() for d in (self.editor_dock, self.findings_dock)}
            self.editor_dock.hide()
            self.findings_dock.hide()
            self.detail_dock.show()
            self.detail_dock.raise_()
        else:
            for dock, was_visible in getattr(self, "_docks_before", {}).items():
                dock.setVisible(was_visible)
        QTimer.singleShot(0, self._size_docks)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        self._restyle_for_size()  # before the layout runs, so that it lays out the new type at once
        super().resizeEvent(event)
        QTimer.singleShot(0, self._size_docks)
