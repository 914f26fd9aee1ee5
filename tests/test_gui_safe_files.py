"""Desktop program (issue 18): no export, autosave or second window ever costs the user a file.

- a hostile recovery folder (a pipe, a link to an endless device, a link to a user's file) never hangs the
  program at start, is never read without bound and is never written through;
- two windows on one file: the second Save asks (overwrite, save as, reload) instead of silently throwing the
  first window's saved edits away;
- an export (or a review pack) over the open project's own file is refused with a dialog.
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import shutil  # noqa: E402
import threading  # noqa: E402
from dataclasses import replace  # noqa: E402
from pathlib import Path  # noqa: E402

import pytest  # noqa: E402

pytest.importorskip("PySide6")
pytest.importorskip("pytestqt")

from PySide6.QtCore import QTimer  # noqa: E402
from PySide6.QtWidgets import QApplication, QMessageBox  # noqa: E402

from app import recovery  # noqa: E402
from app.main import SAMPLES  # noqa: E402
from app.recovery.slot import NotRegularError, read_regular  # noqa: E402
from app.window import changed_on_disk  # noqa: E402
from engine_air.project import load_project  # noqa: E402
from engine_air.project.errors import ProjectError  # noqa: E402
from gui_support import window_factory  # noqa: E402

RAMP = SAMPLES / "supersonic_two_ramp.toml"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
KEY = "20240101-000000-1-deadbeef"


@pytest.fixture
def rec_dir(tmp_path, monkeypatch):
    folder = tmp_path / "recovery"
    folder.mkdir()
    monkeypatch.setenv(recovery.ENV_DIR, str(folder))
    return folder


@pytest.fixture
def make_window(qtbot, tmp_path, rec_dir):
    with window_factory(qtbot, tmp_path, RAMP) as make:
        yield make


@pytest.fixture
def dialogs(monkeypatch):
    shown = []

    def recorder(kind):
        def show(*args, **kwargs):
            shown.append((kind, args[1], args[2]))
            return QMessageBox.Ok
        return staticmethod(show)

    for kind in ("critical", "warning", "information", "question"):
        monkeypatch.setattr(QMessageBox, kind, recorder(kind))
    return shown


def copy_sample(tmp_path, src=RAMP, name="study.toml") -> Path:
    folder = tmp_path / "projects"
    folder.mkdir(exist_ok=True)
    shutil.copyfile(src, folder / name)
    return folder / name


def edited(w, **kw):
    p = replace(w.document.project, **kw)
    w.document.edit(p)
    return p


def flush(qtbot, w):
    qtbot.waitUntil(lambda: w.recovery.wait(0.05), timeout=10000)


def finishes(fn, seconds=10.0):
    """Run ``fn`` on a thread; its result, or a failure if it has not returned in ``seconds`` (a hang)."""
    box = {}

    def run():
        try:
            box["value"] = fn()
        except BaseException as exc:  # noqa: BLE001 - handed back to the test
            box["error"] = exc

    t = threading.Thread(target=run, daemon=True)
    t.start()
    t.join(seconds)
    assert not t.is_alive(), f"{fn} hung"
    if "error" in box:
        raise box["error"]
    return box["value"]


def good_slot(folder: Path, key: str = KEY) -> None:
    shutil.copyfile(PITOT, folder / f"{key}.toml")
    (folder / f"{key}.json").write_text('{"format": 1, "title": "ok", "original_path": null}')


# -- a hostile recovery folder --------------------------------------------------------------------------------------

@pytest.mark.parametrize("where", ["json", "toml", "lock"])
def test_a_pipe_in_the_recovery_folder_never_hangs_the_start(rec_dir, where):
    good_slot(rec_dir)
    pipe = rec_dir / f"{KEY}.{where}"
    pipe.unlink(missing_ok=True)
    os.mkfifo(pipe)
    good_slot(rec_dir, "20240101-000000-2-cafef00d")  # a sound slot beside it is still offered
    notes = []
    found = finishes(lambda: recovery.find_recovered(rec_dir, notes=notes))
    try:
        assert [e.key for e in found] == ["20240101-000000-2-cafef00d"]
        assert notes and any(KEY in n for n in notes)
    finally:
        for e in found:
            e.release()


def test_a_recovery_file_linked_to_an_endless_device_is_not_read(rec_dir):
    good_slot(rec_dir)
    (rec_dir / f"{KEY}.json").unlink()
    (rec_dir / f"{KEY}.json").symlink_to("/dev/zero")  # its size reads 0, so a size check would pass
    other = "20240101-000000-2-cafef00d"
    (rec_dir / f"{other}.toml").symlink_to("/dev/zero")
    notes = []
    found = finishes(lambda: recovery.find_recovered(rec_dir, notes=notes))
    assert found == [] and len(notes) == 2
    with pytest.raises(NotRegularError):
        finishes(lambda: read_regular(Path("/dev/zero"), 100))


def test_reads_are_bounded_by_their_limit(tmp_path):
    big = tmp_path / "big.json"
    big.write_bytes(b"x" * 1001)
    with pytest.raises(OSError, match="larger than 1000"):
        read_regular(big, 1000)
    assert read_regular(big, 1001) == b"x" * 1001
    link = tmp_path / "link.json"
    link.symlink_to(big)
    with pytest.raises(NotRegularError, match="link"):
        read_regular(link, 5000)


def test_a_recovered_copy_that_became_a_link_cannot_be_loaded(rec_dir, tmp_path):
    good_slot(rec_dir)
    found = recovery.find_recovered(rec_dir)
    try:
        victim = copy_sample(tmp_path, PITOT, "victim.toml")
        (rec_dir / f"{KEY}.toml").unlink()
        (rec_dir / f"{KEY}.toml").symlink_to(victim)
        with pytest.raises(ProjectError, match="link"):
            found[0].load()
    finally:
        for e in found:
            e.release()


def test_after_restore_autosave_never_writes_through_a_link(make_window, qtbot, rec_dir, tmp_path, monkeypatch):
    good_slot(rec_dir)
    b = make_window(PITOT)
    monkeypatch.setattr(recovery.offer, "ask_recovery", lambda *a, **k: recovery.RESTORE)
    assert [c for _k, c in recovery.offer_recovery(b)] == [recovery.RESTORE]
    # someone plants links where the restored slot's files are
    victims = []
    for ext in ("toml", "json"):
        victim = tmp_path / f"victim.{ext}"
        victim.write_text("precious")
        (rec_dir / f"{KEY}.{ext}").unlink()
        (rec_dir / f"{KEY}.{ext}").symlink_to(victim)
        victims.append(victim)
    p = edited(b, title="after restore")
    assert b.autosave_now()
    flush(qtbot, b)
    assert [v.read_text() for v in victims] == ["precious", "precious"]
    slot = rec_dir / f"{KEY}.toml"
    assert not slot.is_symlink() and load_project(slot) == p
    assert not (rec_dir / f"{KEY}.json").is_symlink()


def test_skipped_slots_are_a_status_note(make_window, rec_dir):
    good_slot(rec_dir)
    (rec_dir / f"{KEY}.json").unlink()
    os.mkfifo(rec_dir / f"{KEY}.json")
    b = make_window(PITOT)
    assert finishes(lambda: recovery.offer_recovery(b)) == []
    assert "not a plain file" in b.statusBar().currentMessage()


# -- two windows on one file ----------------------------------------------------------------------------------------

def answer(monkeypatch, *choices):
    asked = []
    queue = list(choices)

    def ask(parent, path, found=None):
        asked.append((parent, Path(path), found))
        return queue.pop(0)

    monkeypatch.setattr(changed_on_disk, "ask_changed_on_disk", ask)
    return asked


def test_two_windows_on_one_file_never_lose_a_save(make_window, tmp_path, monkeypatch, dialogs):
    src = copy_sample(tmp_path)
    a = make_window(src, wait=False)
    b = make_window(src, wait=False)
    from_a = edited(a, title="saved by window A")
    assert a.save()
    from_b = edited(b, title="edited in window B")
    asked = answer(monkeypatch, changed_on_disk.CANCEL)
    assert b.save() is False  # the file changed under B: asked, and Cancel writes nothing
    assert len(asked) == 1 and asked[0][0] is b and asked[0][1] == src.resolve()
    assert load_project(src) == from_a
    assert b.document.project == from_b and b.document.dirty  # B's edits stay in its window

    answer(monkeypatch, changed_on_disk.OVERWRITE)
    assert b.save()  # told to overwrite
    assert load_project(src) == from_b and not b.document.dirty

    edited(a, title="A again")
    answer(monkeypatch, changed_on_disk.RELOAD)
    assert a.save() is False
    assert a.document.project == from_b and not a.document.dirty  # A now shows the file as B saved it
    assert load_project(src) == from_b

    edited(a, title="A keeps both")
    monkeypatch.setattr(a, "save_as_dialog", lambda: a.save_to(src.parent / "copy.toml"))
    assert a.save()  # B saved nothing since A reloaded: no question, saved in place
    assert load_project(src).title == "A keeps both"
    edited(b, title="B keeps both")
    answer(monkeypatch, changed_on_disk.SAVE_AS)
    monkeypatch.setattr(b, "save_as_dialog", lambda: b.save_to(src.parent / "copy.toml"))
    assert b.save()
    assert load_project(src).title == "A keeps both" and load_project(src.parent / "copy.toml").title == "B keeps both"
    assert not [d for d in dialogs if d[0] == "critical"]


def test_a_file_changed_by_another_program_is_noticed(make_window, tmp_path, monkeypatch, dialogs):
    src = copy_sample(tmp_path)
    w = make_window(src, wait=False)
    edited(w, title="mine")
    src.write_text(src.read_text().replace('title = "', 'title = "theirs: ', 1))
    theirs = src.read_bytes()
    asked = answer(monkeypatch, changed_on_disk.CANCEL)
    assert w.save() is False and len(asked) == 1 and asked[0][2] is not None
    assert src.read_bytes() == theirs
    src.unlink()  # deleted meanwhile: asked too, and the answer "overwrite" writes it again
    answer(monkeypatch, changed_on_disk.OVERWRITE)
    assert w.save() and load_project(src).title == "mine"


def test_changed_on_disk_dialog_buttons(make_window, qtbot, tmp_path):
    from engine_air.project import file_fingerprint

    src = copy_sample(tmp_path)
    w = make_window(src, wait=False)
    box = changed_on_disk.changed_on_disk_dialog(w, src, file_fingerprint(src))
    assert {b.text() for b in box.buttons()} == {"Overwrite", "Save as…", "Reload", "Cancel"}
    assert "changed on disk" in box.text() and "Reload" in box.informativeText()
    box.show()
    qtbot.wait(20)
    box.grab().save(str(tmp_path / "changed_on_disk.png"))
    box.close()
    for choice in (changed_on_disk.OVERWRITE, changed_on_disk.SAVE_AS, changed_on_disk.RELOAD, changed_on_disk.CANCEL):
        def click(choice=choice):
            QApplication.activeModalWidget()._choices[choice].click()
        QTimer.singleShot(50, click)
        assert changed_on_disk.ask_changed_on_disk(w, src, None) == choice


# -- exports never over an input --------------------------------------------------------------------------------------

@pytest.mark.parametrize("kind", ["csv", "png", "svg", "txt", "sections-png"])
def test_an_export_over_the_open_project_is_refused(make_window, tmp_path, dialogs, kind):
    src = copy_sample(tmp_path)
    link = tmp_path / "link.toml"
    link.symlink_to(src)
    before = src.read_bytes()
    w = make_window(src)
    for target in (src, link):
        assert w.export(kind, target) is False
    assert src.read_bytes() == before and link.is_symlink()
    assert [d[:2] for d in dialogs] == [("critical", "Export refused")] * 2
    assert "input" in dialogs[0][2]
    assert w.export(kind, tmp_path / f"fine.{kind.split('-')[-1]}")
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith(("fine", ".fine"))) == \
        [f"fine.{kind.split('-')[-1]}"]


def test_a_review_pack_into_the_projects_folder_is_refused(make_window, tmp_path, qtbot):
    from app.dialogs.review_pack import ReviewPackDialog

    src = copy_sample(tmp_path, PITOT)
    w = make_window(src, wait=False)
    dialog = ReviewPackDialog(w.document.project, src.parent, w, inputs=w.input_files())
    try:
        assert "input" in dialog.last_error and not dialog.running
        assert sorted(p.name for p in src.parent.iterdir()) == ["study.toml"]
    finally:
        dialog.close()
