"""Texts written to a file by a second thread while the caller makes the next (``BatchWriter``).

The CSV writer (``engine_air.outputs.csv_lines``) formats a batch's floats with orjson, which holds the
interpreter's lock; joining the batch's lines (Arrow) and writing them (the system) do not, so a second thread does
both meanwhile. On a regular file the system is also asked every ``WRITE_BACK`` bytes to start writing them to the
disk (``posix_fadvise``), so the fsync that ends a complete output (``engine_air.project.atomic``) finds them
written instead of writing the whole file then.
"""

from __future__ import annotations

from typing import Callable

import numpy as np
import pyarrow as pa

WRITE_BACK = 8 << 20
"""Bytes written between two requests to the system to start writing them to the disk."""


def write_text(fh, text: pa.Array) -> int:
    """The texts of ``text`` (an Arrow string array) one after the other into ``fh``; returns the bytes written."""
    offsets = np.frombuffer(text.buffers()[1], dtype=np.int32 if text.type == pa.string() else np.int64)
    start, end = int(offsets[text.offset]), int(offsets[text.offset + len(text)])
    fh.write(memoryview(text.buffers()[2])[start:end])
    return end - start


class BatchWriter:
    """Texts made (``put``: a call that gives an Arrow string array, e.g. a batch's CSV lines) and written to the
    binary file ``fh`` in order by one worker thread, one at a time. Arrow's kernels and the write release the
    interpreter's lock, so they run beside whatever the calling thread does next. A failure there (a full disk)
    is raised again on the calling thread, at the next ``put``, ``drain`` or at the end; the texts after it are
    dropped, neither made nor written."""

    def __init__(self, fh):
        import queue
        import threading

        self.fh, self.error = fh, None
        self.written = self._position()  # where the bytes not yet handed to the disk begin; None: not a disk file
        self.end = self.written or 0
        self.waiting: queue.Queue = queue.Queue()
        self.idle = threading.Semaphore(1)  # the worker has no text to make: one is handed over only then
        self.thread = threading.Thread(target=self._run, name="batch-writer", daemon=True)

    def __enter__(self) -> "BatchWriter":
        self.thread.start()
        return self

    def _run(self) -> None:
        while (make := self.waiting.get()) is not None:
            if self.error is None:
                try:
                    self._write_back(write_text(self.fh, make()))
                except BaseException as exc:  # handed to the calling thread
                    self.error = exc
            del make  # no reference left to what made the text (a part of a map, say) once it is written
            self.idle.release()
            self.waiting.task_done()
        self.waiting.task_done()

    def _position(self) -> int | None:
        """The file's position when it is a regular file whose writing can be started early, else None."""
        import os
        import stat

        if not hasattr(os, "posix_fadvise"):
            return None
        try:
            if not stat.S_ISREG(os.fstat(self.fh.fileno()).st_mode):
                return None
            self.fh.flush()
            return self.fh.tell()
        except (AttributeError, OSError, ValueError):  # not a file (a buffer in memory), or not seekable
            return None

    def _write_back(self, size: int) -> None:
        """Start the disk writing the last ``WRITE_BACK`` bytes written, without waiting: the fsync of a complete
        output (``engine_air.project.atomic``) then finds them written, where it would otherwise write the whole
        file after the formatting ends (about a tenth of a large map's time)."""
        import os

        if self.written is None:
            return
        self.end += size
        if self.end - self.written < WRITE_BACK:
            return
        try:
            self.fh.flush()
            os.posix_fadvise(self.fh.fileno(), self.written, self.end - self.written, os.POSIX_FADV_DONTNEED)
            self.written = self.end
        except OSError:
            self.written = None  # a file system that refuses the advice: written at the end as before

    def put(self, make: Callable[[], pa.Array]) -> None:
        """Hand over ``make`` when the worker has finished the text before (so at most two are in memory)."""
        self.idle.acquire()
        self._raise()
        self.waiting.put(make)

    def drain(self) -> None:
        """Wait until every text given is written."""
        self.waiting.join()
        self._raise()

    def _raise(self) -> None:
        if self.error is not None:
            raise self.error

    def __exit__(self, *exc) -> None:
        self.waiting.put(None)
        self.thread.join()
        if exc[0] is None:
            self._raise()


__all__ = ["WRITE_BACK", "BatchWriter", "write_text"]
