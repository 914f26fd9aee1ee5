"""Asking the user about recovered work at start-up: Restore, Discard or Later."""

from __future__ import annotations

import logging

from PySide6.QtWidgets import QMessageBox

from engine_air.project.errors import ProjectError


from .found import Recovered, find_recovered
from .slot import reason_of

log = logging.getLogger(__name__)


RESTORE, DISCARD, LATER = "restore", "discard", "later"


def _when(entry: Recovered) -> str:
    return entry.saved_at.strftime("%Y-%m-%d %H:%M:%S") if entry.saved_at is not None else "unknown time"


def recovery_dialog(parent, entry: Recovered, error: str | None = None, index: int = 0,
                    count: int = 1) -> QMessageBox:
    """The question for one recovered project; buttons Restore (unless unreadable), Discard, Later."""
    box = QMessageBox(parent)
    box.setIcon(QMessageBox.Warning if error else QMessageBox.Question)
    box.setWindowTitle("Recover unsaved work")
    which = f" ({index + 1} of {count})" if count > 1 else ""
    box.setText(f"Unsaved work was found from a session that did not close normally{which}.")
    where = str(entry.original_path) if entry.original_path is not None else "never saved (untitled)"
    lines = [f"Project: {entry.title or '(no title)'}", f"File: {where}", f"Autosaved: {_when(entry)}", ""]
    if error:
        lines += [f"The recovered copy cannot be read: {error}", "",
                  "Discard deletes it; Later keeps it and asks again at the next start."]
    else:
        if entry.original_changed_since():
            lines += [f"Note: {entry.original_path.name} was changed after this copy was autosaved.", ""]
        lines += ["Restore opens it marked unsaved; Save writes it to the file above.",
                  "Discard deletes the recovered copy.",
                  "Later keeps it and asks again at the next start."]
    box.setInformativeText("\n".join(lines))
    restore = None
    if not error:
        restore = box.addButton("Restore", QMessageBox.AcceptRole)
    discard = box.addButton("Discard", QMessageBox.DestructiveRole)
    later = box.addButton("Later", QMessageBox.RejectRole)
    box.setDefaultButton(restore if restore is not None else later)
    box.setEscapeButton(later)
    box._choices = {RESTORE: restore, DISCARD: discard, LATER: later}  # noqa: SLF001 - for tests
    return box


def ask_recovery(parent, entry: Recovered, error: str | None = None, index: int = 0, count: int = 1) -> str:
    """Show ``recovery_dialog`` and return RESTORE, DISCARD or LATER (closing the box means Later)."""
    box = recovery_dialog(parent, entry, error, index, count)
    box.exec()
    clicked = box.clickedButton()
    for choice, button in box._choices.items():  # noqa: SLF001
        if button is not None and clicked is button:
            return choice
    return LATER


def offer_recovery(window, open_window=None) -> list[tuple[str, str]]:
    """Offer back every recovered project (newest first); returns [(key, choice)].

    The first restored project goes into ``window``; further ones into ``open_window()`` (a new
    window), if given, else they are kept for later. Never raises.
    """
    outcomes = []
    notes: list[str] = []
    try:
        entries = find_recovered(window.recovery.folder, exclude={window.recovery.key}, notes=notes)
    except Exception:  # noqa: BLE001
        log.exception("looking for recovery files failed")
        return outcomes
    if notes:
        window.statusBar().showMessage(f"Recovery folder: {notes[0]}" + (f" (and {len(notes) - 1} more)"
                                                                          if len(notes) > 1 else ""), 15000)
    target = window
    for k, entry in enumerate(entries):
        choice = LATER
        try:
            try:
                project, error = entry.load(), None
            except ProjectError as exc:
                project, error = None, str(exc)
            choice = ask_recovery(window, entry, error, k, len(entries))
            if choice == RESTORE and project is not None:
                if target is None:
                    target = open_window() if open_window is not None else None
                if target is None or not target.restore_recovered(entry, project):
                    choice = LATER
                    entry.release()
                else:
                    target = None
            elif choice == DISCARD:
                try:
                    entry.discard()
                except OSError as exc:
                    window.statusBar().showMessage(
                        f"Could not delete the recovered copy {entry.slot.project_file}: {reason_of(exc)}", 15000)
            else:
                choice = LATER
                entry.release()
        except Exception:  # noqa: BLE001 - never stop the program from starting
            log.exception("recovery of %s failed", entry.key)
            entry.release()
        outcomes.append((entry.key, choice))
    return outcomes
