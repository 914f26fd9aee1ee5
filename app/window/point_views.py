"""When the selected point's slower views (the inlet sketch, the sections) are drawn: after the map, only when
shown, and only for the newest state.

A new result draws the map first. ``AfterPaint`` then waits for the map's own paint event and only after it runs
the panels' update, so the map never waits behind them. ``PointViews`` keeps a *dirty* mark per view:

- ``invalidate(names)`` marks views; each shown, marked view is drawn in its own turn of the event loop
  (``QTimer.singleShot(TURN_MS)``), one view a turn, so the GUI thread never stalls for their sum;
- a view that is not shown (a tab behind another, a closed dock) is not drawn at all; it is drawn when it
  is shown again (``visibilityChanged``);
- a draw reads the window's state when it runs, so a result superseded meanwhile is never drawn: at most
  the newest one is;
- ``invalidate(names, now=True)`` draws the shown ones at once (a click on the map, a changed quantity).
"""

from __future__ import annotations

import logging
from typing import Callable

from PySide6.QtCore import QEvent, QObject, QTimer

log = logging.getLogger(__name__)

TURN_MS = 2
"""The pause before the next deferred step. Not 0: Qt runs zero-timers started while it runs timers in the
same pass, so a chain of them (map paint, panels, sketch, sections) held the GUI thread as one long stall; a
step that is due a little later lets the other timers and input events through between two steps."""


class AfterPaint(QObject):
    """Calls the latest ``call(fn)`` once ``widget`` has painted (or after ``fallback_ms`` if it does not)."""

    def __init__(self, widget, fallback_ms: int = 120, parent=None) -> None:
        super().__init__(parent)
        self._fn: Callable[[], None] | None = None
        self._fallback = QTimer(self)
        self._fallback.setSingleShot(True)
        self._fallback.setInterval(int(fallback_ms))
        self._fallback.timeout.connect(self._run)
        widget.installEventFilter(self)

    def call(self, fn: Callable[[], None]) -> None:
        self._fn = fn
        self._fallback.start()

    def eventFilter(self, _obj, event) -> bool:  # noqa: N802 - Qt override
        if event.type() == QEvent.Paint and self._fn is not None:
            QTimer.singleShot(TURN_MS, self._run)  # the paint runs first; the panels in a later turn
        return False

    def _run(self) -> None:
        fn, self._fn = self._fn, None
        self._fallback.stop()
        if fn is not None:
            fn()


class PointViews(QObject):
    """Dirty marks and deferred, visibility-aware drawing of named views (see the module text)."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._views: dict[str, tuple[object, Callable[[], None]]] = {}
        self._dirty: set[str] = set()
        self._queued = False
        self.draws: dict[str, int] = {}  # how many times each view was drawn (tests, benchmarks)

    def add(self, name: str, dock, draw: Callable[[], None]) -> None:
        """Register view ``name`` shown in ``dock`` (a QDockWidget) and drawn by ``draw()``."""
        self._views[name] = (dock, draw)
        self.draws[name] = 0
        dock.visibilityChanged.connect(lambda visible, n=name: visible and n in self._dirty and self._queue())

    def shown(self, name: str) -> bool:
        """On screen: open, and its tab in front (a tab behind another is moved off screen, not hidden)."""
        dock, _draw = self._views[name]
        return dock.isVisible() and not dock.visibleRegion().isEmpty()

    @property
    def pending(self) -> bool:
        """Some shown view still waits for its draw."""
        return any(self.shown(n) for n in self._dirty)

    def invalidate(self, names=None, now: bool = False) -> None:
        names = list(self._views) if names is None else list(names)
        self._dirty.update(names)
        if now:
            for n in names:
                self.flush(n)
        else:
            self._queue()

    def flush(self, name: str) -> None:
        """Draw ``name`` now if it is marked and shown."""
        if name in self._dirty and self.shown(name):
            self._draw(name)

    def _queue(self) -> None:
        if not self._queued and self.pending:
            self._queued = True
            QTimer.singleShot(TURN_MS, self._draw_next)

    def _draw_next(self) -> None:
        self._queued = False
        for n in self._views:
            if n in self._dirty and self.shown(n):
                self._draw(n)
                break
        self._queue()

    def _draw(self, name: str) -> None:
        self._dirty.discard(name)
        self.draws[name] += 1
        try:
            self._views[name][1]()
        except Exception:  # noqa: BLE001 - a view that cannot be drawn must never stop the window
            log.exception("the %s view could not be drawn", name)
