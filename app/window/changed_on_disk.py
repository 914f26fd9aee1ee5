"""Asking the user when the project's file was changed on disk since it was opened or last saved.

Another program, or a second window on the same file, saved it in between: saving now would silently throw
their work away. ``ask_changed_on_disk`` offers Overwrite (replace it with this window's project), Save as
(keep both), Reload (take the file from disk, dropping this window's unsaved edits) or Cancel (nothing
happens; the edits stay in the window).
"""

from __future__ import annotations

from PySide6.QtWidgets import QMessageBox

OVERWRITE, SAVE_AS, RELOAD, CANCEL = "overwrite", "save-as", "reload", "cancel"


def changed_on_disk_dialog(parent, path, found=None) -> QMessageBox:
    """The question; ``found`` is the file's fingerprint on disk now (None: the file is gone)."""
    box = QMessageBox(parent)
    box.setIcon(QMessageBox.Warning)
    box.setWindowTitle("File changed on disk")
    if found is None:
        box.setText(f"{path} was deleted or moved since you opened or last saved it.")
    else:
        box.setText(f"{path} was changed on disk since you opened or last saved it "
                    f"(modified {found.modified:%Y-%m-%d %H:%M:%S}).")
    box.setInformativeText(
        "Another program or another window saved it in between.\n\n"
        "Overwrite replaces it with this window's project (the other changes are lost).\n"
        "Save as keeps both: this project goes to a new file.\n"
        "Reload opens the file as it is on disk (this window's unsaved edits are dropped).\n"
        "Cancel saves nothing; your edits stay in the window.")
    choices = {
        OVERWRITE: box.addButton("Overwrite", QMessageBox.DestructiveRole),
        SAVE_AS: box.addButton("Save as…", QMessageBox.AcceptRole),
        RELOAD: box.addButton("Reload", QMessageBox.ResetRole),
        CANCEL: box.addButton("Cancel", QMessageBox.RejectRole),
    }
    box.setDefaultButton(choices[SAVE_AS])
    box.setEscapeButton(choices[CANCEL])
    box._choices = choices  # noqa: SLF001 - for tests
    return box


def ask_changed_on_disk(parent, path, found=None) -> str:
    """Show ``changed_on_disk_dialog``; OVERWRITE, SAVE_AS, RELOAD or CANCEL (closing the box is Cancel)."""
    box = changed_on_disk_dialog(parent, path, found)
    box.exec()
    clicked = box.clickedButton()
    for choice, button in box._choices.items():  # noqa: SLF001
        if clicked is button:
            return choice
    return CANCEL


__all__ = ["CANCEL", "OVERWRITE", "RELOAD", "SAVE_AS", "ask_changed_on_disk", "changed_on_disk_dialog"]
