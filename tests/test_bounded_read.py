"""The bounded reader of user files (project files, rake files): what it refuses, and that it never waits."""

import os
import sys
import threading

import pytest

from engine_air.project import bounded_read
from engine_air.project.bounded_read import read_regular_file
from engine_air.project.errors import ProjectError


def test_a_folder_a_fifo_and_a_file_too_large_are_refused_with_the_limit(tmp_path):
    with pytest.raises(ProjectError, match="is a folder, not a project file"):
        read_regular_file(str(tmp_path), 100, "project file", "at most 100 bytes")
    big = tmp_path / "big.toml"
    big.write_bytes(b"x" * 101)
    with pytest.raises(ProjectError, match="the file has 101 bytes; at most 100 bytes"):
        read_regular_file(str(big), 100, "project file", "at most 100 bytes")
    if hasattr(os, "mkfifo"):
        fifo = tmp_path / "pipe.toml"
        os.mkfifo(fifo)
        with pytest.raises(ProjectError, match="is not a regular file"):
            read_regular_file(str(fifo), 100, "project file", "at most 100 bytes")


@pytest.mark.skipif(not hasattr(os, "mkfifo") or sys.platform == "win32", reason="needs named pipes")
def test_a_pipe_put_in_the_files_place_after_the_check_reads_as_empty_not_forever(tmp_path, monkeypatch):
    # a file swapped for a named pipe between the check and the open: without O_NONBLOCK the open waits for a
    # writer that never comes (a frozen window); with it the read ends at once with no bytes
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    regular = tmp_path / "regular.toml"
    regular.write_bytes(b"")
    real_stat = os.stat
    monkeypatch.setattr(bounded_read.os, "stat", lambda p, *a, **k: real_stat(regular) if os.fspath(p) == str(fifo)
                        else real_stat(p, *a, **k))
    out = {}
    reader = threading.Thread(target=lambda: out.setdefault("raw", read_regular_file(str(fifo), 100, "x", "y")),
                              daemon=True)
    reader.start()
    reader.join(5.0)
    assert not reader.is_alive() and out["raw"] == b""
