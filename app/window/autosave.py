"""The main window's autosave of unsaved work into its recovery slot, and restoring recovered work.

``AutosaveActions`` is mixed into ``app.main_window.MainWindow``; it uses the window's ``document``,
``recovery`` (an ``app.recovery.RecoveryStore``), ``autosave_label`` and status bar.
"""

from __future__ import annotations

import logging

from PySide6.QtCore import QTime
from PySide6.QtWidgets import QMessageBox

from engine_air.project.errors import ProjectError


log = logging.getLogger(__name__)


class AutosaveActions:
    """Autosave on the window's timer, the recovery store's reports, and restoring a recovered project."""

    def autosave_now(self) -> bool:
        """Hand the project to the recovery store if it holds unsaved work not autosaved yet (timer slot)."""
        if self._shutdown or self.recovery.closed:
            return False
        d = self.document
        if not d.has_unsaved_work:
            self._sync_recovery()
            return False
        key = (d.project, d.path)
        if self._autosaved is not None and self._autosaved[1] == key[1] and self._autosaved[0] == key[0]:
            return False
        self._autosaved = key
        self.recovery.write(d.project, d.path)
        return True

    def _sync_recovery(self) -> None:
        """No unsaved work any more (saved, undone, New/Open after Discard): the recovery copy goes."""
        if not self.document.has_unsaved_work and not self.recovery.closed:
            self._autosaved = None
            self.recovery.remove()

    def _on_recovery_report(self, action: str, ok: bool, message: str) -> None:
        if action == "write":
            if ok:
                self.autosave_error = ""
                self.autosave_label.setStyleSheet("")
                self.autosave_label.setText(f"Autosaved {QTime.currentTime().toString('HH:mm:ss')}")
                self.autosave_label.setToolTip(f"Unsaved edits are kept in {self.recovery.project_file}")
                return
            self._autosaved = None  # try again at the next tick
            if message != self.autosave_error:
                log.warning("autosave to %s failed: %s", self.recovery.folder, message)
            self.autosave_error = message
            self.autosave_label.setStyleSheet("color: #8a3b00; font-weight: bold;")
            self.autosave_label.setText("Autosave failed")
            self.autosave_label.setToolTip(f"Autosave to {self.recovery.folder} failed: {message}")
            self.statusBar().showMessage(
                f"Autosave failed: {message}. Your edits are still here; save them to keep them.", 15000)
        elif action == "remove":
            if ok:
                self.autosave_label.setStyleSheet("")
                self.autosave_label.setText("")
                self.autosave_label.setToolTip("")
            else:
                self.statusBar().showMessage(f"Could not delete the recovery copy: {message}", 15000)

    def restore_recovered(self, entry, project=None) -> bool:
        """Open a recovered project marked unsaved, its own file (if any) as the save target."""
        if project is None:
            try:
                project = entry.load()
            except ProjectError as exc:
                QMessageBox.critical(self, "Cannot restore", f"{exc}\n\nThe project that was open stays open.")
                return False
        if self.document.has_unsaved_work and not self._ask_unsaved():
            return False
        self._pending_selection = "worst"
        self.map.clear_selection()
        self.document.reset(project, entry.original_path, saved=False, recovered=True)
        self.recovery.adopt(entry)
        self._autosaved = (self.document.project, self.document.path)
        target = f"; Save writes it to {entry.original_path}" if entry.original_path is not None else ""
        self.statusBar().showMessage(f"Restored unsaved work — not saved yet{target}", 15000)
        return True
