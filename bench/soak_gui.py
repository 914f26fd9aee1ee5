"""Soak test of the desktop program: random edits driven through the real window, offscreen.

    QT_QPA_PLATFORM=offscreen python3 bench/soak_gui.py [--edits 1000] [--seed 1] [--sample NAME]
                                                        [--no-tracemalloc] [--time-limit 240]

Each edit is one of: a value typed into an editor spin box (areas, duct loss K, lip suction, ramp count
and angles, shock-on-lip Mach, face/throat/stability/tip/spillage limits, recovery limit and its mode,
grid points, inlet type), an ISA offset typed into the cases table (valid, out of range, or not a
number), a unit toggle, a quantity or case switch on the map, an edit through the document's own API
(``ProjectDocument.edit``, valid or not), undo or redo. Values are random, valid and invalid alike;
invalid ones must be refused with the loader's message and change nothing. Events are processed after
every edit and, now and then, for up to a quarter second (so debounced edits fire and computations
finish or are superseded). Autosave runs every 250 ms into a temporary recovery folder.

At the end it waits for the final map and checks that
  * the displayed quantity array (and the image) equals a fresh ``engine_air.envelope.evaluate.evaluate_project``
    of the final project, for the quantity and case on screen;
  * the editors hold the document's project, which passes the loader's rules;
  * the autosaved recovery copy loads back equal to the project (when there is unsaved work).
It prints the memory figures at every twentieth of the run, as growth since the start of the edits
(after a 40-edit warm-up): process RSS (psutil) as it is, RSS after ``malloc_trim`` (freed heap given
back to the system, so it shows what is still in use rather than the allocator's high-water mark),
tracemalloc's current and peak traced memory, and the number of Qt objects in the window. The goal is
flat.

``drive(window, edits, seed)`` and ``final_check(window)`` are used by ``tests/test_gui_robustness.py``.
"""

from __future__ import annotations

import argparse
import gc
import math
import os
import random
import shutil
import sys
import tempfile
import time
import tracemalloc
from dataclasses import replace
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

WAIT_FINAL_S = 120.0


def _wait(ms: int) -> None:
    from PySide6.QtTest import QTest

    QTest.qWait(int(ms))


def _process() -> None:
    from PySide6.QtWidgets import QApplication

    QApplication.processEvents()


# -- the edits ---------------------------------------------------------------------------------------------

class Driver:
    """Random edits on a ``MainWindow``; counts what was applied and what was refused."""

    def __init__(self, window, seed: int = 1) -> None:
        self.w = window
        self.rng = random.Random(seed)
        self.counts: dict[str, int] = {}
        self.api_refused = 0
        self.kinds = [
            (10, self.area), (5, self.duct_and_lip), (6, self.ramps), (3, self.lip_mach),
            (8, self.limits), (7, self.grid), (7, self.isa_offset), (4, self.units),
            (8, self.quantity_or_case), (8, self.api_edit), (3, self.undo_redo), (2, self.inlet_type),
            (3, self.flush),
        ]
        self._weights = [k for k, _ in self.kinds]

    def _count(self, name: str) -> None:
        self.counts[name] = self.counts.get(name, 0) + 1

    def _spin_value(self, spin, near: float | None = None):
        """A value for a spin box in its display units: near the current one, anywhere, or an end."""
        r = self.rng.random()
        lo, hi = spin.minimum(), spin.maximum()
        if r < 0.15:
            return self.rng.choice([lo, hi, lo - 1.0, hi + 10.0])  # ends, and beyond (the box clamps)
        if r < 0.55 and near is not None:
            return near * self.rng.uniform(0.6, 1.5)
        return self.rng.uniform(lo, hi)

    def one(self) -> None:
        _, edit = self.rng.choices(self.kinds, weights=self._weights)[0]
        edit()

    # each edit below is one user action
    def area(self) -> None:
        e = self.w.editors
        spin = self.rng.choice([e.capture_area, e.throat_area, e.face_area])
        spin.setValue(self._spin_value(spin, spin.value()))
        self._count("area")

    def duct_and_lip(self) -> None:
        e = self.w.editors
        spin = self.rng.choice([e.duct_k, e.lip_suction])
        spin.setValue(self._spin_value(spin, spin.value()))
        self._count("duct/lip")

    def ramps(self) -> None:
        e = self.w.editors
        if self.rng.random() < 0.3:
            e.ramp_count.setValue(self.rng.randint(1, 3))
        else:
            spin = self.rng.choice(e.ramp_spins)
            spin.setValue(self._spin_value(spin, spin.value()))
        self._count("ramps")

    def lip_mach(self) -> None:
        spin = self.w.editors.lip_mach
        spin.setValue(self._spin_value(spin, spin.value()))
        self._count("shock-on-lip")

    def limits(self) -> None:
        e = self.w.editors
        r = self.rng.random()
        if r < 0.3:
            e.face_mach_max.setValue(self._spin_value(e.face_mach_max, e.face_mach_max.value()))
        elif r < 0.55:
            box, _spin = self.rng.choice(list(e.optional_limits.values()))
            box.setChecked(not box.isChecked())
        elif r < 0.8:
            _box, spin = self.rng.choice(list(e.optional_limits.values()))
            spin.setValue(self._spin_value(spin, spin.value()))
        elif r < 0.9:
            e.recovery_mode.setCurrentIndex(self.rng.randrange(e.recovery_mode.count()))
        else:
            e.recovery_min.setValue(self._spin_value(e.recovery_min, e.recovery_min.value()))
        self._count("limits")

    def grid(self) -> None:
        e = self.w.editors
        r = self.rng.random()
        if r < 0.08:  # absurd: 1001 x 1001 is over the per-case limit and must be refused
            e.mach_points.setValue(e.mach_points.maximum())
            e.alt_points.setValue(e.alt_points.maximum())
        elif r < 0.12:
            e.mach_points.setValue(self.rng.randint(300, 480))
            e.alt_points.setValue(self.rng.randint(300, 500))
        else:
            spin = self.rng.choice([e.mach_points, e.alt_points])
            spin.setValue(self.rng.randint(2, 160))
        self._count("grid")

    def isa_offset(self) -> None:
        t = self.w.editors.case_table
        if t.rowCount() == 0:
            return
        row = self.rng.randrange(t.rowCount())
        r = self.rng.random()
        if r < 0.6:
            text = f"{self.rng.uniform(-60, 60):.2f}"
        elif r < 0.8:
            text = f"{self.rng.choice([-1, 1]) * self.rng.uniform(100.5, 500):.1f}"  # out of range
        else:
            text = self.rng.choice(["abc", "nan", "inf", "", "1e999", "--3"])
        item = t.item(row, 2)
        if item is not None:
            item.setText(text)
        self._count("ISA offset")

    def units(self) -> None:
        if self.rng.random() < 0.5:
            self.w.set_units("US" if self.w.units.system == "SI" else "SI")
        else:
            c = self.w.units_combo
            c.setCurrentIndex(self.rng.randrange(c.count()))
        self._count("units")

    def quantity_or_case(self) -> None:
        c = self.w.quantity_combo if self.rng.random() < 0.6 else self.w.case_combo
        if c.count():
            c.setCurrentIndex(self.rng.randrange(c.count()))
        self._count("quantity/case")

    def inlet_type(self) -> None:
        c = self.w.editors.inlet_type
        c.setCurrentIndex(self.rng.randrange(c.count()))
        self._count("inlet type")

    def api_edit(self) -> None:
        from engine_air.project.errors import ProjectError
        from engine_air.project.model import Grid

        d = self.w.document
        p = d.project
        r = self.rng.random()
        bad = self.rng.random() < 0.35
        if r < 0.25:
            k = self.rng.uniform(-0.5, -0.01) if bad else self.rng.uniform(0.0, 0.2)
            new = replace(p, inlet=replace(p.inlet, duct_loss_coefficient=k))
        elif r < 0.45:
            a = self.rng.choice([math.nan, math.inf, -1.0, 0.0, 1e9]) if bad else \
                p.inlet.face_area_m2 * self.rng.uniform(0.8, 1.25)
            new = replace(p, inlet=replace(p.inlet, face_area_m2=a))
        elif r < 0.65:
            g = self.rng.choice([Grid(10 ** 6, 10 ** 6), Grid(1, 50), Grid(2.5, 30), Grid(True, 9)]) if bad \
                else Grid(self.rng.randint(5, 120), self.rng.randint(5, 120))
            new = replace(p, grid=g)
        elif r < 0.85:
            dt = self.rng.choice([150.0, -101.0, math.nan]) if bad else self.rng.uniform(-40, 40)
            case = self.rng.randrange(len(p.cases))
            cases = tuple(replace(c, isa_offset_K=dt) if i == case else c for i, c in enumerate(p.cases))
            new = replace(p, cases=cases)
        else:
            fm = self.rng.choice([0.0, 1.0, 2.0, -0.3]) if bad else self.rng.uniform(0.3, 0.9)
            new = replace(p, limits=replace(p.limits, face_mach_max=fm))
        try:
            d.edit(new)
        except ProjectError:
            self.api_refused += 1
            if d.project is not p:
                raise AssertionError("a refused edit changed the project") from None
        self._count("document API")

    def undo_redo(self) -> None:
        d = self.w.document
        (d.undo if self.rng.random() < 0.6 else d.redo)()
        self._count("undo/redo")

    def flush(self) -> None:
        self.w.editors.flush()
        self._count("flush")


def drive(window, edits: int, seed: int = 1, checkpoints: int = 10, on_checkpoint=None,
          deadline: float | None = None) -> Driver:
    """``edits`` random edits on ``window``, processing events between them.

    Stops early once ``time.perf_counter()`` passes ``deadline``; ``driver.done`` is the number made.
    """
    driver = Driver(window, seed)
    driver.done = 0
    every = max(1, edits // max(1, checkpoints))
    for n in range(edits):
        driver.one()
        driver.done = n + 1
        _process()
        if driver.rng.random() < 0.15:
            _wait(driver.rng.randint(0, 250))
        last = deadline is not None and time.perf_counter() > deadline
        if on_checkpoint is not None and ((n + 1) % every == 0 or last):
            on_checkpoint(n + 1)
        if last:
            break
    return driver


def final_check(window, timeout_s: float = WAIT_FINAL_S) -> dict:
    """Wait for the final map; assert it equals a fresh evaluation of the final project."""
    from app.validation import validate
    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.project import load_project

    w = window
    w.editors.flush()
    end = time.perf_counter() + timeout_s
    while not w.up_to_date:
        if time.perf_counter() > end:
            raise AssertionError(f"no final map within {timeout_s} s (state {w.map.state!r}, "
                                 f"last error {w._last_error!r})")
        _wait(20)
    project = w.document.project
    assert w.editors.project == project, "the editors do not hold the document's project"
    validate(project)
    assert w.result.project == project, "the map shows another project than the document's"
    case, key = w.current_case(), w.current_quantity()
    assert w.map.case == case and w.map.quantity_key == key
    fresh = evaluate_project(project)
    expected = fresh.quantity(case, key)
    np.testing.assert_array_equal(w.map.values(), expected)
    np.testing.assert_array_equal(w.map.image.image, expected)
    assert w.map.state == "current"
    recovered = None
    if w.document.has_unsaved_work:
        w.autosave_now()
        assert w.recovery.wait(10.0)
        recovered = load_project(w.recovery.project_file)
        assert recovered == project, "the autosaved copy differs from the project"
    return {"case": case, "quantity": key, "grid": (project.grid.mach_points, project.grid.altitude_points),
            "recovered": recovered is not None}


# -- the script ----------------------------------------------------------------------------------------------

def _rss_mb() -> float:
    import psutil

    return psutil.Process().memory_info().rss / 2**20


def _malloc_trim() -> bool:
    """Give freed heap pages back to the system (glibc only), so RSS shows what is still in use."""
    try:
        import ctypes

        return bool(ctypes.CDLL("libc.so.6").malloc_trim(0))
    except (OSError, AttributeError):
        return False


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--edits", type=int, default=1000)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--sample", default="supersonic_two_ramp")
    ap.add_argument("--no-tracemalloc", action="store_true")
    ap.add_argument("--time-limit", type=float, default=240.0, help="stop editing after this many seconds")
    ap.add_argument("--trim", action=argparse.BooleanOptionalAction, default=True,
                    help="at each checkpoint also give freed heap back to the system (glibc malloc_trim) and "
                         "report that RSS too (default on)")
    args = ap.parse_args(argv)

    folder = tempfile.mkdtemp(prefix="engine-air-soak-")
    os.environ["ENGINE_AIR_RECOVERY_DIR"] = str(Path(folder) / "recovery")

    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from app.main import SAMPLES
    from app.main_window import MainWindow, apply_base_font
    from engine_air.project import load_project

    app = QApplication.instance() or QApplication([])
    apply_base_font(app)
    path = SAMPLES / f"{args.sample}.toml"
    settings = QSettings(str(Path(folder) / "settings.ini"), QSettings.IniFormat)
    w = MainWindow(load_project(path), path, settings=settings, autosave_ms=250)
    w.show()
    end = time.perf_counter() + 30
    while not w.up_to_date and time.perf_counter() < end:
        _wait(20)

    # warm-up: every kind of edit once or twice, so first-use caches are not counted as growth
    drive(w, 40, seed=args.seed + 1000)
    final_check(w)
    gc.collect()
    rows = []
    tracing = not args.no_tracemalloc
    if tracing:
        tracemalloc.start()
    _malloc_trim()
    rss0 = rss0_trimmed = _rss_mb()
    t0 = time.perf_counter()
    base_traced = tracemalloc.get_traced_memory()[0] if tracing else 0

    from PySide6.QtCore import QObject

    qt0 = len(w.findChildren(QObject))

    def checkpoint(n: int) -> None:
        traced = tracemalloc.get_traced_memory() if tracing else (0, 0)
        rss = _rss_mb() - rss0
        trimmed = (_rss_mb() - rss0_trimmed) if args.trim and _malloc_trim() else math.nan
        rows.append((n, time.perf_counter() - t0, rss, trimmed, (traced[0] - base_traced) / 2**20,
                     (traced[1] - base_traced) / 2**20, len(w.findChildren(QObject)) - qt0))

    driver = drive(w, args.edits, seed=args.seed, checkpoints=20, on_checkpoint=checkpoint,
                   deadline=t0 + args.time_limit)
    check = final_check(w)
    gc.collect()
    _wait(50)
    gc.collect()
    checkpoint(driver.done)
    rss1 = _rss_mb()
    snapshot = tracemalloc.take_snapshot() if tracing else None
    if tracing:
        tracemalloc.stop()
    elapsed = time.perf_counter() - t0

    cut = f", stopped by --time-limit {args.time_limit:g} s" if driver.done < args.edits else ""
    print(f"soak: {driver.done} random edits on {args.sample} in {elapsed:.1f} s "
          f"(seed {args.seed}; tracemalloc {'on' if tracing else 'off'}{cut})")
    kinds = ", ".join(f"{k} {v}" for k, v in sorted(driver.counts.items()))
    print(f"  edits by kind: {kinds}; refused through the document API: {driver.api_refused}")
    print(f"  generations requested {w.runner.generation}, stale results dropped {w.runner.dropped_total}, "
          f"undo depth {len(w.document._undo)}")
    print(f"  final map: case {check['case']!r}, quantity {check['quantity']!r}, grid {check['grid']} — equals a "
          f"fresh evaluate_project; recovery copy checked: {check['recovered']}")
    print(f"  growth since the start of the edits ({qt0} Qt objects in the window then):")
    print("  edits   time s   RSS MiB   RSS trimmed MiB   traced now MiB   traced peak MiB   Qt objects")
    for n, t, rss, trimmed, cur, peak, qt in rows:
        print(f"  {n:5d}  {t:7.1f}  {rss:8.1f}  {trimmed:16.1f}  {cur:15.2f}  {peak:16.1f}  {qt:+10d}")
    print(f"  RSS start {rss0:.1f} MiB, end {rss1:.1f} MiB, growth {rss1 - rss0:+.1f} MiB")
    if _malloc_trim():
        rss2 = _rss_mb()
        print(f"  after malloc_trim (freed heap returned to the system): start {rss0_trimmed:.1f} MiB, "
              f"end {rss2:.1f} MiB, growth {rss2 - rss0_trimmed:+.1f} MiB")
    if snapshot is not None:
        top = snapshot.statistics("lineno")[:5]
        print("  largest live Python allocations at the end (tracemalloc):")
        for stat in top:
            print(f"    {stat.size / 1024:8.1f} KiB  {stat.count:6d} blocks  {stat.traceback[0]}")
    w.document._saved = w.document.project  # no prompt
    w.close()
    shutil.rmtree(folder, ignore_errors=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
