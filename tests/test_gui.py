"""Desktop program (app/): the map shows exactly what the analysis computes, and the window behaves.

Runs offscreen (pytest-qt). Each test builds its own window with settings in
a temporary folder, waits for the worker, and checks the views against
``engine_air`` results computed directly.
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import csv  # noqa: E402
import time  # noqa: E402
from dataclasses import replace  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402

pytest.importorskip("PySide6")
pytest.importorskip("pyqtgraph")
pytest.importorskip("pytestqt")

from PySide6.QtCore import QSettings  # noqa: E402
from PySide6.QtWidgets import QMessageBox  # noqa: E402

from app import exports  # noqa: E402
from app.main import DEFAULT_SAMPLE, SAMPLES, load_start_project  # noqa: E402
from app.main_window import MainWindow  # noqa: E402
from app.worker import MapRunner  # noqa: E402
from engine_air.outputs import point_record as report  # noqa: E402
from engine_air.envelope.evaluate import WORST, evaluate_project  # noqa: E402
from engine_air.project import load_project  # noqa: E402
from engine_air.outputs.quantities import QUANTITIES  # noqa: E402
from gui_support import WAIT_MS, wait_laid_out, wait_result, window_factory  # noqa: E402,F401

SAMPLE_NAMES = ["subsonic_transport_nacelle", "supersonic_two_ramp", "undersized_business_jet"]


def sample(name: str) -> Path:
    return SAMPLES / f"{name}.toml"


@pytest.fixture
def make_window(qtbot, tmp_path):
    """Factory: a shown MainWindow on a project file, settings kept in tmp_path."""
    with window_factory(qtbot, tmp_path, DEFAULT_SAMPLE) as make:
        yield make


def inside_index(result):
    """A grid point well inside the envelope: the inside point nearest the grid's centre."""
    ii, jj = np.nonzero(result.inside)
    ci, cj = result.inside.shape[0] / 2, result.inside.shape[1] / 2
    k = int(np.argmin((ii - ci) ** 2 + (jj - cj) ** 2))
    return int(ii[k]), int(jj[k])


@pytest.mark.parametrize("name", SAMPLE_NAMES)
def test_sample_map_equals_analysis(make_window, name):
    w = make_window(sample(name))
    expected = evaluate_project(load_project(sample(name)))
    for case in [WORST, expected.cases[0].name]:
        w.set_case(case)
        for key in ("face_mach_margin", "recovery", "mass_flow_ratio"):
            w.set_quantity(key)
            assert w.map.case == case and w.map.quantity_key == key
            np.testing.assert_allclose(w.map.values(), expected.quantity(case, key), equal_nan=True)
            np.testing.assert_allclose(w.map.image.image, expected.quantity(case, key), equal_nan=True)
    np.testing.assert_allclose(w.map.axes()[0], expected.mach)
    np.testing.assert_allclose(w.map.axes()[1], expected.altitude_m)
    # the verdict banner agrees with the analysis
    failing = sum(1 for s in expected.summary if not s.holds)
    assert w.verdict_state == ("holds" if failing == 0 else "fails")
    assert (f"{failing} OF" in w.verdict.text()) if failing else ("ALL" in w.verdict.text())
    # the findings list shows the summary
    assert w.findings.topLevelItemCount() == len(expected.summary)
    for row, s in enumerate(expected.summary):
        assert w.findings.topLevelItem(row).text(2) == ("holds" if s.holds else "FAILS")


def test_every_quantity_can_be_shown(make_window):
    w = make_window(sample("supersonic_two_ramp"))
    for key in QUANTITIES:
        w.set_quantity(key)
        np.testing.assert_allclose(w.map.values(), w.result.quantity(w.current_case(), key), equal_nan=True)


def test_selected_point_detail_equals_report(make_window):
    w = make_window(sample("supersonic_two_ramp"))
    case = w.result.cases[1].name
    w.set_case(case)
    i, j = inside_index(w.result)
    w.select_point(i, j)
    points = w.result.case_map(case).points
    assert w.detail.index == (i, j) and w.detail.case == case
    assert w.detail.record() == report.point_record(points, (i, j), case)
    expected_rows = report.station_table(w.result.project, points, (i, j))
    assert w.detail.station_rows(si=True) == expected_rows
    for row in expected_rows:
        st = row["station"]
        assert w.detail.station_cell(st, "mach") == pytest.approx(row["mach"])
        assert w.detail.station_cell(st, "p_pa") == pytest.approx(row["p_pa"] / 1000.0)  # kPa
        assert w.detail.station_cell(st, "t_k") == pytest.approx(row["t_k"])
        assert w.detail.station_cell(st, "pt_pa") == pytest.approx(row["pt_pa"] / 1000.0)
        assert w.detail.station_cell(st, "area_m2") == pytest.approx(row["area_m2"])
    rec = report.point_record(points, (i, j), case)
    for r, c in enumerate(rec["checks"]):
        assert w.detail.checks.item(r, 1).data(0x0100) == c["value"]  # Qt.UserRole
        assert w.detail.checks.item(r, 3).text() == ("not judged here" if c["holds"] is None
                                                     else ("holds" if c["holds"] else "FAILS"))
    assert w.detail.shock_rows() == report.shock_table(w.result.project, points, (i, j))
    # US units: same point, converted numbers
    w.set_units("US")
    assert w.detail.station_cell("0", "p_pa") == pytest.approx(expected_rows[0]["p_pa"] / 6894.757293168361)
    assert w.detail.station_cell("2", "area_m2") == pytest.approx(expected_rows[3]["area_m2"] / 0.09290304)
    np.testing.assert_allclose(w.map.axes()[1], w.result.altitude_m / 0.3048)
    assert "ft" in w.map.plot.getAxis("left").labelText


def test_worst_case_detail_uses_the_worst_case_there(make_window):
    w = make_window(sample("supersonic_two_ramp"))
    w.set_case(WORST)
    s = next(s for s in w.result.summary if not s.holds)
    i, j = w.select_condition(s.worst_mach, s.worst_altitude_m)
    assert w.detail.case == s.worst_case


def test_click_on_map_selects_nearest_point(make_window, qtbot):
    from PySide6.QtCore import QPointF, Qt

    w = make_window(sample("subsonic_transport_nacelle"))
    i, j = inside_index(w.result)
    x, y = w.result.mach[j], w.result.altitude_m[i]
    scene_pos = w.map.view.mapViewToScene(QPointF(x, y))
    view_pos = w.map.canvas.mapFromScene(scene_pos)
    with qtbot.waitSignal(w.map.pointSelected, timeout=2000) as blocker:
        qtbot.mouseClick(w.map.canvas.viewport(), Qt.LeftButton, pos=view_pos)
    assert tuple(blocker.args) == (i, j)
    assert w.detail.index == (i, j)
    w.map._on_mouse_moved(scene_pos)
    assert "M0" in w.map.readout.text() and "limiting" in w.map.readout.text()


def test_edit_face_area_changes_the_map(make_window, qtbot):
    w = make_window(sample("undersized_business_jet"))
    before = w.map.values()
    gen = w.result_generation
    old = w.document.project.inlet.face_area_m2
    w.editors.tabs.setCurrentIndex(1)
    w.editors.face_area.setValue(old * 1.3)  # typed edit: debounced
    assert w.document.project.inlet.face_area_m2 == old  # not yet: debounce
    qtbot.waitUntil(lambda: w.document.project.inlet.face_area_m2 != old, timeout=3000)
    wait_result(qtbot, w)
    assert w.result_generation > gen
    assert w.document.dirty and w.windowTitle().startswith("undersized_business_jet.toml*")
    after = w.map.values()
    assert not np.allclose(np.nan_to_num(before), np.nan_to_num(after))
    expected = evaluate_project(w.document.project)
    np.testing.assert_allclose(after, expected.quantity(w.current_case(), w.current_quantity()), equal_nan=True)
    # undo returns to the saved project: clean again
    w.document.undo()
    wait_result(qtbot, w)
    assert not w.document.dirty and "*" not in w.windowTitle()


def test_newer_edit_supersedes_older_run(make_window, qtbot):
    w = make_window(sample("supersonic_two_ramp"))
    p = w.document.project
    first = replace(p, inlet=replace(p.inlet, face_area_m2=0.40))
    second = replace(p, inlet=replace(p.inlet, face_area_m2=0.65))
    w.document.edit(first)
    g1 = w.runner.generation
    w.document.edit(second)
    g2 = w.runner.generation
    assert g2 == g1 + 1
    wait_result(qtbot, w)
    qtbot.waitUntil(lambda: g1 in w.runner.dropped, timeout=WAIT_MS)
    assert w.result_generation == g2
    assert w.result.project.inlet.face_area_m2 == 0.65
    expected = evaluate_project(second)
    np.testing.assert_allclose(w.map.values(), expected.quantity(w.current_case(), w.current_quantity()),
                               equal_nan=True)


def test_slow_stale_run_is_dropped(make_window, qtbot):
    """An old run that finishes after a newer request never reaches the map."""
    calls = []

    def slow_evaluate(project, progress=None, cancelled=None):
        calls.append(project.inlet.face_area_m2)
        if project.inlet.face_area_m2 == 0.41:
            time.sleep(0.4)  # ignores its cancel flag on purpose: finishes late
            return evaluate_project(project)
        return evaluate_project(project, progress=progress, cancelled=cancelled)

    runner = MapRunner(evaluate=slow_evaluate)
    w = make_window(sample("supersonic_two_ramp"), runner=runner)
    p = w.document.project
    w.document.edit(replace(p, inlet=replace(p.inlet, face_area_m2=0.41)))
    g_old = runner.generation
    qtbot.waitUntil(lambda: 0.41 in calls, timeout=3000)
    w.document.edit(replace(p, inlet=replace(p.inlet, face_area_m2=0.62)))
    g_new = runner.generation
    qtbot.waitUntil(lambda: g_old in runner.dropped, timeout=WAIT_MS)
    wait_result(qtbot, w)
    assert w.result_generation == g_new
    assert w.result.project.inlet.face_area_m2 == 0.62


def test_failed_run_keeps_last_map_marked_out_of_date(make_window, qtbot):
    fail = {"on": False}

    def flaky(project, progress=None, cancelled=None):
        if fail["on"]:
            raise RuntimeError("solver exploded")
        return evaluate_project(project, progress=progress, cancelled=cancelled)

    w = make_window(sample("supersonic_two_ramp"), runner=MapRunner(evaluate=flaky))
    good = w.map.values()
    fail["on"] = True
    p = w.document.project
    w.document.edit(replace(p, inlet=replace(p.inlet, face_area_m2=0.45)))
    qtbot.waitUntil(lambda: w.map.state == "stale", timeout=WAIT_MS)
    assert "OUT OF DATE" in w.map.state_label.text() and "solver exploded" in w.map.state_label.text()
    assert w.verdict_state == "stale"
    np.testing.assert_allclose(w.map.values(), good, equal_nan=True)
    fail["on"] = False  # the runner still works
    w.document.edit(replace(p, inlet=replace(p.inlet, face_area_m2=0.46)))
    wait_result(qtbot, w)
    assert w.map.state == "current" and w.result.project.inlet.face_area_m2 == 0.46


def test_invalid_edit_is_rejected_with_the_loader_message(make_window):
    w = make_window(sample("subsonic_transport_nacelle"))
    before = w.document.project
    cap = before.inlet.capture_area_m2
    w.editors.throat_area.setValue(cap * 1.5)
    assert w.editors.flush() is False
    assert "throat_area_m2" in w.editors.error.text()
    assert w.document.project == before


def test_rating_table_edit(make_window, qtbot):
    w = make_window(sample("subsonic_transport_nacelle"))
    t = w.editors.rating_table
    old = w.document.project.ratings[0].corrected_flow_kg_s
    t.item(0, 1).setText(str(old[0] * 0.9))
    qtbot.waitUntil(lambda: w.document.project.ratings[0].corrected_flow_kg_s[0] != old[0], timeout=3000)
    assert w.document.project.ratings[0].corrected_flow_kg_s[1:] == old[1:]  # untouched cells exact
    t.item(1, 0).setText("0.1")  # theta below the allowed range
    assert "theta" in w.editors.error.text()


def test_save_and_open_round_trip(make_window, qtbot, tmp_path):
    w = make_window(sample("supersonic_two_ramp"))
    p = w.document.project
    w.document.edit(replace(p, inlet=replace(p.inlet, face_area_m2=0.52), title="Round trip"))
    assert w.document.dirty
    target = tmp_path / "variant.toml"
    assert w.save_to(target)
    assert not w.document.dirty and w.windowTitle().startswith("variant.toml —")
    assert load_project(target) == w.document.project
    assert str(target.resolve()) in w.recent_files()
    w2 = make_window(target)
    assert w2.document.project == w.document.project


def test_failed_save_keeps_edits(make_window, monkeypatch, tmp_path):
    w = make_window(sample("supersonic_two_ramp"))
    p = w.document.project
    w.document.edit(replace(p, title="keep me"))
    shown = []
    monkeypatch.setattr(QMessageBox, "critical", staticmethod(lambda *a, **k: shown.append(a[2])))
    assert not w.save_to(tmp_path / "no such folder" / "x.toml")
    assert shown and "could not save" in shown[0].lower()
    assert w.document.dirty and w.document.project.title == "keep me"


def test_unsaved_changes_prompt_cancel_keeps_window(make_window, monkeypatch):
    w = make_window(sample("supersonic_two_ramp"))
    p = w.document.project
    w.document.edit(replace(p, title="changed"))
    asked = []

    def answer(*args, **kwargs):
        asked.append(args[1])
        return QMessageBox.Cancel

    monkeypatch.setattr(QMessageBox, "warning", staticmethod(answer))
    assert w.close() is False
    assert w.isVisible() and asked
    w.new_file()
    assert w.document.project.title == "changed"  # New was cancelled too
    monkeypatch.setattr(QMessageBox, "warning", staticmethod(lambda *a, **k: QMessageBox.Discard))
    assert w.close() is True


def test_malformed_file_shows_message_and_keeps_project(make_window, monkeypatch, tmp_path):
    w = make_window(sample("supersonic_two_ramp"))
    before = w.document.project
    bad = tmp_path / "broken.toml"
    bad.write_text(sample("supersonic_two_ramp").read_text().replace("throat_area_m2 = 0.40",
                                                                      "throat_area_m2 = -1.0"))
    shown = []
    monkeypatch.setattr(QMessageBox, "critical", staticmethod(lambda *a, **k: shown.append(a[2])))
    assert w.open_file(bad) is False
    assert shown and "throat_area_m2" in shown[0] and "broken.toml" in shown[0]
    assert w.document.project is before and w.document.path == DEFAULT_SAMPLE.resolve()
    bad.write_text("this is [not toml")
    assert w.open_file(bad) is False and len(shown) == 2


def test_start_up_with_bad_file_opens_sample(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text("[project]\nformat = 99\n")
    project, path, message = load_start_project(str(bad))
    assert path == DEFAULT_SAMPLE and message and "format" in message
    assert project == load_project(DEFAULT_SAMPLE)


def test_findings_click_selects_worst_point(make_window):
    w = make_window(sample("supersonic_two_ramp"))
    other = w.result.cases[0].name
    w.set_case(other)
    rows = [k for k, s in enumerate(w.result.summary) if not s.holds]
    assert rows
    s = w.result.summary[rows[0]]
    w.findings.activate_row(rows[0])
    assert w.current_case() == s.worst_case
    i, j = w.map.selected()
    assert w.result.mach[j] == pytest.approx(s.worst_mach)
    assert w.result.altitude_m[i] == pytest.approx(s.worst_altitude_m)


def test_exports(make_window, tmp_path):
    w = make_window(sample("supersonic_two_ramp"))
    png, svg, csv_path, txt = (tmp_path / n for n in ("m.png", "m.svg", "g.csv", "f.txt"))
    assert w.export("png", png)
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert w.export("svg", svg)
    assert "<svg" in svg.read_text(errors="replace")[:2000]
    assert w.export("csv", csv_path)
    with open(csv_path, newline="") as f:
        rows = list(csv.reader(f))
    assert rows[0] == exports.CSV_HEADER
    r = w.result
    assert len(rows) - 1 == len(r.cases) * r.mach.size * r.altitude_m.size
    first = dict(zip(rows[0], rows[1]))
    assert first["case"] == r.cases[0].name and float(first["mach"]) == pytest.approx(r.mach[0])
    assert all(len(x) == len(rows[0]) for x in rows)
    assert w.export("txt", txt)
    text = txt.read_text()
    assert "Verdict" in text and "Preliminary-design" in text


@pytest.mark.parametrize("name", ["undersized_business_jet", "supersonic_two_ramp"])
def test_presentation_mode_is_readable_without_clipping_at_common_screen_sizes(make_window, qtbot, tmp_path, name):
    """Issue 9: at 1366 x 768, 1600 x 1000 and 1920 x 1080 in presentation mode no label is elided or cut, no
    table column lies outside its view, nothing needs sideways scrolling, and the map's title, colour bar
    and legend lie inside the map. Each size is grabbed to <tmp_path>/<sample>_<w>x<h>.png (to look at)."""
    from PySide6.QtWidgets import QApplication

    from app.main_window import apply_base_font
    from gui_support import layout_problems, map_problems

    app = QApplication.instance()
    font = app.font()
    apply_base_font(app)
    try:
        w = make_window(sample(name))
        w.set_presentation(True)
        assert w.detail.record() is not None  # a point is shown: its tables are filled
        for width, height in ((1366, 768), (1600, 1000), (1920, 1080)):
            w.resize(width, height)
            qtbot.waitUntil(lambda: w.width() == width and w.height() == height, timeout=5000)
            wait_laid_out(qtbot, w)  # the deferred fits (panel widths, wrapped rows, dock width) run
            image = w.grab()
            assert image.save(str(tmp_path / f"{name}_{width}x{height}.png"))
            problems = layout_problems(w) + map_problems(w)
            assert problems == [], f"{width} x {height}: " + "; ".join(problems)
            assert w.verdict.height() >= w.verdict.heightForWidth(w.verdict.width())  # the banner's lines
    finally:
        app.setFont(font)


def test_layout_check_sees_an_elided_label_and_a_cut_column(qtbot):
    """The check above is not blind: a label too narrow for its text and a column past the view's edge."""
    from PySide6.QtWidgets import QLabel, QTableWidget, QVBoxLayout, QWidget

    from gui_support import layout_problems

    box = QWidget()
    lay = QVBoxLayout(box)
    label = QLabel("a rule text far too long for the room it was given")
    label.setFixedWidth(60)
    table = QTableWidget(1, 3)
    table.setFixedWidth(150)
    for c in range(3):
        table.setColumnWidth(c, 90)
    lay.addWidget(label)
    lay.addWidget(table)
    qtbot.addWidget(box)
    box.show()
    qtbot.waitExposed(box)
    problems = layout_problems(box)
    assert any(p.startswith("label") for p in problems)
    assert any("outside the viewport" in p for p in problems)


def test_presentation_mode_and_about(make_window, monkeypatch):
    w = make_window(sample("supersonic_two_ramp"))
    w.set_presentation(True)
    assert w.presentation and not w.editor_dock.isVisible()
    assert "28pt" in w.styleSheet()
    np.testing.assert_allclose(w.map.values(), w.result.quantity(w.current_case(), w.current_quantity()),
                               equal_nan=True)
    w.set_presentation(False)
    assert not w.presentation
    texts = []
    monkeypatch.setattr(QMessageBox, "about", staticmethod(lambda *a: texts.append(a[2])))
    w.show_about()
    assert "NACA Report 1135" in texts[0] and "MIL-E-5008B" in texts[0] and "airworthiness" in texts[0]


def test_main_opens_sample_when_start_file_is_bad(qtbot, monkeypatch, tmp_path):
    import sys

    from PySide6.QtWidgets import QApplication

    from app import main as app_main
    from app.main_window import MainWindow as Window

    bad = tmp_path / "bad.toml"
    bad.write_text("not = [valid")
    shown, windows = [], []
    monkeypatch.setenv("ENGINE_AIR_LOG_DIR", str(tmp_path))
    monkeypatch.setattr(QMessageBox, "warning", staticmethod(lambda *a, **k: shown.append(a[2])))
    monkeypatch.setattr(QApplication, "exec", lambda self: 0)
    original_init = Window.__init__

    def init(self, *a, **k):
        k["settings"] = QSettings(str(tmp_path / "s.ini"), QSettings.IniFormat)
        original_init(self, *a, **k)
        windows.append(self)

    monkeypatch.setattr(Window, "__init__", init)
    hook = sys.excepthook
    try:
        assert app_main.main([str(bad)]) == 0
        assert shown and "bad.toml" in shown[0] and "sample" in shown[0]
        w = windows[0]
        assert w.document.path == DEFAULT_SAMPLE.resolve() or w.document.path == DEFAULT_SAMPLE
        # the installed hook turns an unexpected error into a message box, not a traceback
        crit = []
        monkeypatch.setattr(QMessageBox, "critical", staticmethod(lambda *a, **k: crit.append(a[2])))
        try:
            raise RuntimeError("boom")
        except RuntimeError:
            sys.excepthook(*sys.exc_info())
        assert crit and "boom" in crit[0]
        wait_result(qtbot, w)
        w.close()
        w.runner.shutdown()
    finally:
        sys.excepthook = hook


def test_grid_edit_keeps_the_selected_condition(make_window, qtbot):
    w = make_window(sample("supersonic_two_ramp"))
    w.set_case(w.result.cases[0].name)
    i, j = inside_index(w.result)
    w.select_point(i, j)
    cond = (w.result.mach[j], w.result.altitude_m[i])
    p = w.document.project
    w.document.edit(replace(p, grid=replace(p.grid, mach_points=61, altitude_points=51)))
    wait_result(qtbot, w)
    i2, j2 = w.map.selected()
    assert w.result.mach.size == 61
    assert abs(w.result.mach[j2] - cond[0]) <= (w.result.mach[1] - w.result.mach[0]) / 2 + 1e-12
    assert abs(w.result.altitude_m[i2] - cond[1]) <= (w.result.altitude_m[1] - w.result.altitude_m[0]) / 2 + 1e-9
    assert w.detail.index == (i2, j2)


# -- the one worker pattern and the one debounce (app/worker.py) -------------------------------------------

def test_worker_drops_stale_results_and_reports_progress_of_the_newest(qtbot):
    """A newer request cancels the older one; whatever the older still delivers is dropped."""
    import threading

    from app.worker import Worker

    worker = Worker(threads=2, supersede=True)
    release = threading.Event()
    seen, progress, failed = [], [], []
    worker.finished.connect(lambda gen, result: seen.append((gen, result)))
    worker.progress.connect(progress.append)
    worker.failed.connect(lambda gen, message: failed.append(message))

    def stubborn(report, cancelled):  # ignores its cancel flag: finishes late on purpose
        release.wait(5)
        return "old"

    def quick(report, cancelled):
        report(0.5)
        return "new"

    old = worker.submit(stubborn)
    new = worker.submit(quick)
    qtbot.waitUntil(lambda: bool(seen), timeout=WAIT_MS)
    release.set()
    qtbot.waitUntil(lambda: old in worker.dropped, timeout=WAIT_MS)
    assert seen == [(new, "new")] and progress == [0.5] and failed == []
    assert worker.shown_generation == new and not worker.busy
    # an error is one line, and the worker keeps working after it
    worker.submit(lambda report, cancelled: (_ for _ in ()).throw(ValueError("bad\nvalue")))
    qtbot.waitUntil(lambda: bool(failed), timeout=WAIT_MS)
    assert failed == ["ValueError: bad value"]
    last = worker.submit(lambda report, cancelled: 42)
    qtbot.waitUntil(lambda: seen[-1] == (last, 42), timeout=WAIT_MS)
    worker.shutdown()


def test_ordered_worker_runs_every_request_in_turn(qtbot):
    """Autosave's mode: nothing is superseded or dropped; requests run one after another as asked."""
    import time as _time

    from app.worker import Worker

    worker = Worker(threads=1, supersede=False)
    order, done = [], []
    worker.finished.connect(lambda gen, result: done.append(result))

    def job(k):
        def run(report, cancelled):
            _time.sleep(0.01 * (5 - k))  # earlier jobs take longer: order must still hold
            order.append(k)
            return k
        return run

    for k in range(5):
        worker.submit(job(k))
    assert worker.wait(10000)
    qtbot.waitUntil(lambda: len(done) == 5, timeout=WAIT_MS)
    assert order == list(range(5)) and done == list(range(5)) and list(worker.dropped) == []


def test_debouncer_makes_one_call_per_burst(qtbot):
    from app.worker import Debouncer

    calls = []
    d = Debouncer(40, lambda: calls.append(1))
    for _ in range(5):
        d.trigger()
    assert d.pending and calls == []
    qtbot.waitUntil(lambda: calls == [1], timeout=2000)
    assert not d.pending
    d.trigger()
    d.flush()  # at once, and not again when the interval would have ended
    assert calls == [1, 1]
    d.trigger()
    d.cancel()
    qtbot.wait(100)
    assert calls == [1, 1] and d.flush() is None
