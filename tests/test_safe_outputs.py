"""No output ever costs the user a file (issue 18): an output is never an input, and a failed write (a full
disk) leaves the old file as it was and no partial file.

The full-disk tests write onto a real full file system (a small tmpfs, mounted when this process may); the same
promises are also checked with a write patched to fail part-way, which runs everywhere.
"""

from __future__ import annotations

import errno
import os
import shutil
import subprocess
from pathlib import Path

import pytest

import engine_air.envelope.evaluate as evaluate_module
import engine_air.outputs.review_pack  # noqa: F401 - imported before ``no_work`` patches the evaluation
from engine_air.cli import main
from engine_air.outputs.writer import OutputIsInputError, check_not_input, output_path, staged_folder, \
    write_output_bytes
from engine_air.project import load_project

ROOT = Path(__file__).resolve().parents[1]
RAMP = ROOT / "sample_projects" / "supersonic_two_ramp.toml"
PITOT = ROOT / "sample_projects" / "subsonic_transport_nacelle.toml"


@pytest.fixture
def project(tmp_path):
    """A copy of a small sample (coarse grid) in its own folder."""
    text = PITOT.read_text(encoding="utf-8").replace("mach_points = 121", "mach_points = 13") \
        .replace("altitude_points = 101", "altitude_points = 9")
    folder = tmp_path / "work"
    folder.mkdir()
    path = folder / "p.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture
def no_work(monkeypatch):
    """Any evaluation fails the test: a refusal must come before any work."""
    def refuse(*_a, **_k):
        raise AssertionError("the project was evaluated before the outputs were checked")
    monkeypatch.setattr(evaluate_module, "evaluate_project", refuse)


def refused(capsys, argv, *protected: Path) -> str:
    before = {p: p.read_bytes() for p in protected}
    assert main([str(a) for a in argv]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
    for p, data in before.items():
        assert p.read_bytes() == data, f"{p} was changed"
    return err


# -- an output is never an input ---------------------------------------------------------------------------------

@pytest.mark.parametrize("option", ["--csv", "--png", "--parquet"])
def test_map_refuses_to_write_over_its_project(project, capsys, no_work, option):
    err = refused(capsys, ["map", project, option, project], project)
    assert f"{option} " in err and "input" in err and "nothing was written" in err


@pytest.mark.parametrize("option", ["--csv", "--png", "--parquet"])
def test_map_refuses_an_output_that_links_to_its_project(project, capsys, no_work, option):
    link = project.parent / "link.toml"
    link.symlink_to(project)
    refused(capsys, ["map", project, option, link], project)  # the output is a link to the input
    refused(capsys, ["map", link, option, project], project)  # the input is given through a link
    hard = project.parent / "hard.toml"
    os.link(project, hard)
    refused(capsys, ["map", project, option, hard], project)  # a hard link is the same file too
    assert link.is_symlink()


def test_compare_refuses_to_write_over_either_project(project, capsys, no_work):
    other = project.parent / "b.toml"
    shutil.copyfile(project, other)
    refused(capsys, ["compare", project, other, "--csv", other], project, other)
    refused(capsys, ["compare", project, other, "--csv", project], project, other)


def test_sweep_refuses_to_write_over_its_project(project, capsys, monkeypatch):
    import engine_air.studies.sweep as sweep_module

    monkeypatch.setattr(sweep_module, "sweep", lambda *a, **k: (_ for _ in ()).throw(AssertionError("swept")))
    refused(capsys, ["sweep", project, "--vary", "capture_area_m2=2.2:2.4:2", "--csv", project], project)


def test_pack_refuses_a_folder_that_holds_its_project(project, capsys, no_work):
    err = refused(capsys, ["pack", project, "--out", project.parent], project)
    assert "--out" in err and "input" in err
    assert sorted(p.name for p in project.parent.iterdir()) == ["p.toml"]


def test_the_writers_refuse_an_input_too(project, tmp_path):
    from engine_air.outputs.review_pack import write_review_pack
    from engine_air.outputs.table import write_table

    before = project.read_bytes()
    with pytest.raises(OutputIsInputError):
        write_table({"x": [1.0]}, project, "csv", inputs={project})
    with pytest.raises(OutputIsInputError):
        write_output_bytes(project, b"x", inputs=[str(project)])
    with pytest.raises(OutputIsInputError, match="holds"):
        write_review_pack(project, project.parent, quantities=("face_mach_margin",))
    with pytest.raises(OutputIsInputError):
        check_not_input(tmp_path, [project], folder=True)  # the project lies deeper inside the folder
    assert project.read_bytes() == before
    assert check_not_input(tmp_path / "other.csv", [project]) == os.path.realpath(tmp_path / "other.csv")


def test_a_valid_run_still_writes_every_output(project, capsys):
    out = project.parent / "out"
    out.mkdir()
    assert main(["map", str(project), "--csv", str(out / "m.csv"), "--png", str(out / "m.png"),
                 "--parquet", str(out / "m.parquet")]) in (0, 1)
    assert sorted(p.name for p in out.iterdir()) == ["m.csv", "m.parquet", "m.png"]  # no temporary file left


# -- a failed write leaves the old file and no partial file -------------------------------------------------------

def _fill(folder: Path) -> None:
    """Fill the file system of ``folder`` to the last byte."""
    fd = os.open(folder / "filler", os.O_WRONLY | os.O_CREAT, 0o644)
    try:
        for size in (65536, 4096, 1):
            while True:
                try:
                    os.write(fd, b"\0" * size)
                except OSError as exc:
                    assert exc.errno == errno.ENOSPC
                    break
    finally:
        os.close(fd)


@pytest.fixture
def full_disk(tmp_path):
    """A small tmpfs, mounted for the test (skipped where this process may not mount), with an old CSV on it."""
    disk = tmp_path / "disk"
    disk.mkdir()
    try:
        done = subprocess.run(["mount", "-t", "tmpfs", "-o", "size=512k", "tmpfs", str(disk)],
                              capture_output=True, text=True, timeout=30)
    except (OSError, subprocess.SubprocessError) as exc:
        pytest.skip(f"cannot mount a tmpfs here: {exc}")
    if done.returncode != 0:
        pytest.skip(f"cannot mount a tmpfs here: {done.stderr.strip()}")
    try:
        (disk / "old.csv").write_text("case,recovery\nold,0.9\n")
        _fill(disk)
        yield disk
    finally:
        subprocess.run(["umount", "-l", str(disk)], capture_output=True, timeout=30)


def _listing(folder: Path) -> dict:
    return {p.name: p.stat().st_size for p in folder.iterdir()}


@pytest.mark.parametrize("argv", [
    ["map", "{project}", "--csv", "{disk}/old.csv"],
    ["map", "{project}", "--csv", "{disk}/new.csv"],
    ["map", "{project}", "--parquet", "{disk}/new.parquet"],
    ["map", "{project}", "--png", "{disk}/new.png"],
    ["pack", "{project}", "--out", "{disk}/pack", "--quantity", "face_mach_margin"],
    ["sweep", "{project}", "--vary", "capture_area_m2=2.2:2.4:2", "--workers", "1", "--csv", "{disk}/sweep.csv"],
], ids=["map-csv-over-old", "map-csv", "map-parquet", "map-png", "pack", "sweep-csv"])
def test_full_disk_leaves_the_old_file_and_no_partial_file(project, full_disk, capsys, argv):
    before = _listing(full_disk)
    old = (full_disk / "old.csv").read_bytes()
    args = [a.format(project=project, disk=full_disk) for a in argv]
    assert main(args) == 2
    err = capsys.readouterr().err
    assert "No space left" in err and "Traceback" not in err
    assert _listing(full_disk) == before  # nothing new: no partial file, no temporary file, no half pack
    assert (full_disk / "old.csv").read_bytes() == old


def _half_then_full(path, data: bytes):
    with open(path, "wb") as fh:
        fh.write(data[: len(data) // 2])
    raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC), str(path))


def test_a_write_failing_part_way_keeps_the_old_csv(project, capsys, monkeypatch):
    import engine_air.outputs.table as table_module

    target = project.parent / "map.csv"
    target.write_text("case,recovery\nold,0.9\n")
    old = target.read_bytes()
    real = table_module.write_csv

    def failing(table, path):
        real(table, path)
        _half_then_full(path, Path(path).read_bytes())

    monkeypatch.setattr(table_module, "write_csv", failing)
    assert main(["map", str(project), "--csv", str(target)]) == 2
    assert "No space left" in capsys.readouterr().err
    assert target.read_bytes() == old
    assert sorted(p.name for p in project.parent.iterdir()) == ["map.csv", "p.toml"]


def test_a_picture_or_pack_failing_part_way_leaves_nothing(project, capsys, monkeypatch):
    import engine_air.project.atomic as atomic_module

    real = atomic_module.tempfile.NamedTemporaryFile

    class HalfWritten:
        def __init__(self, *a, **k):
            self._f = real(*a, **k)
            self.name = self._f.name

        def __enter__(self):
            return self

        def __exit__(self, *info):
            return self._f.__exit__(*info)

        def write(self, data):
            self._f.write(data[: len(data) // 2])
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

        def __getattr__(self, name):
            return getattr(self._f, name)

    monkeypatch.setattr(atomic_module.tempfile, "NamedTemporaryFile", HalfWritten)
    assert main(["map", str(project), "--png", str(project.parent / "m.png")]) == 2
    monkeypatch.undo()
    assert sorted(p.name for p in project.parent.iterdir()) == ["p.toml"]

    # the pack: a picture fails half-way; neither a partial pack nor its staging folder stays
    import engine_air.outputs.pack_folder as pack_folder

    real_write = pack_folder.StagingFolder.write
    count = {"n": 0}

    def write(self, relative, data):
        count["n"] += 1
        if count["n"] == 3:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        return real_write(self, relative, data)

    monkeypatch.setattr(pack_folder.StagingFolder, "write", write)
    out = project.parent.parent / "pack"
    assert main(["pack", str(project), "--out", str(out), "--quantity", "face_mach_margin"]) == 2
    assert not out.exists() and sorted(p.name for p in project.parent.parent.iterdir()) == ["work"]


def test_a_failed_pack_keeps_the_previous_pack(project, monkeypatch):
    from engine_air.outputs.review_pack import MANIFEST, write_review_pack

    out = project.parent.parent / "pack"
    first = write_review_pack(project, out, quantities=("face_mach_margin",))
    before = {p.relative_to(out): p.read_bytes() for p in out.rglob("*") if p.is_file()}
    assert Path(first.manifest_path).name == MANIFEST

    def cancelled():
        return True  # the second run is cancelled part-way
    from engine_air.envelope.evaluate import Cancelled

    with pytest.raises(Cancelled):
        write_review_pack(project, out, quantities=("recovery",), cancelled=cancelled)
    after = {p.relative_to(out): p.read_bytes() for p in out.rglob("*") if p.is_file()}
    assert after == before
    assert sorted(p.name for p in out.parent.iterdir()) == ["pack", "work"]


def test_a_pack_folder_with_a_reviewers_file_is_refused_not_emptied(project, capsys):
    from engine_air.outputs.review_pack import write_review_pack

    out = project.parent.parent / "pack"
    write_review_pack(project, out, quantities=("face_mach_margin",))
    (out / "my notes.txt").write_text("keep me")
    assert main(["pack", str(project), "--out", str(out), "--quantity", "face_mach_margin"]) == 2
    assert "did not write" in capsys.readouterr().err
    assert (out / "my notes.txt").read_text() == "keep me"


def test_output_path_and_staged_folder_keep_the_old_on_failure(tmp_path):
    target = tmp_path / "t.bin"
    target.write_bytes(b"old")
    with pytest.raises(RuntimeError):
        with output_path(target) as tmp:
            Path(tmp).write_bytes(b"half")
            raise RuntimeError("render failed")
    assert target.read_bytes() == b"old" and sorted(os.listdir(tmp_path)) == ["t.bin"]
    with output_path(target) as tmp:
        assert Path(tmp).parent == tmp_path and tmp.endswith(".bin")  # the writer may infer the format
        Path(tmp).write_bytes(b"new")
    assert target.read_bytes() == b"new" and sorted(os.listdir(tmp_path)) == ["t.bin"]
    folder = tmp_path / "f"
    folder.mkdir()
    (folder / "a").write_text("old")
    with pytest.raises(RuntimeError):
        with staged_folder(folder) as staging:
            Path(staging, "a").write_text("new")
            raise RuntimeError("stop")
    assert (folder / "a").read_text() == "old" and sorted(os.listdir(tmp_path)) == ["f", "t.bin"]
    with staged_folder(folder) as staging:
        Path(staging, "b").write_text("new")
    assert sorted(os.listdir(folder)) == ["b"] and sorted(os.listdir(tmp_path)) == ["f", "t.bin"]


def test_the_project_save_api_checks_the_file_on_disk(project):
    from engine_air.project import FileChangedError, file_fingerprint, save_project

    p = load_project(project)
    opened = file_fingerprint(project)
    saved = save_project(p, project, expected=opened)  # unchanged on disk: saved
    assert saved == file_fingerprint(project)
    other = project.read_text().replace("pitot nacelle study", "edited elsewhere")
    project.write_text(other)  # another program saves the file
    with pytest.raises(FileChangedError) as info:
        save_project(p, project, expected=saved)
    assert "changed on disk" in str(info.value) and project.read_text() == other
    save_project(p, project, expected=saved, overwrite=True)  # told to overwrite
    assert load_project(project) == p
    project.write_text(other)
    save_project(p, project)  # callers that pass nothing: as before
    assert load_project(project) == p


# A stream is written straight into, never replaced: renaming a finished temporary file over /dev/null (as root)
# had put a plain file in place of the device. A block device or a socket is refused before anything is written.

def _reader(fifo, got):
    import threading

    def read():
        with open(fifo, "rb") as f:
            got.append(f.read())
    t = threading.Thread(target=read)
    t.start()
    return t


def test_a_named_pipe_takes_the_csv_and_stays_a_pipe(project, tmp_path, capsys):
    import stat

    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    got = []
    reader = _reader(fifo, got)
    assert main(["map", str(project), "--csv", str(fifo)]) in (0, 1)
    reader.join(30)
    file_csv = tmp_path / "file.csv"
    assert main(["map", str(project), "--csv", str(file_csv)]) in (0, 1)
    assert got[0] == file_csv.read_bytes()
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".pipe")]  # no temporary file beside it


@pytest.mark.skipif(not hasattr(os, "geteuid") or os.geteuid() != 0, reason="making a device node needs root")
def test_a_character_device_stays_a_device(project, tmp_path, capsys):
    # a private null device (1, 3), as /dev/null is: every output into it, and it is still the device after
    import stat

    null = tmp_path / "null"
    os.mknod(null, 0o666 | stat.S_IFCHR, os.makedev(1, 3))
    for option in ("--csv", "--parquet", "--png"):
        assert main(["map", str(project), option, str(null)]) in (0, 1)
        assert stat.S_ISCHR(os.stat(null).st_mode), option
    write_output_bytes(null, b"x")
    assert stat.S_ISCHR(os.stat(null).st_mode)


@pytest.mark.skipif(not hasattr(os, "geteuid") or os.geteuid() != 0, reason="making a device node needs root")
def test_a_block_device_is_refused(project, tmp_path, capsys):
    import stat

    disk = tmp_path / "disk"
    os.mknod(disk, 0o600 | stat.S_IFBLK, os.makedev(7, 200))  # a loop device number no disk uses
    assert main(["map", str(project), "--csv", str(disk)]) == 2
    assert "is a device or a socket, not a file" in capsys.readouterr().err
    assert stat.S_ISBLK(os.stat(disk).st_mode)


def test_a_stream_is_not_written_through_a_link_that_is_to_be_replaced(tmp_path):
    # follow_links=False (the project's own file): a link is replaced by the file, whatever it points at
    from engine_air.project.atomic import write_bytes_atomic

    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    link = tmp_path / "p.toml"
    link.symlink_to(fifo)
    write_bytes_atomic(link, b"x = 1\n", follow_links=False)
    assert not link.is_symlink() and link.read_bytes() == b"x = 1\n"
