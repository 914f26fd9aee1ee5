"""The main window's files: New, Open, Save (asking before replacing a read-only file or one changed on disk since
it was opened or saved), recent files, exports (never over the project's own file).

``FileActions`` is mixed into ``app.main_window.MainWindow``; it uses the window's ``document``, ``editors``,
``map``, ``result``, ``units``, ``settings`` and status bar.
"""

from __future__ import annotations

import logging
import os
import stat
from pathlib import Path

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QApplication, QFileDialog, QMessageBox

from engine_air.outputs.writer import OutputIsInputError, check_not_input
from engine_air.project.errors import ProjectError, ProjectSaveError
from engine_air.project.fingerprint import FileChangedError

from .. import exports
from . import changed_on_disk
from ..recovery import reason_of
from ..template import new_project

log = logging.getLogger(__name__)

MAX_RECENT = 8


def is_read_only(path: Path) -> bool:
    """An existing file this user may not write, or one whose mode gives nobody write permission
    (0444: protected on purpose, even from an administrator who could write it)."""
    try:
        mode = path.stat().st_mode
    except OSError:
        return False
    return not os.access(path, os.W_OK) or not mode & (stat.S_IWUSR | stat.S_IWGRP | stat.S_IWOTH)


class FileActions:
    """New, Open, Save and Save as, the recent-files list and the exports of a main window."""

    def _ask_unsaved(self) -> bool:
        """True when it is fine to drop the current project (saved, discarded, or clean)."""
        if not self.document.dirty:
            return True
        answer = QMessageBox.warning(
            self, "Unsaved changes",
            f"{self.document.display_name} has unsaved changes. Save them first?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel, QMessageBox.Save)
        if answer == QMessageBox.Save:
            return self.save()
        return answer == QMessageBox.Discard

    def new_file(self) -> None:
        if not self._ask_unsaved():
            return
        self._pending_selection = "worst"
        self.map.clear_selection()
        self.document.reset(new_project(), None, saved=False)

    def open_dialog(self) -> None:
        if not self._ask_unsaved():
            return
        start = str(self.document.path.parent) if self.document.path else ""
        path, _ = QFileDialog.getOpenFileName(self, "Open project", start, "Project files (*.toml);;All files (*)")
        if path:
            self.open_file(path, ask=False)

    def open_file(self, path, ask: bool = True) -> bool:
        """Open ``path``; on a bad file show the loader's message and keep the current project."""
        if ask and not self._ask_unsaved():
            return False
        try:
            self._pending_selection = "worst"
            self.document.open(path)
        except ProjectError as exc:
            self._pending_selection = None
            QMessageBox.critical(self, "Cannot open project",
                                 f"{exc}\n\nThe project that was open stays open.")
            return False
        except Exception as exc:  # noqa: BLE001 - whatever the file holds, the open project stays
            log.exception("opening %s failed", path)
            self._pending_selection = None
            text = " ".join(str(exc).split())
            QMessageBox.critical(self, "Cannot open project",
                                 f"{path}: cannot be opened ({type(exc).__name__}: {text})"
                                 "\n\nThe project that was open stays open.")
            return False
        self.map.clear_selection()
        self._add_recent(self.document.path)
        for w in self.document.project.warnings:
            self.statusBar().showMessage(w, 10000)
        return True

    def save(self) -> bool:
        if self.document.path is None:
            return self.save_as_dialog()
        return self.save_to(self.document.path)

    def save_as_dialog(self) -> bool:
        start = str(self.document.path) if self.document.path else self.document.display_name
        path, _ = QFileDialog.getSaveFileName(self, "Save project as", start, "Project files (*.toml)")
        if not path:
            return False
        if not path.lower().endswith(".toml"):
            path += ".toml"
        return self.save_to(path)

    def _allow_read_only_target(self, path) -> bool:
        """True when ``path`` may be written: it is new or writable, or it is read-only and the user agrees
        to replace it (it is then made writable for its owner). A refusal leaves the file and the edits as
        they are."""
        target = Path(path)
        if not is_read_only(target):
            return True
        answer = QMessageBox.question(
            self, "Replace a read-only file?",
            f"{target} is read-only (someone protected it from changes).\n\n"
            "Replace it with this project all the same?",
            QMessageBox.Yes | QMessageBox.No, QMessageBox.No)
        if answer != QMessageBox.Yes:
            self.statusBar().showMessage(f"Not saved: {target.name} is read-only; your edits are kept.", 10000)
            return False
        try:
            os.chmod(target, stat.S_IMODE(target.stat().st_mode) | stat.S_IWUSR)
        except OSError as exc:
            QMessageBox.critical(self, "Could not save",
                                 f"{target} cannot be made writable: {reason_of(exc)}\n\n"
                                 "Your edits are kept in the window; try another folder or name.")
            return False
        return True

    def save_to(self, path, overwrite: bool = False) -> bool:
        self.editors.flush()
        if not self._allow_read_only_target(path):
            return False
        try:
            saved = self.document.save(path, overwrite=overwrite)
        except FileChangedError as exc:
            return self._changed_on_disk(path, exc)
        except (ProjectSaveError, OSError) as exc:
            QMessageBox.critical(self, "Could not save",
                                 f"{exc}\n\nYour edits are kept in the window; try another folder or name.")
            return False
        except Exception as exc:  # noqa: BLE001 - never lose the edits to an unexpected error
            log.exception("saving to %s failed", path)
            QMessageBox.critical(self, "Could not save",
                                 f"could not save the project to {path}: {type(exc).__name__}: "
                                 f"{' '.join(str(exc).split())}\n\nYour edits are kept in the window.")
            return False
        self._add_recent(saved)
        self.statusBar().showMessage(f"Saved {saved}", 5000)
        return True

    def _changed_on_disk(self, path, exc: FileChangedError) -> bool:
        """The file was saved by someone else since this window opened or saved it: ask, never overwrite."""
        choice = changed_on_disk.ask_changed_on_disk(self, path, exc.found)
        if choice == changed_on_disk.OVERWRITE:
            return self.save_to(path, overwrite=True)
        if choice == changed_on_disk.SAVE_AS:
            return self.save_as_dialog()
        if choice == changed_on_disk.RELOAD:
            if exc.found is not None and self.open_file(path, ask=False):
                self.statusBar().showMessage(f"Reloaded {Path(path).name} from disk; nothing was saved.", 10000)
            return False
        self.statusBar().showMessage(f"Not saved: {Path(path).name} was changed on disk; your edits are kept.",
                                     10000)
        return False

    def recent_files(self) -> list[str]:
        value = self.settings.value("recent_files", [])
        if isinstance(value, str):
            value = [value]
        return [str(v) for v in (value or [])]

    def _add_recent(self, path) -> None:
        if path is None:
            return
        p = str(Path(path).resolve())
        files = [f for f in self.recent_files() if f != p]
        self.settings.setValue("recent_files", [p] + files[: MAX_RECENT - 1])

    def _fill_recent_menu(self) -> None:
        self.recent_menu.clear()
        files = self.recent_files()
        if not files:
            a = self.recent_menu.addAction("(none)")
            a.setEnabled(False)
            return
        for f in files:
            a = self.recent_menu.addAction(f)
            a.triggered.connect(lambda _c=False, f=f: self.open_file(f))

    # -- export --------------------------------------------------------------------
    def input_files(self) -> tuple:
        """Every file this window reads: an export may never be written over one of them."""
        table = getattr(getattr(self.document.project, "characteristics", None), "table", None)
        return tuple(p for p in (self.document.path, None if table is None else table.path) if p is not None)

    def _export_dialog(self, kind: str) -> None:
        if self.result is None:
            QMessageBox.information(self, "Nothing to export", "There is no computed map yet.")
            return
        stem = Path(self.document.display_name).stem
        filters = {"png": "PNG image (*.png)", "svg": "SVG drawing (*.svg)", "csv": "CSV table (*.csv)",
                   "txt": "Text (*.txt)", "sections-png": "PNG image (*.png)", "sections-svg": "SVG drawing (*.svg)", "characteristic-png": "PNG image (*.png)"}
        suggested = {"png": f"{stem}_map.png", "svg": f"{stem}_map.svg", "csv": f"{stem}_grid.csv",
                     "txt": f"{stem}_findings.txt", "sections-png": f"{stem}_sections.png",
                     "sections-svg": f"{stem}_sections.svg", "characteristic-png": f"{stem}_characteristic.png"}[kind]
        folder = self.document.path.parent if self.document.path else Path.cwd()
        path, _ = QFileDialog.getSaveFileName(self, "Export", str(folder / suggested), filters[kind])
        if path:
            self.export(kind, path)

    def export(self, kind: str, path) -> bool:
        """Write ``kind`` ("png", "svg", "csv", "txt", "sections-png", "sections-svg") to ``path``; a failure is reported, never raised."""
        inputs = self.input_files()
        writers = {
            "png": lambda: exports.write_map_png(self.map, path, inputs=inputs),
            "svg": lambda: exports.write_map_svg(self.map, path, inputs),
            "csv": lambda: exports.write_grid_csv(self.result, path, inputs),
            "sections-png": lambda: self.export_sections(path, inputs),
            "sections-svg": lambda: self.export_sections(path, inputs),
            "characteristic-png": lambda: self.export_characteristic(path, inputs),
            "txt": lambda: exports.write_findings_text(self.result, self.units, path, self.document.project.title,
                                                       self.document.display_name, inputs),
        }
        if kind not in writers:
            raise ValueError(f"unknown export kind {kind!r}")
        try:
            check_not_input(path, inputs)
        except OutputIsInputError as exc:
            QMessageBox.critical(self, "Export refused", f"{exc}.")
            return False
        QApplication.setOverrideCursor(Qt.WaitCursor)
        try:
            writers[kind]()
        except Exception as exc:  # noqa: BLE001 - a failed export is reported, never fatal
            QApplication.restoreOverrideCursor()
            if not isinstance(exc, OSError):
                log.exception("export to %s failed", path)
            QMessageBox.critical(self, "Export failed", f"Could not write {path}: {reason_of(exc)}")
            return False
        finally:
            if QApplication.overrideCursor() is not None:
                QApplication.restoreOverrideCursor()
        stale = " (note: the map is out of date)" if self.map.state != "current" else ""
        self.statusBar().showMessage(f"Exported {path}{stale}", 5000)
        return True
