"""The open project: the current ``Project``, its file, whether it is saved, and undo/redo.

Edits replace the whole (frozen) project. "Unsaved" means the current
project differs from the one last loaded or saved, so undoing back to the
saved state makes the document clean again.

``edit(project)`` checks the project by the schema's rules first
(``engine_air.project.load.validate_project``, the rules a file is loaded by) and raises ``ProjectError``
(leaving the document as it was) for one that breaks them, so no project that could not be saved and
loaded back, or whose grid is beyond the limits, ever reaches the views or the worker.

``has_unsaved_work`` is what autosave keeps: unsaved edits, or a project
restored from a recovery file; not an untouched New project.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QObject, Signal

from engine_air.project.fingerprint import file_fingerprint
from engine_air.project.load import load_project
from engine_air.project.save import save_project

from .validation import validate

MAX_UNDO = 200


class ProjectDocument(QObject):
    changed = Signal(object)  # the new Project
    stateChanged = Signal()  # path or saved state changed

    def __init__(self, project, path: str | Path | None = None, parent=None) -> None:
        super().__init__(parent)
        self._project = project
        self._saved = project if path is not None else None
        self._path = None if path is None else Path(path)
        self._undo: list = []
        self._redo: list = []
        self._blank = project if path is None else None  # an untitled start nobody has edited yet
        self._disk = _fingerprint(self._path)  # the file as opened or last saved: Save checks it is still so

    @property
    def project(self):
        return self._project

    @property
    def path(self) -> Path | None:
        return self._path

    @property
    def disk_fingerprint(self):
        """The file's ``Fingerprint`` when it was opened or last saved (None: no file, or not known)."""
        return self._disk

    @property
    def dirty(self) -> bool:
        return self._saved is None or self._project != self._saved

    @property
    def has_unsaved_work(self) -> bool:
        """Unsaved edits worth autosaving (an untouched untitled project is not)."""
        if not self.dirty:
            return False
        return not (self._blank is not None and self._path is None and self._project == self._blank)

    @property
    def display_name(self) -> str:
        return self._path.name if self._path is not None else "untitled.toml"

    def can_undo(self) -> bool:
        return bool(self._undo)

    def can_redo(self) -> bool:
        return bool(self._redo)

    def edit(self, project, validated: bool = False) -> None:
        """Replace the project by an edited one (undoable).

        Raises ``ProjectError`` and changes nothing if the loader's rules refuse ``project``;
        ``validated=True`` skips the check for a project just checked by ``app.validation.validate``.
        """
        if project == self._project:
            return
        if not validated:
            validate(project)
        self._undo.append(self._project)
        del self._undo[:-MAX_UNDO]
        self._redo.clear()
        self._project = project
        self.changed.emit(project)
        self.stateChanged.emit()

    def undo(self) -> None:
        if self._undo:
            self._redo.append(self._project)
            self._project = self._undo.pop()
            self.changed.emit(self._project)
            self.stateChanged.emit()

    def redo(self) -> None:
        if self._redo:
            self._undo.append(self._project)
            self._project = self._redo.pop()
            self.changed.emit(self._project)
            self.stateChanged.emit()

    def reset(self, project, path: str | Path | None, saved: bool, recovered: bool = False) -> None:
        """A different project (New, Open, a restored recovery file): clears the history.

        ``recovered``: the project comes from a recovery file, so it is unsaved work even when
        untitled (``path`` is then the file it will be saved to, if it had one).
        """
        self._project = project
        self._path = None if path is None else Path(path)
        self._saved = project if saved else None
        self._blank = project if (path is None and not saved and not recovered) else None
        self._disk = None  # a restored or new project: its file (if any) was not read here
        self._undo.clear()
        self._redo.clear()
        self.changed.emit(project)
        self.stateChanged.emit()

    def open(self, path: str | Path) -> None:
        """Load ``path``; raises ``ProjectError`` and leaves the document unchanged on failure."""
        disk = _fingerprint(path)  # before reading: a change in between shows as "changed on disk", never lost
        project = load_project(path)
        self.reset(project, Path(path).resolve(), saved=True)
        self._disk = disk

    def save(self, path: str | Path | None = None, overwrite_read_only: bool = False,
             overwrite: bool = False) -> Path:
        """Save atomically to ``path`` (or the current file); raises ``ProjectSaveError``, keeping the edits.

        A read-only file is not replaced (``ProjectSaveError``) unless ``overwrite_read_only`` (the user was asked).
        Saving to the document's own file checks first that the file is still the one opened or last saved:
        ``FileChangedError`` (another window or program saved it since) unless ``overwrite``.
        """
        target = Path(path) if path is not None else self._path
        if target is None:
            raise ValueError("no file name given")
        own = self._path is not None and target.resolve() == self._path
        self._disk = save_project(self._project, target, overwrite_read_only=overwrite_read_only,
                                  expected=self._disk if own else None, overwrite=overwrite)
        self._path = target.resolve()
        self._saved = self._project
        self.stateChanged.emit()
        return self._path


def _fingerprint(path):
    """The file's fingerprint, or None (no path, no file, unreadable: nothing to compare against)."""
    if path is None:
        return None
    try:
        return file_fingerprint(path)
    except OSError:
        return None
