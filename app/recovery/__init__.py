"""Autosave of unsaved edits and recovery after a session that ended without a clean close.

The recovery folder is ``$ENGINE_AIR_RECOVERY_DIR`` if set, else ``QStandardPaths.AppDataLocation /
"recovery"``. Every window owns one *slot* there, named by a key unique to the session::

    <key>.toml   the project, written with ``engine_air.project.atomic.write_bytes_atomic`` (temporary file,
                 fsync, rename: a crash never leaves half a file)
    <key>.json   a small sidecar: the project's own file (or null if never saved), the time, the title
    <key>.lock   a ``QLockFile`` held while the window runs

The window writes its slot at intervals while it holds unsaved work, and removes the files on a clean
save, on Discard and on a clean close. Files that stay behind belong to a session that crashed or was
killed; their lock is no longer held by a running process, so at the next start ``find_recovered``
offers them back (``offer_recovery``: Restore / Discard / Later). The slot of another window that is
still running is never offered: its lock is held.

The folder is read defensively (anyone may have put anything there): only regular files are read (``lstat``,
``O_NOFOLLOW``, ``O_NONBLOCK``: a link, pipe or device in a slot's place is skipped with a note, never a hang),
each read bounded by its size limit whatever the size on disk says, and a slot is written by temporary file
and rename without following a link, so a link planted there is replaced, never written through.

All writing and removing runs in order on one background thread (``RecoveryStore``), so a slow or
failing disk never holds up the window. The outcome comes back as ``RecoveryStore.reported(action,
ok, message)`` on the GUI thread; a failure becomes a note in the status bar, never a dialog.

Modules: ``slot`` (the folder, a session's files and lock), ``found`` (what crashed sessions left),
``store`` (the window's own slot on the worker), ``offer`` (asking the user at start-up).
"""

from .found import Recovered, find_recovered
from .offer import DISCARD, LATER, RESTORE, ask_recovery, offer_recovery, recovery_dialog
from .slot import AUTOSAVE_MS, ENV_DIR, MAX_SIDECAR_BYTES, SIDECAR_FORMAT, Slot, reason_of, recovery_dir
from .store import RecoveryStore

__all__ = ["AUTOSAVE_MS", "DISCARD", "ENV_DIR", "LATER", "MAX_SIDECAR_BYTES", "RESTORE", "SIDECAR_FORMAT", "Recovered",
           "RecoveryStore", "Slot", "ask_recovery", "find_recovered", "offer_recovery", "reason_of", "recovery_dialog",
           "recovery_dir"]
