"""Documentation screenshots taken offscreen from the real window.

    QT_QPA_PLATFORM=offscreen python -m app.screenshots docs

writes ``supersonic_face_mach_margin.png`` (supersonic sample, face Mach
margin, a supersonic point selected), ``presentation_mode.png``,
``least_margin_with_sketch.png`` (a failing sample on its default least-margin
map, its worst point selected, the inlet sketch and the sections beside it) and
``mixed_compression_started.png`` (the mixed-compression sample: the unstarted
region hatched, the self-start Mach line).
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
    from .main_window import apply_base_font
    from engine_air.envelope.evaluate import WORST

    app = QApplication.instance() or QApplication([])
    apply_base_font(app)
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    settings = QSettings(str(Path(tempfile.gettempdir()) / "engine_air_screenshots.ini"), QSettings.IniFormat)
    w = _open(app, DEFAULT_SAMPLE.stem, settings)
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
    w.document._saved = w.document.project
    w.close()
    out += _sample_shots(app, folder, settings)
    return out


def _open(app, name: str, settings):
    from .main import SAMPLES
    from .main_window import MainWindow
    from engine_air.project.toml_file import load_project

    path = SAMPLES / f"{name}.toml"
    w = MainWindow(load_project(path), path, settings=settings)
    w.resize(1600, 1000)
    w.show()
    end = time.perf_counter() + 20
    while not w.up_to_date and time.perf_counter() < end:
        app.processEvents()
        time.sleep(0.01)
    _settle(app)
    return w


def _sample_shots(app, folder: Path, settings) -> list[Path]:
    import numpy as np

    from engine_air.envelope import flags as F

    out = []
    w = _open(app, "supersonic_two_ramp", settings)  # fails somewhere: least margin is its default map
    worst = next(s for s in w.result.summary if s.fails)
    w.select_condition(worst.worst_mach, worst.worst_altitude_m)
    _settle(app)
    path = folder / "least_margin_with_sketch.png"
    w.grab().save(str(path))
    out.append(path)
    w.close()
    w = _open(app, "mixed_compression_throat_schedule", settings)
    r = w.result
    flags = np.asarray(r.cases[0].points.flags).astype(np.int64)
    unstarted = np.argwhere(r.inside & ((flags & F.UNSTARTED) != 0))
    if len(unstarted):
        i, j = unstarted[len(unstarted) // 2]
        w.select_point(int(i), int(j))
    _settle(app)
    path = folder / "mixed_compression_started.png"
    w.grab().save(str(path))
    out.append(path)
    w.close()
    return out


if __name__ == "__main__":  # pragma: no cover
    for p in take(sys.argv[1] if len(sys.argv) > 1 else "docs"):
        print(p)
