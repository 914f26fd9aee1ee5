"""``engine-air-gui [PROJECT]``: start the desktop program.

With no argument it opens the bundled sample ``sample_projects/supersonic_two_ramp.toml``.
A project that cannot be loaded at start-up is reported in a message box and
the sample opens instead. Unexpected errors are logged and shown in a message
box, never as a traceback. Unsaved work left in the recovery folder by a
session that did not close normally is offered back (Restore / Discard /
Later, ``app.recovery.offer_recovery``).
"""

from __future__ import annotations

import argparse
import logging
import sys
from pathlib import Path

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
DEFAULT_SAMPLE = SAMPLES / "supersonic_two_ramp.toml"

log = logging.getLogger("app")


def _parse(argv):
    parser = argparse.ArgumentParser(prog="engine-air-gui", description="Inlet operability over the flight envelope.")
    parser.add_argument("project", nargs="?", help="project file (.toml); default: the supersonic sample")
    args, _qt_args = parser.parse_known_args(argv)
    return args


def load_start_project(path: str | None):
    """(project, path, message) for start-up: the named file, or the sample if it is absent or bad."""
    from engine_air.project.errors import ProjectError
    from engine_air.project import load_project

    message = None
    if path:
        try:
            return load_project(path), Path(path).resolve(), None
        except ProjectError as exc:
            message = f"{exc}\n\nThe sample project opens instead."
    try:
        return load_project(DEFAULT_SAMPLE), DEFAULT_SAMPLE, message
    except ProjectError as exc:
        from .template import new_project

        extra = f"The sample project cannot be loaded either: {exc}"
        return new_project(), None, f"{message}\n\n{extra}" if message else extra


def main(argv=None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    args = _parse(argv)

    from PySide6.QtWidgets import QApplication, QMessageBox

    from . import APPLICATION, ORGANISATION
    from .error_hook import install_excepthook, setup_logging
    from .main_window import MainWindow, apply_base_font
    from .recovery import offer_recovery

    setup_logging()
    app = QApplication.instance() or QApplication([sys.argv[0] if sys.argv else "engine-air-gui"])
    app.setOrganizationName(ORGANISATION)
    app.setApplicationName(APPLICATION)
    apply_base_font(app)
    windows = []
    install_excepthook(lambda: windows[0] if windows else None)

    project, path, message = load_start_project(args.project)
    window = MainWindow(project, path)
    windows.append(window)
    window.show()
    if message:
        QMessageBox.warning(window, "Cannot open project", message)

    def another_window():
        from .template import new_project

        extra = MainWindow(new_project(), None)
        windows.append(extra)
        extra.show()
        return extra

    offer_recovery(window, another_window)
    return app.exec()


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
