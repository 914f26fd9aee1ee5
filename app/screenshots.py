"""Documentation screenshots taken offscreen from the real window.

    QT_QPA_PLATFORM=offscreen python -m app.screenshots docs

Each picture at a 1280 x 720 projector's size and at 1920 x 1080 (``<name>_<w>x<h>.png``):

- ``supersonic_face_mach_margin``: supersonic sample, face Mach margin, a supersonic point selected;
- ``presentation_mode``: the same in presentation mode (F5), worst of all cases;
- ``least_margin_with_sketch``: a failing sample on its default least-margin map, its worst point selected,
  the inlet's tab in front;
- ``sections``: the same point with the sections' tab in front;
- ``mixed_compression_started``: the mixed-compression sample, the unstarted region hatched, the self-start
  Mach line.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

SIZES = ((1280, 720), (1920, 1080))


def _settle(app, seconds: float = 0.5) -> None:
    end = time.perf_counter() + seconds
    while time.perf_counter() < end:
        app.processEvents()
        time.sleep(0.01)


def _shoot(app, w, folder: Path, name: str) -> list[Path]:
    out = []
    for width, height in SIZES:
        w.resize(width, height)
        _settle(app)
        path = folder / f"{name}_{width}x{height}.png"
        w.grab().save(str(path))
        out.append(path)
    return out


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
    out = _shoot(app, w, folder, "supersonic_face_mach_margin")
    w.set_case(WORST)
    w.set_presentation(True)
    out += _shoot(app, w, folder, "presentation_mode")
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

    w = _open(app, "supersonic_two_ramp", settings)  # fails somewhere: least margin is its default map
    worst = next(s for s in w.result.summary if s.fails)
    w.select_condition(worst.worst_mach, worst.worst_altitude_m)
    w.show_view("sketch")
    out = _shoot(app, w, folder, "least_margin_with_sketch")
    w.show_view("sections")
    out += _shoot(app, w, folder, "sections")
    w.close()
    w = _open(app, "mixed_compression_throat_schedule", settings)
    r = w.result
    flags = np.asarray(r.cases[0].points.flags).astype(np.int64)
    unstarted = np.argwhere(r.inside & ((flags & F.UNSTARTED) != 0))
    if len(unstarted):
        i, j = unstarted[len(unstarted) // 2]
        w.select_point(int(i), int(j))
    out += _shoot(app, w, folder, "mixed_compression_started")
    w.close()
    return out


if __name__ == "__main__":  # pragma: no cover
    for p in take(sys.argv[1] if len(sys.argv) > 1 else "docs"):
        print(p)
