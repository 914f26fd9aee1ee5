"""Documentation screenshots taken offscreen from the real window.

    QT_QPA_PLATFORM=offscreen python -m app.screenshots docs

writes ``supersonic_face_mach_margin.png`` (supersonic sample, face Mach
margin, a supersonic point selected) and ``presentation_mode.png``.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def _settle(app, seconds: float = 0.4) -> None:
    end = time.perf_counter() + seconds
    while time.perf_counter() < end:
        app.processEvents()
        time.sleep(0.01)


def take(folder: str | Path) -> list[Path]:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from .main import DEFAULT_SAMPLE
    from .main_window import MainWindow, apply_base_font
    from engine_air.envelope.evaluate import WORST
    from engine_air.project import load_project

    app = QApplication.instance() or QApplication([])
    apply_base_font(app)
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    settings = QSettings(str(Path(tempfile.gettempdir()) / "engine_air_screenshots.ini"), QSettings.IniFormat)
    w = MainWindow(load_project(DEFAULT_SAMPLE), DEFAULT_SAMPLE, settings=settings)
    w.resize(1600, 1000)
    w.show()
    end = time.perf_counter() + 20
    while not w.up_to_date and time.perf_counter() < end:
        app.processEvents()
        time.sleep(0.01)
    _settle(app)
    w.set_quantity("face_mach_margin")
    w.set_case(w.result.cases[0].name)
    w.select_condition(1.8, 12000.0)
    _settle(app)
    out = []
    first = folder / "supersonic_face_mach_margin.png"
    w.grab().save(str(first))
    out.append(first)
    w.set_case(WORST)
    w.set_presentation(True)
    _settle(app)
    second = folder / "presentation_mode.png"
    w.grab().save(str(second))
    out.append(second)
    w.set_presentation(False)
    w.close()
    return out


if __name__ == "__main__":  # pragma: no cover
    for p in take(sys.argv[1] if len(sys.argv) > 1 else "docs"):
        print(p)
