"""The "Design" menu of the main window: it opens the design dialogs."""

from __future__ import annotations

from typing import Callable

from PySide6.QtGui import QAction
from PySide6.QtWidgets import QFileDialog, QMessageBox

from engine_air.project.errors import ProjectError

from .compare import CompareDialog
from .review_pack import ReviewPackDialog
from .sizing import SizingDialog
from .sweep import SweepDialog


def add_design_menu(main_window, get_project: Callable[[], object]):
    """Add a "Design" menu to ``main_window`` (a QMainWindow) and return it.

    ``get_project()`` returns the current ``engine_air.project.model.Project`` (or None
    when there is none). Actions: feasible range and optimum, compare with a
    project file, trade sweep, write review pack. Dialogs are modeless; the menu
    keeps a reference to each open one (``menu.open_dialogs``).
    """
    menu = main_window.menuBar().addMenu("&Design")
    menu.open_dialogs = []

    def project_or_warn():
        try:
            project = get_project()
        except Exception as exc:  # noqa: BLE001 - the editor may hold unusable input
            QMessageBox.warning(main_window, "Design", f"The project cannot be used: {exc}")
            return None
        if project is None:
            QMessageBox.information(main_window, "Design", "Open or create a project first.")
        return project

    def keep(dialog):
        menu.open_dialogs.append(dialog)
        dialog.finished.connect(lambda _=0, d=dialog: menu.open_dialogs.remove(d) if d in menu.open_dialogs else None)
        dialog.show()
        dialog.raise_()
        return dialog

    def sizing():
        p = project_or_warn()
        if p is not None:
            keep(SizingDialog(p, main_window))

    def compare():
        p = project_or_warn()
        if p is None:
            return
        path, _ = QFileDialog.getOpenFileName(main_window, "Compare with project file", "",
                                              "engine-air projects (*.toml);;All files (*)")
        if path:
            dialog = keep(CompareDialog(p, path, main_window))
            dialog.start()

    def trade():
        p = project_or_warn()
        if p is not None:
            keep(SweepDialog(p, main_window))

    def pack():
        p = project_or_warn()
        if p is None:
            return
        folder = QFileDialog.getExistingDirectory(main_window, "Write review pack into folder")
        if folder:
            inputs = main_window.input_files() if hasattr(main_window, "input_files") else ()
            keep(ReviewPackDialog(p, folder, main_window, inputs=inputs))

    def distortion():
        p = project_or_warn()
        if p is None:
            return
        path, _ = QFileDialog.getOpenFileName(main_window, "Open rake file", "",
                                              "rake files (*.csv *.parquet *.pq);;All files (*)")
        if path:
            open_distortion(main_window, p, path, keep)

    def calibration():
        p = project_or_warn()
        if p is None:
            return
        if p.characteristics is None:
            QMessageBox.information(main_window, "Calibrate",
                                    "This project names no characteristics table. Add [characteristics] file = "
                                    "\"table.csv\" (CSV or Parquet, beside the project file) and open it again.")
            return
        from .calibrate import CalibrateDialog

        document = getattr(main_window, "document", None)
        path = getattr(document, "path", None)
        keep(CalibrateDialog(p, None if path is None else str(path), main_window))

    for text, slot, tip in (
        ("Feasible range and optimum…", sizing, "Range of one design variable for which every limit holds"),
        ("Compare with project file…", compare, "This project against another on one grid"),
        ("Trade sweep…", trade, "Every combination of up to four design variables"),
        ("Write review pack…", pack, "HTML page with verdict, maps, findings and inputs"),
        ("Engine-face distortion…", distortion, "Descriptors and surge-margin stack-up of a rake file (method §18)"),
        ("Calibrate against characteristics…", calibration,
         "Fit model parameters to the project's measured characteristics (method §17)"),
    ):
        action = QAction(text, main_window)
        action.setStatusTip(tip)
        action.triggered.connect(slot)
        menu.addAction(action)
    return menu


def open_distortion(main_window, project, path, keep=None):
    """Read the rake file at ``path`` and open the distortion dialog; a bad file gets a message box and the
    open project stays as it was. Returns the dialog, or None."""
    from PySide6.QtCore import Qt
    from PySide6.QtWidgets import QApplication

    from .distortion import DistortionDialog, open_rakes

    QApplication.setOverrideCursor(Qt.WaitCursor)
    try:
        assessment = open_rakes(path, project)
    except (ProjectError, MemoryError) as exc:
        QApplication.restoreOverrideCursor()
        QMessageBox.warning(main_window, "Engine-face distortion", f"The rake file cannot be used:\n{exc}")
        return None
    except Exception as exc:  # noqa: BLE001 - never out of a slot
        QApplication.restoreOverrideCursor()
        QMessageBox.warning(main_window, "Engine-face distortion",
                            f"The rake file cannot be used (internal error {type(exc).__name__}: {exc})")
        return None
    QApplication.restoreOverrideCursor()
    dialog = DistortionDialog(project, assessment, main_window)
    if keep is not None:
        keep(dialog)
    else:
        dialog.show()
    return dialog
