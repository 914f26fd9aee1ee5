"""What the desktop-program tests share: a factory of shown main windows and a wait for their map."""

from __future__ import annotations

from contextlib import contextmanager

from PySide6.QtCore import QSettings

from app.main_window import MainWindow
from engine_air.project import load_project

WAIT_MS = 15000


def wait_result(qtbot, w):
    """Wait until the window shows an up-to-date map."""
    qtbot.waitUntil(lambda: w.up_to_date, timeout=WAIT_MS)


@contextmanager
def window_factory(qtbot, tmp_path, default_path):
    """Yield ``make(path=default_path, project=None, wait=True, runner=None, **window_options)``.

    Each window is shown, its settings kept in ``tmp_path``; at the end every window is closed
    without a prompt and its worker shut down.
    """
    made = []

    def make(path=default_path, project=None, wait=True, runner=None, **options):
        settings = QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)
        project = project if project is not None else load_project(path)
        w = MainWindow(project, path, settings=settings, runner=runner, **options)
        w.show()
        made.append(w)
        if wait:
            wait_result(qtbot, w)
        return w

    try:
        yield make
    finally:
        for w in made:
            if not w.recovery.closed:
                w.document._saved = w.document.project  # never prompt at teardown
                w.close()
            w.runner.shutdown()
            w.deleteLater()
