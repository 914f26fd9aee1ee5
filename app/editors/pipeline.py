"""The edit pipeline of the project editors: every widget edit becomes a function Project -> Project.

Spin-box edits are collected for a short debounce (``DEBOUNCE_MS``) so that typing "0.45" makes one edit,
not four (``queue``); buttons, tables and combo boxes apply at once (``apply_now``). The pending functions
are applied to the current project, and the candidate is checked by the schema's rules
(``app.validation.validate`` → ``engine_air.project.load.validate_project``). A candidate that breaks a rule
is refused: the message is shown in the red bar above the tabs and the project is not changed. An accepted
candidate is emitted as ``projectEdited(Project)``; the main window records it (undo) and asks for a
recompute.
"""

from __future__ import annotations

import logging
from dataclasses import replace

from engine_air.project.errors import ProjectError

from ..validation import validate
from .fields import field_spin
from .widgets import CellError

DEBOUNCE_MS = 150

log = logging.getLogger(__name__)


class EditPipeline:
    """Mixin of ``ProjectEditors``: the current project, pending edits, validation and the error bar.

    The class using it provides ``_project``, ``_units``, ``_pending``, ``_timer``, ``_loading``, ``error``,
    ``projectEdited``, ``_load()`` and ``_accepted(old, new)`` (called after an accepted edit).
    """

    @property
    def project(self):
        return self._project

    def last_error(self) -> str:
        return self.error.text() if self.error.isVisible() or self.error.text() else ""

    def queue(self, change) -> None:
        """Debounced edit: ``change(project) -> project``."""
        if self._loading or self._project is None:
            return
        self._pending.append(change)
        self._timer.trigger()

    def apply_now(self, change) -> bool:
        """Immediate edit (buttons, tables, combos); pending spin-box edits go first."""
        if self._loading or self._project is None:
            return False
        self._pending.append(change)
        return self.flush()

    def flush(self) -> bool:
        """Apply pending edits as one candidate; True if it was accepted."""
        self._timer.cancel()
        changes, self._pending = self._pending, []
        if not changes or self._project is None:
            return False
        candidate = self._project
        try:
            for change in changes:
                candidate = change(candidate)
            checked = validate(candidate)
        except (ProjectError, CellError, ValueError) as exc:
            self.show_error(str(exc))
            return False
        except Exception as exc:  # noqa: BLE001 - an edit the rules did not foresee is refused, never fatal
            log.exception("edit not applied")
            self.show_error(f"{type(exc).__name__}: {' '.join(str(exc).split())}")
            return False
        self.error.hide()
        self.error.setText("")
        checked = replace(checked, warnings=())
        old, self._project = self._project, checked
        self._accepted(old, checked)
        self.projectEdited.emit(checked)
        return True

    def show_error(self, text: str) -> None:
        self.error.setText(f"Edit not applied — {text}")
        self.error.show()

    def set_project(self, project) -> None:
        """Show ``project`` (after load, undo, new); ignored for the project these editors just emitted."""
        if project is self._project:
            return
        self._timer.cancel()
        self._pending = []
        self._project = project
        self.error.hide()
        self.error.setText("")
        self._load()

    def set_units(self, units) -> None:
        self.flush()
        self._units = units
        if self._project is not None:
            self._load()

    def _field_spin(self, f, change_of_value, dimension=None, suffix=None):
        """A spin box for the schema field ``f`` (``fields.field_spin``); a typed value becomes a debounced edit
        ``change_of_value(project, si_value)`` when that is given."""
        s = field_spin(f, dimension, suffix)
        if change_of_value is not None:
            s.valueChanged.connect(lambda _v, s=s: self.queue(lambda p, v=s.si(): change_of_value(p, v)))
        return s
