"""Last line of defence: an unexpected error becomes a logged message box, never a traceback on screen."""

from __future__ import annotations

import logging
import os
import sys
import tempfile
import traceback
from pathlib import Path

log = logging.getLogger("app")


def log_file() -> Path:
    folder = Path(os.environ.get("ENGINE_AIR_LOG_DIR") or tempfile.gettempdir())
    return folder / "engine-air-gui.log"


def setup_logging() -> Path:
    path = log_file()
    try:
        handler: logging.Handler = logging.FileHandler(path, encoding="utf-8")
    except OSError:
        handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(logging.Formatter("%(asctime)s %(levelname)s %(name)s: %(message)s"))
    root = logging.getLogger()
    root.addHandler(handler)
    root.setLevel(logging.INFO)
    return path


def install_excepthook(parent_getter=lambda: None) -> None:
    """Replace ``sys.excepthook``: log the traceback, show a one-line message box."""

    def hook(exc_type, exc, tb):
        if issubclass(exc_type, KeyboardInterrupt):
            sys.__excepthook__(exc_type, exc, tb)
            return
        log.error("unexpected error:\n%s", "".join(traceback.format_exception(exc_type, exc, tb)))
        try:
            from PySide6.QtWidgets import QApplication, QMessageBox

            if QApplication.instance() is not None:
                text = " ".join(str(exc).split()) or exc_type.__name__
                QMessageBox.critical(parent_getter(), "Unexpected error",
                                     f"Something went wrong: {exc_type.__name__}: {text}\n\n"
                                     f"Your project is still open. Details were written to {log_file()}.")
        except Exception:  # noqa: BLE001 - never raise from the hook
            pass

    sys.excepthook = hook
