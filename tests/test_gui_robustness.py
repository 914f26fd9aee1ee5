"""Desktop program (app/): work is never lost, and nothing a user does breaks the program.

Autosave and recovery after a crash, failed saves, a computation that raises, malformed files on
Open, absurd grids, and a short soak of random edits (the long one is ``bench/soak_gui.py``).
Runs offscreen (pytest-qt); every test has its own recovery folder (ENGINE_AIR_RECOVERY_DIR).
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import datetime as dt  # noqa: E402
import errno  # noqa: E402
import importlib.util  # noqa: E402
import json  # noqa: E402
import shutil  # noqa: E402
import socket  # noqa: E402
import tracemalloc  # noqa: E402
from dataclasses import replace  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402

pytest.importorskip("PySide6")
pytest.importorskip("pyqtgraph")
pytest.importorskip("pytestqt")

from PySide6.QtCore import QSettings, QTimer  # noqa: E402
from PySide6.QtWidgets import QApplication, QMessageBox  # noqa: E402

import engine_air.envelope.evaluate as evaluate_module  # noqa: E402
from app import recovery  # noqa: E402
from app.main import SAMPLES  # noqa: E402
from app.main_window import MainWindow  # noqa: E402
from engine_air.project import toml_file as pf  # noqa: E402
from engine_air.project.errors import ProjectError  # noqa: E402
from engine_air.envelope.evaluate import evaluate_project  # noqa: E402
from engine_air.project.model import Grid  # noqa: E402
from engine_air.project import load_project, project_from_dict, project_to_dict  # noqa: E402
from gui_support import WAIT_MS, wait_result, window_factory  # noqa: E402,F401

RAMP = SAMPLES / "supersonic_two_ramp.toml"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture
def rec_dir(tmp_path, monkeypatch):
    folder = tmp_path / "recovery"
    monkeypatch.setenv(recovery.ENV_DIR, str(folder))
    return folder


@pytest.fixture
def dialogs(monkeypatch):
    """Every static message box is recorded (and answered) instead of shown: [(kind, title, text)]."""
    shown = []
    answers = {"warning": QMessageBox.Discard}

    def recorder(kind):
        def show(*args, **kwargs):
            shown.append((kind, args[1], args[2]))
            return answers.get(kind, QMessageBox.Ok)
        return staticmethod(show)

    for kind in ("critical", "warning", "information", "question"):
        monkeypatch.setattr(QMessageBox, kind, recorder(kind))
    return shown, answers


@pytest.fixture
def make_window(qtbot, tmp_path, rec_dir):
    with window_factory(qtbot, tmp_path, RAMP) as make:
        yield make


def copy_sample(tmp_path, src=RAMP, name="study.toml") -> Path:
    folder = tmp_path / "projects"
    folder.mkdir(exist_ok=True)
    target = folder / name
    shutil.copyfile(src, target)
    return target


def edited(w, **kw):
    p = w.document.project
    new = replace(p, **kw) if kw else replace(p, title=p.title + " (edited)")
    w.document.edit(new)
    return new


def flush_recovery(qtbot, w):
    assert w.recovery.wait(10)
    qtbot.wait(30)  # let the queued report reach the window


def recovery_files(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir()) if folder.exists() else []


def crash(w):
    """What a crash leaves: the slot's files stay, and no running process holds its lock."""
    w.autosave_timer.stop()
    w.recovery.wait(10)
    w.recovery._slot.release()


# -- autosave ----------------------------------------------------------------------------------------------

def test_autosave_writes_project_and_sidecar_on_the_timer(make_window, qtbot, rec_dir, tmp_path):
    src = copy_sample(tmp_path)
    w = make_window(src, autosave_ms=40)
    qtbot.wait(150)
    assert not w.recovery.project_file.exists()  # nothing unsaved: nothing written
    project = edited(w, title="autosaved title")
    qtbot.waitUntil(lambda: w.recovery.sidecar_file.exists(), timeout=5000)
    flush_recovery(qtbot, w)
    assert load_project(w.recovery.project_file) == project
    meta = json.loads(w.recovery.sidecar_file.read_text())
    assert meta["original_path"] == str(src.resolve())
    assert meta["title"] == "autosaved title"
    saved_at = dt.datetime.fromisoformat(meta["saved_at"])
    assert abs((dt.datetime.now().astimezone() - saved_at).total_seconds()) < 60
    assert w.autosave_label.text().startswith("Autosaved")
    assert w.recovery.project_file.parent == rec_dir
    assert not [n for n in recovery_files(rec_dir) if n.endswith(".tmp")]


def test_autosave_rewrites_only_when_the_project_changed(make_window, qtbot, monkeypatch):
    w = make_window(autosave_ms=30)
    writes = []
    original = w.recovery.write
    monkeypatch.setattr(w.recovery, "write", lambda p, path=None: (writes.append(p), original(p, path))[1])
    first = edited(w)
    qtbot.waitUntil(lambda: len(writes) == 1, timeout=5000)
    qtbot.wait(200)
    assert writes == [first]
    second = edited(w, title="second")
    qtbot.waitUntil(lambda: len(writes) == 2, timeout=5000)
    assert writes[1] == second


def test_untouched_new_project_is_not_autosaved_but_edits_to_it_are(make_window, qtbot, rec_dir, dialogs):
    w = make_window()
    w.new_file()
    wait_result(qtbot, w)
    assert w.document.dirty and not w.document.has_unsaved_work
    assert w.autosave_now() is False
    p = edited(w, title="my new study")
    assert w.autosave_now() is True
    flush_recovery(qtbot, w)
    assert load_project(w.recovery.project_file) == p
    assert json.loads(w.recovery.sidecar_file.read_text())["original_path"] is None


def test_clean_save_removes_the_recovery_copy(make_window, qtbot, rec_dir, tmp_path):
    w = make_window(copy_sample(tmp_path))
    edited(w)
    w.autosave_now()
    flush_recovery(qtbot, w)
    assert w.recovery.project_file.exists()
    assert w.save()
    flush_recovery(qtbot, w)
    assert not w.recovery.project_file.exists() and not w.recovery.sidecar_file.exists()
    assert w.autosave_label.text() == ""


def test_saving_over_a_read_only_file_asks_first(make_window, qtbot, monkeypatch, tmp_path):
    """Issue 9: Save over a mode-0444 project file asks; No keeps the file and the edits, Yes replaces it."""
    path = copy_sample(tmp_path)
    before = path.read_bytes()
    path.chmod(0o444)
    w = make_window(path)
    new = edited(w)
    asked = []
    answer = {"button": QMessageBox.No}

    def question(parent, title, text, *args, **kwargs):
        asked.append((title, text))
        return answer["button"]

    monkeypatch.setattr(QMessageBox, "question", staticmethod(question))
    monkeypatch.setattr(QMessageBox, "critical", staticmethod(lambda *a, **k: pytest.fail(f"error box: {a[2]}")))
    assert w.save() is False
    assert len(asked) == 1 and "read-only" in asked[0][1] and str(path) in asked[0][1]
    assert path.read_bytes() == before and (path.stat().st_mode & 0o777) == 0o444  # untouched
    assert w.document.dirty and w.document.project == new  # the edits stay
    answer["button"] = QMessageBox.Yes
    assert w.save() is True
    assert len(asked) == 2
    assert load_project(path) == new and not w.document.dirty
    assert os.access(path, os.W_OK)
    # a writable file is saved without a question
    edited(w)
    assert w.save() is True and len(asked) == 2


def test_undo_back_to_the_saved_state_removes_the_recovery_copy(make_window, qtbot):
    w = make_window()
    edited(w)
    w.autosave_now()
    flush_recovery(qtbot, w)
    w.document.undo()
    flush_recovery(qtbot, w)
    assert not w.document.dirty and not w.recovery.project_file.exists()


def test_discard_on_close_removes_every_recovery_file(make_window, qtbot, rec_dir, dialogs):
    w = make_window()
    edited(w)
    w.autosave_now()
    flush_recovery(qtbot, w)
    assert len(recovery_files(rec_dir)) == 3  # .toml, .json, .lock
    assert w.close()  # the prompt is answered Discard
    assert recovery_files(rec_dir) == []


def test_discard_then_new_removes_the_copy(make_window, qtbot, dialogs):
    w = make_window()
    edited(w)
    w.autosave_now()
    flush_recovery(qtbot, w)
    w.new_file()
    flush_recovery(qtbot, w)
    assert not w.recovery.project_file.exists()


def test_cancelled_close_keeps_the_copy_and_the_edits(make_window, qtbot, dialogs):
    shown, answers = dialogs
    w = make_window()
    p = edited(w)
    w.autosave_now()
    flush_recovery(qtbot, w)
    answers["warning"] = QMessageBox.Cancel
    assert w.close() is False
    assert w.isVisible() and w.document.project == p and w.recovery.project_file.exists()
    assert w.autosave_now() is False  # same project: not written again
    edited(w, title="after cancel")
    assert w.autosave_now() is True  # the store still works after a cancelled close


@pytest.mark.parametrize("how", ["no-folder", "disk-full", "read-only"])
def test_failing_autosave_is_only_a_status_note(make_window, qtbot, monkeypatch, tmp_path, dialogs, how):
    shown, _ = dialogs
    if how == "no-folder":  # the recovery folder cannot be made: a file is in the way (fails even as root)
        blocker = tmp_path / "blocker"
        blocker.write_text("not a folder")
        monkeypatch.setenv(recovery.ENV_DIR, str(blocker / "recovery"))
    w = make_window(autosave_ms=40)
    real_fsync, real_replace = os.fsync, os.replace
    if how == "disk-full":
        def fsync(fd):
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        monkeypatch.setattr(os, "fsync", fsync)
    elif how == "read-only":
        def replace_(a, b):
            raise OSError(errno.EROFS, os.strerror(errno.EROFS))
        monkeypatch.setattr(os, "replace", replace_)
    p = edited(w)
    qtbot.waitUntil(lambda: w.autosave_label.text() == "Autosave failed", timeout=5000)
    assert w.autosave_error and "Autosave failed" in w.statusBar().currentMessage()
    assert shown == []  # never a dialog
    assert w.document.project == p and w.document.dirty and w.isVisible()
    w.autosave_timer.stop()  # (no retry running while the folder is listed)
    assert w.recovery.wait(10)
    assert not [n for n in recovery_files(w.recovery.folder) if n.endswith(".tmp")]
    w.autosave_timer.start()
    # the user goes on working; the window goes on computing
    p2 = edited(w, title="still working")
    wait_result(qtbot, w)
    assert w.result.project == p2
    if how != "no-folder":  # the disk recovers: the next tick writes the copy
        monkeypatch.setattr(os, "fsync", real_fsync)
        monkeypatch.setattr(os, "replace", real_replace)
        qtbot.waitUntil(lambda: w.autosave_label.text().startswith("Autosaved"), timeout=5000)
        flush_recovery(qtbot, w)
        assert load_project(w.recovery.project_file) == p2


# -- recovery at the next start -----------------------------------------------------------------------------

def answer_with(monkeypatch, *choices):
    asked = []
    queue = list(choices)

    def ask(parent, entry, error=None, index=0, count=1):
        asked.append((entry, error, index, count))
        return queue.pop(0) if queue else recovery.LATER

    monkeypatch.setattr(recovery.offer, "ask_recovery", ask)
    return asked


def test_crashed_session_is_offered_and_restored_unsaved_with_its_file_as_target(
        make_window, qtbot, monkeypatch, rec_dir, tmp_path):
    src = copy_sample(tmp_path)
    before = src.read_bytes()
    a = make_window(src)
    lost = edited(a, title="work from the crashed session",
                  inlet=replace(a.document.project.inlet, face_area_m2=0.47))
    a.autosave_now()
    crash(a)

    b = make_window(PITOT)
    asked = answer_with(monkeypatch, recovery.RESTORE)
    outcomes = recovery.offer_recovery(b)
    assert [c for _k, c in outcomes] == [recovery.RESTORE] and len(asked) == 1
    entry, error, _i, _n = asked[0]
    assert error is None and entry.original_path == src.resolve() and entry.title == lost.title
    assert b.document.project == lost
    assert b.document.dirty and b.document.has_unsaved_work
    assert b.document.path == src.resolve()
    assert b.windowTitle().startswith("study.toml*")
    assert src.read_bytes() == before  # restoring writes nothing to the project's own file
    wait_result(qtbot, b)
    assert b.result.project == lost
    # the restored work stays safe until saved: the window took over the recovered slot
    assert b.recovery.key == entry.key and b.recovery.project_file.exists()
    assert recovery.find_recovered(rec_dir) == []  # held by the running window: not offered again
    assert b.save()
    assert load_project(src) == lost
    flush_recovery(qtbot, b)
    assert not b.recovery.project_file.exists() and not b.recovery.sidecar_file.exists()


def test_running_session_is_never_offered(make_window, qtbot, monkeypatch):
    a = make_window()
    edited(a)
    a.autosave_now()
    flush_recovery(qtbot, a)
    b = make_window(PITOT)
    asked = answer_with(monkeypatch, recovery.RESTORE)
    assert recovery.offer_recovery(b) == [] and asked == []
    assert b.document.path == PITOT.resolve() or b.document.path == PITOT


def test_copy_whose_lock_names_a_dead_process_is_offered(make_window, qtbot, rec_dir, monkeypatch):
    a = make_window()
    lost = edited(a)
    a.autosave_now()
    crash(a)
    # a lock file as a killed process leaves it: its pid no longer runs
    a.recovery._slot.lock_file.write_text(f"999999\npython3\n{socket.gethostname()}\n")
    b = make_window(PITOT)
    answer_with(monkeypatch, recovery.RESTORE)
    assert recovery.offer_recovery(b)[0][1] == recovery.RESTORE
    assert b.document.project == lost


def test_discard_deletes_and_later_keeps_for_the_next_start(make_window, qtbot, rec_dir, monkeypatch):
    sessions = []
    for title in ("older", "newer"):
        w = make_window()
        edited(w, title=title)
        w.autosave_now()
        crash(w)
        sessions.append(w)
    sidecar = sessions[0].recovery.sidecar_file  # "older" was autosaved an hour before "newer"
    meta = json.loads(sidecar.read_text())
    meta["saved_at"] = (dt.datetime.fromisoformat(meta["saved_at"]) - dt.timedelta(hours=1)).isoformat()
    sidecar.write_text(json.dumps(meta))
    b = make_window(PITOT)
    asked = answer_with(monkeypatch, recovery.LATER, recovery.DISCARD)
    outcomes = recovery.offer_recovery(b)
    assert [e.title for e, *_ in asked] == ["newer", "older"]  # newest first
    assert [c for _k, c in outcomes] == [recovery.LATER, recovery.DISCARD]
    assert asked[0][2:] == (0, 2)
    assert not sessions[0].recovery.project_file.exists()  # "older" discarded
    assert sessions[1].recovery.project_file.exists()  # "newer" kept ...
    again = recovery.find_recovered(rec_dir)  # ... and offered again next time
    assert [e.title for e in again] == ["newer"]
    for e in again:
        e.release()
    assert b.document.path in (PITOT, PITOT.resolve()) and not b.document.dirty


def test_unreadable_copy_can_only_be_discarded_or_kept(make_window, rec_dir, monkeypatch):
    rec_dir.mkdir(parents=True, exist_ok=True)
    (rec_dir / "20240101-000000-1-deadbeef.toml").write_text("this is [not toml")
    (rec_dir / "20240101-000000-1-deadbeef.json").write_text("{not json")
    b = make_window(PITOT)
    before = b.document.project
    asked = answer_with(monkeypatch, recovery.RESTORE)  # even if asked to, nothing unreadable is restored
    outcomes = recovery.offer_recovery(b)
    assert asked[0][1] and "not valid TOML" in asked[0][1]
    assert outcomes[0][1] == recovery.LATER
    assert b.document.project is before


def test_recovery_dialog_buttons_and_look(make_window, qtbot, rec_dir, tmp_path):
    a = make_window(copy_sample(tmp_path))
    edited(a, title="dialog look")
    a.autosave_now()
    crash(a)
    entry = recovery.find_recovered(rec_dir)[0]
    box = recovery.recovery_dialog(a, entry)
    assert [b.text() for b in box.buttons()].count("Restore") == 1
    assert {b.text() for b in box.buttons()} == {"Restore", "Discard", "Later"}
    assert "dialog look" in box.informativeText() and "study.toml" in box.informativeText()
    box.show()
    qtbot.wait(20)
    assert not box.grab().isNull()
    box.grab().save(str(tmp_path / "recovery_dialog.png"))
    box.close()
    bad = recovery.recovery_dialog(a, entry, error="x.toml: (file): is not valid TOML")
    assert {b.text() for b in bad.buttons()} == {"Discard", "Later"}
    for choice in (recovery.RESTORE, recovery.DISCARD, recovery.LATER):
        def click(choice=choice):
            box = QApplication.activeModalWidget()
            box._choices[choice].click()
        QTimer.singleShot(50, click)
        assert recovery.ask_recovery(a, entry) == choice
    entry.release()


def test_program_start_offers_recovery(qtbot, monkeypatch, tmp_path, rec_dir, make_window):
    from app import main as app_main
    from app.main_window import MainWindow as Window

    a = make_window(copy_sample(tmp_path))
    lost = edited(a, title="restored at start")
    a.autosave_now()
    crash(a)
    windows = []
    original_init = Window.__init__

    def init(self, *args, **kw):
        kw["settings"] = QSettings(str(tmp_path / "s.ini"), QSettings.IniFormat)
        original_init(self, *args, **kw)
        windows.append(self)

    monkeypatch.setattr(Window, "__init__", init)
    monkeypatch.setattr(QApplication, "exec", lambda self: 0)
    monkeypatch.setenv("ENGINE_AIR_LOG_DIR", str(tmp_path))
    answer_with(monkeypatch, recovery.RESTORE)
    import sys
    hook = sys.excepthook
    try:
        assert app_main.main([]) == 0
    finally:
        sys.excepthook = hook
    w = windows[0]
    try:
        assert w.document.project == lost and w.document.dirty
        wait_result(qtbot, w)
    finally:
        w.document._saved = w.document.project
        w.close()
        w.runner.shutdown()


# -- saving ----------------------------------------------------------------------------------------------------

def _fail_replace(monkeypatch):
    def replace_(a, b):
        raise PermissionError(errno.EACCES, os.strerror(errno.EACCES), b)
    monkeypatch.setattr(os, "replace", replace_)


def _fail_fsync(monkeypatch):
    def fsync(fd):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
    monkeypatch.setattr(os, "fsync", fsync)


def _read_only_folder(monkeypatch):
    def temp(*a, **k):
        raise OSError(errno.EROFS, os.strerror(errno.EROFS), k.get("dir"))
    monkeypatch.setattr(pf.tempfile, "NamedTemporaryFile", temp)


@pytest.mark.parametrize("failure", [_fail_replace, _fail_fsync, _read_only_folder],
                         ids=["rename-refused", "disk-full", "read-only-folder"])
def test_failed_save_keeps_old_file_edits_and_unsaved_mark(make_window, qtbot, monkeypatch, tmp_path, dialogs,
                                                           failure):
    shown, _ = dialogs
    src = copy_sample(tmp_path)
    before = src.read_bytes()
    listing = sorted(os.listdir(src.parent))
    w = make_window(src)
    p = edited(w, title="keep me", inlet=replace(w.document.project.inlet, face_area_m2=0.48))
    w.autosave_now()
    flush_recovery(qtbot, w)
    with monkeypatch.context() as m:
        failure(m)
        assert w.save() is False
    assert src.read_bytes() == before  # byte-identical
    assert sorted(os.listdir(src.parent)) == listing  # no temporary file left beside it
    assert len(shown) == 1 and shown[0][0] == "critical" and shown[0][1] == "Could not save"
    assert "could not save" in shown[0][2] and str(src) in shown[0][2] and "edits are kept" in shown[0][2]
    assert w.document.project == p and w.document.dirty
    assert w.windowTitle().startswith("study.toml*")
    assert load_project(w.recovery.project_file) == p  # the autosaved copy is still there
    # the same save works once the disk does
    assert w.save() is True
    assert load_project(src) == p and not w.document.dirty
    flush_recovery(qtbot, w)
    assert not w.recovery.project_file.exists()


def test_close_whose_save_fails_stays_open(make_window, monkeypatch, tmp_path, dialogs):
    shown, answers = dialogs
    src = copy_sample(tmp_path)
    w = make_window(src)
    p = edited(w)
    answers["warning"] = QMessageBox.Save
    _fail_replace(monkeypatch)
    assert w.close() is False
    assert w.isVisible() and w.document.project == p and w.document.dirty
    assert [k for k, *_ in shown] == ["warning", "critical"]


# -- a computation that raises ---------------------------------------------------------------------------------

def _raise_once(monkeypatch, message="solver diverged"):
    state = {"calls": 0, "failed": 0}
    real = evaluate_module.evaluate_project

    def flaky(project, *args, **kwargs):
        state["calls"] += 1
        if state["failed"] == 0:
            state["failed"] += 1
            raise FloatingPointError(message)
        return real(project, *args, **kwargs)

    monkeypatch.setattr(evaluate_module, "evaluate_project", flaky)
    return state


def test_worker_that_raises_leaves_last_good_map_marked_stale(make_window, qtbot, monkeypatch):
    w = make_window(RAMP)  # the window's own MapRunner, calling engine_air.envelope.evaluate.evaluate_project
    good, good_result = w.map.values().copy(), w.result
    state = _raise_once(monkeypatch)
    p = edited(w, inlet=replace(w.document.project.inlet, face_area_m2=0.45))
    qtbot.waitUntil(lambda: w.map.state == "stale", timeout=WAIT_MS)
    assert state["failed"] == 1
    assert "OUT OF DATE" in w.map.state_label.text() and "solver diverged" in w.map.state_label.text()
    assert w.verdict_state == "stale" and "solver diverged" in w.verdict.text()
    assert "FloatingPointError" in w.statusBar().currentMessage()
    assert "OUT OF DATE" in w.detail.stale_label.text()
    assert w.result is good_result
    np.testing.assert_array_equal(w.map.values(), good)
    assert not w.up_to_date and not w.runner.busy
    assert w.document.project == p and w.document.dirty  # the edit is kept
    # the runner is alive: the next run (Edit > Recompute map) works and shows the edited project
    w.recompute()
    wait_result(qtbot, w)
    assert w.map.state == "current" and w.verdict_state in ("holds", "fails")
    np.testing.assert_array_equal(w.map.values(),
                                  evaluate_project(p).quantity(w.current_case(), w.current_quantity()))


def test_worker_that_raises_on_the_first_run_leaves_no_map_but_a_working_window(make_window, qtbot, monkeypatch):
    _raise_once(monkeypatch, "first run failed")
    w = make_window(PITOT, wait=False)
    qtbot.waitUntil(lambda: w.verdict_state == "stale", timeout=WAIT_MS)
    assert w.result is None and "NO RESULT" in w.verdict.text()
    edited(w)
    wait_result(qtbot, w)
    assert w.map.state == "current"


# -- malformed files on Open ----------------------------------------------------------------------------------

def _bad_files():
    text = RAMP.read_text()
    return {
        "truncated": text[: len(text) // 2],
        "truncated-at-value": text[: text.index("altitude_m") + 14],
        "not-toml": "this is [not toml",
        "nan-value": text.replace("capture_area_m2 = 0.55", "capture_area_m2 = nan"),
        "self-crossing-envelope": text.replace("mach = [0.3, 1.1, 1.6, 2.1, 2.1, 0.7, 0.3]",
                                               "mach = [0.3, 2.1, 1.6, 0.3, 2.1, 0.7, 0.3]"),
        "huge-file": text + "# " + "x" * (1 << 20) + "\n",
        "empty": "",
        "binary": bytes(range(256)) * 8,
        "utf16": text.encode("utf-16"),
        "a-folder": None,
    }


@pytest.mark.parametrize("kind", list(_bad_files()))
def test_bad_file_on_open_shows_one_line_and_keeps_the_project(make_window, qtbot, tmp_path, dialogs, kind):
    shown, _ = dialogs
    content = _bad_files()[kind]
    bad = tmp_path / f"{kind}.toml"
    if content is None:
        bad.mkdir()
    elif isinstance(content, bytes):
        bad.write_bytes(content)
    else:
        bad.write_text(content, encoding="utf-8")
    with pytest.raises(ProjectError) as info:
        load_project(bad)
    loader_line = str(info.value)
    w = make_window(RAMP)
    p = edited(w, title="unsaved edits before Open")  # unsaved edits survive a failed Open too
    wait_result(qtbot, w)
    values, gen, path = w.map.values().copy(), w.runner.generation, w.document.path
    title = w.windowTitle()
    assert w.open_file(bad, ask=False) is False
    assert len(shown) == 1 and shown[0][:2] == ("critical", "Cannot open project")
    first_line = shown[0][2].split("\n")[0]
    assert first_line == loader_line and "\n" not in loader_line and "Traceback" not in shown[0][2]
    assert bad.name in first_line
    assert "stays open" in shown[0][2]
    assert w.document.project is p and w.document.path == path and w.document.dirty
    assert w.windowTitle() == title and w.runner.generation == gen  # nothing recomputed
    np.testing.assert_array_equal(w.map.values(), values)
    assert w.map.state == "current"
    assert str(bad.resolve()) not in w.recent_files()


def test_recent_file_that_disappeared(make_window, tmp_path, dialogs):
    shown, _ = dialogs
    gone = copy_sample(tmp_path, name="gone.toml")
    w = make_window(RAMP)
    assert w.open_file(gone, ask=False)
    w2_path = w.document.path
    gone.unlink()
    assert w.open_file(gone, ask=False) is False
    assert "gone.toml" in shown[-1][2] and "cannot be read" in shown[-1][2]
    assert w.document.path == w2_path


# -- absurd grids ------------------------------------------------------------------------------------------------

def test_absurd_grid_in_the_editor_is_refused_with_the_loader_message_before_any_allocation(
        make_window, qtbot, monkeypatch):
    w = make_window(PITOT)
    before, gen = w.document.project, w.runner.generation
    calls = []
    monkeypatch.setattr(evaluate_module, "evaluate_project", lambda *a, **k: calls.append(a))
    e = w.editors
    tracemalloc.start()
    try:
        e.mach_points.setValue(10 ** 9)  # typed far beyond the box: held at the loader's per-axis maximum
        e.alt_points.setValue(10 ** 9)
        accepted = e.flush()
        _size, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert accepted is False
    assert e.mach_points.value() == pf.MAX_AXIS_POINTS and e.alt_points.value() == pf.MAX_AXIS_POINTS
    data = project_to_dict(before)
    data["grid"] = {"mach_points": pf.MAX_AXIS_POINTS, "altitude_points": pf.MAX_AXIS_POINTS}
    with pytest.raises(ProjectError) as info:
        project_from_dict(data)
    assert e.error.text() == f"Edit not applied — {info.value}"
    assert "grid" in e.error.text() and str(pf.MAX_GRID_POINTS) in e.error.text()
    assert "Too many" in e.grid_note.text()
    assert peak < 4 * 2**20  # one 1001 x 1001 float array alone would be 8 MB
    qtbot.wait(300)
    assert calls == [] and w.runner.generation == gen and w.document.project is before
    # a grid within the limits is accepted afterwards
    e.mach_points.setValue(40)
    e.alt_points.setValue(30)
    monkeypatch.undo()
    assert e.flush() is True
    wait_result(qtbot, w)
    assert w.result.mach.size == 40 and w.result.altitude_m.size == 30


@pytest.mark.parametrize("grid", [Grid(10 ** 6, 10 ** 6), Grid(1001, 1001), Grid(1, 50), Grid(2.5, 30),
                                  Grid(True, 9), Grid(-5, 10)])
def test_absurd_grid_through_the_document_api_is_refused(make_window, grid, monkeypatch):
    w = make_window(PITOT)
    before, gen = w.document.project, w.runner.generation
    with pytest.raises(ProjectError) as info:
        w.document.edit(replace(before, grid=grid))
    assert "grid" in str(info.value)
    assert w.document.project is before and w.runner.generation == gen and not w.document.can_undo()


def test_too_many_cases_for_the_grid_are_refused_in_the_editor(make_window):
    limit = getattr(pf, "MAX_CASE_POINTS", None)
    if limit is None:
        pytest.skip("the loader has no limit on cases x grid points")
    w = make_window(PITOT)
    p = w.document.project
    big = replace(p, grid=Grid(500, 500))
    w.document.edit(big)
    n_ok = limit // (500 * 500)
    from engine_air.project.model import Case
    cases = tuple(Case(name=f"c{k}", rating=p.ratings[0].name, isa_offset_K=0.0) for k in range(n_ok))
    w.document.edit(replace(big, cases=cases))
    w.editors.set_project(w.document.project)
    before = w.document.project
    w.editors._add_case()
    assert "case" in w.editors.error.text() and str(limit) in w.editors.error.text()
    assert w.document.project is before


# -- soak ---------------------------------------------------------------------------------------------------------

def _soak_module():
    spec = importlib.util.spec_from_file_location("soak_gui", ROOT / "bench" / "soak_gui.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_short_soak_of_random_edits_ends_with_the_right_map(make_window, qtbot, dialogs):
    shown, _ = dialogs
    soak = _soak_module()
    w = make_window(RAMP, autosave_ms=100)
    driver = soak.drive(w, 60, seed=7)
    result = soak.final_check(w, timeout_s=WAIT_MS / 1000)
    assert sum(driver.counts.values()) == 60
    assert result["recovered"] == w.document.has_unsaved_work
    assert shown == []  # no edit ever opened a dialog
