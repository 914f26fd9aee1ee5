"""The base of every design dialog: one background computation with Run, Cancel, progress and status."""

from __future__ import annotations

from typing import Callable

from PySide6.QtCore import Slot
from PySide6.QtWidgets import QDialog, QHBoxLayout, QLabel, QProgressBar, QPushButton

from engine_air.project.errors import ProjectError

from ..worker import Worker


class TaskDialog(QDialog):
    """A dialog with one background computation at a time: Run, Cancel, Close, progress and status.

    The computation runs on the program's one worker pattern (``app.worker.Worker``): a newer Run
    supersedes an older one, and an older one's late result is dropped.
    """

    def __init__(self, title: str, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle(title)
        self.worker = Worker(self, threads=1, supersede=True)
        self.worker.progress.connect(self._on_progress)
        self.worker.finished.connect(self._on_done)
        self.worker.failed.connect(self._on_failed)
        self.worker.cancelled.connect(self._on_cancelled)
        self.result = None
        self.last_error = ""
        self.run_button = QPushButton("Run")
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setEnabled(False)
        self.close_button = QPushButton("Close")
        self.progress_bar = QProgressBar()
        self.progress_bar.setRange(0, 1000)
        self.progress_bar.setValue(0)
        self.progress_bar.setTextVisible(True)
        self.progress_bar.setFormat("%p%")
        self.status = QLabel("")
        self.status.setWordWrap(True)
        self.run_button.clicked.connect(self.start)
        self.cancel_button.clicked.connect(self.cancel)
        self.close_button.clicked.connect(self.close)

    def button_row(self) -> QHBoxLayout:
        row = QHBoxLayout()
        row.addWidget(self.run_button)
        row.addWidget(self.cancel_button)
        row.addWidget(self.progress_bar, 1)
        row.addWidget(self.close_button)
        return row

    # subclasses --------------------------------------------------------------
    def make_task(self) -> Callable | None:
        """The computation ``fn(progress, cancelled)``; None (after telling the user) when inputs are unusable."""
        raise NotImplementedError

    def show_result(self, result) -> None:
        raise NotImplementedError

    # running -------------------------------------------------------------------
    @property
    def running(self) -> bool:
        return self.worker.busy

    @Slot()
    def start(self) -> None:
        if self.running:
            return
        try:
            fn = self.make_task()
        except ProjectError as exc:
            self._report_error(str(exc))
            return
        if fn is None:
            return
        self.last_error = ""
        self.progress_bar.setValue(0)
        self.status.setText("Running…")
        self.run_button.setEnabled(False)
        self.cancel_button.setEnabled(True)
        self.worker.submit(fn)

    @Slot()
    def cancel(self) -> None:
        if self.running:
            self.worker.cancel()
            self.status.setText("Cancelling…")

    def wait(self, ms: int = 30000) -> None:
        """Block until the computation has ended (for closing and tests)."""
        self.worker.wait(ms)

    def _ended(self) -> None:
        self.run_button.setEnabled(True)
        self.cancel_button.setEnabled(False)

    @Slot(float)
    def _on_progress(self, fraction: float) -> None:
        self.progress_bar.setValue(int(round(1000 * max(0.0, min(1.0, fraction)))))

    def _on_done(self, _gen: int, result) -> None:
        self._ended()
        self.result = result
        self.progress_bar.setValue(1000)
        self.status.setText("Done.")
        self.show_result(result)

    def _on_failed(self, _gen: int, message: str) -> None:
        self._ended()
        self._report_error(message)

    def _report_error(self, message: str) -> None:
        self.last_error = message
        self.status.setText(f"<span style='color:#963e00'>Cannot compute: {message}</span>")

    def _on_cancelled(self, _gen: int) -> None:
        self._ended()
        self.status.setText("Cancelled.")
        self.progress_bar.setValue(0)

    def closeEvent(self, event) -> None:  # noqa: N802 - Qt name
        self.worker.shutdown(30000)
        super().closeEvent(event)

    def reject(self) -> None:
        self.close()
